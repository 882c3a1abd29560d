//! The justification: a methods paragraph a PI can paste into a grant or an animal-ethics
//! application and edit. It states the design, the hypothesised values and their source,
//! the test and α, the power reached with its Monte Carlo interval, the animals and trials,
//! the Monte Carlo settings and the software version, and closes with the cautions.
//!
//! Every number comes from the typed results through the same formatting the terminal
//! uses (`verdict::value_text`, `verdict::trials_text`), so the text and the tables cannot
//! disagree (tests/report_justification.rs checks this on `plans/base-rate-shift.toml`).

use super::format::share;
use super::verdict::{trials_text, value_text};
use crate::design::goals::{Hypothesis, TestKind};
use crate::design::{Design, Response};
use crate::groups::effort::Allocation;
use crate::groups::{DesignGroups, GroupReport};
use crate::plan::Plan;
use crate::search::{SearchOutcome, SearchResult};
use crate::vocab::Sided;

/// What to write when the plan names no source for its values.
const NO_SOURCE: &str = "[state the pilot data or published study these values come from; \
vigil reads it from values_source in the plan's [study] table]";

/// The justification paragraphs, in order.
pub fn paragraphs(
    plan: &Plan,
    searches: &[SearchResult],
    groups: Option<&GroupReport>,
    uncertainty: Option<&crate::uncertainty::UncertaintyReport>,
) -> Vec<String> {
    let mut out = Vec::new();
    match groups {
        Some(g) => out.extend(group_paragraph(plan, g)),
        None => out.extend(search_paragraphs(plan, searches)),
    }
    if let Some(u) = uncertainty {
        out.extend(super::uncertainty_text::justification(u));
    }
    out.push(settings_sentence(plan));
    out.push(caution_sentence());
    out
}

/// The design in words: "the “yes/no” design: a yes/no record … in 2 conditions: …".
fn design_words(design: &Design) -> String {
    let record = match (&design.response, design.record) {
        (Response::YesNo, crate::design::RecordKind::Full) => {
            "a yes/no record (each trial scored as response or no response)".to_string()
        }
        (Response::Rating(s), crate::design::RecordKind::Full) => format!(
            "a {}-category rating record (graded responses; categories {} and above count as a response)",
            s.categories, s.boundary
        ),
        _ => format!("a record of {}", design.record_label()),
    };
    let conditions = if design.conditions.len() == 1 {
        format!(
            ", the stimulus present on {:.0}% of trials",
            100.0 * design.presence
        )
    } else {
        let each: Vec<String> = design
            .conditions
            .iter()
            .map(|c| {
                format!(
                    "\"{}\" (stimulus present on {:.0}% of trials)",
                    c.name,
                    100.0 * c.presence
                )
            })
            .collect();
        format!(
            ", in {} conditions: {}",
            design.conditions.len(),
            each.join(" and ")
        )
    };
    format!("the \"{}\" design: {record}{conditions}", design.name)
}

/// The hypothesised values and where they come from.
fn values_sentence(plan: &Plan, design: &Design) -> String {
    let o = plan.observer();
    let criteria: Vec<String> = if design.conditions.len() == 1 {
        vec![format!(
            "criterion c = {:+.2}",
            design.conditions[0].criterion
        )]
    } else {
        design
            .conditions
            .iter()
            .map(|c| format!("c = {:+.2} in \"{}\"", c.criterion, c.name))
            .collect()
    };
    let sigma = if (o.sigma - 1.0).abs() > 0.0 {
        format!(", σ = {:.2}", o.sigma)
    } else {
        String::new()
    };
    let lapse = o.lapse.map_or_else(String::new, |l| {
        format!(", with lapses on {:.0}% of trials", 100.0 * l.rate)
    });
    let source = plan.study().values_source.as_deref().unwrap_or(NO_SOURCE);
    format!(
        "We assume sensitivity d′ = {:.2}{sigma} and {}{lapse}; these values come from {source}.",
        o.d_prime,
        criteria.join(", ")
    )
}

fn sided_words(sided: Sided) -> &'static str {
    match sided {
        Sided::TwoSided => "two-sided",
        Sided::Greater => "one-sided, greater",
        Sided::Less => "one-sided, less",
    }
}

