//! Rating and graded-response scenarios (one condition, full record): multinomial category
//! counts per stimulus class, the plan's correction, the degenerate-table rule, then the
//! allocation-free unequal-variance fit of `fit::rating`.

use super::parallel::Kernel;
use super::tally::{EstimateTally, Outcome, QuantityTally};
use crate::design::{Condition, RatingScale, Split};
use crate::fit::rating::{
    FitOptions, FitStatus, MAX_CATEGORIES, ParamsError, RatingParams, RatingTable,
    apply_correction, degeneracy, fit, measures,
};
use crate::model::{Observer, normal};
use crate::simulate::{ReplicateRng, multinomial_into};
use crate::vocab::Quantity;
use crate::vocab::RateCorrection;

/// Precomputed category probabilities and settings for one rating scenario.
#[derive(Debug, Clone)]
pub struct RatingKernel {
    categories: usize,
    boundary: usize,
    absent_p: [f64; MAX_CATEGORIES],
    present_p: [f64; MAX_CATEGORIES],
    split: Split,
    correction: RateCorrection,
    options: FitOptions,
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

impl RatingKernel {
    pub fn new(
        scale: &RatingScale,
        condition: &Condition,
        observer: &Observer,
        split: Split,
        correction: RateCorrection,
        z_crit: f64,
    ) -> Result<Self, ParamsError> {
        let k = scale.categories;
        // The animal's σ generates the data even when the analysis holds σ at 1.
        let sigma = observer.sigma;
        // Absolute criteria: k_j = c_j + d′/2, the scale shifted to the condition's criterion.
        let shift = condition.criterion - scale.criteria[scale.boundary - 1];
        let absolute: Vec<f64> = scale
            .criteria
            .iter()
            .map(|c| c + shift + condition.d_prime / 2.0)
            .collect();
        let params = RatingParams::new(condition.d_prime, sigma, &absolute)?;
        let (mut absent_p, mut present_p) = params.cell_probabilities();
        if let Some(l) = observer.lapse {
            l.mix(&mut absent_p[..k], scale.boundary);
            l.mix(&mut present_p[..k], scale.boundary);
        }
        let template = rating_truths(
            condition.d_prime,
            condition.criterion,
            sigma,
            scale.fix_sigma,
        )
        .into_iter()
        .map(|(q, t)| QuantityTally::new(q, t, z_crit))
        .collect();
        Ok(Self {
            categories: k,
            boundary: scale.boundary,
            absent_p,
            present_p,
            split,
            correction,
            options: FitOptions {
                fix_sigma: scale.fix_sigma,
                ..FitOptions::default()
            },
            template,
        })
    }

    /// Fits one table and records it.
    pub fn record(&self, table: &RatingTable, tally: &mut EstimateTally) {
        let k = self.categories;
        let extreme = table.absent()[..k].contains(&0.0) || table.present()[..k].contains(&0.0);
        let Ok(corrected) = apply_correction(table, self.correction) else {
            return tally.push_unfitted(Outcome::Degenerate, extreme, 1.0);
        };
        if degeneracy(&corrected, self.options.fix_sigma).is_some() {
            return tally.push_unfitted(Outcome::Degenerate, extreme, 1.0);
        }
        let fitted = match fit(&corrected, &self.options) {
            Ok(f) if f.status == FitStatus::Converged => f,
            Ok(_) => return tally.push_unfitted(Outcome::NotConverged, extreme, 1.0),
            Err(_) => return tally.push_unfitted(Outcome::Degenerate, extreme, 1.0),
        };
        let Ok(m) = measures(&fitted, self.boundary) else {
            return tally.push_unfitted(Outcome::NotConverged, extreme, 1.0);
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

impl Kernel for RatingKernel {
    type Tally = EstimateTally;

    fn tally(&self) -> EstimateTally {
        EstimateTally::new(self.template.clone())
    }

    fn replicate(&self, rng: &mut ReplicateRng, tally: &mut EstimateTally) {
        let k = self.categories;
        let mut a = [0u64; MAX_CATEGORIES];
        let mut p = [0u64; MAX_CATEGORIES];
        multinomial_into(
            rng,
            u64::from(self.split.absent),
            &self.absent_p[..k],
            &mut a[..k],
        );
        multinomial_into(
            rng,
            u64::from(self.split.present),
            &self.present_p[..k],
            &mut p[..k],
        );
        let mut af = [0.0; MAX_CATEGORIES];
        let mut pf = [0.0; MAX_CATEGORIES];
        for j in 0..k {
            af[j] = a[j] as f64;
            pf[j] = p[j] as f64;
        }
        match RatingTable::new(&af[..k], &pf[..k]) {
            Ok(table) => self.record(&table, tally),
            Err(_) => tally.push_unfitted(Outcome::Degenerate, true, 1.0),
        }
    }

    fn merge(&self, into: &mut EstimateTally, other: EstimateTally) {
        into.merge(other);
    }
}
