//! Newton ascent on lnL in the unconstrained coordinates θ.
//!
//! Each iteration solves (−H)·s = g by Cholesky. When −H is not positive definite (far from
//! the maximum the likelihood need not be concave in θ) the step comes from
//! −H + λ·diag(|H_ii|) instead, λ growing tenfold until the factorisation succeeds
//! (Levenberg–Marquardt damping: a blend of Newton and scaled steepest ascent). A step-halving line search then asks for an increase of at
//! least 1e-4 of the predicted one (Armijo), with a noise allowance so steps whose gain is
//! below lnL's accuracy are not refused (see [`LN_L_NOISE`]).
//!
//! Convergence: the Newton decrement gᵀ(−H)⁻¹g, which is the squared length of the Newton
//! step in standard-error units (the inverse observed information is the asymptotic
//! covariance), is at most tol², with an undamped Hessian. The test is free of the scale of
//! the counts: it means the same with 20 trials as with a million. The solver never prints;
//! it returns its stop reason and iteration count.

use super::fit::{FitStatus, RatingFitOptions};
use super::likelihood::{Evaluation, evaluate_into};
use super::linalg::{cholesky_in_place, solve_in_place};
use super::params::{Layout, RatingParams};
use super::table::RatingTable;
use super::{MAX_PARAMS, Matrix};

/// Largest move of any θ entry in one step (a criterion by 3 SD, σ by a factor e³):
/// keeps exp() in range and the line search short when far from the maximum.
const MAX_STEP: f64 = 3.0;
/// Step halvings before the line search gives up (2⁻⁴⁰ ≈ 1e-12).
const MAX_HALVINGS: u32 = 40;
/// Armijo constant: accept a step that gains this share of the predicted increase.
const ARMIJO: f64 = 1e-4;
/// Accuracy of the computed lnL relative to its size, allowed for in the line search.
///
/// With an ulp-accurate Φ the sum of n·ln P is good to ~1e-14 of its size; 1e-12 leaves a
/// margin. Without any allowance the line search can refuse the last, tiny Newton steps
/// (gain below lnL's last digits) and the fit would end at the iteration limit instead of
/// letting the gradient test decide. (statrs 0.19.1's erfc, with ~1e-10 relative error and
/// small jumps between its piecewise pieces, needed 1e-10 here; `normal` now uses libm.)
const LN_L_NOISE: f64 = 1e-12;
/// Damping attempts (λ from 1e-3·scale up by factors of 10).
const MAX_DAMPING: u32 = 30;

/// Where the solver stopped.
pub(crate) struct NewtonOutcome {
    pub status: FitStatus,
    pub iterations: u32,
    pub params: RatingParams,
    /// The evaluation at `params` (natural coordinates); `None` if even the start failed.
    pub evaluation: Option<Evaluation>,
}

