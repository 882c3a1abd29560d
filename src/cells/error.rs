//! Errors of the observation model: a bad specification (found once, when the model is built)
//! and bad run-time input (θ, counts, block sizes, profile targets of the wrong shape).
//!
//! Numerical trouble during a fit is not an error: it is a stop reason carried by the result.

use thiserror::Error;

/// A condition list that cannot become an observation model. Messages name the condition and the fix.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SpecError {
    #[error("the model has no conditions; give at least one")]
    NoConditions,

    #[error("the hypothesised values give no valid cell probabilities: {0}")]
    Probabilities(String),

    #[error("condition {index} has an empty name; every condition needs a name for the reports")]
    EmptyName { index: usize },

    #[error("two conditions are both named '{name}'; names must be unique")]
    DuplicateName { name: String },

    #[error("condition '{condition}' has {categories} response categories; use 2 to 12")]
    CategoriesOutOfRange {
        condition: String,
        categories: usize,
    },

    #[error(
        "condition '{condition}': the yes/no boundary is category {boundary}, but with \
         {categories} categories it must lie in 1..={max}",
        max = categories - 1
    )]
    BoundaryOutOfRange {
        condition: String,
        boundary: usize,
        categories: usize,
    },

    #[error("condition '{condition}': {parameter} = {value} is not allowed ({reason})")]
    InvalidValue {
        condition: String,
        parameter: &'static str,
        value: f64,
        reason: &'static str,
    },

    #[error(
        "condition '{condition}' has {categories} categories, so it needs {expected} criterion \
         gaps, but {found} were given"
    )]
    GapCount {
        condition: String,
        categories: usize,
        expected: usize,
        found: usize,
    },

    #[error(
        "condition '{condition}' has 2 response categories, so its σ cannot be estimated; \
         fix σ (usually at 1)"
    )]
    SigmaFreeForYesNo { condition: String },

    #[error(
        "condition '{condition}' is asked to share {parameter}, but it has no such parameter \
         ({reason}); drop it from the shared list"
    )]
    NothingToShare {
        condition: String,
        parameter: &'static str,
        reason: &'static str,
    },

    #[error(
        "conditions '{first}' and '{other}' share {parameter} but state different values \
         ({first_value} and {other_value}); give them one value"
    )]
    SharedValuesDiffer {
        parameter: &'static str,
        first: String,
        other: String,
        first_value: f64,
        other_value: f64,
    },

    #[error(
        "conditions '{first}' and '{other}' share the criterion gaps but have different numbers \
         of categories; only conditions with the same number of categories can share gaps"
    )]
    SharedGapsShape { first: String, other: String },

    #[error(
        "condition '{condition}' records {record}, which needs a yes/no (2-category) response, \
         but it has {categories} categories"
    )]
    RecordNeedsYesNo {
        condition: String,
        record: &'static str,
        categories: usize,
    },

    #[error("condition '{condition}': invalid lapse ({reason})")]
    InvalidLapse {
        condition: String,
        reason: &'static str,
    },
}

/// Run-time input that does not fit the model it is used with.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum InputError {
    #[error("θ has {found} entries but the model has {expected} free parameters")]
    ThetaLength { expected: usize, found: usize },

    #[error("θ entry {index} ('{name}') is {value}; every entry must be finite")]
    ThetaNotFinite {
        index: usize,
        name: String,
        value: f64,
    },

    #[error("{what}: expected {expected} blocks, found {found}")]
    BlockCount {
        what: &'static str,
        expected: usize,
        found: usize,
    },

    #[error("counts for block {block}: expected {expected} cells, found {found}")]
    CellCount {
        block: usize,
        expected: usize,
        found: usize,
    },

    #[error("{what} for block {block}, cell {cell} is {value}; it must be finite and ≥ 0")]
    InvalidCount {
        what: &'static str,
        block: usize,
        cell: usize,
        value: f64,
    },

    #[error("the information matrix is {rows}×{cols} but there are {names} parameter names")]
    InformationShape {
        rows: usize,
        cols: usize,
        names: usize,
    },

    #[error("the information matrix has non-finite entries (θ too far in the tails?)")]
    InformationNotFinite,

    #[error("there is no condition named '{name}'")]
    UnknownCondition { name: String },

    #[error("{parameter} of condition '{condition}' is fixed, so there is nothing to profile")]
    ProfileTargetFixed {
        parameter: &'static str,
        condition: String,
    },

    #[error("the fit to profile around has lnL = {value}; profile only around a finite maximum")]
    ProfileFromFailedFit { value: f64 },

    #[error("profile option {option} = {value} is invalid ({reason})")]
    InvalidProfileOption {
        option: &'static str,
        value: f64,
        reason: &'static str,
    },
}
