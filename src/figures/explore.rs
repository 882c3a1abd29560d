//! The expected-information scan (`vigil explore`'s numbers): asymptotic SEs of d′ and c,
//! and the condition number of the information matrix, against trials per condition on
//! log axes, with the counts at which a design does not identify d′ and c shaded.

use super::chart::{self, band_key, key, legend_style};
use super::inputs::Inputs;
use super::palette::{SHADE, colour};
use super::{FigureError, Svg};
use crate::analytic::information::ScenarioInformation;
use crate::analytic::scan::DesignScan;
use crate::cells::verdict::Verdict;
use crate::vocab::Quantity;
use plotters::prelude::*;

/// One value read off a scan row (an SE, the condition number).
type Reading = dyn Fn(&ScenarioInformation) -> Option<f64>;

/// Trial-count spans `[from, to]` over which `scan` is not identified.
fn unidentified(scan: &DesignScan) -> Vec<(f64, f64)> {
    let mut spans: Vec<(f64, f64)> = Vec::new();
    let mut open: Option<f64> = None;
    let mut last = 0.0;
    for r in &scan.rows {
        let n = f64::from(r.trials);
        let bad = matches!(r.verdict, Verdict::NotIdentified { .. });
        match (bad, open) {
            (true, None) => open = Some(n),
            (false, Some(a)) => {
                spans.push((a, last));
                open = None;
            }
            _ => {}
        }
        last = n;
    }
    if let Some(a) = open {
        spans.push((a, last));
    }
    spans
}

/// Labels a log axis at 1, 2 and 5 × 10^k only (plotters offers every integer multiple,
/// which crowd together near each decade).
fn log_label(v: &f64) -> String {
    let decade = 10f64.powf(v.log10().floor());
    let lead = v / decade;
    if [1.0, 2.0, 5.0].iter().any(|m| (lead - m).abs() < 1e-6) {
        let digits = if *v >= 1.0 {
            0
        } else {
            (-v.log10().floor()) as usize
        };
        format!("{v:.digits$}")
    } else {
        String::new()
    }
}

fn x_range(scans: &[DesignScan]) -> Option<(f64, f64)> {
    let xs = scans
        .iter()
        .flat_map(|s| s.rows.iter().map(|r| f64::from(r.trials)));
    let (lo, hi) = xs.fold((f64::INFINITY, 0.0f64), |(a, b), x| (a.min(x), b.max(x)));
    (lo.is_finite() && hi > lo).then_some((lo, hi))
}

/// One log–log panel: `y(row)` per design (solid) and optionally `y2` (dashed).
fn panel(
    inputs: &Inputs,
    name: &str,
    title: &str,
    y_desc: &str,
    series: &[(&str, &Reading)],
) -> Result<Option<Svg>, FigureError> {
    let Some((x0, x1)) = x_range(inputs.scans) else {
        return Ok(None);
    };
    let values: Vec<f64> = inputs
        .scans
        .iter()
        .flat_map(|s| &s.rows)
        .flat_map(|r| series.iter().filter_map(|(_, f)| f(r)))
        .filter(|v| v.is_finite() && *v > 0.0)
        .collect();
    if values.is_empty() {
        return Ok(None);
    }
    let y0 = values.iter().copied().fold(f64::INFINITY, f64::min) / 1.5;
    let y1 = values.iter().copied().fold(0.0, f64::max) * 1.5;
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(64)
            .build_cartesian_2d((x0..x1).log_scale(), (y0..y1).log_scale())?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(SHADE.mix(0.4))
            .x_desc("trials per condition (log scale)")
            .x_label_formatter(&log_label)
            .y_desc(y_desc)
            .y_label_formatter(&|v| log_label(v))
            .label_style(chart::font(12))
            .axis_desc_style(chart::font(13))
            .draw()?;
        for (d, scan) in inputs.scans.iter().enumerate() {
            let col = colour(d);
            let spans = unidentified(scan);
            for (i, &(a, b)) in spans.iter().enumerate() {
                let shade = c.draw_series(std::iter::once(Rectangle::new(
                    [(a, y0), (b.max(a * 1.02), y1)],
                    col.mix(0.15).filled(),
                )))?;
                if i == 0 {
                    shade
                        .label(format!("{}: not identified", scan.design))
                        .legend(band_key(col));
                }
            }
            for (k, (label, f)) in series.iter().enumerate() {
                let pts: Vec<(f64, f64)> = scan
                    .rows
                    .iter()
                    .filter_map(|r| Some((f64::from(r.trials), f(r)?)))
                    .filter(|p| p.1.is_finite() && p.1 > 0.0)
                    .collect();
                if pts.is_empty() {
                    continue;
                }
                let legend = format!("{}: {label}", scan.design);
                let dashed = k % 2 == 1;
                let style = col.stroke_width(2);
                if dashed {
                    c.draw_series(DashedLineSeries::new(pts, 6, 4, style))?
                } else {
                    c.draw_series(LineSeries::new(pts, style))?
                }
                .label(legend)
                .legend(key(None, col, dashed));
            }
        }
        let (bg, border) = legend_style();
        c.configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .background_style(bg)
            .border_style(border)
            .label_font(chart::font(11))
            .draw()?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title: title.to_string(),
        text,
    }))
}

/// Asymptotic SE of d′ (solid) and c (dashed, first condition) per design.
pub fn standard_errors(inputs: &Inputs, name: &str) -> Result<Option<Svg>, FigureError> {
    let d = |r: &ScenarioInformation| r.se(Quantity::DPrime);
    let c = |r: &ScenarioInformation| r.se(Quantity::Criterion);
    panel(
        inputs,
        name,
        "Expected information: asymptotic SE against trials",
        "asymptotic SE (absent-SD units, log scale)",
        &[("SE(d′)", &d), ("SE(c)", &c)],
    )
}

/// Condition number of the information matrix per design.
pub fn condition_number(inputs: &Inputs, name: &str) -> Result<Option<Svg>, FigureError> {
    let k = |r: &ScenarioInformation| Some(r.condition_number);
    panel(
        inputs,
        name,
        "Expected information: condition number against trials",
        "condition number of the information (log scale)",
        &[("condition number", &k)],
    )
}
