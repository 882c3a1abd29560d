//! The log-likelihood of a rating table with its analytic gradient and Hessian.
//!
//! lnL = Σ_j a_j ln[Φ(k_{j+1}) − Φ(k_j)] + p_j ln[Φ(u_{j+1}) − Φ(u_j)], u_i = (k_i − μ)/σ
//! (Dorfman & Alf 1969, *J. Math. Psychol.* 6:487–496), a = absent counts, p = present counts.
//!
//! Derivatives are taken in the natural parameters η = (μ, σ, k_1, …, k_{K−1}); the solver's
//! coordinates θ get them through [`super::params`]'s chain rule. For one cell with
//! probability P and count n, ∂(n ln P) = n·∂P/P and ∂²(n ln P) = n·∂²P/P − n·∂P∂Pᵀ/P².
//! With P = Φ(u_hi) − Φ(u_lo) and ∂u_i/∂(μ, σ, k_i) = (−1, −u_i, 1)/σ:
//!
//! - ∂P = φ_hi·∇u_hi − φ_lo·∇u_lo;
//! - ∂²P = T(hi) − T(lo), with T(i) = −u_iφ_i·∇u_i∇u_iᵀ + φ_i·∇²u_i, whose entries times σ²
//!   are μμ: −uφ, μσ: φ(1 − u²), μk: uφ, σσ: uφ(2 − u²), σk: −φ(1 − u²), kk: −uφ.
//!
//! The absent row is the same with μ = 0, σ = 1 and only the k entries.

use super::cells::RowCells;
use super::params::RatingParams;
use super::table::RatingTable;
use super::{MAX_PARAMS, Matrix, Vector};

/// lnL with its gradient and Hessian in η = (μ, σ, k_1, …, k_{K−1}); only the leading
/// (K + 1) × (K + 1) block is used.
#[derive(Debug, Clone, Copy)]
pub struct Evaluation {
    /// The log-likelihood (without the multinomial constant).
    pub ln_likelihood: f64,
    /// ∂lnL/∂η.
    pub gradient: Vector,
    /// ∂²lnL/∂η∂ηᵀ (symmetric).
    pub hessian: Matrix,
}

impl Evaluation {
    /// All zeros: a buffer for [`evaluate_into`].
    pub fn zero() -> Self {
        Evaluation {
            ln_likelihood: 0.0,
            gradient: [0.0; MAX_PARAMS],
            hessian: [[0.0; MAX_PARAMS]; MAX_PARAMS],
        }
    }
}

/// lnL alone; −∞ when a cell with counts has probability 0 at these parameters.
pub fn ln_likelihood(table: &RatingTable, params: &RatingParams) -> f64 {
    let criteria = params.criteria();
    let rows = [
        (table.absent(), RowCells::new(criteria, 0.0, 1.0, false)),
        (
            table.present(),
            RowCells::new(criteria, params.mu(), params.sigma(), false),
        ),
    ];
    let mut total = 0.0;
    for (counts, cells) in &rows {
        for (j, &n) in counts.iter().enumerate() {
            if n > 0.0 {
                let p = cells.probability(j);
                if p <= 0.0 {
                    return f64::NEG_INFINITY;
                }
                total += n * p.ln();
            }
        }
    }
    total
}

/// lnL, gradient and Hessian in η; `None` when lnL is not finite (a cell with counts has
/// probability 0, or the parameters overflow).
///
/// Cells with zero count contribute nothing to any of the three, so they are skipped.
pub fn evaluate(table: &RatingTable, params: &RatingParams) -> Option<Evaluation> {
    let mut out = Evaluation::zero();
    evaluate_into(table, params, &mut out).then_some(out)
}

