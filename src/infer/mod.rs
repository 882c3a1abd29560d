//! Intervals, tests and power for fitted estimates, group-level tests for two-stage
//! inference, and streaming accumulators for Monte Carlo summaries.
//!
//! Every function validates its inputs and returns [`InferError`] instead of panicking
//! or handing back NaN, so a bad replicate can be counted as a failure by the engine.
//! Files: [`wilson`] (interval for a proportion), [`wald`] (interval and test from an
//! estimate and its SE), [`likelihood_ratio`] (χ² and signed-root tests), [`power`]
//! (normal-approximation power of a Wald test), [`group`] (t tests on per-animal
//! values), [`moments`] (weighted, mergeable streaming statistics).

pub mod error;
pub mod group;
pub mod likelihood_ratio;
pub mod moments;
pub mod power;
pub mod wald;
pub mod wilson;

pub use error::InferError;
pub use group::{one_sample_t, paired_t, welch_t};
pub use likelihood_ratio::{likelihood_ratio_test, signed_root_test, signed_root_test_referred};
pub use moments::{CoMoments, FourthMoments, Moments};
pub use power::wald_power;
pub use wald::{wald_interval, wald_test, wald_test_referred};
pub use wilson::wilson_interval;

use crate::model::normal;
use serde::Serialize;

use crate::vocab::Sided;

impl Sided {
    /// p-value from the lower-tail P(T ≤ t) and upper-tail P(T ≥ t) probabilities of a
    /// statistic whose null distribution is symmetric about 0: two-sided
    /// p = 2·min(lower, upper) (capped at 1), greater p = upper, less p = lower.
    pub(crate) fn p_value(self, lower: f64, upper: f64) -> f64 {
        match self {
            Sided::TwoSided => (2.0 * lower.min(upper)).min(1.0),
            Sided::Greater => upper,
            Sided::Less => lower,
        }
    }

    /// p-value of a standard-normal statistic z.
    pub(crate) fn normal_p_value(self, z: f64) -> f64 {
        self.p_value(normal::cdf(z), normal::sf(z))
    }
}

/// A confidence interval [lower, upper] at a confidence level (e.g. 0.95).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Interval {
    pub lower: f64,
    pub upper: f64,
    pub level: f64,
}

/// The distribution a test statistic follows under the null hypothesis.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub enum NullDistribution {
    StandardNormal,
    StudentsT { df: f64 },
    ChiSquared { df: f64 },
}

/// The result of a hypothesis test. `reject` is `p_value ≤ alpha`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TestOutcome {
    pub statistic: f64,
    pub null_distribution: NullDistribution,
    pub sided: Sided,
    pub p_value: f64,
    pub alpha: f64,
    pub reject: bool,
}

impl TestOutcome {
    pub(crate) fn new(
        statistic: f64,
        null_distribution: NullDistribution,
        sided: Sided,
        p_value: f64,
        alpha: f64,
    ) -> Self {
        Self {
            statistic,
            null_distribution,
            sided,
            p_value,
            alpha,
            reject: p_value <= alpha,
        }
    }

    /// Degrees of freedom of a t or χ² reference distribution; `None` for the normal.
    pub fn df(&self) -> Option<f64> {
        match self.null_distribution {
            NullDistribution::StandardNormal => None,
            NullDistribution::StudentsT { df } | NullDistribution::ChiSquared { df } => Some(df),
        }
    }
}

/// The distribution a z-like statistic is referred to: N(0, 1), or Student's t with the
/// given degrees of freedom (a small-sample reference for a Wald or signed-root statistic).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Reference {
    Normal,
    StudentsT(f64),
}

impl Reference {
    /// The outcome of `statistic` under this reference.
    pub(crate) fn outcome(
        self,
        statistic: f64,
        sided: Sided,
        alpha: f64,
    ) -> Result<TestOutcome, InferError> {
        match self {
            Reference::Normal => Ok(TestOutcome::new(
                statistic,
                NullDistribution::StandardNormal,
                sided,
                sided.normal_p_value(statistic),
                alpha,
            )),
            Reference::StudentsT(df) => t_outcome(statistic, df, sided, alpha),
        }
    }
}

