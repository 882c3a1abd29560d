//! Maximum-likelihood fit for every design: Newton's method on the analytic gradient and
//! Hessian, with a backtracking (Armijo) line search and a Levenberg-style damping fallback
//! when the Hessian is not negative definite or the line search fails (Nocedal & Wright,
//! *Numerical Optimization*, 2nd ed., ch. 3 \[memory\]).
//!
//! The fit never panics and never prints: it returns where it stopped, why, and after how many
//! accepted steps. A stationary point that the data cannot pin down (a structural ridge of equal
//! likelihood, an estimate running off to infinity, or a ridge made by the particular counts)
//! stops as `NotIdentified`; see `StationaryCheck`.

use nalgebra::{DMatrix, DVector};

use crate::cells::cell_probabilities::Workspace;
use crate::cells::degeneracy::model_degeneracy;
use crate::cells::error::InputError;
use crate::cells::identifiability::{RANK_TOLERANCE, scaled_eigen};
use crate::cells::information::expected_information;
use crate::cells::likelihood::{Counts, LogLikelihood, derivatives_with, value_with};
use crate::cells::observation_model::ObservationModel;

/// Secondary ridge check (ridges made by particular counts): a fitted point is on a ridge when
/// the smallest eigenvalue of its unit-diagonal observed information is below this fraction of
/// the largest. Looser than [`RANK_TOLERANCE`] because iterations stop only near a ridge, where
/// the curvature along it is small but not zero.
pub const FIT_NULL_TOLERANCE: f64 = 1e-6;
/// A θ entry whose observed information per observation is below this sits on a flat part of
/// the likelihood (its estimate runs off towards infinity, e.g. after a hit rate of 1): its SE
/// would exceed 10⁵/√N in its own units, so it counts as not identified by these data.
pub const FLAT_INFORMATION_PER_OBSERVATION: f64 = 1e-10;

/// Why the fit stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StopReason {
    /// The Newton decrement fell below the tolerance at a point of full-rank information.
    Converged,
    /// `max_iterations` accepted steps without convergence.
    IterationLimit,
    /// Non-finite likelihood or derivatives, or no damping made a step acceptable.
    NumericalFailure,
    /// Stationary (or stalled) where the data cannot pin θ down: the information is
    /// rank-deficient (a ridge) or flat in some entry (an estimate running off to infinity).
    NotIdentified,
    /// Not attempted: a condition's table has no maximum inside the parameter space, by the
    /// rule of [`crate::cells::degeneracy`] that every route shares.
    Degenerate,
}

/// Where the fit starts.
#[derive(Debug, Clone, PartialEq)]
pub enum Start {
    /// The conditions' hypothesised (true) values.
    Hypothesised,
    /// d′ = 1, c = 0, σ = 1, criteria 3/(K−1) apart, π = ½.
    Crude,
    /// A given θ.
    Theta(Vec<f64>),
}

/// Limits and tolerances of the fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NewtonOptions {
    pub max_iterations: usize,
    /// Stop when the Newton decrement gᵀ(−H)⁻¹g (twice the predicted gain in lnL) is below this.
    /// The decrement is the squared length of the remaining Newton step in standard errors, so
    /// the default 1e-16 stops within 1e-8 SE of the maximum: the fast paths' rule, which lets
    /// the routes be tested equal to 1e-7.
    pub tolerance: f64,
    /// Largest change of any θ entry in one step (keeps early steps out of the far tails).
    pub max_step: f64,
}

impl Default for NewtonOptions {
    fn default() -> Self {
        NewtonOptions {
            max_iterations: 100,
            tolerance: 1e-16,
            max_step: 3.0,
        }
    }
}

/// Result of a fit.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    pub theta: Vec<f64>,
    pub log_likelihood: f64,
    pub stop: StopReason,
    /// Accepted Newton steps.
    pub iterations: usize,
    /// Largest |∂lnL/∂θ| over the estimated entries at the end.
    pub max_abs_gradient: f64,
    /// −∂²lnL/∂θ∂θᵀ at the end (all entries, including any held fixed).
    pub observed_information: DMatrix<f64>,
}

