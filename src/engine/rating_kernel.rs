//! The rating fast path (one condition, full record): the plan's correction, the
//! degenerate-table rule, then the allocation-free unequal-variance fit of `fit::rating`.
//!
//! The counts come from the scenario's [`super::sampler::TableSampler`], like every route's.

use super::tally::{DatasetOutcome, EstimateTally, QuantityTally};
use crate::design::{Condition, RatingScale};
use crate::fit::rating::{
    FitStatus, MAX_CATEGORIES, RatingFitOptions, RatingTable, apply_correction, degeneracy, fit,
    measures,
};
use crate::model::{Observer, normal};
use crate::vocab::Quantity;
use crate::vocab::RateCorrection;

/// Settings of the rating fit for one scenario.
#[derive(Debug, Clone)]
pub struct RatingEstimator {
    categories: usize,
    boundary: usize,
    correction: RateCorrection,
    options: RatingFitOptions,
    template: Vec<QuantityTally>,
}

/// The true values of the reported quantities, in report order: d′, c, then σ and the
/// zROC slope when σ is estimated, then d_a and A_z (Simpson & Fitter 1973).
pub fn rating_truths(
    d_prime: f64,
    criterion: f64,
    sigma: f64,
    fix_sigma: bool,
) -> Vec<(Quantity, f64)> {
    let d_a = d_prime / ((1.0 + sigma * sigma) / 2.0).sqrt();
    let mut out = vec![
        (Quantity::DPrime, d_prime),
        (Quantity::Criterion, criterion),
    ];
    if !fix_sigma {
        out.push((Quantity::Sigma, sigma));
        out.push((Quantity::Slope, 1.0 / sigma));
    }
    out.push((Quantity::DA, d_a));
    out.push((Quantity::Az, normal::cdf(d_a / std::f64::consts::SQRT_2)));
    out
}

impl RatingEstimator {
    /// The fit of `scale` for `condition` of `observer` (its σ is the truth the σ estimate
    /// is scored against).
    pub fn new(
        scale: &RatingScale,
        condition: &Condition,
        observer: &Observer,
        correction: RateCorrection,
        z_crit: f64,
    ) -> Self {
        let template = rating_truths(
            condition.d_prime,
            condition.criterion,
            observer.sigma,
            scale.fix_sigma,
        )
        .into_iter()
        .map(|(q, t)| QuantityTally::new(q, t, z_crit))
        .collect();
        Self {
            categories: scale.categories,
            boundary: scale.boundary,
            correction,
            options: RatingFitOptions {
                fix_sigma: scale.fix_sigma,
                ..RatingFitOptions::default()
            },
            template,
        }
    }

    /// An empty tally of the reported quantities.
    pub fn tally(&self) -> EstimateTally {
        EstimateTally::new(self.template.clone())
    }

    /// Fits the table of counts `absent`, `present` (K cells each) and records it.
    pub fn record_counts(&self, absent: &[u64], present: &[u64], tally: &mut EstimateTally) {
        let k = self.categories;
        let mut af = [0.0; MAX_CATEGORIES];
        let mut pf = [0.0; MAX_CATEGORIES];
        for j in 0..k {
            af[j] = absent[j] as f64;
            pf[j] = present[j] as f64;
        }
        match RatingTable::new(&af[..k], &pf[..k]) {
            Ok(table) => self.record(&table, tally),
            Err(_) => tally.push_unfitted(DatasetOutcome::Degenerate, true, 1.0),
        }
    }

    /// Fits one table and records it.
    pub fn record(&self, table: &RatingTable, tally: &mut EstimateTally) {
        let k = self.categories;
        let extreme = table.absent()[..k].contains(&0.0) || table.present()[..k].contains(&0.0);
        let Ok(corrected) = apply_correction(table, self.correction) else {
            return tally.push_unfitted(DatasetOutcome::Degenerate, extreme, 1.0);
        };
        if degeneracy(&corrected, self.options.fix_sigma).is_some() {
            return tally.push_unfitted(DatasetOutcome::Degenerate, extreme, 1.0);
        }
        let fitted = match fit(&corrected, &self.options) {
            Ok(f) if f.status == FitStatus::Converged => f,
            Ok(_) => return tally.push_unfitted(DatasetOutcome::NotConverged, extreme, 1.0),
            Err(_) => return tally.push_unfitted(DatasetOutcome::Degenerate, extreme, 1.0),
        };
        let Ok(m) = measures(&fitted, self.boundary) else {
            return tally.push_unfitted(DatasetOutcome::NotConverged, extreme, 1.0);
        };
        let mut values = [(0.0, 0.0); 6];
        let mut n = 0;
        let mut push = |e: crate::fit::rating::Estimate| {
            values[n] = (e.value, e.se);
            n += 1;
        };
        push(m.d_prime);
        push(m.c);
        if !self.options.fix_sigma {
            push(m.sigma);
            push(m.slope);
        }
        push(m.d_a);
        push(m.a_z);
        tally.push_fit(&values[..n], extreme, 1.0);
    }
}
