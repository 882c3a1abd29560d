//! Yes/no animals (one condition, full record): hits and false alarms drawn from the animal's
//! own rates, fitted in closed form (d′ = z(H) − z(F), c = −[z(H) + z(F)]/2) after the plan's
//! rate correction, with the z tables of the engine's closed-form route
//! (`engine::yesno_kernel::YesNoEstimator`): every animal of a grid point has the same
//! present/absent split, so one animal's fit is two table lookups, exactly as one subject's.
//! The pooled fit is the same closed form on the summed counts, with the Gourevitch &
//! Galanter (1967) covariance.

use super::animal::{AnimalEstimate, AnimalPath, PooledEstimate};
use super::population::{Deviation, Population};
use super::random_effects::{Layout, YesNoRow};
use crate::design::{Condition, Split};
use crate::engine::yesno_kernel::YesNoEstimator;
use crate::fit::{YesNoFit, fit_yes_no};
use crate::model::Observer;
use crate::simulate::ReplicateRng;
use crate::vocab::RateCorrection;
use rand_distr::{Binomial, Distribution};

/// Hits out of present trials and false alarms out of absent trials.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct YesNoCounts {
    pub hits: u64,
    pub present: u64,
    pub false_alarms: u64,
    pub absent: u64,
}

/// The yes/no path of one design at one trial count.
#[derive(Debug, Clone)]
pub struct YesNoAnimals {
    observer: Observer,
    split: Split,
    correction: RateCorrection,
    /// The single-subject route's z tables at this split.
    estimator: YesNoEstimator,
}

impl YesNoAnimals {
    /// Animals of `condition` (the design's only one) seen by `observer` (σ and lapses),
    /// with `split` trials each.
    pub fn new(
        observer: &Observer,
        condition: &Condition,
        split: Split,
        correction: RateCorrection,
    ) -> Self {
        Self {
            observer: condition.observer(observer),
            split,
            correction,
            // The interval level is the tally's business; group fits read only the fit.
            estimator: YesNoEstimator::new(
                [condition.d_prime, condition.criterion],
                split.present,
                split.absent,
                correction,
                crate::infer::z_critical(0.95),
            ),
        }
    }

    /// The observer an animal with this deviation is.
    pub fn animal(&self, deviation: &Deviation) -> Observer {
        Observer {
            d_prime: deviation.d_prime_at(self.observer.d_prime),
            criterion: deviation.criterion_at(self.observer.criterion),
            sigma: deviation.sigma_at(self.observer.sigma),
            lapse: deviation.lapse_at(self.observer.lapse),
        }
    }
}

impl YesNoAnimals {
    /// One animal's fit from the single-subject route's tables; `None` when a corrected rate
    /// has no z (the degenerate rule) or the counts are not this grid point's.
    fn fit_one(&self, c: &YesNoCounts) -> Option<YesNoFit> {
        let same_split =
            c.present == u64::from(self.split.present) && c.absent == u64::from(self.split.absent);
        if !same_split || c.hits > c.present || c.false_alarms > c.absent {
            return fit_counts(c, self.correction);
        }
        let e = &self.estimator;
        let fit = YesNoFit::from_entries(
            e.z_hits.get(c.hits as u32)?,
            e.z_false_alarms.get(c.false_alarms as u32)?,
        );
        (fit.measures.d_prime.is_finite() && fit.measures.criterion.is_finite()).then_some(fit)
    }
}

/// One Binomial(n, p) count; p is a model probability in [0, 1].
#[inline]
fn binomial(rng: &mut ReplicateRng, n: u64, p: f64) -> u64 {
    Binomial::new(n, p.clamp(0.0, 1.0)).map_or(0, |b| b.sample(rng))
}

impl AnimalPath for YesNoAnimals {
    type Counts = YesNoCounts;

    fn empty(&self) -> YesNoCounts {
        YesNoCounts::default()
    }

    fn simulate(&self, rng: &mut ReplicateRng, deviation: &Deviation) -> YesNoCounts {
        // Rates include lapses: p = (1 − λ)·p_model + λ·g (model::Observer::rates).
        let rates = self.animal(deviation).rates();
        let present = u64::from(self.split.present);
        let absent = u64::from(self.split.absent);
        YesNoCounts {
            hits: binomial(rng, present, rates.hit),
            present,
            false_alarms: binomial(rng, absent, rates.false_alarm),
            absent,
        }
    }

    fn add(&self, into: &mut YesNoCounts, other: &YesNoCounts) {
        into.hits += other.hits;
        into.present += other.present;
        into.false_alarms += other.false_alarms;
        into.absent += other.absent;
    }

    fn fit_animal(&self, c: &YesNoCounts) -> Option<AnimalEstimate> {
        let fit = self.fit_one(c)?;
        Some(AnimalEstimate {
            d_prime: vec![fit.measures.d_prime],
            criterion: vec![fit.measures.criterion],
            ln_sigma: None,
        })
    }

    fn random_effects_layout(&self, _population: &Population) -> Option<Layout> {
        Some(Layout {
            fixed: 2,
            conditions: vec![(0, 1)],
            criterion_slope: false,
            d_prime_slope: false,
            group_column: false,
        })
    }

    fn yes_no_rows(&self, c: &YesNoCounts) -> Option<Vec<YesNoRow>> {
        Some(vec![[c.present, c.hits, c.absent, c.false_alarms]])
    }