/// Fits θ by maximum likelihood from `start`. A model whose counts are degenerate by
/// [`model_degeneracy`] is not iterated: the result stops as [`StopReason::Degenerate`] at the
/// start, with lnL and the information evaluated there.
pub fn fit(
    model: &ObservationModel,
    counts: &Counts,
    start: Start,
    options: &NewtonOptions,
) -> Result<Fit, InputError> {
    let theta0 = match start {
        Start::Hypothesised => model.hypothesised_theta(),
        Start::Crude => model.parameters().crude_theta(),
        Start::Theta(t) => t,
    };
    model.check_theta(&theta0)?;
    counts.check_shape(model)?;
    if model_degeneracy(model, counts.cells()).is_some() {
        return Ok(unfitted(model, counts, theta0, StopReason::Degenerate));
    }
    let free = vec![true; model.dim()];
    Ok(maximise(model, counts, theta0, &free, options))
}

/// A result that stops where it starts, for a fit that is not attempted.
fn unfitted(model: &ObservationModel, counts: &Counts, theta: Vec<f64>, stop: StopReason) -> Fit {
    let mut ws = Workspace::borrow_spare();
    let d = derivatives_with(&mut ws, model, counts, &theta);
    ws.give_back();
    Fit {
        max_abs_gradient: d.gradient.iter().fold(0.0, |m: f64, g| m.max(g.abs())),
        log_likelihood: d.value,
        observed_information: -d.hessian,
        theta,
        stop,
        iterations: 0,
    }
}

/// Maximises lnL over the entries marked `free`, holding the others at `theta0`.
/// `theta0` must already be checked. Falls back to the crude start if lnL(θ₀) is not finite.
pub(crate) fn maximise(
    model: &ObservationModel,
    counts: &Counts,
    theta0: Vec<f64>,
    free: &[bool],
    options: &NewtonOptions,
) -> Fit {
    let mut ws = Workspace::borrow_spare();
    let mut theta = theta0;
    let mut d = derivatives_with(&mut ws, model, counts, &theta);
    if !d.value.is_finite() {
        let mut crude = model.parameters().crude_theta();
        for (c, (t, f)) in crude.iter_mut().zip(theta.iter().zip(free)) {
            if !f {
                *c = *t;
            }
        }
        theta = crude;
        d = derivatives_with(&mut ws, model, counts, &theta);
    }
    let idx: Vec<usize> = (0..free.len()).filter(|&i| free[i]).collect();
    let verdict = StationaryCheck {
        model,
        counts,
        idx: &idx,
        total: counts.block_totals().iter().sum(),
    };
    let mut damping = 0.0;
    let mut iterations = 0;
    let stop = loop {
        if !d.value.is_finite() || d.gradient.iter().any(|x| !x.is_finite()) {
            break StopReason::NumericalFailure;
        }
        if idx.is_empty() {
            break StopReason::Converged;
        }
        let g = DVector::from_iterator(idx.len(), idx.iter().map(|&i| d.gradient[i]));
        let a = DMatrix::from_fn(idx.len(), idx.len(), |r, c| -d.hessian[(idx[r], idx[c])]);
        let Some((mut delta, used)) = damped_step(&a, &g, damping) else {
            break StopReason::NumericalFailure;
        };
        let decrement = g.dot(&delta);
        if decrement.abs() < options.tolerance && (used < 1e-4 || g.amax() < 1e-6) {
            break verdict.at(&theta, &a);
        }
        if iterations >= options.max_iterations {
            break match verdict.at(&theta, &a) {
                StopReason::NotIdentified => StopReason::NotIdentified,
                _ => StopReason::IterationLimit,
            };
        }
        let big = delta.amax();
        if big > options.max_step {
            delta *= options.max_step / big;
        }
        match line_search(&mut ws, model, counts, &theta, &idx, &delta, &g, d.value) {
            Some(next) => {
                theta = next;
                d = derivatives_with(&mut ws, model, counts, &theta);
                iterations += 1;
                damping = if used > 1e-12 { used * 0.1 } else { 0.0 };
            }
            None if used < 1e6 => damping = (used * 100.0).max(1e-3),
            None => {
                // Nothing improves even with heavy damping: accept as stationary if the
                // gradient is negligible, else report the failure.
                break if g.amax() < 1e-6 {
                    verdict.at(&theta, &a)
                } else {
                    StopReason::NumericalFailure
                };
            }
        }
    };
    ws.give_back();
    let max_abs_gradient = idx.iter().map(|&i| d.gradient[i].abs()).fold(0.0, f64::max);
    let LogLikelihood { value, hessian, .. } = d;
    Fit {
        theta,
        log_likelihood: value,
        stop,
        iterations,
        max_abs_gradient,
        observed_information: -hessian,
    }
}

