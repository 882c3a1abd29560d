//! Cell probabilities of one row of the table, computed without cancellation in the tails.
//!
//! A row's evidence is N(mean, sd²); its cell j has probability Φ(u_{j+1}) − Φ(u_j) with the
//! standardised criteria u_i = (k_i − mean)/sd, u_0 = −∞, u_K = +∞. The difference of two CDF
//! values near 1 loses every digit in the upper tail, so each boundary keeps both tails,
//! Φ(u) and 1 − Φ(u), from one call to the small-tail function, and each cell subtracts the
//! two smaller numbers.

use crate::model::normal;

use super::MAX_CATEGORIES;

/// Boundary quantities of one row; index i is criterion i (0 and K are the infinite ends).
#[derive(Debug, Clone, Copy)]
pub(crate) struct RowCells {
    /// Standardised criteria u_i.
    pub u: [f64; MAX_CATEGORIES + 1],
    /// Φ(u_i).
    pub lower: [f64; MAX_CATEGORIES + 1],
    /// 1 − Φ(u_i).
    pub upper: [f64; MAX_CATEGORIES + 1],
    /// φ(u_i), 0 at the infinite ends.
    pub density: [f64; MAX_CATEGORIES + 1],
    /// u_i·φ(u_i), 0 at the infinite ends.
    pub u_density: [f64; MAX_CATEGORIES + 1],
}

impl RowCells {
    /// Tail probabilities (and, with `with_density`, densities) at every criterion for a row
    /// whose evidence is N(mean, sd²).
    #[inline]
    pub fn new(criteria: &[f64], mean: f64, sd: f64, with_density: bool) -> Self {
        let categories = criteria.len() + 1;
        let mut cells = RowCells {
            u: [0.0; MAX_CATEGORIES + 1],
            lower: [0.0; MAX_CATEGORIES + 1],
            upper: [0.0; MAX_CATEGORIES + 1],
            density: [0.0; MAX_CATEGORIES + 1],
            u_density: [0.0; MAX_CATEGORIES + 1],
        };
        cells.u[0] = f64::NEG_INFINITY;
        cells.upper[0] = 1.0;
        cells.u[categories] = f64::INFINITY;
        cells.lower[categories] = 1.0;
        let inv_sd = 1.0 / sd;
        for (i, &k) in criteria.iter().enumerate() {
            let u = (k - mean) * inv_sd;
            // One erfc call per boundary: the smaller tail, then the larger as 1 − it.
            let small = normal::sf(u.abs());
            let (lower, upper) = if u < 0.0 {
                (small, 1.0 - small)
            } else {
                (1.0 - small, small)
            };
            cells.u[i + 1] = u;
            cells.lower[i + 1] = lower;
            cells.upper[i + 1] = upper;
            if with_density {
                let d = normal::pdf(u);
                cells.density[i + 1] = d;
                cells.u_density[i + 1] = u * d;
            }
        }
        cells
    }

    /// Probability of category j: Φ(u_{j+1}) − Φ(u_j), from whichever tails are small.
    #[inline]
    pub fn probability(&self, j: usize) -> f64 {
        let (lo, hi) = (j, j + 1);
        if self.u[lo] >= 0.0 {
            self.upper[lo] - self.upper[hi]
        } else if self.u[hi] <= 0.0 {
            self.lower[hi] - self.lower[lo]
        } else {
            1.0 - self.lower[lo] - self.upper[hi]
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn probabilities_sum_to_one_and_match_plain_differences() {
        let criteria = [-1.2, -0.3, 0.4, 1.5];
        let cells = RowCells::new(&criteria, 0.7, 1.3, true);
        let total: f64 = (0..5).map(|j| cells.probability(j)).sum();
        assert!((total - 1.0).abs() < 1e-15);
        let mut edges = vec![f64::NEG_INFINITY];
        edges.extend(criteria.iter().map(|k| (k - 0.7) / 1.3));
        edges.push(f64::INFINITY);
        for j in 0..5 {
            let plain = normal::cdf(edges[j + 1]) - normal::cdf(edges[j]);
            assert!((cells.probability(j) - plain).abs() < 1e-15, "cell {j}");
        }
    }

    // Far in the upper tail the plain difference Φ(9) − Φ(8.5) is 0 in f64 arithmetic; the
    // true value sf(8.5) − sf(9), about 1e-17, must survive.
    #[test]
    fn upper_tail_cells_keep_their_digits() {
        let cells = RowCells::new(&[8.5, 9.0], 0.0, 1.0, false);
        let p = cells.probability(1);
        let expected = normal::sf(8.5) - normal::sf(9.0);
        assert!(p > 0.0);
        assert!((p / expected - 1.0).abs() < 1e-12);
        assert_eq!(normal::cdf(9.0) - normal::cdf(8.5), 0.0);
        // and symmetrically in the lower tail
        let cells = RowCells::new(&[-9.0, -8.5], 0.0, 1.0, false);
        assert!((cells.probability(1) / expected - 1.0).abs() < 1e-12);
    }

    #[test]
    fn ends_have_zero_density() {
        let cells = RowCells::new(&[0.0], 0.0, 1.0, true);
        assert_eq!(cells.density[0], 0.0);
        assert_eq!(cells.u_density[2], 0.0);
        assert_eq!(cells.probability(0), 0.5);
    }
}
