//! The effort split as text: the frontier tables (most animals the budget buys; the fewest
//! animals meeting the targets, with the band of each count and the count one below it), the
//! rule a row is judged by, and the Reading lines.

use super::power;
use crate::groups::effort::{Allocation, EffortShortfall};
use crate::groups::{DesignGroups, EffortSplit, GroupReport};
use crate::report::format::{plain, whole};
use crate::report::style::{new_table, right_align};
use std::fmt::Write;

/// What the simulation gives an answer: the weakest power, or the half-width of the mean c
/// when no hypothesis drives the split.
fn outcome(a: &Allocation) -> String {
    match a.weakest() {
        Some(s) => format!("power {}", power(&s)),
        None => format!(
            "half-width ±{:.3} on the mean criterion",
            a.criterion_half_width.value
        ),
    }
}

fn goal_names(e: &EffortSplit) -> String {
    let names: Vec<String> = e.goals.iter().map(|g| format!("\"{}\"", g.name)).collect();
    names.join(" and ")
}

/// "17 ± 1", or "17" without a band.
fn animals_text(a: &Allocation) -> String {
    match a.band {
        Some(b) if b > 0 => format!("{} ± {b}", a.animals),
        _ => a.animals.to_string(),
    }
}

/// The figure by which one animal fewer misses the targets: the first target it misses
/// (three decimals, so a shortfall never reads as the target itself).
fn shortfall_figure(e: &EffortSplit, s: &EffortShortfall) -> String {
    let missed_power = s
        .power
        .iter()
        .zip(&e.goals)
        .find(|(p, g)| g.target.is_some_and(|t| p.value < t));
    if let Some((p, _)) = missed_power {
        return format!("power {:.3}", p.value);
    }
    if e.criterion_half_width
        .is_some_and(|t| s.criterion_half_width.value > t)
    {
        return format!("±c {:.3}", s.criterion_half_width.value);
    }
    if e.d_prime_half_width
        .is_some_and(|t| s.d_prime_half_width.value > t)
    {
        return format!("±d′ {:.3}", s.d_prime_half_width.value);
    }
    s.weakest()
        .map_or_else(String::new, |p| format!("power {:.3}", p.value))
}

/// A frontier table; `fewest` adds the band of the count and the row one animal fewer.
fn frontier_table(
    d: &DesignGroups,
    e: &EffortSplit,
    rows: &[Allocation],
    marks: &[(Option<usize>, &str)],
    fewest: bool,
) -> String {
    let mut header = vec!["trials/animal".to_string(), "animals".into(), "cost".into()];
    for g in &e.goals {
        header.push(format!("≈ power \"{}\"", g.name));
        header.push(format!("power \"{}\" [95%]", g.name));
    }
    header.push("±c (mean)".into());
    if fewest {
        header.push("one fewer".into());
    }
    header.push(String::new());
    let mut t = new_table(header.iter().map(String::as_str).collect());
    for (i, a) in rows.iter().enumerate() {
        let mut row = vec![
            if d.conditions > 1 {
                format!("{} ({}/cond.)", a.trials_per_animal, a.trials)
            } else {
                a.trials_per_animal.to_string()
            },
            if fewest {
                animals_text(a)
            } else {
                a.animals.to_string()
            },
            whole(a.cost),
        ];
        for (p, s) in a.approx_power.iter().zip(&a.power) {
            row.push(format!("{p:.2}"));
            row.push(power(s));
        }
        row.push(format!("{:.3}", a.criterion_half_width.value));
        if fewest {
            row.push(a.one_fewer.as_ref().map_or_else(
                || "– (smallest study)".into(),
                |s| format!("{}: {}", s.animals, shortfall_figure(e, s)),
            ));
        }
        let labels: Vec<&str> = marks
            .iter()
            .filter(|(m, _)| *m == Some(i))
            .map(|(_, l)| *l)
            .collect();
        row.push(labels.join(", "));
        t.add_row(row);
    }
    right_align(&mut t, 0..3 + 2 * e.goals.len() + 1 + usize::from(fewest));
    t.to_string()
}

