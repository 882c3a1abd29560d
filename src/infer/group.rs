//! Group-level t tests for two-stage inference: each animal's data are fitted first,
//! then its per-animal estimates (e.g. its criterion c) are tested across animals.
//! One-sample and paired tests (Student 1908, *Biometrika* 6:1–25) and Welch's
//! unequal-variance test (Welch 1947, *Biometrika* 34:28–35; Satterthwaite 1946,
//! *Biometrics Bull.* 2:110–114; citations from memory). p-values come from statrs'
//! Student t distribution.

use crate::vocab::Sided;

use super::{InferError, Moments, TestOutcome, check_alpha, check_finite, t_outcome};

/// Moments of a sample after checking every value is finite and there are ≥ 2 of them.
fn sample_moments(what: &'static str, values: &[f64]) -> Result<Moments, InferError> {
    if let Some((index, &value)) = values.iter().enumerate().find(|(_, v)| !v.is_finite()) {
        return Err(InferError::NonFiniteValue { what, index, value });
    }
    if values.len() < 2 {
        return Err(InferError::TooFewValues {
            what,
            needed: 2,
            got: values.len(),
        });
    }
    Ok(values.iter().copied().collect())
}

/// One-sample t test of mean = `null_mean`: t = (x̄ − μ₀)/(s/√n), df = n − 1.
///
/// Errors: fewer than 2 values, a non-finite value (its index is named), zero sample
/// variance, non-finite null, α outside (0, 1).
pub fn one_sample_t(
    values: &[f64],
    null_mean: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let alpha = check_alpha(alpha)?;
    let null = check_finite("null mean", null_mean)?;
    one_sample_on("values", values, null, sided, alpha)
}

fn one_sample_on(
    what: &'static str,
    values: &[f64],
    null: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let m = sample_moments(what, values)?;
    let (mean, se) = (m.mean(), m.mc_se(false));
    if !(mean.is_finite() && se.is_finite()) {
        return Err(InferError::TooFewValues {
            what,
            needed: 2,
            got: values.len(),
        });
    };
    if se <= 0.0 {
        return Err(InferError::ZeroVariance { what });
    }
    t_outcome((mean - null) / se, (m.count() - 1) as f64, sided, alpha)
}

/// Paired t test of mean(first − second) = `null_difference`: the one-sample test on
/// the differences dᵢ = firstᵢ − secondᵢ, df = n − 1. `Greater` means first > second.
///
/// Errors: samples of different lengths, plus those of [`one_sample_t`] for the
/// differences.
pub fn paired_t(
    first: &[f64],
    second: &[f64],
    null_difference: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let alpha = check_alpha(alpha)?;
    let null = check_finite("null difference", null_difference)?;
    if first.len() != second.len() {
        return Err(InferError::LengthMismatch {
            first: first.len(),
            second: second.len(),
        });
    }
    sample_moments("first", first)?;
    sample_moments("second", second)?;
    let diffs: Vec<f64> = first.iter().zip(second).map(|(a, b)| a - b).collect();
    one_sample_on("differences", &diffs, null, sided, alpha)
}

/// Welch's t test of mean(first) − mean(second) = `null_difference` for independent
/// groups with possibly unequal variances: with vᵢ = sᵢ²/nᵢ,
/// t = (x̄₁ − x̄₂ − Δ₀)/√(v₁ + v₂), df = (v₁ + v₂)² / (v₁²/(n₁ − 1) + v₂²/(n₂ − 1))
/// (Welch–Satterthwaite). `Greater` means first > second.
///
/// Errors: either group with fewer than 2 values or a non-finite value, both groups
/// with zero variance, non-finite null, α outside (0, 1).
pub fn welch_t(
    first: &[f64],
    second: &[f64],
    null_difference: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    let alpha = check_alpha(alpha)?;
    let null = check_finite("null difference", null_difference)?;
    let a = sample_moments("first", first)?;
    let b = sample_moments("second", second)?;
    let part = |m: &Moments| -> Option<(f64, f64, f64)> {
        // (mean, v = s²/n, n − 1)
        Some((
            m.mean(),
            m.variance(false) / m.count() as f64,
            (m.count() - 1) as f64,
        ))
    };
    let (Some((mean_a, va, dfa)), Some((mean_b, vb, dfb))) = (part(&a), part(&b)) else {
        return Err(InferError::TooFewValues {
            what: "first or second",
            needed: 2,
            got: first.len().min(second.len()),
        });
    };
    let v = va + vb;
    if v <= 0.0 {
        return Err(InferError::ZeroVariance {
            what: "first and second",
        });
    }
    let df = v * v / (va * va / dfa + vb * vb / dfb);
    if !(df.is_finite() && df > 0.0) {
        return Err(InferError::NonFinite {
            what: "Welch–Satterthwaite degrees of freedom",
            value: df,
        });
    }
    t_outcome((mean_a - mean_b - null) / v.sqrt(), df, sided, alpha)
}

#[cfg(test)]
mod tests;
