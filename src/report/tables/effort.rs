//! `effort.csv`: the effort frontier, one row per design × frontier × simulated allocation
//! × driving test. `frontier` is `budget` (the most animals the budget buys at each trial
//! count) or `targets` (the fewest animals meeting every target at each trial count);
//! `best_for_budget`, `least_cost` and `fewest_animals` mark the chosen rows. Without a
//! driving test (half-width targets only) an allocation has one row, test columns empty.

use super::{figure, num, opt, write};
use crate::engine::Share;
use crate::groups::{Allocation, EffortSplit, GroupReport};

/// Column names, in order.
pub const COLUMNS: [&str; 28] = [
    "design",
    "frontier",
    "animals",
    "trials",
    "trials_per_animal",
    "cost",
    "cost_per_animal",
    "cost_per_trial",
    "budget",
    "test",
    "target",
    "approx_power",
    "power",
    "power_low",
    "power_high",
    "criterion_half_width",
    "criterion_half_width_mc_se",
    "d_prime_half_width",
    "d_prime_half_width_mc_se",
    "meets_targets",
    "animals_band",
    "best_for_budget",
    "least_cost",
    "fewest_animals",
    "one_fewer_animals",
    "one_fewer_power",
    "one_fewer_power_low",
    "one_fewer_power_high",
];

fn flag(b: Option<bool>) -> String {
    b.map_or_else(String::new, |b| b.to_string())
}

fn share_or_empty(s: Option<&Share>) -> [String; 3] {
    s.map_or_else(Default::default, super::share)
}

/// The rows of one frontier; `chosen(i)` gives the three marks of row `i`.
fn frontier_rows(
    design: &str,
    frontier: &str,
    split: &EffortSplit,
    allocations: &[Allocation],
    chosen: &dyn Fn(usize) -> [bool; 3],
    rows: &mut Vec<Vec<String>>,
) {
    let b = &split.budget;
    for (i, a) in allocations.iter().enumerate() {
        let tests: Vec<Option<usize>> = if split.goals.is_empty() {
            vec![None]
        } else {
            (0..split.goals.len()).map(Some).collect()
        };
        for t in tests {
            let goal = t.and_then(|k| split.goals.get(k));
            let mut row = vec![
                design.to_string(),
                frontier.to_string(),
                a.animals.to_string(),
                a.trials.to_string(),
                a.trials_per_animal.to_string(),
                num(a.cost),
                num(b.cost_per_animal),
                num(b.cost_per_trial),
                opt(b.total),
                goal.map_or_else(String::new, |g| g.name.clone()),
                opt(goal.and_then(|g| g.target)),
                opt(t.and_then(|k| a.approx_power.get(k).copied())),
            ];
            row.extend(share_or_empty(t.and_then(|k| a.power.get(k))));
            row.extend(figure(&a.criterion_half_width));
            row.extend(figure(&a.d_prime_half_width));
            row.push(flag(a.meets_targets));
            row.push(a.band.map_or_else(String::new, |n| n.to_string()));
            row.extend(chosen(i).map(|c| c.to_string()));
            let fewer = a.one_fewer.as_ref();
            row.push(fewer.map_or_else(String::new, |f| f.animals.to_string()));
            row.extend(share_or_empty(
                fewer.and_then(|f| t.and_then(|k| f.power.get(k))),
            ));
            rows.push(row);
        }
    }
}

pub fn render(groups: Option<&GroupReport>) -> Result<Vec<u8>, csv::Error> {
    let mut rows = Vec::new();
    for d in groups.map_or(&[][..], |g| &g.designs) {
        let Some(split) = &d.effort else {
            continue;
        };
        frontier_rows(
            &d.design,
            "budget",
            split,
            &split.budget_frontier,
            &|i| [split.best_for_budget == Some(i), false, false],
            &mut rows,
        );
        frontier_rows(
            &d.design,
            "targets",
            split,
            &split.target_frontier,
            &|i| {
                [
                    false,
                    split.least_cost == Some(i),
                    split.fewest_animals == Some(i),
                ]
            },
            &mut rows,
        );
    }
    write(&COLUMNS, &rows)
}
