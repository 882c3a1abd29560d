//! Tests of the fitter as a whole: closed forms, published check values, parameter recovery,
//! bad starts, degenerate tables and the iteration limit.

use super::*;
use crate::model::normal;
use crate::vocab::RateCorrection;

fn yes_no(hits: f64, n_present: f64, false_alarms: f64, n_absent: f64) -> RatingTable {
    RatingTable::new(
        &[n_absent - false_alarms, false_alarms],
        &[n_present - hits, hits],
    )
    .unwrap()
}

fn fixed() -> RatingFitOptions {
    RatingFitOptions {
        fix_sigma: true,
        ..RatingFitOptions::default()
    }
}

fn expected_table(p: &RatingParams, trials: f64) -> RatingTable {
    let (a, s) = p.cell_probabilities();
    let k = p.categories();
    let a: Vec<f64> = a[..k].iter().map(|x| x * trials).collect();
    let s: Vec<f64> = s[..k].iter().map(|x| x * trials).collect();
    RatingTable::new(&a, &s).unwrap()
}

// With K = 2 and σ = 1 the maximum-likelihood estimate is the closed form d′ = z(H) − z(F),
// c = −[z(H) + z(F)]/2 (Macmillan & Creelman 2005), and the observed information at it gives
// the asymptotic variances of Gourevitch & Galanter (1967, Psychometrika 32:25–33; formula from
// memory): Var(d′) = H(1−H)/(N_s φ(z_H)²) + F(1−F)/(N_n φ(z_F)²),
// Var(c) = Var(d′)/4.
#[test]
fn two_categories_with_fixed_sigma_give_the_closed_form_and_its_variances() {
    let cases = [
        (70.0, 100.0, 10.0, 100.0),
        (40.0, 50.0, 10.0, 50.0),
        (36.0, 40.0, 18.0, 60.0),
        (3.0, 7.0, 5.0, 11.0),
        (20.5, 21.0, 5.0, 25.0),
    ];
    for (h, ns, f, nn) in cases {
        let fit = fit(&yes_no(h, ns, f, nn), &fixed()).unwrap();
        assert_eq!(fit.status, FitStatus::Converged);
        let (hr, fr) = (h / ns, f / nn);
        let (zh, zf) = (normal::z(hr).unwrap(), normal::z(fr).unwrap());
        let m = measures(&fit, 1).unwrap();
        assert!(
            (m.d_prime.value - (zh - zf)).abs() < 1e-8,
            "{h}/{ns}, {f}/{nn}"
        );
        assert!((m.c.value + 0.5 * (zh + zf)).abs() < 1e-8);
        let var_zh = hr * (1.0 - hr) / (ns * normal::pdf(zh).powi(2));
        let var_zf = fr * (1.0 - fr) / (nn * normal::pdf(zf).powi(2));
        let var_d = var_zh + var_zf;
        assert!((m.d_prime.se.powi(2) - var_d).abs() < 1e-6);
        assert!((m.c.se.powi(2) - var_d / 4.0).abs() < 1e-6);
        // Cov(d′, c) = −½[Var z_H − Var z_F] (same source, from memory).
        let corr = -0.5 * (var_zh - var_zf) / (m.d_prime.se * m.c.se);
        assert!((m.corr_d_prime_c - corr).abs() < 1e-6);
    }
}

// Check values of the Gourevitch & Galanter (1967) variances computed with SciPy 1.17, H/F
// with N_s/N_n trials: Var(d′) and Var(c) to 6 decimals.
#[test]
fn asymptotic_variances_match_the_reference_table() {
    let cases = [
        (40.0, 50.0, 10.0, 50.0, 0.081655, 0.020414),
        (70.0, 100.0, 10.0, 100.0, 0.046592, 0.011648),
        (36.0, 40.0, 18.0, 60.0, 0.102005, 0.025501),
    ];
    for (h, ns, f, nn, var_d, var_c) in cases {
        let m = measures(&fit(&yes_no(h, ns, f, nn), &fixed()).unwrap(), 1).unwrap();
        assert!((m.d_prime.se.powi(2) - var_d).abs() < 6e-7, "{h}/{ns}");
        assert!((m.c.se.powi(2) - var_c).abs() < 6e-7, "{h}/{ns}");
    }
}

// d′ and c check values: printed to 3 decimals in W. Schneider, "Short notes on the theory
// of signal detection"; 6 decimals computed with SciPy 1.17.
#[test]
fn yes_no_estimates_match_the_reference_table() {
    let cases = [
        (70.0, 10.0, 1.805952, 0.378576),
        (50.0, 40.0, 0.253347, 0.126674),
        (85.0, 5.0, 2.681287, 0.304210),
        (70.0, 40.0, 0.777748, -0.135527),
    ];
    for (h, f, d, c) in cases {
        let m = measures(&fit(&yes_no(h, 100.0, f, 100.0), &fixed()).unwrap(), 1).unwrap();
        assert!((m.d_prime.value - d).abs() < 6e-7, "H = {h}%");
        assert!((m.c.value - c).abs() < 6e-7, "H = {h}%");
    }
}

