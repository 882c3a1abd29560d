//! The `vigil check` report: the plan's title, the observer and study settings, one row per
//! scenario, and every other section the plan sets (hypotheses, targets, animals, budget), so
//! a reader sees what `run` will do with it.

use super::conditions_text::{EXPECTED_NOTE, any_expected, optimal_rule_text};
use super::format::number;
use crate::design::TrialCounts;
use crate::design::goals::TestKind;
use crate::plan::Plan;
use crate::vocab::Sided;
use std::fmt::Write;
use std::path::Path;

/// A number as a plan would write it: at most 3 decimals, trailing zeros dropped
/// (0.18077062663297522 → 0.181, 1.0 → 1, −0.25 → -0.25).
pub fn plain(x: f64) -> String {
    if !x.is_finite() {
        return "–".into();
    }
    let s = format!("{x:.3}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.into() }
}

/// The text `vigil check` prints for a valid plan.
pub fn render(path: &Path, plan: &Plan) -> String {
    let mut out = String::new();
    let _ = writeln!(
        out,
        "{}: plan is valid — {}",
        path.display(),
        plan.study().title
    );
    let o = plan.observer();
    // Under "optimal" each condition has its own criterion: the table lists them.
    let criterion =
        optimal_rule_text(plan).unwrap_or_else(|| format!("c = {}", plain(o.criterion)));
    let lapses = o.lapse.map_or(String::new(), |l| {
        format!(
            "; lapse_rate = {}, lapse_yes = {}",
            plain(l.rate),
            plain(l.guess_yes)
        )
    });
    let _ = writeln!(
        out,
        "observer: d′ = {}, {criterion}, σ = {}{lapses}; {} per scenario, seed {}, {:.0}% intervals, {} correction",
        plain(o.d_prime),
        plain(o.sigma),
        match plan.study().precision {
            None => format!("{} experiments", plan.study().experiments),
            Some(_) => super::precision_text::settings_phrase(plan.study()),
        },
        plan.study().seed,
        100.0 * plan.study().confidence,
        plan.study().rate_correction.name()
    );
    // A condition column only when some design has several conditions.
    let named = plan.designs().iter().any(|d| d.conditions.len() > 1);
    let mut header = vec!["scenario", "design", "record"];
    if named {
        header.push("condition");
    }
    header.extend(["presence", "c", "trials", "present", "absent"]);
    let mut t = super::style::new_table(header);
    let scenarios = plan.scenarios();
    for s in &scenarios {
        let d = &plan.designs()[s.design];
        // One row per condition; the scenario's own columns on its first row only.
        for (i, c) in s.conditions.iter().enumerate() {
            let first = |text: String| if i == 0 { text } else { String::new() };
            let mark = if c.counts == TrialCounts::Expected {
                "≈"
            } else {
                ""
            };
            let mut row = vec![
                first((s.id + 1).to_string()),
                first(d.name.clone()),
                first(d.record_label()),
            ];
            if named {
                row.push(if s.conditions.len() > 1 {
                    c.name.clone()
                } else {
                    String::new()
                });
            }
            row.extend([
                plain(c.presence),
                number(c.criterion, 3),
                first(s.trials.to_string()),
                format!("{mark}{}", c.present),
                format!("{mark}{}", c.absent),
            ]);
            t.add_row(row);
        }
    }
    let columns = t.column_count();
    super::style::right_align(&mut t, columns - 4..columns);
    let _ = writeln!(out, "{t}");
    let _ = writeln!(
        out,
        "present trials = presence × trials rounded to the nearest whole number (halves round up); absent = the rest."
    );
    if plan
        .designs()
        .iter()
        .any(|d| d.record == crate::design::RecordKind::TwoChoice)
    {
        let _ = writeln!(
            out,
            "In a two-choice design, present = trials with the target on the left, absent = with it on the right."
        );
    }
    if any_expected(scenarios.iter().flat_map(|s| &s.conditions)) {
        let _ = writeln!(out, "{EXPECTED_NOTE}");
    }
    sections(&mut out, plan);
    super::layout::wrap_prose(&out)
}

/// Hypotheses, targets, animals and budget, one line each, when the plan has them.
fn sections(out: &mut String, plan: &Plan) {
    for h in plan.hypotheses() {
        let conditions = if h.conditions.is_empty() {
            String::new()
        } else {
            format!(", conditions {}", h.conditions.join(" vs "))
        };
        let power = h
            .power
            .map_or(String::new(), |p| format!(", power ≥ {}", plain(p)));
        let shift = if h.kind == TestKind::GroupDifference {
            format!(", shift {}", plain(h.shift))
        } else {
            String::new()
        };
        let _ = writeln!(
            out,
            "hypothesis \"{}\": {}{conditions}, {}{shift}{power}; tested at α = {}",
            h.name,
            kind_name(h.kind),
            sided_name(h.sided),
            plain(plan.study().alpha)
        );
    }
    let t = plan.targets();
    let mut targets = Vec::new();
    if let Some(p) = t.power {
        targets.push(format!("power ≥ {}", plain(p)));
    }
    for (q, w) in &t.half_width {
        targets.push(format!("half-width of {} ≤ {}", q.label(), plain(*w)));
    }
    if let Some(r) = t.max_correlation {
        targets.push(format!("|r(d̂′, ĉ)| ≤ {}", plain(r)));
    }
    if !targets.is_empty() {
        let _ = writeln!(
            out,
            "targets: {}; searched up to {} trials per condition",
            targets.join(", "),
            plan.study().max_trials
        );
    }
    if let Some(a) = plan.animals() {
        let counts: Vec<String> = a.counts.iter().map(u32::to_string).collect();
        let cap = a.trial_cap.map_or(String::new(), |c| {
            format!("; at most {c} trials per animal")
        });
        let _ = writeln!(
            out,
            "animals: {} animals; between-animal SD of d′ {}, of c {}, correlation {}{cap}",
            counts.join(", "),
            plain(a.sd_d_prime),
            plain(a.sd_criterion),
            plain(a.correlation)
        );
    }
    if let Some(b) = plan.budget() {
        let total = b
            .total
            .map_or(String::new(), |x| format!("; total {}", plain(x)));
        let _ = writeln!(
            out,
            "budget: {} per animal, {} per trial{total}",
            plain(b.cost_per_animal),
            plain(b.cost_per_trial)
        );
    }
    if let Some(s) = plan.sensitivity() {
        let each: Vec<String> = s
            .sweeps
            .iter()
            .map(|w| {
                let values: Vec<String> = w.values.iter().map(|v| plain(*v)).collect();
                format!("{} at {}", w.key.label(), values.join(", "))
            })
            .collect();
        let _ = writeln!(out, "sensitivity: {}", each.join("; "));
    }
    if let Some(a) = plan.assurance() {
        let each: Vec<String> = a
            .uncertain
            .iter()
            .map(super::uncertainty_text::prior_text)
            .collect();
        let target = a.target.map_or(String::new(), |t| {
            format!("; searching for {:.0}% assurance", 100.0 * t)
        });
        let _ = writeln!(
            out,
            "assurance: {} drawn sets of {}{target}",
            a.draws,
            each.join("; ")
        );
    }
}

/// The plan's own spelling of a kind of hypothesis.
fn kind_name(k: TestKind) -> &'static str {
    match k {
        TestKind::Bias => "bias",
        TestKind::IdealCriterion => "ideal-criterion",
        TestKind::CriterionShift => "criterion-shift",
        TestKind::SensitivityDifference => "sensitivity-difference",
        TestKind::UnequalVariance => "unequal-variance",
        TestKind::GroupDifference => "group-difference",
    }
}

/// The plan's own spelling of a direction.
fn sided_name(s: Sided) -> &'static str {
    match s {
        Sided::TwoSided => "two-sided",
        Sided::Greater => "sided greater",
        Sided::Less => "sided less",
    }
}

#[cfg(test)]
mod tests {
    use super::plain;

    #[test]
    fn numbers_are_written_as_a_plan_would() {
        assert_eq!(plain(0.18077062663297522), "0.181");
        assert_eq!(plain(1.0), "1");
        assert_eq!(plain(-0.25), "-0.25");
        assert_eq!(plain(-0.0001), "0");
        assert_eq!(plain(4800.0), "4800");
    }
}
