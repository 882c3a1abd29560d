//! The standard normal distribution: Φ, φ and the quantile z = Φ⁻¹.
//!
//! Functions that never panic: a quantile of a probability outside (0, 1) is `None`, so
//! callers decide what a rate of 0 or 1 means instead of a worker thread dying.
//!
//! Φ uses `libm::erfc` (the musl port, accurate to about an ulp) rather than statrs 0.19's
//! erfc, whose truncated constants limit it to about 1e-10 relative error (fixed upstream
//! after 0.19.1): likelihood fits and finite-difference checks need better than that.
//! The quantile starts from statrs' `erfc_inv` and is polished by Newton steps on the
//! accurate Φ.

use libm::erfc;
use statrs::function::erf::erfc_inv;
use std::f64::consts::{FRAC_1_SQRT_2, SQRT_2};

/// 1/√(2π), the peak of the standard normal density.
const INV_SQRT_2PI: f64 = 0.398_942_280_401_432_7;

/// Standard normal CDF Φ(x) = ½·erfc(−x/√2); accurate in both tails.
#[inline]
pub fn cdf(x: f64) -> f64 {
    0.5 * erfc(-x * FRAC_1_SQRT_2)
}

/// Standard normal upper tail 1 − Φ(x) = ½·erfc(x/√2), without cancellation.
#[inline]
pub fn sf(x: f64) -> f64 {
    0.5 * erfc(x * FRAC_1_SQRT_2)
}

/// Standard normal density φ(x) = exp(−x²/2)/√(2π).
#[inline]
pub fn pdf(x: f64) -> f64 {
    INV_SQRT_2PI * (-0.5 * x * x).exp()
}

/// The z transform Φ⁻¹(p) = −√2·erfc⁻¹(2p); `None` unless 0 < p < 1.
#[inline]
pub fn z(p: f64) -> Option<f64> {
    if !(p > 0.0 && p < 1.0) {
        return None;
    }
    let mut x = -SQRT_2 * erfc_inv(2.0 * p);
    // Newton on the tail that keeps precision: Φ(x) − p below the median, p' − sf(x) above.
    for _ in 0..2 {
        let density = pdf(x);
        if !(density > 0.0 && x.is_finite()) {
            break;
        }
        let residual = if p < 0.5 {
            cdf(x) - p
        } else {
            (1.0 - p) - sf(x)
        };
        x -= residual / density;
    }
    Some(x)
}

#[cfg(test)]
mod tests {
    use super::*;

    // Check values: Φ⁻¹(0.975) = 1.959963984540054 and Φ(1) = 0.8413447460685429 are
    // standard table values (common practice; SciPy 1.17 `norm.ppf`/`norm.cdf` agree).
    #[test]
    fn table_values() {
        assert!((z(0.975).unwrap() - 1.959_963_984_540_054).abs() < 1e-12);
        assert!((cdf(1.0) - 0.841_344_746_068_542_9).abs() < 1e-14);
        assert!((sf(1.0) - (1.0 - 0.841_344_746_068_542_9)).abs() < 1e-14);
        assert!((pdf(0.0) - INV_SQRT_2PI).abs() < 1e-16);
    }

    #[test]
    fn quantile_rejects_edges() {
        assert!(z(0.0).is_none());
        assert!(z(1.0).is_none());
        assert!(z(f64::NAN).is_none());
    }

    #[test]
    fn quantile_inverts_cdf() {
        // Above the median p carries only absolute precision (1 − p loses digits), so the
        // upper tail is checked where 1 − p still has ~10 significant digits.
        for &x in &[-8.0, -6.0, -2.5, -0.3, 0.0, 0.7, 3.1, 4.0] {
            let tol = if x > 0.0 {
                1e-9 / sf(x).max(1e-3)
            } else {
                1e-12
            };
            assert!((z(cdf(x)).unwrap() - x).abs() < tol, "x = {x}");
        }
    }
}
