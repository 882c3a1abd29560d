//! Merging the parts of a split run: read and check every file, then fold each point's
//! chunk tallies in chunk order into the totals a whole run would have.

use super::ShardError;
use super::part_file::{FORMAT, FORMAT_VERSION, Header, PartFile, VIGIL_VERSION};
use super::points::{Point, dealt_chunks, fixed_points};
use super::selection::Part;
use crate::engine::parallel::{CHUNK, chunk_count, merge_in_order};
use crate::engine::tally::EstimateTally;
use crate::evaluate::scenario_kernel;
use crate::groups::grid::point_kernel;
use crate::groups::kernel::GroupTally;
use crate::groups::setups;
use crate::plan::{Plan, Scenario};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// The whole run's total tally of every fixed point, rebuilt from its parts.
#[derive(Debug, Clone, Default)]
pub struct MergedTallies {
    scenarios: HashMap<u64, EstimateTally>,
    groups: HashMap<(usize, u32, u32), GroupTally>,
}

impl MergedTallies {
    /// The total tally of a scenario of the table.
    pub fn scenario(&self, s: &Scenario) -> Option<EstimateTally> {
        self.scenarios.get(&s.id).cloned()
    }

    /// The total tally of a group-grid point (design index, animals, trials).
    pub fn group(&self, design: usize, animals: u32, trials: u32) -> Option<GroupTally> {
        self.groups.get(&(design, animals, trials)).cloned()
    }
}

/// Reads one partial-results file, refusing another format or vigil version first.
pub fn read_part(path: &Path) -> Result<PartFile, ShardError> {
    let text = std::fs::read_to_string(path).map_err(|source| ShardError::Read {
        path: path.to_path_buf(),
        source,
    })?;
    let not_a_part = |e: serde_json::Error| ShardError::NotAPart {
        path: path.to_path_buf(),
        message: e.to_string(),
    };
    let header: Header = serde_json::from_str(&text).map_err(not_a_part)?;
    if header.format != FORMAT {
        return Err(ShardError::NotAPart {
            path: path.to_path_buf(),
            message: format!("its format is \"{}\", not \"{FORMAT}\"", header.format),
        });
    }
    if header.format_version != FORMAT_VERSION || header.vigil_version != VIGIL_VERSION {
        return Err(ShardError::Version {
            path: path.to_path_buf(),
            found: header.vigil_version,
            found_format: header.format_version,
            expected: VIGIL_VERSION.into(),
            expected_format: FORMAT_VERSION,
        });
    }
    serde_json::from_str(&text).map_err(not_a_part)
}

/// Reads and checks the parts `paths` of `plan` (loaded from `plan_path`, whose bytes hash
/// to `plan_hash`) and merges them. Returns the plan at the parts' experiments and the
/// totals. Refuses another plan, seed, version or split, a repeated part and missing parts.
pub fn merge_parts(
    plan: &Plan,
    plan_path: &Path,
    plan_hash: &str,
    paths: &[PathBuf],
) -> Result<(Plan, MergedTallies), ShardError> {
    let mut files = Vec::with_capacity(paths.len());
    for path in paths {
        let file = read_part(path)?;
        if file.seed != plan.study().seed {
            return Err(ShardError::Seed {
                path: path.clone(),
                found: file.seed,
                expected: plan.study().seed,
                plan: plan_path.to_path_buf(),
            });
        }
        if file.plan_hash != plan_hash {
            return Err(ShardError::Plan {
                path: path.clone(),
                found: file.plan_hash,
                expected: plan_hash.into(),
                plan: plan_path.to_path_buf(),
            });
        }
        files.push((path.clone(), file));
    }
    let Some((first_path, first)) = files.first() else {
        return Err(ShardError::NoParts);
    };
    let (experiments, parts) = (first.experiments, first.parts);
    for (path, f) in &files {
        let mismatch = |what, found: String, expected: String| ShardError::Mismatch {
            path: path.clone(),
            what,
            found,
            first: first_path.clone(),
            expected,
        };
        if f.experiments != experiments {
            return Err(mismatch(
                "experiments",
                f.experiments.to_string(),
                experiments.to_string(),
            ));
        }
        if f.parts != parts {
            return Err(mismatch(
                "the number of parts (N of --part K/N)",
                f.parts.to_string(),
                parts.to_string(),
            ));
        }
        if f.chunk_size != CHUNK {
            return Err(mismatch(
                "chunk_size",
                f.chunk_size.to_string(),
                CHUNK.to_string(),
            ));
        }
        if f.part == 0 || f.part > parts {
            return Err(ShardError::NotAPart {
                path: path.clone(),
                message: format!("part {} is outside 1..={parts}", f.part),
            });
        }
    }
    let mut seen: HashMap<u32, &PathBuf> = HashMap::new();
    for (path, f) in &files {
        if let Some(other) = seen.insert(f.part, path) {
            return Err(ShardError::Duplicate {
                path: path.clone(),
                other: other.clone(),
                part: f.part,
                parts,
            });
        }
    }
    let missing: Vec<u32> = (1..=parts).filter(|k| !seen.contains_key(k)).collect();
    if !missing.is_empty() {
        let mut given: Vec<u32> = seen.keys().copied().collect();
        given.sort_unstable();
        let list = |v: &[u32]| v.iter().map(u32::to_string).collect::<Vec<_>>().join(", ");
        return Err(ShardError::Missing {
            plural: if missing.len() == 1 { "" } else { "s" },
            missing: list(&missing),
            parts,
            given: list(&given),
        });
    }
    let plan = plan.with_experiments(experiments)?;
    let points = fixed_points(&plan)?;
    for (path, f) in &files {
        check_chunks(&plan, &points, path, f)?;
    }
    let totals = fold(&plan, &points, files.into_iter().map(|(_, f)| f).collect())?;
    Ok((plan, totals))
}

