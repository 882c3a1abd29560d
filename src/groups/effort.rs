//! The effort split: how to divide a budget between animals and trials per animal.
//!
//! 1. The approximation ([`super::effort_search`]) scans every trial count between the
//!    design's smallest listed count and the cap (or `max_trials`): with a budget, the
//!    animals it buys there and their power; with targets, the fewest animals that meet them
//!    and their cost.
//! 2. A short frontier of trial counts (the approximate best, the ends of the range and the
//!    grid's counts, at most [`MAX_ROWS`]) is simulated in full: every row's power is a Monte
//!    Carlo figure with its Wilson interval.
//! 3. Best for the budget: the row with the highest simulated power of the weakest driving
//!    test; the approximate best keeps its place unless another row beats it by more than
//!    2 Monte Carlo SEs (the power curve is flat near its top, so noise must not pick).
//! 4. With targets: at every frontier trial count (the approximate least cost and the
//!    approximate fewest animals among them), the fewest animals are searched by Monte Carlo
//!    on common random numbers ([`super::animal_count_search`]): each row meets every target
//!    and one animal fewer does not. Only such rows are listed; the least cost is the
//!    cheapest of them, the fewest animals the row with the fewest (ties: the cheaper).

use super::GroupError;
use super::animal_count_search::{Cache, Confirm, Fewest, MAX_EVALUATIONS, fewest_animals};
use super::approximation::Approximation;
use super::effort_search::{Goals, Search, best_for_budget, candidate_trials, goals, least_cost};
use super::grid::{DesignSetup, per_condition_cap};
use super::summary::GroupSummary;
use crate::design::goals::Budget;
use crate::engine::{Figure, Share};
use crate::phase::{Event, Phase, Progress};
use serde::Serialize;

/// Most frontier rows simulated per mode.
pub const MAX_ROWS: usize = 7;

/// A test that drives the search.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Goal {
    pub name: String,
    pub target: Option<f64>,
}

/// One allocation: animals × trials, its cost, approximate and simulated figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Allocation {
    pub animals: u32,
    /// Trials per condition.
    pub trials: u32,
    pub trials_per_animal: u32,
    pub cost: f64,
    /// Approximate power of each driving test.
    pub approx_power: Vec<f64>,
    /// Simulated power of each driving test (two-stage).
    pub power: Vec<Share>,
    pub criterion_half_width: Figure,
    pub d_prime_half_width: Figure,
    /// Whether the simulation meets every target (`None` without targets).
    pub meets_targets: Option<bool>,
    /// Fewest-animals rows: ± animals of Monte Carlo uncertainty of the count.
    pub band: Option<u32>,
    /// Fewest-animals rows: the same trial count with one animal fewer, on the same
    /// simulated studies (`None` when the row is the smallest study the test allows).
    pub one_fewer: Option<EffortShortfall>,
    pub summary: GroupSummary,
}

/// The simulated figures of one animal fewer than a fewest-animals row.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EffortShortfall {
    pub animals: u32,
    pub power: Vec<Share>,
    pub criterion_half_width: Figure,
    pub d_prime_half_width: Figure,
    pub meets_targets: Option<bool>,
}

impl EffortShortfall {
    /// The figures of a simulated allocation.
    pub fn of(a: &Allocation) -> Self {
        Self {
            animals: a.animals,
            power: a.power.clone(),
            criterion_half_width: a.criterion_half_width,
            d_prime_half_width: a.d_prime_half_width,
            meets_targets: a.meets_targets,
        }
    }

    /// The simulated power of the weakest driving test.
    pub fn weakest(&self) -> Option<Share> {
        self.power
            .iter()
            .copied()
            .min_by(|a, b| a.value.total_cmp(&b.value))
    }
}

impl Allocation {
    /// The simulated power of the weakest driving test.
    pub fn weakest(&self) -> Option<Share> {
        self.power
            .iter()
            .copied()
            .min_by(|a, b| a.value.total_cmp(&b.value))
    }
}

/// The effort split of one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EffortSplit {
    pub budget: Budget,
    /// Trials per condition searched: [smallest, largest].
    pub trials_range: [u32; 2],
    pub goals: Vec<Goal>,
    pub criterion_half_width: Option<f64>,
    pub d_prime_half_width: Option<f64>,
    /// With a budget total: the most animals it buys at each frontier trial count.
    pub budget_frontier: Vec<Allocation>,
    /// Index of the best row of `budget_frontier`.
    pub best_for_budget: Option<usize>,
    /// With targets: at each frontier trial count, the fewest animals whose simulation
    /// meets every target (one fewer does not). Only rows that meet them.
    pub target_frontier: Vec<Allocation>,
    /// Index of the cheapest row of `target_frontier`.
    pub least_cost: Option<usize>,
    /// Index of the row of `target_frontier` with the fewest animals (ties: the cheaper).
    pub fewest_animals: Option<usize>,
    pub notes: Vec<String>,
}

