//! Public entry points of the rating fitter and the fitted result.
//!
//! `fit` refuses degenerate tables (see [`super::empty_cells::degeneracy`]), starts from the
//! zROC least-squares line, runs damped Newton, and at a converged maximum inverts the
//! observed information −∂²lnL/∂η∂ηᵀ in the natural parameters η = (μ, σ, k_1, …, k_{K−1})
//! to give their asymptotic covariance.

use super::empty_cells::degeneracy;
use super::linalg::{cholesky_in_place, inverse};
use super::newton::maximise;
use super::params::{Layout, RatingParams};
use super::start::zroc_start;
use super::table::RatingTable;
use super::{MAX_PARAMS, Matrix};
use crate::cells::degeneracy::Degeneracy;

/// Solver settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatingFitOptions {
    /// Hold σ = 1 (equal-variance model); θ then has no ln σ entry.
    pub fix_sigma: bool,
    /// Newton iterations allowed before stopping with [`FitStatus::IterationLimit`].
    pub max_iter: u32,
    /// Convergence when the gradient, measured in the inverse observed information,
    /// √(gᵀ(−H)⁻¹g), is at most this: the remaining Newton step is shorter than this many
    /// standard errors. Zero or NaN never converges.
    pub gradient_tol: f64,
}

impl Default for RatingFitOptions {
    /// σ free, 50 iterations, tolerance 1e-8 standard errors.
    fn default() -> Self {
        RatingFitOptions {
            fix_sigma: false,
            max_iter: 50,
            gradient_tol: 1e-8,
        }
    }
}

/// Why the solver stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FitStatus {
    /// The convergence test passed at a point where lnL is locally concave.
    Converged,
    /// `max_iter` iterations ran without passing the convergence test.
    IterationLimit,
    /// lnL could not be evaluated or increased (a probability underflowed, no ascent step
    /// was found, or the damping failed).
    NumericalFailure,
}

/// Why no fit was attempted.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum FitError {
    /// The table has no finite maximum-likelihood estimate.
    #[error("degenerate table: {0}")]
    Degenerate(#[from] Degeneracy),
    /// The starting values have a different number of categories than the table.
    #[error("the start has {start} categories but the table has {table}")]
    StartMismatch { start: usize, table: usize },
}

/// Names a natural parameter (criteria are numbered from 1).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Param {
    Mu,
    Sigma,
    Criterion(usize),
}

/// Asymptotic covariance of the natural parameters (μ, σ, k_1, …, k_{K−1}; without σ when it
/// is fixed): the inverse of the observed information at the maximum.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Covariance {
    values: Matrix,
    categories: usize,
    sigma_fixed: bool,
}

impl Covariance {
    /// Number of rows and columns: K + 1, or K with σ fixed.
    pub fn dim(&self) -> usize {
        Layout {
            categories: self.categories,
            fix_sigma: self.sigma_fixed,
        }
        .dim()
    }

    /// Row of a parameter; `None` for σ when fixed or a criterion outside 1..=K−1.
    pub fn index(&self, p: Param) -> Option<usize> {
        match p {
            Param::Mu => Some(0),
            Param::Sigma => (!self.sigma_fixed).then_some(1),
            Param::Criterion(i) if (1..self.categories).contains(&i) => {
                Some(i + usize::from(!self.sigma_fixed))
            }
            Param::Criterion(_) => None,
        }
    }

    /// Cov(a, b); `None` when either is not an estimated parameter.
    pub fn get(&self, a: Param, b: Param) -> Option<f64> {
        Some(self.values[self.index(a)?][self.index(b)?])
    }

    /// Entry (i, j) in the order (μ, σ, k_1, …) or (μ, k_1, …) with σ fixed.
    pub fn entry(&self, i: usize, j: usize) -> Option<f64> {
        (i < self.dim() && j < self.dim()).then(|| self.values[i][j])
    }
}

/// A fitted rating model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatingFit {
    /// Why the solver stopped; only `Converged` fits carry a covariance.
    pub status: FitStatus,
    /// Newton iterations taken.
    pub iterations: u32,
    /// lnL at the returned parameters (no multinomial constant); −∞ if the start failed.
    pub ln_likelihood: f64,
    params: RatingParams,
    sigma_fixed: bool,
    covariance: Option<Covariance>,
}

impl RatingFit {
    /// μ̂ (= d′ in absent-SD units).
    pub fn mu(&self) -> f64 {
        self.params.mu()
    }
    /// σ̂ (1 when fixed).
    pub fn sigma(&self) -> f64 {
        self.params.sigma()
    }
    /// k̂_1 < … < k̂_{K−1}.
    pub fn criteria(&self) -> &[f64] {
        self.params.criteria()
    }
    /// All estimates together.
    pub fn params(&self) -> &RatingParams {
        &self.params
    }
    /// Whether σ was held at 1.
    pub fn sigma_fixed(&self) -> bool {
        self.sigma_fixed
    }
    /// Inverse observed information in the natural parameters; `None` unless the fit
    /// converged and the information is positive definite.
    pub fn covariance(&self) -> Option<&Covariance> {
        self.covariance.as_ref()
    }
}

/// Fits the unequal-variance (or, with `fix_sigma`, equal-variance) Gaussian rating model by
/// maximum likelihood from zROC starting values. Degenerate tables are refused, not fitted.
pub fn fit(table: &RatingTable, options: &RatingFitOptions) -> Result<RatingFit, FitError> {
    if let Some(reason) = degeneracy(table, options.fix_sigma) {
        return Err(FitError::Degenerate(reason));
    }
    Ok(run(table, &zroc_start(table, options.fix_sigma), options))
}

/// As [`fit`], from given starting values (σ is replaced by 1 when `fix_sigma`).
pub fn fit_from(
    table: &RatingTable,
    options: &RatingFitOptions,
    start: &RatingParams,
) -> Result<RatingFit, FitError> {
    if start.categories() != table.categories() {
        return Err(FitError::StartMismatch {
            start: start.categories(),
            table: table.categories(),
        });
    }
    if let Some(reason) = degeneracy(table, options.fix_sigma) {
        return Err(FitError::Degenerate(reason));
    }
    Ok(run(table, start, options))
}

fn run(table: &RatingTable, start: &RatingParams, options: &RatingFitOptions) -> RatingFit {
    let start = if options.fix_sigma {
        start.with_sigma(1.0)
    } else {
        *start
    };
    let outcome = maximise(table, &start, options);
    let layout = Layout {
        categories: table.categories(),
        fix_sigma: options.fix_sigma,
    };
    let covariance = match (&outcome.evaluation, outcome.status) {
        (Some(ev), FitStatus::Converged) => {
            let (_, h) = layout.restrict(&ev.gradient, &ev.hessian);
            let n = layout.dim();
            let mut info = [[0.0; MAX_PARAMS]; MAX_PARAMS];
            for a in 0..n {
                for b in 0..n {
                    info[a][b] = -h[a][b];
                }
            }
            cholesky_in_place(&mut info, n).then(|| Covariance {
                values: inverse(&info, n),
                categories: table.categories(),
                sigma_fixed: options.fix_sigma,
            })
        }
        _ => None,
    };
    RatingFit {
        status: outcome.status,
        iterations: outcome.iterations,
        ln_likelihood: outcome
            .evaluation
            .map_or(f64::NEG_INFINITY, |e| e.ln_likelihood),
        params: outcome.params,
        sigma_fixed: options.fix_sigma,
        covariance,
    }
}
