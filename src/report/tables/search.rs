//! `search.csv`: every Monte Carlo evaluation of the sample-size search, one row per
//! design × evaluation × target, in the order the search made them; `answer` marks the
//! rows of the count the search reports.

use super::{num, write};
use crate::search::{SearchOutcome, SearchResult, Target};

/// Column names, in order.
pub const COLUMNS: [&str; 12] = [
    "design",
    "evaluation",
    "trials",
    "target",
    "on",
    "threshold",
    "value",
    "low",
    "high",
    "met",
    "all_met",
    "answer",
];

/// The target's kind, what it is about and its threshold.
fn target_columns(t: &Target) -> [String; 3] {
    match t {
        Target::Power {
            hypothesis,
            at_least,
        } => ["power".into(), hypothesis.clone(), num(*at_least)],
        Target::HalfWidth { quantity, at_most } => [
            "half-width".into(),
            quantity.key().to_string(),
            num(*at_most),
        ],
        Target::Correlation { at_most } => [
            "correlation".into(),
            "d_prime,criterion".into(),
            num(*at_most),
        ],
    }
}

pub fn render(searches: &[SearchResult]) -> Result<Vec<u8>, csv::Error> {
    let mut rows = Vec::new();
    for s in searches {
        let answer = match s.outcome {
            SearchOutcome::Found { trials, .. } => Some(trials),
            _ => None,
        };
        for (i, point) in s.evaluated.iter().enumerate() {
            for v in &point.values {
                let mut row = vec![
                    s.design.clone(),
                    (i + 1).to_string(),
                    point.trials.to_string(),
                ];
                row.extend(target_columns(&v.target));
                row.extend([
                    num(v.value),
                    num(v.low),
                    num(v.high),
                    v.met.to_string(),
                    point.met.to_string(),
                    (answer == Some(point.trials)).to_string(),
                ]);
                rows.push(row);
            }
        }
    }
    write(&COLUMNS, &rows)
}
