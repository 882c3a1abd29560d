//! The trade-off between sensitivity and bias: the joint sampling distribution of
//! (d̂′, ĉ) as a 95% ellipse per design at its smallest listed count (a long, tilted ellipse
//! is the likelihood's ridge), and r(d̂′, ĉ) against trials with the expected-information
//! curve.

use super::chart::{self, key, marker, nice_ceiling};
use super::inputs::Inputs;
use super::palette::{INK, SHADE, colour, marker as marker_of};
use super::{FigureError, Svg};
use crate::engine::ScenarioSummary;
use crate::vocab::Quantity;
use plotters::prelude::*;

/// χ²(2) quantile at 0.95 (= −2 ln 0.05): the 95% contour of a bivariate normal.
const CHI2_2_95: f64 = 5.991_464_547_107_979;

/// One design's ellipse: its label, centre, and the contour points.
struct Ellipse {
    label: String,
    centre: (f64, f64),
    contour: Vec<(f64, f64)>,
}

/// The 95% normal contour of (d̂′, ĉ) from the simulated SDs and correlation.
fn ellipse(s: &ScenarioSummary) -> Option<Ellipse> {
    let d = s.quantity(Quantity::DPrime)?;
    let c = s.quantity(Quantity::Criterion)?;
    let (sd, sc, r) = (d.sd.value, c.sd.value, s.correlation.value);
    if !(sd.is_finite() && sc.is_finite() && r.is_finite() && sd > 0.0 && sc > 0.0) {
        return None;
    }
    let radius = CHI2_2_95.sqrt();
    let tilt = (1.0 - r * r).max(0.0).sqrt();
    // Cholesky factor of [[sd², r·sd·sc], [r·sd·sc, sc²]] applied to the circle.
    let contour = (0..=96)
        .map(|k| {
            let t = std::f64::consts::TAU * f64::from(k) / 96.0;
            let (u, v) = (radius * t.cos(), radius * t.sin());
            (
                d.mean.value + sd * u,
                c.mean.value + sc * (r * u + tilt * v),
            )
        })
        .collect();
    Some(Ellipse {
        label: format!("{} at {} trials", s.design, s.scenario.trials),
        centre: (d.mean.value, c.mean.value),
        contour,
    })
}

/// Ellipses of every design at its smallest listed count, with the hypothesised values.
pub fn ellipses(inputs: &Inputs, name: &str) -> Result<Option<Svg>, FigureError> {
    let shapes: Vec<Ellipse> = (0..inputs.plan.designs().len())
        .filter_map(|d| inputs.rows(d).first().and_then(|s| ellipse(s)))
        .collect();
    if shapes.is_empty() {
        return Ok(None);
    }
    // The hypothesised values the ellipses centre on (first design's first condition).
    let truth = (0..inputs.plan.designs().len())
        .find_map(|d| {
            let s = inputs.rows(d).into_iter().next()?;
            Some((
                s.quantity(Quantity::DPrime)?.truth,
                s.quantity(Quantity::Criterion)?.truth,
            ))
        })
        .unwrap_or((f64::NAN, f64::NAN));
    let (mut x0, mut x1, mut y0, mut y1) = (truth.0, truth.0, truth.1, truth.1);
    for p in shapes.iter().flat_map(|e| &e.contour) {
        x0 = x0.min(p.0);
        x1 = x1.max(p.0);
        y0 = y0.min(p.1);
        y1 = y1.max(p.1);
    }
    let (px, py) = (0.08 * (x1 - x0).max(0.1), 0.08 * (y1 - y0).max(0.1));
    let title = "Trade-off: 95% region of the estimates (d̂′, ĉ)".to_string();
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(56)
            .build_cartesian_2d((x0 - px)..(x1 + px), (y0 - py)..(y1 + py))?;
        chart::styled_mesh(&mut c)
            .x_desc("estimated d′ (absent-SD units)")
            .y_desc("estimated c, first condition (absent-SD units)")
            .draw()?;
        for (i, e) in shapes.iter().enumerate() {
            let col = colour(i);
            c.draw_series(std::iter::once(Polygon::new(
                e.contour.clone(),
                col.mix(0.12).filled(),
            )))?;
            if i % 2 == 0 {
                c.draw_series(LineSeries::new(e.contour.clone(), col.stroke_width(2)))?
            } else {
                c.draw_series(DashedLineSeries::new(
                    e.contour.clone(),
                    6,
                    4,
                    col.stroke_width(2),
                ))?
            }
            .label(e.label.clone())
            .legend(key(Some(marker_of(i)), col, i % 2 == 1));
            c.draw_series(std::iter::once(marker(marker_of(i), e.centre, col)))?;
        }
        c.draw_series(std::iter::once(
            EmptyElement::at(truth) + Cross::new((0, 0), 6, INK.stroke_width(2)),
        ))?
        .label("hypothesised (d′, c)")
        .legend(|(x, y)| Cross::new((x + 10, y), 5, INK.stroke_width(2)));
        chart::draw_legend(&mut c, SeriesLabelPosition::UpperRight)?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}

