//! Assurance: the expected power over a distribution of an uncertain hypothesised value
//! (O'Hagan, Stevens & Campbell 2005, *Pharmaceutical Statistics* 4:187–201):
//! A = E_prior[power(θ)], beside the power at the point value.
//!
//! This is the computational core (a prior, its draws and the Monte Carlo expectation of any
//! power curve); `uncertainty::assured` applies it to a plan's `[assurance]` section.
//!
//! # Nested draws
//!
//! Two levels of randomness: the uncertain value θ (one draw per imagined study) and the data
//! given θ. Here the inner level is not simulated: the caller's power curve is the
//! expectation over data already (for instance the normal-approximation Wald power from the
//! expected information), so only values are drawn and the Monte Carlo SE of A is
//! sd(power(θᵢ))/√draws. A power curve that is itself a Monte Carlo estimate from m datasets
//! per value adds at most A(1 − A)/(draws·m) to that variance; since the outer variance
//! Var(power(θ))/draws is usually the larger, many values with few datasets each are the
//! efficient split. Draws are independent of the curve (common random numbers): two designs
//! compared with the same seed see the same values.

pub mod prior;

pub use prior::{Prior, PriorError};

use rand::SeedableRng;
use rand_xoshiro::Xoshiro256PlusPlus;

/// An assurance with its Monte Carlo uncertainty and the power at the point value.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Assurance {
    /// Mean power over the draws.
    pub value: f64,
    /// Monte Carlo SE of `value`: sd(power)/√draws (0 for a degenerate prior).
    pub mc_se: f64,
    /// Power at the prior's centre (the plan's point value).
    pub point_power: f64,
    pub draws: usize,
    /// Draws at which the power curve had no value (counted, left out of the mean).
    pub failed: usize,
}

/// Assurance of `power` (a power curve over the uncertain value) under `prior`, from `draws`
/// values drawn with `seed`. `None` when the curve has no value at the point or at any draw.
pub fn assurance(
    power: impl Fn(f64) -> Option<f64>,
    prior: &Prior,
    draws: usize,
    seed: u64,
) -> Option<Assurance> {
    let point_power = power(prior.centre())?;
    let values = draw_values(std::slice::from_ref(prior), draws, seed);
    summarise(point_power, values.iter().map(|v| power(v[0])))
}

/// `draws` sets of values, one value per prior in each, from one stream seeded by `seed`
/// (draw i, prior j is the (i·J + j)-th value drawn: the same for any thread count).
pub fn draw_values(priors: &[Prior], draws: usize, seed: u64) -> Vec<Vec<f64>> {
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(seed);
    (0..draws)
        .map(|_| priors.iter().map(|p| p.draw(&mut rng)).collect())
        .collect()
}

/// The assurance of per-draw powers (`None` or a non-finite power: the draw failed, counted
/// and left out of the mean); `None` when no draw has a power.
pub fn summarise(point_power: f64, powers: impl Iterator<Item = Option<f64>>) -> Option<Assurance> {
    let (mut n, mut mean, mut m2, mut failed) = (0usize, 0.0f64, 0.0f64, 0usize);
    for p in powers {
        match p {
            Some(p) if p.is_finite() => {
                // Welford's running mean and sum of squares (stable for p near 0 or 1).
                n += 1;
                let d = p - mean;
                mean += d / n as f64;
                m2 += d * (p - mean);
            }
            _ => failed += 1,
        }
    }
    if n == 0 {
        return None;
    }
    let var = if n > 1 { m2 / (n - 1) as f64 } else { 0.0 };
    Some(Assurance {
        value: mean,
        mc_se: (var / n as f64).sqrt(),
        point_power,
        draws: n + failed,
        failed,
    })
}