/// Solves (A + τ·ā·I) δ = g by Cholesky, raising τ (relative to the mean diagonal ā) until the
/// matrix is positive definite. Returns δ and the τ used.
fn damped_step(a: &DMatrix<f64>, g: &DVector<f64>, start: f64) -> Option<(DVector<f64>, f64)> {
    let n = a.nrows();
    let mean_diag = (a.trace().abs() / n as f64).max(1e-12);
    let mut tau = start;
    for _ in 0..60 {
        let mut m = a.clone();
        for i in 0..n {
            m[(i, i)] += tau * mean_diag;
        }
        if let Some(ch) = m.cholesky() {
            let delta = ch.solve(g);
            if delta.iter().all(|x| x.is_finite()) {
                return Some((delta, tau));
            }
        }
        tau = if tau == 0.0 { 1e-10 } else { tau * 10.0 };
        if tau > 1e12 {
            return None;
        }
    }
    None
}

/// Accuracy of the computed lnL relative to its size, allowed for in the line search: a sum of
/// n·ln p with an ulp-accurate Φ is good to ~1e-14 of its size. Without it the last Newton
/// steps, whose gain is below lnL's last digits, would be refused and the fit would stall
/// short of the tolerance (the rating fast path has the same allowance).
const LN_L_NOISE: f64 = 1e-12;

/// Backtracking: halve the step until lnL rises by at least 10⁻⁴ of the predicted first-order
/// gain, less lnL's rounding noise.
#[allow(clippy::too_many_arguments)]
fn line_search(
    ws: &mut Workspace,
    model: &ObservationModel,
    counts: &Counts,
    theta: &[f64],
    idx: &[usize],
    delta: &DVector<f64>,
    g: &DVector<f64>,
    f0: f64,
) -> Option<Vec<f64>> {
    let slope = g.dot(delta);
    let slack = LN_L_NOISE * (1.0 + f0.abs());
    let mut alpha = 1.0;
    let mut trial = theta.to_vec();
    for _ in 0..40 {
        for (k, &i) in idx.iter().enumerate() {
            trial[i] = theta[i] + alpha * delta[k];
        }
        let f = value_with(ws, model, counts, &trial);
        if f.is_finite() && f >= f0 + 1e-4 * alpha * slope - slack {
            return Some(trial);
        }
        alpha *= 0.5;
    }
    None
}

/// What the stationary point says about identification. `NotIdentified` when
/// (1) the expected information at θ̂ for the observed block totals is rank-deficient at
///     [`RANK_TOLERANCE`]: a structural ridge, exact at every θ, so it does not depend on how
///     close to the ridge the iterations stopped;
/// (2) some entry's observed information per observation is below
///     [`FLAT_INFORMATION_PER_OBSERVATION`]: an estimate running off to infinity;
/// (3) the observed information is rank-deficient at [`FIT_NULL_TOLERANCE`]: a ridge made by
///     these particular counts.
struct StationaryCheck<'a> {
    model: &'a ObservationModel,
    counts: &'a Counts,
    idx: &'a [usize],
    total: f64,
}

impl StationaryCheck<'_> {
    fn at(&self, theta: &[f64], a: &DMatrix<f64>) -> StopReason {
        let flat = FLAT_INFORMATION_PER_OBSERVATION * self.total.max(1.0);
        if a.diagonal().iter().any(|&d| d < flat) {
            return StopReason::NotIdentified;
        }
        let Ok(expected) = expected_information(self.model, theta, &self.counts.block_totals())
        else {
            return StopReason::NumericalFailure;
        };
        let n = self.idx.len();
        let expected = DMatrix::from_fn(n, n, |r, c| expected[(self.idx[r], self.idx[c])]);
        let full_rank = |m: &DMatrix<f64>, tolerance: f64| {
            if clearly_well_conditioned(m, tolerance) {
                return Some(true);
            }
            let e = scaled_eigen(m)?;
            Some(e.smallest() > tolerance * e.largest())
        };
        match (
            full_rank(&expected, RANK_TOLERANCE),
            full_rank(a, FIT_NULL_TOLERANCE),
        ) {
            (Some(true), Some(true)) => StopReason::Converged,
            (Some(_), Some(_)) => StopReason::NotIdentified,
            _ => StopReason::NumericalFailure,
        }
    }
}