pub(super) fn effort_block(out: &mut String, r: &GroupReport, d: &DesignGroups, e: &EffortSplit) {
    let b = &e.budget;
    let per_cond = if d.conditions > 1 {
        " per condition"
    } else {
        ""
    };
    let _ = writeln!(
        out,
        "Effort split: {} per animal + {} per trial{}; trials{per_cond} searched from {} to {} (≈ = large-sample approximation, then simulated).",
        plain(b.cost_per_animal),
        plain(b.cost_per_trial),
        b.total
            .map_or(String::new(), |t| format!(", budget {}", plain(t))),
        e.trials_range[0],
        e.trials_range[1],
    );
    for note in &e.notes {
        let _ = writeln!(out, "Note: {note}");
    }
    if !e.budget_frontier.is_empty() {
        let _ = writeln!(out, "Most animals the budget buys at each trial count:");
        let _ = writeln!(
            out,
            "{}",
            frontier_table(
                d,
                e,
                &e.budget_frontier,
                &[(e.best_for_budget, "← best")],
                false
            )
        );
    }
    if !e.target_frontier.is_empty() {
        let _ = writeln!(
            out,
            "Fewest animals meeting the targets at each trial count (searched by simulation):"
        );
        let _ = writeln!(
            out,
            "{}",
            frontier_table(
                d,
                e,
                &e.target_frontier,
                &[
                    (e.least_cost, "← least cost"),
                    (e.fewest_animals, "← fewest animals")
                ],
                true
            )
        );
        let _ = writeln!(
            out,
            "Each row is the fewest animals whose simulated studies meet every target at that trial count; \
             \"one fewer\" is the same trial count with one animal fewer, on the same simulated studies, and falls short. \
             A target counts as met when the simulated power itself (not an end of its interval) reaches it, \
             the rule of the trial-count verdict; ± is the Monte Carlo uncertainty of the number of animals."
        );
    }
    if !e.budget_frontier.is_empty() || !e.target_frontier.is_empty() {
        let _ = writeln!(
            out,
            "±c (mean) is the half-width of the {:.0}% interval of the group mean criterion, averaged over simulated studies.",
            100.0 * r.confidence
        );
    }
    let goals = goal_names(e);
    if let (Some(i), Some(total)) = (e.best_for_budget, b.total) {
        let a = &e.budget_frontier[i];
        let _ = writeln!(
            out,
            "Reading: with the budget of {}: {} animals × {} trials each (cost {}) gives power {} for {goals}.",
            plain(total),
            a.animals,
            a.trials_per_animal,
            whole(a.cost),
            a.weakest().map_or("–".into(), |s| power(&s)),
        );
    }
    if let Some(i) = e.least_cost {
        let a = &e.target_frontier[i];
        let targets: Vec<String> = e
            .goals
            .iter()
            .filter_map(|g| g.target.map(|t| format!("power {t} for \"{}\"", g.name)))
            .chain(
                e.criterion_half_width
                    .map(|w| format!("±{w} on the mean criterion")),
            )
            .chain(e.d_prime_half_width.map(|w| format!("±{w} on the mean d′")))
            .collect();
        let within = match b.total {
            Some(t) if a.cost <= t => format!(", within the budget of {}", plain(t)),
            Some(t) => format!(", over the budget of {}", plain(t)),
            None => String::new(),
        };
        let also = if e.fewest_animals == Some(i) {
            "; no trial count simulated needs fewer animals"
        } else {
            ""
        };
        let _ = writeln!(
            out,
            "Reading: the least cost meeting {}: {} animals × {} trials each (cost {}{within}), simulated {}{}{also}.",
            targets.join(" and "),
            animals_text(a),
            a.trials_per_animal,
            whole(a.cost),
            outcome(a),
            fewer_text(e, a),
        );
    }
    // Reduction: the fewest animals that meet the targets, whatever they cost.
    if let Some(f) = e
        .fewest_animals
        .filter(|&f| Some(f) != e.least_cost)
        .map(|f| &e.target_frontier[f])
    {
        let _ = writeln!(
            out,
            "Reading: the fewest animals meeting the same targets at any trial count simulated: {} animals × {} trials each (cost {}), simulated {}{}.",
            animals_text(f),
            f.trials_per_animal,
            whole(f.cost),
            outcome(f),
            fewer_text(e, f),
        );
    }
}

/// "; 16 animals give power 0.774" — what one animal fewer gives.
fn fewer_text(e: &EffortSplit, a: &Allocation) -> String {
    a.one_fewer.as_ref().map_or_else(String::new, |s| {
        format!("; {} animals give {}", s.animals, shortfall_figure(e, s))
    })
}
