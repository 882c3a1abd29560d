//! Groups of animals: between-animal variation (intercepts, random slopes, σ, lapse rate),
//! group-level inference, lapses, and how to split effort between animals and trials.
//!
//! A plan with an `[animals]` table describes a population: every animal's d′ and criterion
//! depart from the plan's by a bivariate-normal deviation ([`population`]). Each simulated
//! study draws its animals, simulates and fits each one ([`animal`] and its three paths),
//! tests the group two-stage (per-animal estimates, then a t test across animals) and, beside
//! it, pools all counts into one fit whose Wald test ignores the variation ([`hypotheses`]),
//! and tallies power and precision ([`kernel`], [`summary`]). A grid runs every animal count
//! × trial count ([`grid`]); with a `[budget]`, the effort split finds the allocations that
//! meet the targets at least cost and the best power for the budget ([`effort`], narrowed by
//! the large-sample [`approximation`] in [`effort_search`]).
//!
//! One job per file; nothing here prints. The model and rules are documented in
//! docs/groups.md.

pub mod animal;
pub mod animal_cells;
pub mod animal_count_search;
pub mod animal_rating;
pub mod animal_yesno;
pub mod approximation;
pub mod effort;
pub mod effort_search;
pub mod grid;
pub mod habituation;
pub mod hypotheses;
pub mod kernel;
pub mod population;
pub mod random_effects;
pub mod summary;

pub use effort::{Allocation, EffortSplit};
pub use hypotheses::GroupTest;
pub use population::Population;
pub use summary::GroupSummary;

use crate::design::goals::Budget;
use crate::model::LapseSpec;
use crate::phase::{Event, Phase, Progress};
use crate::plan::Plan;
use crate::vocab::RateCorrection;
use grid::{DesignSetup, grid_trials, run_point};
use kernel::GroupTally;
use serde::Serialize;
use std::sync::atomic::{AtomicU64, Ordering};
use thiserror::Error;

/// Why group results could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum GroupError {
    #[error("the plan has no [animals] table; group results need one (add [animals] with counts)")]
    NoAnimals,
    #[error(
        "no design can be run within the trial cap of {cap} trials per animal; raise trial_cap or list smaller trial counts"
    )]
    NothingUnderCap { cap: u32 },
    #[error("design \"{design}\": {message}")]
    Model { design: String, message: String },
}

/// One grid point: animals × trials per condition.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GridCell {
    pub animals: u32,
    /// Trials per condition.
    pub trials: u32,
    pub trials_per_animal: u32,
    /// Cost under the plan's `[budget]`, if any.
    pub cost: Option<f64>,
    pub summary: GroupSummary,
}

/// Everything reported for one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignGroups {
    pub design: String,
    pub record: String,
    pub conditions: usize,
    /// Population means (c, d′) of the first condition.
    pub truth_criterion: f64,
    pub truth_d_prime: f64,
    pub animals: Vec<u32>,
    /// Trial counts per condition scanned (the design's, capped).
    pub trials: Vec<u32>,
    /// Whether the cap cut any of the design's trial counts.
    pub capped: bool,
    pub tests: Vec<GroupTest>,
    pub cells: Vec<GridCell>,
    pub effort: Option<EffortSplit>,
    pub notes: Vec<String>,
}

impl DesignGroups {
    /// The grid cell at (animals, trials), if scanned.
    pub fn cell(&self, animals: u32, trials: u32) -> Option<&GridCell> {
        self.cells
            .iter()
            .find(|c| c.animals == animals && c.trials == trials)
    }
}

/// The group report of a plan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupReport {
    pub population: Population,
    pub lapse: Option<LapseSpec>,
    pub alpha: f64,
    pub confidence: f64,
    pub experiments: u64,
    pub rate_correction: RateCorrection,
    /// Most trials one animal receives, in all conditions.
    pub trial_cap: Option<u32>,
    pub budget: Option<Budget>,
    pub designs: Vec<DesignGroups>,
    /// Habituation within the session and the bias it leaves (absent without it).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub habituation: Option<habituation::HabituationReport>,
}

pub fn setups(plan: &Plan) -> Result<Vec<DesignSetup<'_>>, GroupError> {
    let animals = plan.animals().as_ref().ok_or(GroupError::NoAnimals)?;
    let population = Population::from_animals(animals)
        .with_lapse_rate(plan.observer().lapse.map_or(0.0, |l| l.rate));
    Ok(plan
        .designs()
        .iter()
        .enumerate()
        .map(|(index, design)| DesignSetup {
            plan,
            index,
            design,
            tests: hypotheses::group_tests(plan, design).0,
            population,
        })
        .collect())
}

/// Group studies the whole plan may simulate (grid plus the effort split's upper bound), for
/// a progress bar; [`run_groups`] reports exactly this many in total.
pub fn total_group_replicates(plan: &Plan) -> u64 {
    let (Ok(setups), Some(animals)) = (setups(plan), plan.animals().as_ref()) else {
        return 0;
    };
    setups
        .iter()
        .map(|s| {
            let trials = grid_trials(s.design, animals.trial_cap).len() as u64;
            if trials == 0 {
                return 0;
            }
            animals.counts.len() as u64 * trials * plan.study().experiments
                + effort::max_replicates(s)
        })
        .sum()
}

