//! One animal's marginal log-likelihood under the probit random-effects model, by adaptive
//! Gauss–Hermite quadrature, with its gradient and Hessian in the model's parameters.
//!
//! The animal's data are binomial rows: row r has n_r trials, k_r "yes" answers and
//! P(yes) = Φ(η_r) with η_r = x_rᵀβ + z_rᵀ·L·u, where β are the fixed effects, Σ = L·Lᵀ the
//! covariance of the animal's random effects and u ~ N(0, I) its standardised effects. With
//! g(u) = Σ_r [k_r ln Φ(η_r) + (n_r − k_r) ln Φ(−η_r)] − |u|²/2 (binomial coefficients left
//! out: they do not depend on the parameters), the marginal likelihood is
//! (2π)^{−q/2} ∫ e^{g(u)} du.
//!
//! **Adaptive quadrature** (Liu & Pierce 1994, *Biometrika* 81:624–629; Pinheiro & Bates
//! 1995, *J. Comput. Graph. Stat.* 4:12–35; cited from memory): centre the product rule at
//! the mode û of g and scale it by the curvature there, −∇²g(û) = C·Cᵀ:
//! u_m = û + √2·C^{−T}·x_m, so
//! ∫ e^{g} ≈ 2^{q/2}/det C · Σ_m w_m·e^{|x_m|²}·e^{g(u_m)}. With one node this is the
//! Laplace approximation.
//!
//! **Derivatives** hold the nodes fixed in u: ∂ℓ/∂θ = E_π[∂g/∂θ] and
//! ∂²ℓ/∂θ² = E_π[∂²g/∂θ²] + Var_π[∂g/∂θ] under the quadrature's posterior weights π_m
//! (Louis 1982, *J. R. Statist. Soc. B* 44:226–233, the missing-information identity; cited
//! from memory). These are the exact derivatives of the marginal likelihood wherever the rule
//! integrates exactly, and differ from the derivatives of the adapted rule only by the rule's
//! own error, which the node-count check in the tests bounds.

// Index loops mirror the matrix formulas (rows, nodes, lower-triangle entries) one to one.
#![allow(clippy::needless_range_loop)]

use super::quadrature::ProductGrid;
use crate::model::normal;

/// ln Φ(η), its derivative φ/Φ and that derivative's derivative, for one binomial row:
/// (k ln Φ(η) + (n−k) ln Φ(−η), first derivative, second derivative in η).
#[inline]
pub fn probit_row(n: f64, k: f64, eta: f64) -> (f64, f64, f64) {
    let (lp, mp) = log_cdf_and_mills(eta);
    let (lq, mq) = log_cdf_and_mills(-eta);
    // d/dη ln Φ(η) = m₊ with m₊ = φ(η)/Φ(η); d²/dη² = −m₊(η + m₊).
    // d/dη ln Φ(−η) = −m₋ with m₋ = φ(η)/Φ(−η); d²/dη² = −m₋(m₋ − η).
    let miss = n - k;
    let l = k * lp + miss * lq;
    let s = k * mp - miss * mq;
    let h = -k * mp * (eta + mp) - miss * mq * (mq - eta);
    (l, s, h)
}

/// (ln Φ(x), φ(x)/Φ(x)), accurate far into the lower tail, where Φ underflows (the Mills
/// ratio's asymptotic series, Abramowitz & Stegun 26.2.12, cited from memory).
#[inline]
fn log_cdf_and_mills(x: f64) -> (f64, f64) {
    if x > -30.0 {
        let p = normal::cdf(x);
        (p.ln(), normal::pdf(x) / p)
    } else {
        let x2 = x * x;
        // Φ(x) ≈ φ(x)/|x|·(1 − 1/x² + 3/x⁴); the ratio φ/Φ follows.
        let series = 1.0 - 1.0 / x2 + 3.0 / (x2 * x2);
        let ln_pdf = -0.5 * x2 - 0.5 * (2.0 * std::f64::consts::PI).ln();
        (ln_pdf - (-x).ln() + series.ln(), -x / series)
    }
}

