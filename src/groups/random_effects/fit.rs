//! The marginal maximum-likelihood fit: a damped Newton ascent on the sum of the animals'
//! adaptive-quadrature log-likelihoods, optionally under one linear restriction of the
//! fixed effects (the null model of a likelihood-ratio test).
//!
//! Parameters θ = (β, λ): the fixed effects, then the lower triangle of a factor L of the
//! random effects' covariance Σ = L·Lᵀ (row by row; any L gives a valid Σ, and an SD of 0
//! is an interior point, see `marginal::Parameters`). A restriction wᵀβ = v removes the entry of β with the largest |w| and
//! writes it from the others, so the free parameters keep their meaning.
//!
//! Convergence: the Newton decrement gᵀ(−H)⁻¹g (twice the log-likelihood still to gain, to
//! second order) below [`DECREMENT_TOLERANCE`]. A fit that has not converged after
//! [`MAX_STEPS`] steps, or whose −H is not positive definite at the end, is a failure and is
//! counted as such (never used for a test).

use super::marginal::{AnimalRows, Parameters, Scratch, Totals, add_animal, cholesky_len};
use super::quadrature::ProductGrid;
use nalgebra::{DMatrix, DVector};

/// Newton decrement at which a fit has converged: the log-likelihood is then within about
/// 1e-10 of its maximum, far below anything a test or an estimate to 1e-6 can feel.
pub const DECREMENT_TOLERANCE: f64 = 1e-10;
/// A step that gained less log-likelihood than this, with a decrement below
/// [`STALL_DECREMENT`], ends the fit as converged (see `fit`).
pub const STALL_GAIN: f64 = 1e-9;
pub const STALL_DECREMENT: f64 = 1e-6;
/// Most Newton steps of one fit.
pub const MAX_STEPS: usize = 100;

/// Nodes per dimension of the first, coarse phase of a fit.
pub const COARSE_NODES: usize = 3;
/// The first phase's rule in `q` dimensions (built once per analysis, not per fit).
pub fn coarse_grid(q: usize) -> ProductGrid {
    ProductGrid::new(&super::quadrature::HermiteRule::new(COARSE_NODES), q)
}

/// The coarse phase hands over to the full rule once its decrement is below this.
pub const COARSE_HANDOVER: f64 = 1e-3;

/// A fit's moving parts: free parameters, the animals' modes (warm starts), scratch space.
struct State {
    phi: DVector<f64>,
    modes: Vec<Vec<f64>>,
    scratch: Scratch,
    steps: usize,
}

/// A linear restriction of the fixed effects: Σ weight_i·β_i = value.
#[derive(Debug, Clone, PartialEq)]
pub struct Restriction {
    pub weights: Vec<(usize, f64)>,
    pub value: f64,
}

/// Why a fit gave no answer.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FitFailure {
    /// An animal's integrand could not be evaluated (its mode search failed or overflowed).
    Evaluation,
    /// Not converged within [`MAX_STEPS`].
    Steps,
    /// The information at the end is not positive definite.
    Information,
}

/// A converged fit.
#[derive(Debug, Clone, PartialEq)]
pub struct MixedFit {
    /// Full θ (restricted entries filled in).
    pub theta: Vec<f64>,
    pub loglik: f64,
    /// Covariance of β̂ (p×p, row-major) from the observed information.
    pub beta_covariance: Vec<f64>,
    pub steps: usize,
}

impl MixedFit {
    /// √(wᵀ Cov w) and wᵀβ̂ of a contrast of the fixed effects; `None` if not positive.
    pub fn contrast(&self, weights: &[(usize, f64)], p: usize) -> Option<(f64, f64)> {
        let mut est = 0.0;
        let mut var = 0.0;
        for &(i, wi) in weights {
            est += wi * self.theta[i];
            for &(k, wk) in weights {
                var += wi * wk * self.beta_covariance[i * p + k];
            }
        }
        (var > 0.0 && var.is_finite()).then(|| (est, var.sqrt()))
    }

    /// The covariance Σ = L·Lᵀ of the random effects (q×q, row-major).
    pub fn sigma(&self, p: usize, q: usize) -> Vec<f64> {
        let l = Parameters::from_theta(&self.theta, p, q).l;
        let mut s = vec![0.0; q * q];
        for a in 0..q {
            for b in 0..q {
                s[a * q + b] = (0..q).map(|k| l[a * q + k] * l[b * q + k]).sum();
            }
        }
        s
    }
}

/// The fixed structure of one fit: dimensions, quadrature grid and the animals' rows.
#[derive(Debug, Clone)]
pub struct MixedProblem<'a> {
    pub p: usize,
    pub q: usize,
    pub grid: &'a ProductGrid,
    /// The first phase's coarse rule ([`coarse_grid`]); `None` fits on `grid` alone.
    pub coarse: Option<&'a ProductGrid>,
    pub animals: &'a [AnimalRows],
}

