//! Simulating one part: only its chunks of every fixed point, each tally kept unmerged.

use super::ShardError;
use super::part_file::{Chunk, GroupChunks, PartFile, ScenarioChunks};
use super::points::{Point, dealt_chunks, fixed_points};
use super::selection::Part;
use crate::engine::parallel::run_chunks;
use crate::evaluate::scenario_kernel;
use crate::groups::grid::{point_kernel, stream_key};
use crate::groups::setups;
use crate::phase::{Event, Phase, Progress};
use crate::plan::Plan;

/// Replicates part `part` of the plan simulates (for a progress bar).
pub fn part_replicates(plan: &Plan, part: Part) -> u64 {
    let experiments = plan.study().experiments;
    let Ok(points) = fixed_points(plan) else {
        return 0;
    };
    dealt_chunks(&points, experiments, |g| part.holds(g))
        .iter()
        .flat_map(|(_, chunks)| chunks)
        .map(|&c| {
            let lo = c * crate::engine::parallel::CHUNK;
            (lo + crate::engine::parallel::CHUNK).min(experiments) - lo
        })
        .sum()
}

/// Simulates part `part` of the plan whose file hashes to `plan_hash`.
pub fn run_part(
    plan: &Plan,
    plan_hash: String,
    part: Part,
    progress: &Progress<'_>,
) -> Result<PartFile, ShardError> {
    let study = plan.study();
    let (seed, experiments) = (study.seed, study.experiments);
    let points = fixed_points(plan)?;
    let setups = if plan.animals().is_some() {
        setups(plan)?
    } else {
        Vec::new()
    };
    let mut file = PartFile::new(plan_hash, seed, experiments, part.index, part.count);
    progress(Event::Start(Phase::Part {
        index: part.index,
        of: part.count,
    }));
    for (point, chunks) in dealt_chunks(&points, experiments, |g| part.holds(g)) {
        match point {
            Point::Scenario(s) => {
                let kernel = scenario_kernel(plan, &s)?;
                let tallies = run_chunks(&kernel, seed, s.id, experiments, &chunks, progress);
                file.scenarios.push(ScenarioChunks {
                    scenario: s.id,
                    design: plan.designs()[s.design].name.clone(),
                    trials: s.trials,
                    chunks: pair(&chunks, tallies),
                });
            }
            Point::Group {
                design,
                animals,
                trials,
            } => {
                let setup = &setups[design];
                let kernel = point_kernel(setup, animals, trials)?;
                let key = stream_key(design);
                let tallies = run_chunks(&*kernel, seed, key, experiments, &chunks, progress);
                file.groups.push(GroupChunks {
                    design_index: design,
                    design: setup.design.name.clone(),
                    animals,
                    trials,
                    chunks: pair(&chunks, tallies),
                });
            }
        }
    }
    Ok(file)
}

fn pair<T>(chunks: &[u64], tallies: Vec<T>) -> Vec<Chunk<T>> {
    chunks
        .iter()
        .zip(tallies)
        .map(|(&chunk, tally)| Chunk { chunk, tally })
        .collect()
}