/// One animal's rows, flattened: row r's fixed coefficients are `x[r·p..(r+1)·p]`, its
/// random coefficients `z[r·q..(r+1)·q]`.
#[derive(Debug, Clone, PartialEq)]
pub struct AnimalRows {
    pub trials: Vec<f64>,
    pub yes: Vec<f64>,
    pub x: Vec<f64>,
    pub z: Vec<f64>,
}

impl AnimalRows {
    pub fn rows(&self) -> usize {
        self.trials.len()
    }
}

/// The parameters in the form an evaluation needs: β and L. θ = (β, λ) with λ the lower
/// triangle of L row by row. The diagonal is not constrained to be positive: Σ = L·Lᵀ is a
/// covariance for any L, and the likelihood is even in each column's sign, so an SD of 0 is
/// an ordinary interior point where the gradient vanishes (a log scale would put it at −∞,
/// where Newton steps crawl and never converge).
#[derive(Debug, Clone)]
pub struct Parameters {
    pub p: usize,
    pub q: usize,
    pub beta: Vec<f64>,
    /// L as a dense q×q row-major matrix (zero above the diagonal).
    pub l: Vec<f64>,
}

/// Number of Cholesky entries for q random effects.
pub fn cholesky_len(q: usize) -> usize {
    q * (q + 1) / 2
}

impl Parameters {
    pub fn from_theta(theta: &[f64], p: usize, q: usize) -> Self {
        let mut l = vec![0.0; q * q];
        let mut i = p;
        for a in 0..q {
            for b in 0..=a {
                l[a * q + b] = theta[i];
                i += 1;
            }
        }
        Self {
            p,
            q,
            beta: theta[..p].to_vec(),
            l,
        }
    }

