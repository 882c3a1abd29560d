//! Multinomial category counts by sequential conditional binomial draws.
//!
//! rand_distr 0.6 has no multinomial; the conditional-binomial construction is the
//! standard exact method: n_j ~ Binomial(n − Σ_{i<j} n_i, p_j / (1 − Σ_{i<j} p_i)).

use rand::Rng;
use rand_distr::{Binomial, Distribution};

/// Fills `out` with multinomial counts of `n` trials over `probs` (which sum to 1).
pub fn multinomial_into<R: Rng + ?Sized>(rng: &mut R, n: u64, probs: &[f64], out: &mut [u64]) {
    let last = probs.len() - 1;
    let mut left = n;
    let mut mass = 1.0;
    for j in 0..last {
        let q = if mass > 0.0 {
            (probs[j] / mass).clamp(0.0, 1.0)
        } else {
            0.0
        };
        let draw = Binomial::new(left, q).map_or(0, |b| b.sample(rng));
        out[j] = draw;
        left -= draw;
        mass -= probs[j];
    }
    out[last] = left;
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::simulate::replicate_rng;

    #[test]
    fn counts_sum_to_n_and_match_means() {
        let probs = [0.1, 0.2, 0.3, 0.4];
        let mut rng = replicate_rng(5, 0, 0);
        let mut out = [0u64; 4];
        let mut totals = [0u64; 4];
        let reps = 20_000;
        for _ in 0..reps {
            multinomial_into(&mut rng, 50, &probs, &mut out);
            assert_eq!(out.iter().sum::<u64>(), 50);
            for j in 0..4 {
                totals[j] += out[j];
            }
        }
        for j in 0..4 {
            let mean = totals[j] as f64 / reps as f64;
            let sd_mean = (50.0 * probs[j] * (1.0 - probs[j]) / reps as f64).sqrt();
            assert!(
                (mean - 50.0 * probs[j]).abs() < 6.0 * sd_mean,
                "category {j}"
            );
        }
    }
}
