//! Side by side: what recording a rating scale buys over yes/no on the same animals.
//!
//! A yes/no design and a rating design are paired when both are single-condition full
//! records with the same presence rate; their common trial counts are compared by the
//! sampling SD of d̂′ and ĉ across simulated experiments (the standard error an experiment
//! of that size really has).

use super::format::number;
use super::style::{new_table, right_align};
use crate::design::Response;
use crate::engine::{Quantity, ScenarioSummary};
use crate::plan::Plan;
use serde::Serialize;
use std::fmt::Write;

/// |bias of d̂′| above which the side-by-side block points out a biased yes/no estimate.
pub const BIAS_NOTE: f64 = 0.03;

/// One common trial count of a pair.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComparisonRow {
    pub trials: u32,
    pub sd_d_prime_yes_no: f64,
    pub sd_d_prime_rating: f64,
    pub sd_criterion_yes_no: f64,
    pub sd_criterion_rating: f64,
    /// RMSE with the rating scale ÷ RMSE with yes/no (bias included), for d′ and c.
    pub rmse_ratio_d_prime: f64,
    pub rmse_ratio_criterion: f64,
    /// Bias of the yes/no and rating estimates of d′ (shows a wrong equal-variance model).
    pub bias_d_prime_yes_no: f64,
    pub bias_d_prime_rating: f64,
}

impl ComparisonRow {
    /// SD with the rating scale ÷ SD with yes/no, for d′.
    pub fn ratio_d_prime(&self) -> f64 {
        self.sd_d_prime_rating / self.sd_d_prime_yes_no
    }

    /// SD with the rating scale ÷ SD with yes/no, for c.
    pub fn ratio_criterion(&self) -> f64 {
        self.sd_criterion_rating / self.sd_criterion_yes_no
    }
}

/// A yes/no design and a rating design on the same animals.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Comparison {
    pub yes_no: String,
    pub rating: String,
    pub categories: usize,
    /// |c of the rating boundary − c of the yes/no design|, when the two differ.
    pub criterion_mismatch: Option<f64>,
    pub rows: Vec<ComparisonRow>,
}

/// Every yes/no–rating pair of the plan with at least one common trial count.
pub fn comparisons(plan: &Plan, summaries: &[ScenarioSummary]) -> Vec<Comparison> {
    let mut out = Vec::new();
    for (y, yd) in plan.designs.iter().enumerate() {
        if !(matches!(yd.response, Response::YesNo) && yd.is_single_table()) {
            continue;
        }
        for (r, rd) in plan.designs.iter().enumerate() {
            let Response::Rating(scale) = &rd.response else {
                continue;
            };
            if !rd.is_single_table() || rd.presence != yd.presence {
                continue;
            }
            let rows: Vec<ComparisonRow> = yd
                .trials
                .iter()
                .filter_map(|&t| row(summaries, y, r, t))
                .collect();
            if rows.is_empty() {
                continue;
            }
            let gap = (rd.conditions[0].criterion - yd.conditions[0].criterion).abs();
            out.push(Comparison {
                yes_no: yd.name.clone(),
                rating: rd.name.clone(),
                categories: scale.categories,
                criterion_mismatch: (gap > 0.01).then_some(gap),
                rows,
            });
        }
    }
    out
}

