//! `sensitivity.csv`: one row per design × assumption × value × driving test: the answer
//! with that value, the approximate power at the plan's own answer, and — at the corners
//! (each assumption's lowest and highest value) — the simulated power at the answer there.

use super::{num, opt, share, write};
use crate::uncertainty::SensitivityReport;

/// Column names, in order.
pub const COLUMNS: [&str; 16] = [
    "design",
    "assumption",
    "value",
    "plan_value",
    "animals",
    "trials",
    "cost",
    "test",
    "target",
    "approx_power",
    "approx_power_at_plan_answer",
    "corner",
    "simulated_power",
    "simulated_low",
    "simulated_high",
    "meets_targets",
];

pub fn render(report: Option<&SensitivityReport>) -> Result<Vec<u8>, csv::Error> {
    let mut rows = Vec::new();
    for d in report.map_or(&[][..], |r| &r.designs) {
        for s in &d.sweeps {
            for p in &s.points {
                let corner = s.corners.iter().find(|c| c.value == p.value);
                for (t, (name, target)) in d.tests.iter().enumerate() {
                    let a = p.answer.as_ref();
                    let mut row = vec![
                        d.design.clone(),
                        s.key.clone(),
                        num(p.value),
                        num(s.plan_value),
                        a.and_then(|a| a.chosen.animals)
                            .map_or_else(String::new, |n| n.to_string()),
                        a.map_or_else(String::new, |a| a.chosen.trials.to_string()),
                        opt(a.and_then(|a| a.cost)),
                        name.clone(),
                        opt(*target),
                        opt(a.and_then(|a| a.power.get(t).copied())),
                        opt(p.power_at_plan_answer.get(t).copied()),
                        corner.is_some().to_string(),
                    ];
                    match corner.and_then(|c| c.power.get(t).map(|s| (c, s))) {
                        Some((c, sh)) => {
                            row.extend(share(sh));
                            row.push(c.meets_targets.map_or_else(String::new, |m| m.to_string()));
                        }
                        None => row.extend(std::iter::repeat_n(String::new(), 4)),
                    }
                    rows.push(row);
                }
            }
        }
    }
    write(&COLUMNS, &rows)
}
