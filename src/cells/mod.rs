//! The observation model: every design as a coarsening of one count table.
//!
//! The full record of a condition is a table (stimulus class × response category). A design
//! says which cells are observed and which are summed ([`spec::Record`]); the model gives
//! every observed cell's probability with analytic first and second derivatives, and one
//! likelihood over observed cells serves every design. The same cell probabilities give
//! the expected Fisher information, the identifiability verdict and profile-likelihood
//! ranges. The closed-form yes/no fit (`fit::yesno`) and the rating fit (`fit::rating`)
//! are fast paths that the tests check against this general one.
//!
//! One job per file: [`spec`] (what a caller says about a condition), [`parameter_map`]
//! (the free vector θ: names, sharing, fixed values), [`full_table`] (P(category | class)
//! and derivatives), [`coarsening`] (records → blocks of cells), [`observation_model`],
//! [`cell_probabilities`], [`likelihood`], [`degeneracy`] (the one rule for tables without an
//! interior maximum, shared with the fast paths), [`newton`] (the fit), [`information`],
//! [`identifiability`], [`profile`], [`error`].

pub mod cell_probabilities;
pub mod coarsening;
pub mod degeneracy;
pub mod error;
pub mod full_table;
pub mod identifiability;
pub mod information;
pub mod likelihood;
pub mod newton;
pub mod observation_model;
pub mod parameter_map;
pub mod profile;
pub mod spec;
pub mod verdict;
