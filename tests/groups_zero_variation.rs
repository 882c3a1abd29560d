//! With no between-animal variation and no lapses, a group of N animals × n trials carries
//! the same information as one subject given N·n trials.
//!
//! - The pooled table of N identical animals is exactly Binomial(N·n_present, H) hits and
//!   Binomial(N·n_absent, F) false alarms (a sum of independent binomials with one p), so the
//!   pooled fit has the single subject's sampling distribution: its mean and SD must agree
//!   within Monte Carlo error (the single subject run by the engine's yes/no kernel).
//! - The two-stage group mean of ĉ has variance Var(ĉ at n)/N, which equals Var(ĉ at N·n)
//!   to first order (Gourevitch & Galanter 1967 variance ∝ 1/n); at n = 100 per animal the
//!   second-order terms are small, so the SDs must agree within 4 MC SE plus 3%.
//!
//! Thresholds: means within 5 combined MC SEs; SDs within 5 combined MC SEs of an SD
//! (SD/√(2(R − 1)), normal theory).

use std::path::Path;
use vigil::engine::parallel::run_replicates;
use vigil::engine::scenario_kernel::ScenarioKernel;
use vigil::engine::summary::{Method, summarise};
use vigil::groups::run_groups;
use vigil::infer::z_critical;
use vigil::model::Observer;
use vigil::plan::{Plan, Scenario};
use vigil::vocab::Quantity;
use vigil::vocab::RateCorrection;

const R: u64 = 4000;
const ANIMALS: u32 = 8;
const TRIALS: u32 = 100;

fn group_plan() -> Plan {
    let text = format!(
        r#"
[study]
title = "identical animals (invented)"
seed = 99
experiments = {R}

[observer]
d_prime = 1.5
criterion = 0.3

[[design]]
name = "yes/no"
presence = 0.5
trials = [{TRIALS}]

[animals]
counts = [{ANIMALS}]
"#
    );
    Plan::from_str(Path::new("zero.toml"), &text).unwrap()
}

fn sd_se(sd: f64) -> f64 {
    sd / (2.0 * (R as f64 - 1.0)).sqrt()
}

#[test]
fn group_estimates_match_one_subject_with_all_the_trials() {
    let plan = group_plan();
    let report = run_groups(&plan, &|_| {}).unwrap();
    let g = &report.designs[0].cells[0].summary;
    assert_eq!(g.animals_dropped.value, 0.0);

    // One subject with N·n trials: 400 present, 400 absent.
    let n = ANIMALS * TRIALS;
    let observer = Observer {
        d_prime: 1.5,
        criterion: 0.3,
        sigma: 1.0,
        lapse: None,
    };
    let kernel = ScenarioKernel::yes_no(
        &observer,
        n / 2,
        n / 2,
        RateCorrection::LogLinear,
        z_critical(0.95),
    )
    .unwrap();
    let tally = run_replicates(&kernel, 7, 0, R, &|_| {});
    let scenario = Scenario {
        id: 0,
        design: 0,
        trials: n,
        conditions: Vec::new(),
    };
    let single = summarise(scenario, "single", &tally, Method::MonteCarlo);

    for (quantity, pooled, group) in [
        (Quantity::Criterion, &g.pooled_criterion, &g.criterion),
        (Quantity::DPrime, &g.pooled_d_prime, &g.d_prime),
    ] {
        let s = single.quantity(quantity).unwrap();
        // Pooled fit: the same distribution as the single subject.
        let mean_tol = 5.0 * s.mean.mc_se.hypot(pooled.mean.mc_se);
        assert!(
            (pooled.mean.value - s.mean.value).abs() < mean_tol,
            "{quantity:?}: pooled mean {} vs single {}",
            pooled.mean.value,
            s.mean.value
        );
        let sd_tol = 5.0 * sd_se(s.sd.value).hypot(sd_se(pooled.sd.value));
        assert!(
            (pooled.sd.value - s.sd.value).abs() < sd_tol,
            "{quantity:?}: pooled SD {} vs single {}",
            pooled.sd.value,
            s.sd.value
        );
        assert!(
            (pooled.mean_se.value - s.mean_se.value).abs() < 0.01 * s.mean_se.value,
            "{quantity:?}: pooled mean SE {} vs single {}",
            pooled.mean_se.value,
            s.mean_se.value
        );
        // Two-stage group mean: the same precision to first order.
        let tol = 4.0 * sd_se(s.sd.value).hypot(sd_se(group.sd.value)) + 0.03 * s.sd.value;
        assert!(
            (group.sd.value - s.sd.value).abs() < tol,
            "{quantity:?}: two-stage SD {} vs single {}",
            group.sd.value,
            s.sd.value
        );
        assert!(
            (group.mean.value - s.mean.value).abs() < 0.02,
            "{quantity:?}: two-stage mean {} vs single {}",
            group.mean.value,
            s.mean.value
        );
    }
}
