//! Wilson score interval for a proportion (Wilson 1927).

use crate::model::normal;

/// Wilson interval for `x` successes in `n` trials at confidence `level`:
/// centre (p̂ + z²/2n)/(1 + z²/n), half-width z/(1 + z²/n)·√(p̂(1−p̂)/n + z²/4n²).
pub fn wilson_interval(x: f64, n: f64, level: f64) -> (f64, f64) {
    let z = normal::z(1.0 - (1.0 - level) / 2.0).unwrap_or(f64::NAN);
    let p = x / n;
    let z2n = z * z / n;
    let centre = (p + z2n / 2.0) / (1.0 + z2n);
    let half = z / (1.0 + z2n) * (p * (1.0 - p) / n + z2n / (4.0 * n)).sqrt();
    ((centre - half).max(0.0), (centre + half).min(1.0))
}

#[cfg(test)]
mod tests {
    use super::*;

    // references.md: statsmodels proportion_confint(method="wilson") values.
    #[test]
    fn reference_values() {
        let cases = [
            (80.0, 100.0, 0.711171, 0.866633),
            (412.0, 500.0, 0.788186, 0.854874),
            (0.0, 50.0, 0.0, 0.071348),
            (950.0, 1000.0, 0.934686, 0.961870),
        ];
        for (x, n, lo, hi) in cases {
            let (l, h) = wilson_interval(x, n, 0.95);
            assert!((l - lo).abs() < 1e-6 && (h - hi).abs() < 1e-6, "{x}/{n}");
        }
    }
}
