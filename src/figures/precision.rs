//! Precision against trials for one design: the half-width of the interval at the plan's
//! confidence for d′, c (per condition), σ and A_z where the design estimates them.
//! Simulated mean half-widths at the listed counts (with ±1.96 Monte Carlo SE bars) are
//! drawn over the expected-information curve z·SE.

use super::chart::{self, key, marker, nice_ceiling};
use super::inputs::Inputs;
use super::palette::{INK, colour, marker as marker_of};
use super::{FigureError, Svg};
use crate::infer::z_critical;
use crate::vocab::Quantity;
use plotters::prelude::*;

/// Quantities this figure shows (the ones a reader sizes an experiment by).
const SHOWN: [Quantity; 4] = [
    Quantity::DPrime,
    Quantity::Criterion,
    Quantity::Sigma,
    Quantity::Az,
];

struct Series {
    label: String,
    /// `(trials, half-width, MC SE of the half-width)`.
    simulated: Vec<(f64, f64, f64)>,
    curve: Vec<(f64, f64)>,
}

/// The precision figure of design `d`, or `None` when it has no finite half-width to show.
pub fn render(inputs: &Inputs, d: usize, name: &str) -> Result<Option<Svg>, FigureError> {
    let rows = inputs.rows(d);
    let Some(first) = rows.first() else {
        return Ok(None);
    };
    let confidence = inputs.plan.study().confidence;
    let z = z_critical(confidence);
    let scan = inputs.scans.get(d);
    let series: Vec<Series> = first
        .quantities
        .iter()
        .filter(|q| SHOWN.contains(&q.quantity))
        .map(|q| {
            let label = q.label();
            let simulated = rows
                .iter()
                .filter_map(|s| {
                    let x = s.quantities.iter().find(|x| x.label() == label)?;
                    Some((s, x))
                })
                .map(|(s, x)| {
                    (
                        f64::from(s.scenario.trials),
                        x.mean_width.value / 2.0,
                        x.mean_width.mc_se / 2.0,
                    )
                })
                .filter(|p| p.1.is_finite())
                .collect();
            let curve = scan
                .map(|sc| {
                    sc.rows
                        .iter()
                        .filter_map(|r| {
                            let a = r.quantities.iter().find(|a| a.label() == label)?;
                            Some((f64::from(r.trials), z * a.se?))
                        })
                        .collect()
                })
                .unwrap_or_default();
            Series {
                label,
                simulated,
                curve,
            }
        })
        .collect();
    // A design that identifies nothing at these counts has no half-width to draw (its
    // report says why); an empty chart would only mislead.
    if series
        .iter()
        .all(|s| s.simulated.is_empty() && s.curve.is_empty())
    {
        return Ok(None);
    }
    let design = &inputs.plan.designs()[d];
    let x_max = nice_ceiling(
        rows.iter()
            .map(|s| f64::from(s.scenario.trials))
            .fold(0.0, f64::max)
            * 1.1,
    );
    let x_min = rows
        .iter()
        .map(|s| f64::from(s.scenario.trials))
        .fold(f64::INFINITY, f64::min)
        * 0.8;
    let y_max = nice_ceiling(
        series
            .iter()
            .flat_map(|s| {
                s.simulated
                    .iter()
                    .map(|p| p.1 + 1.96 * p.2)
                    .chain(s.curve.iter().filter(|p| p.0 >= x_min).map(|p| p.1))
            })
            .filter(|v| v.is_finite())
            .fold(0.0, f64::max),
    );
    let title = format!("Precision against trials: {}", design.name);
    let y_desc = format!(
        "half-width of the {:.0}% interval (SD units; A_z: probability)",
        100.0 * confidence
    );
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(56)
            .build_cartesian_2d(x_min..x_max, 0.0..y_max)?;
        chart::styled_mesh(&mut c)
            .x_desc("trials per condition")
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_desc(&y_desc)
            .draw()?;
        for (i, s) in series.iter().enumerate() {
            let col = colour(i);
            let curve: Vec<(f64, f64)> = s
                .curve
                .iter()
                .copied()
                .filter(|p| p.0 >= x_min && p.0 <= x_max && p.1 <= y_max)
                .collect();
            if !curve.is_empty() {
                c.draw_series(DashedLineSeries::new(curve, 6, 4, col.stroke_width(1)))?;
            }
            c.draw_series(s.simulated.iter().map(|p| {
                PathElement::new(
                    vec![(p.0, p.1 - 1.96 * p.2), (p.0, p.1 + 1.96 * p.2)],
                    col.stroke_width(1),
                )
            }))?;
            c.draw_series(
                s.simulated
                    .iter()
                    .map(|p| marker(marker_of(i), (p.0, p.1), col)),
            )?
            .label(format!("{}: simulated mean half-width", s.label))
            .legend(key(Some(marker_of(i)), col, false));
        }
        c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
            .label("expected information: z·SE")
            .legend(key(None, INK, true));
        chart::draw_legend(&mut c, SeriesLabelPosition::UpperRight)?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}
