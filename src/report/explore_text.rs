//! The `vigil explore` report: per design, a table of expected-information figures over a fine
//! grid of trial counts and one plain reading; and the same as JSON.

use super::CAUTION;
use super::format::number;
use super::style::{new_table, right_align};
use crate::analytic::information::ScenarioInformation;
use crate::analytic::scan::DesignScan;
use crate::analytic::verdict::{
    RANK_TOLERANCE, Verdict, WEAK_CONDITION_NUMBER, WEAK_CORRELATION, condition_text, join_words,
    plain_verdict,
};
use crate::engine::z_critical;
use crate::plan::Plan;
use serde::Serialize;
use std::fmt::Write;

/// The reading's target for c: the half-width z·SE(c) at the plan's level below this.
pub const TARGET_C_HALF_WIDTH: f64 = 0.25;
/// The reading's target for the trade-off: |r(d̂′, ĉ)| below this.
pub const TARGET_ABS_CORR: f64 = 0.5;
/// |r| varying less than this over the scan is reported as one value.
const FLAT_CORR: f64 = 0.005;

/// The whole `explore` report as text.
pub fn render(plan: &Plan, scans: &[DesignScan]) -> String {
    let mut out = String::new();
    let o = &plan.observer;
    let _ = writeln!(out, "vigil explore — {}", plan.study.title);
    let _ = writeln!(
        out,
        "Hypothesised observer: d′ = {:.2}, c = {:+.2}, σ = {}. Expected (Fisher) information at these values, lapses off; no simulation.",
        o.d_prime, o.criterion, o.sigma
    );
    let _ = writeln!(
        out,
        "SE = asymptotic standard error (large-sample; `vigil run` shows where it fails at small counts). \
         Verdict: rank at relative eigenvalue tolerance {RANK_TOLERANCE:e} of the unit-diagonal information; \
         weak when its condition number exceeds {WEAK_CONDITION_NUMBER:e} or two estimates correlate beyond |r| = {WEAK_CORRELATION}."
    );
    let _ = writeln!(out);
    for scan in scans {
        design_block(&mut out, plan, scan);
    }
    let _ = writeln!(out, "Caution: {CAUTION}");
    out
}

fn design_block(out: &mut String, plan: &Plan, scan: &DesignScan) {
    let _ = writeln!(
        out,
        "■ {}  ({}; free parameters: {})",
        scan.design,
        scan.record,
        scan.parameters.join(", ")
    );
    let Some(first) = scan.rows.first() else {
        let _ = writeln!(
            out,
            "Reading: {}: no count in the range suits this design (each condition needs a present and an absent trial).\n",
            scan.design
        );
        return;
    };
    let mut header: Vec<String> = vec!["trials".into()];
    header.extend(first.quantities.iter().map(|q| {
        let label = match &q.condition {
            Some(c) => format!("{}[{c}]", q.quantity.label()),
            None => q.quantity.label().to_string(),
        };
        format!("SE({label})")
    }));
    header.extend(["r(d′, c)", "condition no.", "verdict"].map(String::from));
    let mut t = new_table(header.iter().map(String::as_str).collect());
    for row in &scan.rows {
        let mut cells = vec![row.trials.to_string()];
        cells.extend(
            row.quantities
                .iter()
                .map(|q| q.se.map_or("–".into(), |s| number(s, 3))),
        );
        cells.push(
            row.corr_d_prime_criterion
                .map_or("–".into(), |r| format!("{r:+.2}")),
        );
        cells.push(condition_text(row.condition_number));
        cells.push(row.verdict.short().to_string());
        t.add_row(cells);
    }
    right_align(&mut t, 0..header.len() - 1);
    let _ = writeln!(out, "{t}");
    let _ = writeln!(out, "Reading: {}: {}.", scan.design, reading(plan, scan));
    if let Some(w) = weak_warning(scan) {
        let _ = writeln!(out, "Warning: {w}.");
    }
    let _ = writeln!(out);
}

