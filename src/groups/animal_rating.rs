//! Rating animals (one condition, full record, K ordered categories): multinomial category
//! counts from the animal's own d′ and criteria (the whole scale moves with its criterion,
//! its spacing kept), the plan's correction and degenerate-table rule, then the
//! unequal-variance maximum-likelihood fit of `fit::rating` (Dorfman & Alf 1969), as in
//! `engine::rating_kernel`.

use super::animal::{AnimalEstimate, AnimalPath, PooledEstimate};
use super::population::Deviation;
use crate::design::{Condition, RatingScale, Split};
use crate::fit::rating::{
    FitStatus, MAX_CATEGORIES, RatingFitOptions, RatingMeasures, RatingParams, RatingTable,
    apply_correction, degeneracy, fit, measures,
};
use crate::model::Observer;
use crate::simulate::{ReplicateRng, multinomial_into};
use crate::vocab::RateCorrection;

/// Category counts of absent and present trials; entries past K are 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatingCounts {
    pub absent: [f64; MAX_CATEGORIES],
    pub present: [f64; MAX_CATEGORIES],
}

/// The rating path of one design at one trial count.
#[derive(Debug, Clone)]
pub struct RatingAnimals {
    scale: RatingScale,
    d_prime: f64,
    criterion: f64,
    sigma: f64,
    lapse: Option<crate::model::LapseSpec>,
    split: Split,
    correction: RateCorrection,
    options: RatingFitOptions,
}

impl RatingAnimals {
    pub fn new(
        scale: &RatingScale,
        condition: &Condition,
        observer: &Observer,
        split: Split,
        correction: RateCorrection,
    ) -> Self {
        Self {
            scale: scale.clone(),
            d_prime: condition.d_prime,
            criterion: condition.criterion,
            // The animal's σ generates the data even when the analysis holds σ at 1.
            sigma: observer.sigma,
            lapse: observer.lapse,
            split,
            correction,
            options: RatingFitOptions {
                fix_sigma: scale.fix_sigma,
                ..RatingFitOptions::default()
            },
        }
    }

    /// Category probabilities (absent, present) of an animal with this deviation. Absolute
    /// criteria k_j = c_j + s + d′/2, where s moves the scale's boundary criterion to the
    /// animal's; lapse trials fall evenly on the categories at or above the boundary with
    /// probability g, evenly below it otherwise (as in `design::model`).
    pub fn probabilities(
        &self,
        deviation: &Deviation,
    ) -> Option<([f64; MAX_CATEGORIES], [f64; MAX_CATEGORIES])> {
        let k = self.scale.categories;
        let b = self.scale.boundary;
        let d = deviation.d_prime_at(self.d_prime);
        let shift = deviation.criterion_at(self.criterion) - self.scale.criteria[b - 1];
        let mut absolute = [0.0; MAX_CATEGORIES];
        for (slot, c) in absolute.iter_mut().zip(&self.scale.criteria) {
            *slot = c + shift + d / 2.0;
        }
        let params =
            RatingParams::new(d, deviation.sigma_at(self.sigma), &absolute[..k - 1]).ok()?;
        let (mut absent, mut present) = params.cell_probabilities();
        if let Some(l) = deviation.lapse_at(self.lapse) {
            l.mix(&mut absent[..k], b);
            l.mix(&mut present[..k], b);
        }
        Some((absent, present))
    }

    /// The converged fit's measures, or `None` under the degenerate-animal rule.
    fn measures(&self, c: &RatingCounts) -> Option<RatingMeasures> {
        let k = self.scale.categories;
        let table = RatingTable::new(&c.absent[..k], &c.present[..k]).ok()?;
        let corrected = apply_correction(&table, self.correction).ok()?;
        if degeneracy(&corrected, self.options.fix_sigma).is_some() {
            return None;
        }
        let fitted = fit(&corrected, &self.options).ok()?;
        if fitted.status != FitStatus::Converged {
            return None;
        }
        let m = measures(&fitted, self.scale.boundary).ok()?;
        (m.d_prime.value.is_finite() && m.c.value.is_finite()).then_some(m)
    }
}

impl AnimalPath for RatingAnimals {
    type Counts = RatingCounts;

    fn empty(&self) -> RatingCounts {
        RatingCounts {
            absent: [0.0; MAX_CATEGORIES],
            present: [0.0; MAX_CATEGORIES],
        }
    }

