//! The verdict: one row per design with the trials it needs and the target that binds, and
//! one line per pair of designs saying what the extra measure buys.

use super::style::{new_table, right_align};
use crate::search::{SearchOutcome, SearchResult, Target, TargetValue};
use std::fmt::Write;

/// A target's value at the answer as the verdict table shows it (power with its Wilson
/// interval, other targets ± their Monte Carlo SE); the justification reuses it.
pub fn value_text(v: &TargetValue) -> String {
    match v.target {
        Target::Power { .. } => format!("{:.3} ({:.3}–{:.3})", v.value, v.low, v.high),
        _ => format!("{:.3} ± {:.3}", v.value, (v.high - v.low) / 2.0),
    }
}

/// The answer's count as the verdict table shows it: "412 ± 37", or "412" with no band.
pub fn trials_text(trials: u32, band: u32) -> String {
    if band > 0 {
        format!("{trials} ± {band}")
    } else {
        trials.to_string()
    }
}

/// Column names of the verdict table.
pub const HEADER: [&str; 5] = [
    "design",
    "trials per condition",
    "binding target",
    "at that count",
    "expected information said",
];

/// The verdict table's cells, one row per design (the terminal and the report page share them).
pub fn rows(results: &[SearchResult], max_trials: u32) -> Vec<[String; 5]> {
    results
        .iter()
        .map(|r| match &r.outcome {
            SearchOutcome::Found {
                trials,
                band,
                binding,
                values,
                asymptotic_trials,
                ..
            } => [
                r.design.clone(),
                trials_text(*trials, *band),
                binding.describe(),
                values
                    .iter()
                    .find(|v| &v.target == binding)
                    .map(value_text)
                    .unwrap_or_default(),
                asymptotic_trials.map_or_else(|| "–".into(), |n| n.to_string()),
            ],
            SearchOutcome::NotReached { .. } => [
                r.design.clone(),
                format!("more than {max_trials}"),
                "see below".into(),
                String::new(),
                String::new(),
            ],
            SearchOutcome::NoTargets => [
                r.design.clone(),
                "–".into(),
                "no target applies".into(),
                String::new(),
                String::new(),
            ],
        })
        .collect()
}

/// The verdict block of the terminal report (empty when nothing was searched).
pub fn render(results: &[SearchResult], max_trials: u32) -> String {
    if results
        .iter()
        .all(|r| matches!(r.outcome, SearchOutcome::NoTargets))
    {
        return String::new();
    }
    let mut out = String::new();
    let _ = writeln!(
        out,
        "■ Verdict: the smallest experiment that meets every target"
    );
    let mut t = new_table(HEADER.to_vec());
    for row in rows(results, max_trials) {
        t.add_row(row.to_vec());
    }
    right_align(&mut t, 1..2);
    let _ = writeln!(out, "{t}");
    let _ = writeln!(
        out,
        "Power is the likelihood-ratio test's rejection rate (95% Wilson interval); ± is the Monte Carlo uncertainty of the count."
    );
    for r in results {
        if let SearchOutcome::NotReached { reasons, .. } = &r.outcome {
            for reason in reasons {
                let _ = writeln!(out, "{}: {reason}.", r.design);
            }
        }
    }
    let found: Vec<(&str, u32, &Target)> = results
        .iter()
        .filter_map(|r| match &r.outcome {
            SearchOutcome::Found {
                trials, binding, ..
            } => Some((r.design.as_str(), *trials, binding)),
            _ => None,
        })
        .collect();
    for (i, a) in found.iter().enumerate() {
        for b in &found[i + 1..] {
            let _ = writeln!(out, "{}", pair_line(a, b));
        }
    }
    let _ = writeln!(out);
    out
}

/// "“4-step graded” needs 35% fewer trials than “yes/no” to reach … (52 against 80)".
fn pair_line(a: &(&str, u32, &Target), b: &(&str, u32, &Target)) -> String {
    let (x, y) = if a.1 <= b.1 { (a, b) } else { (b, a) };
    let what = match x.2 {
        Target::Power {
            hypothesis,
            at_least,
        } => format!("power {at_least} for \"{hypothesis}\""),
        other => other.describe(),
    };
    if x.1 == y.1 {
        return format!(
            "\"{}\" and \"{}\" need the same {} trials per condition.",
            x.0, y.0, x.1
        );
    }
    let saving = 100.0 * (1.0 - f64::from(x.1) / f64::from(y.1));
    format!(
        "\"{}\" needs {saving:.0}% fewer trials than \"{}\" to meet every target, {what} binding ({} against {} per condition).",
        x.0, y.0, x.1, y.1
    )
}
