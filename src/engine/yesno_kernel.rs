//! Yes/no scenarios: everything a scenario fixes is computed once, each replicate is two
//! alias-table draws and two z-table lookups.

use super::parallel::Kernel;
use super::tally::{EstimateTally, Outcome, QuantityTally};
use crate::fit::{YesNoFit, ZTable};
use crate::model::Observer;
use crate::simulate::{BinomialTable, ReplicateRng};
use crate::vocab::Quantity;
use crate::vocab::RateCorrection;

/// Precomputed sampling and fitting tables for one yes/no scenario.
#[derive(Debug, Clone)]
pub struct YesNoKernel {
    pub hits: BinomialTable,
    pub false_alarms: BinomialTable,
    pub z_hits: ZTable,
    pub z_false_alarms: ZTable,
    truth: [f64; 2],
    z_crit: f64,
}

impl YesNoKernel {
    /// Tables for `n_present`/`n_absent` trials of `observer`; `z_crit` sets the Wald
    /// interval of every fit.
    pub fn new(
        observer: &Observer,
        n_present: u32,
        n_absent: u32,
        correction: RateCorrection,
        z_crit: f64,
    ) -> Self {
        let rates = observer.rates();
        Self {
            hits: BinomialTable::new(n_present, rates.hit),
            false_alarms: BinomialTable::new(n_absent, rates.false_alarm),
            z_hits: ZTable::new(n_present, correction),
            z_false_alarms: ZTable::new(n_absent, correction),
            truth: [observer.d_prime, observer.criterion],
            z_crit,
        }
    }

    /// Records the dataset (h, f) with weight `w`.
    #[inline]
    pub fn record(&self, h: u32, f: u32, w: f64, tally: &mut EstimateTally) {
        let extreme = self.z_hits.is_extreme(h) || self.z_false_alarms.is_extreme(f);
        match (self.z_hits.get(h), self.z_false_alarms.get(f)) {
            (Some(zh), Some(zf)) => {
                let fit = YesNoFit::from_entries(zh, zf);
                let values = [
                    (fit.measures.d_prime, fit.se_d_prime),
                    (fit.measures.criterion, fit.se_criterion),
                ];
                tally.push_fit(&values, extreme, w);
            }
            _ => tally.push_unfitted(Outcome::Degenerate, extreme, w),
        }
    }
}

impl Kernel for YesNoKernel {
    type Tally = EstimateTally;

    fn tally(&self) -> EstimateTally {
        EstimateTally::new(vec![
            QuantityTally::new(Quantity::DPrime, self.truth[0], self.z_crit),
            QuantityTally::new(Quantity::Criterion, self.truth[1], self.z_crit),
        ])
    }

    #[inline]
    fn replicate(&self, rng: &mut ReplicateRng, tally: &mut EstimateTally) {
        let h = self.hits.sample(rng);
        let f = self.false_alarms.sample(rng);
        self.record(h, f, 1.0, tally);
    }

    fn merge(&self, into: &mut EstimateTally, other: EstimateTally) {
        into.merge(other);
    }
}
