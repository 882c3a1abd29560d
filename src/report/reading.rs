//! One line per design saying what its numbers mean for the person planning. Whether d′ and
//! c are told apart is judged by the one rule of `analytic::advice` (shared with `vigil
//! explore`); what to change, by the expected information (`Advice`).

use super::advice_text::{levers_text, scale_fit_text, shortfalls_text};
use super::format::number;
use super::identification_text::identification_note;
use crate::analytic::advice::{Advice, Figures, Shortfall, Yardsticks, shortfalls};
use crate::analytic::scale_fit::ScaleFit;
use crate::cells::verdict::Verdict;
use crate::design::Design;
use crate::engine::ScenarioSummary;
use crate::plan::Plan;
use crate::vocab::{Quantity, RateCorrection};

/// Share of datasets with a rate of 0 or 1 above which the reading mentions them.
pub const EXTREME_WARN: f64 = 0.10;

/// What a reading is given beside the simulated rows.
#[derive(Debug, Clone, Copy, Default)]
pub struct ReadingContext<'a> {
    /// The expected information's advice at the largest count, when it falls short.
    pub advice: Option<&'a Advice>,
    /// Flags of a rating fit with σ free.
    pub scale_fit: Option<&'a ScaleFit>,
}

/// A plain-words reading of one design's rows (trial counts increasing).
pub fn reading(
    plan: &Plan,
    design: &Design,
    rows: &[&ScenarioSummary],
    context: ReadingContext,
) -> String {
    let level = plan.study().confidence;
    let (Some(_), Some(last)) = (rows.first(), rows.last()) else {
        return format!("{}: nothing to report.", design.name);
    };
    if let Some(id) = &last.identification
        && matches!(id.verdict, Verdict::NotIdentified { .. })
    {
        let verdict = identification_note(id);
        return format!(
            "{}: {verdict} (at {} trials). More trials cannot fix this: the record itself must change (know or census the base rate, or record more).",
            design.name, last.scenario.trials
        );
    }
    let pct = 100.0 * level;
    // Rows whose estimates could be summarised at all (some dataset was fitted).
    let usable: Vec<&ScenarioSummary> = rows.iter().copied().filter(|s| estimated(s)).collect();
    let (Some(first), Some(last)) = (usable.first().copied(), usable.last().copied()) else {
        return format!(
            "{}: no usable dataset at any trial count — every simulated dataset was degenerate or failed to converge \
             (see the left-out columns), so precision and the d′–c trade-off cannot be estimated; change the record, \
             the trial counts or the rate correction.",
            design.name
        );
    };
    // With a criterion per condition, the loosest one is quoted (and said to be).
    let criteria = first
        .quantities
        .iter()
        .filter(|q| q.quantity == Quantity::Criterion)
        .count();
    let which = if criteria > 1 {
        format!("; for c the widest of the {criteria} conditions'")
    } else {
        String::new()
    };
    let mut parts = vec![if first.scenario.trials == last.scenario.trials {
        format!(
            "c is pinned to ±{} and d′ to ±{} at {} trials ({pct:.0}% half-widths{which})",
            half_width(first, Quantity::Criterion),
            half_width(first, Quantity::DPrime),
            first.scenario.trials,
        )
    } else {
        format!(
            "c is pinned to ±{} and d′ to ±{} at {} trials, ±{} and ±{} at {} trials ({pct:.0}% half-widths{which})",
            half_width(first, Quantity::Criterion),
            half_width(first, Quantity::DPrime),
            first.scenario.trials,
            half_width(last, Quantity::Criterion),
            half_width(last, Quantity::DPrime),
            last.scenario.trials
        )
    }];
    if usable.len() < rows.len() {
        let lost: Vec<String> = rows
            .iter()
            .filter(|s| !estimated(s))
            .map(|s| s.scenario.trials.to_string())
            .collect();
        parts.push(format!(
            "no usable dataset at {} trials (every fit degenerate or not converged)",
            lost.join(", ")
        ));
    }
    parts.push(told_apart(plan, &usable, context.advice));
    if let Some(s) = rows
        .iter()
        .rev()
        .find(|s| s.datasets.extreme.value > EXTREME_WARN)
    {
        parts.push(extreme_text(plan, design, s));
    }
    if let Some(f) = context.scale_fit {
        parts.push(format!("warning: {}", scale_fit_text(f, level)));
    }
    if let Some((s, id)) = rows
        .iter()
        .find_map(|s| s.identification.as_ref().map(|id| (s, id)))
    {
        parts.push(format!(
            "warning at {} trials: {}",
            s.scenario.trials,
            identification_note(id)
        ));
    }
    format!("{}: {}.", design.name, parts.join("; "))
}

