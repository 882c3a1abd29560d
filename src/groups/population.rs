//! The population of animals: how far each animal's d′ and criterion sit from the plan's.
//!
//! Each animal draws a deviation (δd′, δc) from a bivariate normal with mean 0, SDs s_d and
//! s_c and correlation ρ (the plan's `[animals]`). Its d′ in every condition is the
//! condition's d′ + δd′ (held at 0 or above), its criterion the condition's criterion + δc:
//! the offsets between conditions (and the spacing of a rating scale) are the same for every
//! animal, so an animal is "more cautious" or "more sensitive" across the board.
//!
//! Optional [`Slopes`] add random slopes (an animal's own criterion shift and d′ change from
//! the first condition to every other), a log-normal σ and a beta lapse rate. They are drawn
//! from a second stream derived from the animal's seed, after the intercepts, so with every
//! slope SD at 0 nothing is drawn and every existing number is unchanged bit for bit.

use crate::design::goals::Animals;
pub use crate::design::goals::Slopes;
use crate::simulate::ReplicateRng;
use rand::SeedableRng;
use rand_distr::{Beta, Distribution, StandardNormal};
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
    /// Random slopes, σ and lapse rate between animals; left out of JSON when all are 0.
    #[serde(skip_serializing_if = "no_slopes")]
    pub slopes: Slopes,
    /// The plan's σ and lapse rate: the median of σ and the mean of the lapse rate.
    #[serde(skip)]
    pub lapse_rate: f64,
}

fn no_slopes(s: &Slopes) -> bool {
    !s.any()
}

/// One animal's departure from the population means.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Deviation {
    pub d_prime: f64,
    pub criterion: f64,
    /// The animal's own criterion shift from the first condition to every other.
    pub criterion_shift: f64,
    /// The animal's own d′ change from the first condition to every other.
    pub d_prime_change: f64,
    /// ln of the animal's σ over the plan's σ.
    pub ln_sigma: f64,
    /// The animal's lapse rate, when it differs from the plan's.
    pub lapse_rate: Option<f64>,
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

    /// This animal's d′ in condition `j` where the population mean there is `mean`: the
    /// first condition (j = 0) takes no slope.
    #[inline]
    pub fn d_prime_in(&self, j: usize, mean: f64) -> f64 {
        if j == 0 {
            self.d_prime_at(mean)
        } else {
            (mean + self.d_prime + self.d_prime_change).max(0.0)
        }
    }

    /// This animal's criterion in condition `j` where the population mean there is `mean`.
    #[inline]
    pub fn criterion_in(&self, j: usize, mean: f64) -> f64 {
        if j == 0 {
            self.criterion_at(mean)
        } else {
            mean + self.criterion + self.criterion_shift
        }
    }

    /// This animal's σ where the plan's is `sigma` (exactly `sigma` with no σ deviation).
    #[inline]
    pub fn sigma_at(&self, sigma: f64) -> f64 {
        if self.ln_sigma == 0.0 {
            sigma
        } else {
            sigma * self.ln_sigma.exp()
        }
    }

    /// This animal's lapses where the plan's are `lapse`.
    #[inline]
    pub fn lapse_at(
        &self,
        lapse: Option<crate::model::LapseSpec>,
    ) -> Option<crate::model::LapseSpec> {
        match (lapse, self.lapse_rate) {
            (Some(l), Some(rate)) => Some(crate::model::LapseSpec { rate, ..l }),
            (l, _) => l,
        }
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
            slopes: a.slopes,
            lapse_rate: 0.0,
        }
    }

    /// As [`Population::from_animals`], with the plan's lapse rate (the beta's mean).
    pub fn with_lapse_rate(self, rate: f64) -> Self {
        Self {
            lapse_rate: rate,
            ..self
        }
    }

    /// No variation between animals.
    pub fn identical() -> Self {
        Self {
            sd_d_prime: 0.0,
            sd_criterion: 0.0,
            correlation: 0.0,
            slopes: Slopes::default(),
            lapse_rate: 0.0,
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
        let mut deviation = Deviation {
            d_prime: self.sd_d_prime * z1,
            criterion: self.sd_criterion * (r * z1 + (1.0 - r * r).sqrt() * z2),
            ..Deviation::default()
        };
        if self.slopes.any() {
            // The second stream: a fixed function of this stream's next state, drawn from a
            // clone so the animal's counts still start where they always did.
            let mut side = rng.clone();
            let mut extra =
                ReplicateRng::seed_from_u64(rand::Rng::next_u64(&mut side) ^ SLOPE_STREAM);
            self.draw_slopes(
                &mut extra,
                z1,
                r * z1 + (1.0 - r * r).sqrt() * z2,
                &mut deviation,
            );
        }
        deviation
    }

    /// Slopes, σ and lapse rate from the second stream, in a fixed order (three normals, then
    /// the beta, whose sampler takes a varying number of draws, last). `zd` and `zc` are the
    /// standardised intercept deviations of d′ and c.
    fn draw_slopes(&self, rng: &mut ReplicateRng, zd: f64, zc: f64, into: &mut Deviation) {
        let s = &self.slopes;
        let z3: f64 = StandardNormal.sample(rng);
        let z4: f64 = StandardNormal.sample(rng);
        let z5: f64 = StandardNormal.sample(rng);
        // corr(shift, δc) = r_c and corr(change, δd′) = r_d by the same Cholesky step.
        let rc = s.correlation_criterion_shift;
        let rd = s.correlation_d_prime_change;
        into.criterion_shift = s.sd_criterion_shift * (rc * zc + (1.0 - rc * rc).sqrt() * z3);
        into.d_prime_change = s.sd_d_prime_change * (rd * zd + (1.0 - rd * rd).sqrt() * z4);
        into.ln_sigma = s.sd_ln_sigma * z5;
        if s.sd_lapse_rate > 0.0 {
            let (a, b) = beta_shape(self.lapse_rate, s.sd_lapse_rate);
            // Validated: 0 < λ < 1 and SD² < λ(1 − λ), so both shapes are positive.
            if let Ok(beta) = Beta::new(a, b) {
                // Kept below 1 like a plan's lapse rate.
                into.lapse_rate = Some(beta.sample(rng).min(1.0 - 1e-12));
            }
        }
    }
}

