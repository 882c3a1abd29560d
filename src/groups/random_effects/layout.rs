//! A design's yes/no counts as the rows of the random-effects model.
//!
//! Condition j of an animal gives two binomial rows: its n_S present trials with h hits,
//! P = Φ(d_j/2 − c_j), and its n_N absent trials with f false alarms, P = Φ(−d_j/2 − c_j)
//! (the equal-variance model every yes/no analysis of vigil fits). The animal's values are
//! d_j = β[d(j)] + a (+ v for j ≥ 1) and c_j = β[c(j)] + b (+ u for j ≥ 1) (+ Δ in the
//! second population of a group difference), with β indices shared where the design shares a
//! parameter between conditions. The random effects are (a, b), then u and v when the plan
//! gives the population those slopes — the analysis fits the structure the plan assumes.

use super::marginal::AnimalRows;

/// One condition's yes/no counts: [present trials, hits, absent trials, false alarms].
pub type YesNoRow = [u64; 4];

/// Which fixed effect each condition reads, and which random effects the model has.
#[derive(Debug, Clone, PartialEq)]
pub struct Layout {
    /// Fixed effects of one population (before a group-difference column).
    pub fixed: usize,
    /// (β index of d′, β index of c) for each condition.
    pub conditions: Vec<(usize, usize)>,
    /// A random criterion slope u (conditions after the first).
    pub criterion_slope: bool,
    /// A random d′ slope v (conditions after the first).
    pub d_prime_slope: bool,
    /// A group-difference column Δ (index `fixed`) on every criterion of the second group.
    pub group_column: bool,
}

impl Layout {
    /// Number of fixed effects.
    pub fn p(&self) -> usize {
        self.fixed + usize::from(self.group_column)
    }

    /// Number of random effects.
    pub fn q(&self) -> usize {
        2 + usize::from(self.criterion_slope) + usize::from(self.d_prime_slope)
    }

    /// What each random effect is, in order.
    pub fn random_names(&self) -> Vec<String> {
        let mut names = vec!["d′".to_string(), "c".to_string()];
        if self.criterion_slope {
            names.push("criterion shift".into());
        }
        if self.d_prime_slope {
            names.push("d′ change".into());
        }
        names
    }

    /// The same layout with a group-difference column.
    pub fn with_group_column(&self) -> Self {
        Self {
            group_column: true,
            ..self.clone()
        }
    }

    /// Index of the random effect u (criterion slope), if any.
    fn u(&self) -> Option<usize> {
        self.criterion_slope.then_some(2)
    }

    /// Index of the random effect v (d′ slope), if any.
    fn v(&self) -> Option<usize> {
        self.d_prime_slope
            .then_some(2 + usize::from(self.criterion_slope))
    }

    /// One animal's rows; `second` marks the second population of a group difference.
    pub fn rows(&self, table: &[YesNoRow], second: bool) -> AnimalRows {
        let (p, q) = (self.p(), self.q());
        let mut out = AnimalRows {
            trials: Vec::with_capacity(2 * table.len()),
            yes: Vec::with_capacity(2 * table.len()),
            x: Vec::with_capacity(2 * table.len() * p),
            z: Vec::with_capacity(2 * table.len() * q),
        };
        for (j, (counts, &(d, c))) in table.iter().zip(&self.conditions).enumerate() {
            for (half, n, k) in [(0.5, counts[0], counts[1]), (-0.5, counts[2], counts[3])] {
                out.trials.push(n as f64);
                out.yes.push(k as f64);
                let mut x = vec![0.0; p];
                x[d] += half;
                x[c] -= 1.0;
                if self.group_column && second {
                    x[self.fixed] -= 1.0;
                }
                let mut z = vec![0.0; q];
                z[0] = half;
                z[1] = -1.0;
                if j > 0 {
                    if let Some(u) = self.u() {
                        z[u] = -1.0;
                    }
                    if let Some(v) = self.v() {
                        z[v] = half;
                    }
                }
                out.x.extend(x);
                out.z.extend(z);
            }
        }
        out
    }

    /// Starting fixed effects from per-condition (d′, c) values: each β entry takes the
    /// first condition's value that reads it.
    pub fn start_beta(&self, values: &[(f64, f64)], difference: f64) -> Vec<f64> {
        let mut beta = vec![f64::NAN; self.p()];
        for (&(d, c), &(dv, cv)) in self.conditions.iter().zip(values) {
            if beta[d].is_nan() {
                beta[d] = dv;
            }
            if beta[c].is_nan() {
                beta[c] = cv;
            }
        }
        if self.group_column {
            beta[self.fixed] = difference;
        }
        beta.iter()
            .map(|b| if b.is_finite() { *b } else { 0.0 })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Two conditions sharing d′ (β = d, c₀, c₁) with a criterion slope: the second
    // condition's present row is η = d/2 − c₁ + a/2 − b − u.
    #[test]
    fn rows_carry_the_shared_and_sloped_coefficients() {
        let layout = Layout {
            fixed: 3,
            conditions: vec![(0, 1), (0, 2)],
            criterion_slope: true,
            d_prime_slope: false,
            group_column: false,
        };
        let rows = layout.rows(&[[10, 7, 10, 2], [12, 9, 8, 4]], false);
        assert_eq!(rows.trials, vec![10.0, 10.0, 12.0, 8.0]);
        assert_eq!(rows.yes, vec![7.0, 2.0, 9.0, 4.0]);
        assert_eq!(&rows.x[6..9], &[0.5, 0.0, -1.0]);
        assert_eq!(&rows.z[6..9], &[0.5, -1.0, -1.0]);
        assert_eq!(&rows.z[0..3], &[0.5, -1.0, 0.0]);
        let grouped = layout
            .with_group_column()
            .rows(&[[10, 7, 10, 2], [12, 9, 8, 4]], true);
        assert_eq!(&grouped.x[0..4], &[0.5, -1.0, 0.0, -1.0]);
    }
}
