//! `vigil run`: load the plan, claim the output files, run every scenario, the search and the
//! groups, then write the outputs whole and compose the terminal report.

use super::AppError;
use crate::engine::ScenarioSummary;
use crate::evaluate::{self, RunOptions};
use crate::plan::Plan;
use crate::report::{self, PendingFile};
use crate::shard::{self, MergedTallies, Part};
use std::path::{Path, PathBuf};

/// Options of `vigil run`.
#[derive(Debug, Clone, Default)]
pub struct RunRequest {
    pub plan: PathBuf,
    pub csv: Option<PathBuf>,
    pub json: Option<PathBuf>,
    pub exact: bool,
    /// Overrides the plan's number of experiments (quick looks, tests).
    pub experiments: Option<u64>,
    /// Simulate only this part of a split run (`--part K/N`)…
    pub part: Option<Part>,
    /// …and write its partial-results file here (`--part-file`).
    pub part_file: Option<PathBuf>,
    /// Save finished chunks here as the run goes (`--checkpoint`)…
    pub checkpoint: Option<PathBuf>,
    /// …and continue from the checkpoint already there (`--resume`).
    pub resume: bool,
}

/// A checkpointed run: where the checkpoint lives and what it already holds.
struct CheckpointRun {
    path: PathBuf,
    plan_hash: String,
    resumed: Option<shard::PartFile>,
    /// The command to rerun, for the message after an interruption.
    resume_hint: String,
}

/// A part of a split run: which part, the plan file's hash and the claimed file.
struct PartOutput {
    part: Part,
    plan_hash: String,
    file: PendingFile,
}

/// A loaded plan with its claimed output files, ready to run.
pub struct PreparedRun {
    pub plan: Plan,
    pub options: RunOptions,
    csv: Option<PendingFile>,
    json: Option<PendingFile>,
    part: Option<PartOutput>,
    checkpoint: Option<CheckpointRun>,
}

impl PreparedRun {
    /// A whole run of `plan` with these claimed outputs.
    pub(super) fn from_parts(
        plan: Plan,
        options: RunOptions,
        csv: Option<PendingFile>,
        json: Option<PendingFile>,
    ) -> Self {
        Self {
            plan,
            options,
            csv,
            json,
            part: None,
            checkpoint: None,
        }
    }

