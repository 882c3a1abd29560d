//! Parameters of the rating model, in two coordinate systems.
//!
//! Natural: η = (μ, σ, k_1, …, k_{K−1}), what the model and the report speak.
//! Unconstrained: θ = (μ, ln σ, k_1, ln(k_2 − k_1), …, ln(k_{K−1} − k_{K−2})), what the solver
//! moves in, so that every θ gives σ > 0 and ordered criteria. With σ held at 1, θ has no
//! ln σ entry. This file maps between the two and carries derivatives across (chain rule).

use super::cells::RowCells;
use super::{MAX_CATEGORIES, MAX_CRITERIA, Matrix, Vector};

/// Why a parameter set was rejected.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum ParamsError {
    /// K − 1 criteria with K in 2..=12.
    #[error("the model needs 1 to {max} criteria, got {got}")]
    CriterionCount { got: usize, max: usize },
    /// μ, σ and the criteria must be finite.
    #[error("parameters must be finite numbers")]
    NotFinite,
    /// σ must be positive.
    #[error("σ must be positive, got {0}")]
    SigmaNotPositive(f64),
    /// Criteria must increase strictly; `index` is the 1-based criterion that does not.
    #[error("criterion {index} is not larger than the one below it")]
    CriteriaNotIncreasing { index: usize },
}

/// Natural parameters: present evidence ~ N(μ, σ²), absent ~ N(0, 1), criteria k_1 < … <
/// k_{K−1} (Dorfman & Alf 1969).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatingParams {
    mu: f64,
    sigma: f64,
    criteria: [f64; MAX_CRITERIA],
    categories: usize,
}

impl RatingParams {
    /// Checks that everything is finite, σ > 0 and the criteria increase strictly.
    pub fn new(mu: f64, sigma: f64, criteria: &[f64]) -> Result<Self, ParamsError> {
        if criteria.is_empty() || criteria.len() > MAX_CRITERIA {
            return Err(ParamsError::CriterionCount {
                got: criteria.len(),
                max: MAX_CRITERIA,
            });
        }
        if !mu.is_finite() || !sigma.is_finite() || criteria.iter().any(|k| !k.is_finite()) {
            return Err(ParamsError::NotFinite);
        }
        if sigma <= 0.0 {
            return Err(ParamsError::SigmaNotPositive(sigma));
        }
        if let Some(i) = (1..criteria.len()).find(|&i| criteria[i] <= criteria[i - 1]) {
            return Err(ParamsError::CriteriaNotIncreasing { index: i + 1 });
        }
        let mut stored = [0.0; MAX_CRITERIA];
        stored[..criteria.len()].copy_from_slice(criteria);
        Ok(RatingParams {
            mu,
            sigma,
            criteria: stored,
            categories: criteria.len() + 1,
        })
    }

    /// Mean μ of the present distribution (= d′ in absent-SD units).
    #[inline]
    pub fn mu(&self) -> f64 {
        self.mu
    }

    /// Standard deviation σ of the present distribution.
    #[inline]
    pub fn sigma(&self) -> f64 {
        self.sigma
    }

    /// Criteria k_1 < … < k_{K−1}.
    #[inline]
    pub fn criteria(&self) -> &[f64] {
        &self.criteria[..self.categories - 1]
    }

    /// Number of response categories K.
    #[inline]
    pub fn categories(&self) -> usize {
        self.categories
    }

    /// A neutral start: μ = 1, σ = 1, criteria evenly spaced on [−1, 1] (0 when K = 2).
    /// `categories` is clamped to 2..=12.
    pub(crate) fn neutral(categories: usize) -> Self {
        let categories = categories.clamp(2, MAX_CATEGORIES);
        let points = categories - 1;
        let mut criteria = [0.0; MAX_CRITERIA];
        if points > 1 {
            for (j, c) in criteria.iter_mut().take(points).enumerate() {
                *c = -1.0 + 2.0 * j as f64 / (points - 1) as f64;
            }
        }
        RatingParams {
            mu: 1.0,
            sigma: 1.0,
            criteria,
            categories,
        }
    }

    /// The same parameters with σ replaced (used to hold σ = 1).
    pub(crate) fn with_sigma(mut self, sigma: f64) -> Self {
        self.sigma = sigma;
        self
    }

