//! Words and tables for `[sensitivity]` and `[assurance]`: how the answer moves with each
//! assumption, which one matters most, and the expected power over the uncertain values.

use super::format::{plain, whole};
use super::groups_text::power;
use super::style::{new_table, right_align};
use crate::plan::assumptions::Uncertain;
use crate::uncertainty::assured::{AssuredPoint, DesignAssurance};
use crate::uncertainty::sweep::{AssumptionSweep, DesignSensitivity};
use crate::uncertainty::{
    Answer, AssuranceReport, Chosen, Criterion, SensitivityReport, UncertaintyReport,
};
use std::fmt::Write;

/// A design in words: "14 animals × 40 trials per condition" or "40 trials per condition".
pub fn chosen_text(c: &Chosen) -> String {
    match c.animals {
        Some(a) => format!("{a} animals × {} trials", c.trials),
        None => format!("{} trials", c.trials),
    }
}

/// An answer in words, with its cost when it has one.
pub fn answer_text(a: &Answer) -> String {
    match a.cost {
        Some(cost) => format!("{} (cost {})", chosen_text(&a.chosen), whole(cost)),
        None => chosen_text(&a.chosen),
    }
}

/// What the answer is, for a section's first line.
pub fn criterion_text(c: Criterion) -> &'static str {
    match c {
        Criterion::LeastCost => "the cheapest animals × trials per condition meeting every target",
        Criterion::FewestAnimals => "the fewest animals meeting every target",
        Criterion::BestForBudget => "the allocation the budget buys with the best power",
        Criterion::SmallestTrials => "the smallest trial count per condition meeting every target",
    }
}

/// The plain reading of a design's sensitivity: the assumption the answer depends on most.
pub fn sensitivity_reading(d: &DesignSensitivity) -> Option<String> {
    let i = d.most_influential?;
    let s = &d.sweeps[i];
    let (lo, hi) = (s.points.first()?, s.points.last()?);
    let range = format!("{} … {}", plain(lo.value), plain(hi.value));
    let unreached: Vec<String> = s
        .points
        .iter()
        .filter(|p| p.answer.is_none())
        .map(|p| plain(p.value))
        .collect();
    let mut text = if unreached.is_empty() {
        let answers: Vec<&Answer> = s.points.iter().filter_map(|p| p.answer.as_ref()).collect();
        let min = answers
            .iter()
            .min_by(|a, b| a.headline().total_cmp(&b.headline()))?;
        let max = answers
            .iter()
            .max_by(|a, b| a.headline().total_cmp(&b.headline()))?;
        format!(
            "the answer depends most on the {} (plan: {}): across {range} it runs from {} to {}.",
            s.label,
            plain(s.plan_value),
            answer_text(min),
            answer_text(max)
        )
    } else {
        format!(
            "the answer depends most on the {} (plan: {}): at {} the targets are out of reach in the range searched.",
            s.label,
            plain(s.plan_value),
            unreached.join(", ")
        )
    };
    let others: Vec<String> = d
        .sweeps
        .iter()
        .enumerate()
        .filter(|(k, _)| *k != i)
        .map(|(_, o)| format!("{} {}", o.label, spread_text(o)))
        .collect();
    if !others.is_empty() {
        let _ = write!(text, " The others move it less: {}.", others.join("; "));
    }
    Some(text)
}

fn spread_text(s: &AssumptionSweep) -> String {
    if s.spread.is_infinite() {
        "(out of reach at some value)".into()
    } else {
        format!("(±{:.0}% of the plan's answer)", 50.0 * s.spread)
    }
}

