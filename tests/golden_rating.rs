//! Golden values for the rating fitter from general-purpose libraries.
//!
//! - `rating_equal_variance.json`: statsmodels 0.15.0 `OrderedModel(distr="probit")`, no
//!   constant, per-trial data (the equal-variance rating model is an ordinal probit).
//! - `rating_unequal_variance.json`: the Dorfman & Alf (1969) lnL maximised with SciPy 1.17.1
//!   `optimize.minimize`, SEs from a finite-difference Hessian.
//!
//! Both made by `tests/golden/generate.py` (versions in each file's `meta.library_versions`).
//!
//! Tolerances, from what each reference can support:
//! - estimates (and d_a, A_z, slope): the reference optimum has |∇lnL| = g (recorded per
//!   case: ≤ 1e-6 for statsmodels' BFGS, ~1e-14 for the polished SciPy fits), so it lies
//!   within about Σ·g of the maximum; we allow 2·max_i Σ_j |Σ_ij|·g, plus 1e-8·SE for our
//!   own stopping rule (Newton step below 1e-8 SE). Measured: ≤ 3e-9.
//! - lnL: 1e-10 absolute; two points that close to the maximum differ by ~½δᵀIδ < 1e-15, and
//!   the sums are good to ~1e-14 relative. Measured: ≤ 6e-14.
//! - SEs: relative 5e-6, covariances: 1e-5·SD_i·SD_j. The reference covariances invert
//!   finite-difference Hessians (step ~1e-4): rounding ε·|lnL|/h² ≈ 1e-8 relative to the
//!   Hessian, amplified by its condition number (≤ ~100 here). Measured: SEs ≤ 5e-7
//!   relative, covariances ≤ 3e-6·SD_i·SD_j.

use serde_json::Value;
use vigil::fit::rating::{FitStatus, Param, RatingFitOptions, RatingTable, fit, measures};

mod common;

fn load(name: &str) -> Vec<Value> {
    common::golden_cases(name)
}

/// lnL tolerance (see the module documentation).
const LN_L_TOL: f64 = 1e-10;
/// Relative tolerance of SEs.
const SE_REL_TOL: f64 = 5e-6;
/// Tolerance of covariance entries relative to SD_i·SD_j.
const COV_REL_TOL: f64 = 1e-5;

/// Tolerance of estimates for a case: 2·max row sum of |Σ| times the reference optimum's
/// largest gradient entry, plus 1e-8 of the largest SE for our own stopping rule.
fn estimate_tol(cov: &[Vec<f64>], gradient_max: f64) -> f64 {
    let row_sum = cov
        .iter()
        .map(|r| r.iter().map(|x| x.abs()).sum::<f64>())
        .fold(0.0, f64::max);
    let largest_se = (0..cov.len()).map(|i| cov[i][i].sqrt()).fold(0.0, f64::max);
    2.0 * row_sum * gradient_max + 1e-8 * largest_se
}

fn matrix(v: &Value) -> Vec<Vec<f64>> {
    v.as_array().expect("rows").iter().map(numbers).collect()
}

/// Checks every covariance entry against the reference, relative to the SDs.
fn covariances(name: &str, got: &vigil::fit::rating::Covariance, want: &[Vec<f64>]) {
    for (i, row) in want.iter().enumerate() {
        for (j, &w) in row.iter().enumerate() {
            let scale = (want[i][i] * want[j][j]).sqrt();
            close(
                name,
                "covariance",
                got.entry(i, j).unwrap(),
                w,
                COV_REL_TOL * scale,
            );
        }
    }
}

fn close_rel(name: &str, what: &str, got: f64, want: f64) {
    close(name, what, got, want, SE_REL_TOL * want.abs());
}

fn numbers(v: &Value) -> Vec<f64> {
    v.as_array()
        .expect("an array")
        .iter()
        .map(|x| x.as_f64().expect("a number"))
        .collect()
}

fn number(case: &Value, key: &str) -> f64 {
    case[key]
        .as_f64()
        .unwrap_or_else(|| panic!("key {key} is a number"))
}

