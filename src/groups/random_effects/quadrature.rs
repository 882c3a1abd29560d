//! Gauss–Hermite quadrature: one-dimensional rules for ∫ f(x)·e^{−x²} dx and their product
//! grids in q dimensions.
//!
//! Nodes and weights come from the Golub–Welsch method (Golub & Welsch 1969, *Math. Comp.*
//! 23:221–230): the nodes are the eigenvalues of the symmetric tridiagonal Jacobi matrix of
//! the Hermite polynomials (zero diagonal, off-diagonal √(i/2)), and the weights are √π times
//! the squared first component of each normalised eigenvector. An n-node rule integrates
//! x^k·e^{−x²} exactly for k ≤ 2n − 1.

use nalgebra::{DMatrix, SymmetricEigen};

/// Most nodes per dimension a rule may have (the Jacobi eigen-solve stays accurate far
/// beyond this; more nodes than this only cost time).
pub const MAX_NODES: usize = 40;

/// A one-dimensional rule: nodes in increasing order and their weights.
#[derive(Debug, Clone, PartialEq)]
pub struct HermiteRule {
    pub nodes: Vec<f64>,
    pub weights: Vec<f64>,
}

impl HermiteRule {
    /// The `n`-node rule, 1 ≤ n ≤ [`MAX_NODES`] (n = 1 is the Laplace approximation's point).
    pub fn new(n: usize) -> Self {
        let n = n.clamp(1, MAX_NODES);
        let jacobi = DMatrix::from_fn(n, n, |i, j| {
            if i + 1 == j || j + 1 == i {
                (i.max(j) as f64 / 2.0).sqrt()
            } else {
                0.0
            }
        });
        let eigen = SymmetricEigen::new(jacobi);
        let mut pairs: Vec<(f64, f64)> = (0..n)
            .map(|k| {
                let v0 = eigen.eigenvectors[(0, k)];
                (eigen.eigenvalues[k], std::f64::consts::PI.sqrt() * v0 * v0)
            })
            .collect();
        pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
        // The rule is symmetric: average mirrored pairs so rounding cannot break it.
        for k in 0..n / 2 {
            let (a, b) = (pairs[k], pairs[n - 1 - k]);
            let x = (b.0 - a.0) / 2.0;
            let w = (a.1 + b.1) / 2.0;
            pairs[k] = (-x, w);
            pairs[n - 1 - k] = (x, w);
        }
        if n % 2 == 1 {
            pairs[n / 2].0 = 0.0;
        }
        Self {
            nodes: pairs.iter().map(|p| p.0).collect(),
            weights: pairs.iter().map(|p| p.1).collect(),
        }
    }
}

/// The product rule in `dims` dimensions: every combination of the 1-D nodes.
#[derive(Debug, Clone, PartialEq)]
pub struct ProductGrid {
    pub dims: usize,
    /// Nodes, row-major: point m is `points[m·dims .. (m + 1)·dims]`.
    pub points: Vec<f64>,
    /// ln(Π weights) + |x|²: the log weight of a node once the e^{−|x|²} kernel is divided
    /// out (adaptive quadrature integrates e^{g(u)} itself, not g·e^{−x²}).
    pub log_weights: Vec<f64>,
}

impl ProductGrid {
    pub fn new(rule: &HermiteRule, dims: usize) -> Self {
        let n = rule.nodes.len();
        let count = n.pow(dims as u32);
        let mut points = Vec::with_capacity(count * dims);
        let mut log_weights = Vec::with_capacity(count);
        for m in 0..count {
            let mut rest = m;
            let mut lw = 0.0;
            for _ in 0..dims {
                let k = rest % n;
                rest /= n;
                let x = rule.nodes[k];
                points.push(x);
                lw += rule.weights[k].ln() + x * x;
            }
            log_weights.push(lw);
        }
        Self {
            dims,
            points,
            log_weights,
        }
    }

    pub fn len(&self) -> usize {
        self.log_weights.len()
    }

    pub fn is_empty(&self) -> bool {
        self.log_weights.is_empty()
    }

    pub fn point(&self, m: usize) -> &[f64] {
        &self.points[m * self.dims..(m + 1) * self.dims]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Abramowitz & Stegun (1964), Table 25.10, n = 5 (cited from memory, printed to 10
    // decimals there): nodes 0, ±0.9585724646, ±2.0201828705; weights 0.9453087205,
    // 0.3936193232, 0.0199532421. Checked to the printed 1e-10.
    #[test]
    fn five_node_rule_matches_the_table() {
        let r = HermiteRule::new(5);
        let want_x = [
            -2.020_182_870_5,
            -0.958_572_464_6,
            0.0,
            0.958_572_464_6,
            2.020_182_870_5,
        ];
        let want_w = [
            0.019_953_242_1,
            0.393_619_323_2,
            0.945_308_720_5,
            0.393_619_323_2,
            0.019_953_242_1,
        ];
        for k in 0..5 {
            assert!((r.nodes[k] - want_x[k]).abs() < 1e-10, "{:?}", r.nodes);
            assert!((r.weights[k] - want_w[k]).abs() < 1e-10, "{:?}", r.weights);
        }
    }

    // ∫ x^{2j} e^{−x²} dx = Γ(j + ½) (a standard integral); an n-node rule is exact up to
    // degree 2n − 1, so 12 nodes reproduce j ≤ 11 to rounding (relative 1e-12).
    #[test]
    fn rules_are_exact_for_low_degree_polynomials() {
        let r = HermiteRule::new(12);
        for j in 0..=11 {
            let got: f64 = r
                .nodes
                .iter()
                .zip(&r.weights)
                .map(|(x, w)| w * x.powi(2 * j))
                .sum();
            let want = statrs::function::gamma::gamma(j as f64 + 0.5);
            assert!(
                ((got - want) / want).abs() < 1e-12,
                "j = {j}: {got} vs {want}"
            );
        }
    }

    #[test]
    fn product_grid_integrates_a_separable_gaussian_moment() {
        // ∫∫ x²y² e^{−x²−y²} = Γ(3/2)² = π/4; log weights carry +|x|², so subtract it back.
        let g = ProductGrid::new(&HermiteRule::new(4), 2);
        assert_eq!(g.len(), 16);
        let got: f64 = (0..g.len())
            .map(|m| {
                let p = g.point(m);
                let r2 = p[0] * p[0] + p[1] * p[1];
                (g.log_weights[m] - r2).exp() * p[0] * p[0] * p[1] * p[1]
            })
            .sum();
        assert!((got - std::f64::consts::PI / 4.0).abs() < 1e-13);
    }
}