fn row(summaries: &[ScenarioSummary], y: usize, r: usize, trials: u32) -> Option<ComparisonRow> {
    let find = |d: usize| {
        summaries
            .iter()
            .find(|s| s.scenario.design == d && s.scenario.trials == trials)
    };
    let (ys, rs) = (find(y)?, find(r)?);
    let sd = |s: &ScenarioSummary, q: Quantity| s.quantity(q).map(|x| x.sd.value);
    let rmse = |s: &ScenarioSummary, q: Quantity| s.quantity(q).map(|x| x.rmse.value);
    let bias = |s: &ScenarioSummary| s.quantity(Quantity::DPrime).map(|x| x.bias.value);
    Some(ComparisonRow {
        trials,
        sd_d_prime_yes_no: sd(ys, Quantity::DPrime)?,
        sd_d_prime_rating: sd(rs, Quantity::DPrime)?,
        sd_criterion_yes_no: sd(ys, Quantity::Criterion)?,
        sd_criterion_rating: sd(rs, Quantity::Criterion)?,
        rmse_ratio_d_prime: rmse(rs, Quantity::DPrime)? / rmse(ys, Quantity::DPrime)?,
        rmse_ratio_criterion: rmse(rs, Quantity::Criterion)? / rmse(ys, Quantity::Criterion)?,
        bias_d_prime_yes_no: bias(ys)?,
        bias_d_prime_rating: bias(rs)?,
    })
}

/// "cuts the SE of c by 23%" or "raises the SE of c by 5%".
fn change(ratio: f64, what: &str) -> String {
    let pct = (100.0 * (1.0 - ratio)).round();
    if pct >= 0.0 {
        format!("cuts the SE of {what} by {pct:.0}%")
    } else {
        format!("raises the SE of {what} by {:.0}%", -pct)
    }
}

/// The comparison block of the terminal report (empty when the plan has no pair).
pub fn render(comparisons: &[Comparison]) -> String {
    let mut out = String::new();
    for c in comparisons {
        let _ = writeln!(
            out,
            "■ Side by side: \"{}\" against \"{}\"",
            c.rating, c.yes_no
        );
        let mut t = new_table(vec![
            "trials",
            "SE d′ yes/no",
            "SE d′ rating",
            "ratio",
            "SE c yes/no",
            "SE c rating",
            "ratio",
            "RMSE ratio d′",
            "RMSE ratio c",
        ]);
        for r in &c.rows {
            t.add_row(vec![
                r.trials.to_string(),
                number(r.sd_d_prime_yes_no, 3),
                number(r.sd_d_prime_rating, 3),
                number(r.ratio_d_prime(), 2),
                number(r.sd_criterion_yes_no, 3),
                number(r.sd_criterion_rating, 3),
                number(r.ratio_criterion(), 2),
                number(r.rmse_ratio_d_prime, 2),
                number(r.rmse_ratio_criterion, 2),
            ]);
        }
        right_align(&mut t, 0..9);
        let _ = writeln!(out, "{t}");
        let _ = writeln!(
            out,
            "SE = SD of the estimates across simulated experiments; ratios = rating ÷ yes/no; RMSE includes bias."
        );
        for r in [c.rows.first(), c.rows.last()].into_iter().flatten() {
            let _ = writeln!(
                out,
                "Reading: recording the {}-step response {} and {} at {} trials.",
                c.categories,
                change(r.ratio_criterion(), "c"),
                change(r.ratio_d_prime(), "d′"),
                r.trials
            );
            if c.rows.len() == 1 {
                break;
            }
        }
        if let Some(last) = c.rows.last()
            && last.bias_d_prime_yes_no.abs() > BIAS_NOTE
            && last.bias_d_prime_yes_no.abs() > 2.0 * last.bias_d_prime_rating.abs()
        {
            let _ = writeln!(
                out,
                "Note: at {} trials the yes/no estimate of d′ is biased by {:+.3} (rating: {:+.3}); the yes/no model assumes equal variances, and more trials do not remove that bias.",
                last.trials, last.bias_d_prime_yes_no, last.bias_d_prime_rating
            );
        }
        if let Some(gap) = c.criterion_mismatch {
            let _ = writeln!(
                out,
                "Note: the two designs assume boundary criteria {gap:.2} apart; for a like-for-like comparison make the scale's boundary criterion equal the observer's criterion."
            );
        }
        let _ = writeln!(out);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn readings_say_cut_or_raise() {
        assert_eq!(change(0.77, "c"), "cuts the SE of c by 23%");
        assert_eq!(change(1.05, "d′"), "raises the SE of d′ by 5%");
    }
}
