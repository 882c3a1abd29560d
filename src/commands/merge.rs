//! `vigil merge`: combine the partial-results files of a split run into the outputs of one
//! whole run (terminal, CSV, JSON), byte for byte, after checking every part.

use super::AppError;
use super::run::{
    Outputs, PreparedRun, claim_table_folder, claim_tables, execute_with, plan_file_hash,
};
use crate::evaluate::RunOptions;
use crate::output::CommitSet;
use crate::phase::{Event, Phase, Progress};
use crate::plan::Plan;
use crate::shard::{self, MergedTallies};
use std::path::PathBuf;

/// Options of `vigil merge`.
#[derive(Debug, Clone, Default)]
pub struct MergeRequest {
    /// The plan file every part was run from.
    pub plan: PathBuf,
    /// The partial-results files, in any order.
    pub parts: Vec<PathBuf>,
    pub csv: Option<PathBuf>,
    pub json: Option<PathBuf>,
    /// Every table as its own CSV into this existing folder (as `run --tables`).
    pub tables: Option<PathBuf>,
}

/// Checked, merged parts with their claimed outputs, ready to finish.
pub struct PreparedMerge {
    run: PreparedRun,
    totals: MergedTallies,
    parts: usize,
}

impl PreparedMerge {
    /// Replicates left to simulate: at most those of the search or effort split (the bar's
    /// upper bound; the fixed points are already done).
    pub fn total_replicates(&self) -> u64 {
        let plan = &self.run.plan;
        plan.animals()
            .as_ref()
            .and_then(|_| crate::groups::setups(plan).ok())
            .map(|setups| {
                setups
                    .iter()
                    .map(crate::groups::effort::max_replicates)
                    .sum()
            })
            .unwrap_or(0)
    }
}

/// Loads the plan, claims the outputs, reads and checks every part and merges them.
pub fn prepare_merge(req: &MergeRequest) -> Result<PreparedMerge, AppError> {
    let plan = Plan::load(&req.plan)?;
    let hash = plan_file_hash(&req.plan)?;
    // The plan and every part are inputs: no output may overwrite one of them.
    let mut set = CommitSet::new();
    set.input("plan", &req.plan);
    for part in &req.parts {
        set.input("part", part);
    }
    let (csv, json) = claim_tables(&mut set, req.csv.as_deref(), req.json.as_deref())?;
    let tables = claim_table_folder(&mut set, req.tables.as_deref())?;
    let (plan, totals) = shard::merge_parts(&plan, &req.plan, &hash, &req.parts)?;
    let outputs = Outputs {
        set,
        csv,
        json,
        tables,
    };
    let run = PreparedRun::from_parts(plan, RunOptions::default(), outputs);
    Ok(PreparedMerge {
        run,
        totals,
        parts: req.parts.len(),
    })
}

/// Finishes the merged run (search and effort split), writes the outputs whole and returns
/// the terminal report.
pub fn execute_merge(merge: PreparedMerge, progress: &Progress<'_>) -> Result<String, AppError> {
    progress(Event::Start(Phase::Merge { parts: merge.parts }));
    execute_with(merge.run, progress, Some(&merge.totals))
}
