//! `vigil run`: load the plan, claim the output files, run every scenario, the search and the
//! groups, then write the outputs whole and compose the terminal report. A run may also be one
//! part of a split run (`--part`), or keep a checkpoint it can resume from (`--checkpoint`).

use super::AppError;
use crate::engine::ScenarioSummary;
use crate::evaluate::{self, RunOptions};
use crate::output::{CommitSet, OutputSlot};
use crate::phase::Progress;
use crate::plan::Plan;
use crate::report;
use crate::shard::{self, MergedTallies, Part};
use crate::workload::Workload;
use std::path::{Path, PathBuf};

/// Options of `vigil run`.
#[derive(Debug, Clone, Default)]
pub struct RunRequest {
    pub plan: PathBuf,
    pub csv: Option<PathBuf>,
    pub json: Option<PathBuf>,
    /// Also write every table as its own CSV into this existing folder (`--tables`).
    pub tables: Option<PathBuf>,
    pub exact: bool,
    /// Overrides the plan's number of experiments (quick looks, tests).
    pub experiments: Option<u64>,
    /// Run even when the estimated work exceeds [`crate::workload::LIMIT_SECONDS`].
    pub allow_long_run: bool,
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

/// A part of a split run: which part and the plan file's hash (its file is an output slot).
struct PartOutput {
    part: Part,
    plan_hash: String,
    slot: OutputSlot,
}

/// A loaded plan with its claimed output files, ready to run.
pub struct PreparedRun {
    pub plan: Plan,
    pub options: RunOptions,
    /// The estimated work (timed when large).
    pub workload: Workload,
    outputs: Outputs,
    part: Option<PartOutput>,
    checkpoint: Option<CheckpointRun>,
}

/// The claimed output files of a run, committed together.
pub(super) struct Outputs {
    pub(super) set: CommitSet,
    pub(super) csv: Option<OutputSlot>,
    pub(super) json: Option<OutputSlot>,
    /// The `--tables` files, in [`report::tables::FILES`] order.
    pub(super) tables: Option<Vec<OutputSlot>>,
}

impl PreparedRun {
    /// A whole run of `plan` with these claimed outputs (the merge of a split run).
    pub(super) fn from_parts(plan: Plan, options: RunOptions, outputs: Outputs) -> Self {
        let workload = Workload {
            datasets: 0,
            experiments: plan.study().experiments,
            seconds: None,
        };
        Self {
            plan,
            options,
            workload,
            outputs,
            part: None,
            checkpoint: None,
        }
    }