/// r(d̂′, ĉ) against trials per design: simulated (±1.96 Monte Carlo SE) over the
/// expected-information correlation.
pub fn correlation(inputs: &Inputs, name: &str) -> Result<Option<Svg>, FigureError> {
    let n = inputs.plan.designs().len();
    let simulated: Vec<Vec<(f64, f64, f64)>> = (0..n)
        .map(|d| {
            inputs
                .rows(d)
                .iter()
                .map(|s| {
                    (
                        f64::from(s.scenario.trials),
                        s.correlation.value,
                        s.correlation.mc_se,
                    )
                })
                .filter(|p| p.1.is_finite())
                .collect()
        })
        .collect();
    if simulated.iter().all(Vec::is_empty) {
        return Ok(None);
    }
    let largest = simulated.iter().flatten().map(|p| p.0).fold(0.0, f64::max);
    let x_max = nice_ceiling(largest * 1.1);
    let title = "Trade-off: correlation of d̂′ and ĉ against trials".to_string();
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(56)
            .build_cartesian_2d(0.0..x_max, -1.0..1.0)?;
        chart::styled_mesh(&mut c)
            .x_desc("trials per condition")
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_desc("r(d̂′, ĉ) across simulated experiments")
            .draw()?;
        c.draw_series(std::iter::once(PathElement::new(
            vec![(0.0, 0.0), (x_max, 0.0)],
            SHADE.stroke_width(1),
        )))?;
        for (d, points) in simulated.iter().enumerate() {
            if points.is_empty() {
                continue;
            }
            let col = colour(d);
            if let Some(scan) = inputs.scans.get(d) {
                let curve: Vec<(f64, f64)> = scan
                    .rows
                    .iter()
                    .filter_map(|r| Some((f64::from(r.trials), r.corr_d_prime_criterion?)))
                    .filter(|p| p.0 <= x_max && p.1.is_finite())
                    .collect();
                if !curve.is_empty() {
                    c.draw_series(DashedLineSeries::new(curve, 6, 4, col.stroke_width(1)))?;
                }
            }
            c.draw_series(points.iter().map(|p| {
                PathElement::new(
                    vec![(p.0, p.1 - 1.96 * p.2), (p.0, p.1 + 1.96 * p.2)],
                    col.stroke_width(1),
                )
            }))?;
            c.draw_series(points.iter().map(|p| marker(marker_of(d), (p.0, p.1), col)))?
                .label(format!("{}: simulated", inputs.plan.designs()[d].name))
                .legend(key(Some(marker_of(d)), col, false));
        }
        c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
            .label("expected information")
            .legend(key(None, INK, true));
        chart::draw_legend(&mut c, SeriesLabelPosition::LowerRight)?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}