fn sensitivity_block(out: &mut String, d: &DesignSensitivity, experiments_note: &str) {
    let _ = writeln!(
        out,
        "Sensitivity of \"{}\": the answer is {} (expected information), one assumption moved at a time, the others at the plan's values.",
        d.design,
        criterion_text(d.criterion)
    );
    let Some(plan_answer) = &d.plan_answer else {
        let _ = writeln!(out, "At the plan's values the targets are out of reach.");
        return;
    };
    let _ = writeln!(out, "At the plan's values: {}.", answer_text(plan_answer));
    let mut header = vec!["assumption".to_string(), "value".into(), "answer".into()];
    if plan_answer.cost.is_some() {
        header.push("cost".into());
    }
    for (name, _) in &d.tests {
        header.push(format!(
            "≈ power \"{name}\" at {}",
            chosen_text(&plan_answer.chosen)
        ));
    }
    let numeric = header.len() - 2;
    let mut t = new_table(header.iter().map(String::as_str).collect());
    for s in &d.sweeps {
        for (k, p) in s.points.iter().enumerate() {
            let mut row = vec![
                if k == 0 {
                    s.label.clone()
                } else {
                    String::new()
                },
                if p.value == s.plan_value {
                    format!("{} (plan)", plain(p.value))
                } else {
                    plain(p.value)
                },
                p.answer
                    .as_ref()
                    .map_or_else(|| "out of reach".into(), |a| chosen_text(&a.chosen)),
            ];
            if plan_answer.cost.is_some() {
                row.push(
                    p.answer
                        .as_ref()
                        .and_then(|a| a.cost)
                        .map_or_else(|| "–".into(), whole),
                );
            }
            for t in 0..d.tests.len() {
                row.push(
                    p.power_at_plan_answer
                        .get(t)
                        .map_or_else(|| "–".into(), |x| format!("{x:.2}")),
                );
            }
            t.add_row(row);
        }
    }
    right_align(&mut t, 1..2 + numeric);
    let _ = writeln!(out, "{t}");
    let corners: Vec<_> = d
        .sweeps
        .iter()
        .flat_map(|s| s.corners.iter().map(move |c| (s, c)))
        .collect();
    if !corners.is_empty() {
        let _ = writeln!(
            out,
            "Monte Carlo at the corners: each assumption's lowest and highest value, at the answer the approximation gives there{experiments_note}:"
        );
        let mut header = vec!["assumption".to_string(), "value".into(), "design".into()];
        for (name, target) in &d.tests {
            header.push(match target {
                Some(t) => format!("power \"{name}\" (target {})", plain(*t)),
                None => format!("power \"{name}\""),
            });
        }
        header.push("meets".into());
        let mut t = new_table(header.iter().map(String::as_str).collect());
        for (s, c) in corners {
            let mut row = vec![s.label.clone(), plain(c.value), chosen_text(&c.chosen)];
            row.extend(c.power.iter().map(power));
            row.push(match c.meets_targets {
                Some(true) => "yes".into(),
                Some(false) => "no".into(),
                None => "–".into(),
            });
            t.add_row(row);
        }
        right_align(&mut t, 1..2);
        let _ = writeln!(out, "{t}");
    }
    if let Some(r) = sensitivity_reading(d) {
        let _ = writeln!(out, "Reading: {r}");
    }
    out.push('\n');
}

/// One uncertain assumption in words: "criterion c ~ N(−0.25, 0.08²) within −∞ … ∞".
pub fn prior_text(u: &Uncertain) -> String {
    let mut s = format!(
        "{} ~ normal(mean {}, SD {})",
        u.key.label(),
        plain(u.plan_value),
        plain(u.sd)
    );
    let info = u.key.info();
    if u.low > info.low || u.high < info.high || u.low.is_finite() || u.high.is_finite() {
        let end = |x: f64| {
            if x.is_finite() {
                plain(x)
            } else if x > 0.0 {
                "∞".into()
            } else {
                "−∞".into()
            }
        };
        let _ = write!(s, " within {} … {}", end(u.low), end(u.high));
    }
    s
}

fn point_row(label: String, p: &AssuredPoint) -> Vec<Vec<String>> {
    p.tests
        .iter()
        .zip(&p.simulated)
        .enumerate()
        .map(|(i, (t, sim))| {
            vec![
                if i == 0 { label.clone() } else { String::new() },
                if i == 0 {
                    chosen_text(&p.chosen)
                } else {
                    String::new()
                },
                if i == 0 {
                    p.cost.map_or_else(|| "–".into(), whole)
                } else {
                    String::new()
                },
                format!("\"{}\"", t.name),
                format!("{:.2}", t.assurance.point_power),
                format!("{:.3} ± {:.3}", t.assurance.value, t.assurance.mc_se),
                power(sim),
            ]
        })
        .collect()
}