/// Mixed into the seed of an animal's second stream, so it never equals the first.
const SLOPE_STREAM: u64 = 0x9E37_79B9_7F4A_7C15;

/// Beta shapes (a, b) with mean m and SD s (method of moments: a + b = m(1 − m)/s² − 1,
/// a = m·(a + b), b = (1 − m)·(a + b)).
pub fn beta_shape(mean: f64, sd: f64) -> (f64, f64) {
    let total = mean * (1.0 - mean) / (sd * sd) - 1.0;
    (mean * total, (1.0 - mean) * total)
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
            ..Population::identical()
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

    fn sloped() -> Population {
        Population {
            sd_d_prime: 0.3,
            sd_criterion: 0.25,
            correlation: 0.2,
            slopes: Slopes {
                sd_criterion_shift: 0.4,
                correlation_criterion_shift: -0.5,
                sd_d_prime_change: 0.2,
                correlation_d_prime_change: 0.3,
                sd_ln_sigma: 0.25,
                sd_lapse_rate: 0.05,
            },
            lapse_rate: 0.1,
        }
    }

    // 100,000 animals. Slopes: MC SE of an SD ≈ s/√(2n), of a correlation ≈ (1 − ρ²)/√n;
    // allow 6 SE. σ = σ₀·e^{s·z} is log-normal with E σ = σ₀·e^{s²/2} and
    // Var σ = σ₀²·(e^{s²} − 1)·e^{s²} (Johnson, Kotz & Balakrishnan, *Continuous Univariate
    // Distributions* vol. 1, 1994, ch. 14). The lapse rate is Beta(a, b) with
    // E = a/(a + b) and Var = ab/[(a + b)²(a + b + 1)] (same, vol. 2, 1995, ch. 25); the
    // shapes are solved here from mean 0.1 and SD 0.05 by hand: a + b = 0.09/0.0025 − 1 = 35,
    // a = 3.5, b = 31.5. MC SE of a mean ≈ SD/√n, of a variance ≈ √((μ₄ − σ⁴)/n) bounded by
    // 3·σ²·√(2/n) for these mildly skewed laws; allow 6 SE.
    #[test]
    fn slopes_sigma_and_lapse_have_the_stated_moments() {
        let pop = sloped();
        let n = 100_000;
        let (mut shift, mut change, mut c, mut d) = (
            Moments::default(),
            Moments::default(),
            Moments::default(),
            Moments::default(),
        );
        let (mut shift_c, mut change_d) = (CoMoments::default(), CoMoments::default());
        let (mut sigma, mut lapse) = (Moments::default(), Moments::default());
        for r in 0..n {
            let a = pop.draw(&mut replicate_rng(11, 2, r));
            let m: [&mut Moments; 4] = [&mut shift, &mut change, &mut c, &mut d];
            for (into, x) in
                m.into_iter()
                    .zip([a.criterion_shift, a.d_prime_change, a.criterion, a.d_prime])
            {
                into.push(x, 1.0);
            }
            shift_c.push(a.criterion_shift, a.criterion, 1.0);
            change_d.push(a.d_prime_change, a.d_prime, 1.0);
            sigma.push(a.sigma_at(1.2), 1.0);
            lapse.push(a.lapse_rate.unwrap(), 1.0);
        }
        let nf = n as f64;
        let sd_ok = |m: &Moments, s: f64| {
            (m.variance(false).sqrt() - s).abs() < 6.0 * s / (2.0 * nf).sqrt()
        };
        assert!(sd_ok(&shift, 0.4) && sd_ok(&change, 0.2));
        assert!(shift.mean().abs() < 6.0 * 0.4 / nf.sqrt());
        assert!((shift_c.correlation() + 0.5).abs() < 6.0 * 0.75 / nf.sqrt());
        assert!((change_d.correlation() - 0.3).abs() < 6.0 * 0.91 / nf.sqrt());
        let s2: f64 = 0.25 * 0.25;
        let (mean_s, var_s) = (1.2 * (s2 / 2.0).exp(), 1.44 * (s2.exp() - 1.0) * s2.exp());
        assert!((sigma.mean() - mean_s).abs() < 6.0 * (var_s / nf).sqrt());
        assert!((sigma.variance(false) - var_s).abs() < 6.0 * 3.0 * var_s * (2.0 / nf).sqrt());
        let (a, b): (f64, f64) = (3.5, 31.5);
        let (mean_l, var_l) = (a / (a + b), a * b / ((a + b) * (a + b) * (a + b + 1.0)));
        assert!((mean_l - 0.1).abs() < 1e-12 && (var_l - 0.0025).abs() < 1e-12);
        assert!((lapse.mean() - mean_l).abs() < 6.0 * (var_l / nf).sqrt());
        assert!((lapse.variance(false) - var_l).abs() < 6.0 * 3.0 * var_l * (2.0 / nf).sqrt());
    }

    // The slopes come from a second stream: the intercepts and the rest of the animal's own
    // stream are the same with and without them.
    #[test]
    fn slopes_do_not_move_the_existing_draws() {
        let mut plain = sloped();
        plain.slopes = Slopes::default();
        for r in 0..50 {
            let (mut x, mut y) = (replicate_rng(4, 1, r), replicate_rng(4, 1, r));
            let (a, b) = (sloped().draw(&mut x), plain.draw(&mut y));
            assert_eq!((a.d_prime, a.criterion), (b.d_prime, b.criterion));
            assert_eq!(rand::Rng::next_u64(&mut x), rand::Rng::next_u64(&mut y));
            assert_eq!(
                b,
                Deviation {
                    d_prime: b.d_prime,
                    criterion: b.criterion,
                    ..Deviation::default()
                }
            );
        }
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
            ..Deviation::default()
        };
        assert_eq!(a.d_prime_at(1.0), 0.0);
    }
}
