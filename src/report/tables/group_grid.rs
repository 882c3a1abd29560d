//! `group_grid.csv`: the group grid, one row per design × animals × trials per condition ×
//! analysis (two-stage, pooled) × group test. Each row carries the test's rejection rate
//! (power, or the false-positive rate when the population sits on the null), the rejection
//! rate of the contrast's true value, the share of studies without an answer, and the
//! cell's precision of the group mean c and d′ under that analysis. A design without
//! group tests has one row per cell and analysis, test columns empty.

use super::{figure, num, opt, share, write};
use crate::groups::summary::{GroupPrecision, GroupTestSummary};
use crate::groups::{GridCell, GroupReport};
use crate::vocab::Sided;

/// Column names, in order.
pub const COLUMNS: [&str; 47] = [
    "design",
    "record",
    "animals",
    "trials",
    "trials_per_animal",
    "cost",
    "studies",
    "analysis",
    "test",
    "kind",
    "sided",
    "effect",
    "target",
    "rejection_rate",
    "rejection_low",
    "rejection_high",
    "true_value_rejection_rate",
    "true_value_rejection_low",
    "true_value_rejection_high",
    "no_answer",
    "no_answer_low",
    "no_answer_high",
    "criterion_truth",
    "criterion_mean",
    "criterion_mean_mc_se",
    "criterion_sd",
    "criterion_sd_mc_se",
    "criterion_mean_se",
    "criterion_mean_se_mc_se",
    "criterion_coverage",
    "criterion_coverage_low",
    "criterion_coverage_high",
    "criterion_half_width",
    "criterion_half_width_mc_se",
    "d_prime_truth",
    "d_prime_mean",
    "d_prime_mean_mc_se",
    "d_prime_sd",
    "d_prime_sd_mc_se",
    "d_prime_mean_se",
    "d_prime_mean_se_mc_se",
    "d_prime_coverage",
    "d_prime_coverage_low",
    "d_prime_coverage_high",
    "d_prime_half_width",
    "d_prime_half_width_mc_se",
    "animals_dropped",
];

fn sided(s: Sided) -> &'static str {
    match s {
        Sided::TwoSided => "two-sided",
        Sided::Greater => "greater",
        Sided::Less => "less",
    }
}

fn precision(p: &GroupPrecision) -> Vec<String> {
    let mut v = vec![num(p.truth)];
    v.extend(figure(&p.mean));
    v.extend(figure(&p.sd));
    v.extend(figure(&p.mean_se));
    v.extend(share(&p.coverage));
    v.extend(figure(&p.half_width));
    v
}

/// The test columns of one analysis (empty without a test).
fn test_columns(t: Option<&GroupTestSummary>, pooled: bool) -> Vec<String> {
    let Some(t) = t else {
        return vec![String::new(); 14];
    };
    let (rate, truth, failed) = if pooled {
        (&t.pooled, &t.pooled_false, &t.pooled_failed)
    } else {
        (&t.two_stage, &t.two_stage_false, &t.two_stage_failed)
    };
    let mut v = vec![
        t.name.clone(),
        t.kind.name().to_string(),
        sided(t.sided).to_string(),
        num(t.effect),
        opt(t.target),
    ];
    v.extend(share(rate));
    v.extend(share(truth));
    v.extend(share(failed));
    v
}

fn cell_rows(design: &str, record: &str, cell: &GridCell, rows: &mut Vec<Vec<String>>) {
    let s = &cell.summary;
    for (analysis, pooled) in [("two-stage", false), ("pooled", true)] {
        let (c, d) = if pooled {
            (&s.pooled_criterion, &s.pooled_d_prime)
        } else {
            (&s.criterion, &s.d_prime)
        };
        let tests: Vec<Option<&GroupTestSummary>> = if s.tests.is_empty() {
            vec![None]
        } else {
            s.tests.iter().map(Some).collect()
        };
        for t in tests {
            let mut row = vec![
                design.to_string(),
                record.to_string(),
                cell.animals.to_string(),
                cell.trials.to_string(),
                cell.trials_per_animal.to_string(),
                opt(cell.cost),
                s.studies.to_string(),
                analysis.to_string(),
            ];
            row.extend(test_columns(t, pooled));
            row.extend(precision(c));
            row.extend(precision(d));
            row.push(num(s.animals_dropped.value));
            rows.push(row);
        }
    }
}

pub fn render(groups: Option<&GroupReport>) -> Result<Vec<u8>, csv::Error> {
    let mut rows = Vec::new();
    for d in groups.map_or(&[][..], |g| &g.designs) {
        for cell in &d.cells {
            cell_rows(&d.design, &d.record, cell, &mut rows);
        }
    }
    write(&COLUMNS, &rows)
}
