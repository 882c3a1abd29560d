//! Binomial draws by table lookup, built once per scenario.
//!
//! A scenario fixes n and p, so the binomial pmf is computed once (statrs) and sampled with
//! Walker's alias method (rand_distr's `WeightedAliasIndex`): one uniform draw and one
//! comparison per count. This is the hot path of yes/no simulation; a fresh BTPE draw per
//! count was the slower alternative.

use rand::Rng;
use rand_distr::Distribution;
use rand_distr::weighted::WeightedAliasIndex;
use statrs::distribution::{Binomial, Discrete};

/// Binomial(n, p) sampler and its exact pmf.
#[derive(Debug, Clone)]
pub struct BinomialTable {
    pmf: Vec<f64>,
    alias: Option<WeightedAliasIndex<f64>>,
    degenerate_value: u32,
}

impl BinomialTable {
    /// Builds the table; p outside [0, 1] is clamped (callers pass model probabilities).
    pub fn new(n: u32, p: f64) -> Self {
        let p = p.clamp(0.0, 1.0);
        let pmf: Vec<f64> = match Binomial::new(p, u64::from(n)) {
            Ok(b) => (0..=u64::from(n)).map(|k| b.pmf(k)).collect(),
            Err(_) => vec![0.0; n as usize + 1],
        };
        // An alias table needs at least one positive weight; with p at 0 or 1 the draw is fixed.
        let alias = WeightedAliasIndex::new(pmf.clone()).ok();
        let degenerate_value = if p >= 0.5 { n } else { 0 };
        Self {
            pmf,
            alias,
            degenerate_value,
        }
    }

    /// One binomial count.
    #[inline]
    pub fn sample<R: Rng + ?Sized>(&self, rng: &mut R) -> u32 {
        match &self.alias {
            Some(a) => a.sample(rng) as u32,
            None => self.degenerate_value,
        }
    }

    /// P(X = k) for k = 0..=n.
    pub fn pmf(&self) -> &[f64] {
        &self.pmf
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::simulate::replicate_rng;

    #[test]
    fn pmf_sums_to_one() {
        let t = BinomialTable::new(40, 0.3);
        assert!((t.pmf().iter().sum::<f64>() - 1.0).abs() < 1e-12);
    }

    #[test]
    fn sample_mean_matches_np() {
        // Mean of 200,000 draws of Binomial(30, 0.2): expected 6, SD of the mean
        // √(30·0.2·0.8/200000) ≈ 0.0049; allow 6 SD.
        let t = BinomialTable::new(30, 0.2);
        let mut rng = replicate_rng(1, 2, 3);
        let n = 200_000;
        let sum: u64 = (0..n).map(|_| u64::from(t.sample(&mut rng))).sum();
        assert!((sum as f64 / n as f64 - 6.0).abs() < 6.0 * 0.0049);
    }

    #[test]
    fn extreme_probabilities_are_fixed() {
        let mut rng = replicate_rng(1, 2, 3);
        assert_eq!(BinomialTable::new(10, 0.0).sample(&mut rng), 0);
        assert_eq!(BinomialTable::new(10, 1.0).sample(&mut rng), 10);
    }
}
