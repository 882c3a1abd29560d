//! What a plan's targets need under the expected information, design by design: the
//! smallest trial count (one animal) or the cheapest animals × trials (groups), and the
//! normal-approximation power of each driving test at any chosen design. These are the fast
//! views the sweeps and the assurance evaluate thousands of times; Monte Carlo confirms them
//! ([`super::confirm`]).

use crate::design::goals::Budget;
use crate::groups::approximation::{Approximation, group_power};
use crate::groups::effort::approximate_search;
use crate::groups::effort_search::{Candidate, Goals, Search, best_for_budget, goals, least_cost};
use crate::groups::grid::DesignSetup;
use crate::groups::setups;
use crate::plan::Plan;
use crate::search::{AsymptoticAnswer, asymptotic_answer, asymptotic_power};
use serde::Serialize;

/// A design to run: animals (groups only) × trials per condition.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Chosen {
    pub animals: Option<u32>,
    pub trials: u32,
}

/// The approximate answer of one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Answer {
    pub chosen: Chosen,
    /// Under the plan's `[budget]` (groups with a budget only).
    pub cost: Option<f64>,
    /// Normal-approximation power of each driving test there.
    pub power: Vec<f64>,
}

impl Answer {
    /// The number the reading compares: cost, else animals, else trials.
    pub fn headline(&self) -> f64 {
        self.cost
            .or(self.chosen.animals.map(f64::from))
            .unwrap_or(f64::from(self.chosen.trials))
    }
}

/// How the answer is chosen, for the report's words.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Criterion {
    /// Groups with targets and a budget: the cheapest allocation meeting every target.
    LeastCost,
    /// Groups with targets and no budget: the fewest animals (at the most trials allowed).
    FewestAnimals,
    /// Groups with a total and no target: the allocation the total buys with the best power.
    BestForBudget,
    /// One animal: the smallest trial count meeting every target.
    SmallestTrials,
}

/// The fast view of one design of one plan (or variant). There is one per design per drawn
/// set of values, so the size of the group variant costs nothing worth boxing for.
#[allow(clippy::large_enum_variant)]
pub enum View<'p> {
    Group {
        setup: DesignSetup<'p>,
        approximation: Approximation,
        goals: Goals,
        budget: Budget,
        criterion: Criterion,
    },
    Single {
        plan: &'p Plan,
        design: usize,
        asymptotic: AsymptoticAnswer,
    },
}

/// A budget for cost-free group plans: one unit per animal, trials free (so the cheapest is
/// the fewest animals).
const PER_ANIMAL: Budget = Budget {
    cost_per_animal: 1.0,
    cost_per_trial: 0.0,
    total: None,
};

/// The view of every design of `plan` (`None` where nothing is planned for: no target, no
/// live test, or an information that cannot be computed).
pub fn views(plan: &Plan) -> Vec<Option<View<'_>>> {
    if plan.animals().is_none() {
        return (0..plan.designs().len())
            .map(|d| {
                asymptotic_answer(plan, d).map(|asymptotic| View::Single {
                    plan,
                    design: d,
                    asymptotic,
                })
            })
            .collect();
    }
    let Ok(all) = setups(plan) else {
        return plan.designs().iter().map(|_| None).collect();
    };
    all.into_iter()
        .map(|setup| {
            let goals = goals(&setup);
            let (budget, criterion) = match (*plan.budget(), goals.has_targets()) {
                (Some(b), true) => (b, Criterion::LeastCost),
                (None, true) => (PER_ANIMAL, Criterion::FewestAnimals),
                (Some(b), false) if b.total.is_some() && !goals.tests.is_empty() => {
                    (b, Criterion::BestForBudget)
                }
                _ => return None,
            };
            let approximation =
                Approximation::new(setup.design, plan.observer(), setup.population)?;
            Some(View::Group {
                setup,
                approximation,
                goals,
                budget,
                criterion,
            })
        })
        .collect()
}