/// What a single-animal hypothesis tests, in words.
fn hypothesis_words(h: &Hypothesis) -> String {
    let named = |i: usize| {
        h.conditions
            .get(i)
            .map_or_else(String::new, |c| format!("\"{c}\""))
    };
    let what = match h.kind {
        TestKind::Bias => "the criterion differs from 0 (the animal is biased)".to_string(),
        TestKind::IdealCriterion => {
            "the criterion differs from the ideal observer's for the payoffs".to_string()
        }
        TestKind::CriterionShift => {
            format!("the criterion shifts between {} and {}", named(0), named(1))
        }
        TestKind::SensitivityDifference => {
            format!("d′ differs between {} and {}", named(0), named(1))
        }
        TestKind::UnequalVariance => "σ differs from 1".to_string(),
        TestKind::GroupDifference => "the populations' mean criteria differ".to_string(),
    };
    format!("\"{}\" ({what}; {})", h.name, sided_words(h.sided))
}

/// The search's answer for one design, as the verdict table shows it.
fn answer_words(r: &SearchResult, conditions: usize, max_trials: u32) -> Option<String> {
    match &r.outcome {
        SearchOutcome::Found {
            trials,
            band,
            binding,
            values,
            asymptotic_trials,
            ..
        } => {
            let at = values.iter().find(|v| &v.target == binding)?;
            let asym = asymptotic_trials.map_or_else(String::new, |n| {
                format!(" (the expected information alone put it at {n})")
            });
            let total = if conditions > 1 {
                format!(
                    ", {} trials per animal in all",
                    u64::from(*trials) * conditions as u64
                )
            } else {
                String::new()
            };
            Some(format!(
                "{} trials per condition{total}{asym}; there the binding target, {}, is met with {} (the simulated value, with its 95% Monte Carlo interval)",
                trials_text(*trials, *band),
                binding.describe(),
                value_text(at)
            ))
        }
        SearchOutcome::NotReached { .. } => Some(format!(
            "more than {max_trials} trials per condition (the targets are not met within the search's ceiling)"
        )),
        SearchOutcome::NoTargets => None,
    }
}

/// Single-animal plans: the design needing the fewest trials, then the others for comparison.
fn search_paragraphs(plan: &Plan, searches: &[SearchResult]) -> Vec<String> {
    let found = |r: &SearchResult| match r.outcome {
        SearchOutcome::Found { trials, .. } => Some(trials),
        _ => None,
    };
    let chosen = searches
        .iter()
        .enumerate()
        .filter_map(|(d, r)| Some((d, found(r)?)))
        .min_by_key(|&(_, n)| n)
        .map_or(0, |(d, _)| d);
    let Some(design) = plan.designs().get(chosen) else {
        return Vec::new();
    };
    let max = plan.study().max_trials;
    let tested: Vec<String> = plan
        .hypotheses()
        .iter()
        .filter(|h| h.kind != TestKind::GroupDifference)
        .map(hypothesis_words)
        .collect();
    let alpha = plan.study().alpha;
    let mut first = format!(
        "Sample size. We plan {}. {}",
        design_words(design),
        values_sentence(plan, design)
    );
    if !tested.is_empty() {
        first.push_str(&format!(
            " We test {} with a likelihood-ratio test at α = {alpha}.",
            tested.join(" and ")
        ));
    }
    let conditions = |d: usize| plan.designs().get(d).map_or(1, |x| x.conditions.len());
    match searches
        .get(chosen)
        .and_then(|r| answer_words(r, conditions(chosen), max))
    {
        Some(answer) => first.push_str(&format!(
            " By simulation, the smallest experiment per animal that meets every target has {answer}. The number of animals is not part of this plan."
        )),
        None => first.push_str(" The plan sets no target for this design."),
    }
    let mut out = vec![first];
    let others: Vec<String> = searches
        .iter()
        .enumerate()
        .filter(|&(d, _)| d != chosen)
        .filter_map(|(d, r)| {
            Some(format!(
                "the \"{}\" design would need {}",
                r.design,
                answer_words(r, conditions(d), max)?
            ))
        })
        .collect();
    if !others.is_empty() {
        out.push(format!("For comparison, {}.", others.join("; ")));
    }
    out
}

