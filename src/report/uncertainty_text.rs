//! Words and tables for `[sensitivity]` and `[assurance]`: how the answer moves with each
//! assumption, which one matters most, and the expected power over the uncertain values.

use super::format::{plain, whole};
use super::groups_text::power;
use super::page::PageBlock;
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

/// A design for a table cell: "14 × 40" (animals × trials) or "40" (trials).
pub fn chosen_cell(c: &Chosen) -> String {
    match c.animals {
        Some(a) => format!("{a} × {}", c.trials),
        None => c.trials.to_string(),
    }
}

/// The header of a design column.
fn design_header(c: &Chosen) -> &'static str {
    if c.animals.is_some() {
        "animals × trials"
    } else {
        "trials"
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
        format!(
            "(its values span {:.0}% of the plan's answer)",
            100.0 * s.spread
        )
    }
}

/// The sweep table of a design: header and rows (one per assumption × value).
pub fn sweep_table(d: &DesignSensitivity, plan_answer: &Answer) -> (Vec<String>, Vec<Vec<String>>) {
    let mut header = vec![
        "assumption".to_string(),
        "value".into(),
        design_header(&plan_answer.chosen).into(),
    ];
    if plan_answer.cost.is_some() {
        header.push("cost".into());
    }
    for (name, _) in &d.tests {
        header.push(if d.tests.len() == 1 {
            "≈ power at plan's answer".to_string()
        } else {
            format!("≈ power \"{name}\" at plan's answer")
        });
    }
    let mut rows = Vec::new();
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
                    .map_or_else(|| "out of reach".into(), |a| chosen_cell(&a.chosen)),
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
            rows.push(row);
        }
    }
    (header, rows)
}

/// The corner table of a design (empty rows when no corner was simulated).
pub fn corner_table(d: &DesignSensitivity) -> (Vec<String>, Vec<Vec<String>>) {
    let design = d
        .plan_answer
        .as_ref()
        .map_or("design", |a| design_header(&a.chosen));
    let mut header = vec!["assumption".to_string(), "value".into(), design.into()];
    for (name, target) in &d.tests {
        header.push(match target {
            Some(t) => format!("power \"{name}\" (target {})", plain(*t)),
            None => format!("power \"{name}\""),
        });
    }
    header.push("meets".into());
    let rows = d
        .sweeps
        .iter()
        .flat_map(|s| s.corners.iter().map(move |c| (s, c)))
        .map(|(s, c)| {
            let mut row = vec![s.label.clone(), plain(c.value), chosen_cell(&c.chosen)];
            row.extend(c.power.iter().map(power));
            row.push(match c.meets_targets {
                Some(true) => "yes".into(),
                Some(false) => "no".into(),
                None => "–".into(),
            });
            row
        })
        .collect();
    (header, rows)
}

fn text_table(header: &[String], rows: Vec<Vec<String>>, right: &[(usize, usize)]) -> String {
    let mut t = new_table(header.iter().map(String::as_str).collect());
    for row in rows {
        t.add_row(row);
    }
    for &(from, to) in right {
        right_align(&mut t, from..to);
    }
    t.to_string()
}

/// The first line of a design's sensitivity.
fn sensitivity_intro(d: &DesignSensitivity) -> String {
    format!(
        "Sensitivity of \"{}\": the answer is {} (expected information), one assumption moved at a time, the others at the plan's values.",
        d.design,
        criterion_text(d.criterion)
    )
}

fn corners_intro(experiments: u64) -> String {
    format!(
        "Monte Carlo at the corners: each assumption's lowest and highest value, at the answer the approximation gives there, {experiments} simulated studies each:"
    )
}