// Corrected yes/no tables, check values computed with SciPy 1.17: the 1/(2N) rule
// (Macmillan & Kaplan 1985) is HalfCount with K = 2, the log-linear rule (Hautus 1995) is
// LogLinear.
#[test]
fn corrections_match_the_reference_table() {
    let cases = [
        ((50.0, 50.0, 0.0, 50.0), (4.652696, 0.0), (4.667537, 0.0)),
        (
            (20.0, 20.0, 5.0, 25.0),
            (2.801585, -0.559171),
            (2.781847, -0.589829),
        ),
        (
            (9.0, 10.0, 0.0, 10.0),
            (2.926405, 0.181651),
            (2.787425, 0.296909),
        ),
    ];
    for ((h, ns, f, nn), half, log_linear) in cases {
        let raw = yes_no(h, ns, f, nn);
        for (correction, (d, c)) in [
            (RateCorrection::HalfN, half),
            (RateCorrection::LogLinear, log_linear),
        ] {
            let table = apply_correction(&raw, correction).unwrap();
            let m = measures(&fit(&table, &fixed()).unwrap(), 1).unwrap();
            assert!(
                (m.d_prime.value - d).abs() < 6e-7,
                "{correction:?} {h}/{ns}"
            );
            assert!((m.c.value - c).abs() < 6e-7, "{correction:?} {h}/{ns}");
        }
    }
}

// Expected counts (probabilities × 1e6 trials) are fitted exactly by the true parameters.
#[test]
fn recovers_the_parameters_from_expected_counts() {
    let cases: [(f64, f64, &[f64]); 6] = [
        (1.5, 1.25, &[-0.5, 0.25, 1.0, 1.75]),
        (0.8, 0.7, &[-1.0, 0.5]),
        (2.5, 2.0, &[-1.5, -0.5, 0.3, 1.2, 2.0, 2.8, 3.5]),
        (0.3, 1.0, &[0.0, 0.2, 0.4]),
        (
            3.0,
            0.5,
            &[-2.0, -1.0, 0.0, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 5.0],
        ),
        (1.0, 1.6, &[1.2, 2.2]),
    ];
    for (mu, sigma, criteria) in cases {
        let truth = RatingParams::new(mu, sigma, criteria).unwrap();
        let table = expected_table(&truth, 1e6);
        for fix_sigma in [false, true] {
            if fix_sigma && sigma != 1.0 {
                continue;
            }
            let options = RatingFitOptions {
                fix_sigma,
                ..RatingFitOptions::default()
            };
            let fit = fit(&table, &options).unwrap();
            assert_eq!(fit.status, FitStatus::Converged, "μ = {mu}, σ = {sigma}");
            assert!((fit.mu() - mu).abs() < 1e-6, "μ̂ = {}", fit.mu());
            assert!((fit.sigma() - sigma).abs() < 1e-6, "σ̂ = {}", fit.sigma());
            for (a, b) in fit.criteria().iter().zip(criteria) {
                assert!((a - b).abs() < 1e-6, "k̂ = {a}, k = {b}");
            }
            assert!(fit.covariance().is_some());
        }
    }
}

#[test]
fn converges_from_bad_starts() {
    let table =
        RatingTable::new(&[14.0, 12.0, 9.0, 10.0, 5.0], &[3.0, 6.0, 8.0, 13.0, 20.0]).unwrap();
    let reference = fit(&table, &RatingFitOptions::default()).unwrap();
    assert_eq!(reference.status, FitStatus::Converged);
    let starts: [(f64, f64, [f64; 4]); 5] = [
        (-3.0, 4.0, [-5.0, -4.9, -4.8, -4.7]),
        (6.0, 0.2, [3.0, 4.0, 5.0, 6.0]),
        (0.0, 1.0, [-0.01, 0.0, 0.01, 0.02]),
        (2.0, 6.0, [-8.0, -2.0, 2.0, 8.0]),
        (-1.0, 0.3, [1.0, 1.5, 2.0, 2.5]),
    ];
    for (mu, sigma, criteria) in starts {
        let start = RatingParams::new(mu, sigma, &criteria).unwrap();
        let f = fit_from(&table, &RatingFitOptions::default(), &start).unwrap();
        assert_eq!(
            f.status,
            FitStatus::Converged,
            "start μ = {mu}, σ = {sigma}"
        );
        assert!((f.mu() - reference.mu()).abs() < 1e-7);
        assert!((f.sigma() - reference.sigma()).abs() < 1e-7);
        assert!((f.ln_likelihood - reference.ln_likelihood).abs() < 1e-9);
        for (a, b) in f.criteria().iter().zip(reference.criteria()) {
            assert!((a - b).abs() < 1e-7);
        }
    }
}

