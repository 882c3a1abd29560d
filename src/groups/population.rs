//! The population of animals: how far each animal's d′ and criterion sit from the plan's.
//!
//! Each animal draws a deviation (δd′, δc) from a bivariate normal with mean 0, SDs s_d and
//! s_c and correlation ρ (the plan's `[animals]`). Its d′ in every condition is the
//! condition's d′ + δd′ (held at 0 or above), its criterion the condition's criterion + δc:
//! the offsets between conditions (and the spacing of a rating scale) are the same for every
//! animal, so an animal is "more cautious" or "more sensitive" across the board.

use crate::design::goals::Animals;
use crate::simulate::ReplicateRng;
use rand_distr::{Distribution, StandardNormal};
use serde::Serialize;

/// Between-animal variation of d′ and the criterion.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Population {
    /// Between-animal SD of d′, ≥ 0.
    pub sd_d_prime: f64,
    /// Between-animal SD of the criterion, ≥ 0.
    pub sd_criterion: f64,
    /// Correlation of an animal's d′ and criterion, in (−1, 1).
    pub correlation: f64,
}

/// One animal's departure from the population means.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Deviation {
    pub d_prime: f64,
    pub criterion: f64,
}

impl Deviation {
    /// This animal's d′ where the population mean is `mean`: mean + δd′, held at 0 or above
    /// (a negative d′ would mean the animal responds less often to the stimulus than to its
    /// absence; the truncation is documented in docs/groups.md).
    #[inline]
    pub fn d_prime_at(&self, mean: f64) -> f64 {
        (mean + self.d_prime).max(0.0)
    }

    /// This animal's criterion where the population mean is `mean`.
    #[inline]
    pub fn criterion_at(&self, mean: f64) -> f64 {
        mean + self.criterion
    }

    /// The same animal in a population whose mean criterion is `shift` higher.
    #[inline]
    pub fn shifted(self, shift: f64) -> Self {
        Self {
            criterion: self.criterion + shift,
            ..self
        }
    }
}

impl Population {
    /// The population of a plan's `[animals]` table (validated: SDs ≥ 0, |ρ| < 1).
    pub fn from_animals(a: &Animals) -> Self {
        Self {
            sd_d_prime: a.sd_d_prime,
            sd_criterion: a.sd_criterion,
            correlation: a.correlation,
        }
    }

    /// No variation between animals.
    pub fn identical() -> Self {
        Self {
            sd_d_prime: 0.0,
            sd_criterion: 0.0,
            correlation: 0.0,
        }
    }

    /// Draws one animal: with z₁, z₂ independent standard normals,
    /// δd′ = s_d·z₁ and δc = s_c·(ρ·z₁ + √(1 − ρ²)·z₂), so Var δd′ = s_d², Var δc = s_c² and
    /// corr(δd′, δc) = ρ (the usual Cholesky construction of a bivariate normal; common
    /// practice). Two normals are drawn even when both SDs are 0, so the random stream does
    /// not depend on the SDs.
    #[inline]
    pub fn draw(&self, rng: &mut ReplicateRng) -> Deviation {
        let z1: f64 = StandardNormal.sample(rng);
        let z2: f64 = StandardNormal.sample(rng);
        let r = self.correlation;
        Deviation {
            d_prime: self.sd_d_prime * z1,
            criterion: self.sd_criterion * (r * z1 + (1.0 - r * r).sqrt() * z2),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::infer::{CoMoments, Moments};
    use crate::simulate::replicate_rng;

    // 100,000 draws: the sample SDs and correlation must match the population's. MC SE of
    // an SD ≈ s/√(2n) = 0.0022·s; of a correlation ≈ (1 − ρ²)/√n = 0.0023 at ρ = 0.4; allow
    // 6 SE.
    #[test]
    fn draws_have_the_stated_sds_and_correlation() {
        let pop = Population {
            sd_d_prime: 0.3,
            sd_criterion: 0.2,
            correlation: -0.4,
        };
        let mut rng = replicate_rng(3, 1, 4);
        let n = 100_000;
        let (mut d, mut c, mut dc) = (Moments::default(), Moments::default(), CoMoments::default());
        for _ in 0..n {
            let a = pop.draw(&mut rng);
            d.push(a.d_prime, 1.0);
            c.push(a.criterion, 1.0);
            dc.push(a.d_prime, a.criterion, 1.0);
        }
        assert!(d.mean().abs() < 6.0 * 0.3 / (n as f64).sqrt());
        assert!(c.mean().abs() < 6.0 * 0.2 / (n as f64).sqrt());
        assert!((d.variance(false).sqrt() - 0.3).abs() < 6.0 * 0.0022 * 0.3);
        assert!((c.variance(false).sqrt() - 0.2).abs() < 6.0 * 0.0022 * 0.2);
        assert!((dc.correlation() + 0.4).abs() < 6.0 * 0.0027);
    }

    #[test]
    fn identical_animals_do_not_deviate() {
        let mut rng = replicate_rng(3, 1, 4);
        let a = Population::identical().draw(&mut rng);
        assert_eq!(a, Deviation::default());
        assert_eq!(a.d_prime_at(1.5), 1.5);
        assert_eq!(a.shifted(0.25).criterion_at(0.1), 0.35);
    }

    #[test]
    fn d_prime_is_held_at_zero_or_above() {
        let a = Deviation {
            d_prime: -2.0,
            criterion: 0.0,
        };
        assert_eq!(a.d_prime_at(1.0), 0.0);
    }
}