fn sensitivity_block(out: &mut String, d: &DesignSensitivity, experiments: u64) {
    let _ = writeln!(out, "{}", sensitivity_intro(d));
    let Some(plan_answer) = &d.plan_answer else {
        let _ = writeln!(out, "At the plan's values the targets are out of reach.");
        return;
    };
    let _ = writeln!(out, "At the plan's values: {}.", answer_text(plan_answer));
    let (header, rows) = sweep_table(d, plan_answer);
    let n = header.len();
    let _ = writeln!(out, "{}", text_table(&header, rows, &[(1, 2), (3, n)]));
    let (header, rows) = corner_table(d);
    if !rows.is_empty() {
        let _ = writeln!(out, "{}", corners_intro(experiments));
        let _ = writeln!(out, "{}", text_table(&header, rows, &[(1, 2)]));
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

fn point_rows(label: String, p: &AssuredPoint, with_test: bool) -> Vec<Vec<String>> {
    p.tests
        .iter()
        .zip(&p.simulated)
        .enumerate()
        .map(|(i, (t, sim))| {
            let first = |x: String| if i == 0 { x } else { String::new() };
            let mut row = vec![
                first(label.clone()),
                first(chosen_cell(&p.chosen)),
                first(p.cost.map_or_else(|| "–".into(), whole)),
            ];
            if with_test {
                row.push(format!("\"{}\"", t.name));
            }
            row.extend([
                format!("{:.2}", t.assurance.point_power),
                format!("{:.3} ± {:.3}", t.assurance.value, t.assurance.mc_se),
                power(sim),
            ]);
            row
        })
        .collect()
}

/// The assurance table of a design: the plan's answer and the assured design.
pub fn assurance_table(
    target: Option<f64>,
    d: &DesignAssurance,
) -> (Vec<String>, Vec<Vec<String>>) {
    let first = d.at_plan_answer.as_ref().or(d.assured.as_ref());
    // One test: its name goes in the sentence below, not in a column.
    let with_test = first.is_some_and(|p| p.tests.len() > 1);
    let mut header = vec![
        String::new(),
        first.map_or("design", |p| design_header(&p.chosen)).into(),
        "cost".into(),
    ];
    if with_test {
        header.push("test".into());
    }
    header.extend(["≈ power", "≈ assurance ± MC SE", "simulated"].map(String::from));
    let mut rows = Vec::new();
    if let Some(p) = &d.at_plan_answer {
        rows.extend(point_rows("plan's answer".into(), p, with_test));
    }
    if let (Some(p), Some(target)) = (&d.assured, target) {
        rows.extend(point_rows(
            format!("assured ({:.0}%)", 100.0 * target),
            p,
            with_test,
        ));
    }
    (header, rows)
}

/// The sentence a proposal can quote: "With 90% assurance: 22 animals × 40 trials …".
pub fn assured_sentence(target: f64, d: &DesignAssurance, budget: Option<f64>) -> Option<String> {
    let p = d.assured.as_ref()?;
    let cost = p.cost.map_or(String::new(), |c| match budget {
        Some(total) if c > total => {
            format!(" (cost {}, above the budget of {})", whole(c), whole(total))
        }
        _ => format!(" (cost {})", whole(c)),
    });
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

fn assurance_intro(r: &AssuranceReport) -> String {
    format!(
        "Assurance: the expected power when the assumptions below are uncertain, over {} drawn sets of values (O'Hagan, Stevens & Campbell 2005). \"≈ power\" is the power at the plan's values and \"≈ assurance\" its mean over the drawn sets, both by the expected-information approximation; \"simulated\" runs one study per drawn set ({} studies).",
        r.draws,
        r.designs
            .iter()
            .find_map(|d| d
                .at_plan_answer
                .as_ref()
                .or(d.assured.as_ref())
                .map(|p| p.studies))
            .unwrap_or(0)
    )
}

fn failed_note(r: &AssuranceReport) -> Option<String> {
    (r.failed_draws > 0).then(|| {
        format!(
            "Note: {} of the {} drawn sets make a plan vigil refuses; they are left out.",
            r.failed_draws, r.draws
        )
    })
}

/// The assured sentence, or why there is none.
fn outcome_line(r: &AssuranceReport, d: &DesignAssurance) -> Option<String> {
    let target = r.target?;
    assured_sentence(target, d, r.budget_total)
        .or_else(|| d.note.as_ref().map(|n| format!("Note: {n}.")))
}

/// Assurance rests on its distributions: said under every assurance.
pub const DISTRIBUTIONS_CAUTION: &str =
    "The distributions are assumptions too: the assurance is only as good as they are.";

fn assurance_block(out: &mut String, r: &AssuranceReport) {
    let _ = writeln!(out, "{}", assurance_intro(r));
    for u in &r.uncertain {
        let _ = writeln!(out, "  {}", prior_text(u));
    }
    if let Some(n) = failed_note(r) {
        let _ = writeln!(out, "{n}");
    }
    for d in &r.designs {
        let _ = writeln!(out, "\"{}\" ({}):", d.design, criterion_text(d.criterion));
        let (header, rows) = assurance_table(r.target, d);
        let n = header.len();
        let _ = writeln!(out, "{}", text_table(&header, rows, &[(2, 3), (n - 3, n)]));
        if let Some(line) = outcome_line(r, d) {
            let _ = writeln!(out, "{line}");
        }
    }
    let _ = writeln!(out, "{DISTRIBUTIONS_CAUTION}\n");
}

/// The justification's paragraphs: the assured answer (or the assurance at the plan's
/// answer) with its distributions, and the assumption the answer depends on most.
pub fn justification(u: &UncertaintyReport) -> Vec<String> {
    let mut out = Vec::new();
    if let Some(r) = &u.assurance {
        let priors: Vec<String> = r.uncertain.iter().map(prior_text).collect();
        for d in &r.designs {
            let what = match (
                r.target,
                assured_sentence(r.target.unwrap_or(0.0), d, r.budget_total),
            ) {
                (Some(_), Some(s)) => s,
                _ => match &d.at_plan_answer {
                    Some(p) => format!(
                        "At {} per condition the expected power of \"{}\" over the uncertain values is {:.2} (power {:.2} at the point values).",
                        chosen_text(&p.chosen),
                        d.design,
                        p.weakest(),
                        p.tests
                            .iter()
                            .map(|t| t.assurance.point_power)
                            .fold(f64::INFINITY, f64::min)
                    ),
                    None => continue,
                },
            };
            out.push(format!(
                "{what} The uncertain values were taken as {} ({} drawn sets). {DISTRIBUTIONS_CAUTION}",
                priors.join("; "),
                r.draws
            ));
        }
    }
    if let Some(s) = &u.sensitivity {
        for d in &s.designs {
            if let Some(r) = sensitivity_reading(d) {
                out.push(format!("For \"{}\", {r}", d.design));
            }
        }
    }
    out
}

/// The report page's section.
pub fn page_blocks(u: &UncertaintyReport, experiments: u64) -> Vec<PageBlock> {
    let mut b = vec![PageBlock::Heading(2, "Uncertain assumptions".into())];
    if let Some(s) = &u.sensitivity {
        for d in &s.designs {
            b.push(PageBlock::Heading(3, format!("Sensitivity: {}", d.design)));
            b.push(PageBlock::Paragraph(sensitivity_intro(d)));
            let Some(plan_answer) = &d.plan_answer else {
                b.push(PageBlock::Paragraph(
                    "At the plan's values the targets are out of reach.".into(),
                ));
                continue;
            };
            b.push(PageBlock::Paragraph(format!(
                "At the plan's values: {}.",
                answer_text(plan_answer)
            )));
            let (header, rows) = sweep_table(d, plan_answer);
            b.push(PageBlock::Table { header, rows });
            let (header, rows) = corner_table(d);
            if !rows.is_empty() {
                b.push(PageBlock::Paragraph(corners_intro(experiments)));
                b.push(PageBlock::Table { header, rows });
            }
            if let Some(r) = sensitivity_reading(d) {
                b.push(PageBlock::Paragraph(format!("Reading: {r}")));
            }
        }
    }
    if let Some(r) = &u.assurance {
        b.push(PageBlock::Heading(3, "Assurance".into()));
        b.push(PageBlock::Paragraph(assurance_intro(r)));
        b.push(PageBlock::List(
            r.uncertain.iter().map(prior_text).collect(),
        ));
        if let Some(n) = failed_note(r) {
            b.push(PageBlock::Paragraph(n));
        }
        for d in &r.designs {
            let (header, rows) = assurance_table(r.target, d);
            b.push(PageBlock::Paragraph(format!(
                "\"{}\" ({}):",
                d.design,
                criterion_text(d.criterion)
            )));
            b.push(PageBlock::Table { header, rows });
            if let Some(line) = outcome_line(r, d) {
                b.push(PageBlock::Paragraph(line));
            }
        }
        b.push(PageBlock::Paragraph(DISTRIBUTIONS_CAUTION.into()));
    }
    b
}

/// The terminal section of both.
pub fn render_section(u: &UncertaintyReport, experiments: u64) -> String {
    let mut out = String::new();
    let nothing = |what: &str| {
        format!(
            "{what}: no design has a live hypothesis or a target to plan for, so there is nothing to move; add a [[hypothesis]] with a power target (or [targets]).\n\n"
        )
    };
    if let Some(s) = &u.sensitivity {
        if s.designs.is_empty() {
            out.push_str(&nothing("Sensitivity"));
        }
        render_sensitivity(&mut out, s, experiments);
    }
    if let Some(a) = &u.assurance {
        if a.designs.is_empty() {
            out.push_str(&nothing("Assurance"));
        } else {
            assurance_block(&mut out, a);
        }
    }
    out
}

fn render_sensitivity(out: &mut String, s: &SensitivityReport, experiments: u64) {
    for d in &s.designs {
        sensitivity_block(out, d, experiments);
    }
}
