//! Side by side: what recording a rating scale buys over yes/no on the same animals.
//!
//! A yes/no design and a rating design are paired when both are single-condition full
//! records of the same animal: the same presence rate, d′ and criterion (validation puts
//! a rating scale's boundary criterion at the observer's, so only a condition that sets
//! its own d′ or criterion makes two designs differ, and such a pair is never compared).
//! Their common trial counts are compared by the
//! sampling SD of d̂′ and ĉ across simulated experiments (the standard error an experiment
//! of that size really has; the tables call it SD, as it is measured).
//!
//! A row where the rating fit is saturated or its σ barely determined (`analytic::scale_fit`)
//! is flagged: its difference mostly measures estimating σ from too little, not what the
//! scale records, so its reading says so and names the fix instead of stating a gain or loss.

use super::advice_text::scale_fit_text;
use super::format::figure;
use super::style::{new_table, right_align};
use crate::analytic::scale_fit::ScaleFit;
use crate::design::{Condition, Response};
use crate::engine::{Figure, ScenarioSummary};
use crate::plan::Plan;
use crate::vocab::Quantity;
use serde::Serialize;
use std::fmt::Write;

/// |bias of d̂′| above which the side-by-side block points out a biased yes/no estimate.
pub const BIAS_NOTE: f64 = 0.03;

/// One common trial count of a pair. Every figure carries its Monte Carlo SE; the two
/// designs are simulated from independent streams, so a ratio's relative error is the
/// root sum of squares of its parts' (delta method).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComparisonRow {
    pub trials: u32,
    pub sd_d_prime_yes_no: Figure,
    pub sd_d_prime_rating: Figure,
    pub sd_criterion_yes_no: Figure,
    pub sd_criterion_rating: Figure,
    /// SD with the rating scale ÷ SD with yes/no.
    pub ratio_d_prime: Figure,
    pub ratio_criterion: Figure,
    /// RMSE with the rating scale ÷ RMSE with yes/no (bias included).
    pub rmse_ratio_d_prime: Figure,
    pub rmse_ratio_criterion: Figure,
    /// Bias of the yes/no and rating estimates of d′ (shows a wrong equal-variance model).
    pub bias_d_prime_yes_no: Figure,
    pub bias_d_prime_rating: Figure,
    /// The rating fit at this count is saturated or its σ barely determined.
    pub rating_fit_flagged: bool,
}

/// a ÷ b with its Monte Carlo SE, for independent a and b.
fn ratio(a: Figure, b: Figure) -> Figure {
    let value = a.value / b.value;
    Figure {
        value,
        mc_se: value.abs() * ((a.mc_se / a.value).powi(2) + (b.mc_se / b.value).powi(2)).sqrt(),
    }
}

/// A yes/no design and a rating design on the same animals.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Comparison {
    pub yes_no: String,
    pub rating: String,
    pub categories: usize,
    pub rows: Vec<ComparisonRow>,
    /// Why rows are flagged, when any is.
    pub scale_fit: Option<ScaleFit>,
}

/// Every yes/no–rating pair of the plan with at least one common trial count.
pub fn comparisons(
    plan: &Plan,
    summaries: &[ScenarioSummary],
    scale_fits: &[ScaleFit],
) -> Vec<Comparison> {
    let mut out = Vec::new();
    for (y, yd) in plan.designs().iter().enumerate() {
        if !(matches!(yd.response, Response::YesNo) && yd.is_single_table()) {
            continue;
        }
        for (r, rd) in plan.designs().iter().enumerate() {
            let Response::Rating(scale) = &rd.response else {
                continue;
            };
            if !rd.is_single_table() || !same_animal(&yd.conditions[0], &rd.conditions[0]) {
                continue;
            }
            let fit = scale_fits.iter().find(|f| f.design == rd.name);
            let rows: Vec<ComparisonRow> = yd
                .trials
                .iter()
                .filter_map(|&t| row(summaries, y, r, t))
                .map(|mut row| {
                    row.rating_fit_flagged = fit.is_some_and(|f| f.flags(row.trials));
                    row
                })
                .collect();
            if rows.is_empty() {
                continue;
            }
            out.push(Comparison {
                yes_no: yd.name.clone(),
                rating: rd.name.clone(),
                categories: scale.categories,
                rows,
                scale_fit: fit.cloned(),
            });
        }
    }
    out
}

/// Whether two conditions simulate one animal at one presence rate (σ and lapses are the
/// observer's, common to every design).
fn same_animal(a: &Condition, b: &Condition) -> bool {
    a.presence == b.presence && a.d_prime == b.d_prime && a.criterion == b.criterion
}

