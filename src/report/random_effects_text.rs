//! The random-effects analysis in the terminal report: per hypothesis, the Wald and
//! likelihood-ratio power over the grid and their false-positive range; the fitted mean
//! criterion's SE and coverage; convergence and the quadrature used.

use super::groups_text::power;
use crate::groups::summary::RandomEffectsSummary;
use crate::groups::{DesignGroups, GridCell, GroupReport};
use std::fmt::Write;

fn summary(c: &GridCell) -> Option<&RandomEffectsSummary> {
    c.summary.random_effects.as_ref()
}

/// Writes the block when the design's cells carry a random-effects analysis.
pub fn block(
    out: &mut String,
    r: &GroupReport,
    d: &DesignGroups,
    table: impl Fn(&dyn Fn(&GridCell) -> String) -> String,
) {
    let Some(first) = d.cells.iter().find_map(summary) else {
        return;
    };
    let range = |f: &dyn Fn(&RandomEffectsSummary) -> f64| {
        let values: Vec<f64> = d.cells.iter().filter_map(summary).map(f).collect();
        let lo = values.iter().copied().fold(f64::NAN, f64::min);
        let hi = values.iter().copied().fold(f64::NAN, f64::max);
        (lo, hi)
    };
    for (i, test) in d.tests.iter().enumerate() {
        let _ = writeln!(
            out,
            "\"{}\": random-effects analysis — Wald power [95%] · likelihood-ratio power",
            test.name
        );
        let _ = writeln!(
            out,
            "{}",
            table(&|c| summary(c).map_or("–".into(), |s| {
                let t = &s.tests[i];
                format!("{} · {:.2}", power(&t.wald), t.lr.value)
            }))
        );
        let (wl, wh) = range(&|s| s.tests[i].wald_false.value);
        let (ll, lh) = range(&|s| s.tests[i].lr_false.value);
        let reference = if first.tests[i].df.is_some() {
            let means = if test.two_populations() {
                "N − 2, for the two groups' means"
            } else {
                "N − 1"
            };
            format!(
                "Both refer their statistic to Student's t on the animals' degrees of freedom ({means}), \
                 as the two-stage t test does: the normal reference is optimistic with few animals."
            )
        } else {
            "Both refer their statistic to the normal distribution: a within-animal contrast with no \
             between-animal SD, whose precision grows with trials."
                .to_string()
        };
        let _ = writeln!(
            out,
            "Random-effects false positives (each test of the true value): Wald {wl:.2}–{wh:.2}, likelihood ratio {ll:.2}–{lh:.2}, against α = {}. {reference}",
            r.alpha
        );
    }
    let _ = writeln!(
        out,
        "Random-effects mean of c (population {:+.2}): Wald SE (average over studies) · {}% coverage \
         (intervals ± t on N − 1 degrees of freedom × SE)",
        d.truth_criterion,
        super::format::plain((1000.0 * r.confidence).round() / 10.0)
    );
    let _ = writeln!(
        out,
        "{}",
        table(&|c| summary(c).map_or("–".into(), |s| {
            let p = &s.criterion;
            if p.mean_se.value.is_finite() && p.coverage.value.is_finite() {
                format!("{:.3} · {:.1}%", p.mean_se.value, 100.0 * p.coverage.value)
            } else {
                "– · –".into()
            }
        }))
    );
    let (lo, _) = range(&|s| s.converged.value);
    let _ = writeln!(
        out,
        "Random-effects fit: a probit mixed model of all animals at once (random {}), by marginal maximum likelihood with adaptive Gauss–Hermite quadrature, {} nodes per random effect; \
         it converged in at least {:.1}% of studies in every cell (failures count as not rejecting).",
        first.random.join(", "),
        first.nodes,
        100.0 * lo
    );
}