/// θ entries for a start: β, then SDs (diagonal of L) with zero correlations.
pub fn start_theta(beta: &[f64], sds: &[f64]) -> Vec<f64> {
    let mut theta = beta.to_vec();
    for (a, sd) in sds.iter().enumerate() {
        for b in 0..=a {
            theta.push(if a == b { sd.max(0.05) } else { 0.0 });
        }
    }
    theta
}

/// The map from free parameters to θ: θ = A·φ + b.
struct Map {
    a: DMatrix<f64>,
    b: DVector<f64>,
}

impl Map {
    fn new(len: usize, restriction: Option<&Restriction>) -> Self {
        let Some(r) = restriction else {
            return Self {
                a: DMatrix::identity(len, len),
                b: DVector::zeros(len),
            };
        };
        let (pivot, wp) = r
            .weights
            .iter()
            .copied()
            .max_by(|x, y| x.1.abs().total_cmp(&y.1.abs()))
            .expect("a restriction names at least one fixed effect");
        let mut a = DMatrix::zeros(len, len - 1);
        let mut b = DVector::zeros(len);
        let mut col = 0;
        for i in 0..len {
            if i == pivot {
                continue;
            }
            a[(i, col)] = 1.0;
            if let Some(&(_, wi)) = r.weights.iter().find(|(k, _)| *k == i) {
                a[(pivot, col)] = -wi / wp;
            }
            col += 1;
        }
        b[pivot] = r.value / wp;
        Self { a, b }
    }

    fn theta(&self, phi: &DVector<f64>) -> DVector<f64> {
        &self.a * phi + &self.b
    }

    /// The free parameters of a θ that satisfies the restriction (drop the pivot entry).
    fn free(&self, theta: &[f64]) -> DVector<f64> {
        // Aᵀ A = I on the kept entries, so Aᵀ(θ − b) recovers them when θ satisfies it.
        let t = DVector::from_column_slice(theta) - &self.b;
        let ata = self.a.transpose() * &self.a;
        let rhs = self.a.transpose() * t;
        ata.cholesky().map_or(rhs.clone(), |c| c.solve(&rhs))
    }
}

