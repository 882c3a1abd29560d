//! Why a part could not be run or parts could not be merged (all bad input: exit 2).

use std::path::PathBuf;
use thiserror::Error;

/// A refused part run or merge; every message names the file and what is allowed.
#[derive(Debug, Error)]
pub enum ShardError {
    #[error("{path}: cannot read the partial-results file: {source}")]
    Read {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error(
        "{path}: not a vigil partial-results file ({message})\n  allowed: a file written by `vigil run PLAN --part K/N --part-file FILE`"
    )]
    NotAPart { path: PathBuf, message: String },
    #[error(
        "{path}: written by vigil {found} (partial-results format {found_format}); this is vigil {expected} (format {expected_format})\n  allowed: parts written by this version; rerun the parts with it"
    )]
    Version {
        path: PathBuf,
        found: String,
        found_format: u32,
        expected: String,
        expected_format: u32,
    },
    #[error(
        "{path}: simulated with seed {found}, but {plan} has seed {expected}\n  allowed: parts of this plan and seed only"
    )]
    Seed {
        path: PathBuf,
        found: u64,
        expected: u64,
        plan: PathBuf,
    },
    #[error(
        "{path}: simulated from another plan (plan hash {found}; {plan} hashes to {expected}): the plan file was edited or is another plan\n  allowed: parts run from exactly this plan file"
    )]
    Plan {
        path: PathBuf,
        found: String,
        expected: String,
        plan: PathBuf,
    },
    #[error(
        "{path}: {what} is {found}, but {first} has {expected}\n  allowed: parts of one split run, all with the same --experiments and the same --part K/N total"
    )]
    Mismatch {
        path: PathBuf,
        what: &'static str,
        found: String,
        first: PathBuf,
        expected: String,
    },
    #[error(
        "{path}: part {part} of {parts} is also in {other}\n  allowed: each part once (duplicate or overlapping parts)"
    )]
    Duplicate {
        path: PathBuf,
        other: PathBuf,
        part: u32,
        parts: u32,
    },
    #[error(
        "{path}: holds other chunks than part {part} of {parts} must (at {point}): the file was edited or damaged\n  allowed: files exactly as `vigil run --part` wrote them"
    )]
    WrongChunks {
        path: PathBuf,
        part: u32,
        parts: u32,
        point: String,
    },
    #[error(
        "missing part{plural} {missing} of {parts} (given: {given})\n  allowed: all {parts} parts; run the missing ones with `vigil run PLAN --part K/{parts} --part-file FILE`"
    )]
    Missing {
        missing: String,
        plural: &'static str,
        parts: u32,
        given: String,
    },
    #[error(
        "no partial-results files given\n  allowed: one or more files written by `vigil run PLAN --part K/N --part-file FILE`"
    )]
    NoParts,
    #[error(transparent)]
    Experiments(#[from] crate::plan::PlanError),
    #[error(transparent)]
    Run(#[from] crate::evaluate::RunError),
    #[error(transparent)]
    Groups(#[from] crate::groups::GroupError),
}
