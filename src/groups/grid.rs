//! The grid over animals × trials per animal, and the one function that simulates a group
//! study at any (animals, trials) point: the grid and the effort split both call it, so the
//! same point always gives the same numbers.

use super::GroupError;
use super::animal::AnimalPath;
use super::animal_cells::CellsAnimals;
use super::animal_rating::RatingAnimals;
use super::animal_yesno::YesNoAnimals;
use super::habituation::HabituatedYesNo;
use super::hypotheses::GroupTest;
use super::kernel::{GroupKernel, GroupTally};
use super::population::Population;
use super::summary::{GroupSummary, summarise};
use crate::analytic::trial_grid::fits_design;
use crate::design::{Design, Response, Route, split_trials};
use crate::engine::parallel::{Kernel, run_replicates};
use crate::phase::Progress;
use crate::plan::Plan;

/// Everything one design fixes for its group studies.
#[derive(Debug, Clone)]
pub struct DesignSetup<'a> {
    pub plan: &'a Plan,
    /// Position of the design in the plan (part of every stream key).
    pub index: usize,
    pub design: &'a Design,
    pub tests: Vec<GroupTest>,
    pub population: Population,
}

impl DesignSetup<'_> {
    /// Population means (c, d′) of the first condition: what the group means estimate.
    pub fn truth(&self) -> (f64, f64) {
        let c = &self.design.conditions[0];
        (c.criterion, c.d_prime)
    }

    /// Trials one animal receives at `trials` per condition.
    pub fn trials_per_animal(&self, trials: u32) -> u32 {
        trials.saturating_mul(self.design.conditions.len() as u32)
    }
}

/// Random-stream key of a design's group studies: the top bit keeps it apart from the
/// engine's scenario ids, the design's position (15 bits) below. The key names neither the
/// animals nor the trials: every (animals, trials) point draws replicate r from the same
/// stream, and the kernel gives each animal its own seed from it, so N animals are the first
/// N of N + 1 (common random numbers for the search over animal counts).
pub fn stream_key(design: usize) -> u64 {
    (1 << 63) | ((design as u64 & 0x7FFF) << 48)
}

/// Largest trials per condition the cap allows: ⌊cap / conditions⌋ (the cap counts every
/// trial an animal receives, in all conditions).
pub fn per_condition_cap(design: &Design, cap: Option<u32>) -> Option<u32> {
    cap.map(|c| c / design.conditions.len() as u32)
}

/// The trial counts per condition the grid scans: the design's counts, each capped at the
/// cap (so counts above it collapse onto the cap itself), without counts the design cannot
/// be run at.
pub fn grid_trials(design: &Design, cap: Option<u32>) -> Vec<u32> {
    let limit = per_condition_cap(design, cap).unwrap_or(u32::MAX);
    let mut out: Vec<u32> = design
        .trials
        .iter()
        .map(|&t| t.min(limit))
        .filter(|&t| fits_design(design, t))
        .collect();
    out.sort_unstable();
    out.dedup();
    out
}

/// Simulates `replicates` group studies of `animals` animals at `trials` per condition,
/// on the stream of (seed, stream_key(design)).
pub fn run_point(
    setup: &DesignSetup,
    animals: u32,
    trials: u32,
    replicates: u64,
    seed: u64,
    progress: &Progress<'_>,
) -> Result<GroupSummary, GroupError> {
    let kernel = point_kernel(setup, animals, trials)?;
    let tally = run_replicates(
        &*kernel,
        seed,
        stream_key(setup.index),
        replicates,
        progress,
    );
    Ok(summarise_point(setup, &tally))
}

/// The summary of a point's total tally.
pub fn summarise_point(setup: &DesignSetup, tally: &GroupTally) -> GroupSummary {
    summarise(&setup.tests, tally, setup.truth())
}

/// A group kernel behind a pointer: one call per simulated study, so the indirection costs
/// nothing measurable beside the study's animal fits.
pub type PointKernel = Box<dyn Kernel<Tally = GroupTally>>;

/// The kernel of group studies of `animals` animals at `trials` per condition, by the route
/// of a single subject of the design (the one rule, design::Route).
pub fn point_kernel(
    setup: &DesignSetup,
    animals: u32,
    trials: u32,
) -> Result<PointKernel, GroupError> {
    let plan = setup.plan;
    let design = setup.design;
    let correction = plan.study().rate_correction;
    let condition = &design.conditions[0];
    let split = split_trials(trials, condition.presence);
    Ok(match (Route::of(design), &design.response) {
        (Route::YesNoClosedForm, _) => match habituation(plan) {
            // Validated: habituation is active only where every design is one-condition yes/no.
            Some(h) => {
                let path = HabituatedYesNo::new(plan.observer(), condition, split, correction, h);
                boxed(path, setup, animals)
            }
            None => {
                let path = YesNoAnimals::new(plan.observer(), condition, split, correction);
                boxed(path, setup, animals)
            }
        },
        (Route::RatingFastPath, Response::Rating(scale)) => {
            let path = RatingAnimals::new(scale, condition, plan.observer(), split, correction);
            boxed(path, setup, animals)
        }
        _ => {
            let path =
                CellsAnimals::new(design, plan.observer(), trials, correction).map_err(|e| {
                    GroupError::Model {
                        design: design.name.clone(),
                        message: e.to_string(),
                    }
                })?;
            boxed(path, setup, animals)
        }
    })
}

/// The plan's habituation when it changes anything; `None` keeps today's path bit for bit.
pub fn habituation(plan: &Plan) -> Option<crate::design::habituation::Habituation> {
    plan.animals()
        .as_ref()
        .and_then(|a| a.habituation)
        .filter(|h| h.active())
}

fn boxed<P: AnimalPath + 'static>(path: P, setup: &DesignSetup, animals: u32) -> PointKernel {
    let study = &setup.plan.study();
    let kernel = GroupKernel::new(
        path,
        setup.population,
        animals,
        setup.tests.clone(),
        study.alpha,
        study.confidence,
        setup.truth(),
    );
    let nodes = setup.plan.animals().as_ref().and_then(|a| a.random_effects);
    Box::new(match nodes {
        Some(n) => kernel.with_random_effects(n),
        None => kernel,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::{BaseRate, Condition, RecordKind};

    fn design(trials: Vec<u32>, conditions: usize) -> Design {
        let c = |i: usize| Condition {
            name: format!("c{i}"),
            presence: 0.5,
            d_prime: 1.0,
            criterion: 0.0,
        };
        Design {
            name: "d".into(),
            presence: 0.5,
            trials,
            response: Response::YesNo,
            record: RecordKind::Full,
            base_rate: BaseRate::Known,
            conditions: (0..conditions).map(c).collect(),
            shared: Vec::new(),
        }
    }

    #[test]
    fn counts_above_the_cap_collapse_onto_it() {
        let d = design(vec![20, 40, 80, 160], 1);
        assert_eq!(grid_trials(&d, Some(60)), vec![20, 40, 60]);
        assert_eq!(grid_trials(&d, Some(40)), vec![20, 40]);
        assert_eq!(grid_trials(&d, None), vec![20, 40, 80, 160]);
        // Two conditions share the cap: 100 trials per animal → 50 per condition.
        let two = design(vec![20, 40, 80], 2);
        assert_eq!(grid_trials(&two, Some(100)), vec![20, 40, 50]);
    }

    #[test]
    fn stream_keys_are_distinct_and_apart_from_scenario_ids() {
        let a = stream_key(0);
        assert_ne!(a, stream_key(1));
        assert!(a >= 1 << 63 && stream_key(0x7FFF) >= 1 << 63);
    }
}