/// Animal datasets (one animal's counts, simulated and fitted) the group part of the plan
/// may fit, per design: the grid's Σ counts × trial counts × experiments, plus the effort
/// split's simulated rows — budget rows at the most animals the budget buys at the design's
/// smallest trial count (at most [`effort_search::MAX_ANIMALS`]), target searches at the
/// grid's largest count. An estimate for the work limit, not a promise.
pub fn animal_datasets_by_design(plan: &Plan) -> Vec<u64> {
    let (Ok(setups), Some(animals)) = (setups(plan), plan.animals().as_ref()) else {
        return vec![0; plan.designs().len()];
    };
    let experiments = plan.study().experiments;
    let largest = u64::from(animals.counts.iter().copied().max().unwrap_or(0));
    setups
        .iter()
        .map(|s| {
            let trials = grid_trials(s.design, animals.trial_cap).len() as u64;
            if trials == 0 {
                return 0;
            }
            let grid: u64 =
                animals.counts.iter().map(|&n| u64::from(n)).sum::<u64>() * trials * experiments;
            let budget_animals = match plan.budget() {
                Some(b) if b.total.is_some() => {
                    let smallest = s.design.trials[0] * s.design.conditions.len() as u32;
                    let each = b.cost(1, smallest);
                    let total = b.total.unwrap_or(0.0);
                    let n = if each > 0.0 {
                        total / each
                    } else {
                        f64::INFINITY
                    };
                    n.min(f64::from(effort_search::MAX_ANIMALS)).max(0.0) as u64
                }
                _ => largest,
            };
            grid.saturating_add(effort::max_animal_datasets(s, budget_animals, largest))
        })
        .collect()
}

/// Runs the grid of every design and, with a `[budget]`, the effort split; `progress` is told
/// how many group studies finished.
pub fn run_groups(plan: &Plan, progress: &Progress<'_>) -> Result<GroupReport, GroupError> {
    run_groups_with(plan, progress, &|_, _, _| None)
}

/// [`run_groups`], taking a grid point's total tally from `stored(design index, animals,
/// trials)` when it has one (the merge of a run split into parts) instead of simulating it.
/// The effort split always simulates: it chooses each point from the last.
pub fn run_groups_with(
    plan: &Plan,
    progress: &Progress<'_>,
    stored: &dyn Fn(usize, u32, u32) -> Option<GroupTally>,
) -> Result<GroupReport, GroupError> {
    let animals = plan.animals().as_ref().ok_or(GroupError::NoAnimals)?;
    let total = total_group_replicates(plan);
    let done = AtomicU64::new(0);
    let counted = |e: Event| {
        if let Event::Done(k) = e {
            done.fetch_add(k, Ordering::Relaxed);
        }
        progress(e);
    };
    let mut designs = Vec::new();
    for setup in setups(plan)? {
        let design = setup.design;
        let (_, mut notes) = hypotheses::group_tests(plan, design);
        let trials = grid_trials(design, animals.trial_cap);
        if trials.is_empty() {
            notes.push(format!(
                "skipped: every trial count is above the cap of {} trials per animal",
                animals.trial_cap.unwrap_or(0)
            ));
        }
        counted(Event::Start(Phase::GroupsGrid {
            design: design.name.clone(),
        }));
        let mut cells = Vec::new();
        for &n_animals in &animals.counts {
            for &n in &trials {
                let summary = match stored(setup.index, n_animals, n) {
                    Some(tally) => grid::summarise_point(&setup, &tally),
                    None => run_point(
                        &setup,
                        n_animals,
                        n,
                        plan.study().experiments,
                        plan.study().seed,
                        &counted,
                    )?,
                };
                cells.push(GridCell {
                    animals: n_animals,
                    trials: n,
                    trials_per_animal: setup.trials_per_animal(n),
                    cost: plan
                        .budget()
                        .map(|b| b.cost(n_animals, setup.trials_per_animal(n))),
                    summary,
                });
            }
        }
        let effort = if trials.is_empty() {
            None
        } else {
            let cache = cells
                .iter()
                .map(|c| ((c.animals, c.trials), c.summary.clone()))
                .collect();
            match effort::effort_split(&setup, &trials, cache, &counted)? {
                Ok(split) => Some(split),
                Err(note) => {
                    if plan.budget().is_some() {
                        notes.push(note);
                    }
                    None
                }
            }
        };
        let (truth_criterion, truth_d_prime) = setup.truth();
        designs.push(DesignGroups {
            design: design.name.clone(),
            record: design.record_label(),
            conditions: design.conditions.len(),
            truth_criterion,
            truth_d_prime,
            animals: animals.counts.clone(),
            capped: design
                .trials
                .iter()
                .any(|t| !trials.contains(t) && trials.last().is_some_and(|l| t > l)),
            trials,
            tests: setup.tests.clone(),
            cells,
            effort,
            notes,
        });
    }
    if designs.iter().all(|d| d.cells.is_empty()) {
        return Err(GroupError::NothingUnderCap {
            cap: animals.trial_cap.unwrap_or(0),
        });
    }
    // Finish the bar: the effort split may need fewer studies than its upper bound.
    let left = total.saturating_sub(done.load(Ordering::Relaxed));
    if left > 0 {
        progress(Event::Skipped(left));
    }
    let habituation = habituation::report(&setups(plan)?, &designs);
    Ok(GroupReport {
        habituation,
        population: Population::from_animals(animals),
        lapse: plan.observer().lapse,
        alpha: plan.study().alpha,
        confidence: plan.study().confidence,
        experiments: plan.study().experiments,
        rate_correction: plan.study().rate_correction,
        trial_cap: animals.trial_cap,
        budget: *plan.budget(),
        designs,
    })
}