impl MixedProblem<'_> {
    fn len(&self) -> usize {
        self.p + cholesky_len(self.q)
    }

    /// The total log-likelihood and its derivatives at θ on `grid`; `modes` hold warm
    /// starts.
    fn evaluate(
        &self,
        grid: &ProductGrid,
        theta: &[f64],
        modes: &mut [Vec<f64>],
        scratch: &mut Scratch,
    ) -> Option<Totals> {
        let params = Parameters::from_theta(theta, self.p, self.q);
        let mut totals = Totals::new(self.len());
        for (rows, mode) in self.animals.iter().zip(modes.iter_mut()) {
            add_animal(rows, &params, grid, mode, scratch, &mut totals)?;
        }
        Some(totals)
    }

    /// Fits from `start` (a full θ; its restricted entry is replaced).
    ///
    /// Two phases: Newton steps under a coarse rule ([`COARSE_NODES`] per dimension, a
    /// fraction of the work) until its decrement is below [`COARSE_HANDOVER`], then Newton
    /// steps under the problem's own rule to convergence. The coarse maximum lies close to
    /// the fine one, so the second phase takes a few steps; the answer is the second phase's
    /// maximum, whatever the first phase did. (Not the Laplace approximation: the
    /// fixed-node derivatives leave out its log-determinant's dependence on θ, so they are
    /// not its derivatives; three nodes are close enough for a start.)
    pub fn fit(
        &self,
        start: &[f64],
        restriction: Option<&Restriction>,
    ) -> Result<MixedFit, FitFailure> {
        let map = Map::new(self.len(), restriction);
        let rows = self.animals.iter().map(AnimalRows::rows).max().unwrap_or(0);
        let mut state = State {
            phi: map.free(start),
            modes: vec![vec![0.0; self.q]; self.animals.len()],
            scratch: Scratch::new(rows, self.p, self.q),
            steps: 0,
        };
        if let Some(coarse) = self.coarse.filter(|c| c.len() < self.grid.len()) {
            // A coarse phase that fails leaves the start as it was.
            let saved = (state.phi.clone(), state.modes.clone());
            if self
                .ascend(coarse, &map, &mut state, COARSE_HANDOVER)
                .is_err()
            {
                (state.phi, state.modes) = saved;
            }
        }
        let (theta, here, neg) = self.ascend(self.grid, &map, &mut state, DECREMENT_TOLERANCE)?;
        self.finish(theta, here, &neg, &map, state.steps)
    }

    /// Damped Newton ascent on `grid` from `state` until the decrement is below `tolerance`.
    fn ascend(
        &self,
        grid: &ProductGrid,
        map: &Map,
        state: &mut State,
        tolerance: f64,
    ) -> Result<(DVector<f64>, Totals, DMatrix<f64>), FitFailure> {
        let len = self.len();
        let mut theta = map.theta(&state.phi);
        let mut here = self
            .evaluate(grid, theta.as_slice(), &mut state.modes, &mut state.scratch)
            .ok_or(FitFailure::Evaluation)?;
        let mut last_gain = f64::INFINITY;
        for _ in 0..MAX_STEPS {
            let g = map.a.transpose() * DVector::from_column_slice(&here.gradient);
            let h = DMatrix::from_row_slice(len, len, &here.hessian);
            let neg = -(map.a.transpose() * h * &map.a);
            let direction = newton_direction(&neg, &g);
            let decrement = g.dot(&direction);
            // Along an SD at 0 the log-likelihood can be flat to fourth order, and Newton
            // then creeps; a step that gained less than STALL_GAIN with a small decrement
            // is the maximum to any precision an estimate or a test can use.
            let stalled = last_gain < STALL_GAIN && decrement.abs() < STALL_DECREMENT;
            if decrement.abs() < tolerance || stalled {
                return Ok((theta, here, neg));
            }
            state.steps += 1;
            // Cap the step: no parameter moves by more than 1 in one step, so a flat
            // direction cannot throw the fit far away.
            let biggest = direction.amax();
            let mut t = if biggest > 1.0 { 1.0 / biggest } else { 1.0 };
            let mut moved = None;
            for _ in 0..40 {
                let trial_phi = &state.phi + t * &direction;
                let trial_theta = map.theta(&trial_phi);
                let mut trial_modes = state.modes.clone();
                // The trial point's derivatives are computed at once: an accepted step (the
                // usual case) needs them next.
                if let Some(value) = self.evaluate(
                    grid,
                    trial_theta.as_slice(),
                    &mut trial_modes,
                    &mut state.scratch,
                ) && value.loglik >= here.loglik - 1e-12 * here.loglik.abs().max(1.0)
                {
                    moved = Some((trial_phi, trial_theta, trial_modes, value));
                    break;
                }
                t *= 0.5;
            }
            let Some((phi, trial_theta, modes, value)) = moved else {
                // No ascent along a Newton direction: at the maximum to rounding.
                return Ok((theta, here, neg));
            };
            last_gain = value.loglik - here.loglik;
            (state.phi, theta, state.modes, here) = (phi, trial_theta, modes, value);
        }
        Err(FitFailure::Steps)
    }

    fn finish(
        &self,
        theta: DVector<f64>,
        here: Totals,
        neg_free: &DMatrix<f64>,
        map: &Map,
        steps: usize,
    ) -> Result<MixedFit, FitFailure> {
        // Cov(θ̂) = A (−H_φ)⁻¹ Aᵀ; a random effect at its boundary (flat direction) is
        // dropped from the inverse so the fixed effects keep a usable covariance.
        let p = self.p;
        let kept: Vec<usize> = (0..neg_free.nrows())
            .filter(|&i| neg_free[(i, i)] > 1e-10 * neg_free.diagonal().amax().max(1.0))
            .collect();
        let sub = DMatrix::from_fn(kept.len(), kept.len(), |i, j| neg_free[(kept[i], kept[j])]);
        let inv_sub = sub.cholesky().ok_or(FitFailure::Information)?.inverse();
        let mut inv = DMatrix::zeros(neg_free.nrows(), neg_free.ncols());
        for (i, &a) in kept.iter().enumerate() {
            for (j, &b) in kept.iter().enumerate() {
                inv[(a, b)] = inv_sub[(i, j)];
            }
        }
        let cov = &map.a * inv * map.a.transpose();
        let mut beta_covariance = vec![0.0; p * p];
        for i in 0..p {
            for k in 0..p {
                beta_covariance[i * p + k] = cov[(i, k)];
            }
        }
        Ok(MixedFit {
            theta: theta.as_slice().to_vec(),
            loglik: here.loglik,
            beta_covariance,
            steps,
        })
    }
}