/// As [`evaluate`], into a caller's buffer (the solver reuses two, so the 1.4 kB result is
/// never copied); returns `false` when lnL is not finite, leaving `out` partly written.
pub fn evaluate_into(table: &RatingTable, params: &RatingParams, out: &mut Evaluation) -> bool {
    let k = table.categories();
    debug_assert_eq!(k, params.categories());
    let criteria = params.criteria();
    let sigma = params.sigma();
    let mut ln_l = 0.0;
    let g = &mut out.gradient;
    let h = &mut out.hessian;
    g[..=k].fill(0.0);
    for row in h.iter_mut().take(k + 1) {
        row[..=k].fill(0.0);
    }

    // Absent row: only the criteria enter. Natural index of criterion i is i + 1.
    let cells = RowCells::new(criteria, 0.0, 1.0, true);
    for (j, &n) in table.absent().iter().enumerate() {
        if n <= 0.0 {
            continue;
        }
        let p = cells.probability(j);
        if p <= 0.0 {
            return false;
        }
        ln_l += n * p.ln();
        let r = n / p;
        let w = r / p;
        let (lo, hi) = (j, j + 1);
        let g_lo = -cells.density[lo];
        let g_hi = cells.density[hi];
        if lo > 0 {
            let i = lo + 1;
            g[i] += r * g_lo;
            h[i][i] += r * cells.u_density[lo] - w * g_lo * g_lo;
        }
        if hi < k {
            let i = hi + 1;
            g[i] += r * g_hi;
            h[i][i] += -r * cells.u_density[hi] - w * g_hi * g_hi;
        }
        if lo > 0 && hi < k {
            h[lo + 1][hi + 1] -= w * g_lo * g_hi;
        }
    }

    // Present row: μ, σ and the two criteria around each cell enter.
    let cells = RowCells::new(criteria, params.mu(), sigma, true);
    let inv_s = 1.0 / sigma;
    let inv_s2 = inv_s * inv_s;
    for (j, &n) in table.present().iter().enumerate() {
        if n <= 0.0 {
            continue;
        }
        let p = cells.probability(j);
        if p <= 0.0 {
            return false;
        }
        ln_l += n * p.ln();
        let r = n / p;
        let w = r / p;
        let (lo, hi) = (j, j + 1);
        let (d_lo, d_hi) = (cells.density[lo], cells.density[hi]);
        let (q_lo, q_hi) = (cells.u_density[lo], cells.u_density[hi]);
        // φ(1 − u²) and uφ(2 − u²), written through uφ so the infinite ends give 0.
        let (u_lo, u_hi) = (finite_or_zero(cells.u[lo]), finite_or_zero(cells.u[hi]));
        let m_lo = d_lo - q_lo * u_lo;
        let m_hi = d_hi - q_hi * u_hi;
        let s_lo = q_lo * (2.0 - u_lo * u_lo);
        let s_hi = q_hi * (2.0 - u_hi * u_hi);

        // ∂P/∂(μ, σ, k_lo, k_hi)
        let gp_mu = -(d_hi - d_lo) * inv_s;
        let gp_sigma = -(q_hi - q_lo) * inv_s;
        let gp_lo = -d_lo * inv_s;
        let gp_hi = d_hi * inv_s;
        // ∂²P, entries named by the pair of parameters
        let hp_mu_mu = (q_lo - q_hi) * inv_s2;
        let hp_mu_sigma = (m_hi - m_lo) * inv_s2;
        let hp_sigma_sigma = (s_hi - s_lo) * inv_s2;

        g[0] += r * gp_mu;
        g[1] += r * gp_sigma;
        h[0][0] += r * hp_mu_mu - w * gp_mu * gp_mu;
        h[0][1] += r * hp_mu_sigma - w * gp_mu * gp_sigma;
        h[1][1] += r * hp_sigma_sigma - w * gp_sigma * gp_sigma;
        if lo > 0 {
            let i = lo + 1;
            g[i] += r * gp_lo;
            h[0][i] += r * (-q_lo * inv_s2) - w * gp_mu * gp_lo;
            h[1][i] += r * (m_lo * inv_s2) - w * gp_sigma * gp_lo;
            h[i][i] += r * (q_lo * inv_s2) - w * gp_lo * gp_lo;
        }
        if hi < k {
            let i = hi + 1;
            g[i] += r * gp_hi;
            h[0][i] += r * (q_hi * inv_s2) - w * gp_mu * gp_hi;
            h[1][i] += r * (-m_hi * inv_s2) - w * gp_sigma * gp_hi;
            h[i][i] += r * (-q_hi * inv_s2) - w * gp_hi * gp_hi;
        }
        if lo > 0 && hi < k {
            h[lo + 1][hi + 1] -= w * gp_lo * gp_hi;
        }
    }

    if !ln_l.is_finite() {
        return false;
    }
    // Only the upper triangle was filled; mirror it.
    for a in 1..=k {
        let (upper, lower) = h.split_at_mut(a);
        for (b, row) in upper.iter().enumerate() {
            lower[0][b] = row[a];
        }
    }
    out.ln_likelihood = ln_l;
    true
}

