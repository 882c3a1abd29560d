//! What the report folder's page says, block by block: provenance, the cautions, the
//! justification, the verdict, the figures, the per-design tables (every figure with its
//! Monte Carlo uncertainty), the group tables, the whole terminal report and the resolved
//! plan. Rendered by `page_html` and `page_markdown`.

use super::format::{figure, number, percent, share};
use super::page::{Page, PageBlock};
use super::{CAUTION, justification, terminal, verdict};
use crate::engine::ScenarioSummary;
use crate::figures::Svg;
use crate::groups::GroupReport;
use crate::plan::Plan;
use crate::search::SearchResult;

/// Folder holding the figures, relative to the page.
pub const FIGURE_DIR: &str = "figures";

/// Everything the page shows.
pub struct ReportContent<'a> {
    pub plan: &'a Plan,
    pub summaries: &'a [ScenarioSummary],
    pub searches: &'a [SearchResult],
    pub groups: Option<&'a GroupReport>,
    /// What the expected information advises for each design (the terminal report's readings).
    pub advice: &'a crate::analytic::advice::RunAdvice,
    pub uncertainty: Option<&'a crate::uncertainty::UncertaintyReport>,
    pub figures: &'a [Svg],
    /// Other files of the folder, with what each holds.
    pub files: &'a [(String, String)],
}

/// The path of a figure's SVG file, relative to the page.
pub fn figure_path(f: &Svg) -> String {
    format!("{FIGURE_DIR}/{}.svg", f.name)
}

/// The page.
pub fn build(c: &ReportContent) -> Page {
    let plan = c.plan;
    let study = plan.study();
    let mut b = Vec::new();
    let title = format!("vigil report — {}", study.title);
    b.push(PageBlock::Heading(1, title.clone()));
    b.push(PageBlock::Paragraph(format!(
        "Made by vigil {} from {}: seed {}, {} per scenario, {:.0}% intervals, α = {}. The same plan and seed give the same numbers on any machine and thread count.",
        env!("CARGO_PKG_VERSION"),
        plan.source().file_name().map_or_else(|| plan.source().display().to_string(), |n| n.to_string_lossy().into_owned()),
        study.seed,
        super::precision_text::settings_phrase(study),
        100.0 * study.confidence,
        study.alpha
    )));
    b.push(PageBlock::Heading(2, "Cautions".into()));
    b.push(PageBlock::Paragraph(CAUTION.to_string()));
    b.push(PageBlock::Heading(
        2,
        "Justification (a draft to edit)".into(),
    ));
    b.extend(
        justification::paragraphs(plan, c.searches, c.groups, c.uncertainty)
            .into_iter()
            .map(PageBlock::Paragraph),
    );
    if !c.searches.is_empty() {
        b.push(PageBlock::Heading(
            2,
            "Verdict: the smallest experiment that meets every target".into(),
        ));
        b.push(PageBlock::Table {
            header: verdict::HEADER.iter().map(|h| h.to_string()).collect(),
            rows: verdict::rows(c.searches, study.max_trials)
                .into_iter()
                .map(|r| r.to_vec())
                .collect(),
        });
        b.push(PageBlock::Paragraph(
            "Power is the likelihood-ratio test's rejection rate with its 95% Wilson interval; ± beside a count is the Monte Carlo uncertainty of the count.".into(),
        ));
    }
    if !c.figures.is_empty() {
        b.push(PageBlock::Heading(2, "Figures".into()));
        for (i, f) in c.figures.iter().enumerate() {
            b.push(PageBlock::Figure {
                file: figure_path(f),
                caption: format!("Figure {}. {}", i + 1, f.title),
                svg: f.text.clone(),
            });
        }
    }
    b.push(PageBlock::Heading(2, "Results per design".into()));
    b.push(PageBlock::Paragraph(
        "Means over simulated experiments ± their Monte Carlo SE; shares with their 95% Wilson interval.".into(),
    ));
    for (d, design) in plan.designs().iter().enumerate() {
        let rows: Vec<&ScenarioSummary> = c
            .summaries
            .iter()
            .filter(|s| s.scenario.design == d)
            .collect();
        if rows.is_empty() {
            continue;
        }
        b.push(PageBlock::Heading(
            3,
            format!("{} ({})", design.name, design.record_label()),
        ));
        b.push(precision_table(&rows));
        b.push(tradeoff_table(&rows));
        if rows.iter().any(|s| !s.tests.is_empty()) {
            b.push(power_table(&rows));
        }
    }
    if let Some(g) = c.groups {
        b.push(PageBlock::Heading(2, "Groups of animals".into()));
        for dg in &g.designs {
            for (t, test) in dg.tests.iter().enumerate() {
                b.push(PageBlock::Heading(
                    3,
                    format!("{}: power of \"{}\" (two-stage)", dg.design, test.name),
                ));
                let mut header = vec!["animals".to_string()];
                header.extend(
                    dg.trials
                        .iter()
                        .map(|n| format!("{n} trials per condition")),
                );
                let rows = dg
                    .animals
                    .iter()
                    .map(|&m| {
                        let mut row = vec![m.to_string()];
                        row.extend(dg.trials.iter().map(|&n| {
                            dg.cell(m, n)
                                .and_then(|cell| cell.summary.tests.get(t))
                                .map_or_else(|| "–".into(), |s| share(&s.two_stage))
                        }));
                        row
                    })
                    .collect();
                b.push(PageBlock::Table { header, rows });
            }
        }
    }
    if let Some(u) = c.uncertainty {
        b.extend(super::uncertainty_text::page_blocks(u, study.experiments));
    }
    b.push(PageBlock::Heading(2, "The whole terminal report".into()));
    // At the default width whatever the terminal is, so the page never depends on the
    // window it was made in.
    b.push(PageBlock::Pre(super::layout::with_layout(
        super::layout::Layout::default(),
        || {
            terminal::render_run(
                plan,
                c.summaries,
                c.searches,
                c.groups,
                c.advice,
                c.uncertainty,
            )
        },
    )));
    b.push(PageBlock::Heading(2, "The resolved plan".into()));
    b.push(PageBlock::Paragraph(
        "Every value the run used, defaults filled in, as JSON (the plan file itself is plan.toml in this folder).".into(),
    ));
    b.push(PageBlock::Pre(
        serde_json::to_string_pretty(plan).unwrap_or_else(|e| format!("(not available: {e})")),
    ));
    b.push(PageBlock::Heading(2, "Files in this folder".into()));
    let mut files: Vec<String> = c
        .files
        .iter()
        .map(|(f, what)| format!("{f}: {what}"))
        .collect();
    files.extend(
        c.figures
            .iter()
            .map(|f| format!("{}: {}", figure_path(f), f.title)),
    );
    b.push(PageBlock::List(files));
    Page { title, blocks: b }
}

