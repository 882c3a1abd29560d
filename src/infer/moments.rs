//! Weighted streaming moments that merge deterministically.
//!
//! Welford's update generalised to weights (West 1979) and Chan, Golub & LeVeque's (1979)
//! pairwise merge. Monte Carlo replicates have weight 1; exact enumeration passes each
//! outcome's probability as its weight, so both paths share one summary code.

use serde::{Deserialize, Serialize};

/// Weighted count, mean and sum of squared deviations of one quantity.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize, Deserialize)]
pub struct Moments {
    weight: f64,
    count: u64,
    mean: f64,
    m2: f64,
}

impl Moments {
    /// Adds one value with weight `w > 0`.
    #[inline]
    pub fn push(&mut self, x: f64, w: f64) {
        self.count += 1;
        self.weight += w;
        let delta = x - self.mean;
        self.mean += delta * w / self.weight;
        self.m2 += w * delta * (x - self.mean);
    }

    /// Combines two accumulators; merging in a fixed order gives fixed bits.
    pub fn merge(&mut self, other: &Self) {
        if other.weight == 0.0 {
            return;
        }
        if self.weight == 0.0 {
            *self = *other;
            return;
        }
        let weight = self.weight + other.weight;
        let delta = other.mean - self.mean;
        self.mean += delta * other.weight / weight;
        self.m2 += other.m2 + delta * delta * self.weight * other.weight / weight;
        self.weight = weight;
        self.count += other.count;
    }

    pub fn count(&self) -> u64 {
        self.count
    }

    /// Sum of weights.
    pub fn weight(&self) -> f64 {
        self.weight
    }

    pub fn mean(&self) -> f64 {
        if self.weight > 0.0 {
            self.mean
        } else {
            f64::NAN
        }
    }

    /// Variance with the n − 1 divisor for unit weights; for probability weights that sum
    /// to 1 (exact enumeration) it is the population variance.
    pub fn variance(&self, exact: bool) -> f64 {
        if exact {
            if self.weight > 0.0 {
                self.m2 / self.weight
            } else {
                f64::NAN
            }
        } else if self.count > 1 {
            self.m2 / (self.weight - self.weight / self.count as f64)
        } else {
            f64::NAN
        }
    }

    /// Monte Carlo standard error of the mean, √(var/n); 0 for exact enumeration.
    pub fn mc_se(&self, exact: bool) -> f64 {
        if exact {
            0.0
        } else {
            (self.variance(false) / self.count as f64).sqrt()
        }
    }
}

/// Weighted co-moment of a pair, for the correlation of two estimates.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize, Deserialize)]
pub struct CoMoments {
    x: Moments,
    y: Moments,
    c: f64,
}

impl CoMoments {
    #[inline]
    pub fn push(&mut self, x: f64, y: f64, w: f64) {
        let dx = x - self.x.mean;
        self.x.push(x, w);
        self.y.push(y, w);
        self.c += w * dx * (y - self.y.mean);
    }

    pub fn merge(&mut self, other: &Self) {
        let (wa, wb) = (self.x.weight, other.x.weight);
        if wb == 0.0 {
            return;
        }
        if wa == 0.0 {
            *self = *other;
            return;
        }
        let dx = other.x.mean - self.x.mean;
        let dy = other.y.mean - self.y.mean;
        self.c += other.c + dx * dy * wa * wb / (wa + wb);
        self.x.merge(&other.x);
        self.y.merge(&other.y);
    }

    pub fn count(&self) -> u64 {
        self.x.count
    }

    /// Pearson correlation; NaN when either variable does not vary.
    pub fn correlation(&self) -> f64 {
        let denom = (self.x.m2 * self.y.m2).sqrt();
        if denom > 0.0 {
            self.c / denom
        } else {
            f64::NAN
        }
    }
}

impl FromIterator<f64> for Moments {
    /// Unit-weight moments of a sample.
    fn from_iter<I: IntoIterator<Item = f64>>(iter: I) -> Self {
        let mut m = Moments::default();
        iter.into_iter().for_each(|x| m.push(x, 1.0));
        m
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn data() -> Vec<f64> {
        (0..101)
            .map(|i| ((i * 37 % 101) as f64).sin() * 3.0 + 1.0)
            .collect()
    }

    #[test]
    fn matches_two_pass_formulas() {
        let xs = data();
        let mut m = Moments::default();
        xs.iter().for_each(|&x| m.push(x, 1.0));
        let n = xs.len() as f64;
        let mean = xs.iter().sum::<f64>() / n;
        let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
        assert!((m.mean() - mean).abs() < 1e-12);
        assert!((m.variance(false) - var).abs() < 1e-12);
    }

    #[test]
    fn merge_at_every_split_equals_one_pass() {
        let xs = data();
        let mut whole = Moments::default();
        xs.iter().for_each(|&x| whole.push(x, 1.0));
        for cut in 0..=xs.len() {
            let (mut a, mut b) = (Moments::default(), Moments::default());
            xs[..cut].iter().for_each(|&x| a.push(x, 1.0));
            xs[cut..].iter().for_each(|&x| b.push(x, 1.0));
            a.merge(&b);
            assert!((a.mean() - whole.mean()).abs() < 1e-12);
            assert!((a.variance(false) - whole.variance(false)).abs() < 1e-12);
        }
    }

    #[test]
    fn correlation_of_a_line_is_one_and_merges() {
        let xs = data();
        let mut whole = CoMoments::default();
        let (mut a, mut b) = (CoMoments::default(), CoMoments::default());
        for (i, &x) in xs.iter().enumerate() {
            whole.push(x, -2.0 * x + 1.0, 1.0);
            if i < 40 {
                a.push(x, -2.0 * x + 1.0, 1.0)
            } else {
                b.push(x, -2.0 * x + 1.0, 1.0)
            }
        }
        a.merge(&b);
        assert!((whole.correlation() + 1.0).abs() < 1e-12);
        assert!((a.correlation() + 1.0).abs() < 1e-12);
    }

    #[test]
    fn probability_weights_give_population_moments() {
        // Bernoulli(0.3) as two weighted outcomes: mean 0.3, variance 0.21.
        let mut m = Moments::default();
        m.push(1.0, 0.3);
        m.push(0.0, 0.7);
        assert!((m.mean() - 0.3).abs() < 1e-15);
        assert!((m.variance(true) - 0.21).abs() < 1e-15);
    }
}