/// u at a finite boundary, 0 at the infinite ends (where every density term is 0 anyway).
#[inline]
fn finite_or_zero(u: f64) -> f64 {
    if u.is_finite() { u } else { 0.0 }
}

#[cfg(test)]
mod tests {
    use super::super::params::Layout;
    use super::*;
    use crate::model::normal;
    use proptest::prelude::*;

    /// Step of the central differences: truncation error ~h²·f‴/6 ≈ 1e-10·f‴, rounding error
    /// ~ε·|f|/h ≈ 2e-11·|f|.
    const H: f64 = 1e-5;

    fn ln_l_theta(table: &RatingTable, layout: Layout, theta: &Vector) -> f64 {
        layout
            .params_at(theta)
            .map_or(f64::NAN, |p| ln_likelihood(table, &p))
    }

    fn derivs_theta(table: &RatingTable, layout: Layout, theta: &Vector) -> (f64, Vector, Matrix) {
        let p = layout.params_at(theta).unwrap();
        let ev = evaluate(table, &p).unwrap();
        let mut g = [0.0; MAX_PARAMS];
        let mut h = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        layout.chain_rule(&p, &ev.gradient, &ev.hessian, &mut g, &mut h);
        (ev.ln_likelihood, g, h)
    }

    /// Random model (μ ∈ [0, 3], σ ∈ [0.5, 2], sorted criteria with gaps ≥ 0.1) and random
    /// count table (K ∈ 2..=8, counts 0..=60, some halves).
    fn case() -> impl Strategy<Value = (RatingTable, RatingParams, bool)> {
        (
            2usize..=8,
            0.0..3.0f64,
            0.5..2.0f64,
            -2.0..1.0f64,
            prop::collection::vec(0.1..1.2f64, 7),
            prop::collection::vec(0u32..=120, 8),
            prop::collection::vec(0u32..=120, 8),
            any::<bool>(),
        )
            .prop_map(|(k, mu, sigma, k1, gaps, a, s, fix)| {
                let mut criteria = vec![k1];
                for g in &gaps[..k - 2] {
                    criteria.push(criteria.last().unwrap() + g);
                }
                let a: Vec<f64> = a[..k].iter().map(|&x| f64::from(x) / 2.0).collect();
                let mut s: Vec<f64> = s[..k].iter().map(|&x| f64::from(x) / 2.0).collect();
                if s.iter().sum::<f64>() == 0.0 {
                    s[0] = 1.0;
                }
                let mut a = a;
                if a.iter().sum::<f64>() == 0.0 {
                    a[k - 1] = 1.0;
                }
                let sigma = if fix { 1.0 } else { sigma };
                (
                    RatingTable::new(&a, &s).unwrap(),
                    RatingParams::new(mu, sigma, &criteria).unwrap(),
                    fix,
                )
            })
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(400))]

        #[test]
        fn gradient_matches_central_differences((table, params, fix) in case()) {
            let layout = Layout { categories: table.categories(), fix_sigma: fix };
            let theta = layout.theta_of(&params);
            let (f, g, _) = derivs_theta(&table, layout, &theta);
            for i in 0..layout.dim() {
                let (mut up, mut down) = (theta, theta);
                up[i] += H;
                down[i] -= H;
                let fd = (ln_l_theta(&table, layout, &up) - ln_l_theta(&table, layout, &down))
                    / (2.0 * H);
                // Relative 1e-6 for truncation, plus 100 ε|f|/h for rounding in lnL.
                let tol = 1e-6 * (1.0 + g[i].abs()) + 100.0 * f64::EPSILON * (1.0 + f.abs()) / H;
                prop_assert!((g[i] - fd).abs() <= tol, "θ{i}: analytic {} vs fd {fd}", g[i]);
            }
        }

        #[test]
        fn hessian_matches_central_differences_of_the_gradient((table, params, fix) in case()) {
            let layout = Layout { categories: table.categories(), fix_sigma: fix };
            let theta = layout.theta_of(&params);
            let (_, g, h) = derivs_theta(&table, layout, &theta);
            let n = layout.dim();
            let g_scale = g[..n].iter().fold(1.0_f64, |m, x| m.max(x.abs()));
            let h_scale = (0..n).fold(1.0_f64, |m, i| m.max(h[i][i].abs()));
            for j in 0..n {
                let (mut up, mut down) = (theta, theta);
                up[j] += H;
                down[j] -= H;
                let (_, gu, _) = derivs_theta(&table, layout, &up);
                let (_, gd, _) = derivs_theta(&table, layout, &down);
                for i in 0..n {
                    let fd = (gu[i] - gd[i]) / (2.0 * H);
                    // Relative 1e-6 of the Hessian's scale for truncation, plus rounding in g.
                    let tol = 1e-6 * (h[i][j].abs() + 1e-2 * h_scale)
                        + 100.0 * f64::EPSILON * g_scale / H;
                    prop_assert!(
                        (h[i][j] - fd).abs() <= tol,
                        "θ({i},{j}): analytic {} vs fd {fd}", h[i][j]
                    );
                }
            }
        }

        #[test]
        fn evaluate_and_ln_likelihood_agree((table, params, _fix) in case()) {
            let ev = evaluate(&table, &params).unwrap();
            let f = ln_likelihood(&table, &params);
            prop_assert!((ev.ln_likelihood - f).abs() <= 1e-12 * (1.0 + f.abs()));
        }
    }

    // The likelihood written out by hand for one small table (formula of Dorfman & Alf 1969).
    #[test]
    fn matches_the_formula_by_hand() {
        let cdf = normal::cdf;
        let table = RatingTable::new(&[6.0, 3.0, 1.0], &[2.0, 3.0, 5.0]).unwrap();
        let p = RatingParams::new(1.1, 1.3, &[-0.2, 0.9]).unwrap();
        let z = |k: f64| (k - 1.1) / 1.3;
        let by_hand = 6.0 * cdf(-0.2).ln()
            + 3.0 * (cdf(0.9) - cdf(-0.2)).ln()
            + 1.0 * (1.0 - cdf(0.9)).ln()
            + 2.0 * cdf(z(-0.2)).ln()
            + 3.0 * (cdf(z(0.9)) - cdf(z(-0.2))).ln()
            + 5.0 * (1.0 - cdf(z(0.9))).ln();
        assert!((ln_likelihood(&table, &p) - by_hand).abs() < 1e-12);
    }

    #[test]
    fn impossible_cells_give_minus_infinity() {
        // A count 40 SD into the tail: its probability underflows to 0.
        let table = RatingTable::new(&[1.0, 1.0], &[1.0, 1.0]).unwrap();
        let p = RatingParams::new(0.0, 1.0, &[40.0]).unwrap();
        assert_eq!(ln_likelihood(&table, &p), f64::NEG_INFINITY);
        assert!(evaluate(&table, &p).is_none());
    }
}
