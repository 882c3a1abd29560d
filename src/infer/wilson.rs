//! Wilson score interval for a binomial proportion (Wilson 1927, *JASA* 22:209–212).
//!
//! Used for every Monte Carlo proportion vigil reports (power, coverage, failure
//! rates): unlike the Wald interval it stays inside [0, 1] and keeps near-nominal
//! coverage when the proportion is 0 or 1.

use super::{InferError, Interval, z_for_level};

/// Wilson score interval for `successes` out of `trials` at a confidence `level`:
/// with p̂ = x/n and z = Φ⁻¹(1 − (1 − level)/2),
/// centre = (p̂ + z²/2n)/(1 + z²/n), half-width = z/(1 + z²/n)·√(p̂(1 − p̂)/n + z²/4n²).
/// The bounds are clamped to [0, 1], and are exactly 0 for x = 0 and 1 for x = n.
///
/// Errors: no trials, successes > trials, level outside (0, 1).
pub fn wilson_interval(successes: u64, trials: u64, level: f64) -> Result<Interval, InferError> {
    if trials == 0 {
        return Err(InferError::NoTrials);
    }
    if successes > trials {
        return Err(InferError::SuccessesExceedTrials { successes, trials });
    }
    let z = z_for_level(level)?;
    let n = trials as f64;
    let p = successes as f64 / n;
    let z2n = z * z / n;
    let centre = (p + 0.5 * z2n) / (1.0 + z2n);
    let half = z / (1.0 + z2n) * (p * (1.0 - p) / n + 0.25 * z2n / n).sqrt();
    // At x = 0 (x = n) the lower (upper) bound is 0 (1) in exact arithmetic; set it so
    // rounding cannot leave a tiny negative number or a gap below 1.
    let lower = if successes == 0 {
        0.0
    } else {
        (centre - half).max(0.0)
    };
    let upper = if successes == trials {
        1.0
    } else {
        (centre + half).min(1.0)
    };
    Ok(Interval {
        lower,
        upper,
        level,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// 95% intervals: formula Wilson (1927, JASA 22:209–212); values
    /// computed with statsmodels 0.15 `proportion_confint(method="wilson")` and SciPy 1.17
    /// `binomtest(...).proportion_ci("wilson")`, printed to 6 decimals.
    #[test]
    fn matches_reference_values() {
        let cases = [
            (80, 100, 0.711171, 0.866633),
            (412, 500, 0.788186, 0.854874),
            (0, 50, 0.0, 0.071348),
            (950, 1000, 0.934686, 0.961870),
        ];
        for (x, n, lo, hi) in cases {
            let ci = wilson_interval(x, n, 0.95).unwrap();
            assert!((ci.lower - lo).abs() < 6e-7, "{x}/{n} lower {}", ci.lower);
            assert!((ci.upper - hi).abs() < 6e-7, "{x}/{n} upper {}", ci.upper);
            assert_eq!(ci.level, 0.95);
        }
    }

    #[test]
    fn all_successes_reaches_one_and_is_mirror_of_none() {
        let none = wilson_interval(0, 50, 0.9).unwrap();
        let all = wilson_interval(50, 50, 0.9).unwrap();
        assert_eq!(all.upper, 1.0);
        assert!((all.lower - (1.0 - none.upper)).abs() < 1e-15);
    }

    #[test]
    fn wider_at_higher_level() {
        let a = wilson_interval(30, 60, 0.9).unwrap();
        let b = wilson_interval(30, 60, 0.99).unwrap();
        assert!(b.lower < a.lower && b.upper > a.upper);
    }

    #[test]
    fn invalid_inputs() {
        assert_eq!(wilson_interval(0, 0, 0.95), Err(InferError::NoTrials));
        assert_eq!(
            wilson_interval(5, 4, 0.95),
            Err(InferError::SuccessesExceedTrials {
                successes: 5,
                trials: 4
            })
        );
        assert_eq!(wilson_interval(1, 4, 1.0), Err(InferError::Level(1.0)));
    }
}
