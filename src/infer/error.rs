//! Why an interval, test or power calculation has no answer. Messages name the value
//! and what is allowed, so the engine can log them or count them as failed datasets.

use thiserror::Error;

/// Errors of the `infer` module. None of its functions panics or returns NaN silently.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum InferError {
    /// A confidence level outside (0, 1).
    #[error("confidence level is {0}; it must lie strictly between 0 and 1 (e.g. 0.95)")]
    Level(f64),
    /// A significance level α outside (0, 1).
    #[error("significance level α is {0}; it must lie strictly between 0 and 1 (e.g. 0.05)")]
    Alpha(f64),
    /// A standard error that is not finite and > 0.
    #[error("standard error is {0}; it must be a finite number > 0")]
    StandardError(f64),
    /// A named input that is NaN or infinite.
    #[error("{what} is {value}; it must be a finite number")]
    NonFinite { what: &'static str, value: f64 },
    /// A value in a sample that is NaN or infinite.
    #[error("{what}[{index}] is {value}; every value must be a finite number")]
    NonFiniteValue {
        what: &'static str,
        index: usize,
        value: f64,
    },
    /// A proportion with no trials.
    #[error("a proportion needs at least one trial; got 0")]
    NoTrials,
    /// More successes than trials.
    #[error("{successes} successes out of {trials} trials; successes cannot exceed trials")]
    SuccessesExceedTrials { successes: u64, trials: u64 },
    /// Degrees of freedom of 0 for a χ² test.
    #[error("degrees of freedom is 0; a likelihood-ratio test needs df ≥ 1")]
    ZeroDegreesOfFreedom,
    /// The restricted model fits better than the full one by more than rounding allows,
    /// so one of the two fits did not reach its maximum.
    #[error(
        "restricted log-likelihood {restricted} exceeds the full one {full} by more than the tolerance; one of the fits did not converge to its maximum"
    )]
    RestrictedFitsBetter { full: f64, restricted: f64 },
    /// Too few values for a variance.
    #[error("{what} has {got} value(s); at least {needed} are needed for a variance")]
    TooFewValues {
        what: &'static str,
        needed: usize,
        got: usize,
    },
    /// All values equal, so the standard error is 0 and the t statistic undefined.
    #[error("{what} has zero variance; the t statistic is undefined")]
    ZeroVariance { what: &'static str },
    /// Paired samples of different lengths.
    #[error("paired samples have {first} and {second} values; they must have the same length")]
    LengthMismatch { first: usize, second: usize },
    /// A statistic that overflowed to a non-finite value.
    #[error("the test statistic is {0}; inputs too large to form a finite statistic")]
    StatisticOverflow(f64),
}
