//! The fewest animals that meet the targets at one trial count, searched the way the trial
//! search (`crate::search`) finds the fewest trials:
//!
//! 1. Start: the approximation's fewest animals, found by bisection on the large-sample
//!    power and half-widths ([`Search::required`]).
//! 2. Confirm by Monte Carlo on common random numbers: every animal count at this trial
//!    count draws its studies from the same streams, and a study of N animals is exactly the
//!    first N animals of a study of N + 1 (see `super::kernel`). From the start, step down
//!    (÷ [`STEP`]) while the simulation meets the targets, or up (× [`STEP`]) until it does,
//!    then bisect to adjacent counts: N animals meet the targets and N − 1 do not, on the
//!    same simulated studies (unless N is the smallest study the test allows).
//! 3. Band: ± animals of Monte Carlo uncertainty, the binding power's Monte Carlo SE at its
//!    target over the slope of the approximate power curve in animals at the answer — the
//!    trial search's band, with animals in place of trials (0 when a half-width binds).
//!
//! "Meets the targets" is the trial search's rule ([`meets_targets`]): the simulated power
//! itself (not an end of its interval) is at least the target, and a simulated mean
//! half-width is at most its target.

use super::GroupError;
use super::effort::{Allocation, EffortShortfall};
use super::effort_search::{Approximate, Candidate, Goals, MAX_ANIMALS, Search};
use super::grid::{DesignSetup, run_point};
use super::summary::GroupSummary;
use crate::engine::Share;
use crate::phase::Progress;

/// Geometric step between Monte Carlo evaluations before bisection (the trial search's).
pub const STEP: f64 = 1.3;
/// Most steps up from the approximation's count before a trial count is given up.
pub const MAX_STEPS_UP: u64 = 8;
/// Steps down before jumping to the smallest study the test allows.
pub const MAX_STEPS_DOWN: u64 = 3;
/// Bisection steps: ⌈log₂ MAX_ANIMALS⌉ bounds any bracket.
const MAX_BISECTIONS: u64 = 17;
/// Most Monte Carlo evaluations one trial count needs (a bound for the progress bar).
pub const MAX_EVALUATIONS: u64 = 1 + MAX_STEPS_UP + MAX_STEPS_DOWN + 1 + MAX_BISECTIONS;

/// Simulations already run (grid cells and earlier evaluations), so no point runs twice.
pub type Cache = Vec<((u32, u32), GroupSummary)>;

/// Whether simulated figures meet every target: power (the Monte Carlo estimate itself) at
/// least its target, mean half-widths at most theirs. The same rule as the trial search.
pub fn meets_targets(goals: &Goals, power: &[Share], summary: &GroupSummary) -> bool {
    power
        .iter()
        .zip(&goals.power)
        .all(|(p, t)| t.is_none_or(|t| p.value >= t))
        && goals
            .criterion_half_width
            .is_none_or(|t| summary.criterion.half_width.value <= t)
        && goals
            .d_prime_half_width
            .is_none_or(|t| summary.d_prime.half_width.value <= t)
}

/// Runs (or recalls) the simulation of an allocation and judges it.
pub struct Confirm<'a, 'b> {
    pub setup: &'a DesignSetup<'b>,
    pub goals: &'a Goals,
    pub cache: Cache,
    pub progress: &'a Progress<'a>,
}

impl Confirm<'_, '_> {
    /// The simulated allocation with the approximate figures `a`.
    pub fn run(&mut self, a: &Approximate) -> Result<Allocation, GroupError> {
        let key = (a.animals, a.trials);
        let summary = match self.cache.iter().find(|(k, _)| *k == key) {
            Some((_, s)) => s.clone(),
            None => {
                let plan = self.setup.plan;
                let s = run_point(
                    self.setup,
                    a.animals,
                    a.trials,
                    plan.study().experiments,
                    plan.study().seed,
                    self.progress,
                )?;
                self.cache.push((key, s.clone()));
                s
            }
        };
        let power: Vec<Share> = self
            .goals
            .tests
            .iter()
            .map(|&i| summary.tests[i].two_stage)
            .collect();
        let meets = self
            .goals
            .has_targets()
            .then(|| meets_targets(self.goals, &power, &summary));
        Ok(Allocation {
            animals: a.animals,
            trials: a.trials,
            trials_per_animal: self.setup.trials_per_animal(a.trials),
            cost: a.cost,
            approx_power: a.power.clone(),
            power,
            criterion_half_width: summary.criterion.half_width,
            d_prime_half_width: summary.d_prime.half_width,
            meets_targets: meets,
            band: None,
            one_fewer: None,
            summary,
        })
    }
}