fn row(summaries: &[ScenarioSummary], y: usize, r: usize, trials: u32) -> Option<ComparisonRow> {
    let find = |d: usize| {
        summaries
            .iter()
            .find(|s| s.scenario.design == d && s.scenario.trials == trials)
    };
    let (ys, rs) = (find(y)?, find(r)?);
    let get = |s: &ScenarioSummary, q: Quantity| s.quantity(q).cloned();
    let (yd, rd) = (get(ys, Quantity::DPrime)?, get(rs, Quantity::DPrime)?);
    let (yc, rc) = (get(ys, Quantity::Criterion)?, get(rs, Quantity::Criterion)?);
    Some(ComparisonRow {
        trials,
        sd_d_prime_yes_no: yd.sd,
        sd_d_prime_rating: rd.sd,
        sd_criterion_yes_no: yc.sd,
        sd_criterion_rating: rc.sd,
        ratio_d_prime: ratio(rd.sd, yd.sd),
        ratio_criterion: ratio(rc.sd, yc.sd),
        rmse_ratio_d_prime: ratio(rd.rmse, yd.rmse),
        rmse_ratio_criterion: ratio(rc.rmse, yc.rmse),
        bias_d_prime_yes_no: yd.bias,
        bias_d_prime_rating: rd.bias,
        rating_fit_flagged: false,
    })
}

/// "cuts the SD of c by 23% (± 2)" or "raises the SD of c by 5% (± 2)"; ± is the Monte
/// Carlo SE in percentage points.
fn change(ratio: Figure, what: &str) -> String {
    if !ratio.value.is_finite() {
        return format!(
            "leaves the change in the SD of {what} unknown (no usable dataset in one of the two designs)"
        );
    }
    let pct = (100.0 * (1.0 - ratio.value)).round();
    let pm = (100.0 * ratio.mc_se).round();
    let pm = if pm.is_finite() {
        format!(" (± {pm:.0})")
    } else {
        String::new()
    };
    if pct >= 0.0 {
        format!("cuts the SD of {what} by {pct:.0}%{pm}")
    } else {
        format!("raises the SD of {what} by {:.0}%{pm}", -pct)
    }
}

/// The comparison block of the terminal report (empty when the plan has no pair); `level`
/// is the plan's confidence level (for the scale-fit warning).
pub fn render(comparisons: &[Comparison], level: f64) -> String {
    let mut out = String::new();
    for c in comparisons {
        let _ = writeln!(
            out,
            "■ Side by side: \"{}\" against \"{}\"",
            c.rating, c.yes_no
        );
        let mut t = new_table(vec![
            "trials",
            "SD d′ yes/no",
            "SD d′ rating",
            "ratio d′",
            "SD c yes/no",
            "SD c rating",
            "ratio c",
            "RMSE ratio d′",
            "RMSE ratio c",
        ]);
        for r in &c.rows {
            t.add_row(vec![
                if r.rating_fit_flagged {
                    format!("{} *", r.trials)
                } else {
                    r.trials.to_string()
                },
                figure(&r.sd_d_prime_yes_no, 3),
                figure(&r.sd_d_prime_rating, 3),
                figure(&r.ratio_d_prime, 2),
                figure(&r.sd_criterion_yes_no, 3),
                figure(&r.sd_criterion_rating, 3),
                figure(&r.ratio_criterion, 2),
                figure(&r.rmse_ratio_d_prime, 2),
                figure(&r.rmse_ratio_criterion, 2),
            ]);
        }
        right_align(&mut t, 0..9);
        let _ = writeln!(out, "{t}");
        let _ = writeln!(
            out,
            "SD = spread of the estimates across simulated experiments, the standard error an experiment of that size really has; ratios = rating ÷ yes/no; RMSE includes bias."
        );
        if let Some(f) = &c.scale_fit
            && c.rows.iter().any(|r| r.rating_fit_flagged)
        {
            let _ = writeln!(
                out,
                "* not a like-for-like result: {}.",
                scale_fit_text(f, level)
            );
        }
        for r in [c.rows.first(), c.rows.last()].into_iter().flatten() {
            if r.rating_fit_flagged {
                let _ = writeln!(
                    out,
                    "Reading: at {} trials the {}-step fit is flagged (*): the rating SDs there mostly show σ estimated from too little, so no gain or loss of the scale is read from them.",
                    r.trials, c.categories
                );
                if c.rows.len() == 1 {
                    break;
                }
                continue;
            }
            let _ = writeln!(
                out,
                "Reading: recording the {}-step response {} and {} at {} trials.",
                c.categories,
                change(r.ratio_criterion, "c"),
                change(r.ratio_d_prime, "d′"),
                r.trials
            );
            if c.rows.len() == 1 {
                break;
            }
        }
        if let Some(last) = c.rows.last()
            && last.bias_d_prime_yes_no.value.abs() > BIAS_NOTE
            && last.bias_d_prime_yes_no.value.abs() > 2.0 * last.bias_d_prime_rating.value.abs()
        {
            let _ = writeln!(
                out,
                "Note: at {} trials the yes/no estimate of d′ is biased by {:+.3} (rating: {:+.3}); the yes/no model assumes equal variances, and more trials do not remove that bias.",
                last.trials, last.bias_d_prime_yes_no.value, last.bias_d_prime_rating.value
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
        let f = |value, mc_se| Figure { value, mc_se };
        assert_eq!(change(f(0.77, 0.02), "c"), "cuts the SD of c by 23% (± 2)");
        assert_eq!(
            change(f(1.05, 0.01), "d′"),
            "raises the SD of d′ by 5% (± 1)"
        );
    }
}
