//! The group report as text: per design, compact animals × trials tables of two-stage power,
//! pooled rejection rate and the precision of the group mean criterion; the effort-split
//! frontier; plain reading lines; and the animal-welfare caution.

use super::CAUTION;
use super::style::{new_table, right_align};
use crate::design::goals::TestKind;
use crate::engine::Share;
use crate::groups::summary::GroupTestSummary;
use crate::groups::{DesignGroups, GridCell, GroupReport, GroupTest};
use crate::plan::Plan;
use crate::vocab::Sided;
use std::fmt::Write;

mod effort_text;

/// The caution specific to groups, repeated under every group report.
pub const GROUP_CAUTION: &str = "How many animals to use is settled with your local animal-welfare body \
(ethics committee, IACUC or equivalent) under the Reduction principle: the fewest animals that answer the \
question. A cheaper allocation with more animals is not automatically the better one.";

/// The whole group report: a title, [`render_section`], and the general caution.
pub fn render(plan: &Plan, report: &GroupReport) -> String {
    let mut out = format!("vigil groups — {}\n", plan.study().title);
    out.push_str(&render_section(plan, report));
    let _ = writeln!(out, "Caution: {CAUTION}");
    out
}

/// The group results without title or general caution, for a report that has both already
/// (e.g. inserted before the "Caution:" line of `vigil run`); ends with the animals caution.
pub fn render_section(plan: &Plan, report: &GroupReport) -> String {
    let mut out = String::new();
    header(&mut out, plan, report);
    for d in &report.designs {
        design_block(&mut out, report, d);
    }
    out.push_str(&super::habituation_text::render(report));
    let _ = writeln!(out, "Animals: {GROUP_CAUTION}");
    let _ = writeln!(out);
    out
}

/// The between-animal variation beyond d′ and c (random slopes, σ, lapse rate) in words,
/// naming only what the plan sets; `None` when every animal shares the plan's values.
pub fn slopes_phrase(s: &crate::groups::population::Slopes) -> Option<String> {
    let mut parts = Vec::new();
    if s.sd_criterion_shift > 0.0 {
        parts.push(format!(
            "SD of an animal's criterion shift between conditions {:.2} (correlation with its c {:+.2})",
            s.sd_criterion_shift, s.correlation_criterion_shift
        ));
    }
    if s.sd_d_prime_change > 0.0 {
        parts.push(format!(
            "SD of its d′ change {:.2} (correlation with its d′ {:+.2})",
            s.sd_d_prime_change, s.correlation_d_prime_change
        ));
    }
    if s.sd_ln_sigma > 0.0 {
        parts.push(format!("SD of ln σ {:.2}", s.sd_ln_sigma));
    }
    if s.sd_lapse_rate > 0.0 {
        parts.push(format!("SD of the lapse rate {:.3}", s.sd_lapse_rate));
    }
    (!parts.is_empty()).then(|| format!("between animals also: {}", parts.join(", ")))
}

fn header(out: &mut String, plan: &Plan, r: &GroupReport) {
    let o = plan.observer();
    let p = &r.population;
    let mut line = format!(
        "Population: d′ = {:.2} (between-animal SD {:.2}), c = {:+.2} (SD {:.2}), correlation of an animal's d′ and c {:+.2}",
        o.d_prime, p.sd_d_prime, o.criterion, p.sd_criterion, p.correlation
    );
    if let Some(more) = slopes_phrase(&p.slopes) {
        let _ = write!(line, "; {more}");
    }
    if let Some(l) = r.lapse {
        let _ = write!(
            line,
            "; lapses on {:.1}% of trials (answered \"present\" {:.0}% of the time)",
            100.0 * l.rate,
            100.0 * l.guess_yes
        );
    }
    if let Some(cap) = r.trial_cap {
        let _ = write!(line, "; at most {cap} trials per animal");
    }
    let _ = writeln!(out, "{line}.");
    let _ = writeln!(
        out,
        "Two-stage: every animal fitted on its own ({} correction; an animal whose fit still fails is left out and counted), \
         then a t test across animals at α = {}. Pooled: all animals' counts summed into one fit and a Wald test, which \
         ignores how animals differ. {} simulated studies per cell; power with its 95% Wilson interval, means ± Monte Carlo SE.",
        r.rate_correction.name(),
        r.alpha,
        r.experiments
    );
    let _ = writeln!(out);
}

