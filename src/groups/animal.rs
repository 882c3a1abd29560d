//! What every per-animal path does: simulate one animal's counts from its own parameters,
//! fit them, and fit the counts of all animals summed (the pooled analysis).
//!
//! Three paths, chosen by `design::Route::of` as for a single subject of the design: the
//! closed-form yes/no fit ([`super::animal_yesno`]), the rating maximum-likelihood fit
//! ([`super::animal_rating`]), and the general fit over observed cells for designs with
//! several conditions or coarse records ([`super::animal_cells`]).
//!
//! Degenerate animals (the documented rule): the plan's rate correction is applied to each
//! animal's counts exactly as to a single-subject dataset. An animal whose counts still have
//! no fit (a rate of 0 or 1 under `rate_correction = "none"`, a degenerate rating table, a fit
//! that does not converge or does not identify its parameters) is left out of the group test
//! and counted; the pooled fit still uses its counts, since pooling sums counts, not fits.

use super::population::{Deviation, Population};
use super::random_effects::{Layout, YesNoRow};
use crate::simulate::ReplicateRng;

/// One animal's fitted values (standard errors are not needed by the two-stage tests).
#[derive(Debug, Clone, PartialEq)]
pub struct AnimalEstimate {
    /// d̂′ of each condition, in the design's order.
    pub d_prime: Vec<f64>,
    /// ĉ of each condition.
    pub criterion: Vec<f64>,
    /// ln σ̂ when the design estimates σ (first condition).
    pub ln_sigma: Option<f64>,
}

/// A fit with its covariance, for Wald tests on contrasts.
#[derive(Debug, Clone, PartialEq)]
pub struct PooledEstimate {
    /// (d̂′, ĉ) of each condition, flattened: [d′₀, c₀, d′₁, c₁, …].
    pub values: Vec<f64>,
    /// Covariance of `values`, row-major, 2J × 2J.
    pub covariance: Vec<f64>,
    /// (ln σ̂, SE) when the design estimates σ (first condition).
    pub ln_sigma: Option<(f64, f64)>,
}

/// Index of d′ of condition `j` in [`PooledEstimate::values`].
pub fn d_prime_index(j: usize) -> usize {
    2 * j
}

/// Index of c of condition `j` in [`PooledEstimate::values`].
pub fn criterion_index(j: usize) -> usize {
    2 * j + 1
}

impl PooledEstimate {
    /// A single-condition estimate from d̂′, ĉ, their SEs and their correlation.
    pub fn single(d_prime: (f64, f64), criterion: (f64, f64), corr: f64) -> Self {
        let cov = corr * d_prime.1 * criterion.1;
        Self {
            values: vec![d_prime.0, criterion.0],
            covariance: vec![d_prime.1 * d_prime.1, cov, cov, criterion.1 * criterion.1],
            ln_sigma: None,
        }
    }

    /// The contrast Σ wᵢ·valueᵢ and its SE √(wᵀΣw); `None` when the variance is not a
    /// finite positive number.
    pub fn contrast(&self, weights: &[(usize, f64)]) -> Option<(f64, f64)> {
        let dim = self.values.len();
        let mut est = 0.0;
        let mut var = 0.0;
        for &(i, wi) in weights {
            est += wi * *self.values.get(i)?;
            for &(k, wk) in weights {
                var += wi * wk * *self.covariance.get(i * dim + k)?;
            }
        }
        (est.is_finite() && var.is_finite() && var > 0.0).then(|| (est, var.sqrt()))
    }
}

/// A way of simulating and fitting one animal of a design.
pub trait AnimalPath: Sync {
    /// One animal's raw counts (before any correction); summing them pools animals.
    type Counts: Clone + Send;
    /// Counts of no trials, the start of a sum.
    fn empty(&self) -> Self::Counts;
    /// Simulates one animal whose parameters depart from the design's by `deviation`.
    fn simulate(&self, rng: &mut ReplicateRng, deviation: &Deviation) -> Self::Counts;
    /// Adds `other` into `into`.
    fn add(&self, into: &mut Self::Counts, other: &Self::Counts);
    /// Fits one animal; `None` when its counts have no fit (see the module's rule).
    fn fit_animal(&self, counts: &Self::Counts) -> Option<AnimalEstimate>;
    /// Fits summed counts, with the covariance of the estimates.
    fn fit_pooled(&self, counts: &Self::Counts) -> Option<PooledEstimate>;
    /// The random-effects model's structure for this design (`None`: the design's records
    /// are not yes/no counts, so the random-effects analysis does not apply).
    fn random_effects_layout(&self, _population: &Population) -> Option<Layout> {
        None
    }
    /// One animal's counts as yes/no rows, one per condition (raw, no correction: the
    /// random-effects likelihood needs none).
    fn yes_no_rows(&self, _counts: &Self::Counts) -> Option<Vec<YesNoRow>> {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn contrast_of_two_criteria() {
        // Var(c₀ − c₁) = v₀ + v₁ − 2·cov.
        let p = PooledEstimate {
            values: vec![1.0, 0.4, 1.2, 0.1],
            covariance: vec![
                0.04, 0.0, 0.0, 0.0, //
                0.0, 0.01, 0.0, 0.002, //
                0.0, 0.0, 0.04, 0.0, //
                0.0, 0.002, 0.0, 0.02,
            ],
            ln_sigma: None,
        };
        let (est, se) = p
            .contrast(&[(criterion_index(0), 1.0), (criterion_index(1), -1.0)])
            .unwrap();
        assert!((est - 0.3).abs() < 1e-15);
        assert!((se - (0.01f64 + 0.02 - 0.004).sqrt()).abs() < 1e-15);
        assert!(p.contrast(&[(9, 1.0)]).is_none());
    }

    #[test]
    fn single_condition_covariance() {
        let p = PooledEstimate::single((1.5, 0.2), (0.3, 0.1), -0.5);
        for (got, want) in p.covariance.iter().zip([0.04, -0.01, -0.01, 0.01]) {
            assert!((got - want).abs() < 1e-15);
        }
        let (c, se) = p.contrast(&[(criterion_index(0), 1.0)]).unwrap();
        assert!((c - 0.3).abs() < 1e-15 && (se - 0.1).abs() < 1e-15);
    }
}
