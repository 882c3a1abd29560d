//! Calibration of the random-effects analysis on a null with between-animal variation:
//! 20 animals × 20 trials, animals' d′ and c drawn with SDs 0.3 and 0.35 (correlated −0.3),
//! population mean c = 0, so the "bias" hypothesis is true.
//!
//! - Its Wald and signed-root likelihood-ratio tests of the mean criterion, referred to
//!   Student's t on the animals' 19 degrees of freedom (the between-within rule), must reject
//!   at rate α within Monte Carlo error.
//! - Its intervals for the population mean c (± t₁₉ × SE) and d′ (± z × SE, a within-animal
//!   contrast) must cover the population value at the nominal 95% within Monte Carlo error.
//!
//! Threshold: |rate − nominal| < 3.5 MC SE with MC SE = √(p(1 − p)/R), the binomial SE of a
//! proportion over R studies (a false failure has probability < 5e-4 per check). At R = 3000
//! that is ±0.014; referring the same statistics to N(0, 1) gave a Wald false-positive rate
//! of 0.067 and a coverage of the mean c of 93.3% on this null (2000 studies, docs/groups.md),
//! which this test rejects.

use std::path::Path;
use vigil::groups::run_groups;
use vigil::plan::Plan;

const STUDIES: u64 = 3000;
const ALPHA: f64 = 0.05;
const LEVEL: f64 = 0.95;

fn mc_se(p: f64) -> f64 {
    (p * (1.0 - p) / STUDIES as f64).sqrt()
}

fn plan() -> Plan {
    let text = format!(
        r#"
[study]
title = "random-effects null (invented)"
seed = 8080
experiments = {STUDIES}
confidence = {LEVEL}
alpha = {ALPHA}

[observer]
d_prime = 1.2
criterion = 0.0

[[design]]
name = "yes/no"
presence = 0.5
trials = [20]

[animals]
counts = [20]
sd_d_prime = 0.3
sd_criterion = 0.35
correlation = -0.3
random_effects = true

[[hypothesis]]
name = "bias"
kind = "bias"
"#
    );
    Plan::from_str(Path::new("null.toml"), &text).unwrap()
}

fn within(what: &str, rate: f64, nominal: f64) {
    let tol = 3.5 * mc_se(nominal);
    assert!(
        (rate - nominal).abs() < tol,
        "{what}: {rate} vs nominal {nominal} (3.5 MC SE = {tol})"
    );
}

#[test]
fn tests_keep_alpha_and_intervals_cover_at_twenty_animals() {
    let r = run_groups(&plan(), &|_| {}).unwrap();
    let s = &r.designs[0].cells[0].summary;
    let re = s.random_effects.as_ref().expect("random-effects summary");
    // A failed fit counts as not rejecting, so convergence must be near complete for the
    // rates to mean anything (the issue asks ≥ 99% on bundled plans).
    assert!(
        re.converged.value >= 0.99,
        "converged {}",
        re.converged.value
    );
    let t = &re.tests[0];
    assert_eq!(
        t.df,
        Some(19.0),
        "reference: t on N − 1 = 19 degrees of freedom"
    );
    within("Wald false positives", t.wald_false.value, ALPHA);
    within("likelihood-ratio false positives", t.lr_false.value, ALPHA);
    within("coverage of the mean c", re.criterion.coverage.value, LEVEL);
    within("coverage of the mean d′", re.d_prime.coverage.value, LEVEL);
    // The two-stage t test on the same studies is exact here (docs/groups.md): a sanity
    // anchor that the simulated null is the one intended.
    within(
        "two-stage false positives",
        s.tests[0].two_stage_false.value,
        ALPHA,
    );
}
