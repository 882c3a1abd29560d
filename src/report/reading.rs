//! One line per design saying what its numbers mean for the person planning.

use super::format::number;
use super::identification_text::identification_note;
use crate::cells::verdict::Verdict;
use crate::design::Design;
use crate::engine::ScenarioSummary;
use crate::vocab::Quantity;

/// |r(d̂′, ĉ)| below this is read as "told apart".
pub const SEPARATED_R: f64 = 0.3;
/// Share of datasets with a rate of 0 or 1 above which estimates lean on the correction.
pub const EXTREME_WARN: f64 = 0.10;

/// A plain-words reading of one design's rows (trial counts increasing).
pub fn reading(design: &Design, rows: &[&ScenarioSummary], level: f64) -> String {
    let Some(last) = rows.last() else {
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
    match usable
        .iter()
        .find(|s| s.correlation.value.abs() <= SEPARATED_R)
    {
        Some(s) if s.scenario.trials == first.scenario.trials => parts.push(format!(
            "bias and sensitivity are told apart at every count (|r| ≤ {})",
            number(
                first
                    .correlation
                    .value
                    .abs()
                    .max(last.correlation.value.abs()),
                2
            )
        )),
        Some(s) => parts.push(format!(
            "the estimates of d′ and c trade off (|r| = {}) until {} trials",
            number(first.correlation.value.abs(), 2),
            s.scenario.trials
        )),
        None if !last.correlation.value.is_finite() => parts.push(format!(
            "the d′–c correlation cannot be computed at {} trials (too few usable datasets)",
            last.scenario.trials
        )),
        None => parts.push(format!(
            "d′ and c still trade off at {} trials (r = {}): collect more trials or record more",
            last.scenario.trials,
            number(last.correlation.value, 2)
        )),
    }
    if let Some(s) = rows
        .iter()
        .rev()
        .find(|s| s.datasets.extreme.value > EXTREME_WARN)
    {
        parts.push(format!(
            "at {} trials {:.0}% of datasets hit a rate of 0 or 1, so rows up to there lean on the correction",
            s.scenario.trials,
            100.0 * s.datasets.extreme.value
        ));
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
