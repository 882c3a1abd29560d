//! Distributions of an uncertain hypothesised value: a point, a normal, a truncated normal,
//! or the sampling distribution of a pilot estimate. Validated once at construction.

use crate::pilot::population::MeanEstimate;
use rand::Rng;
use rand_distr::{Distribution, StandardNormal};

/// A distribution of one uncertain value.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Prior {
    mean: f64,
    sd: f64,
    low: f64,
    high: f64,
}

/// Why a prior was refused.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum PriorError {
    #[error("the mean {0} is not a finite number")]
    Mean(f64),
    #[error("the SD {0} is not a finite number ≥ 0")]
    Sd(f64),
    #[error("the range {low} … {high} is empty or does not hold the mean")]
    Range { low: f64, high: f64 },
}

/// Most rejection attempts for one truncated draw before falling back to the nearest bound
/// (reached only when the range holds a tiny share of the normal; see [`Prior::draw`]).
const MAX_TRIES: usize = 10_000;

impl Prior {
    /// The value known exactly: every draw is `value`, so assurance equals the point power.
    pub fn point(value: f64) -> Result<Self, PriorError> {
        Self::truncated_normal(value, 0.0, f64::NEG_INFINITY, f64::INFINITY)
    }

    /// N(mean, sd²).
    pub fn normal(mean: f64, sd: f64) -> Result<Self, PriorError> {
        Self::truncated_normal(mean, sd, f64::NEG_INFINITY, f64::INFINITY)
    }

    /// N(mean, sd²) restricted to [low, high] (for instance an SD or d′ that cannot be
    /// negative); the range must hold the mean.
    pub fn truncated_normal(mean: f64, sd: f64, low: f64, high: f64) -> Result<Self, PriorError> {
        if !mean.is_finite() {
            return Err(PriorError::Mean(mean));
        }
        if !(sd.is_finite() && sd >= 0.0) {
            return Err(PriorError::Sd(sd));
        }
        if low.is_nan() || high.is_nan() || !(low <= mean && mean <= high) {
            return Err(PriorError::Range { low, high });
        }
        Ok(Self {
            mean,
            sd,
            low,
            high,
        })
    }

    /// The sampling distribution of a pilot's population mean: N(estimate, SE²).
    pub fn from_pilot_mean(estimate: &MeanEstimate) -> Result<Self, PriorError> {
        Self::normal(estimate.value, estimate.se)
    }

    /// The value at which the point power is computed (the mean).
    pub fn centre(&self) -> f64 {
        self.mean
    }

    /// One value. A truncated normal is drawn by rejection; after [`MAX_TRIES`] rejections
    /// the nearest bound is returned (a range so far in the tail is a user's mistake the
    /// validator should catch, not a reason to loop forever).
    pub fn draw<R: Rng + ?Sized>(&self, rng: &mut R) -> f64 {
        if self.sd == 0.0 {
            return self.mean;
        }
        let mut x = self.mean;
        for _ in 0..MAX_TRIES {
            let z: f64 = StandardNormal.sample(rng);
            x = self.mean + self.sd * z;
            if self.low <= x && x <= self.high {
                return x;
            }
        }
        x.clamp(self.low, self.high)
    }
}
