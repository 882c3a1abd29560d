//! `vigil report`: run a plan and write a folder to open in a browser and paste from — an
//! HTML page with the figures inline, the same page as Markdown, the justification text,
//! the figures as SVG files, the CSV and JSON, and the plan itself.
//!
//! The folder is claimed before any simulation (a bad path exits 2 in the first second)
//! and appears whole or not at all (see [`crate::report::PendingFolder`]).

use super::AppError;
use super::run::{RunResults, results};
use crate::analytic::information::InformationError;
use crate::analytic::scan::{ScanOptions, scan_plan};
use crate::evaluate::{self, RunError, RunOptions};
use crate::figures::{self, Inputs};
use crate::phase::Progress;
use crate::plan::Plan;
use crate::report::report_page::{self, ReportContent};
use crate::report::{self, PendingFolder};
use std::path::PathBuf;

/// Options of `vigil report`.
#[derive(Debug, Clone, Default)]
pub struct ReportRequest {
    pub plan: PathBuf,
    /// The folder to write.
    pub out: PathBuf,
    /// Overrides the plan's number of experiments (quick looks, tests).
    pub experiments: Option<u64>,
}

/// A loaded plan with its claimed folder, ready to run.
pub struct PreparedReport {
    pub plan: Plan,
    plan_text: String,
    folder: PendingFolder,
}

impl PreparedReport {
    /// Replicates the run will simulate (for a progress bar).
    pub fn total_replicates(&self) -> u64 {
        let groups = if self.plan.animals().is_some() {
            crate::groups::total_group_replicates(&self.plan)
        } else {
            0
        };
        evaluate::total_replicates(&self.plan, RunOptions::default()) + groups
    }
}

/// Loads the plan and claims the folder: everything that can fail before the long work.
pub fn prepare(req: &ReportRequest) -> Result<PreparedReport, AppError> {
    let mut plan = Plan::load(&req.plan)?;
    if let Some(n) = req.experiments {
        plan = plan.with_experiments(n)?;
    }
    evaluate::preflight(&plan, RunOptions::default())?;
    // Plan::load read it a moment ago; a failure now is an I/O failure, not bad input.
    let plan_text =
        std::fs::read_to_string(&req.plan).map_err(|e| AppError::Internal(e.to_string()))?;
    let folder = PendingFolder::claim(&req.out).map_err(|source| AppError::OutputFolder {
        path: req.out.clone(),
        source,
    })?;
    Ok(PreparedReport {
        plan,
        plan_text,
        folder,
    })
}

/// The files of the folder besides the page, the figures and the marker: name, what it
/// holds, bytes.
type Files = Vec<(String, String, Vec<u8>)>;

/// Runs the plan, writes the folder whole and returns the terminal's closing lines.
pub fn execute(prepared: PreparedReport, progress: &Progress<'_>) -> Result<String, AppError> {
    let plan = &prepared.plan;
    let RunResults {
        summaries,
        searches,
        groups,
        uncertainty,
    } = results(plan, RunOptions::default(), progress)?;
    let scans = scan_plan(plan, ScanOptions::default()).map_err(|e| match e {
        InformationError::Model { design, source } => AppError::Run(RunError::Model {
            design,
            message: source.to_string(),
        }),
        other => AppError::Internal(other.to_string()),
    })?;
    let inputs = Inputs::new(plan, &summaries, &searches, groups.as_ref(), &scans)
        .with_uncertainty(uncertainty.as_ref());
    let svgs = figures::all(&inputs).map_err(|e| AppError::Internal(e.to_string()))?;
    let internal = |e: &dyn std::fmt::Display| AppError::Internal(e.to_string());
    let csv = report::csv_out::render(plan, &summaries).map_err(|e| internal(&e))?;
    let advice = crate::analytic::advice::RunAdvice::of(plan, &summaries);
    let json = report::json_out::render(
        plan,
        &summaries,
        &searches,
        groups.as_ref(),
        &advice,
        uncertainty.as_ref(),
    )
    .map_err(|e| internal(&e))?;
    let justification =
        report::justification::paragraphs(plan, &searches, groups.as_ref(), uncertainty.as_ref());
    let tables = report::tables::render(&report::tables::TableInputs {
        plan,
        summaries: &summaries,
        searches: &searches,
        groups: groups.as_ref(),
        uncertainty: uncertainty.as_ref(),
    })
    .map_err(|e| internal(&e))?;
    let mut others: Files = vec![
        (
            "report.md".into(),
            "this page as Markdown, for pasting into a proposal".into(),
            Vec::new(),
        ),
        (
            "justification.md".into(),
            "the justification text alone".into(),
            (justification.join("\n\n") + "\n").into_bytes(),
        ),
        (
            "results.csv".into(),
            "one row per design × trials × quantity (columns in docs/report.md)".into(),
            csv,
        ),
        (
            "results.json".into(),
            "everything, with the resolved plan, seed and version".into(),
            json,
        ),
        (
            "plan.toml".into(),
            "the plan file as run".into(),
            prepared.plan_text.clone().into_bytes(),
        ),
    ];
    others.extend(tables.into_iter().map(|(name, bytes)| {
        (
            format!("{}/{name}", report::tables::FOLDER),
            report::tables::describe(name).to_string(),
            bytes,
        )
    }));
    let listed: Vec<(String, String)> = others
        .iter()
        .map(|(name, what, _)| (name.clone(), what.clone()))
        .collect();
    let page = report_page::build(&ReportContent {
        plan,
        summaries: &summaries,
        searches: &searches,
        groups: groups.as_ref(),
        advice: &advice,
        uncertainty: uncertainty.as_ref(),
        figures: &svgs,
        files: &listed,
    });
    let mut files: Vec<(String, Vec<u8>)> = vec![
        (
            "index.html".into(),
            report::page_html::render(&page).into_bytes(),
        ),
        (
            "report.md".into(),
            report::page_markdown::render(&page).into_bytes(),
        ),
    ];
    files.extend(
        others
            .into_iter()
            .filter(|(name, _, _)| name != "report.md")
            .map(|(name, _, bytes)| (name, bytes)),
    );
    files.extend(
        svgs.iter()
            .map(|f| (report_page::figure_path(f), f.text.clone().into_bytes())),
    );
    let path = prepared.folder.target().to_path_buf();
    let names: Vec<String> = files.iter().map(|(n, _)| n.clone()).collect();
    prepared
        .folder
        .commit(&files)
        .map_err(|source| AppError::OutputFolder {
            path: path.clone(),
            source,
        })?;
    Ok(report::report_page::written(&path, &names))
}