    /// What to tell the user before a long run starts, if anything.
    pub fn note(&self) -> Option<String> {
        self.workload
            .worth_noting()
            .then(|| report::workload_text::note(&self.workload))
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
    check_precision_options(req, &plan)?;
    let mut set = CommitSet::new();
    set.input("plan", &req.plan);
    let part = match (req.part, &req.part_file) {
        (Some(part), Some(path)) => Some(PartOutput {
            part,
            plan_hash: plan_file_hash(&req.plan)?,
            slot: set.claim("--part-file", path)?,
        }),
        _ => None,
    };
    let checkpoint = prepare_checkpoint(req, &plan)?;
    let (csv, json) = claim_tables(&mut set, req.csv.as_deref(), req.json.as_deref())?;
    let tables = claim_table_folder(&mut set, req.tables.as_deref())?;
    // A part is a share of the work; the whole run's limit is the merge's business.
    let workload = match &part {
        Some(p) => Workload {
            datasets: shard::run_part::part_replicates(&plan, p.part),
            experiments: plan.study().experiments,
            seconds: None,
        },
        None => crate::workload::estimate(&plan, options),
    };
    if workload.over_limit() && !req.allow_long_run {
        return Err(AppError::Input(report::workload_text::refusal(&workload)));
    }
    Ok(PreparedRun {
        plan,
        options,
        workload,
        outputs: Outputs {
            set,
            csv,
            json,
            tables,
        },
        part,
        checkpoint,
    })
}

/// Claims the `--csv` and `--json` outputs in `set`.
pub(super) fn claim_tables(
    set: &mut CommitSet,
    csv: Option<&Path>,
    json: Option<&Path>,
) -> Result<(Option<OutputSlot>, Option<OutputSlot>), AppError> {
    let csv = csv.map(|p| set.claim("--csv", p)).transpose()?;
    let json = json.map(|p| set.claim("--json", p)).transpose()?;
    Ok((csv, json))
}

/// Claims the five files of `--tables DIR` in `set`: DIR must be an existing folder (like
/// the folder of any other output); each file in it is checked as any output is.
pub(super) fn claim_table_folder(
    set: &mut CommitSet,
    dir: Option<&Path>,
) -> Result<Option<Vec<OutputSlot>>, AppError> {
    let Some(dir) = dir else {
        return Ok(None);
    };
    let refuse = |problem: &str| {
        Err(AppError::Input(format!(
            "--tables {}: {problem}\n  allowed: an existing, writable folder; vigil writes {} into it",
            dir.display(),
            report::tables::FILES.join(", ")
        )))
    };
    if dir.as_os_str() == "-" {
        return refuse("standard output cannot hold several tables; name a folder");
    }
    match std::fs::metadata(dir) {
        Err(_) => return refuse("the folder does not exist (create it first)"),
        Ok(m) if !m.is_dir() => return refuse("it is not a folder"),
        Ok(_) => {}
    }
    report::tables::FILES
        .iter()
        .map(|name| set.claim("--tables", &dir.join(name)).map_err(Into::into))
        .collect::<Result<Vec<_>, AppError>>()
        .map(Some)
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
    // Claim the path now (the same checks as every output): a checkpoint that cannot be
    // written fails in the first second. The probe's temporary is removed when it drops.
    let mut probe = CommitSet::new();
    probe.input("plan", &req.plan);
    probe.claim("--checkpoint", path)?;
    drop(probe);
    let mut hint = format!("vigil run {}", req.plan.display());
    if let Some(n) = req.experiments {
        hint.push_str(&format!(" --experiments {n}"));
    }
    for (flag, file) in [
        ("--csv", &req.csv),
        ("--json", &req.json),
        ("--tables", &req.tables),
    ] {
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
        (Some(_), Some(_)) if req.csv.is_some() || req.json.is_some() || req.tables.is_some() => {
            input(
                "--part writes only its partial-results file; --csv, --json and --tables are written by `vigil merge PLAN PARTS… --csv FILE --json FILE --tables DIR`",
            )
        }
        (Some(_), Some(_)) => Ok(()),
    }
}

/// A precision run decides alone when each scenario has run enough: it cannot be one part
/// of a split run, nor resume a checkpoint of chunks planned for a fixed count.
fn check_precision_options(req: &RunRequest, plan: &Plan) -> Result<(), AppError> {
    if plan.study().precision.is_none() {
        return Ok(());
    }
    let option = match (req.part.is_some(), req.checkpoint.is_some()) {
        (true, _) => "--part",
        (_, true) => "--checkpoint",
        _ => return Ok(()),
    };
    Err(AppError::Input(format!(
        "{}: {option} cannot be combined with [study.precision]: a precision run adds experiments until its own tallies are precise enough, so its chunks are not known in advance\n  allowed: {option} with a fixed count (--experiments N sets the precision stop aside), or a precision run in one process",
        req.plan.display()
    )))
}

/// Everything a run computes: the scenario summaries, the searches and the groups.
pub struct RunResults {
    pub summaries: Vec<ScenarioSummary>,
    pub searches: Vec<crate::search::SearchResult>,
    pub groups: Option<crate::groups::GroupReport>,
    /// `[sensitivity]` and `[assurance]`, when the plan has either.
    pub uncertainty: Option<crate::uncertainty::UncertaintyReport>,
}

/// Runs every scenario of the plan, the sample-size search and the groups.
pub fn results(
    plan: &Plan,
    options: RunOptions,
    progress: &Progress<'_>,
) -> Result<RunResults, AppError> {
    results_with(plan, options, progress, None)
}

/// [`results`], or — with `stored` — those of merged parts: the fixed points' tallies come
/// from the parts, the rest (search, effort split) is the same code.
fn results_with(
    plan: &Plan,
    options: RunOptions,
    progress: &Progress<'_>,
    stored: Option<&MergedTallies>,
) -> Result<RunResults, AppError> {
    let summaries = evaluate::run_plan_with(plan, options, progress, &|s| {
        stored.and_then(|t| t.scenario(s))
    })?;
    // With [animals] the targets are judged at group level (the effort split), not for
    // one idealised animal.
    let searches =
        if plan.targets().any(plan.hypotheses()) && !options.exact && plan.animals().is_none() {
            crate::search::search_plan(plan, progress)?
        } else {
            Vec::new()
        };
    let groups = match (&plan.animals(), options.exact) {
        (Some(_), false) => Some(crate::groups::run_groups_with(
            plan,
            progress,
            &|d, a, t| stored.and_then(|m| m.group(d, a, t)),
        )?),
        _ => None,
    };
    let uncertainty = if options.exact {
        None
    } else {
        crate::uncertainty::run(plan, progress)?
    };
    Ok(RunResults {
        summaries,
        searches,
        groups,
        uncertainty,
    })
}

/// Runs a prepared plan, writes the output files whole and returns the terminal report.
pub fn execute(run: PreparedRun, progress: &Progress<'_>) -> Result<String, AppError> {
    let PreparedRun {
        plan,
        options,
        workload,
        outputs,
        part,
        checkpoint,
    } = run;
    if let Some(out) = part {
        return execute_part(&plan, out, outputs, progress);
    }
    let run = PreparedRun {
        plan,
        options,
        workload,
        outputs,
        part: None,
        checkpoint: None,
    };
    let Some(checkpoint) = checkpoint else {
        return execute_with(run, progress, None);
    };
    let CheckpointRun {
        path,
        plan_hash,
        resumed,
        resume_hint,
    } = checkpoint;
    match shard::checkpoint::run_checkpointed(&run.plan, plan_hash, &path, resumed, progress)? {
        shard::checkpoint::CheckpointOutcome::Done(totals) => {
            let text = execute_with(run, progress, Some(&totals))?;
            shard::checkpoint::remove_checkpoint(&path);
            Ok(text)
        }
        shard::checkpoint::CheckpointOutcome::Interrupted { saved, total } => {
            Err(AppError::Interrupted {
                path,
                saved,
                total,
                resume: resume_hint,
            })
        }
    }
}

/// Simulates one part and writes its partial-results file whole.
fn execute_part(
    plan: &Plan,
    out: PartOutput,
    mut outputs: Outputs,
    progress: &Progress<'_>,
) -> Result<String, AppError> {
    let file = shard::run_part(plan, out.plan_hash, out.part, progress)?;
    let mut bytes = serde_json::to_vec(&file).map_err(|e| AppError::Internal(e.to_string()))?;
    bytes.push(b'\n');
    let path = outputs.set.path(out.slot);
    outputs.set.write(out.slot, &bytes)?;
    outputs.set.commit()?;
    Ok(report::shard_text::part_written(
        out.part,
        file.chunk_total(),
        &path,
    ))
}

/// A whole run, or — with `stored` — the merge of its parts: results, outputs, report.
pub(super) fn execute_with(
    run: PreparedRun,
    progress: &Progress<'_>,
    stored: Option<&MergedTallies>,
) -> Result<String, AppError> {
    let plan = &run.plan;
    let RunResults {
        summaries,
        searches,
        groups,
        uncertainty,
    } = results_with(plan, run.options, progress, stored)?;
    let advice = crate::analytic::advice::RunAdvice::of(plan, &summaries);
    let to_stdout = write_outputs(
        plan,
        &summaries,
        &searches,
        groups.as_ref(),
        uncertainty.as_ref(),
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
            uncertainty.as_ref(),
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
    uncertainty: Option<&crate::uncertainty::UncertaintyReport>,
    advice: &crate::analytic::advice::RunAdvice,
    mut outputs: Outputs,
) -> Result<Option<Vec<u8>>, AppError> {
    if let Some(slot) = outputs.csv {
        let bytes = report::csv_out::render(plan, summaries)
            .map_err(|e| AppError::Internal(e.to_string()))?;
        outputs.set.write(slot, &bytes)?;
    }
    if let Some(slot) = outputs.json {
        let bytes =
            report::json_out::render(plan, summaries, searches, groups, advice, uncertainty)
                .map_err(|e| AppError::Internal(e.to_string()))?;
        outputs.set.write(slot, &bytes)?;
    }
    if let Some(slots) = outputs.tables {
        let tables = report::tables::render(&report::tables::TableInputs {
            plan,
            summaries,
            searches,
            groups,
            uncertainty,
        })
        .map_err(|e| AppError::Internal(e.to_string()))?;
        for (slot, (_, bytes)) in slots.into_iter().zip(tables) {
            outputs.set.write(slot, &bytes)?;
        }
    }
    Ok(outputs.set.commit()?)
}