    fn fit_pooled(&self, c: &YesNoCounts) -> Option<PooledEstimate> {
        let fit = fit_counts(c, self.correction)?;
        let var_d = fit.se_d_prime * fit.se_d_prime;
        Some(PooledEstimate {
            values: vec![fit.measures.d_prime, fit.measures.criterion],
            // Var ĉ = Var d̂′/4; Cov(d̂′, ĉ) = −½[Var z(Ĥ) − Var z(F̂)].
            covariance: vec![var_d, fit.cov, fit.cov, var_d / 4.0],
            ln_sigma: None,
        })
    }
}

fn fit_counts(c: &YesNoCounts, correction: RateCorrection) -> Option<crate::fit::YesNoFit> {
    let n = |x: u64| u32::try_from(x).ok();
    let fit = fit_yes_no(
        n(c.hits)?,
        n(c.present)?,
        n(c.false_alarms)?,
        n(c.absent)?,
        correction,
    )?;
    (fit.measures.d_prime.is_finite() && fit.measures.criterion.is_finite()).then_some(fit)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::LapseSpec;
    use crate::simulate::replicate_rng;

    fn animals(lapse: Option<LapseSpec>, correction: RateCorrection) -> YesNoAnimals {
        let observer = Observer {
            d_prime: 1.5,
            criterion: 0.3,
            sigma: 1.0,
            lapse,
        };
        let condition = Condition {
            name: "x".into(),
            presence: 0.5,
            d_prime: 1.5,
            criterion: 0.3,
        };
        let split = Split {
            present: 40,
            absent: 40,
        };
        YesNoAnimals::new(&observer, &condition, split, correction)
    }

    // The lapse model written out here, independently of model::Observer: with λ = 0.1 and
    // g = 0.7, H = 0.9·Φ(0.75 − 0.3) + 0.1·0.7 and F = 0.9·Φ(−0.75 − 0.3) + 0.1·0.7, with
    // Φ(0.45) = 0.673645 and Φ(−1.05) = 0.146859 (standard normal table values, common
    // practice). Mean simulated rates over 20,000 animals × 40 trials: MC SE ≈
    // √(0.25/800,000) ≈ 0.00056; allow 6 SE.
    #[test]
    fn simulated_rates_follow_the_lapse_formula() {
        let a = animals(
            Some(LapseSpec {
                rate: 0.1,
                guess_yes: 0.7,
            }),
            RateCorrection::LogLinear,
        );
        let hit = 0.9 * 0.673645 + 0.07;
        let fa = 0.9 * 0.146859 + 0.07;
        let mut rng = replicate_rng(9, 9, 9);
        let mut total = a.empty();
        for _ in 0..20_000 {
            let c = a.simulate(&mut rng, &Deviation::default());
            a.add(&mut total, &c);
        }
        let h = total.hits as f64 / total.present as f64;
        let f = total.false_alarms as f64 / total.absent as f64;
        assert!((h - hit).abs() < 6.0 * 0.00056, "{h} vs {hit}");
        assert!((f - fa).abs() < 6.0 * 0.00056, "{f} vs {fa}");
    }

    // An animal's own lapse rate and σ replace the plan's; its guessing rate stays.
    #[test]
    fn an_animal_carries_its_own_lapse_rate_and_sigma() {
        let a = animals(
            Some(LapseSpec {
                rate: 0.1,
                guess_yes: 0.7,
            }),
            RateCorrection::LogLinear,
        );
        let dev = Deviation {
            ln_sigma: 0.5,
            lapse_rate: Some(0.25),
            ..Deviation::default()
        };
        let o = a.animal(&dev);
        assert_eq!(o.lapse.unwrap().rate, 0.25);
        assert_eq!(o.lapse.unwrap().guess_yes, 0.7);
        assert!((o.sigma - 0.5f64.exp()).abs() < 1e-12);
        assert_eq!(a.animal(&Deviation::default()), a.observer);
    }

    // Worked example computed with SciPy 1.17 (norm.ppf of the half-n rates): 20/20 hits,
    // 5/25 false alarms → d′ = 2.801585, c = −0.559171.
    #[test]
    fn animal_fit_is_the_closed_form() {
        let a = animals(None, RateCorrection::HalfN);
        let c = YesNoCounts {
            hits: 20,
            present: 20,
            false_alarms: 5,
            absent: 25,
        };
        let e = a.fit_animal(&c).unwrap();
        assert!((e.d_prime[0] - 2.801585).abs() < 1e-6);
        assert!((e.criterion[0] + 0.559171).abs() < 1e-6);
        let none = animals(None, RateCorrection::None);
        assert!(none.fit_animal(&c).is_none());
    }

    // Gourevitch & Galanter (1967) variance, evaluated with SciPy 1.17: H = .8, F = .2, 50/50
    // → Var(d′) = 0.081655, Var(c) = 0.020414.
    #[test]
    fn pooled_fit_carries_the_asymptotic_covariance() {
        let a = animals(None, RateCorrection::None);
        let c = YesNoCounts {
            hits: 40,
            present: 50,
            false_alarms: 10,
            absent: 50,
        };
        let p = a.fit_pooled(&c).unwrap();
        assert!((p.covariance[0] - 0.081655).abs() < 1e-6);
        assert!((p.covariance[3] - 0.020414).abs() < 1e-6);
        assert!(p.covariance[1].abs() < 1e-12);
    }
}