/// The Newton direction (−H)⁻¹g, or a damped one (−H + μI)⁻¹g when −H is not positive
/// definite (far from the maximum, or along a random effect whose SD has reached 0).
fn newton_direction(neg: &DMatrix<f64>, g: &DVector<f64>) -> DVector<f64> {
    if let Some(c) = neg.clone().cholesky() {
        return c.solve(g);
    }
    let n = neg.nrows();
    let scale = neg.diagonal().iter().fold(1e-8f64, |m, x| m.max(x.abs()));
    let mut mu = 1e-6 * scale;
    loop {
        let damped = neg + DMatrix::identity(n, n) * mu;
        if let Some(c) = damped.cholesky() {
            return c.solve(g);
        }
        mu *= 10.0;
        if mu > 1e12 * scale {
            return g * (1.0 / scale);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::quadrature::HermiteRule;
    use super::*;

    /// One yes/no animal: present row η = d/2 − c (+ a/2 − b), absent row −d/2 − c (− a/2 − b).
    fn animal(hits: f64, fas: f64, n: f64) -> AnimalRows {
        AnimalRows {
            trials: vec![n, n],
            yes: vec![hits, fas],
            x: vec![0.5, -1.0, -0.5, -1.0],
            z: vec![0.5, -1.0, -0.5, -1.0],
        }
    }

    fn loglik(rows: &[AnimalRows], theta: &[f64], nodes: usize) -> Totals {
        let grid = ProductGrid::new(&HermiteRule::new(nodes), 2);
        let problem = MixedProblem {
            p: 2,
            q: 2,
            grid: &grid,
            coarse: None,
            animals: rows,
        };
        let mut sc = Scratch::new(2, 2, 2);
        let mut modes = vec![vec![0.0; 2]; rows.len()];
        problem.evaluate(&grid, theta, &mut modes, &mut sc).unwrap()
    }

    const THETA: [f64; 5] = [1.2, -0.2, 0.3, 0.05, 0.35];

    // The quadrature against an independent brute-force integral: the midpoint rule on a
    // 1601 × 1601 grid over [−8, 8]² of the animal's likelihood times the N(0, Σ) density,
    // written out here without the crate's quadrature. The integrand is smooth and decays
    // like e^{−|u|²/2} beyond ±8 SDs (mass < 1e-14), so the midpoint rule's error is far
    // below the 1e-9 allowed.
    #[test]
    fn adaptive_quadrature_matches_a_brute_force_integral() {
        let rows = [animal(14.0, 5.0, 20.0)];
        let params = Parameters::from_theta(&THETA, 2, 2);
        let l = &params.l;
        let (k, h0) = (1601usize, 16.0 / 1601.0);
        let mut sum = 0.0;
        for i in 0..k {
            for j in 0..k {
                let u = [-8.0 + (i as f64 + 0.5) * h0, -8.0 + (j as f64 + 0.5) * h0];
                let a = l[0] * u[0];
                let b = l[2] * u[0] + l[3] * u[1];
                let eta_s = 0.6 + 0.2 + a / 2.0 - b;
                let eta_n = -0.6 + 0.2 - a / 2.0 - b;
                let phi = crate::model::normal::cdf;
                let like = phi(eta_s).powf(14.0)
                    * (1.0 - phi(eta_s)).powf(6.0)
                    * phi(eta_n).powf(5.0)
                    * (1.0 - phi(eta_n)).powf(15.0);
                sum += like * (-(u[0] * u[0] + u[1] * u[1]) / 2.0).exp();
            }
        }
        let brute = (sum * h0 * h0 / (2.0 * std::f64::consts::PI)).ln();
        let agq = loglik(&rows, &THETA, 20).loglik;
        assert!((agq - brute).abs() < 1e-9, "{agq} vs {brute}");
        // Few nodes are already close; Laplace less so.
        assert!((loglik(&rows, &THETA, 5).loglik - brute).abs() < 1e-5);
        assert!((loglik(&rows, &THETA, 1).loglik - brute).abs() < 1e-2);
    }

    // The analytic gradient and Hessian against central differences of the log-likelihood
    // (step 1e-5: truncation error ~1e-10, rounding ~1e-11/1e-5; allow 1e-6).
    #[test]
    fn derivatives_match_finite_differences() {
        let rows = [
            animal(14.0, 5.0, 20.0),
            animal(9.0, 9.0, 20.0),
            animal(18.0, 2.0, 20.0),
        ];
        let here = loglik(&rows, &THETA, 12);
        let h = 1e-5;
        for k in 0..5 {
            let mut up = THETA;
            let mut down = THETA;
            up[k] += h;
            down[k] -= h;
            let (tu, td) = (loglik(&rows, &up, 12), loglik(&rows, &down, 12));
            let g = (tu.loglik - td.loglik) / (2.0 * h);
            assert!(
                (g - here.gradient[k]).abs() < 1e-6,
                "∂{k}: {g} vs {}",
                here.gradient[k]
            );
            for l in 0..5 {
                let fd = (tu.gradient[l] - td.gradient[l]) / (2.0 * h);
                let got = here.hessian[k * 5 + l];
                assert!((fd - got).abs() < 1e-5, "∂{k}∂{l}: {fd} vs {got}");
            }
        }
    }
}