/// Refers a statistic to Student's t with `df` degrees of freedom (df > 0 and finite).
pub(crate) fn t_outcome(
    t: f64,
    df: f64,
    sided: Sided,
    alpha: f64,
) -> Result<TestOutcome, InferError> {
    use statrs::distribution::{ContinuousCDF, StudentsT};
    if !t.is_finite() {
        return Err(InferError::StatisticOverflow(t));
    }
    let dist = StudentsT::new(0.0, 1.0, df).map_err(|_| InferError::NonFinite {
        what: "degrees of freedom",
        value: df,
    })?;
    let p = sided.p_value(dist.cdf(t), dist.sf(t));
    Ok(TestOutcome::new(
        t,
        NullDistribution::StudentsT { df },
        sided,
        p,
        alpha,
    ))
}

/// Checks a significance level 0 < α < 1.
pub(crate) fn check_alpha(alpha: f64) -> Result<f64, InferError> {
    if alpha > 0.0 && alpha < 1.0 {
        Ok(alpha)
    } else {
        Err(InferError::Alpha(alpha))
    }
}

/// Checks that a named input is a finite number.
pub(crate) fn check_finite(what: &'static str, value: f64) -> Result<f64, InferError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(InferError::NonFinite { what, value })
    }
}

/// Checks that a standard error is finite and > 0.
pub(crate) fn check_standard_error(se: f64) -> Result<f64, InferError> {
    if se.is_finite() && se > 0.0 {
        Ok(se)
    } else {
        Err(InferError::StandardError(se))
    }
}

/// Two-sided critical value z = Φ⁻¹(1 − (1 − level)/2) for a confidence level in (0, 1).
pub(crate) fn z_for_level(level: f64) -> Result<f64, InferError> {
    if !(level > 0.0 && level < 1.0) {
        return Err(InferError::Level(level));
    }
    normal::z(1.0 - 0.5 * (1.0 - level)).ok_or(InferError::Level(level))
}

/// Critical value of a two-sided Wald interval at `level`, z_{1−(1−level)/2}; NaN for a
/// level outside (0, 1) (plans validate the level, so NaN never reaches a report).
pub fn z_critical(level: f64) -> f64 {
    z_for_level(level).unwrap_or(f64::NAN)
}

/// One-sided critical value z = Φ⁻¹(1 − α) for 0 < α < 1.
pub(crate) fn z_upper(alpha: f64) -> Result<f64, InferError> {
    normal::z(1.0 - check_alpha(alpha)?).ok_or(InferError::Alpha(alpha))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn critical_values() {
        // Φ⁻¹(0.975) = 1.959963984540054, Φ⁻¹(0.95) = 1.6448536269514722: standard
        // table values (common practice; the same constant is checked in normal.rs).
        assert!((z_for_level(0.95).unwrap() - 1.959_963_984_540_054).abs() < 1e-12);
        assert!((z_upper(0.05).unwrap() - 1.644_853_626_951_472_2).abs() < 1e-12);
        for bad in [0.0, 1.0, -0.5, f64::NAN] {
            assert!(matches!(z_for_level(bad), Err(InferError::Level(_))));
            assert!(matches!(z_upper(bad), Err(InferError::Alpha(_))));
        }
    }

    #[test]
    fn sided_p_values_split_the_tails() {
        let z = 1.3;
        let two = Sided::TwoSided.normal_p_value(z);
        let up = Sided::Greater.normal_p_value(z);
        let low = Sided::Less.normal_p_value(z);
        assert!((two - 2.0 * up).abs() < 1e-15);
        assert!((up + low - 1.0).abs() < 1e-15);
        assert_eq!(Sided::TwoSided.normal_p_value(0.0), 1.0);
    }

    #[test]
    fn outcome_reports_df_and_decision() {
        let t = TestOutcome::new(
            2.0,
            NullDistribution::StudentsT { df: 7.0 },
            Sided::TwoSided,
            0.04,
            0.05,
        );
        assert!(t.reject);
        assert_eq!(t.df(), Some(7.0));
        let z = TestOutcome::new(
            1.0,
            NullDistribution::StandardNormal,
            Sided::Less,
            0.3,
            0.05,
        );
        assert!(!z.reject);
        assert_eq!(z.df(), None);
    }
}