    fn simulate(&self, rng: &mut ReplicateRng, deviation: &Deviation) -> RatingCounts {
        let k = self.scale.categories;
        let mut out = self.empty();
        let Some((pa, pp)) = self.probabilities(deviation) else {
            return out;
        };
        let mut a = [0u64; MAX_CATEGORIES];
        let mut p = [0u64; MAX_CATEGORIES];
        multinomial_into(rng, u64::from(self.split.absent), &pa[..k], &mut a[..k]);
        multinomial_into(rng, u64::from(self.split.present), &pp[..k], &mut p[..k]);
        for j in 0..k {
            out.absent[j] = a[j] as f64;
            out.present[j] = p[j] as f64;
        }
        out
    }

    fn add(&self, into: &mut RatingCounts, other: &RatingCounts) {
        for j in 0..MAX_CATEGORIES {
            into.absent[j] += other.absent[j];
            into.present[j] += other.present[j];
        }
    }

    fn fit_animal(&self, c: &RatingCounts) -> Option<AnimalEstimate> {
        let m = self.measures(c)?;
        Some(AnimalEstimate {
            d_prime: vec![m.d_prime.value],
            criterion: vec![m.c.value],
            ln_sigma: (!self.options.fix_sigma && m.sigma.value > 0.0).then(|| m.sigma.value.ln()),
        })
    }

    fn fit_pooled(&self, c: &RatingCounts) -> Option<PooledEstimate> {
        let m = self.measures(c)?;
        let corr = if m.corr_d_prime_c.is_finite() {
            m.corr_d_prime_c
        } else {
            0.0
        };
        let mut p =
            PooledEstimate::single((m.d_prime.value, m.d_prime.se), (m.c.value, m.c.se), corr);
        if !self.options.fix_sigma && m.sigma.value > 0.0 {
            // Delta method: SE(ln σ̂) = SE(σ̂)/σ̂.
            p.ln_sigma = Some((m.sigma.value.ln(), m.sigma.se / m.sigma.value));
        }
        Some(p)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::normal;

    fn animals() -> RatingAnimals {
        let scale = RatingScale {
            categories: 4,
            boundary: 2,
            criteria: vec![-0.5, 0.25, 1.0],
            fix_sigma: false,
        };
        let condition = Condition {
            name: "x".into(),
            presence: 0.5,
            d_prime: 1.2,
            criterion: 0.25,
        };
        let observer = Observer {
            d_prime: 1.2,
            criterion: 0.25,
            sigma: 1.25,
            lapse: None,
        };
        let split = Split {
            present: 500,
            absent: 500,
        };
        RatingAnimals::new(
            &scale,
            &condition,
            &observer,
            split,
            RateCorrection::LogLinear,
        )
    }

    // An animal 0.3 more conservative: its boundary criterion is c = 0.55, so the share of
    // absent trials above the boundary is Φ(−(0.55 + 0.6)) (midpoint convention, k = c + d′/2).
    #[test]
    fn the_scale_moves_with_the_animal() {
        let a = animals();
        let dev = Deviation {
            criterion: 0.3,
            ..Deviation::default()
        };
        let (absent, _) = a.probabilities(&dev).unwrap();
        let above: f64 = absent[2..4].iter().sum();
        assert!((above - normal::cdf(-(0.55 + 0.6))).abs() < 1e-12);
    }

    #[test]
    fn expected_counts_fit_back_to_the_animal() {
        let a = animals();
        let dev = Deviation {
            d_prime: 0.2,
            criterion: -0.1,
            ..Deviation::default()
        };
        let (pa, pp) = a.probabilities(&dev).unwrap();
        let mut c = a.empty();
        for j in 0..4 {
            c.absent[j] = 5000.0 * pa[j];
            c.present[j] = 5000.0 * pp[j];
        }
        let e = a.fit_animal(&c).unwrap();
        // Log-linear adds ½ per cell to 10,000 trials: the fit moves by well under 0.01.
        assert!((e.d_prime[0] - 1.4).abs() < 0.01, "{}", e.d_prime[0]);
        assert!((e.criterion[0] - 0.15).abs() < 0.01, "{}", e.criterion[0]);
        assert!((e.ln_sigma.unwrap() - 1.25f64.ln()).abs() < 0.01);
        let p = a.fit_pooled(&c).unwrap();
        assert!(p.ln_sigma.unwrap().1 > 0.0);
    }
}