/// Animal datasets the effort split of one design may fit, for the work estimate: the
/// budget rows at `budget_animals` animals each, the target searches at `target_animals`.
pub fn max_animal_datasets(setup: &DesignSetup, budget_animals: u64, target_animals: u64) -> u64 {
    let Some(budget) = *setup.plan.budget() else {
        return 0;
    };
    let g = goals(setup);
    let experiments = setup.plan.study().experiments;
    let mut n = 0u64;
    if budget.total.is_some() && !g.tests.is_empty() {
        n = n.saturating_add((MAX_ROWS as u64 * experiments).saturating_mul(budget_animals));
    }
    if g.has_targets() {
        n = n.saturating_add(
            (MAX_ROWS as u64 * MAX_EVALUATIONS * experiments).saturating_mul(target_animals),
        );
    }
    n
}

/// Replicates the effort split of one design may simulate at most.
pub fn max_replicates(setup: &DesignSetup) -> u64 {
    let Some(budget) = *setup.plan.budget() else {
        return 0;
    };
    let g = goals(setup);
    let mut evaluations = 0;
    if budget.total.is_some() && !g.tests.is_empty() {
        evaluations += MAX_ROWS as u64;
    }
    if g.has_targets() {
        evaluations += MAX_ROWS as u64 * MAX_EVALUATIONS;
    }
    evaluations * setup.plan.study().experiments
}

/// The frontier's trial counts: the ends of the line, the counts to `keep` (the best ones)
/// and the grid's counts, thinned to [`MAX_ROWS`] by dropping the count with the closest
/// neighbours (log scale); the ends and the kept counts stay.
pub fn frontier_trials(line: &[u32], keep: &[u32], grid: &[u32]) -> Vec<u32> {
    let (Some(&first), Some(&last)) = (line.first(), line.last()) else {
        return Vec::new();
    };
    let mut rows: Vec<u32> = vec![first, last];
    rows.extend(keep.iter().filter(|t| line.contains(t)));
    rows.extend(grid.iter().filter(|t| line.contains(t)));
    rows.sort_unstable();
    rows.dedup();
    while rows.len() > MAX_ROWS {
        let gap = |i: usize| (f64::from(rows[i + 1]) / f64::from(rows[i - 1])).ln();
        let drop = (1..rows.len() - 1)
            .filter(|&i| !keep.contains(&rows[i]))
            .min_by(|&i, &k| gap(i).total_cmp(&gap(k)));
        match drop {
            Some(i) => {
                rows.remove(i);
            }
            None => break,
        }
    }
    rows
}

/// The trial counts per condition the split searches: the design's smallest listed count to
/// the cap (or `max_trials`).
pub fn search_range(setup: &DesignSetup) -> [u32; 2] {
    let plan = setup.plan;
    let design = setup.design;
    let cap = per_condition_cap(design, plan.animals().as_ref().and_then(|a| a.trial_cap));
    let hi = cap
        .unwrap_or(plan.study().max_trials)
        .min(plan.study().max_trials);
    [design.trials.first().copied().unwrap_or(2).min(hi), hi]
}

/// The approximate search of a design at `trials` per condition (empty: every candidate
/// count of [`search_range`]).
pub fn approximate_search<'a>(
    setup: &'a DesignSetup,
    approximation: &Approximation,
    goals: &'a Goals,
    budget: Budget,
    trials: &[u32],
) -> Search<'a> {
    let candidates = if trials.is_empty() {
        let [lo, hi] = search_range(setup);
        candidate_trials(setup.design, lo, hi)
    } else {
        trials.to_vec()
    };
    let plan = setup.plan;
    Search::new(
        approximation,
        &setup.tests,
        goals,
        budget,
        setup.design.conditions.len() as u32,
        plan.study().alpha,
        plan.study().confidence,
        &candidates,
    )
}

/// Runs the effort split of one design; `Ok(Err(note))` says why there is none.
pub fn effort_split(
    setup: &DesignSetup,
    grid: &[u32],
    cache: Cache,
    progress: &Progress<'_>,
) -> Result<Result<EffortSplit, String>, GroupError> {
    let plan = setup.plan;
    let Some(budget) = *plan.budget() else {
        return Ok(Err("no [budget] table, so no effort split".into()));
    };
    let goals = goals(setup);
    if goals.tests.is_empty() && !goals.has_targets() {
        return Ok(Err(
            "no effort split: no hypothesis is off its null and no half-width target is set".into(),
        ));
    }
    if budget.total.is_none() && !goals.has_targets() {
        return Ok(Err(
            "no effort split: give [budget] a total, or set a power or half-width target".into(),
        ));
    }
    let design = setup.design;
    let Some(approximation) = Approximation::new(design, plan.observer(), setup.population) else {
        return Ok(Err(
            "no effort split: the design's expected information could not be computed".into(),
        ));
    };
    progress(Event::Start(Phase::EffortSplit {
        design: design.name.clone(),
    }));
    let [lo, hi] = search_range(setup);
    let search = approximate_search(setup, &approximation, &goals, budget, &[]);
    let mut split = EffortSplit {
        budget,
        trials_range: [lo, hi],
        goals: goals
            .tests
            .iter()
            .zip(&goals.power)
            .map(|(&i, &target)| Goal {
                name: setup.tests[i].name.clone(),
                target,
            })
            .collect(),
        criterion_half_width: goals.criterion_half_width,
        d_prime_half_width: goals.d_prime_half_width,
        budget_frontier: Vec::new(),
        best_for_budget: None,
        target_frontier: Vec::new(),
        least_cost: None,
        fewest_animals: None,
        notes: Vec::new(),
    };
    let mut confirm = Confirm {
        setup,
        goals: &goals,
        cache,
        progress,
    };
    if budget.total.is_some() && !goals.tests.is_empty() {
        budget_mode(&search, grid, &mut confirm, &mut split)?;
    }
    if goals.has_targets() {
        target_mode(&search, grid, &mut confirm, &mut split)?;
    }
    Ok(Ok(split))
}