fn precision_table(rows: &[&ScenarioSummary]) -> PageBlock {
    let header = [
        "trials",
        "quantity",
        "truth",
        "mean",
        "bias",
        "SD",
        "asympt. SE",
        "coverage",
        "half-width",
    ];
    let mut out = Vec::new();
    for s in rows {
        for q in &s.quantities {
            let half = crate::engine::Figure {
                value: q.mean_width.value / 2.0,
                mc_se: q.mean_width.mc_se / 2.0,
            };
            out.push(vec![
                s.scenario.trials.to_string(),
                q.label(),
                number(q.truth, 3),
                figure(&q.mean, 3),
                figure(&q.bias, 3),
                figure(&q.sd, 3),
                q.asymptotic_se.map_or_else(|| "–".into(), |x| number(x, 3)),
                share(&q.coverage),
                figure(&half, 3),
            ]);
        }
    }
    PageBlock::Table {
        header: header.iter().map(|h| h.to_string()).collect(),
        rows: out,
    }
}

fn tradeoff_table(rows: &[&ScenarioSummary]) -> PageBlock {
    let header = [
        "trials",
        "r(d̂′, ĉ)",
        "rate of 0 or 1",
        "left out: degenerate",
        "left out: not converged",
    ];
    PageBlock::Table {
        header: header.iter().map(|h| h.to_string()).collect(),
        rows: rows
            .iter()
            .map(|s| {
                vec![
                    s.scenario.trials.to_string(),
                    figure(&s.correlation, 3),
                    share(&s.datasets.extreme),
                    share(&s.datasets.degenerate),
                    percent(s.datasets.not_converged.value),
                ]
            })
            .collect(),
    }
}

fn power_table(rows: &[&ScenarioSummary]) -> PageBlock {
    let header = [
        "trials",
        "hypothesis",
        "power: likelihood ratio",
        "power: Wald",
    ];
    let mut out = Vec::new();
    for s in rows {
        for t in &s.tests {
            let name = if t.null_true {
                format!("{} (null true: a type-I error rate)", t.hypothesis)
            } else {
                t.hypothesis.clone()
            };
            out.push(vec![
                s.scenario.trials.to_string(),
                name,
                share(&t.likelihood_ratio),
                share(&t.wald),
            ]);
        }
    }
    PageBlock::Table {
        header: header.iter().map(|h| h.to_string()).collect(),
        rows: out,
    }
}

/// What `vigil report` prints when the folder is written.
pub fn written(folder: &std::path::Path, files: &[String]) -> String {
    let figures = files.iter().filter(|f| f.starts_with(FIGURE_DIR)).count();
    super::layout::wrap_prose(&format!(
        "Wrote the report folder {}: open index.html in a browser; report.md and justification.md are for pasting; {figures} figures as SVG under {FIGURE_DIR}/; results.csv, results.json and plan.toml beside them; every table as CSV under tables/.\nCaution: {CAUTION}\n",
        folder.display()
    ))
}
