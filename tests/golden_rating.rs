//! Golden values for the rating fitter from general-purpose libraries.
//!
//! - `rating_equal_variance.json`: statsmodels 0.15.0 `OrderedModel(distr="probit")`, no
//!   constant, per-trial data (the equal-variance rating model is an ordinal probit).
//! - `rating_unequal_variance.json`: the Dorfman & Alf (1969) lnL maximised with SciPy 1.17.1
//!   `optimize.minimize`, SEs from a finite-difference Hessian.
//!
//! Both made by `tests/golden/generate.py` in the main repository (versions in each file's
//! `meta.library_versions`). Estimates and lnL must agree to 1e-4, SEs and covariances to
//! 1e-3 (the reference SEs come from finite differences).

use serde_json::Value;
use vigil::fit::rating::{FitOptions, FitStatus, Param, RatingTable, fit, measures};

const GOLDEN_DIR: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/golden");

fn load(name: &str) -> Vec<Value> {
    let path = format!("{GOLDEN_DIR}/{name}");
    let text = std::fs::read_to_string(&path)
        .unwrap_or_else(|e| panic!("golden file {path} is missing or unreadable: {e}"));
    let json: Value = serde_json::from_str(&text).expect("golden file is valid JSON");
    json["cases"].as_array().expect("a cases array").clone()
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
    let options = FitOptions {
        fix_sigma: true,
        ..FitOptions::default()
    };
    for case in load("rating_equal_variance.json") {
        let name = case["name"].as_str().unwrap_or("?").to_owned();
        let f = fit(&table(&case), &options).expect("not degenerate");
        assert_eq!(f.status, FitStatus::Converged, "{name}");
        close(&name, "d′", f.mu(), number(&case, "d_prime"), 1e-4);
        close(&name, "lnL", f.ln_likelihood, number(&case, "loglik"), 1e-4);
        for (j, want) in numbers(&case["criteria"]).into_iter().enumerate() {
            close(&name, "criterion", f.criteria()[j], want, 1e-4);
        }
        let cov = f.covariance().expect("positive-definite information");
        let se = |p| cov.get(p, p).expect("estimated").sqrt();
        close(
            &name,
            "SE d′",
            se(Param::Mu),
            number(&case, "se_d_prime"),
            1e-3,
        );
        for (j, want) in numbers(&case["se_criteria"]).into_iter().enumerate() {
            close(
                &name,
                "SE criterion",
                se(Param::Criterion(j + 1)),
                want,
                1e-3,
            );
        }
        // Order (d′, k_1, …) in both.
        for (i, row) in case["cov_natural"].as_array().unwrap().iter().enumerate() {
            for (j, want) in numbers(row).into_iter().enumerate() {
                close(&name, "covariance", cov.entry(i, j).unwrap(), want, 1e-3);
            }
        }
    }
}

#[test]
fn unequal_variance_matches_scipy_maximisation() {
    for case in load("rating_unequal_variance.json") {
        let name = case["name"].as_str().unwrap_or("?").to_owned();
        let f = fit(&table(&case), &FitOptions::default()).expect("not degenerate");
        assert_eq!(f.status, FitStatus::Converged, "{name}");
        close(&name, "μ", f.mu(), number(&case, "mu"), 1e-4);
        close(&name, "σ", f.sigma(), number(&case, "sigma"), 1e-4);
        close(&name, "lnL", f.ln_likelihood, number(&case, "loglik"), 1e-4);
        for (j, want) in numbers(&case["criteria"]).into_iter().enumerate() {
            close(&name, "criterion", f.criteria()[j], want, 1e-4);
        }
        let cov = f.covariance().expect("positive-definite information");
        let se = |p| cov.get(p, p).expect("estimated").sqrt();
        close(&name, "SE μ", se(Param::Mu), number(&case, "se_mu"), 1e-3);
        close(
            &name,
            "SE σ",
            se(Param::Sigma),
            number(&case, "se_sigma"),
            1e-3,
        );
        for (j, want) in numbers(&case["se_criteria"]).into_iter().enumerate() {
            close(
                &name,
                "SE criterion",
                se(Param::Criterion(j + 1)),
                want,
                1e-3,
            );
        }
        // Order (μ, σ, k_1, …) in both.
        for (i, row) in case["cov_natural"].as_array().unwrap().iter().enumerate() {
            for (j, want) in numbers(row).into_iter().enumerate() {
                close(&name, "covariance", cov.entry(i, j).unwrap(), want, 1e-3);
            }
        }
        let m = measures(&f, 1).expect("measures of a converged fit");
        close(&name, "d_a", m.d_a.value, number(&case, "d_a"), 1e-4);
        close(&name, "A_z", m.a_z.value, number(&case, "A_z"), 1e-4);
        close(
            &name,
            "slope",
            m.slope.value,
            number(&case, "zroc_slope"),
            1e-4,
        );
    }
}
