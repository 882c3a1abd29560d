//! The approximate search behind the effort split: for every candidate trial count, how many
//! animals the budget buys (or the targets need), and the approximate power there.
//!
//! The cost of a study is N·(a + t·n·J) for N animals, n trials per condition, J conditions,
//! a per animal and t per trial (`Budget::cost`). Power rises with N at fixed n, so
//! - with a budget, the best allocation at n spends it: N = ⌊total/(a + t·n·J)⌋;
//! - with targets, the cheapest at n is the smallest N that meets them (found by bisection).
//!
//! The best trial count is then the one with the highest approximate power (budget) or the
//! lowest cost (targets). For one criterion test this reproduces the classical two-stage
//! optimum n* = √(a·w/(t·s²)), with w/n the within-animal and s² the between-animal variance
//! (Cochran, *Sampling Techniques*, 3rd ed., 1977, ch. 10, from memory).

use super::approximation::{Approximation, group_half_width, group_power};
use super::grid::DesignSetup;
use super::hypotheses::GroupTest;
use crate::analytic::trial_grid::{fits_design, log_spaced};
use crate::design::Design;
use crate::design::goals::Budget;
use crate::vocab::Quantity;

/// Most animals the search considers (the plan format's limit).
pub const MAX_ANIMALS: u32 = 100_000;
/// Candidate trial counts are every count in range when there are at most this many, else
/// this many log-spaced counts plus the design's listed ones.
pub const SEARCH_POINTS: usize = 400;

/// What the allocation must achieve.
#[derive(Debug, Clone, PartialEq)]
pub struct Goals {
    /// Indices (into the design's tests) of the tests that drive the search.
    pub tests: Vec<usize>,
    /// Power target of each driving test, if any.
    pub power: Vec<Option<f64>>,
    /// Largest half-width of the group mean of c and of d′.
    pub criterion_half_width: Option<f64>,
    pub d_prime_half_width: Option<f64>,
}

impl Goals {
    /// Whether anything is a target (rather than only something to maximise).
    pub fn has_targets(&self) -> bool {
        self.power.iter().any(Option::is_some)
            || self.criterion_half_width.is_some()
            || self.d_prime_half_width.is_some()
    }
}

/// The tests and targets that drive the split: tests whose population is off their null
/// (those with a power target, if any has one), and half-width targets for the group means.
pub fn goals(setup: &DesignSetup) -> Goals {
    let live: Vec<usize> = (0..setup.tests.len())
        .filter(|&i| !setup.tests[i].null_is_true())
        .collect();
    let targeted: Vec<usize> = live
        .iter()
        .copied()
        .filter(|&i| setup.tests[i].target.is_some())
        .collect();
    let tests = if targeted.is_empty() { live } else { targeted };
    let half = |q: Quantity| {
        setup
            .plan
            .targets()
            .half_width
            .iter()
            .find(|(x, _)| *x == q)
            .map(|(_, w)| *w)
    };
    Goals {
        power: tests.iter().map(|&i| setup.tests[i].target).collect(),
        tests,
        criterion_half_width: half(Quantity::Criterion),
        d_prime_half_width: half(Quantity::DPrime),
    }
}

/// One candidate trial count with its per-animal variances.
#[derive(Debug, Clone, PartialEq)]
pub struct Candidate {
    pub trials: u32,
    /// Per driving test: (effect δ, per-animal variance v = b + w).
    pub tests: Vec<(f64, f64)>,
    pub criterion_var: Option<f64>,
    pub d_prime_var: Option<f64>,
}

/// The approximate figures of an allocation.
#[derive(Debug, Clone, PartialEq)]
pub struct Approximate {
    pub animals: u32,
    pub trials: u32,
    pub cost: f64,
    /// Per driving test.
    pub power: Vec<f64>,
    pub criterion_half_width: f64,
    pub d_prime_half_width: f64,
}

impl Approximate {
    /// The weakest driving test's power (what "best power" maximises).
    pub fn weakest(&self) -> f64 {
        self.power.iter().copied().fold(f64::INFINITY, f64::min)
    }

    /// Whether every target is met.
    pub fn meets(&self, goals: &Goals) -> bool {
        self.power
            .iter()
            .zip(&goals.power)
            .all(|(p, t)| t.is_none_or(|t| *p >= t))
            && goals
                .criterion_half_width
                .is_none_or(|t| self.criterion_half_width <= t)
            && goals
                .d_prime_half_width
                .is_none_or(|t| self.d_prime_half_width <= t)
    }
}

/// The approximate search over one design.
pub struct Search<'a> {
    pub tests: &'a [GroupTest],
    pub goals: &'a Goals,
    pub budget: Budget,
    pub conditions: u32,
    pub alpha: f64,
    pub level: f64,
    /// Fewest animals a study may have (4 when a group difference splits them).
    pub min_animals: u32,
    pub candidates: Vec<Candidate>,
}

/// Candidate trial counts per condition: from `lo` to `hi`, runnable by the design.
pub fn candidate_trials(design: &Design, lo: u32, hi: u32) -> Vec<u32> {
    let (lo, hi) = (lo.min(hi), hi.max(lo));
    let mut out: Vec<u32> = if (hi - lo) as usize <= SEARCH_POINTS {
        (lo..=hi).collect()
    } else {
        let mut v = log_spaced(lo, hi, SEARCH_POINTS);
        v.extend(design.trials.iter().filter(|&&t| (lo..=hi).contains(&t)));
        v
    };
    out.retain(|&t| fits_design(design, t));
    out.sort_unstable();
    out.dedup();
    out
}

