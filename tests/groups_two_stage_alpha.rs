//! Type-I error of the group tests when animals differ and the population sits on the null.
//!
//! The two-stage test (per-animal estimates, then Student's t across animals; Student 1908,
//! Welch 1947 — the summary-statistics approach, common practice for groups of subjects)
//! must reject a true null at rate α within Monte Carlo error. The pooled test, which sums
//! every animal's counts into one fit and ignores between-animal variation, must reject it
//! more often: its SE only reflects binomial noise, while the pooled estimate also varies
//! with which animals were drawn.
//!
//! Threshold: |rate − α| < 4 MC SE, with MC SE = √(α(1 − α)/R) (binomial SE of a
//! proportion); "above α" means above α + 6 MC SE.

use std::path::Path;
use vigil::groups::run_groups;
use vigil::plan::Plan;

const REPLICATES: u64 = 4000;
const ALPHA: f64 = 0.05;

fn mc_se() -> f64 {
    (ALPHA * (1.0 - ALPHA) / REPLICATES as f64).sqrt()
}

fn plan(hypothesis: &str, counts: &str) -> Plan {
    let text = format!(
        r#"
[study]
title = "null population (invented)"
seed = 424242
experiments = {REPLICATES}
alpha = {ALPHA}

[observer]
d_prime = 1.5
criterion = 0.0

[[design]]
name = "yes/no"
presence = 0.5
trials = [40]

[animals]
counts = [{counts}]
sd_d_prime = 0.3
sd_criterion = 0.4
correlation = 0.2

{hypothesis}
"#
    );
    Plan::from_str(Path::new("null.toml"), &text).unwrap()
}

// Bias with c = 0 for the population mean: a true null with between-animal SD 0.4 in c.
// presence 0.5 and c = 0 make every animal's estimate symmetric about its own c, so the null
// is exact for the two-stage test, log-linear correction included.
#[test]
fn one_sample_two_stage_keeps_alpha_and_pooled_does_not() {
    let p = plan("[[hypothesis]]\nname = \"bias\"\nkind = \"bias\"", "10");
    let r = run_groups(&p, &|_| {}).unwrap();
    let t = &r.designs[0].cells[0].summary.tests[0];
    assert!(t.effect == 0.0);
    let two = t.two_stage.value;
    assert!(
        (two - ALPHA).abs() < 4.0 * mc_se(),
        "two-stage type-I error {two} vs α = {ALPHA} (4 MC SE = {})",
        4.0 * mc_se()
    );
    let pooled = t.pooled.value;
    assert!(
        pooled > ALPHA + 6.0 * mc_se(),
        "pooled type-I error {pooled} should exceed α"
    );
    // Testing the true value is the same test here.
    assert_eq!(t.two_stage_false.value, two);
}

// Group difference with shift = 0: Welch's t between two halves of the animals.
#[test]
fn welch_two_stage_keeps_alpha_and_pooled_does_not() {
    let p = plan(
        "[[hypothesis]]\nname = \"populations\"\nkind = \"group-difference\"\nshift = 0.0",
        "16",
    );
    let r = run_groups(&p, &|_| {}).unwrap();
    let t = &r.designs[0].cells[0].summary.tests[0];
    let two = t.two_stage.value;
    assert!(
        (two - ALPHA).abs() < 4.0 * mc_se(),
        "two-stage (Welch) type-I error {two} vs α = {ALPHA}"
    );
    assert!(t.pooled.value > ALPHA + 6.0 * mc_se(), "{}", t.pooled.value);
}
