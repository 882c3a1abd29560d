//! Wald interval and Wald test from an estimate and its standard error (asymptotic
//! normality of maximum-likelihood estimates; common practice).

use crate::vocab::Sided;

use super::{
    InferError, Interval, Reference, TestOutcome, check_alpha, check_finite, check_standard_error,
    z_for_level,
};

/// Wald interval estimate ± z·SE with z = Φ⁻¹(1 − (1 − level)/2).
///
/// Errors: estimate not finite, SE not finite and > 0, level outside (0, 1).
pub fn wald_interval(
    estimate: f64,
    standard_error: f64,
    level: f64,
) -> Result<Interval, InferError> {
    let est = check_finite("estimate", estimate)?;
    let se = check_standard_error(standard_error)?;
    let half = z_for_level(level)? * se;
    Ok(Interval {
        lower: est - half,
        upper: est + half,
        level,
    })
}

/// Wald test of θ = θ₀: statistic z = (estimate − null)/SE, referred to N(0, 1);
/// p-value two-sided 2·(1 − Φ(|z|)), greater 1 − Φ(z), less Φ(z); reject if p ≤ α.
///
/// Errors: estimate or null not finite, SE not finite and > 0, α outside (0, 1), or a
/// statistic that overflows.
pub fn wald_test(
    estimate: f64,
    standard_error: f64,
    null: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    wald_test_referred(
        estimate,
        standard_error,
        null,
        Reference::Normal,
        sided,
        alpha,
    )
}

/// [`wald_test`] with the statistic referred to `reference` (Student's t for a
/// small-sample version); the same errors.
pub fn wald_test_referred(
    estimate: f64,
    standard_error: f64,
    null: f64,
    reference: Reference,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let est = check_finite("estimate", estimate)?;
    let null = check_finite("null value", null)?;
    let se = check_standard_error(standard_error)?;
    let alpha = check_alpha(alpha)?;
    let z = (est - null) / se;
    if !z.is_finite() {
        return Err(InferError::StatisticOverflow(z));
    }
    reference.outcome(z, sided, alpha)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn t_reference_matches_the_t_table() {
        // t₀.₉₇₅ on 19 df = 2.093024 (standard t tables, e.g. Abramowitz & Stegun 1964,
        // table 26.10; SciPy's t.ppf(0.975, 19) = 2.0930240544…, from memory): a statistic there has
        // two-sided p = 0.05 under t₁₉ but 0.036 under N(0, 1).
        let t = wald_test_referred(
            2.093_024_054_4,
            1.0,
            0.0,
            Reference::StudentsT(19.0),
            Sided::TwoSided,
            0.05,
        )
        .unwrap();
        assert!((t.p_value - 0.05).abs() < 1e-9, "{}", t.p_value);
        assert_eq!(t.df(), Some(19.0));
        let z = wald_test(2.093_024_054_4, 1.0, 0.0, Sided::TwoSided, 0.05).unwrap();
        assert!((z.p_value - 0.0363).abs() < 1e-3, "{}", z.p_value);
    }

    /// Φ⁻¹(0.975) = 1.959963984540054 (standard table value; common practice).
    const Z975: f64 = 1.959_963_984_540_054;

    /// Φ from statrs 0.19.1's erfc is good to about 1e-10 relative (its interval
    /// constants are truncated; statrs-dev/statrs PR #412 restores them), so values
    /// that pass through Φ are checked to 1e-9.
    const PHI_TOL: f64 = 1e-9;

    #[test]
    fn interval_is_estimate_plus_minus_z_se() {
        let ci = wald_interval(0.5, 0.1, 0.95).unwrap();
        assert!((ci.lower - (0.5 - Z975 * 0.1)).abs() < 1e-13);
        assert!((ci.upper - (0.5 + Z975 * 0.1)).abs() < 1e-13);
    }

    #[test]
    fn statistic_at_the_critical_value_has_p_alpha() {
        let se = 0.2;
        let est = 1.0 + Z975 * se;
        let two = wald_test(est, se, 1.0, Sided::TwoSided, 0.05).unwrap();
        assert!((two.statistic - Z975).abs() < 1e-12);
        assert!((two.p_value - 0.05).abs() < PHI_TOL);
        let up = wald_test(est, se, 1.0, Sided::Greater, 0.05).unwrap();
        assert!((up.p_value - 0.025).abs() < PHI_TOL);
        assert!(up.reject);
        let low = wald_test(est, se, 1.0, Sided::Less, 0.05).unwrap();
        assert!((low.p_value - 0.975).abs() < PHI_TOL);
        assert!(!low.reject);
    }

    #[test]
    fn invalid_inputs() {
        assert_eq!(
            wald_interval(0.0, 0.0, 0.95),
            Err(InferError::StandardError(0.0))
        );
        assert_eq!(wald_interval(0.0, 1.0, 0.0), Err(InferError::Level(0.0)));
        assert!(matches!(
            wald_test(f64::NAN, 1.0, 0.0, Sided::TwoSided, 0.05),
            Err(InferError::NonFinite {
                what: "estimate",
                ..
            })
        ));
        assert_eq!(
            wald_test(1.0, 1.0, 0.0, Sided::TwoSided, 1.5),
            Err(InferError::Alpha(1.5))
        );
        assert!(matches!(
            wald_test(f64::MAX, f64::MIN_POSITIVE, 0.0, Sided::TwoSided, 0.05),
            Err(InferError::StatisticOverflow(_))
        ));
    }
}