impl View<'_> {
    /// The plan (or variant) the view is of.
    pub fn plan(&self) -> &Plan {
        match self {
            View::Group { setup, .. } => setup.plan,
            View::Single { plan, .. } => plan,
        }
    }

    pub fn criterion(&self) -> Criterion {
        match self {
            View::Group { criterion, .. } => *criterion,
            View::Single { .. } => Criterion::SmallestTrials,
        }
    }

    /// The driving tests (groups) or power targets (one animal), with their targets.
    pub fn tests(&self) -> Vec<(String, Option<f64>)> {
        match self {
            View::Group { setup, goals, .. } => goals
                .tests
                .iter()
                .zip(&goals.power)
                .map(|(&i, t)| (setup.tests[i].name.clone(), *t))
                .collect(),
            View::Single { asymptotic, .. } => asymptotic
                .hypotheses
                .iter()
                .map(|(h, t)| (h.clone(), Some(*t)))
                .collect(),
        }
    }

    fn search<'s>(&'s self, trials: &[u32]) -> Option<Search<'s>> {
        match self {
            View::Group {
                setup,
                approximation,
                goals,
                budget,
                ..
            } => Some(approximate_search(
                setup,
                approximation,
                goals,
                *budget,
                trials,
            )),
            View::Single { .. } => None,
        }
    }

    /// The approximate answer (`None`: the targets are out of reach in the searched range).
    pub fn answer(&self) -> Option<Answer> {
        match self {
            View::Single {
                plan,
                design,
                asymptotic,
            } => {
                let trials = asymptotic.trials?;
                Some(Answer {
                    chosen: Chosen {
                        animals: None,
                        trials,
                    },
                    cost: None,
                    power: asymptotic_power(plan, *design, trials),
                })
            }
            View::Group { criterion, .. } => {
                let search = self.search(&[])?;
                let (line, best) = match criterion {
                    Criterion::BestForBudget => {
                        let line = search.budget_line();
                        let best = best_for_budget(&line);
                        (line, best)
                    }
                    _ => {
                        let line = search.target_line();
                        let best = if *criterion == Criterion::FewestAnimals {
                            (0..line.len()).min_by(|&i, &k| {
                                line[i]
                                    .animals
                                    .cmp(&line[k].animals)
                                    .then(line[i].trials.cmp(&line[k].trials))
                            })
                        } else {
                            least_cost(&line)
                        };
                        (line, best)
                    }
                };
                let a = &line[best?];
                Some(Answer {
                    chosen: Chosen {
                        animals: Some(a.animals),
                        trials: a.trials,
                    },
                    cost: (*criterion != Criterion::FewestAnimals).then_some(a.cost),
                    power: a.power.clone(),
                })
            }
        }
    }

    /// Normal-approximation power of each driving test at `chosen` (empty when it cannot be
    /// computed there).
    pub fn power_at(&self, chosen: Chosen) -> Vec<f64> {
        match self {
            View::Single { plan, design, .. } => asymptotic_power(plan, *design, chosen.trials),
            View::Group { .. } => {
                let (Some(search), Some(animals)) = (self.search(&[chosen.trials]), chosen.animals)
                else {
                    return Vec::new();
                };
                search
                    .candidate(chosen.trials)
                    .map_or(Vec::new(), |c| search.evaluate(c, animals).power)
            }
        }
    }

    /// Groups: every candidate trial count with its per-animal variances (for the assurance
    /// search, which evaluates many animal counts per draw).
    pub fn candidates(&self) -> Vec<Candidate> {
        self.search(&[]).map_or(Vec::new(), |s| s.candidates)
    }

    /// Groups: the approximate power of each driving test of `animals` animals at `c`.
    pub fn power_of(&self, c: &Candidate, animals: u32) -> Vec<f64> {
        match self {
            View::Group { setup, goals, .. } => goals
                .tests
                .iter()
                .zip(&c.tests)
                .map(|(&i, &(delta, v))| {
                    group_power(&setup.tests[i], animals, v, delta, setup.plan.study().alpha)
                })
                .collect(),
            View::Single { .. } => Vec::new(),
        }
    }

    /// Groups: the fewest animals a study may have (4 when a group difference splits them).
    pub fn min_animals(&self) -> u32 {
        match self {
            View::Group { setup, goals, .. }
                if goals
                    .tests
                    .iter()
                    .any(|&i| setup.tests[i].two_populations()) =>
            {
                4
            }
            _ => 2,
        }
    }

    /// Groups: the cost of an allocation and the fewest animals a study may have.
    pub fn cost(&self, animals: u32, trials: u32) -> Option<f64> {
        match self {
            View::Group {
                setup,
                budget,
                criterion,
                ..
            } if *criterion != Criterion::FewestAnimals => {
                Some(budget.cost(animals, setup.trials_per_animal(trials)))
            }
            _ => None,
        }
    }
}