fn budget_mode(
    search: &Search,
    grid: &[u32],
    confirm: &mut Confirm,
    split: &mut EffortSplit,
) -> Result<(), GroupError> {
    let line = search.budget_line();
    let Some(best) = best_for_budget(&line) else {
        split.notes.push(format!(
            "the budget buys fewer than {} animals at every trial count searched",
            search.min_animals
        ));
        return Ok(());
    };
    let counts: Vec<u32> = line.iter().map(|a| a.trials).collect();
    let rows = frontier_trials(&counts, &[line[best].trials], grid);
    for n in &rows {
        if let Some(a) = line.iter().find(|a| a.trials == *n) {
            split.budget_frontier.push(confirm.run(a)?);
        }
    }
    let rows = &split.budget_frontier;
    let approx_best = rows.iter().position(|r| r.trials == line[best].trials);
    let weakest = |i: usize| rows[i].weakest().map_or(f64::NEG_INFINITY, |s| s.value);
    let mc_se = |i: usize| {
        let p = weakest(i).clamp(0.0, 1.0);
        (p * (1.0 - p) / rows[i].summary.studies.max(1) as f64).sqrt()
    };
    let simulated_best = (0..rows.len()).max_by(|&i, &k| weakest(i).total_cmp(&weakest(k)));
    split.best_for_budget = match (approx_best, simulated_best) {
        (Some(a), Some(s)) if weakest(s) - weakest(a) > 2.0 * mc_se(a).hypot(mc_se(s)) => Some(s),
        (Some(a), _) => Some(a),
        (None, s) => s,
    };
    Ok(())
}

fn target_mode(
    search: &Search,
    grid: &[u32],
    confirm: &mut Confirm,
    split: &mut EffortSplit,
) -> Result<(), GroupError> {
    let line = search.target_line();
    let Some(best) = least_cost(&line) else {
        split.notes.push(format!(
            "no allocation up to {} animals meets the targets at any trial count searched",
            super::effort_search::MAX_ANIMALS
        ));
        return Ok(());
    };
    // The approximation's fewest animals (ties: the cheaper) joins the frontier.
    let fewest = (0..line.len())
        .min_by(|&i, &k| {
            let (a, b) = (&line[i], &line[k]);
            a.animals.cmp(&b.animals).then(a.cost.total_cmp(&b.cost))
        })
        .unwrap_or(best);
    let counts: Vec<u32> = line.iter().map(|a| a.trials).collect();
    let rows = frontier_trials(&counts, &[line[best].trials, line[fewest].trials], grid);
    for n in &rows {
        let (Some(a), Some(c)) = (line.iter().find(|a| a.trials == *n), search.candidate(*n))
        else {
            continue;
        };
        match fewest_animals(search, c, a.animals, confirm)? {
            Fewest::Found(row) => split.target_frontier.push(row),
            Fewest::NotReached(row) => split.notes.push(format!(
                "at {} trials per animal even {} simulated animals fall short of the targets",
                row.trials_per_animal, row.animals
            )),
        }
    }
    let rows = &split.target_frontier;
    split.least_cost = (0..rows.len()).min_by(|&i, &k| {
        let (a, b) = (&rows[i], &rows[k]);
        a.cost.total_cmp(&b.cost).then(a.animals.cmp(&b.animals))
    });
    split.fewest_animals = (0..rows.len()).min_by(|&i, &k| {
        let (a, b) = (&rows[i], &rows[k]);
        a.animals.cmp(&b.animals).then(a.cost.total_cmp(&b.cost))
    });
    if split.least_cost.is_none() {
        split.notes.push(
            "no simulated allocation met every target; raise the cap, the budget or max_trials"
                .into(),
        );
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn frontier_keeps_ends_best_and_grid_within_the_row_limit() {
        let line: Vec<u32> = (20..=200).collect();
        let rows = frontier_trials(&line, &[57], &[20, 40, 80, 160, 320]);
        assert_eq!(rows, vec![20, 40, 57, 80, 160, 200]);
        let many: Vec<u32> = (10..=30).step_by(2).collect();
        let rows = frontier_trials(&line, &[57, 21], &many);
        assert!(rows.len() <= MAX_ROWS);
        assert!(rows.contains(&57) && rows.contains(&21));
        assert!(rows.contains(&20) && rows.contains(&200));
        assert!(frontier_trials(&[], &[5], &[5]).is_empty());
    }
}
