//! Fits: one dataset in, estimates with standard errors and a status out.
//!
//! The closed-form yes/no fit is a fast path (table lookups per scenario); rating designs
//! use maximum likelihood with analytic derivatives.

pub mod correction;
pub mod rating;
pub mod yesno;

pub use yesno::{YesNoFit, ZEntry, ZTable, fit_yes_no, z_variance};
