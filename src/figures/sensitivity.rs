//! The sensitivity of one design as a tornado: one bar per assumption spanning the answer
//! (cost, animals or trials) across its values, the lowest value's end marked with a circle
//! and the highest value's with a triangle, and a dashed line at the plan's own answer.
//! Bars are sorted with the widest on top; an assumption at which the targets are out of
//! reach runs to the right edge with an open end.

use super::chart::{self, key, marker, nice_ceiling};
use super::palette::{INK, Marker, SHADE, colour};
use super::{FigureError, Svg};
use crate::uncertainty::Criterion;
use crate::uncertainty::sweep::DesignSensitivity;
use plotters::prelude::*;

struct Bar {
    label: String,
    /// Headline at the lowest and the highest value (`None`: out of reach).
    at_low: Option<f64>,
    at_high: Option<f64>,
    min: f64,
    max: f64,
    unreached: bool,
}

/// What the x axis measures.
fn axis(c: Criterion, has_cost: bool) -> &'static str {
    match (c, has_cost) {
        (Criterion::SmallestTrials, _) => "smallest trials per condition meeting every target",
        (_, true) => "cost of the answer (the plan's [budget] units)",
        _ => "animals",
    }
}

/// The tornado of design `d`, or `None` without a sweep or an answer at the plan's values.
pub fn render(d: &DesignSensitivity, name: &str) -> Result<Option<Svg>, FigureError> {
    let Some(plan) = &d.plan_answer else {
        return Ok(None);
    };
    if d.sweeps.is_empty() {
        return Ok(None);
    }
    let mut bars: Vec<Bar> = d
        .sweeps
        .iter()
        .map(|s| {
            let heads: Vec<f64> = s
                .points
                .iter()
                .filter_map(|p| p.answer.as_ref().map(|a| a.headline()))
                .collect();
            Bar {
                label: s.label.clone(),
                at_low: s
                    .points
                    .first()
                    .and_then(|p| p.answer.as_ref())
                    .map(|a| a.headline()),
                at_high: s
                    .points
                    .last()
                    .and_then(|p| p.answer.as_ref())
                    .map(|a| a.headline()),
                min: heads.iter().copied().fold(f64::INFINITY, f64::min),
                max: heads.iter().copied().fold(f64::NEG_INFINITY, f64::max),
                unreached: heads.len() < s.points.len(),
            }
        })
        .collect();
    bars.sort_by(|a, b| {
        let w = |x: &Bar| {
            if x.unreached {
                f64::INFINITY
            } else {
                x.max - x.min
            }
        };
        w(a).total_cmp(&w(b))
    });
    let finite_max = bars
        .iter()
        .map(|b| b.max)
        .filter(|v| v.is_finite())
        .fold(plan.headline(), f64::max);
    let x_max = nice_ceiling(finite_max);
    let x_min = 0.0;
    let n = bars.len() as f64;
    let title = format!("How the answer moves with each assumption: {}", d.design);
    let x_desc = axis(d.criterion, plan.cost.is_some());
    let labels: Vec<String> = bars.iter().map(|b| b.label.clone()).collect();
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(230)
            .build_cartesian_2d(x_min..x_max, -0.5..n - 0.5)?;
        chart::styled_mesh(&mut c)
            .x_desc(x_desc)
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_labels(bars.len().max(1))
            .y_label_formatter(&|v| {
                let i = v.round();
                if (v - i).abs() < 1e-6 && i >= 0.0 && (i as usize) < labels.len() {
                    labels[i as usize].clone()
                } else {
                    String::new()
                }
            })
            .draw()?;
        for (i, b) in bars.iter().enumerate() {
            let y = i as f64;
            let lo = if b.min.is_finite() {
                b.min
            } else {
                plan.headline()
            };
            let hi = if b.unreached { x_max } else { b.max };
            c.draw_series(std::iter::once(Rectangle::new(
                [(lo, y - 0.3), (hi.max(lo), y + 0.3)],
                SHADE.mix(0.7).filled(),
            )))?;
            if let Some(v) = b.at_low {
                c.draw_series(std::iter::once(marker(Marker::Circle, (v, y), colour(0))))?;
            }
            match b.at_high {
                Some(v) => {
                    c.draw_series(std::iter::once(marker(Marker::Triangle, (v, y), colour(1))))?;
                }
                None => {
                    c.draw_series(std::iter::once(Text::new(
                        "out of reach →",
                        (x_max * 0.8, y + 0.15),
                        chart::font(12),
                    )))?;
                }
            }
        }
        c.draw_series(DashedLineSeries::new(
            vec![(plan.headline(), -0.5), (plan.headline(), n - 0.5)],
            6,
            4,
            INK.stroke_width(1),
        ))?
        .label("the answer at the plan's values")
        .legend(key(None, INK, true));
        c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
            .label("at the lowest value listed")
            .legend(key(Some(Marker::Circle), colour(0), false));
        c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
            .label("at the highest value listed")
            .legend(key(Some(Marker::Triangle), colour(1), false));
        chart::draw_legend(&mut c, SeriesLabelPosition::LowerRight)?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}
