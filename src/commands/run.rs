//! `vigil run`: load the plan, claim the output files, run every scenario, the search and the
//! groups, then write the outputs whole and compose the terminal report.

use super::AppError;
use crate::engine::ScenarioSummary;
use crate::evaluate::{self, RunOptions};
use crate::plan::Plan;
use crate::report::{self, PendingFile};
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
    let searches = if plan.targets().any(plan.hypotheses())
        && !run.options.exact
        && plan.animals().is_none()
    {
        crate::search::search_plan(plan, progress)?
    } else {
        Vec::new()
    };
    let groups = match (&plan.animals(), run.options.exact) {
        (Some(_), false) => Some(crate::groups::run_groups(plan, progress)?),
        _ => None,
    };
    let advice = crate::analytic::advice::RunAdvice::of(plan, &summaries);
    write_outputs(
        plan,
        &summaries,
        &searches,
        groups.as_ref(),
        &advice,
        run.csv,
        run.json,
    )?;
    let text = report::terminal::render_run(plan, &summaries, &searches, groups.as_ref(), &advice);
    Ok(text)
}

fn write_outputs(
    plan: &Plan,
    summaries: &[ScenarioSummary],
    searches: &[crate::search::SearchResult],
    groups: Option<&crate::groups::GroupReport>,
    advice: &crate::analytic::advice::RunAdvice,
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
            report::json_out::render(plan, summaries, searches, groups, advice)
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
