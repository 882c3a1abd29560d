//! Checkpointed runs: the chunks of the fixed points a run has finished are saved, in the
//! partial-results format (as part 1 of 1, not yet complete), so an interrupted run resumes
//! where it stopped and gives the bytes of an uninterrupted one.
//!
//! The file is replaced by an atomic rename of a fully written and synced temporary file,
//! so it is never half-written, whatever ends the process (SIGKILL included). Saves are
//! spaced so that writing them costs at most about 2% of the run: at least a second apart,
//! and at least 50 times as long apart as the last save took.

use super::ShardError;
use super::merge::{MergedTallies, fold, read_part};
use super::part_file::{Chunk, GroupChunks, PartFile, ScenarioChunks};
use super::points::{Point, fixed_points};
use crate::engine::parallel::{BLOCK_CHUNKS, CHUNK, chunk_count, run_chunks_until};
use crate::evaluate::scenario_kernel;
use crate::groups::grid::{point_kernel, stream_key};
use crate::groups::setups;
use crate::phase::{Event, Phase, Progress};
use crate::plan::Plan;
use std::collections::HashSet;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::{Duration, Instant};

/// Set (by the command line's signal handler) to stop a checkpointed run after its
/// current chunks; the run then saves its checkpoint and returns.
pub static INTERRUPTED: AtomicBool = AtomicBool::new(false);

/// How a checkpointed run of the fixed points ended.
#[derive(Debug)]
pub enum CheckpointOutcome {
    /// Every chunk is done: the totals, as a merge would give them.
    Done(MergedTallies),
    /// Stopped by a signal; `saved` of `total` chunks are in the checkpoint.
    Interrupted { saved: usize, total: usize },
}

/// Reads the checkpoint at `path` for `plan` (at its experiments), or `None` if there is
/// none yet; refuses one of another plan, seed, version or experiments.
pub fn load_checkpoint(
    path: &Path,
    plan: &Plan,
    plan_path: &Path,
    plan_hash: &str,
) -> Result<Option<PartFile>, ShardError> {
    if !path.exists() {
        return Ok(None);
    }
    let file = read_part(path)?;
    let study = plan.study();
    if file.seed != study.seed {
        return Err(ShardError::Seed {
            path: path.into(),
            found: file.seed,
            expected: study.seed,
            plan: plan_path.into(),
        });
    }
    if file.plan_hash != plan_hash {
        return Err(ShardError::Plan {
            path: path.into(),
            found: file.plan_hash,
            expected: plan_hash.into(),
            plan: plan_path.into(),
        });
    }
    let not_this_run = |message: String| ShardError::NotAPart {
        path: path.into(),
        message,
    };
    if file.experiments != study.experiments {
        return Err(not_this_run(format!(
            "the checkpoint is of a run of {} experiments, this run has {}; resume with --experiments {}",
            file.experiments, study.experiments, file.experiments
        )));
    }
    if (file.part, file.parts, file.chunk_size) != (1, 1, CHUNK) {
        return Err(not_this_run(
            "it is a part of a split run, not a checkpoint".into(),
        ));
    }
    let points = fixed_points(plan)?;
    let per_point = chunk_count(study.experiments);
    let scenario_ids: HashSet<u64> = points
        .iter()
        .filter_map(|p| match p {
            Point::Scenario(s) => Some(s.id),
            Point::Group { .. } => None,
        })
        .collect();
    let group_keys: HashSet<(usize, u32, u32)> = points.iter().filter_map(group_key).collect();
    let chunks_ok = |chunks: Vec<u64>| {
        let mut seen = HashSet::new();
        chunks.into_iter().all(|c| c < per_point && seen.insert(c))
    };
    let scenarios_ok = file.scenarios.iter().all(|s| {
        scenario_ids.contains(&s.scenario) && chunks_ok(s.chunks.iter().map(|c| c.chunk).collect())
    });
    let groups_ok = file.groups.iter().all(|g| {
        group_keys.contains(&(g.design_index, g.animals, g.trials))
            && chunks_ok(g.chunks.iter().map(|c| c.chunk).collect())
    });
    if !scenarios_ok || !groups_ok {
        return Err(not_this_run(
            "it holds chunks this run does not have (edited or damaged)".into(),
        ));
    }
    Ok(Some(file))
}

fn group_key(p: &Point) -> Option<(usize, u32, u32)> {
    match *p {
        Point::Group {
            design,
            animals,
            trials,
        } => Some((design, animals, trials)),
        Point::Scenario(_) => None,
    }
}

/// Writes `file` to `path` whole: a synced temporary file renamed over it.
fn save(path: &Path, file: &PartFile) -> Result<(), ShardError> {
    let write = || -> std::io::Result<()> {
        let temp = temp_path(path);
        let mut bytes = serde_json::to_vec(file).map_err(std::io::Error::other)?;
        bytes.push(b'\n');
        let mut f = std::fs::File::create(&temp)?;
        f.write_all(&bytes)?;
        f.sync_all()?;
        std::fs::rename(&temp, path)
    };
    write().map_err(|source| ShardError::Read {
        path: path.into(),
        source,
    })
}