// A table (from a simulated run, log-linear corrected) on which the line search once stalled
// ~1e-7 SE from the maximum, when Φ came from statrs' erfc (~1e-10 relative error, with
// jumps); see newton::LN_L_NOISE.
#[test]
fn converges_despite_noise_in_the_normal_cdf() {
    let table = RatingTable::new(
        &[6.5, 12.5, 9.5, 2.5, 0.5, 1.5],
        &[1.5, 2.5, 2.5, 3.5, 9.5, 13.5],
    )
    .unwrap();
    for options in [fixed(), RatingFitOptions::default()] {
        let f = fit(&table, &options).unwrap();
        assert_eq!(f.status, FitStatus::Converged, "{options:?}");
        assert!(f.iterations < 10);
    }
}

#[test]
fn the_maximum_is_a_maximum() {
    let table = RatingTable::new(&[7.0, 11.0, 9.0, 3.0], &[2.0, 5.0, 12.0, 11.0]).unwrap();
    let f = fit(&table, &RatingFitOptions::default()).unwrap();
    let best = likelihood::ln_likelihood(&table, f.params());
    assert!((best - f.ln_likelihood).abs() < 1e-12);
    for (dm, ds, dk) in [
        (1e-3, 0.0, 0.0),
        (-1e-3, 0.0, 0.0),
        (0.0, 1e-3, 0.0),
        (0.0, 0.0, 1e-3),
    ] {
        let mut k = f.criteria().to_vec();
        k[1] += dk;
        let p = RatingParams::new(f.mu() + dm, f.sigma() + ds, &k).unwrap();
        assert!(likelihood::ln_likelihood(&table, &p) < best);
    }
}

#[test]
fn degenerate_tables_are_refused() {
    let empty_column = RatingTable::new(&[5.0, 0.0, 5.0], &[2.0, 0.0, 8.0]).unwrap();
    assert_eq!(
        fit(&empty_column, &RatingFitOptions::default()),
        Err(FitError::Degenerate(Degeneracy::EmptyCategory {
            category: 1
        }))
    );
    let perfect = yes_no(20.0, 20.0, 3.0, 20.0);
    assert!(matches!(
        fit(&perfect, &fixed()),
        Err(FitError::Degenerate(Degeneracy::PresentAboveAbsent { .. }))
    ));
    // σ free needs at least three categories.
    let two = yes_no(15.0, 20.0, 3.0, 20.0);
    assert_eq!(
        fit(&two, &RatingFitOptions::default()),
        Err(FitError::Degenerate(Degeneracy::SigmaWithTwoCategories))
    );
    assert!(fit(&two, &fixed()).is_ok());
}

#[test]
fn start_must_match_the_table() {
    let table = RatingTable::new(&[5.0, 3.0, 2.0], &[2.0, 3.0, 5.0]).unwrap();
    let start = RatingParams::new(1.0, 1.0, &[0.0]).unwrap();
    assert_eq!(
        fit_from(&table, &RatingFitOptions::default(), &start),
        Err(FitError::StartMismatch { start: 2, table: 3 })
    );
}

#[test]
fn iteration_limit_is_reported_not_hidden() {
    let table =
        RatingTable::new(&[14.0, 12.0, 9.0, 10.0, 5.0], &[3.0, 6.0, 8.0, 13.0, 20.0]).unwrap();
    let start = RatingParams::new(-3.0, 4.0, &[-5.0, -4.9, -4.8, -4.7]).unwrap();
    for max_iter in [0, 1, 2] {
        let options = RatingFitOptions {
            max_iter,
            ..RatingFitOptions::default()
        };
        let f = fit_from(&table, &options, &start).unwrap();
        assert_eq!(f.status, FitStatus::IterationLimit);
        assert_eq!(f.iterations, max_iter);
        assert!(f.covariance().is_none());
        assert_eq!(
            measures(&f, 2),
            Err(MeasureError::NotConverged(FitStatus::IterationLimit))
        );
    }
    // A tolerance of 0 can never be met.
    let options = RatingFitOptions {
        gradient_tol: 0.0,
        max_iter: 30,
        ..RatingFitOptions::default()
    };
    let f = fit(&table, &options).unwrap();
    assert_ne!(f.status, FitStatus::Converged);
}

#[test]
fn covariance_layout() {
    let table = RatingTable::new(&[7.0, 11.0, 9.0, 3.0], &[2.0, 5.0, 12.0, 11.0]).unwrap();
    let free = fit(&table, &RatingFitOptions::default()).unwrap();
    let cov = free.covariance().unwrap();
    assert_eq!(cov.dim(), 5);
    assert_eq!(cov.get(Param::Sigma, Param::Sigma), cov.entry(1, 1));
    assert_eq!(cov.get(Param::Criterion(3), Param::Mu), cov.entry(4, 0));
    assert_eq!(cov.get(Param::Criterion(4), Param::Mu), None);
    assert_eq!(cov.entry(5, 0), None);
    let f = fit(&table, &fixed()).unwrap();
    let cov = f.covariance().unwrap();
    assert_eq!(cov.dim(), 4);
    assert_eq!(cov.get(Param::Sigma, Param::Mu), None);
    assert_eq!(
        cov.get(Param::Criterion(1), Param::Criterion(1)),
        cov.entry(1, 1)
    );
    assert!(f.sigma_fixed() && f.sigma() == 1.0);
}