/// Told apart by the one rule: at every count, from some count on, or not at the largest
/// (then what the expected information says would change it).
fn told_apart(plan: &Plan, rows: &[&ScenarioSummary], advice: Option<&Advice>) -> String {
    let y = Yardsticks::of(plan.targets());
    let judged: Vec<Vec<Shortfall>> = rows
        .iter()
        .map(|s| shortfalls(&y, &Figures::simulated(s)))
        .collect();
    let tail = judged.iter().rev().take_while(|s| s.is_empty()).count();
    let last = rows[rows.len() - 1];
    let max_r = rows
        .iter()
        .map(|s| s.correlation.value.abs())
        .fold(0.0, f64::max);
    let limit = y.abs_corr.at_most;
    if tail == rows.len() {
        return format!(
            "d′ and c are told apart at every count (|r| ≤ {max_r:.2}, within {limit}; d′'s interval clear of 0)"
        );
    }
    if tail > 0 {
        let from = rows[rows.len() - tail];
        let before = rows[rows.len() - tail - 1];
        return format!(
            "d′ and c are told apart from {} trials on; at {} trials {}",
            from.scenario.trials,
            before.scenario.trials,
            shortfalls_text(&judged[rows.len() - tail - 1])
        );
    }
    let mut s = format!(
        "at {} trials d′ and c are not told apart: {}",
        last.scenario.trials,
        shortfalls_text(&judged[rows.len() - 1])
    );
    if let Some(a) = advice
        && !a.levers.is_empty()
    {
        s.push_str("; ");
        s.push_str(&levers_text(&a.levers));
    }
    s
}

/// What a share of datasets with a rate of 0 or 1 means for this design: leaning on the
/// correction, or left out (no correction, or a coarse record the correction does not touch).
fn extreme_text(plan: &Plan, design: &Design, s: &ScenarioSummary) -> String {
    let correction = plan.study().rate_correction;
    let pct = 100.0 * s.datasets.extreme.value;
    let trials = s.scenario.trials;
    if design.record.fixes_rows() && correction != RateCorrection::None {
        return format!(
            "at {trials} trials {pct:.0}% of datasets hit a rate of 0 or 1, so rows up to there lean on the {} correction",
            correction.name()
        );
    }
    let why = if design.record.fixes_rows() {
        "with rate_correction = \"none\" they are not corrected"
    } else {
        "a coarse record gets no correction"
    };
    let degenerate = s.datasets.degenerate.value;
    let fate = if degenerate > 0.0 {
        format!(
            "{:.1}% have no estimate there and are left out, so the figures describe the rest, not every experiment",
            100.0 * degenerate
        )
    } else {
        "these were fitted as they are (none had to be left out)".to_string()
    };
    format!(
        "at {trials} trials {pct:.0}% of datasets have an empty cell (a rate of 0 or 1); {why}: {fate}"
    )
}

/// The half-width of `q`, the widest over the conditions when each has its own.
fn half_width(s: &ScenarioSummary, q: Quantity) -> String {
    s.quantities
        .iter()
        .filter(|x| x.quantity == q)
        .map(|x| x.mean_width.value / 2.0)
        .reduce(f64::max)
        .map(|w| number(w, 2))
        .unwrap_or_else(|| "–".into())
}

/// Whether the row's d′ and c intervals could be summarised (some dataset was fitted).
fn estimated(s: &ScenarioSummary) -> bool {
    [Quantity::Criterion, Quantity::DPrime].iter().all(|&q| {
        s.quantity(q)
            .is_some_and(|x| x.mean_width.value.is_finite())
    })
}