/// The chosen allocation of a group design: the best for the budget, else the cheapest
/// that meets the targets.
fn chosen_allocation(d: &DesignGroups) -> Option<(&Allocation, &'static str)> {
    let e = d.effort.as_ref()?;
    e.best_for_budget
        .and_then(|i| e.budget_frontier.get(i))
        .map(|a| (a, "the allocation the budget buys with the most power"))
        .or_else(|| {
            e.least_cost
                .and_then(|i| e.target_frontier.get(i))
                .map(|a| (a, "the cheapest allocation that meets every target"))
        })
}

/// Group plans: the chosen allocation's animals, trials, cost and power.
fn group_paragraph(plan: &Plan, g: &GroupReport) -> Vec<String> {
    let mut out = Vec::new();
    for (d, dg) in g.designs.iter().enumerate() {
        let Some(design) = plan.designs().get(d) else {
            continue;
        };
        let tests: Vec<String> = dg
            .tests
            .iter()
            .map(|t| {
                format!(
                    "\"{}\" ({}; {})",
                    t.name,
                    super::groups_text::describe(t),
                    sided_words(t.sided)
                )
            })
            .collect();
        let more = super::groups_text::slopes_phrase(&g.population.slopes)
            .map_or(String::new(), |m| format!("; {m}"));
        let mut p = format!(
            "Sample size. We plan {}, on a group of animals that differ (between-animal SD of d′ {:.2} and of c {:.2}{more}). {}",
            design_words(design),
            g.population.sd_d_prime,
            g.population.sd_criterion,
            values_sentence(plan, design)
        );
        if !tests.is_empty() {
            p.push_str(&format!(
                " We test {} across animals in two stages (each animal fitted by maximum likelihood, then a t test across the animals' estimates) at α = {}.",
                tests.join(" and "),
                g.alpha
            ));
        }
        match chosen_allocation(dg) {
            Some((a, why)) => {
                let goals = dg.effort.as_ref().map_or(&[][..], |e| &e.goals[..]);
                let power: Vec<String> = goals
                    .iter()
                    .zip(&a.power)
                    .map(|(goal, s)| format!("{} for \"{}\"", share(s), goal.name))
                    .collect();
                let budget = g
                    .budget
                    .and_then(|b| b.total)
                    .map_or_else(String::new, |t| format!(" of a budget of {t}"));
                p.push_str(&format!(
                    " We propose {} animals with {} trials each ({} per condition), {why}: it costs {}{budget} and gives power {} (95% Monte Carlo interval).",
                    a.animals,
                    a.trials_per_animal,
                    a.trials,
                    a.cost,
                    power.join(" and ")
                ));
                if a.meets_targets == Some(false)
                    && let Some(b) = dg
                        .effort
                        .as_ref()
                        .and_then(|e| e.least_cost.and_then(|i| e.target_frontier.get(i)))
                {
                    p.push_str(&format!(
                        " This falls short of the power target; the cheapest allocation that meets every target has {} animals with {} trials each, costing {}.",
                        b.animals, b.trials_per_animal, b.cost
                    ));
                }
            }
            None => p.push_str(
                " The plan's budget and targets select no allocation; see the group tables.",
            ),
        }
        out.push(p);
    }
    out
}

/// Monte Carlo settings and the software version.
fn settings_sentence(plan: &Plan) -> String {
    let s = plan.study();
    format!(
        "These figures come from simulation with vigil {} ({} at each evaluated trial count, seed {}; every simulated dataset fitted by maximum likelihood, rates of 0 or 1 handled by the {} correction; {:.0}% Wald intervals). The same plan and seed reproduce them exactly.",
        env!("CARGO_PKG_VERSION"),
        super::precision_text::settings_phrase(s),
        s.seed,
        s.rate_correction.name(),
        100.0 * s.confidence
    )
}

/// The closing caution.
fn caution_sentence() -> String {
    "These numbers rest on the stated assumptions (the hypothesised values, Gaussian evidence, independent trials, no learning or habituation beyond what the plan models). The numbers of animals and trials will be settled with the local animal-welfare body and under the regulations that apply, following the Reduction principle: the fewest animals that answer the question.".to_string()
}