/// "0.83 (0.81–0.85)"; a dash when undefined.
pub(super) fn power(s: &Share) -> String {
    if s.value.is_finite() {
        format!("{:.2} ({:.2}–{:.2})", s.value, s.low, s.high)
    } else {
        "–".into()
    }
}

fn sign(sided: Sided) -> &'static str {
    match sided {
        Sided::TwoSided => "≠",
        Sided::Greater => ">",
        Sided::Less => "<",
    }
}

/// What a test asks, in words.
pub fn describe(test: &GroupTest) -> String {
    use crate::groups::hypotheses::GroupContrast;
    let s = sign(test.sided);
    match test.contrast {
        GroupContrast::Criterion { .. } if test.kind == TestKind::IdealCriterion => {
            format!(
                "mean criterion {s} the ideal observer's ({:+.2})",
                test.null
            )
        }
        GroupContrast::Criterion { .. } => format!("mean criterion {s} {}", test.null),
        GroupContrast::CriterionShift { .. } => {
            format!("mean criterion shift between conditions {s} 0")
        }
        GroupContrast::SensitivityDifference { .. } => {
            format!("mean d′ difference between conditions {s} 0")
        }
        GroupContrast::LnSigma => format!("mean ln σ {s} 0 (σ {s} 1)"),
        GroupContrast::GroupDifference { shift, .. } => format!(
            "second population's mean criterion − the first's {s} 0 (half the animals from each; true shift {shift:+.2})"
        ),
    }
}

pub(super) fn grid_table(d: &DesignGroups, cell: impl Fn(&GridCell) -> String) -> String {
    let mut header = vec!["animals".to_string()];
    header.extend(d.trials.iter().map(|&n| {
        if d.conditions > 1 {
            format!("{n} trials/cond.")
        } else {
            format!("{n} trials")
        }
    }));
    let mut t = new_table(header.iter().map(String::as_str).collect());
    for &a in &d.animals {
        let mut row = vec![a.to_string()];
        row.extend(
            d.trials
                .iter()
                .map(|&n| d.cell(a, n).map_or("–".into(), &cell)),
        );
        t.add_row(row);
    }
    right_align(&mut t, 0..d.trials.len() + 1);
    t.to_string()
}

