//! Maximum-likelihood fits of confidence-rating (graded-response) tables.
//!
//! Model (Dorfman & Alf 1969, *J. Math. Psychol.* 6:487–496): evidence on absent trials is
//! N(0, 1), on present trials N(μ, σ²). K ordered response categories (0 = most confident
//! "absent", K − 1 = most confident "present") are cut by criteria k_1 < … < k_{K−1}; the
//! response is category j when k_j < x ≤ k_{j+1} (k_0 = −∞, k_K = +∞).
//!
//! The pieces, one job per file:
//! - [`table`]: the count table and its validation;
//! - [`empty_cells`]: the named empty-cell corrections, and the degenerate-table rule shared
//!   with the general fit (`cells::degeneracy`);
//! - `cells`: cell probabilities of one row, accurate in both tails;
//! - [`params`]: the natural parameters, the unconstrained θ used by the solver, the chain rule
//!   between them, and the model's cell probabilities;
//! - [`likelihood`]: lnL with its analytic gradient and Hessian (the hot path);
//! - [`start`]: starting values from a least-squares line through the empirical zROC;
//! - `linalg`: a small fixed-size Cholesky factorisation (allocation-free);
//! - `newton`: damped Newton ascent with a step-halving line search;
//! - [`mod@fit`]: the public entry points and the fitted result with its covariance (its tests,
//!   which exercise the whole fitter, sit in `fit_tests`);
//! - [`mod@measures`]: d′, σ, zROC slope, d_a, A_z, c and their delta-method standard errors.
//!
//! Everything in the fitting path lives in fixed-size stack arrays sized for K ≤ 12, so a
//! fit allocates nothing: the Monte Carlo engine calls it millions of times.

mod cells;
pub mod empty_cells;
pub mod fit;
#[cfg(test)]
mod fit_tests;
pub mod likelihood;
mod linalg;
pub mod measures;
mod newton;
pub mod params;
pub mod start;
pub mod table;

pub use crate::cells::degeneracy::Degeneracy;
pub use empty_cells::{CorrectionError, apply_correction, degeneracy};
pub use fit::{Covariance, FitError, FitStatus, Param, RatingFit, RatingFitOptions, fit, fit_from};
pub use measures::{Estimate, MeasureError, RatingMeasures, measures};
pub use params::{ParamsError, RatingParams};
pub use table::{RatingTable, Row, TableError};

pub use crate::vocab::MAX_CATEGORIES;
/// Largest number of criteria (K − 1).
pub const MAX_CRITERIA: usize = MAX_CATEGORIES - 1;
/// Largest number of free parameters: μ, σ and K − 1 criteria.
pub const MAX_PARAMS: usize = MAX_CATEGORIES + 1;

/// A parameter-sized vector on the stack.
pub type Vector = [f64; MAX_PARAMS];
/// A parameter-sized square matrix on the stack; only the leading n × n block is used.
pub type Matrix = [[f64; MAX_PARAMS]; MAX_PARAMS];
