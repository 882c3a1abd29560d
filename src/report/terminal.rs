//! The terminal report: one block per design with a precision table, a trade-off table
//! and a one-line reading.

use super::CAUTION;
use super::conditions_text::{
    EXPECTED_NOTE, any_expected, conditions_text, optimal_rule_text, split_text,
};
use super::format::{figure, number, percent, plain, share, signed};
use super::reading::{ReadingContext, reading};
use super::style::{new_table, right_align};
use crate::analytic::advice::RunAdvice;
use crate::design::{Design, Response};
use crate::engine::{Method, ScenarioSummary};
use crate::plan::Plan;
use comfy_table::Table;
use std::fmt::Write;

/// The whole `vigil run` report, composed section by section: the per-design blocks and the
/// side-by-side comparison, then the sample-size verdict and the group section when there
/// are any, then the closing caution. `advice` is what the expected information adds to the
/// readings (`RunAdvice::of`).
pub fn render_run(
    plan: &Plan,
    summaries: &[ScenarioSummary],
    searches: &[crate::search::SearchResult],
    groups: Option<&crate::groups::GroupReport>,
    advice: &RunAdvice,
    uncertainty: Option<&crate::uncertainty::UncertaintyReport>,
) -> String {
    let mut out = render_designs(plan, summaries, advice);
    out.push_str(&super::verdict::render(searches, plan.study().max_trials));
    if let Some(g) = groups {
        out.push_str(&super::groups_text::render_section(plan, g));
    }
    if let Some(u) = uncertainty {
        out.push_str(&super::uncertainty_text::render_section(
            u,
            plan.study().experiments,
        ));
    }
    let _ = writeln!(out, "Caution: {CAUTION}");
    super::layout::wrap_prose(&out)
}

/// Header, one block per design and the side-by-side comparison.
fn render_designs(plan: &Plan, summaries: &[ScenarioSummary], advice: &RunAdvice) -> String {
    let mut out = String::new();
    header(&mut out, plan, summaries);
    for (d, design) in plan.designs().iter().enumerate() {
        let rows: Vec<&ScenarioSummary> = summaries
            .iter()
            .filter(|s| s.scenario.design == d)
            .collect();
        let context = ReadingContext {
            advice: advice.designs.get(d).and_then(Option::as_ref),
            scale_fit: advice.scale_fit(&design.name),
        };
        design_block(&mut out, plan, design, &rows, context);
    }
    out.push_str(&super::comparison::render(
        &super::comparison::comparisons(plan, summaries, &advice.scale_fits),
        plan.study().confidence,
    ));
    out
}

fn header(out: &mut String, plan: &Plan, summaries: &[ScenarioSummary]) {
    let o = plan.observer();
    let r = o.rates();
    let lean = if o.criterion > 0.0 {
        "conservative"
    } else if o.criterion < 0.0 {
        "liberal"
    } else {
        "unbiased"
    };
    let _ = writeln!(out, "vigil — {}", plan.study().title);
    match optimal_rule_text(plan) {
        // Each condition has its own criterion (and rates): the design blocks list them.
        Some(rule) => {
            let _ = writeln!(
                out,
                "Hypothesised observer: d′ = {}, {rule} (listed with each design), σ = {}",
                number(o.d_prime, 2),
                plain(o.sigma)
            );
        }
        None => {
            let _ = writeln!(
                out,
                "Hypothesised observer: d′ = {}, c = {} ({lean}), σ = {}; yes/no rates H = {}, F = {}",
                number(o.d_prime, 2),
                signed(o.criterion, 2),
                plain(o.sigma),
                number(r.hit, 3),
                number(r.false_alarm, 3)
            );
        }
    }
    if plan
        .designs()
        .iter()
        .any(|d| d.record == crate::design::RecordKind::TwoChoice)
    {
        // The choice compares two samples: its table has d_a·√2 where yes/no has d′
        // (d_a = d′·√(2/(1 + σ²)), = d′ at σ = 1; Macmillan & Creelman 2005, ch. 7).
        let d_a = o.d_prime * (2.0 / (1.0 + o.sigma * o.sigma)).sqrt();
        let x = d_a / std::f64::consts::SQRT_2;
        let _ = writeln!(
            out,
            "Two-choice designs: P(left | target left) = {}, P(left | target right) = {}; proportion correct without side bias p_c = {}",
            number(crate::model::normal::cdf(x - o.criterion), 3),
            number(crate::model::normal::cdf(-x - o.criterion), 3),
            number(crate::model::normal::cdf(x), 3)
        );
    }
    let exact = summaries.iter().any(|s| s.method == Method::Exact);
    let how = if exact {
        let bound = summaries
            .iter()
            .filter_map(|s| s.neglected_mass)
            .fold(0.0, f64::max);
        format!(
            "exact enumeration of the outcomes (those left out, each under 1e-18 of the most probable, hold at most {bound:.0e} of the probability in any row; no Monte Carlo error)"
        )
    } else {
        format!(
            "{} per row, seed {}",
            super::precision_text::settings_sentence_start(plan.study()),
            plan.study().seed
        )
    };
    let _ = writeln!(
        out,
        "{how}; {:.0}% Wald intervals; rates of 0 or 1: {} correction",
        100.0 * plan.study().confidence,
        plan.study().rate_correction.name()
    );
    let figures = if exact {
        "Figures are exact expectations over the possible datasets (all but the negligible ones above), each weighted by its probability, so they carry no ±; shares are exact probabilities."
    } else {
        "Figures are means over datasets ± their Monte Carlo SE; shares carry a 95% Wilson interval."
    };
    let _ = writeln!(out, "{figures}");
    let _ = writeln!(out);
}