fn design_block(out: &mut String, r: &GroupReport, d: &DesignGroups) {
    let mut title = format!("■ {}  ({}", d.design, d.record);
    if d.capped {
        let _ = write!(
            title,
            "; trial counts above the cap of {} per animal capped",
            r.trial_cap.unwrap_or(0)
        );
    }
    let _ = writeln!(out, "{title})");
    for note in &d.notes {
        let _ = writeln!(out, "Note: {note}");
    }
    if d.cells.is_empty() {
        let _ = writeln!(out);
        return;
    }
    for (i, test) in d.tests.iter().enumerate() {
        let _ = writeln!(
            out,
            "\"{}\": {} — two-stage power [95%]",
            test.name,
            describe(test)
        );
        let _ = writeln!(
            out,
            "{}",
            grid_table(d, |c| power(&c.summary.tests[i].two_stage))
        );
        let _ = writeln!(
            out,
            "\"{}\": pooled test's rejection rate · its rejection rate of the true value",
            test.name
        );
        let _ = writeln!(
            out,
            "{}",
            grid_table(d, |c| {
                let t = &c.summary.tests[i];
                format!("{:.2} · {:.2}", t.pooled.value, t.pooled_false.value)
            })
        );
        let worst = |f: fn(&GroupTestSummary) -> f64| {
            d.cells
                .iter()
                .map(|c| f(&c.summary.tests[i]))
                .fold(f64::NAN, f64::max)
        };
        let best = |f: fn(&GroupTestSummary) -> f64| {
            d.cells
                .iter()
                .map(|c| f(&c.summary.tests[i]))
                .fold(f64::NAN, f64::min)
        };
        let _ = writeln!(
            out,
            "False positives (each test of the population's true value{}): two-stage {:.2}–{:.2}, pooled {:.2}–{:.2}, against α = {}. \
             The pooled test treats differences between animals as sampling noise, so its higher rates are not extra power.",
            if r.lapse.is_some() {
                "; lapses move every estimate towards c = 0, which moves these rates too"
            } else {
                ""
            },
            best(|t| t.two_stage_false.value),
            worst(|t| t.two_stage_false.value),
            best(|t| t.pooled_false.value),
            worst(|t| t.pooled_false.value),
            r.alpha,
        );
    }
    let _ = writeln!(
        out,
        "Group mean of c (population {:+.2}): SE of the mean (average over studies) · 95% coverage",
        d.truth_criterion
    );
    let _ = writeln!(
        out,
        "{}",
        grid_table(d, |c| {
            let s = &c.summary.criterion;
            // A cell where no study had two usable animals has nothing to show.
            if s.mean_se.value.is_finite() && s.coverage.value.is_finite() {
                format!("{:.3} · {:.1}%", s.mean_se.value, 100.0 * s.coverage.value)
            } else {
                "– · –".to_string()
            }
        })
    );
    for line in super::coverage_notes::group_notes(r, d) {
        let _ = writeln!(out, "{line}");
    }
    let dropped = d
        .cells
        .iter()
        .map(|c| c.summary.animals_dropped.value)
        .fold(0.0, f64::max);
    let failed = d
        .cells
        .iter()
        .map(|c| c.summary.failed_studies.value)
        .fold(0.0, f64::max);
    let _ = writeln!(
        out,
        "Left out: at most {:.1}% of animal fits in any cell (no fit after the {} correction); at most {:.1}% of studies had fewer than 2 usable animals.",
        100.0 * dropped,
        r.rate_correction.name(),
        100.0 * failed
    );
    super::random_effects_text::block(out, r, d, |cell| grid_table(d, cell));
    precision_reading(out, r, d);
    if let Some(e) = &d.effort {
        effort_text::effort_block(out, r, d, e);
    }
    let _ = writeln!(out);
}

fn precision_reading(out: &mut String, r: &GroupReport, d: &DesignGroups) {
    let (Some(small), Some(large)) = (d.cells.first(), d.cells.last()) else {
        return;
    };
    let usable = |c: &crate::groups::GridCell| c.summary.criterion.half_width.value.is_finite();
    if !d.cells.iter().any(usable) {
        let _ = writeln!(
            out,
            "Reading: {}: no usable group estimate at any count — no study had two animals with a fit \
             (see \"Left out\"), so the group mean criterion cannot be estimated with this record; \
             change the record (a full record, or a known or censused base rate) rather than the numbers.",
            d.design
        );
        return;
    }
    let level = 100.0 * r.confidence;
    let hw = |x: f64| crate::report::format::number(x, 2);
    let one = d.cells.len() == 1;
    let ours = if one {
        format!(
            "±{} with {} animals × {} trials each",
            hw(small.summary.criterion.half_width.value),
            small.animals,
            small.trials_per_animal
        )
    } else {
        format!(
            "±{} with {} animals × {} trials each and ±{} with {} × {}",
            hw(small.summary.criterion.half_width.value),
            small.animals,
            small.trials_per_animal,
            hw(large.summary.criterion.half_width.value),
            large.animals,
            large.trials_per_animal
        )
    };
    let cells: &[_] = if one { &[small] } else { &[small, large] };
    let claims: Vec<String> = cells
        .iter()
        .map(|c| format!("±{}", hw(c.summary.pooled_criterion.half_width.value)))
        .collect();
    let covers: Vec<String> = cells
        .iter()
        .map(|c| {
            format!(
                "{}%",
                crate::report::format::number(100.0 * c.summary.pooled_criterion.coverage.value, 0)
            )
        })
        .collect();
    // "only" when the Wilson interval of a coverage lies wholly below the level.
    let short = cells
        .iter()
        .any(|c| c.summary.pooled_criterion.coverage.high < r.confidence);
    let (link, only) = if short { ("but", "only ") } else { ("and", "") };
    let _ = writeln!(
        out,
        "Reading: {}: the group mean criterion is pinned to {ours} ({level:.0}% half-widths); \
         the pooled fit claims {}, {link} its intervals hold the population mean in {only}{} of studies.",
        d.design,
        claims.join(" and "),
        covers.join(" and "),
    );
}
