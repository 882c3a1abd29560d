//! What each command does, as library functions the binary calls.
//!
//! Exit codes: 0 success; 2 bad input (plan, options, output path); 1 anything else
//! (an I/O failure while writing results).

use crate::engine::ScenarioSummary;
use crate::evaluate::{self, RunError, RunOptions};
use crate::plan::{Plan, PlanError};
use crate::report::{self, PendingFile};
use std::fmt::Write;
use std::path::{Path, PathBuf};
use thiserror::Error;

/// Any failure of a command, with its exit code.
#[derive(Debug, Error)]
pub enum AppError {
    #[error("{0}")]
    Plan(#[from] PlanError),
    #[error("{0}")]
    Run(#[from] RunError),
    #[error(
        "{path}: cannot write output: {source}\n  allowed: a file path in an existing, writable folder"
    )]
    Output {
        path: PathBuf,
        source: std::io::Error,
    },
    /// A bad command-line value, already worded with the option and what is allowed.
    #[error("{0}")]
    Input(String),
    #[error("{0}")]
    Groups(#[from] crate::groups::GroupError),
    #[error("{0}")]
    Internal(String),
}

impl AppError {
    /// The documented exit code of this failure.
    pub fn exit_code(&self) -> i32 {
        match self {
            Self::Plan(_)
            | Self::Run(_)
            | Self::Output { .. }
            | Self::Input(_)
            | Self::Groups(_) => 2,
            Self::Internal(_) => 1,
        }
    }
}

/// `vigil check`: the expanded scenarios, without simulating.
pub fn check(path: &Path) -> Result<String, AppError> {
    let plan = Plan::load(path)?;
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{}: plan is valid — {}",
        path.display(),
        plan.study.title
    );
    let o = &plan.observer;
    let _ = writeln!(
        out,
        "observer: d′ = {}, c = {}, σ = {}; {} experiments per scenario, seed {}, {:.0}% intervals, {} correction",
        o.d_prime,
        o.criterion,
        o.sigma,
        plan.study.experiments,
        plan.study.seed,
        100.0 * plan.study.confidence,
        plan.study.rate_correction.name()
    );
    let mut t = report::style::new_table(vec![
        "scenario", "design", "record", "presence", "trials", "present", "absent",
    ]);
    for s in plan.scenarios() {
        let d = &plan.designs[s.design];
        t.add_row(vec![
            (s.id + 1).to_string(),
            d.name.clone(),
            d.record_label(),
            format!("{}", d.presence),
            s.trials.to_string(),
            s.split.present.to_string(),
            s.split.absent.to_string(),
        ]);
    }
    report::style::right_align(&mut t, 4..7);
    let _ = writeln!(out, "{t}");
    let _ = writeln!(
        out,
        "present trials = presence × trials rounded to the nearest whole number (halves round up); absent = the rest."
    );
    Ok(out)
}

/// Options of `vigil run`.
#[derive(Debug, Clone, Default)]
pub struct RunRequest {
    pub plan: PathBuf,
    pub csv: Option<PathBuf>,
    pub json: Option<PathBuf>,
    pub exact: bool,
    /// Overrides the plan's number of experiments (quick looks, tests).
    pub experiments: Option<u64>,
}

/// A loaded plan with its claimed output files, ready to run.
pub struct PreparedRun {
    pub plan: Plan,
    pub options: RunOptions,
    csv: Option<PendingFile>,
    json: Option<PendingFile>,
}

impl PreparedRun {
    /// Replicates the run will simulate (for a progress bar).
    pub fn total_replicates(&self) -> u64 {
        let groups = if !self.options.exact && self.plan.animals.is_some() {
            crate::groups::total_group_replicates(&self.plan)
        } else {
            0
        };
        evaluate::total_replicates(&self.plan, self.options) + groups
    }
}

/// Loads and checks everything that can fail before the long work starts.
pub fn prepare(req: &RunRequest) -> Result<PreparedRun, AppError> {
    let mut plan = Plan::load(&req.plan)?;
    if let Some(n) = req.experiments {
        if n == 0 {
            return Err(AppError::Run(RunError::NoExperiments));
        }
        plan.study.experiments = n;
    }
    let options = RunOptions { exact: req.exact };
    evaluate::preflight(&plan, options)?;
    let claim = |p: &Option<PathBuf>| -> Result<Option<PendingFile>, AppError> {
        p.as_ref()
            .map(|path| {
                PendingFile::claim(path).map_err(|source| AppError::Output {
                    path: path.clone(),
                    source,
                })
            })
            .transpose()
    };
    let csv = claim(&req.csv)?;
    let json = claim(&req.json)?;
    Ok(PreparedRun {
        plan,
        options,
        csv,
        json,
    })
}

/// Runs a prepared plan, writes the output files whole and returns the terminal report.
pub fn execute(run: PreparedRun, progress: &(dyn Fn(u64) + Sync)) -> Result<String, AppError> {
    let plan = &run.plan;
    let summaries = evaluate::run_plan(plan, run.options, progress)?;
    // With [animals] the targets are judged at group level (the effort split), not for
    // one idealised animal.
    let searches =
        if plan.targets.any(&plan.hypotheses) && !run.options.exact && plan.animals.is_none() {
            crate::search::search_plan(plan, progress)?
        } else {
            Vec::new()
        };
    let groups = match (&plan.animals, run.options.exact) {
        (Some(_), false) => Some(crate::groups::run_groups(plan, progress)?),
        _ => None,
    };
    write_outputs(
        plan,
        &summaries,
        &searches,
        groups.as_ref(),
        run.csv,
        run.json,
    )?;
    let mut text = report::terminal::render(plan, &summaries);
    let verdict = report::verdict::render(&searches, plan.study.max_trials);
    if !verdict.is_empty() {
        // The verdict goes before the closing caution.
        let at = text.rfind("Caution:").unwrap_or(text.len());
        text.insert_str(at, &verdict);
    }
    if let Some(g) = &groups {
        let at = text.rfind("Caution:").unwrap_or(text.len());
        text.insert_str(at, &report::groups_text::render_section(plan, g));
    }
    Ok(text)
}

fn write_outputs(
    plan: &Plan,
    summaries: &[ScenarioSummary],
    searches: &[crate::search::SearchResult],
    groups: Option<&crate::groups::GroupReport>,
    csv: Option<PendingFile>,
    json: Option<PendingFile>,
) -> Result<(), AppError> {
    // Render both before committing either, so a failure leaves neither half-written.
    let csv_bytes = match &csv {
        Some(_) => Some(
            report::csv_out::render(plan, summaries)
                .map_err(|e| AppError::Internal(e.to_string()))?,
        ),
        None => None,
    };
    let json_bytes = match &json {
        Some(_) => Some(
            report::json_out::render(plan, summaries, searches, groups)
                .map_err(|e| AppError::Internal(e.to_string()))?,
        ),
        None => None,
    };
    for (file, bytes) in [(csv, csv_bytes), (json, json_bytes)] {
        if let (Some(file), Some(bytes)) = (file, bytes) {
            let path = file.target().to_path_buf();
            file.commit(&bytes)
                .map_err(|source| AppError::Output { path, source })?;
        }
    }
    Ok(())
}
