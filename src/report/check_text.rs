//! The `vigil check` report: the plan's title, the observer and study settings, and one row
//! per scenario.

use super::conditions_text::{EXPECTED_NOTE, any_expected, optimal_rule_text};
use super::format::number;
use crate::design::Counts;
use crate::plan::Plan;
use std::fmt::Write;
use std::path::Path;

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
    let criterion = optimal_rule_text(plan).unwrap_or_else(|| format!("c = {}", o.criterion));
    let _ = writeln!(
        out,
        "observer: d′ = {}, {criterion}, σ = {}; {} experiments per scenario, seed {}, {:.0}% intervals, {} correction",
        o.d_prime,
        o.sigma,
        plan.study().experiments,
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
            let mark = if c.counts == Counts::Expected {
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
                format!("{}", c.presence),
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
    if any_expected(scenarios.iter().flat_map(|s| &s.conditions)) {
        let _ = writeln!(out, "{EXPECTED_NOTE}");
    }
    out
}