/// Refuses a file whose chunks are not exactly those its part is dealt.
fn check_chunks(
    plan: &Plan,
    points: &[Point],
    path: &Path,
    f: &PartFile,
) -> Result<(), ShardError> {
    let part = Part {
        index: f.part,
        count: f.parts,
    };
    let expected = dealt_chunks(points, plan.study().experiments, |g| part.holds(g));
    let wrong = |point: String| ShardError::WrongChunks {
        path: path.to_path_buf(),
        part: f.part,
        parts: f.parts,
        point,
    };
    let mut scenarios = f.scenarios.iter();
    let mut groups = f.groups.iter();
    for (point, chunks) in &expected {
        match *point {
            Point::Scenario(ref s) => {
                let design = &plan.designs()[s.design].name;
                let label = format!(
                    "scenario {} (design \"{design}\", {} trials)",
                    s.id, s.trials
                );
                let held = scenarios.next().ok_or_else(|| wrong(label.clone()))?;
                let ids: Vec<u64> = held.chunks.iter().map(|c| c.chunk).collect();
                if held.scenario != s.id
                    || held.trials != s.trials
                    || &held.design != design
                    || &ids != chunks
                {
                    return Err(wrong(label));
                }
            }
            Point::Group {
                design,
                animals,
                trials,
            } => {
                let label =
                    format!("group point design {design}, {animals} animals, {trials} trials");
                let held = groups.next().ok_or_else(|| wrong(label.clone()))?;
                let ids: Vec<u64> = held.chunks.iter().map(|c| c.chunk).collect();
                if held.design_index != design
                    || held.animals != animals
                    || held.trials != trials
                    || &ids != chunks
                {
                    return Err(wrong(label));
                }
            }
        }
    }
    if let Some(extra) = scenarios.next() {
        return Err(wrong(format!("scenario {}", extra.scenario)));
    }
    if let Some(extra) = groups.next() {
        return Err(wrong(format!(
            "group point {} animals, {} trials",
            extra.animals, extra.trials
        )));
    }
    Ok(())
}

/// Folds every point's chunks, in chunk order, into its total (the order of a whole run).
pub(super) fn fold(
    plan: &Plan,
    points: &[Point],
    files: Vec<PartFile>,
) -> Result<MergedTallies, ShardError> {
    let per_point = chunk_count(plan.study().experiments) as usize;
    let mut scenario_chunks: HashMap<u64, Vec<Option<EstimateTally>>> = HashMap::new();
    let mut group_chunks: HashMap<(usize, u32, u32), Vec<Option<GroupTally>>> = HashMap::new();
    for f in files {
        for s in f.scenarios {
            let slots = scenario_chunks
                .entry(s.scenario)
                .or_insert_with(|| vec![None; per_point]);
            for c in s.chunks {
                slots[c.chunk as usize] = Some(c.tally);
            }
        }
        for g in f.groups {
            let slots = group_chunks
                .entry((g.design_index, g.animals, g.trials))
                .or_insert_with(|| vec![None; per_point]);
            for c in g.chunks {
                slots[c.chunk as usize] = Some(c.tally);
            }
        }
    }
    let setups = if plan.animals().is_some() {
        setups(plan)?
    } else {
        Vec::new()
    };
    let mut totals = MergedTallies::default();
    // Every part is present and holds exactly its chunks (checked), so no slot is empty.
    for point in points {
        match *point {
            Point::Scenario(ref s) => {
                let kernel = scenario_kernel(plan, s)?;
                let slots = scenario_chunks.remove(&s.id).unwrap_or_default();
                let total = merge_in_order(&kernel, slots.into_iter().flatten());
                totals.scenarios.insert(s.id, total);
            }
            Point::Group {
                design,
                animals,
                trials,
            } => {
                let kernel = point_kernel(&setups[design], animals, trials)?;
                let slots = group_chunks
                    .remove(&(design, animals, trials))
                    .unwrap_or_default();
                let total = merge_in_order(&*kernel, slots.into_iter().flatten());
                totals.groups.insert((design, animals, trials), total);
            }
        }
    }
    Ok(totals)
}
