//! Normal-approximation power of a Wald test (common practice for maximum-likelihood
//! estimates: under the alternative, z = (θ̂ − θ₀)/SE ≈ N(δ/SE, 1) with δ = θ − θ₀).

use crate::vocab::Sided;

use super::{InferError, check_alpha, check_finite, check_standard_error, z_upper};
use crate::model::normal;

/// Power of a Wald test at level α for a true effect δ = θ − θ₀ whose estimate has
/// asymptotic standard error `standard_error` (for the planned sample size):
/// two-sided Φ(δ/SE − z_{1−α/2}) + Φ(−δ/SE − z_{1−α/2});
/// greater Φ(δ/SE − z_{1−α}); less Φ(−δ/SE − z_{1−α}).
/// With δ = 0 the power equals α.
///
/// Errors: effect not finite, SE not finite and > 0, α outside (0, 1).
pub fn wald_power(
    effect: f64,
    standard_error: f64,
    alpha: f64,
    sided: Sided,
) -> Result<f64, InferError> {
    let delta = check_finite("effect", effect)?;
    let se = check_standard_error(standard_error)?;
    let alpha = check_alpha(alpha)?;
    let shift = delta / se;
    if !shift.is_finite() {
        // An effect infinitely many SEs away is detected with certainty (or never, for a
        // one-sided test pointing the other way).
        return Ok(match sided {
            Sided::TwoSided => 1.0,
            Sided::Greater if shift > 0.0 => 1.0,
            Sided::Less if shift < 0.0 => 1.0,
            Sided::Greater | Sided::Less => 0.0,
        });
    }
    Ok(match sided {
        Sided::TwoSided => {
            let z = z_upper(0.5 * alpha)?;
            normal::cdf(shift - z) + normal::cdf(-shift - z)
        }
        Sided::Greater => normal::cdf(shift - z_upper(alpha)?),
        Sided::Less => normal::cdf(-shift - z_upper(alpha)?),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Φ from statrs 0.19.1's erfc is good to about 1e-10 relative (statrs-dev/statrs
    /// PR #412 restores full precision), so identities through Φ and Φ⁻¹ are checked to
    /// 1e-9.
    const PHI_TOL: f64 = 1e-9;

    /// P(reject) computed directly: the N(μ, 1) probability of the rejection region,
    /// by composite Simpson integration of the density (independent of the formula).
    fn direct_power(mu: f64, alpha: f64, sided: Sided) -> f64 {
        let z2 = normal::z(1.0 - alpha / 2.0).unwrap();
        let z1 = normal::z(1.0 - alpha).unwrap();
        let density = |x: f64| normal::pdf(x - mu);
        let integrate = |a: f64, b: f64| {
            let n = 20_000;
            let h = (b - a) / n as f64;
            let mut s = density(a) + density(b);
            for i in 1..n {
                let w = if i % 2 == 1 { 4.0 } else { 2.0 };
                s += w * density(a + h * i as f64);
            }
            s * h / 3.0
        };
        let (far_lo, far_hi) = (mu.min(0.0) - 40.0, mu.max(0.0) + 40.0);
        match sided {
            Sided::TwoSided => integrate(far_lo, -z2) + integrate(z2, far_hi),
            Sided::Greater => integrate(z1, far_hi),
            Sided::Less => integrate(far_lo, -z1),
        }
    }

    #[test]
    fn matches_direct_integration() {
        for &(delta, se) in &[(0.0, 1.0), (0.3, 0.2), (-0.5, 0.25), (1.0, 0.3), (0.1, 0.5)] {
            for sided in [Sided::TwoSided, Sided::Greater, Sided::Less] {
                for alpha in [0.01, 0.05, 0.2] {
                    let p = wald_power(delta, se, alpha, sided).unwrap();
                    let d = direct_power(delta / se, alpha, sided);
                    assert!(
                        (p - d).abs() < 1e-9,
                        "δ {delta} se {se} {sided:?} α {alpha}"
                    );
                }
            }
        }
    }

    #[test]
    fn zero_effect_gives_alpha() {
        for sided in [Sided::TwoSided, Sided::Greater, Sided::Less] {
            assert!((wald_power(0.0, 0.4, 0.05, sided).unwrap() - 0.05).abs() < PHI_TOL);
        }
    }

    #[test]
    fn eighty_percent_rule_of_thumb() {
        // δ/SE = z_{0.975} + z_{0.80} = 1.959964 + 0.841621 gives 80% power for a
        // two-sided 5% test, plus a negligible wrong-tail term (common practice).
        let shift = normal::z(0.975).unwrap() + normal::z(0.8).unwrap();
        let p = wald_power(shift, 1.0, 0.05, Sided::TwoSided).unwrap();
        assert!((p - 0.8 - normal::cdf(-shift - normal::z(0.975).unwrap())).abs() < PHI_TOL);
        assert!((p - 0.8).abs() < 1e-5);
    }

    #[test]
    fn invalid_inputs_and_extremes() {
        assert_eq!(
            wald_power(1.0, -1.0, 0.05, Sided::TwoSided),
            Err(InferError::StandardError(-1.0))
        );
        assert_eq!(
            wald_power(1.0, 1.0, 1.0, Sided::Greater),
            Err(InferError::Alpha(1.0))
        );
        assert!(wald_power(f64::NAN, 1.0, 0.05, Sided::Less).is_err());
        assert_eq!(
            wald_power(f64::MAX, f64::MIN_POSITIVE, 0.05, Sided::Less).unwrap(),
            0.0
        );
        assert_eq!(
            wald_power(f64::MAX, f64::MIN_POSITIVE, 0.05, Sided::TwoSided).unwrap(),
            1.0
        );
    }
}