fn temp_path(path: &Path) -> PathBuf {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    path.with_file_name(format!(".{name}.vigil-{}.tmp", std::process::id()))
}

/// Runs every fixed point's missing chunks, saving the checkpoint at `path` as it goes;
/// `resumed` is the checkpoint read back (or `None` to start afresh).
pub fn run_checkpointed(
    plan: &Plan,
    plan_hash: String,
    path: &Path,
    resumed: Option<PartFile>,
    progress: &Progress<'_>,
) -> Result<CheckpointOutcome, ShardError> {
    let study = plan.study();
    let (seed, experiments) = (study.seed, study.experiments);
    let points = fixed_points(plan)?;
    let setups = if plan.animals().is_some() {
        setups(plan)?
    } else {
        Vec::new()
    };
    progress(Event::Start(Phase::Checkpointed {
        resumed: resumed.is_some(),
    }));
    let mut file = resumed.unwrap_or_else(|| PartFile::new(plan_hash, seed, experiments, 1, 1));
    let per_point = chunk_count(experiments);
    let total = points.len() * per_point as usize;
    let mut saver = Saver {
        last: Instant::now(),
        gap: Duration::from_secs(1),
    };
    for point in &points {
        match *point {
            Point::Scenario(ref s) => {
                let at = match file.scenarios.iter().position(|e| e.scenario == s.id) {
                    Some(i) => i,
                    None => {
                        file.scenarios.push(ScenarioChunks {
                            scenario: s.id,
                            design: plan.designs()[s.design].name.clone(),
                            trials: s.trials,
                            chunks: Vec::new(),
                        });
                        file.scenarios.len() - 1
                    }
                };
                let held: HashSet<u64> =
                    file.scenarios[at].chunks.iter().map(|c| c.chunk).collect();
                let todo: Vec<u64> = (0..per_point).filter(|c| !held.contains(c)).collect();
                if todo.is_empty() {
                    continue;
                }
                let kernel = scenario_kernel(plan, s)?;
                for block in todo.chunks(BLOCK_CHUNKS as usize) {
                    let done = run_chunks_until(
                        &kernel,
                        seed,
                        s.id,
                        experiments,
                        block,
                        &INTERRUPTED,
                        progress,
                    );
                    file.scenarios[at].chunks.extend(
                        done.into_iter()
                            .map(|(chunk, tally)| Chunk { chunk, tally }),
                    );
                    if let Some(outcome) = saver.after_block(path, &file, total)? {
                        return Ok(outcome);
                    }
                }
            }
            Point::Group {
                design,
                animals,
                trials,
            } => {
                let found = file.groups.iter().position(|g| {
                    (g.design_index, g.animals, g.trials) == (design, animals, trials)
                });
                let at = match found {
                    Some(i) => i,
                    None => {
                        file.groups.push(GroupChunks {
                            design_index: design,
                            design: setups[design].design.name.clone(),
                            animals,
                            trials,
                            chunks: Vec::new(),
                        });
                        file.groups.len() - 1
                    }
                };
                let held: HashSet<u64> = file.groups[at].chunks.iter().map(|c| c.chunk).collect();
                let todo: Vec<u64> = (0..per_point).filter(|c| !held.contains(c)).collect();
                if todo.is_empty() {
                    continue;
                }
                let kernel = point_kernel(&setups[design], animals, trials)?;
                let key = stream_key(design);
                for block in todo.chunks(BLOCK_CHUNKS as usize) {
                    let done = run_chunks_until(
                        &*kernel,
                        seed,
                        key,
                        experiments,
                        block,
                        &INTERRUPTED,
                        progress,
                    );
                    file.groups[at].chunks.extend(
                        done.into_iter()
                            .map(|(chunk, tally)| Chunk { chunk, tally }),
                    );
                    if let Some(outcome) = saver.after_block(path, &file, total)? {
                        return Ok(outcome);
                    }
                }
            }
        }
    }
    // Every fixed point is saved before the search and effort split start, so an interruption
    // there loses none of them.
    save(path, &file)?;
    let totals = fold(plan, &points, vec![file])?;
    Ok(CheckpointOutcome::Done(totals))
}

/// Spaces the saves and stops at an interruption.
struct Saver {
    last: Instant,
    gap: Duration,
}

impl Saver {
    fn after_block(
        &mut self,
        path: &Path,
        file: &PartFile,
        total: usize,
    ) -> Result<Option<CheckpointOutcome>, ShardError> {
        let interrupted = INTERRUPTED.load(Ordering::Relaxed);
        if interrupted || self.last.elapsed() >= self.gap {
            let start = Instant::now();
            save(path, file)?;
            self.gap = (start.elapsed() * 50).max(Duration::from_secs(1));
            self.last = Instant::now();
        }
        Ok(interrupted.then(|| CheckpointOutcome::Interrupted {
            saved: file.chunk_total(),
            total,
        }))
    }
}

/// Removes the checkpoint once the run's outputs are written.
pub fn remove_checkpoint(path: &Path) {
    // A leftover checkpoint is harmless (a later run without --resume refuses to reuse it
    // silently), so a failed removal is not an error.
    let _ = std::fs::remove_file(path);
}
