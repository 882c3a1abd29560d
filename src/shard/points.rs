//! The fixed points of a plan (scenarios of the table, animals × trials points of the group
//! grid), in plan order, and how many chunks each has: what a split run deals out.

use crate::engine::parallel::chunk_count;
use crate::groups::grid::grid_trials;
use crate::groups::{GroupError, setups};
use crate::plan::{Plan, Scenario};

/// One fixed point of a plan.
#[derive(Debug, Clone, PartialEq)]
pub enum Point {
    Scenario(Scenario),
    /// A group-grid point: design index, animals, trials per condition.
    Group {
        design: usize,
        animals: u32,
        trials: u32,
    },
}

/// Every fixed point a whole run simulates, in the run's order: the table's scenarios, then
/// (with `[animals]`) each design's grid, animal counts outer and trial counts inner.
pub fn fixed_points(plan: &Plan) -> Result<Vec<Point>, GroupError> {
    let mut out: Vec<Point> = plan.scenarios().into_iter().map(Point::Scenario).collect();
    if let Some(animals) = plan.animals() {
        let mut any = false;
        for setup in setups(plan)? {
            let trials = grid_trials(setup.design, animals.trial_cap);
            any |= !trials.is_empty();
            for &n_animals in &animals.counts {
                for &n in &trials {
                    out.push(Point::Group {
                        design: setup.index,
                        animals: n_animals,
                        trials: n,
                    });
                }
            }
        }
        if !any {
            return Err(GroupError::NothingUnderCap {
                cap: animals.trial_cap.unwrap_or(0),
            });
        }
    }
    Ok(out)
}

/// The chunks of each point that `holds` selects, numbering (point, chunk) pairs from 0 in
/// plan order; points with none are left out.
pub fn dealt_chunks(
    points: &[Point],
    experiments: u64,
    holds: impl Fn(u64) -> bool,
) -> Vec<(Point, Vec<u64>)> {
    let per_point = chunk_count(experiments);
    points
        .iter()
        .enumerate()
        .filter_map(|(i, p)| {
            let first = i as u64 * per_point;
            let chunks: Vec<u64> = (0..per_point).filter(|c| holds(first + c)).collect();
            (!chunks.is_empty()).then_some((p.clone(), chunks))
        })
        .collect()
}
