//! The yes/no engine against outside references: the Gourevitch & Galanter (1967)
//! asymptotic SDs, nominal coverage, and the exact sampling distribution of Miller (1996).
//! Statistical checks use stated thresholds in Monte Carlo standard errors.

use std::path::Path;
use vigil::engine::{Method, ScenarioSummary};
use vigil::evaluate::{RunOptions, run_plan};
use vigil::model::normal;
use vigil::plan::Plan;
use vigil::vocab::Quantity;

fn plan(
    d_prime: f64,
    criterion: f64,
    presence: f64,
    trials: &[u32],
    correction: &str,
    experiments: u64,
) -> Plan {
    let text = format!(
        "[study]\ntitle = \"test\"\nseed = 99\nexperiments = {experiments}\nrate_correction = \"{correction}\"\n\
         [observer]\nd_prime = {d_prime}\ncriterion = {criterion}\n\
         [[design]]\nname = \"d\"\npresence = {presence}\ntrials = {trials:?}\n"
    );
    Plan::from_str(Path::new("test.toml"), &text).expect("valid plan")
}

fn run(plan: &Plan, exact: bool) -> Vec<ScenarioSummary> {
    run_plan(plan, RunOptions { exact }, &|_| {}).unwrap()
}

/// Gourevitch & Galanter (1967): Var z(p̂) ≈ p(1 − p)/(n φ(z_p)²), written out here
/// independently of the library's fit tables.
fn gg_var_z(p: f64, n: f64) -> f64 {
    let z = normal::z(p).unwrap();
    let phi = (-0.5 * z * z).exp() / (2.0 * std::f64::consts::PI).sqrt();
    p * (1.0 - p) / (n * phi * phi)
}

#[test]
fn monte_carlo_sd_matches_asymptotic_sd_at_large_counts() {
    let (d, c) = (1.5, 0.3);
    let p = plan(d, c, 0.5, &[2000], "log-linear", 20_000);
    let s = &run(&p, false)[0];
    let h = normal::cdf(d / 2.0 - c);
    let f = normal::cdf(-d / 2.0 - c);
    let var_d = gg_var_z(h, 1000.0) + gg_var_z(f, 1000.0);
    for (q, want) in [
        (Quantity::DPrime, var_d.sqrt()),
        (Quantity::Criterion, var_d.sqrt() / 2.0),
    ] {
        let got = s.quantity(q).unwrap().sd;
        // 5 Monte Carlo SEs, plus 1% for the O(1/n) gap between asymptotic and finite SD.
        let tol = 5.0 * got.mc_se + 0.01 * want;
        assert!(
            (got.value - want).abs() < tol,
            "{q:?}: SD {} vs asymptotic {want}",
            got.value
        );
    }
}

#[test]
fn interval_coverage_is_nominal_at_large_counts() {
    let p = plan(1.2, -0.2, 0.4, &[1500], "log-linear", 20_000);
    let s = &run(&p, false)[0];
    for q in [Quantity::DPrime, Quantity::Criterion] {
        let cov = s.quantity(q).unwrap().coverage;
        // The 95% Wilson interval of the MC coverage, widened by 0.5 points of
        // asymptotic slack, must contain the nominal 95%.
        assert!(
            cov.low - 0.005 <= 0.95 && 0.95 <= cov.high + 0.005,
            "{q:?}: {cov:?}"
        );
    }
}

#[test]
fn monte_carlo_means_match_exact_enumeration_at_small_counts() {
    for correction in ["log-linear", "half-n", "none"] {
        let p = plan(1.0, 0.25, 0.4, &[12, 25], correction, 40_000);
        let mc = run(&p, false);
        let ex = run(&p, true);
        for (m, e) in mc.iter().zip(&ex) {
            assert_eq!(e.method, Method::Exact);
            for q in [Quantity::DPrime, Quantity::Criterion] {
                let (mq, eq) = (m.quantity(q).unwrap(), e.quantity(q).unwrap());
                let tol = 5.0 * mq.mean.mc_se;
                assert!(
                    (mq.mean.value - eq.mean.value).abs() < tol,
                    "{correction} {q:?} at {}: MC {} vs exact {}",
                    m.scenario.trials,
                    mq.mean.value,
                    eq.mean.value
                );
                let tol_sd = 5.0 * mq.sd.mc_se;
                assert!(
                    (mq.sd.value - eq.sd.value).abs() < tol_sd,
                    "{correction} {q:?} SD"
                );
                let share = mq.coverage;
                assert!(
                    share.low - 0.01 <= eq.coverage.value && eq.coverage.value <= share.high + 0.01,
                    "{correction} {q:?} coverage MC {share:?} vs exact {}",
                    eq.coverage.value
                );
            }
            let (md, ed) = (m.datasets.degenerate, e.datasets.degenerate);
            assert!(
                md.low - 0.01 <= ed.value && ed.value <= md.high + 0.01,
                "{correction} degenerate share"
            );
        }
    }
}

/// Exact sampling distribution by enumeration (Miller 1996, Percept. Psychophys. 58:65–72
/// [memory]), check values computed with scipy.stats.binom (SciPy 1.17):
/// true H = .8, F = .2 (d′ = 1.683242, c = 0).
#[test]
fn exact_enumeration_matches_published_check_values() {
    let d = 2.0 * normal::z(0.8).unwrap();
    let cases = [
        (40, "half-n", 1.783573, 0.248105),
        (40, "log-linear", 1.663737, 0.206234),
        (100, "half-n", 1.720670, 0.089485),
    ];
    for (trials, correction, mean, var) in cases {
        let p = plan(d, 0.0, 0.5, &[trials], correction, 1);
        let s = &run(&p, true)[0];
        let q = s.quantity(Quantity::DPrime).unwrap();
        assert!(
            (q.mean.value - mean).abs() < 1e-5,
            "{trials} {correction}: E[d′] {}",
            q.mean.value
        );
        assert!(
            (q.sd.value.powi(2) - var).abs() < 1e-5,
            "{trials} {correction}: Var {}",
            q.sd.value.powi(2)
        );
    }
}
