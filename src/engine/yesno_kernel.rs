//! The yes/no closed-form route: d′ = z(H) − z(F), c = −[z(H) + z(F)]/2 from z tables that a
//! scenario fixes once, so fitting one dataset is two table lookups.
//!
//! The counts come from the scenario's [`super::sampler::TableSampler`], like every route's.

use super::tally::{DatasetOutcome, EstimateTally, QuantityTally};
use crate::fit::{YesNoFit, ZTable};
use crate::vocab::{Quantity, RateCorrection};

/// Precomputed fitting tables for one yes/no scenario.
#[derive(Debug, Clone)]
pub struct YesNoEstimator {
    pub z_hits: ZTable,
    pub z_false_alarms: ZTable,
    truth: [f64; 2],
    z_crit: f64,
}

impl YesNoEstimator {
    /// Tables for `n_present`/`n_absent` trials; `truth` is (d′, c) of the observer;
    /// `z_crit` sets the Wald interval of every fit.
    pub fn new(
        truth: [f64; 2],
        n_present: u32,
        n_absent: u32,
        correction: RateCorrection,
        z_crit: f64,
    ) -> Self {
        Self {
            z_hits: ZTable::new(n_present, correction),
            z_false_alarms: ZTable::new(n_absent, correction),
            truth,
            z_crit,
        }
    }

    /// An empty tally of d′ and c.
    pub fn tally(&self) -> EstimateTally {
        EstimateTally::new(vec![
            QuantityTally::new(Quantity::DPrime, self.truth[0], self.z_crit),
            QuantityTally::new(Quantity::Criterion, self.truth[1], self.z_crit),
        ])
    }

    /// Whether the dataset (h hits, f false alarms) has a rate of 0 or 1.
    #[inline]
    pub fn extreme(&self, h: u32, f: u32) -> bool {
        self.z_hits.is_extreme(h) || self.z_false_alarms.is_extreme(f)
    }

    /// (d̂′, SE) and (ĉ, SE) of the dataset, or `None` when the rule leaves it unfitted.
    #[inline]
    pub fn fit(&self, h: u32, f: u32) -> Option<[(f64, f64); 2]> {
        let fit = YesNoFit::from_entries(self.z_hits.get(h)?, self.z_false_alarms.get(f)?);
        Some([
            (fit.measures.d_prime, fit.se_d_prime),
            (fit.measures.criterion, fit.se_criterion),
        ])
    }

    /// (d′, c) of the observer, and the critical value of the Wald interval.
    pub fn truth(&self) -> ([f64; 2], f64) {
        (self.truth, self.z_crit)
    }

    /// Records the dataset (h hits, f false alarms) with weight `w`.
    #[inline]
    pub fn record(&self, h: u32, f: u32, w: f64, tally: &mut EstimateTally) {
        let extreme = self.extreme(h, f);
        match self.fit(h, f) {
            Some(values) => tally.push_fit(&values, extreme, w),
            None => tally.push_unfitted(DatasetOutcome::Degenerate, extreme, w),
        }
    }
}