fn close(name: &str, what: &str, got: f64, want: f64, tol: f64) {
    assert!(
        (got - want).abs() <= tol,
        "{name}: {what} = {got}, golden {want} (tolerance {tol})"
    );
}

fn table(case: &Value) -> RatingTable {
    RatingTable::new(
        &numbers(&case["absent_counts"]),
        &numbers(&case["present_counts"]),
    )
    .expect("golden counts form a valid table")
}

#[test]
fn equal_variance_matches_statsmodels_ordered_probit() {
    let options = RatingFitOptions {
        fix_sigma: true,
        ..RatingFitOptions::default()
    };
    for case in load("rating_equal_variance.json") {
        let name = case["name"].as_str().unwrap_or("?").to_owned();
        let f = fit(&table(&case), &options).expect("not degenerate");
        assert_eq!(f.status, FitStatus::Converged, "{name}");
        let want_cov = matrix(&case["cov_natural"]);
        let tol = estimate_tol(&want_cov, number(&case, "check_gradient_max_abs"));
        close(&name, "d′", f.mu(), number(&case, "d_prime"), tol);
        close(
            &name,
            "lnL",
            f.ln_likelihood,
            number(&case, "loglik"),
            LN_L_TOL,
        );
        for (j, want) in numbers(&case["criteria"]).into_iter().enumerate() {
            close(&name, "criterion", f.criteria()[j], want, tol);
        }
        let cov = f.covariance().expect("positive-definite information");
        let se = |p| cov.get(p, p).expect("estimated").sqrt();
        close_rel(&name, "SE d′", se(Param::Mu), number(&case, "se_d_prime"));
        for (j, want) in numbers(&case["se_criteria"]).into_iter().enumerate() {
            close_rel(&name, "SE criterion", se(Param::Criterion(j + 1)), want);
        }
        // Order (d′, k_1, …) in both.
        covariances(&name, cov, &want_cov);
    }
}

#[test]
fn unequal_variance_matches_scipy_maximisation() {
    for case in load("rating_unequal_variance.json") {
        let name = case["name"].as_str().unwrap_or("?").to_owned();
        let f = fit(&table(&case), &RatingFitOptions::default()).expect("not degenerate");
        assert_eq!(f.status, FitStatus::Converged, "{name}");
        let want_cov = matrix(&case["cov_natural"]);
        let tol = estimate_tol(&want_cov, number(&case, "gradient_max_abs"));
        close(&name, "μ", f.mu(), number(&case, "mu"), tol);
        close(&name, "σ", f.sigma(), number(&case, "sigma"), tol);
        close(
            &name,
            "lnL",
            f.ln_likelihood,
            number(&case, "loglik"),
            LN_L_TOL,
        );
        for (j, want) in numbers(&case["criteria"]).into_iter().enumerate() {
            close(&name, "criterion", f.criteria()[j], want, tol);
        }
        let cov = f.covariance().expect("positive-definite information");
        let se = |p| cov.get(p, p).expect("estimated").sqrt();
        close_rel(&name, "SE μ", se(Param::Mu), number(&case, "se_mu"));
        close_rel(&name, "SE σ", se(Param::Sigma), number(&case, "se_sigma"));
        for (j, want) in numbers(&case["se_criteria"]).into_iter().enumerate() {
            close_rel(&name, "SE criterion", se(Param::Criterion(j + 1)), want);
        }
        // Order (μ, σ, k_1, …) in both.
        covariances(&name, cov, &want_cov);
        // Smooth functions of (μ, σ) with derivatives below 2 here: the estimates' tolerance.
        let m = measures(&f, 1).expect("measures of a converged fit");
        close(&name, "d_a", m.d_a.value, number(&case, "d_a"), 2.0 * tol);
        close(&name, "A_z", m.a_z.value, number(&case, "A_z"), 2.0 * tol);
        close(
            &name,
            "slope",
            m.slope.value,
            number(&case, "zroc_slope"),
            2.0 * tol,
        );
    }
}
