//! The `vigil check` report: the plan's title, the observer and study settings, and one row
//! per scenario.

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
    let _ = writeln!(
        out,
        "observer: d′ = {}, c = {}, σ = {}; {} experiments per scenario, seed {}, {:.0}% intervals, {} correction",
        o.d_prime,
        o.criterion,
        o.sigma,
        plan.study().experiments,
        plan.study().seed,
        100.0 * plan.study().confidence,
        plan.study().rate_correction.name()
    );
    let mut t = super::style::new_table(vec![
        "scenario", "design", "record", "presence", "trials", "present", "absent",
    ]);
    for s in plan.scenarios() {
        let d = &plan.designs()[s.design];
        t.add_row(vec![
            (s.id + 1).to_string(),
            d.name.clone(),
            d.record_label(),
            format!("{}", d.presence),
            s.trials.to_string(),
            s.split.present.to_string(),
            s.split.absent.to_string(),
        ]);
    }
    super::style::right_align(&mut t, 4..7);
    let _ = writeln!(out, "{t}");
    let _ = writeln!(
        out,
        "present trials = presence × trials rounded to the nearest whole number (halves round up); absent = the rest."
    );
    out
}