    /// Cell probabilities (absent row, present row), category 0 first; entries past K are 0.
    /// Absent: Φ(k_{j+1}) − Φ(k_j); present: Φ((k_{j+1} − μ)/σ) − Φ((k_j − μ)/σ).
    pub fn cell_probabilities(&self) -> ([f64; MAX_CATEGORIES], [f64; MAX_CATEGORIES]) {
        let absent = RowCells::new(self.criteria(), 0.0, 1.0, false);
        let present = RowCells::new(self.criteria(), self.mu, self.sigma, false);
        let mut out = ([0.0; MAX_CATEGORIES], [0.0; MAX_CATEGORIES]);
        for j in 0..self.categories {
            out.0[j] = absent.probability(j);
            out.1[j] = present.probability(j);
        }
        out
    }
}

/// Where each parameter sits in θ for a given K and σ mode.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Layout {
    pub categories: usize,
    pub fix_sigma: bool,
}

impl Layout {
    /// Number of entries of θ: μ, (ln σ), K − 1 criteria.
    #[inline]
    pub fn dim(self) -> usize {
        self.categories + usize::from(!self.fix_sigma)
    }

    /// Position of k_1 in θ.
    #[inline]
    pub fn first_criterion(self) -> usize {
        if self.fix_sigma { 1 } else { 2 }
    }

    /// Position in the natural vector (μ, σ, k_1, …) of θ entry `t`.
    #[inline]
    pub fn natural_index(self, t: usize) -> usize {
        if self.fix_sigma && t > 0 { t + 1 } else { t }
    }

    /// θ of a parameter set (σ is left out when fixed).
    pub fn theta_of(self, p: &RatingParams) -> Vector {
        let mut theta = [0.0; super::MAX_PARAMS];
        theta[0] = p.mu;
        if !self.fix_sigma {
            theta[1] = p.sigma.ln();
        }
        let c0 = self.first_criterion();
        let k = p.criteria();
        theta[c0] = k[0];
        for i in 1..k.len() {
            theta[c0 + i] = (k[i] - k[i - 1]).ln();
        }
        theta
    }

    /// Parameters of a θ; `None` when they overflow or gaps underflow to 0 (σ = 1 if fixed).
    pub fn params_at(self, theta: &Vector) -> Option<RatingParams> {
        let sigma = if self.fix_sigma { 1.0 } else { theta[1].exp() };
        let c0 = self.first_criterion();
        let mut criteria = [0.0; MAX_CRITERIA];
        criteria[0] = theta[c0];
        for i in 1..self.categories - 1 {
            criteria[i] = criteria[i - 1] + theta[c0 + i].exp();
            if criteria[i] <= criteria[i - 1] || !criteria[i].is_finite() {
                return None;
            }
        }
        let ok = theta[0].is_finite() && sigma.is_finite() && sigma > 0.0 && theta[c0].is_finite();
        ok.then_some(RatingParams {
            mu: theta[0],
            sigma,
            criteria,
            categories: self.categories,
        })
    }

    /// The natural gradient and Hessian restricted to the entries present in θ (drops σ when
    /// it is fixed), in θ order.
    pub fn restrict(self, g_nat: &Vector, h_nat: &Matrix) -> (Vector, Matrix) {
        let mut g = [0.0; super::MAX_PARAMS];
        let mut h = [[0.0; super::MAX_PARAMS]; super::MAX_PARAMS];
        self.restrict_into(g_nat, h_nat, &mut g, &mut h);
        (g, h)
    }

    fn restrict_into(self, g_nat: &Vector, h_nat: &Matrix, g: &mut Vector, h: &mut Matrix) {
        let n = self.dim();
        for a in 0..n {
            let na = self.natural_index(a);
            g[a] = g_nat[na];
            for b in 0..n {
                h[a][b] = h_nat[na][self.natural_index(b)];
            }
        }
    }

