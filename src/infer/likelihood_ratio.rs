//! Likelihood-ratio tests from the maximised log-likelihoods of a full and a restricted
//! (null) model (Wilks 1938, *Ann. Math. Statist.* 9:60–62; cited from memory).
//!
//! The χ² version is non-directional. For one restricted parameter (df = 1) the signed
//! root r = sign(θ̂ − θ₀)·√(2Δℓ) is asymptotically N(0, 1) and gives one-sided tests
//! (common practice; e.g. Pawitan 2001, *In All Likelihood*, cited from memory).

use crate::vocab::Sided;

use super::{InferError, NullDistribution, Reference, TestOutcome, check_alpha, check_finite};
use statrs::distribution::{ChiSquared, ContinuousCDF};

/// How far the restricted log-likelihood may exceed the full one and still be read as
/// rounding from the optimiser (the deviance is then taken as 0). A larger excess means
/// a fit stopped short of its maximum and is reported as an error.
pub const LOG_LIKELIHOOD_TOLERANCE: f64 = 1e-6;

/// 2Δℓ = 2(ℓ_full − ℓ_restricted), with rounding-level negatives set to 0.
fn deviance(loglik_full: f64, loglik_restricted: f64) -> Result<f64, InferError> {
    let full = check_finite("full-model log-likelihood", loglik_full)?;
    let restricted = check_finite("restricted-model log-likelihood", loglik_restricted)?;
    let diff = full - restricted;
    if diff < -LOG_LIKELIHOOD_TOLERANCE {
        return Err(InferError::RestrictedFitsBetter { full, restricted });
    }
    let stat = 2.0 * diff.max(0.0);
    if stat.is_finite() {
        Ok(stat)
    } else {
        Err(InferError::StatisticOverflow(stat))
    }
}

/// Likelihood-ratio test: statistic G = 2(ℓ_full − ℓ_restricted), referred to χ²(df)
/// where df is the number of parameters the restriction fixes; p = P(χ²_df ≥ G);
/// reject if p ≤ α. Non-directional (`sided` is `TwoSided`).
///
/// Errors: a non-finite log-likelihood, df = 0, α outside (0, 1), or a restricted fit
/// better than the full one by more than [`LOG_LIKELIHOOD_TOLERANCE`].
pub fn likelihood_ratio_test(
    loglik_full: f64,
    loglik_restricted: f64,
    df: u32,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let alpha = check_alpha(alpha)?;
    if df == 0 {
        return Err(InferError::ZeroDegreesOfFreedom);
    }
    let g = deviance(loglik_full, loglik_restricted)?;
    let chi2 = ChiSquared::new(f64::from(df)).map_err(|_| InferError::ZeroDegreesOfFreedom)?;
    Ok(TestOutcome::new(
        g,
        NullDistribution::ChiSquared { df: f64::from(df) },
        Sided::TwoSided,
        chi2.sf(g),
        alpha,
    ))
}

/// Signed-root likelihood-ratio test of one parameter (df = 1):
/// r = sign(θ̂ − θ₀)·√(2(ℓ_full − ℓ_restricted)), referred to N(0, 1), with p-values as
/// for a Wald statistic (greater: 1 − Φ(r); less: Φ(r); two-sided: 2(1 − Φ(|r|)), which
/// equals the χ²(1) p-value). When θ̂ = θ₀ the sign is taken as +.
///
/// Errors: as [`likelihood_ratio_test`], plus a non-finite estimate or null value.
pub fn signed_root_test(
    loglik_full: f64,
    loglik_restricted: f64,
    estimate: f64,
    null: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let fits = (loglik_full, loglik_restricted);
    signed_root_test_referred(fits, estimate, null, Reference::Normal, sided, alpha)
}

/// [`signed_root_test`] with r referred to `reference` (Student's t for a small-sample
/// version), from the (full, restricted) log-likelihoods; the same errors.
pub fn signed_root_test_referred(
    (loglik_full, loglik_restricted): (f64, f64),
    estimate: f64,
    null: f64,
    reference: Reference,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let alpha = check_alpha(alpha)?;
    let est = check_finite("estimate", estimate)?;
    let null = check_finite("null value", null)?;
    let g = deviance(loglik_full, loglik_restricted)?;
    let r = if est >= null { g.sqrt() } else { -g.sqrt() };
    reference.outcome(r, sided, alpha)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn chi_square_two_df_is_exponential() {
        // χ²(2) survival is exp(−x/2) exactly (closed form; common practice).
        let t = likelihood_ratio_test(-100.0, -103.2, 2, 0.05).unwrap();
        assert!((t.statistic - 6.4).abs() < 1e-12);
        assert!((t.p_value - (-3.2f64).exp()).abs() < 1e-12);
        assert!(t.reject);
        assert_eq!(t.df(), Some(2.0));
    }

    #[test]
    fn chi_square_one_df_matches_normal_and_signed_root() {
        // χ²(1) at z² has survival 2(1 − Φ(z)); with z = Φ⁻¹(0.975) that is 0.05.
        let z: f64 = 1.959_963_984_540_054;
        let (full, restricted) = (-50.0, -50.0 - z * z / 2.0);
        let chi = likelihood_ratio_test(full, restricted, 1, 0.05).unwrap();
        assert!((chi.p_value - 0.05).abs() < 1e-9);
        let two = signed_root_test(full, restricted, 1.2, 1.0, Sided::TwoSided, 0.05).unwrap();
        assert!((two.p_value - chi.p_value).abs() < 1e-9);
        let up = signed_root_test(full, restricted, 1.2, 1.0, Sided::Greater, 0.05).unwrap();
        assert!((up.statistic - z).abs() < 1e-9);
        assert!((up.p_value - 0.025).abs() < 1e-9);
        let wrong_way = signed_root_test(full, restricted, 0.8, 1.0, Sided::Greater, 0.05).unwrap();
        assert!((wrong_way.statistic + z).abs() < 1e-9);
        assert!((wrong_way.p_value - 0.975).abs() < 1e-9);
        assert!(!wrong_way.reject);
    }

    #[test]
    fn rounding_level_excess_is_zero_deviance() {
        let t = likelihood_ratio_test(-10.0, -10.0 + 1e-9, 1, 0.05).unwrap();
        assert_eq!(t.statistic, 0.0);
        assert_eq!(t.p_value, 1.0);
    }

    #[test]
    fn invalid_inputs() {
        assert_eq!(
            likelihood_ratio_test(-10.0, -9.0, 1, 0.05),
            Err(InferError::RestrictedFitsBetter {
                full: -10.0,
                restricted: -9.0
            })
        );
        assert_eq!(
            likelihood_ratio_test(-10.0, -11.0, 0, 0.05),
            Err(InferError::ZeroDegreesOfFreedom)
        );
        assert!(matches!(
            likelihood_ratio_test(f64::NAN, -11.0, 1, 0.05),
            Err(InferError::NonFinite { .. })
        ));
        assert!(matches!(
            signed_root_test(-10.0, -11.0, f64::INFINITY, 0.0, Sided::Less, 0.05),
            Err(InferError::NonFinite {
                what: "estimate",
                ..
            })
        ));
        assert_eq!(
            signed_root_test(-10.0, -11.0, 1.0, 0.0, Sided::Less, 0.0),
            Err(InferError::Alpha(0.0))
        );
    }
}