/// The sentence a proposal can quote: "With 90% assurance: 22 animals × 40 trials …".
pub fn assured_sentence(target: f64, d: &DesignAssurance) -> Option<String> {
    let p = d.assured.as_ref()?;
    let cost = p
        .cost
        .map_or(String::new(), |c| format!(" (cost {})", whole(c)));
    let tests: Vec<String> = p
        .tests
        .iter()
        .zip(&p.simulated)
        .map(|(t, s)| {
            format!(
                "\"{}\" {:.2} ± {:.3} by the approximation, {} simulated",
                t.name,
                t.assurance.value,
                t.assurance.mc_se,
                power(s)
            )
        })
        .collect();
    Some(format!(
        "With {:.0}% assurance, \"{}\" needs {} per condition{cost}: expected power over the uncertain values {}.",
        100.0 * target,
        d.design,
        chosen_text(&p.chosen),
        tests.join("; ")
    ))
}

fn assurance_block(out: &mut String, r: &AssuranceReport) {
    let _ = writeln!(
        out,
        "Assurance: the expected power when the assumptions below are uncertain, over {} drawn sets of values (O'Hagan, Stevens & Campbell 2005). Each set's power is the expected-information approximation; the simulated column runs one study per drawn set ({} studies).",
        r.draws,
        r.designs
            .iter()
            .find_map(|d| d
                .at_plan_answer
                .as_ref()
                .or(d.assured.as_ref())
                .map(|p| p.studies))
            .unwrap_or(0)
    );
    for u in &r.uncertain {
        let _ = writeln!(out, "  {}", prior_text(u));
    }
    if r.failed_draws > 0 {
        let _ = writeln!(
            out,
            "Note: {} of the {} drawn sets make a plan vigil refuses; they are left out.",
            r.failed_draws, r.draws
        );
    }
    for d in &r.designs {
        let _ = writeln!(out, "\"{}\" ({}):", d.design, criterion_text(d.criterion));
        let header = vec![
            "",
            "design",
            "cost",
            "test",
            "≈ power at plan's values",
            "≈ assurance ± MC SE",
            "simulated assurance",
        ];
        let mut t = new_table(header);
        let mut rows = Vec::new();
        if let Some(p) = &d.at_plan_answer {
            rows.extend(point_row("plan's answer".into(), p));
        }
        if let (Some(p), Some(target)) = (&d.assured, r.target) {
            rows.extend(point_row(format!("assured ({:.0}%)", 100.0 * target), p));
        }
        for row in rows {
            t.add_row(row);
        }
        right_align(&mut t, 2..3);
        right_align(&mut t, 4..7);
        let _ = writeln!(out, "{t}");
        if let Some(target) = r.target {
            match assured_sentence(target, d) {
                Some(s) => {
                    let _ = writeln!(out, "{s}");
                }
                None => {
                    if let Some(n) = &d.note {
                        let _ = writeln!(out, "Note: {n}.");
                    }
                }
            }
        }
    }
    let _ = writeln!(
        out,
        "The distributions are assumptions too: the assurance is only as good as they are.\n"
    );
}

/// The terminal section of both.
pub fn render_section(u: &UncertaintyReport, experiments: u64) -> String {
    let mut out = String::new();
    if let Some(s) = &u.sensitivity {
        render_sensitivity(&mut out, s, experiments);
    }
    if let Some(a) = &u.assurance {
        assurance_block(&mut out, a);
    }
    out
}

fn render_sensitivity(out: &mut String, s: &SensitivityReport, experiments: u64) {
    let note = format!(", {experiments} simulated studies each");
    for d in &s.designs {
        sensitivity_block(out, d, &note);
    }
}