    /// Replicates the run will simulate (for a progress bar).
    pub fn total_replicates(&self) -> u64 {
        if let Some(p) = &self.part {
            return shard::run_part::part_replicates(&self.plan, p.part);
        }
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
    check_part_options(req)?;
    let part = match (req.part, &req.part_file) {
        (Some(part), Some(path)) => Some(PartOutput {
            part,
            plan_hash: plan_file_hash(&req.plan)?,
            file: claim(path)?,
        }),
        _ => None,
    };
    let checkpoint = prepare_checkpoint(req, &plan)?;
    let csv = req.csv.as_deref().map(claim).transpose()?;
    let json = req.json.as_deref().map(claim).transpose()?;
    Ok(PreparedRun {
        plan,
        options,
        csv,
        json,
        part,
        checkpoint,
    })
}

/// Checks `--checkpoint`/`--resume` and reads the checkpoint to resume from.
fn prepare_checkpoint(req: &RunRequest, plan: &Plan) -> Result<Option<CheckpointRun>, AppError> {
    let input = |m: String| Err(AppError::Input(m));
    let Some(path) = &req.checkpoint else {
        if req.resume {
            return input(
                "--resume needs --checkpoint FILE, the checkpoint to continue from".into(),
            );
        }
        return Ok(None);
    };
    if req.part.is_some() || req.exact {
        return input(
            "--checkpoint cannot be combined with --part or --exact; a part is short (rerun it whole), and --exact does not simulate"
                .into(),
        );
    }
    if path.exists() && !req.resume {
        return input(format!(
            "{}: a checkpoint is already there; add --resume to continue from it, or delete it to start over",
            path.display()
        ));
    }
    let plan_hash = plan_file_hash(&req.plan)?;
    let resumed = if req.resume {
        shard::checkpoint::load_checkpoint(path, plan, &req.plan, &plan_hash)?
    } else {
        None
    };
    // Claim the folder now: a checkpoint that cannot be written fails in the first second.
    drop(claim(path)?);
    let mut hint = format!("vigil run {}", req.plan.display());
    if let Some(n) = req.experiments {
        hint.push_str(&format!(" --experiments {n}"));
    }
    for (flag, file) in [("--csv", &req.csv), ("--json", &req.json)] {
        if let Some(f) = file {
            hint.push_str(&format!(" {flag} {}", f.display()));
        }
    }
    hint.push_str(&format!(" --checkpoint {} --resume", path.display()));
    Ok(Some(CheckpointRun {
        path: path.clone(),
        plan_hash,
        resumed,
        resume_hint: hint,
    }))
}

/// Claims an output file before the long work starts.
pub(super) fn claim(path: &Path) -> Result<PendingFile, AppError> {
    PendingFile::claim(path).map_err(|source| AppError::Output {
        path: path.to_path_buf(),
        source,
    })
}

/// The hash that names the plan file in partial results.
pub(super) fn plan_file_hash(path: &Path) -> Result<String, AppError> {
    let bytes = std::fs::read(path)
        .map_err(|e| AppError::Input(format!("{}: cannot read the plan: {e}", path.display())))?;
    Ok(shard::plan_hash(&bytes))
}

/// `--part` and `--part-file` go together, and a part writes nothing else.
fn check_part_options(req: &RunRequest) -> Result<(), AppError> {
    let input = |m: &str| Err(AppError::Input(m.into()));
    match (req.part, &req.part_file) {
        (None, None) => Ok(()),
        (Some(_), None) => input(
            "--part needs --part-file FILE, the partial-results file this part writes (for example --part 3/40 --part-file parts/3.json)",
        ),
        (None, Some(_)) => input(
            "--part-file needs --part K/N, the part of the split run to simulate (for example --part 3/40)",
        ),
        (Some(_), Some(_)) if req.exact => input(
            "--part cannot be combined with --exact: exact enumeration is not simulated in chunks and is quick whole; drop one of them",
        ),
        (Some(_), Some(_)) if req.csv.is_some() || req.json.is_some() => input(
            "--part writes only its partial-results file; --csv and --json are written by `vigil merge PLAN PARTS… --csv FILE --json FILE`",
        ),
        (Some(_), Some(_)) => Ok(()),
    }
}

/// Runs a prepared plan, writes the output files whole and returns the terminal report.
pub fn execute(run: PreparedRun, progress: &(dyn Fn(u64) + Sync)) -> Result<String, AppError> {
    if let Some(out) = run.part {
        return execute_part(&run.plan, out, progress);
    }
    let Some(checkpoint) = run.checkpoint else {
        return execute_with(run, progress, None);
    };
    let CheckpointRun {
        path,
        plan_hash,
        resumed,
        resume_hint,
    } = checkpoint;
    let run = PreparedRun {
        checkpoint: None,
        ..run
    };
    match shard::checkpoint::run_checkpointed(&run.plan, plan_hash, &path, resumed, progress)? {
        shard::checkpoint::Outcome::Done(totals) => {
            let text = execute_with(run, progress, Some(&totals))?;
            shard::checkpoint::remove_checkpoint(&path);
            Ok(text)
        }
        shard::checkpoint::Outcome::Interrupted { saved, total } => Err(AppError::Interrupted {
            path,
            saved,
            total,
            resume: resume_hint,
        }),
    }
}

/// Simulates one part and writes its partial-results file whole.
fn execute_part(
    plan: &Plan,
    out: PartOutput,
    progress: &(dyn Fn(u64) + Sync),
) -> Result<String, AppError> {
    let file = shard::run_part(plan, out.plan_hash, out.part, progress)?;
    let mut bytes = serde_json::to_vec(&file).map_err(|e| AppError::Internal(e.to_string()))?;
    bytes.push(b'\n');
    let path = out.file.target().to_path_buf();
    out.file.commit(&bytes).map_err(|source| AppError::Output {
        path: path.clone(),
        source,
    })?;
    Ok(report::shard_text::part_written(
        out.part,
        file.chunk_total(),
        &path,
    ))
}

/// [`execute`] of a whole run, or — with `stored` — of merged parts: the fixed points' tallies
/// come from the parts, the rest (search, effort split, every output) is the same code.
pub(super) fn execute_with(
    run: PreparedRun,
    progress: &(dyn Fn(u64) + Sync),
    stored: Option<&MergedTallies>,
) -> Result<String, AppError> {
    let plan = &run.plan;
    let summaries = evaluate::run_plan_with(plan, run.options, progress, &|s| {
        stored.and_then(|t| t.scenario(s))
    })?;
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
        (Some(_), false) => Some(crate::groups::run_groups_with(
            plan,
            progress,
            &|d, a, t| stored.and_then(|m| m.group(d, a, t)),
        )?),
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
    let text = report::terminal::render_run(plan, &summaries, &searches, groups.as_ref());
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