/// The plain reading of one design's rows (trial counts increasing, at least one row).
pub fn reading(plan: &Plan, scan: &DesignScan) -> String {
    let rows = &scan.rows;
    let (Some(first), Some(last)) = (rows.first(), rows.last()) else {
        return "nothing to report".into();
    };
    let level = plan.study.confidence;
    let pct = 100.0 * level;
    if let Verdict::NotIdentified { .. } = last.verdict {
        let mut s = plain_verdict(last);
        if rows.iter().all(|r| r.rank == last.rank) {
            s.push_str(&format!(
                ". This holds at every count from {} to {} trials: more trials cannot fix it, the record must change",
                first.trials, last.trials
            ));
        } else {
            s.push_str(&format!(" at {} trials", last.trials));
        }
        if let Some(p) = &last.profile {
            let ranges: Vec<String> = p.iter().map(|r| r.describe()).collect();
            s.push_str(&format!(
                ". At {} trials the counts expected under the hypothesis are consistent ({pct:.0}% profile likelihood) with {}",
                last.trials,
                join_words(&ranges)
            ));
        }
        return s;
    }
    let mut parts = vec![match first_settled(rows) {
        Some(n) if n == first.trials => format!(
            "identified at every count from {} to {} trials",
            first.trials, last.trials
        ),
        Some(n) => format!(
            "identified from {n} trials on, not below (at {} trials: {})",
            first.trials,
            plain_verdict(first)
        ),
        None => match first_from(rows, |r| matches!(r.verdict, Verdict::Weak { .. })) {
            Some(n) if n > first.trials => format!(
                "weakly identified from {n} trials on (at {} trials: {})",
                last.trials,
                plain_verdict(last).trim_start_matches("weakly identified: ")
            ),
            _ => format!("{} at {} trials", plain_verdict(last), last.trials),
        },
    }];
    let z = z_critical(level);
    let c_ok = |r: &ScenarioInformation| {
        r.se(crate::engine::Quantity::Criterion)
            .is_some_and(|se| z * se < TARGET_C_HALF_WIDTH)
    };
    let r_ok = |r: &ScenarioInformation| {
        r.corr_d_prime_criterion
            .is_some_and(|c| c.abs() < TARGET_ABS_CORR)
    };
    let c_from = first_from(rows, c_ok);
    let r_from = first_from(rows, r_ok);
    parts.push(match c_from {
        Some(n) => {
            format!("c is pinned to ±{TARGET_C_HALF_WIDTH} ({pct:.0}% half-width) from {n} trials")
        }
        None => format!(
            "c is not pinned to ±{TARGET_C_HALF_WIDTH} ({pct:.0}% half-width) up to {} trials",
            last.trials
        ),
    });
    let rs: Vec<f64> = rows
        .iter()
        .filter_map(|r| r.corr_d_prime_criterion.map(f64::abs))
        .collect();
    let (lo, hi) = rs
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &r| {
            (a.min(r), b.max(r))
        });
    parts.push(match r_from {
        Some(n) => format!("|r(d′, c)| is below {TARGET_ABS_CORR} from {n} trials"),
        None if rs.len() == rows.len() && hi - lo < FLAT_CORR => format!(
            "|r(d′, c)| stays at {hi:.2} at every count: more trials do not remove the trade-off"
        ),
        None if rs.len() == rows.len() => format!(
            "|r(d′, c)| stays between {lo:.2} and {hi:.2} up to {} trials: more trials do not remove the trade-off",
            last.trials
        ),
        None => format!(
            "|r(d′, c)| is {} at {} trials",
            last.corr_d_prime_criterion
                .map_or("undefined".into(), |r| format!("{:.2}", r.abs())),
            last.trials
        ),
    });
    match first_from(rows, |r| c_ok(r) && r_ok(r)) {
        Some(n) => parts.push(format!("both targets are met from {n} trials")),
        None => parts.push(format!(
            "both targets together: never up to {} trials",
            last.trials
        )),
    }
    parts.join("; ")
}

/// A warning when some counts are only weakly identified, with the worst figures.
pub fn weak_warning(scan: &DesignScan) -> Option<String> {
    let weak: Vec<&ScenarioInformation> = scan
        .rows
        .iter()
        .filter(|r| matches!(r.verdict, Verdict::Weak { .. }))
        .collect();
    let (first, last) = (weak.first()?, weak.last()?);
    let kappa = weak.iter().map(|r| r.condition_number).fold(0.0, f64::max);
    let corr = weak.iter().map(|r| r.max_abs_corr).fold(0.0, f64::max);
    let span = if first.trials == last.trials {
        format!("at {} trials", first.trials)
    } else {
        format!("from {} to {} trials", first.trials, last.trials)
    };
    Some(format!(
        "{} is only weakly identified {span} (condition number up to {}, |correlation| between estimates up to {corr:.2}): \
         its asymptotic SEs there rest on a nearly flat ridge of the likelihood and can be far from what a real \
         sample gives; check them against `vigil run`",
        scan.design,
        condition_text(kappa)
    ))
}

/// The smallest count from which every larger count of the scan is identified.
fn first_settled(rows: &[ScenarioInformation]) -> Option<u32> {
    first_from(rows, |r| r.verdict == Verdict::Identified)
}

/// The smallest count from which `ok` holds for this and every larger count of the scan.
fn first_from(
    rows: &[ScenarioInformation],
    ok: impl Fn(&ScenarioInformation) -> bool,
) -> Option<u32> {
    let tail = rows.iter().rev().take_while(|r| ok(r)).count();
    (tail > 0).then(|| rows[rows.len() - tail].trials)
}

#[derive(Serialize)]
struct Thresholds {
    rank_tolerance: f64,
    weak_condition_number: f64,
    weak_correlation: f64,
    target_c_half_width: f64,
    target_abs_corr: f64,
}

#[derive(Serialize)]
struct DesignOut<'a> {
    #[serde(flatten)]
    scan: &'a DesignScan,
    reading: String,
}

#[derive(Serialize)]
struct Document<'a> {
    tool: &'static str,
    version: &'static str,
    command: &'static str,
    plan: &'a Plan,
    model: &'static str,
    thresholds: Thresholds,
    designs: Vec<DesignOut<'a>>,
    caution: &'static str,
}

/// The `explore` results as JSON (pretty-printed, newline-terminated). Non-finite figures
/// (the condition number of a singular design) are written as null.
pub fn render_json(plan: &Plan, scans: &[DesignScan]) -> serde_json::Result<Vec<u8>> {
    let doc = Document {
        tool: "vigil",
        version: env!("CARGO_PKG_VERSION"),
        command: "explore",
        plan,
        model: "expected Fisher information of the analysis model (lapses off) at the hypothesised values",
        thresholds: Thresholds {
            rank_tolerance: RANK_TOLERANCE,
            weak_condition_number: WEAK_CONDITION_NUMBER,
            weak_correlation: WEAK_CORRELATION,
            target_c_half_width: TARGET_C_HALF_WIDTH,
            target_abs_corr: TARGET_ABS_CORR,
        },
        designs: scans
            .iter()
            .map(|scan| DesignOut {
                scan,
                reading: reading(plan, scan),
            })
            .collect(),
        caution: CAUTION,
    };
    let mut bytes = serde_json::to_vec_pretty(&doc)?;
    bytes.push(b'\n');
    Ok(bytes)
}