fn design_block(
    out: &mut String,
    plan: &Plan,
    design: &Design,
    rows: &[&ScenarioSummary],
    context: ReadingContext,
) {
    let detail = match &design.response {
        Response::YesNo if design.record == crate::design::RecordKind::TwoChoice => {
            "choice of a side".to_string()
        }
        Response::YesNo => "yes/no".to_string(),
        Response::Rating(s) => format!(
            "{}-category rating, boundary at criterion {}{}",
            s.categories,
            s.boundary,
            if s.fix_sigma { ", σ fixed at 1" } else { "" }
        ),
    };
    let presence = conditions_text(plan, design);
    let record = match design.record {
        crate::design::RecordKind::Full => String::new(),
        _ => format!("; {}", design.record_label()),
    };
    let _ = writeln!(out, "■ {}  ({detail}{record}; {presence})", design.name);
    let split_header = if design.record == crate::design::RecordKind::TwoChoice {
        "left/right"
    } else {
        "present/absent"
    };
    let _ = writeln!(
        out,
        "{}",
        precision_table(rows, plan.study().confidence, split_header)
    );
    if any_expected(rows.iter().flat_map(|s| &s.scenario.conditions)) {
        let _ = writeln!(out, "{EXPECTED_NOTE}");
    }
    let _ = writeln!(out, "{}", tradeoff_table(rows));
    if rows.iter().any(|s| !s.tests.is_empty()) {
        let _ = writeln!(out, "{}", power_table(rows, plan.study().alpha));
        for line in type_one_notes(rows, plan.study().alpha) {
            let _ = writeln!(out, "{line}");
        }
    }
    for line in super::precision_text::rows_lines(rows) {
        let _ = writeln!(out, "{line}");
    }
    for line in super::coverage_notes::run_notes(rows, plan.study().confidence) {
        let _ = writeln!(out, "{line}");
    }
    let _ = writeln!(out, "Reading: {}", reading(plan, design, rows, context));
    let _ = writeln!(out);
}

/// `split_header` names the two rows of the split: present/absent, or left/right (where
/// the target was) in a two-choice task.
fn precision_table(rows: &[&ScenarioSummary], level: f64, split_header: &str) -> Table {
    let cover = format!("{:.0}% coverage", 100.0 * level);
    let mut t = new_table(vec![
        "trials",
        split_header,
        "",
        "truth",
        "mean",
        "bias",
        "SD",
        "asympt. SE",
        "RMSE",
        "mean SE",
        &cover,
        "width",
    ]);
    for s in rows {
        let splits = row_splits(s);
        for (i, q) in s.quantities.iter().enumerate() {
            let first = i == 0;
            t.add_row(vec![
                if first {
                    s.scenario.trials.to_string()
                } else {
                    String::new()
                },
                splits[i].clone(),
                q.label(),
                number(q.truth, 3),
                figure(&q.mean, 3),
                figure(&q.bias, 3),
                figure(&q.sd, 3),
                q.asymptotic_se.map_or_else(|| "–".into(), |x| number(x, 3)),
                figure(&q.rmse, 3),
                figure(&q.mean_se, 3),
                share(&q.coverage),
                figure(&q.mean_width, 3),
            ]);
        }
    }
    right_align(&mut t, 0..2);
    t
}