impl<'a> Search<'a> {
    /// Evaluates the per-animal variances at every candidate count.
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        approximation: &Approximation,
        tests: &'a [GroupTest],
        goals: &'a Goals,
        budget: Budget,
        conditions: u32,
        alpha: f64,
        level: f64,
        trials: &[u32],
    ) -> Self {
        let driving: Vec<&GroupTest> = goals.tests.iter().map(|&i| &tests[i]).collect();
        let owned: Vec<GroupTest> = driving.iter().map(|t| (*t).clone()).collect();
        let effects: Vec<Option<f64>> = driving.iter().map(|t| approximation.effect(t)).collect();
        let between: Vec<f64> = driving.iter().map(|t| approximation.between(t)).collect();
        let pop = approximation_population(approximation);
        let candidates = trials
            .iter()
            .filter_map(|&n| {
                let w = approximation.within(&owned, n);
                let tests = w
                    .tests
                    .iter()
                    .zip(&effects)
                    .zip(&between)
                    .map(|((w, d), b)| Some(((*d)?, b + (*w)?)))
                    .collect::<Option<Vec<_>>>()?;
                Some(Candidate {
                    trials: n,
                    tests,
                    criterion_var: w.criterion.map(|v| v + pop.0),
                    d_prime_var: w.d_prime.map(|v| v + pop.1),
                })
            })
            .collect();
        let min_animals = if driving.iter().any(|t| t.two_populations()) {
            4
        } else {
            2
        };
        Self {
            tests,
            goals,
            budget,
            conditions,
            alpha,
            level,
            min_animals,
            candidates,
        }
    }

    /// The approximate figures of `animals` animals at candidate `c`.
    pub fn evaluate(&self, c: &Candidate, animals: u32) -> Approximate {
        let power = self
            .goals
            .tests
            .iter()
            .zip(&c.tests)
            .map(|(&i, &(delta, v))| group_power(&self.tests[i], animals, v, delta, self.alpha))
            .collect();
        let hw =
            |v: Option<f64>| v.map_or(f64::INFINITY, |v| group_half_width(animals, v, self.level));
        Approximate {
            animals,
            trials: c.trials,
            cost: self.budget.cost(animals, c.trials * self.conditions),
            power,
            criterion_half_width: hw(c.criterion_var),
            d_prime_half_width: hw(c.d_prime_var),
        }
    }

    /// Animals the budget's total buys at `trials` per condition (None without a total).
    pub fn affordable(&self, trials: u32) -> Option<u32> {
        let total = self.budget.total?;
        let each = self.budget.cost(1, trials * self.conditions);
        let n = if each > 0.0 {
            (total / each + 1e-9).floor().min(f64::from(MAX_ANIMALS))
        } else {
            f64::from(MAX_ANIMALS)
        };
        Some(n as u32)
    }

    /// The smallest number of animals meeting the targets at `c`, by bisection (power and
    /// precision improve with N); `None` if even [`MAX_ANIMALS`] falls short.
    pub fn required(&self, c: &Candidate) -> Option<u32> {
        if !self.evaluate(c, MAX_ANIMALS).meets(self.goals) {
            return None;
        }
        let (mut lo, mut hi) = (self.min_animals, MAX_ANIMALS);
        if self.evaluate(c, lo).meets(self.goals) {
            return Some(lo);
        }
        while hi - lo > 1 {
            let mid = lo + (hi - lo) / 2;
            if self.evaluate(c, mid).meets(self.goals) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        Some(hi)
    }

    /// Budget mode: at every count, the animals the budget buys; the best by weakest power
    /// (ties: the cheaper). Empty when the budget buys too few animals everywhere.
    pub fn budget_line(&self) -> Vec<Approximate> {
        self.candidates
            .iter()
            .filter_map(|c| {
                let n = self.affordable(c.trials)?;
                (n >= self.min_animals).then(|| self.evaluate(c, n))
            })
            .collect()
    }

    /// Target mode: at every count, the fewest animals meeting the targets.
    pub fn target_line(&self) -> Vec<Approximate> {
        self.candidates
            .iter()
            .filter_map(|c| Some(self.evaluate(c, self.required(c)?)))
            .collect()
    }

    /// The candidate at `trials`, if it was evaluated.
    pub fn candidate(&self, trials: u32) -> Option<&Candidate> {
        self.candidates.iter().find(|c| c.trials == trials)
    }
}

/// Between-animal variances of c and d′ (for half-widths of the group means).
fn approximation_population(a: &Approximation) -> (f64, f64) {
    let p = a.population();
    (p.sd_criterion.powi(2), p.sd_d_prime.powi(2))
}

/// Index of the best entry of a budget line: highest weakest power, then lowest cost.
pub fn best_for_budget(line: &[Approximate]) -> Option<usize> {
    (0..line.len()).max_by(|&i, &k| {
        let (a, b) = (&line[i], &line[k]);
        a.weakest()
            .total_cmp(&b.weakest())
            .then(b.cost.total_cmp(&a.cost))
    })
}

/// Index of the cheapest entry of a target line (ties: fewer animals).
pub fn least_cost(line: &[Approximate]) -> Option<usize> {
    (0..line.len()).min_by(|&i, &k| {
        let (a, b) = (&line[i], &line[k]);
        a.cost.total_cmp(&b.cost).then(a.animals.cmp(&b.animals))
    })
}