/// A cheap sufficient test for λ_min > `tolerance`·λ_max of the unit-diagonal form S = D⁻¹MD⁻¹,
/// which spares the eigen-decomposition for the usual well-conditioned fit: if S − ε·I has a
/// Cholesky factor with ε = 2·tolerance·n, then S is positive definite, so λ_max < trace S = n
/// and λ_min > ε > tolerance·λ_max (the factor 2 covers the factorisation's rounding, ~n·10⁻¹⁶,
/// far below ε). When it fails the caller decides by the eigenvalues, so the verdict is the same
/// as the eigen rule's for every matrix.
fn clearly_well_conditioned(m: &DMatrix<f64>, tolerance: f64) -> bool {
    let n = m.nrows();
    if n == 0 || m.iter().any(|x| !x.is_finite()) {
        return false;
    }
    let mut scale = [0.0f64; 32];
    if n > scale.len() {
        return false;
    }
    for i in 0..n {
        let d = m[(i, i)];
        if d <= 0.0 {
            return false;
        }
        scale[i] = d.sqrt();
    }
    let eps = 2.0 * tolerance * n as f64;
    let s = DMatrix::from_fn(n, n, |i, j| {
        let v = 0.5 * (m[(i, j)] + m[(j, i)]) / (scale[i] * scale[j]);
        if i == j { v - eps } else { v }
    });
    s.cholesky().is_some()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{ConditionSpec, Record, Role};

    fn yes_no(fixed: bool) -> ObservationModel {
        let rec = Record::Full {
            present: 30,
            absent: 30,
        };
        let mut spec = ConditionSpec::yes_no("lab", rec, 1.0, 0.2, 0.5);
        if fixed {
            spec.roles.d_prime = Role::Fixed;
            spec.roles.criterion = Role::Fixed;
        }
        ObservationModel::new(vec![spec]).unwrap()
    }

    #[test]
    fn nothing_free_converges_at_once() {
        let model = yes_no(true);
        let counts = Counts::new(&model, vec![vec![9.0, 21.0], vec![22.0, 8.0]]).unwrap();
        let f = fit(&model, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
        assert_eq!((f.stop, f.iterations), (StopReason::Converged, 0));
    }

    #[test]
    fn far_start_still_converges_and_limit_is_reported() {
        let model = yes_no(false);
        let counts = Counts::new(&model, vec![vec![9.0, 21.0], vec![22.0, 8.0]]).unwrap();
        let far = Start::Theta(vec![-6.0, 7.0]);
        let f = fit(&model, &counts, far.clone(), &NewtonOptions::default()).unwrap();
        assert_eq!(f.stop, StopReason::Converged, "{f:?}");
        assert!(f.max_abs_gradient < 1e-6);
        let short = NewtonOptions {
            max_iterations: 1,
            ..NewtonOptions::default()
        };
        let g = fit(&model, &counts, far, &short).unwrap();
        assert_eq!((g.stop, g.iterations), (StopReason::IterationLimit, 1));
    }

    /// The Cholesky shortcut may only ever agree with the eigen rule: on matrices whose
    /// conditioning straddles the tolerance (eigenvalue ratios from 0.1× to 100× of it, random
    /// rotations and scales), "clearly well conditioned" must imply λ_min > tol·λ_max of the
    /// unit-diagonal form, as computed by the eigen-decomposition.
    #[test]
    fn cholesky_shortcut_never_contradicts_the_eigen_rule() {
        use rand_distr::{Distribution, Uniform};
        let mut rng = crate::simulate::replicate_rng(7, 0, 0);
        let mut uniform = |a: f64, b: f64| Uniform::new(a, b).unwrap().sample(&mut rng);
        let mut accepted = 0;
        for trial in 0..4000 {
            let n = 2 + trial % 5;
            let tol = if trial % 2 == 0 {
                RANK_TOLERANCE
            } else {
                FIT_NULL_TOLERANCE
            };
            // Random orthogonal Q from the QR of a Gaussian matrix.
            let g = DMatrix::from_fn(n, n, |_, _| uniform(-0.5, 0.5));
            let q = g.qr().q();
            let ratio = tol * 10f64.powf(uniform(-1.0, 2.0));
            let lambda = DVector::from_fn(n, |i, _| if i == 0 { ratio } else { uniform(0.5, 1.0) });
            let d = DVector::from_fn(n, |_, _| 10f64.powf(uniform(-3.0, 3.0)));
            let m0 = &q * DMatrix::from_diagonal(&lambda) * q.transpose();
            let m = DMatrix::from_fn(n, n, |i, j| m0[(i, j)] * d[i] * d[j]);
            if clearly_well_conditioned(&m, tol) {
                accepted += 1;
                let e = scaled_eigen(&m).unwrap();
                assert!(e.smallest() > tol * e.largest(), "trial {trial}: {m}");
            }
        }
        // The shortcut must also be useful: most matrices well above the tolerance pass it.
        assert!(accepted > 1000, "only {accepted} accepted");
    }
}
