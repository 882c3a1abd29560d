//! `vigil run`: load the plan, claim the output files, run every scenario, the search and the
//! groups, then write the outputs whole and compose the terminal report.

use super::AppError;
use crate::engine::ScenarioSummary;
use crate::evaluate::{self, RunOptions};
use crate::output::{CommitSet, Slot};
use crate::plan::Plan;
use crate::report;
use crate::workload::Workload;
use std::path::PathBuf;

/// Options of `vigil run`.
#[derive(Debug, Clone, Default)]
pub struct RunRequest {
    pub plan: PathBuf,
    pub csv: Option<PathBuf>,
    pub json: Option<PathBuf>,
    pub exact: bool,
    /// Overrides the plan's number of experiments (quick looks, tests).
    pub experiments: Option<u64>,
    /// Run even when the estimated work exceeds [`crate::workload::LIMIT_SECONDS`].
    pub allow_long_run: bool,
}

/// A loaded plan with its claimed output files, ready to run.
pub struct PreparedRun {
    pub plan: Plan,
    pub options: RunOptions,
    /// The estimated work (timed when large).
    pub workload: Workload,
    outputs: Outputs,
}

/// The claimed output files of a run, committed together.
struct Outputs {
    set: CommitSet,
    csv: Option<Slot>,
    json: Option<Slot>,
}

impl PreparedRun {
    /// What to tell the user before a long run starts, if anything.
    pub fn note(&self) -> Option<String> {
        self.workload
            .worth_noting()
            .then(|| report::workload_text::note(&self.workload))
    }

    /// Replicates the run will simulate (for a progress bar).
    pub fn total_replicates(&self) -> u64 {
        let groups = if !self.options.exact && self.plan.animals().is_some() {
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
        plan = plan.with_experiments(n)?;
    }
    let options = RunOptions { exact: req.exact };
    evaluate::preflight(&plan, options)?;
    let mut set = CommitSet::new();
    set.input("plan", &req.plan);
    let csv = req
        .csv
        .as_ref()
        .map(|p| set.claim("--csv", p))
        .transpose()?;
    let json = req
        .json
        .as_ref()
        .map(|p| set.claim("--json", p))
        .transpose()?;
    let workload = crate::workload::estimate(&plan, options);
    if workload.over_limit() && !req.allow_long_run {
        return Err(AppError::Input(report::workload_text::refusal(&workload)));
    }
    Ok(PreparedRun {
        plan,
        options,
        workload,
        outputs: Outputs { set, csv, json },
    })
}

/// Everything a run computes: the scenario summaries, the searches and the groups.
pub struct RunResults {
    pub summaries: Vec<ScenarioSummary>,
    pub searches: Vec<crate::search::SearchResult>,
    pub groups: Option<crate::groups::GroupReport>,
}

/// Runs every scenario of the plan, the sample-size search and the groups.
pub fn results(
    plan: &Plan,
    options: RunOptions,
    progress: &(dyn Fn(u64) + Sync),
) -> Result<RunResults, AppError> {
    let summaries = evaluate::run_plan(plan, options, progress)?;
    // With [animals] the targets are judged at group level (the effort split), not for
    // one idealised animal.
    let searches =
        if plan.targets().any(plan.hypotheses()) && !options.exact && plan.animals().is_none() {
            crate::search::search_plan(plan, progress)?
        } else {
            Vec::new()
        };
    let groups = match (&plan.animals(), options.exact) {
        (Some(_), false) => Some(crate::groups::run_groups(plan, progress)?),
        _ => None,
    };
    Ok(RunResults {
        summaries,
        searches,
        groups,
    })
}

/// Runs a prepared plan, writes the output files whole and returns the terminal report.
pub fn execute(run: PreparedRun, progress: &(dyn Fn(u64) + Sync)) -> Result<String, AppError> {
    let plan = &run.plan;
    let RunResults {
        summaries,
        searches,
        groups,
    } = results(plan, run.options, progress)?;
    let advice = crate::analytic::advice::RunAdvice::of(plan, &summaries);
    let to_stdout = write_outputs(
        plan,
        &summaries,
        &searches,
        groups.as_ref(),
        &advice,
        run.outputs,
    )?;
    // An output named `-` takes standard output in place of the terminal report.
    match to_stdout {
        Some(bytes) => Ok(String::from_utf8_lossy(&bytes).into_owned()),
        None => Ok(report::terminal::render_run(
            plan,
            &summaries,
            &searches,
            groups.as_ref(),
            &advice,
        )),
    }
}

/// Renders every requested output, writes each to its temporary file, then commits them
/// together; returns the bytes of an output meant for standard output.
fn write_outputs(
    plan: &Plan,
    summaries: &[ScenarioSummary],
    searches: &[crate::search::SearchResult],
    groups: Option<&crate::groups::GroupReport>,
    advice: &crate::analytic::advice::RunAdvice,
    mut outputs: Outputs,
) -> Result<Option<Vec<u8>>, AppError> {
    if let Some(slot) = outputs.csv {
        let bytes = report::csv_out::render(plan, summaries)
            .map_err(|e| AppError::Internal(e.to_string()))?;
        outputs.set.write(slot, &bytes)?;
    }
    if let Some(slot) = outputs.json {
        let bytes = report::json_out::render(plan, summaries, searches, groups, advice)
            .map_err(|e| AppError::Internal(e.to_string()))?;
        outputs.set.write(slot, &bytes)?;
    }
    Ok(outputs.set.commit()?)
}