/// What the search over animal counts found at one trial count.
#[derive(Debug, Clone, PartialEq)]
pub enum Fewest {
    /// The fewest animals meeting the targets, with its band and the count one below.
    Found(Allocation),
    /// Even the most animals simulated fall short; the last evaluation.
    NotReached(Allocation),
}

/// Searches the fewest animals at candidate `c`, starting from `start` animals.
pub fn fewest_animals(
    search: &Search,
    c: &Candidate,
    start: u32,
    confirm: &mut Confirm,
) -> Result<Fewest, GroupError> {
    let lowest = search.min_animals;
    let mut eval = |n: u32| confirm.run(&search.evaluate(c, n));
    let start = start.clamp(lowest, MAX_ANIMALS);
    let first = eval(start)?;
    let (mut pass, fail) = if first.meets_targets == Some(true) {
        let (mut pass, mut fail) = (first, None);
        let mut steps = 0;
        while pass.animals > lowest {
            let n = pass.animals;
            // After a few geometric steps, try the smallest study outright.
            let lower = if steps < MAX_STEPS_DOWN {
                ((f64::from(n) / STEP).floor() as u32).clamp(lowest, n - 1)
            } else {
                lowest
            };
            steps += 1;
            let row = eval(lower)?;
            if row.meets_targets == Some(true) {
                pass = row;
            } else {
                fail = Some(row);
                break;
            }
        }
        (pass, fail)
    } else {
        let (mut last, mut found) = (first, None);
        for _ in 0..MAX_STEPS_UP {
            let n = last.animals;
            if n >= MAX_ANIMALS {
                break;
            }
            let row = eval(((f64::from(n) * STEP).ceil() as u32).clamp(n + 1, MAX_ANIMALS))?;
            if row.meets_targets == Some(true) {
                found = Some(row);
                break;
            }
            last = row;
        }
        match found {
            Some(pass) => (pass, Some(last)),
            None => return Ok(Fewest::NotReached(last)),
        }
    };
    if let Some(mut below) = fail {
        while pass.animals - below.animals > 1 {
            let mid = below.animals + (pass.animals - below.animals) / 2;
            let row = eval(mid)?;
            if row.meets_targets == Some(true) {
                pass = row;
            } else {
                below = row;
            }
        }
        pass.one_fewer = Some(EffortShortfall::of(&below));
    }
    pass.band = Some(band(
        search,
        c,
        &pass,
        confirm.setup.plan.study().experiments,
    ));
    Ok(Fewest::Found(pass))
}

/// ± animals: the Monte Carlo SE of the binding power at its target, √(t(1 − t)/studies),
/// over the slope of the approximate power in animals at the answer (step ⌈N/10⌉, as the
/// trial search steps its trial counts); 0 when a half-width binds or the curve is flat.
fn band(search: &Search, c: &Candidate, row: &Allocation, studies: u64) -> u32 {
    let goals = search.goals;
    // The binding target: the smallest relative margin at the answer (the trial search's).
    let mut binding: Option<(f64, Option<(usize, f64)>)> = None;
    let mut consider = |margin: f64, power: Option<(usize, f64)>| {
        if binding.is_none_or(|(m, _)| margin < m) {
            binding = Some((margin, power));
        }
    };
    for (i, (p, t)) in row.power.iter().zip(&goals.power).enumerate() {
        if let Some(t) = *t {
            consider((p.value - t) / t, Some((i, t)));
        }
    }
    for (target, value) in [
        (goals.criterion_half_width, row.criterion_half_width.value),
        (goals.d_prime_half_width, row.d_prime_half_width.value),
    ] {
        if let Some(t) = target {
            consider((t - value) / t, None);
        }
    }
    let Some((_, Some((i, target)))) = binding else {
        return 0;
    };
    let step = (row.animals / 10).max(1);
    let here = search.evaluate(c, row.animals).power[i];
    let there = search
        .evaluate(c, row.animals.saturating_add(step).min(MAX_ANIMALS))
        .power[i];
    let slope = (there - here) / f64::from(step);
    let se = (target * (1.0 - target) / studies.max(1) as f64).sqrt();
    if slope > 0.0 {
        (se / slope).ceil() as u32
    } else {
        0
    }
}
