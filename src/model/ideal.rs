//! The ideal observer (Green & Swets 1966, *Signal Detection Theory and Psychophysics*):
//! the criterion that maximises the expected payoff per trial, and what an observer
//! placed there (or part of the way there) would do.
//!
//! Layout: [`payoffs`] holds the four values and costs and their validation;
//! [`observer`] holds a validated (d′, presence rate, payoffs) triple with the optimal
//! β and c, partial adjustment and the outcome at any criterion; [`scan`] sweeps the
//! payoff ratio to show how the false-alarm-to-miss ratio of the optimum moves.
//!
//! Conventions (equal-variance model, σ = 1): absent evidence ~ N(0, 1), present
//! ~ N(d′, 1); the criterion c is measured from the midpoint of the two means, positive
//! c is conservative; H = Φ(d′/2 − c), F = Φ(−d′/2 − c), β = exp(c·d′).

pub mod observer;
pub mod payoffs;
pub mod scan;

pub use observer::{IdealObserver, PayoffOutcome};
pub use payoffs::Payoffs;
pub use scan::{ScanRow, log_spaced, scan_payoff_ratios};

use thiserror::Error;

/// Why an ideal-observer question has no answer. Each message names the value and
/// what is allowed, so a plan error can be shown to the user as it is.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum IdealError {
    /// A value or cost is negative or not a finite number.
    #[error(
        "payoff `{name}` is {value}; values and costs are amounts gained or lost, so each must be a finite number ≥ 0"
    )]
    Payoff { name: &'static str, value: f64 },
    /// V_H + C_M = 0: nothing rides on a present stimulus, so β_opt divides by zero.
    #[error(
        "value_hit + cost_miss is 0: nothing is gained or lost when the stimulus is present, so the optimal criterion is undefined; give value_hit or cost_miss an amount > 0"
    )]
    NothingAtStakeWhenPresent,
    /// V_CR + C_FA = 0: nothing rides on an absent stimulus, so β_opt = 0 and ln β_opt = −∞.
    #[error(
        "value_correct_rejection + cost_false_alarm is 0: nothing is gained or lost when the stimulus is absent, so the optimal criterion is undefined; give value_correct_rejection or cost_false_alarm an amount > 0"
    )]
    NothingAtStakeWhenAbsent,
    /// The presence rate must lie strictly between 0 and 1.
    #[error(
        "presence rate is {0}; it is the probability that the stimulus is present on a trial and must lie strictly between 0 and 1"
    )]
    PresenceRate(f64),
    /// d′ must be finite and > 0 (c_opt = ln β_opt / d′).
    #[error("d′ is {0}; the optimal criterion c = ln β / d′ needs a finite d′ > 0")]
    DPrime(f64),
    /// A partial-adjustment fraction outside [0, 1].
    #[error(
        "adjustment fraction is {0}; it says how far the criterion moves from c = 0 towards c_opt and must lie in [0, 1]"
    )]
    Fraction(f64),
    /// A criterion that is not a finite number.
    #[error("criterion c is {0}; it must be a finite number")]
    Criterion(f64),
    /// A payoff ratio (V_CR + C_FA)/(V_H + C_M) that is not finite and > 0.
    #[error("payoff ratio is {0}; (V_CR + C_FA)/(V_H + C_M) must be a finite number > 0")]
    PayoffRatio(f64),
    /// A log-spaced grid needs 0 < low ≤ high, both finite, and at least one point.
    #[error(
        "log-spaced grid from {low} to {high} with {count} points: need 0 < low ≤ high (finite) and count ≥ 1"
    )]
    Grid { low: f64, high: f64, count: usize },
}

/// Checks 0 < p < 1 for the presence rate.
pub(crate) fn check_presence_rate(p: f64) -> Result<f64, IdealError> {
    if p > 0.0 && p < 1.0 {
        Ok(p)
    } else {
        Err(IdealError::PresenceRate(p))
    }
}

/// Checks that d′ is finite and > 0.
pub(crate) fn check_d_prime(d: f64) -> Result<f64, IdealError> {
    if d.is_finite() && d > 0.0 {
        Ok(d)
    } else {
        Err(IdealError::DPrime(d))
    }
}

/// Natural log of the optimal likelihood-ratio criterion from the presence rate p and the
/// payoff ratio R: ln β_opt = ln[(1 − p)/p] + ln R (Green & Swets 1966). Summed as logs so
/// extreme ratios in a scan neither overflow nor underflow. Callers have validated both.
pub(crate) fn ln_beta_from_ratio(presence_rate: f64, ratio: f64) -> f64 {
    (1.0 - presence_rate).ln() - presence_rate.ln() + ratio.ln()
}
