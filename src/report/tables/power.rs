//! `power.csv`: one row per design × trial count × hypothesis × test (likelihood ratio,
//! Wald): the rejection rate over the simulated (or, with `--exact`, enumerated) datasets
//! with its 95% Wilson interval. When the hypothesis's null is true the rate is a
//! false-positive rate (`null_true`).

use super::{num, opt, share, write};
use crate::engine::{Method, ScenarioSummary};
use crate::plan::Plan;

/// Column names, in order.
pub const COLUMNS: [&str; 12] = [
    "design",
    "record",
    "trials",
    "method",
    "hypothesis",
    "null_true",
    "target",
    "test",
    "rejection_rate",
    "rejection_low",
    "rejection_high",
    "datasets",
];

pub fn render(plan: &Plan, summaries: &[ScenarioSummary]) -> Result<Vec<u8>, csv::Error> {
    let mut rows = Vec::new();
    for s in summaries {
        let design = &plan.designs()[s.scenario.design];
        let method = match s.method {
            Method::MonteCarlo => "monte-carlo",
            Method::Exact => "exact",
        };
        for t in &s.tests {
            let target = plan
                .hypotheses()
                .iter()
                .find(|h| h.name == t.hypothesis)
                .and_then(|h| h.power.or(plan.targets().power));
            for (test, rate) in [("likelihood-ratio", &t.likelihood_ratio), ("wald", &t.wald)] {
                let mut row = vec![
                    design.name.clone(),
                    design.record_label(),
                    s.scenario.trials.to_string(),
                    method.to_string(),
                    t.hypothesis.clone(),
                    t.null_true.to_string(),
                    opt(target),
                    test.to_string(),
                ];
                row.extend(share(rate));
                row.push(num(s.datasets.total));
                rows.push(row);
            }
        }
    }
    write(&COLUMNS, &rows)
}