/// Maximises lnL from `start` (σ held at the start's value when `options.fix_sigma`).
///
/// All buffers live on the stack and are reused: two evaluations (current and trial, swapped
/// by index), the θ gradient and Hessian, and one work matrix for the factorisation.
pub(crate) fn maximise(
    table: &RatingTable,
    start: &RatingParams,
    options: &RatingFitOptions,
) -> NewtonOutcome {
    let layout = Layout {
        categories: table.categories(),
        fix_sigma: options.fix_sigma,
    };
    let n = layout.dim();
    let mut params = *start;
    let mut theta = layout.theta_of(&params);
    let mut evals = [Evaluation::zero(), Evaluation::zero()];
    let mut current = 0;
    if !evaluate_into(table, &params, &mut evals[current]) {
        return NewtonOutcome {
            status: FitStatus::NumericalFailure,
            iterations: 0,
            params,
            evaluation: None,
        };
    }
    let mut g = [0.0; MAX_PARAMS];
    let mut h = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    let mut work = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    let ev = &evals[current];
    layout.chain_rule(&params, &ev.gradient, &ev.hessian, &mut g, &mut h);
    let tol_sq = options.gradient_tol * options.gradient_tol;
    let mut iterations = 0;
    let status = loop {
        let mut step = g;
        let damped = if factor_negated(&h, n, 0.0, &mut work) {
            false
        } else if damp(&h, n, &mut work) {
            true
        } else {
            break FitStatus::NumericalFailure;
        };
        solve_in_place(&work, n, &mut step);
        let decrement: f64 = (0..n).map(|i| g[i] * step[i]).sum();
        if !decrement.is_finite() {
            break FitStatus::NumericalFailure;
        }
        if !damped && decrement <= tol_sq {
            break FitStatus::Converged;
        }
        if iterations >= options.max_iter {
            break FitStatus::IterationLimit;
        }
        iterations += 1;

        let largest = step[..n].iter().fold(0.0_f64, |m, s| m.max(s.abs()));
        let mut t = if largest > MAX_STEP {
            MAX_STEP / largest
        } else {
            1.0
        };
        let f0 = evals[current].ln_likelihood;
        let slack = LN_L_NOISE * (1.0 + f0.abs());
        let trial_slot = 1 - current;
        let mut accepted = None;
        for _ in 0..MAX_HALVINGS {
            let mut trial = theta;
            for i in 0..n {
                trial[i] += t * step[i];
            }
            if let Some(p) = layout.params_at(&trial) {
                if evaluate_into(table, &p, &mut evals[trial_slot])
                    && evals[trial_slot].ln_likelihood >= f0 + ARMIJO * t * decrement - slack
                {
                    accepted = Some((trial, p));
                    break;
                }
            }
            t *= 0.5;
        }
        let Some((trial, p)) = accepted else {
            break FitStatus::NumericalFailure;
        };
        theta = trial;
        params = p;
        current = trial_slot;
        let ev = &evals[current];
        layout.chain_rule(&params, &ev.gradient, &ev.hessian, &mut g, &mut h);
    };
    NewtonOutcome {
        status,
        iterations,
        params,
        evaluation: Some(evals[current]),
    }
}

/// Factors −H + λ·diag(|H_ii|) into `work` (lower triangle); `false` if it is not positive
/// definite.
fn factor_negated(h: &Matrix, n: usize, lambda: f64, work: &mut Matrix) -> bool {
    let floor = 1e-12 * (0..n).fold(f64::MIN_POSITIVE, |m, i| m.max(h[i][i].abs()));
    for i in 0..n {
        for j in 0..=i {
            work[i][j] = -h[i][j];
        }
        work[i][i] += lambda * h[i][i].abs().max(floor);
    }
    cholesky_in_place(work, n)
}

/// Levenberg–Marquardt damping: factors −H + λ·diag(|H_ii|) into `work` with the smallest
/// tried λ (1e-3, then tenfold steps) that makes it positive definite; `false` if none does
/// (non-finite entries). Scaling by the diagonal keeps the step sensible when the entries of
/// θ have very different curvatures (criteria pinned by 1e5 trials next to a loose σ); a
/// multiple of the identity would then shrink every step to nothing.
fn damp(h: &Matrix, n: usize, work: &mut Matrix) -> bool {
    let mut lambda = 1e-3;
    for _ in 0..MAX_DAMPING {
        if factor_negated(h, n, lambda, work) {
            return true;
        }
        lambda *= 10.0;
    }
    false
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn damping_gives_an_ascent_direction_for_an_indefinite_hessian() {
        // H with eigenvalues of both signs: −H is not positive definite.
        let mut h = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        h[0][0] = -2.0;
        h[0][1] = -3.0;
        h[1][0] = -3.0;
        h[1][1] = -1.0;
        let mut g = [0.0; MAX_PARAMS];
        g[0] = 1.0;
        g[1] = -0.5;
        let mut work = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        assert!(!factor_negated(&h, 2, 0.0, &mut work));
        assert!(damp(&h, 2, &mut work));
        let mut s = g;
        solve_in_place(&work, 2, &mut s);
        assert!(g[0] * s[0] + g[1] * s[1] > 0.0);
    }

    #[test]
    fn damping_fails_on_nan() {
        let mut h = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        h[0][0] = f64::NAN;
        let mut work = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        assert!(!damp(&h, 1, &mut work));
    }
}
