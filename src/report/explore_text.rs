//! The `vigil explore` report: per design, a table of expected-information figures over a fine
//! grid of trial counts and one plain reading; and the same as JSON.

use super::CAUTION;
use super::format::number;
use super::style::{new_table, right_align};
use crate::analytic::information::ScenarioInformation;
use crate::analytic::scan::DesignScan;

/// The verdict sentence of one grid point.
fn plain_verdict(info: &ScenarioInformation) -> String {
    verdict_sentence(&info.verdict, info.corr_d_prime_criterion)
}
use super::advice_text::{levers_text, scale_fit_text, shortfalls_text};
use super::identification_text::{condition_text, join_words, range_sentence, verdict_sentence};
use crate::analytic::advice::{Figures, Yardsticks, shortfalls};
use crate::cells::verdict::{RANK_TOLERANCE, Verdict, WEAK_CONDITION_NUMBER, WEAK_CORRELATION};
use crate::plan::Plan;
use serde::Serialize;
use std::fmt::Write;

/// |r| varying less than this over the scan is reported as one value.
const FLAT_CORR: f64 = 0.005;

/// The whole `explore` report as text.
pub fn render(plan: &Plan, scans: &[DesignScan]) -> String {
    let mut out = String::new();
    let o = plan.observer();
    let _ = writeln!(out, "vigil explore — {}", plan.study().title);
    // Under "optimal" each condition has its own criterion (its row labels say which).
    let criterion = super::conditions_text::optimal_rule_text(plan)
        .unwrap_or_else(|| format!("c = {}", super::format::signed(o.criterion, 2)));
    let _ = writeln!(
        out,
        "Hypothesised observer: d′ = {}, {criterion}, σ = {}. Expected (Fisher) information at these values, lapses off; no simulation.",
        super::format::number(o.d_prime, 2),
        super::format::plain(o.sigma)
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
    super::layout::wrap_prose(&out)
}

fn design_block(out: &mut String, plan: &Plan, scan: &DesignScan) {
    // Every condition's presence and criterion, where the design has several.
    let conditions = plan
        .designs()
        .iter()
        .find(|d| d.name == scan.design && d.conditions.len() > 1)
        .map(|d| format!("; {}", super::conditions_text::conditions_text(plan, d)))
        .unwrap_or_default();
    let _ = writeln!(
        out,
        "■ {}  ({}; free parameters: {}{conditions})",
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
    header.extend(
        first
            .quantities
            .iter()
            .map(|q| format!("SE({})", q.label())),
    );
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
    let level = plan.study().confidence;
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
            let ranges: Vec<String> = p.iter().map(range_sentence).collect();
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
    let y = Yardsticks::of(plan.targets());
    let c_limit = y.c_half_width;
    let c_ok = |r: &ScenarioInformation| {
        Figures::asymptotic(r, level)
            .half_width_criterion
            .is_some_and(|w| w < c_limit.at_most)
    };
    let r_limit = y.abs_corr.at_most;
    let r_ok =
        |r: &ScenarioInformation| r.corr_d_prime_criterion.is_some_and(|c| c.abs() <= r_limit);
    let c_words = format!(
        "±{} ({pct:.0}% half-width; {})",
        c_limit.at_most,
        if c_limit.from_plan {
            "the plan's target"
        } else {
            "vigil's default yardstick"
        }
    );
    parts.push(match first_from(rows, c_ok) {
        Some(n) => format!("c is pinned to {c_words} from {n} trials"),
        None => format!("c is not pinned to {c_words} up to {} trials", last.trials),
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
    parts.push(match first_from(rows, r_ok) {
        Some(n) => format!("|r(d′, c)| is at most {r_limit} from {n} trials"),
        None if rs.len() == rows.len() && hi - lo < FLAT_CORR => format!(
            "|r(d′, c)| stays at {hi:.2} at every count: more trials do not remove the trade-off"
        ),
        None if rs.len() == rows.len() => format!(
            "|r(d′, c)| is {:.2} at {} trials ({lo:.2} to {hi:.2} over the scan): more trials do not bring it to {r_limit}",
            rs[rs.len() - 1],
            last.trials
        ),
        None => format!(
            "|r(d′, c)| is {} at {} trials",
            last.corr_d_prime_criterion
                .map_or("undefined".into(), |r| format!("{:.2}", r.abs())),
            last.trials
        ),
    });
    let apart = |r: &ScenarioInformation| shortfalls(&y, &Figures::asymptotic(r, level)).is_empty();
    match first_from(rows, apart) {
        Some(n) => parts.push(format!("d′ and c are told apart from {n} trials")),
        None => {
            let seen = shortfalls(&y, &Figures::asymptotic(last, level));
            let mut s = format!(
                "at {} trials d′ and c are not told apart: {}",
                last.trials,
                shortfalls_text(&seen)
            );
            if let Some(a) = &scan.advice
                && !a.levers.is_empty()
            {
                s.push_str("; ");
                s.push_str(&levers_text(&a.levers));
            }
            parts.push(s);
        }
    }
    if let Some(f) = &scan.scale_fit {
        parts.push(format!("warning: {}", scale_fit_text(f, level)));
    }
    parts.join("; ")
}

/// A warning when some counts are only weakly identified, with the worst figures.
pub fn weak_warning(scan: &DesignScan) -> Option<String> {
    let weak: Vec<(u32, f64, f64)> = scan
        .rows
        .iter()
        .filter_map(|r| match r.verdict {
            Verdict::Weak {
                condition_number,
                max_abs_corr,
            } => Some((r.trials, condition_number, max_abs_corr)),
            _ => None,
        })
        .collect();
    let (first, last) = (weak.first()?.0, weak.last()?.0);
    let kappa = weak.iter().map(|w| w.1).fold(0.0, f64::max);
    let corr = weak.iter().map(|w| w.2).fold(0.0, f64::max);
    let span = if first == last {
        format!("at {first} trials")
    } else {
        format!("from {first} to {last} trials")
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
    /// The yardsticks of the readings: the plan's targets, else vigil's defaults.
    yardsticks: Yardsticks,
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
            yardsticks: Yardsticks::of(plan.targets()),
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analytic::information::AsymptoticSe;
    use crate::vocab::Quantity;

    fn row(trials: u32, se_c: f64, r: f64, verdict: Verdict) -> ScenarioInformation {
        let q = |quantity, se| AsymptoticSe {
            quantity,
            condition: None,
            truth: 0.0,
            se: Some(se),
        };
        ScenarioInformation {
            trials,
            dim: 2,
            rank: 2,
            condition_number: 2.0,
            max_abs_corr: r.abs(),
            verdict,
            quantities: vec![
                q(Quantity::DPrime, 2.0 * se_c),
                q(Quantity::Criterion, se_c),
            ],
            corr_d_prime_criterion: Some(r),
            profile: None,
        }
    }

    fn plan() -> Plan {
        let text = "[study]\ntitle = \"t (invented)\"\nseed = 1\n[observer]\nd_prime = 1.0\n\
                    criterion = 0.0\n[[design]]\nname = \"d\"\npresence = 0.5\ntrials = [10]\n";
        Plan::from_str(std::path::Path::new("t.toml"), text).unwrap()
    }

    fn scan(rows: Vec<ScenarioInformation>) -> DesignScan {
        DesignScan {
            design: "d".into(),
            record: "yes/no".into(),
            parameters: vec!["d′".into(), "c".into()],
            rows,
            advice: None,
            scale_fit: None,
        }
    }

    #[test]
    fn targets_are_read_from_the_first_count_that_holds_for_good() {
        let weak = Verdict::Weak {
            condition_number: 2e6,
            max_abs_corr: 0.97,
        };
        let rows = vec![
            row(10, 0.30, -0.97, weak.clone()),
            row(20, 0.12, -0.40, Verdict::Identified),
            row(40, 0.20, -0.60, Verdict::Identified),
            row(80, 0.10, -0.45, Verdict::Identified),
            row(160, 0.05, -0.30, Verdict::Identified),
        ];
        let s = scan(rows);
        let text = reading(&plan(), &s);
        // z₀.₉₇₅·0.12 < 0.25 at 20 trials, but 40 trials breaks it: the target holds from 80.
        assert!(
            text.contains(
                "c is pinned to ±0.25 (95% half-width; vigil's default yardstick) from 80 trials"
            ),
            "{text}"
        );
        assert!(
            text.contains("|r(d′, c)| is at most 0.5 from 80 trials"),
            "{text}"
        );
        assert!(
            text.contains("identified from 20 trials on, not below"),
            "{text}"
        );
        let w = weak_warning(&s).unwrap();
        assert!(
            w.contains("at 10 trials") && w.contains("2.0e6") && w.contains("0.97"),
            "{w}"
        );
        assert!(weak_warning(&scan(vec![row(10, 0.1, 0.0, Verdict::Identified)])).is_none());
    }

    #[test]
    fn a_correlation_that_never_moves_is_reported_as_such() {
        let rows = (1..=4)
            .map(|k| row(10 * k, 0.4 / f64::from(k), -0.54, Verdict::Identified))
            .collect();
        let text = reading(&plan(), &scan(rows));
        assert!(
            text.contains("|r(d′, c)| stays at 0.54 at every count"),
            "{text}"
        );
        assert!(
            text.contains("at 40 trials d′ and c are not told apart: their estimates trade off"),
            "{text}"
        );
    }
}
