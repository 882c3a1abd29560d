//! Power and the sample-size search against outside references: the normal-approximation
//! power of a Wald test from the expected information, type-I error at a true null
//! (thresholds in Monte Carlo SEs), and the search's reproducibility, monotonicity and
//! fresh-seed check.

use std::path::Path;
use vigil::cells::information::{UnitInformation, precision};
use vigil::evaluate::{RunOptions, run_plan};
use vigil::model::normal;
use vigil::plan::Plan;
use vigil::power::asymptotic;
use vigil::search::{SearchOutcome, search_design};

/// Two linked yes/no conditions with d′ per condition and criteria `c_low`, `c_high`.
fn plan(extra: &str, d_low: f64, d_high: f64, trials: &str, seed: u64, experiments: u64) -> Plan {
    let text = format!(
        "[study]\ntitle = \"t\"\nseed = {seed}\nexperiments = {experiments}\nmax_trials = 3000\n\
         [observer]\nd_prime = 1.0\ncriterion = 0.0\n\
         [[design]]\nname = \"two conditions\"\npresence = 0.5\ntrials = {trials}\nshared = [\"criterion\"]\n\
         [[design.condition]]\nname = \"low\"\nd_prime = {d_low}\ncriterion = 0.0\n\
         [[design.condition]]\nname = \"high\"\nd_prime = {d_high}\ncriterion = 0.0\n{extra}"
    );
    Plan::from_str(Path::new("t.toml"), &text).unwrap()
}

const DPRIME_TEST: &str = "[[hypothesis]]\nname = \"sensitivity\"\nkind = \"sensitivity-difference\"\nconditions = [\"low\", \"high\"]\n";

/// At large counts the Monte Carlo power of the Wald test for a d′ difference matches the
/// normal-approximation power Φ(δ/SE − z) + Φ(−δ/SE − z) with the SE from the expected
/// information (common practice; e.g. Cohen 1988 for the normal approximation [memory]).
#[test]
fn wald_power_matches_normal_approximation_at_large_counts() {
    let p = plan(DPRIME_TEST, 1.0, 1.25, "[800]", 5, 4000);
    let s = &run_plan(&p, RunOptions::default(), &|_| {}).unwrap()[0];
    let test = &s.tests[0];
    let design = &p.designs()[0];
    let model = asymptotic::analysis_model(&p, design, 800).unwrap();
    let contrast = vigil::power::contrast(&p, design, &model, &p.hypotheses()[0]).unwrap();
    let point = asymptotic::at(
        &p,
        design,
        800,
        &[(contrast.clone(), &p.hypotheses()[0])],
        &[],
    )
    .unwrap();
    let expected = point.power[0];
    // The normal-approximation power written out here, with the SE of the d′ difference
    // from the expected information.
    let theta = model.hypothesised_theta();
    let info = UnitInformation::new(&model, &theta)
        .unwrap()
        .total(&model.block_sizes())
        .unwrap();
    let cov = precision(&model, &theta, &info)
        .unwrap()
        .unwrap()
        .covariance;
    let (_, se) = contrast.wald(&theta, &cov);
    let z = normal::z(0.975).unwrap();
    let by_hand = normal::cdf(0.25 / se - z) + normal::cdf(-0.25 / se - z);
    assert!((by_hand - expected).abs() < 1e-12);
    assert!(
        expected > 0.3 && expected < 0.9,
        "an informative power: {expected}"
    );
    // 5 Monte Carlo SEs plus 0.02 for the finite-sample gap.
    let mc_se = (expected * (1.0 - expected) / 4000.0).sqrt();
    assert!(
        (test.wald.value - expected).abs() < 5.0 * mc_se + 0.02,
        "MC Wald power {} vs normal approximation {expected}",
        test.wald.value
    );
}

/// On a null truth (equal d′ in both conditions) both tests reject at a rate within Monte
/// Carlo error of α at moderate counts (6 MC SEs).
#[test]
fn type_one_error_is_near_alpha_at_moderate_counts() {
    let p = plan(DPRIME_TEST, 1.2, 1.2, "[300]", 17, 6000);
    let s = &run_plan(&p, RunOptions::default(), &|_| {}).unwrap()[0];
    let test = &s.tests[0];
    assert!(test.null_true);
    let se = (0.05 * 0.95 / 6000.0_f64).sqrt();
    for (name, share) in [("Wald", test.wald), ("LR", test.likelihood_ratio)] {
        assert!(
            (share.value - 0.05).abs() < 6.0 * se,
            "{name}: {}",
            share.value
        );
    }
}

fn shift_plan(power: f64, seed: u64) -> Plan {
    let extra = format!(
        "[[hypothesis]]\nname = \"shift\"\nkind = \"criterion-shift\"\nconditions = [\"low\", \"high\"]\n\
         [targets]\npower = {power}\n"
    );
    let text = format!(
        "[study]\ntitle = \"t\"\nseed = {seed}\nexperiments = 1000\nmax_trials = 3000\n\
         [observer]\nd_prime = 1.2\ncriterion = 0.0\n\
         [[design]]\nname = \"yes/no\"\npresence = 0.5\ntrials = [40]\n\
         [[design.condition]]\nname = \"low\"\ncriterion = 0.3\n\
         [[design.condition]]\nname = \"high\"\ncriterion = -0.1\n{extra}"
    );
    Plan::from_str(Path::new("t.toml"), &text).unwrap()
}

fn found(p: &Plan) -> u32 {
    match search_design(p, 0, &|_| {}).unwrap().outcome {
        SearchOutcome::Found { trials, .. } => trials,
        other => panic!("not found: {other:?}"),
    }
}

#[test]
fn search_is_reproducible_monotone_and_holds_on_a_fresh_seed() {
    let n = found(&shift_plan(0.8, 3));
    assert_eq!(n, found(&shift_plan(0.8, 3)), "same seed, same answer");
    let lower = found(&shift_plan(0.6, 3));
    let higher = found(&shift_plan(0.9, 3));
    assert!(
        lower <= n && n <= higher,
        "monotone in the target: {lower} {n} {higher}"
    );
    // Re-run the answer with a fresh seed: power within Monte Carlo error of the target
    // (its Wilson interval reaches 0.8).
    let fresh = shift_plan(0.8, 999).with_design_trials(0, vec![n]).unwrap();
    let s = &run_plan(&fresh, RunOptions::default(), &|_| {}).unwrap()[0];
    assert!(
        s.tests[0].likelihood_ratio.high >= 0.8,
        "{:?}",
        s.tests[0].likelihood_ratio
    );
}
