//! Figures as SVG: each a pure function from typed results ([`Inputs`]) to SVG text, one
//! small file per figure, drawn with plotters' SVG backend.
//!
//! Conventions every figure keeps: axes say what is plotted and in which units; a legend
//! names every series; colours are Okabe–Ito and every series also has its own marker or
//! dash, so a greyscale print still tells them apart ([`palette`]); text is SVG `<text>` in
//! the generic `sans-serif` family, so no font file is needed ([`chart`]). Titles, axis
//! labels and legend entries are written here beside the drawing they label (they are
//! labels, not report prose); every sentence about the results is written in `report/`.
//!
//! The module sits above `search`, `groups`, `evaluate` and `analytic` (it draws their
//! results) and beside `report`, which embeds the finished SVG text in its pages.

pub mod chart;
pub mod explore;
pub mod groups;
pub mod inputs;
pub mod palette;
pub mod power;
pub mod precision;
pub mod roc;
pub mod sensitivity;
pub mod tradeoff;

pub use inputs::Inputs;
use thiserror::Error;

/// One finished figure.
#[derive(Debug, Clone, PartialEq)]
pub struct Svg {
    /// File stem, unique within a report, e.g. `power-criterion-shift`.
    pub name: String,
    /// The figure's caption, as drawn on it.
    pub title: String,
    /// The SVG document.
    pub text: String,
}

/// A figure that could not be drawn (a drawing-backend failure: a bug, not bad input).
#[derive(Debug, Error)]
#[error("figure \"{name}\" could not be drawn: {message}")]
pub struct FigureError {
    pub name: String,
    pub message: String,
}

/// A file-name-safe stem: lower-case ASCII letters and digits, other runs as one `-`.
pub fn slug(text: &str) -> String {
    let mut out = String::new();
    for ch in text.chars() {
        if ch.is_ascii_alphanumeric() {
            out.push(ch.to_ascii_lowercase());
        } else if !out.ends_with('-') && !out.is_empty() {
            out.push('-');
        }
    }
    let out = out.trim_end_matches('-').to_string();
    if out.is_empty() { "x".to_string() } else { out }
}

/// Every figure the inputs support, in the report's order: power per hypothesis, precision
/// per design, the trade-off, ROC and zROC, the groups' heat maps and effort frontiers, and
/// the expected-information scan. Names are numbered so two designs whose names slug alike
/// still get two files.
pub fn all(inputs: &Inputs) -> Result<Vec<Svg>, FigureError> {
    let mut out = Vec::new();
    let mut push = |fig: Option<Svg>| {
        if let Some(mut f) = fig {
            f.name = format!("{:02}-{}", out.len() + 1, f.name);
            out.push(f);
        }
    };
    for h in inputs.plan.hypotheses() {
        push(power::render(
            inputs,
            &h.name,
            &format!("power-{}", slug(&h.name)),
        )?);
    }
    for (d, design) in inputs.plan.designs().iter().enumerate() {
        push(precision::render(
            inputs,
            d,
            &format!("precision-{}", slug(&design.name)),
        )?);
    }
    push(tradeoff::ellipses(inputs, "tradeoff-ellipses")?);
    push(tradeoff::correlation(inputs, "tradeoff-correlation")?);
    push(roc::render(inputs, false, "roc")?);
    push(roc::render(inputs, true, "zroc")?);
    if let Some(g) = inputs.groups {
        for design in &g.designs {
            for (t, test) in design.tests.iter().enumerate() {
                push(groups::heat_map(
                    design,
                    t,
                    &format!("groups-power-{}-{}", slug(&design.design), slug(&test.name)),
                )?);
            }
            push(groups::frontier(
                design,
                &format!("effort-frontier-{}", slug(&design.design)),
            )?);
        }
    }
    if let Some(s) = inputs.uncertainty.and_then(|u| u.sensitivity.as_ref()) {
        for d in &s.designs {
            push(sensitivity::render(
                d,
                &format!("sensitivity-{}", slug(&d.design)),
            )?);
        }
    }
    push(explore::standard_errors(inputs, "explore-se")?);
    push(explore::condition_number(inputs, "explore-condition")?);
    Ok(out)
}