    /// Gradient and Hessian of lnL in θ from those in η (chain rule).
    ///
    /// With J = ∂η/∂θ: ∇_θ = Jᵀ∇_η and ∇²_θ = Jᵀ∇²_η J + Σ_i (∂lnL/∂η_i)·∇²_θ η_i. J factors
    /// as (cumulative sum over criteria) × diag(1, σ, 1, δ_2, …, δ_{K−1}) with δ_m = k_m −
    /// k_{m−1}, so Jᵀ H J is two passes of suffix sums and a scaling, O(n²); the only second
    /// derivatives of η are ∂²σ/∂(ln σ)² = σ and ∂²k_j/∂(ln δ_m)² = δ_m for j ≥ m.
    pub fn chain_rule(
        self,
        p: &RatingParams,
        g_nat: &Vector,
        h_nat: &Matrix,
        g: &mut Vector,
        h: &mut Matrix,
    ) {
        let n = self.dim();
        let c0 = self.first_criterion();
        self.restrict_into(g_nat, h_nat, g, h);
        // Right-multiply by the cumulative-sum matrix: column m collects columns m..end.
        for row in h.iter_mut().take(n) {
            for m in (c0..n - 1).rev() {
                row[m] += row[m + 1];
            }
        }
        for m in (c0..n - 1).rev() {
            let (head, tail) = h.split_at_mut(m + 1);
            for (x, y) in head[m].iter_mut().zip(&tail[0]).take(n) {
                *x += y;
            }
            g[m] += g[m + 1];
        }
        // g's criterion slots now hold the suffix sums S_m = Σ_{j ≥ m} ∂lnL/∂k_j.
        let mut scale = [1.0; super::MAX_PARAMS];
        if !self.fix_sigma {
            scale[1] = p.sigma;
        }
        let k = p.criteria();
        for i in 1..k.len() {
            scale[c0 + i] = k[i] - k[i - 1];
        }
        for a in 0..n {
            for b in 0..n {
                h[a][b] *= scale[a] * scale[b];
            }
        }
        if !self.fix_sigma {
            h[1][1] += p.sigma * g[1];
        }
        for m in c0 + 1..n {
            h[m][m] += scale[m] * g[m];
        }
        for a in 0..n {
            g[a] *= scale[a];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn validates() {
        assert!(RatingParams::new(1.0, 1.2, &[-0.5, 0.2, 1.0]).is_ok());
        assert_eq!(
            RatingParams::new(1.0, 1.2, &[]),
            Err(ParamsError::CriterionCount { got: 0, max: 11 })
        );
        assert_eq!(
            RatingParams::new(1.0, 0.0, &[0.0]),
            Err(ParamsError::SigmaNotPositive(0.0))
        );
        assert_eq!(
            RatingParams::new(f64::NAN, 1.0, &[0.0]),
            Err(ParamsError::NotFinite)
        );
        assert_eq!(
            RatingParams::new(1.0, 1.0, &[0.0, 0.5, 0.5]),
            Err(ParamsError::CriteriaNotIncreasing { index: 3 })
        );
    }

    #[test]
    fn theta_round_trip() {
        let p = RatingParams::new(1.3, 0.8, &[-1.0, -0.2, 0.9, 2.0]).unwrap();
        for fix_sigma in [false, true] {
            let layout = Layout {
                categories: 5,
                fix_sigma,
            };
            let back = layout.params_at(&layout.theta_of(&p)).unwrap();
            assert!((back.mu() - 1.3).abs() < 1e-15);
            let expected_sigma = if fix_sigma { 1.0 } else { 0.8 };
            assert!((back.sigma() - expected_sigma).abs() < 1e-15);
            for (a, b) in back.criteria().iter().zip(p.criteria()) {
                assert!((a - b).abs() < 1e-14);
            }
        }
    }

    #[test]
    fn params_at_refuses_overflow() {
        let layout = Layout {
            categories: 3,
            fix_sigma: false,
        };
        let mut theta = [0.0; super::super::MAX_PARAMS];
        theta[3] = 800.0;
        assert!(layout.params_at(&theta).is_none());
        theta[3] = -800.0;
        assert!(layout.params_at(&theta).is_none());
    }

    #[test]
    fn neutral_start_is_valid() {
        for k in 2..=MAX_CATEGORIES {
            let p = RatingParams::neutral(k);
            assert_eq!(p.categories(), k);
            assert!(RatingParams::new(p.mu(), p.sigma(), p.criteria()).is_ok());
        }
    }

    #[test]
    fn probabilities_of_each_row_sum_to_one() {
        let p = RatingParams::new(1.3, 1.4, &[-1.0, -0.2, 0.9, 2.0]).unwrap();
        let (a, s) = p.cell_probabilities();
        assert!((a.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        assert!((s.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        assert_eq!(a[5], 0.0);
    }
}