/// The present/absent cell of each quantity row: a single condition's split on the first
/// row; with several conditions, each condition's split on the first row of a quantity of
/// its own (rows of shared quantities stay empty), or every split on the first row when
/// some condition has no row of its own (everything shared).
fn row_splits(s: &ScenarioSummary) -> Vec<String> {
    let conditions = &s.scenario.conditions;
    let mut cells = vec![String::new(); s.quantities.len()];
    if cells.is_empty() {
        return cells;
    }
    if conditions.len() <= 1 {
        cells[0] = conditions.first().map(split_text).unwrap_or_default();
        return cells;
    }
    let rows: Vec<Option<usize>> = conditions
        .iter()
        .map(|c| {
            s.quantities
                .iter()
                .position(|q| q.condition.as_deref() == Some(c.name.as_str()))
        })
        .collect();
    if rows.iter().all(Option::is_some) {
        for (c, row) in conditions.iter().zip(rows) {
            cells[row.unwrap_or(0)] = split_text(c);
        }
    } else {
        let all: Vec<String> = conditions.iter().map(split_text).collect();
        cells[0] = all.join(" · ");
    }
    cells
}

/// "r(d̂′, ĉ)", naming the condition when the pair belongs to one of several.
fn correlation_label(rows: &[&ScenarioSummary]) -> String {
    let name = |i: usize| {
        rows.first()
            .and_then(|s| s.quantities.get(i))
            .and_then(|q| q.condition.as_deref())
            .map(|c| format!("[{c}]"))
            .unwrap_or_default()
    };
    format!("r(d̂′{}, ĉ{})", name(0), name(1))
}

fn tradeoff_table(rows: &[&ScenarioSummary]) -> Table {
    let label = correlation_label(rows);
    let mut t = new_table(vec![
        "trials",
        &label,
        "rate of 0 or 1",
        "left out: degenerate",
        "left out: not converged",
    ]);
    for s in rows {
        t.add_row(vec![
            s.scenario.trials.to_string(),
            figure(&s.correlation, 3),
            percent(s.datasets.extreme.value),
            percent(s.datasets.degenerate.value),
            percent(s.datasets.not_converged.value),
        ]);
    }
    right_align(&mut t, 0..1);
    t
}

fn power_table(rows: &[&ScenarioSummary], alpha: f64) -> Table {
    let mut t = new_table(vec![
        "trials",
        "hypothesis",
        "power: likelihood ratio",
        "power: Wald",
    ]);
    for s in rows {
        for (i, test) in s.tests.iter().enumerate() {
            let label = if test.null_true {
                format!("{} (null true: rate vs α = {alpha})", test.hypothesis)
            } else {
                test.hypothesis.clone()
            };
            t.add_row(vec![
                if i == 0 {
                    s.scenario.trials.to_string()
                } else {
                    String::new()
                },
                label,
                share(&test.likelihood_ratio),
                share(&test.wald),
            ]);
        }
    }
    right_align(&mut t, 0..1);
    t
}

/// Where a true null is rejected at a rate whose Wilson interval excludes α.
fn type_one_notes(rows: &[&ScenarioSummary], alpha: f64) -> Vec<String> {
    let mut out = Vec::new();
    for s in rows {
        for test in s.tests.iter().filter(|t| t.null_true) {
            for (name, share) in [
                ("likelihood-ratio", &test.likelihood_ratio),
                ("Wald", &test.wald),
            ] {
                if share.low > alpha || share.high < alpha {
                    out.push(format!(
                        "Note: at {} trials the {name} test of \"{}\" rejects a true null in {:.1}% of experiments, not {:.0}%: its p-values are off at this count.",
                        s.scenario.trials,
                        test.hypothesis,
                        100.0 * share.value,
                        100.0 * alpha
                    ));
                }
            }
        }
    }
    out
}
