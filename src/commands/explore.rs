//! `vigil explore`: expected information of every design over a fine grid of trial counts —
//! asymptotic SEs, the d′–c correlation, rank, condition number and the identifiability
//! verdict — in well under a second, without simulating.
//!
//! Exit codes as for the other commands (see [`crate::commands`]): 2 for a bad plan, bad options
//! or an output path that cannot be written (all found before any work); 1 otherwise.

use super::AppError;
use crate::analytic::information::InformationError;
use crate::analytic::scan::{ScanOptions, scan_plan};
use crate::analytic::trial_grid::{DEFAULT_POINTS, MIN_TRIALS};
use crate::evaluate::RunError;
use crate::output::CommitSet;
use crate::plan::{Plan, PlanError};
use crate::report;
use std::path::PathBuf;

/// Largest count `--from`/`--to` accept (far beyond any field study; keeps u32 arithmetic safe).
pub const MAX_EXPLORE_TRIALS: u32 = 100_000_000;
/// Largest `--points`.
pub const MAX_POINTS: usize = 10_000;

/// Options of `vigil explore`.
#[derive(Debug, Clone, Default)]
pub struct ExploreRequest {
    pub plan: PathBuf,
    /// Smallest trial count of the grid (default: each design's smallest listed count).
    pub from: Option<u32>,
    /// Largest trial count of the grid (default: 4 × each design's largest listed count).
    pub to: Option<u32>,
    /// Log-spaced counts per design (default 40).
    pub points: Option<usize>,
    /// Also write the results as JSON.
    pub json: Option<PathBuf>,
}

/// A bad command-line option, reported like a plan error (exit code 2) with the option as key.
fn option_error(option: &str, problem: String, allowed: &str) -> AppError {
    AppError::Plan(PlanError {
        file: PathBuf::from("vigil explore"),
        line: None,
        key: option.to_string(),
        problem,
        allowed: allowed.to_string(),
    })
}

/// Checks `--from`, `--to` and `--points` and turns them into scan options.
pub fn scan_options(req: &ExploreRequest) -> Result<ScanOptions, AppError> {
    let range = format!("a whole number of trials from {MIN_TRIALS} to {MAX_EXPLORE_TRIALS}");
    for (option, value) in [("--from", req.from), ("--to", req.to)] {
        if let Some(v) = value
            && !(MIN_TRIALS..=MAX_EXPLORE_TRIALS).contains(&v)
        {
            return Err(option_error(
                option,
                format!("{v} is outside {MIN_TRIALS} to {MAX_EXPLORE_TRIALS}"),
                &range,
            ));
        }
    }
    if let (Some(from), Some(to)) = (req.from, req.to)
        && from > to
    {
        return Err(option_error(
            "--from",
            format!("--from {from} is larger than --to {to}"),
            "a --from no larger than --to",
        ));
    }
    let points = req.points.unwrap_or(DEFAULT_POINTS);
    if !(1..=MAX_POINTS).contains(&points) {
        return Err(option_error(
            "--points",
            format!("{points} points is outside 1 to {MAX_POINTS}"),
            &format!("a whole number of grid points from 1 to {MAX_POINTS}"),
        ));
    }
    Ok(ScanOptions {
        from: req.from,
        to: req.to,
        points,
    })
}

/// Runs `vigil explore`: loads the plan, checks the options, claims the JSON file, scans every
/// design and returns the terminal report (the JSON file is written whole).
pub fn explore(req: &ExploreRequest) -> Result<String, AppError> {
    let plan = Plan::load(&req.plan)?;
    let options = scan_options(req)?;
    let mut outputs = CommitSet::new();
    outputs.input("plan", &req.plan);
    let json = req
        .json
        .as_deref()
        .map(|p| outputs.claim("--json", p))
        .transpose()?;
    // A model the plan's values cannot build is bad input (exit 2), as in `vigil run`.
    let scans = scan_plan(&plan, options).map_err(|e| match e {
        InformationError::Model { design, source } => AppError::Run(RunError::Model {
            design,
            message: source.to_string(),
        }),
        other => AppError::Internal(other.to_string()),
    })?;
    if let Some(slot) = json {
        let bytes = report::explore_text::render_json(&plan, &scans)
            .map_err(|e| AppError::Internal(e.to_string()))?;
        outputs.write(slot, &bytes)?;
    }
    // An output named `-` takes standard output in place of the terminal report.
    match outputs.commit()? {
        Some(bytes) => Ok(String::from_utf8_lossy(&bytes).into_owned()),
        None => Ok(report::explore_text::render(&plan, &scans)),
    }
}
