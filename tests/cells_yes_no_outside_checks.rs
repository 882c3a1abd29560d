//! The general path on the plain yes/no record (K = 2, σ = 1) against published closed forms.

use vigil::cells::degeneracy::{Degeneracy, model_degeneracy};
use vigil::cells::information::{expected_information, precision};
use vigil::cells::likelihood::Counts;
use vigil::cells::newton::{NewtonOptions, Start, StopReason, fit};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::spec::{ConditionSpec, Record};
use vigil::model::normal;

mod common;

fn yes_no(present: u64, absent: u64, d: f64, c: f64) -> ObservationModel {
    let rec = Record::Full { present, absent };
    ObservationModel::new(vec![ConditionSpec::yes_no("lab", rec, d, c, 0.5)]).unwrap()
}

fn z(p: f64) -> f64 {
    normal::z(p).unwrap()
}

/// Gourevitch & Galanter (1967), Psychometrika 32:25–33 [memory for the paper and the
/// formula]: Var z_H = H(1−H)/(N_S φ(z_H)²), Var d′ = Var z_H + Var z_F, Var c = Var d′/4,
/// Cov(d′, c) = −½[Var z_H − Var z_F].
fn gourevitch_galanter(h: f64, f: f64, ns: f64, nn: f64) -> (f64, f64, f64) {
    let var_z = |p: f64, n: f64| p * (1.0 - p) / (n * normal::pdf(z(p)).powi(2));
    let (vh, vf) = (var_z(h, ns), var_z(f, nn));
    (vh + vf, (vh + vf) / 4.0, -0.5 * (vh - vf))
}

fn expected_covariance(h: f64, f: f64, ns: u64, nn: u64) -> nalgebra::DMatrix<f64> {
    let (d, c) = (z(h) - z(f), -0.5 * (z(h) + z(f)));
    let model = yes_no(ns, nn, d, c);
    let theta = model.hypothesised_theta();
    let info = expected_information(&model, &theta, &model.block_sizes()).unwrap();
    precision(&model, &theta, &info)
        .unwrap()
        .unwrap()
        .covariance
}

#[test]
fn expected_information_reproduces_gourevitch_galanter() {
    // Check values of the Gourevitch & Galanter variances computed with SciPy 1.17.
    for (h, f, ns, nn, var_d, var_c) in [
        (0.8, 0.2, 50, 50, 0.081655, 0.020414),
        (0.7, 0.1, 100, 100, 0.046592, 0.011648),
        (0.9, 0.3, 40, 60, 0.102005, 0.025501),
    ] {
        let cov = expected_covariance(h, f, ns, nn);
        assert!(
            (cov[(0, 0)] - var_d).abs() < 1e-6,
            "Var d′ {} vs {var_d}",
            cov[(0, 0)]
        );
        assert!(
            (cov[(1, 1)] - var_c).abs() < 1e-6,
            "Var c {} vs {var_c}",
            cov[(1, 1)]
        );
        let (gd, gc, gcov) = gourevitch_galanter(h, f, ns as f64, nn as f64);
        assert!((cov[(0, 0)] - gd).abs() < 1e-10);
        assert!((cov[(1, 1)] - gc).abs() < 1e-10);
        assert!(
            (cov[(0, 1)] - gcov).abs() < 1e-10,
            "Cov {} vs {gcov}",
            cov[(0, 1)]
        );
    }
}

#[test]
fn general_fit_equals_the_closed_form() {
    // Closed form d′ = z(H) − z(F), c = −½[z(H) + z(F)] (Macmillan & Creelman 2005). The second
    // case is printed to 3 decimals in W. Schneider, "Short notes on the theory of signal
    // detection" (d′ 1.805952, c 0.378576 from SciPy 1.17).
    for (hits, ns, fas, nn) in [
        (40.0, 50, 10.0, 50),
        (70.0, 100, 10.0, 100),
        (33.0, 41, 7.0, 63),
    ] {
        let model = yes_no(ns, nn, 1.0, 0.0);
        let counts = Counts::new(
            &model,
            vec![vec![ns as f64 - hits, hits], vec![nn as f64 - fas, fas]],
        )
        .unwrap();
        let f = fit(&model, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
        assert_eq!(f.stop, StopReason::Converged);
        assert!(f.iterations < 20);
        let (h, fa) = (hits / ns as f64, fas / nn as f64);
        assert!((f.theta[0] - (z(h) - z(fa))).abs() < 1e-8, "{:?}", f.theta);
        assert!(
            (f.theta[1] + 0.5 * (z(h) + z(fa))).abs() < 1e-8,
            "{:?}",
            f.theta
        );
        if hits == 70.0 {
            assert!((f.theta[0] - 1.805952).abs() < 1e-6);
            assert!((f.theta[1] - 0.378576).abs() < 1e-6);
        }
    }
}

#[test]
fn fit_reports_iterations_and_never_panics_on_extreme_counts() {
    // All hits and no false alarms: the supremum lies at d′ = ∞ (a rate of 1 and one of 0:
    // the rows are separated), so the shared degeneracy rule refuses the table before any
    // iteration, and says why.
    let model = yes_no(20, 20, 1.0, 0.0);
    let counts = Counts::new(&model, vec![vec![0.0, 20.0], vec![20.0, 0.0]]).unwrap();
    let f = fit(
        &model,
        &counts,
        Start::Hypothesised,
        &NewtonOptions::default(),
    )
    .unwrap();
    assert_eq!((f.stop, f.iterations), (StopReason::Degenerate, 0));
    assert_eq!(
        model_degeneracy(&model, counts.cells()),
        Some((0, Degeneracy::PresentAboveAbsent { at: 1 }))
    );
    assert!(f.theta.iter().all(|t| t.is_finite()));
    assert!(f.iterations <= NewtonOptions::default().max_iterations);
    assert!(Counts::new(&model, vec![vec![1.0, -2.0], vec![3.0, 4.0]]).is_err());
    assert!(
        fit(
            &model,
            &counts,
            Start::Theta(vec![1.0]),
            &NewtonOptions::default()
        )
        .is_err()
    );
}

/// Golden Gourevitch & Galanter variances from SciPy 1.17.1 (tests/golden/gg_variance.json,
/// made by tests/golden/generate.py; library versions in its "meta" block). The expected
/// information is an analytic sum over two cells, so it meets the formula to rounding: 1e-10
/// of Var d′ leaves room for the ~1e-12 relative error of z and φ.
#[test]
fn golden_gourevitch_galanter() {
    let cases = common::golden_cases("gg_variance.json");
    let num = |v: &serde_json::Value| v.as_f64().expect("number");
    for case in cases {
        let (h, f) = (num(&case["H"]), num(&case["F"]));
        let ns = case["n_present"].as_u64().expect("n_present");
        let nn = case["n_absent"].as_u64().expect("n_absent");
        let cov = expected_covariance(h, f, ns, nn);
        let scale = num(&case["var_d"]);
        for (got, key) in [
            (cov[(0, 0)], "var_d"),
            (cov[(1, 1)], "var_c"),
            (cov[(0, 1)], "cov_dc"),
        ] {
            let want = num(&case[key]);
            assert!(
                (got - want).abs() < 1e-10 * scale,
                "{h},{f},{ns},{nn} {key}: {got} vs {want}"
            );
        }
    }
}
