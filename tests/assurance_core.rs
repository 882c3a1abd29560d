//! Assurance (O'Hagan, Stevens & Campbell 2005, *Pharmaceutical Statistics* 4:187–201):
//! a zero-width prior gives the point power exactly; a normal prior matches the one-sided
//! closed form Φ((m − z·s)/√(s² + v)) (common practice) and a SciPy `quad` integral of the
//! normal-approximation power curve (tests/golden/assurance.json, tests/golden/
//! assurance_files.py) within Monte Carlo error.

mod common;

use vigil::assurance::{Prior, assurance};
use vigil::infer::wald_power;
use vigil::model::normal;
use vigil::vocab::Sided;

fn sided(name: &str) -> Sided {
    match name {
        "two-sided" => Sided::TwoSided,
        "greater" => Sided::Greater,
        other => panic!("unknown side {other}"),
    }
}

const DRAWS: usize = 40_000;

#[test]
fn zero_width_prior_gives_the_point_power_exactly() {
    for (effect, se, side) in [
        (0.3, 0.12, Sided::TwoSided),
        (0.1, 0.2, Sided::Greater),
        (-0.4, 0.1, Sided::Less),
    ] {
        let curve = |d: f64| wald_power(d, se, 0.05, side).ok();
        let a = assurance(curve, &Prior::point(effect).unwrap(), 500, 3).unwrap();
        assert_eq!(a.value, a.point_power, "{effect} {se} {side:?}");
        assert_eq!(a.point_power, wald_power(effect, se, 0.05, side).unwrap());
        assert_eq!(a.mc_se, 0.0);
        // A zero-SD normal is the same prior.
        let b = assurance(curve, &Prior::normal(effect, 0.0).unwrap(), 500, 9).unwrap();
        assert_eq!(b.value, a.value);
    }
}

/// One-sided z test, normal prior N(m, v) on the effect, SE s:
/// assurance = Φ((m − z_{1−α}·s)/√(s² + v)) (references.md, assurance; common practice).
/// Within 4 Monte Carlo SEs.
#[test]
fn normal_prior_matches_the_one_sided_closed_form() {
    for (m, sd, s) in [(0.3, 0.1, 0.12), (0.15, 0.2, 0.1), (0.5, 0.05, 0.3)] {
        let curve = |d: f64| wald_power(d, s, 0.05, Sided::Greater).ok();
        let a = assurance(curve, &Prior::normal(m, sd).unwrap(), DRAWS, 17).unwrap();
        let z = normal::z(0.95).unwrap();
        let closed = normal::cdf((m - z * s) / (s * s + sd * sd).sqrt());
        assert!(
            (a.value - closed).abs() <= 4.0 * a.mc_se,
            "m {m} sd {sd} s {s}: {} ± {} vs {closed}",
            a.value,
            a.mc_se
        );
        assert!(a.mc_se > 0.0 && a.mc_se < 0.005, "{}", a.mc_se);
    }
}

#[test]
fn normal_and_truncated_priors_match_scipy_quad() {
    for case in common::golden_cases("assurance.json") {
        let g = |k: &str| case[k].as_f64().unwrap();
        let bound = |k: &str, default: f64| case[k].as_f64().unwrap_or(default);
        let prior = Prior::truncated_normal(
            g("mean"),
            g("sd"),
            bound("low", f64::NEG_INFINITY),
            bound("high", f64::INFINITY),
        )
        .unwrap();
        let side = sided(case["sided"].as_str().unwrap());
        let (se, alpha) = (g("se"), g("alpha"));
        let curve = |d: f64| wald_power(d, se, alpha, side).ok();
        let a = assurance(curve, &prior, DRAWS, 23).unwrap();
        // The point power is the same closed form on both sides: to rounding.
        assert!((a.point_power - g("point_power")).abs() < 1e-12, "{case}");
        assert!(
            (a.value - g("assurance")).abs() <= 4.0 * a.mc_se,
            "{case}: vigil {} ± {}",
            a.value,
            a.mc_se
        );
        assert_eq!(a.failed, 0);
    }
}

#[test]
fn priors_are_validated() {
    assert!(Prior::normal(f64::NAN, 0.1).is_err());
    assert!(Prior::normal(0.0, -0.1).is_err());
    assert!(Prior::truncated_normal(0.5, 0.1, 0.6, 1.0).is_err());
    assert!(Prior::truncated_normal(0.5, 0.1, 0.0, f64::INFINITY).is_ok());
}