    pub fn len(&self) -> usize {
        self.p + cholesky_len(self.q)
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
}

/// What an evaluation adds up: the log-likelihood and, when asked, its gradient and
/// Hessian (dense, row-major).
#[derive(Debug, Clone)]
pub struct Totals {
    pub loglik: f64,
    pub gradient: Vec<f64>,
    pub hessian: Vec<f64>,
}

impl Totals {
    pub fn new(len: usize) -> Self {
        Self {
            loglik: 0.0,
            gradient: vec![0.0; len],
            hessian: vec![0.0; len * len],
        }
    }
}

/// Scratch space for one animal's evaluation (reused across animals and iterations).
#[derive(Debug, Clone)]
pub struct Scratch {
    offset: Vec<f64>,
    w: Vec<f64>,
    u: Vec<f64>,
    start: Vec<f64>,
    grad_u: Vec<f64>,
    neg_hess_u: Vec<f64>,
    chol: Vec<f64>,
    step: Vec<f64>,
    scale: Vec<f64>,
    d_eta: Vec<f64>,
    d_g: Vec<f64>,
    s1: Vec<f64>,
    s2: Vec<f64>,
    row_sh: Vec<(f64, f64)>,
}

impl Scratch {
    pub fn new(rows: usize, p: usize, q: usize) -> Self {
        let len = p + cholesky_len(q);
        Self {
            offset: vec![0.0; rows],
            w: vec![0.0; rows * q],
            u: vec![0.0; q],
            start: vec![0.0; q],
            grad_u: vec![0.0; q],
            neg_hess_u: vec![0.0; q * q],
            chol: vec![0.0; q * q],
            step: vec![0.0; q],
            scale: vec![0.0; q * q],
            d_eta: vec![0.0; len],
            d_g: vec![0.0; len],
            s1: vec![0.0; len],
            s2: vec![0.0; len * len],
            row_sh: vec![(0.0, 0.0); rows],
        }
    }
}

/// Lower Cholesky factor of the q×q matrix `a` into `c`; false unless positive definite.
fn cholesky(a: &[f64], q: usize, c: &mut [f64]) -> bool {
    c.iter_mut().for_each(|x| *x = 0.0);
    for i in 0..q {
        for j in 0..=i {
            let mut sum = a[i * q + j];
            for k in 0..j {
                sum -= c[i * q + k] * c[j * q + k];
            }
            if i == j {
                if sum.is_nan() || sum <= 0.0 {
                    return false;
                }
                c[i * q + i] = sum.sqrt();
            } else {
                c[i * q + j] = sum / c[j * q + j];
            }
        }
    }
    true
}

/// Solves C·Cᵀ·x = b in place (C lower triangular).
fn cholesky_solve(c: &[f64], q: usize, b: &mut [f64]) {
    for i in 0..q {
        let mut s = b[i];
        for k in 0..i {
            s -= c[i * q + k] * b[k];
        }
        b[i] = s / c[i * q + i];
    }
    for i in (0..q).rev() {
        let mut s = b[i];
        for k in i + 1..q {
            s -= c[k * q + i] * b[k];
        }
        b[i] = s / c[i * q + i];
    }
}

/// g(u) with its gradient (`sc.grad_u`) and −Hessian (`sc.neg_hess_u`) in u.
fn g_at(rows: &AnimalRows, sc: &mut Scratch, q: usize) -> f64 {
    let mut g = 0.0;
    for a in 0..q {
        sc.grad_u[a] = -sc.u[a];
        for b in 0..q {
            sc.neg_hess_u[a * q + b] = if a == b { 1.0 } else { 0.0 };
        }
    }
    for r in 0..rows.rows() {
        let w = &sc.w[r * q..(r + 1) * q];
        let eta = sc.offset[r] + w.iter().zip(&sc.u).map(|(a, b)| a * b).sum::<f64>();
        let (l, s, h) = probit_row(rows.trials[r], rows.yes[r], eta);
        g += l;
        for a in 0..q {
            sc.grad_u[a] += s * w[a];
            for b in 0..q {
                sc.neg_hess_u[a * q + b] -= h * w[a] * w[b];
            }
        }
    }
    g - 0.5 * sc.u.iter().map(|x| x * x).sum::<f64>()
}

/// Most Newton steps in the search for an animal's mode; g is strictly concave (the probit
/// log-likelihood is log-concave in η, and the prior term is strictly concave), so a few
/// suffice from any start.
const MODE_STEPS: usize = 60;

/// Finds the mode of g from the start in `mode` (updated in place); returns g(û), with
/// `sc.chol` the Cholesky factor of −∇²g(û). `None` if the search fails.
fn find_mode(rows: &AnimalRows, sc: &mut Scratch, q: usize, mode: &mut [f64]) -> Option<f64> {
    sc.u.copy_from_slice(mode);
    let mut g = g_at(rows, sc, q);
    for _ in 0..MODE_STEPS {
        if !cholesky(&sc.neg_hess_u, q, &mut sc.chol) {
            return None;
        }
        sc.step.copy_from_slice(&sc.grad_u);
        cholesky_solve(&sc.chol, q, &mut sc.step);
        let size = sc.step.iter().fold(0.0f64, |m, x| m.max(x.abs()));
        sc.start.copy_from_slice(&sc.u);
        let mut t = 1.0;
        let mut accepted = false;
        for _ in 0..30 {
            for a in 0..q {
                sc.u[a] = sc.start[a] + t * sc.step[a];
            }
            let trial = g_at(rows, sc, q);
            if trial.is_finite() && trial >= g - 1e-12 * g.abs().max(1.0) {
                g = trial;
                accepted = true;
                break;
            }
            t *= 0.5;
        }
        if !accepted {
            return None;
        }
        if size * t < 1e-10 {
            break;
        }
    }
    if !cholesky(&sc.neg_hess_u, q, &mut sc.chol) || !g.is_finite() {
        return None;
    }
    mode.copy_from_slice(&sc.u);
    Some(g)
}

/// Adds one animal's marginal log-likelihood and its gradient and Hessian in θ into
/// `totals`. `mode` is the animal's previous mode, a warm start, and
/// is updated. `None` when the animal's integrand cannot be evaluated.
pub fn add_animal(
    rows: &AnimalRows,
    params: &Parameters,
    grid: &ProductGrid,
    mode: &mut [f64],
    sc: &mut Scratch,
    totals: &mut Totals,
) -> Option<()> {
    let (p, q) = (params.p, params.q);
    let len = params.len();
    for r in 0..rows.rows() {
        let x = &rows.x[r * p..(r + 1) * p];
        sc.offset[r] = x.iter().zip(&params.beta).map(|(a, b)| a * b).sum();
        let z = &rows.z[r * q..(r + 1) * q];
        // w = Lᵀ z, so that z·(L u) = w·u.
        for b in 0..q {
            sc.w[r * q + b] = (b..q).map(|a| z[a] * params.l[a * q + b]).sum();
        }
    }
    let g_hat = find_mode(rows, sc, q, mode)?;
    // scale = √2·C^{−T}: column j solves Cᵀ y = √2 e_j.
    let mut log_det = 0.0;
    for a in 0..q {
        log_det += sc.chol[a * q + a].ln();
    }
    for j in 0..q {
        let y = &mut sc.step;
        y.iter_mut().for_each(|v| *v = 0.0);
        y[j] = std::f64::consts::SQRT_2;
        for i in (0..q).rev() {
            let mut s = y[i];
            for k in i + 1..q {
                s -= sc.chol[k * q + i] * y[k];
            }
            y[i] = s / sc.chol[i * q + i];
        }
        for i in 0..q {
            sc.scale[i * q + j] = y[i];
        }
    }
    let mut s0 = 0.0;
    sc.s1.iter_mut().for_each(|x| *x = 0.0);
    sc.s2.iter_mut().for_each(|x| *x = 0.0);
    for m in 0..grid.len() {
        let x = grid.point(m);
        for i in 0..q {
            sc.u[i] = mode[i] + (0..q).map(|j| sc.scale[i * q + j] * x[j]).sum::<f64>();
        }
        // g, ∂g/∂θ and Σ_r h_r ∂η_r ∂η_rᵀ + s_r ∂²η_r at this node.
        let mut g = -0.5 * sc.u.iter().map(|v| v * v).sum::<f64>();
        sc.d_g.iter_mut().for_each(|v| *v = 0.0);
        // First pass over rows for g (the node's weight is needed before accumulating).
        for r in 0..rows.rows() {
            let w = &sc.w[r * q..(r + 1) * q];
            let eta = sc.offset[r] + w.iter().zip(&sc.u).map(|(a, b)| a * b).sum::<f64>();
            let (l, s, h) = probit_row(rows.trials[r], rows.yes[r], eta);
            g += l;
            sc.row_sh[r] = (s, h);
        }
        let omega = (grid.log_weights[m] + g - g_hat).exp();
        s0 += omega;
        if omega == 0.0 {
            continue;
        }
        for r in 0..rows.rows() {
            let (s, h) = sc.row_sh[r];
            // ∂η_r/∂θ: x_r for β, z_ra·u_b for L_ab; η is linear in both, so ∂²η = 0.
            sc.d_eta[..p].copy_from_slice(&rows.x[r * p..(r + 1) * p]);
            let z = &rows.z[r * q..(r + 1) * q];
            let mut i = p;
            for a in 0..q {
                for b in 0..=a {
                    sc.d_eta[i] = z[a] * sc.u[b];
                    i += 1;
                }
            }
            for k in 0..len {
                sc.d_g[k] += s * sc.d_eta[k];
            }
            let hw = omega * h;
            for k in 0..len {
                let dk = hw * sc.d_eta[k];
                if dk != 0.0 {
                    for l in 0..=k {
                        sc.s2[k * len + l] += dk * sc.d_eta[l];
                    }
                }
            }
        }
        for k in 0..len {
            let dk = omega * sc.d_g[k];
            sc.s1[k] += dk;
            for l in 0..=k {
                sc.s2[k * len + l] += dk * sc.d_g[l];
            }
        }
    }
    if !(s0 > 0.0 && s0.is_finite()) {
        return None;
    }
    let ln_pi = std::f64::consts::PI.ln();
    let loglik = g_hat + s0.ln() - log_det - 0.5 * q as f64 * ln_pi;
    if !loglik.is_finite() {
        return None;
    }
    totals.loglik += loglik;
    for k in 0..len {
        let ek = sc.s1[k] / s0;
        totals.gradient[k] += ek;
        for l in 0..=k {
            let v = sc.s2[k * len + l] / s0 - ek * sc.s1[l] / s0;
            totals.hessian[k * len + l] += v;
            if l != k {
                totals.hessian[l * len + k] += v;
            }
        }
    }
    Some(())
}
