//! Power against trials per condition for one hypothesis: per design the simulated power of
//! the likelihood-ratio test at the listed counts with its 95% Wilson band, the
//! expected-information (Wald, normal approximation) curve beside it, the target line and
//! the count the search chose, with its own interval.

use super::chart::{self, key, marker, nice_ceiling};
use super::inputs::Inputs;
use super::palette::{INK, SHADE, colour, marker as marker_of};
use super::{FigureError, Svg};
use crate::search::{SearchOutcome, Target};
use plotters::prelude::*;

/// One design's series.
struct Series {
    design: String,
    /// `(trials, power, low, high)` at the listed counts.
    simulated: Vec<(f64, f64, f64, f64)>,
    curve: Vec<(f64, f64)>,
    /// `(trials, power, low, high)` at the search's answer.
    chosen: Option<(f64, f64, f64, f64)>,
}

fn series(inputs: &Inputs, hypothesis: &str) -> Vec<Series> {
    let mut out = Vec::new();
    for (d, design) in inputs.plan.designs().iter().enumerate() {
        let simulated: Vec<_> = inputs
            .rows(d)
            .iter()
            .filter_map(|s| {
                let t = s.tests.iter().find(|t| t.hypothesis == hypothesis)?;
                let p = t.likelihood_ratio;
                Some((f64::from(s.scenario.trials), p.value, p.low, p.high))
            })
            .collect();
        if simulated.is_empty() {
            continue;
        }
        let curve = inputs.power_curves[d]
            .iter()
            .find(|c| c.hypothesis == hypothesis)
            .map(|c| c.points.iter().map(|&(n, p)| (f64::from(n), p)).collect())
            .unwrap_or_default();
        let chosen = inputs.searches.get(d).and_then(|r| match &r.outcome {
            SearchOutcome::Found { trials, values, .. } => values
                .iter()
                .find(
                    |v| matches!(&v.target, Target::Power { hypothesis: h, .. } if h == hypothesis),
                )
                .map(|v| (f64::from(*trials), v.value, v.low, v.high)),
            _ => None,
        });
        out.push(Series {
            design: design.name.clone(),
            simulated,
            curve,
            chosen,
        });
    }
    out
}

/// The power figure of `hypothesis`, or `None` when no design tests it.
pub fn render(inputs: &Inputs, hypothesis: &str, name: &str) -> Result<Option<Svg>, FigureError> {
    let all = series(inputs, hypothesis);
    if all.is_empty() {
        return Ok(None);
    }
    let plan = inputs.plan;
    let target = plan
        .hypotheses()
        .iter()
        .find(|h| h.name == hypothesis)
        .and_then(|h| h.power.or(plan.targets().power));
    let alpha = plan.study().alpha;
    let largest = all
        .iter()
        .flat_map(|s| s.simulated.iter().map(|p| p.0).chain(s.chosen.map(|c| c.0)))
        .fold(0.0, f64::max);
    let x_max = nice_ceiling(largest * 1.1);
    // With [animals] these are one idealised animal's tests; the group's are in `groups`.
    let title = if plan.animals().is_some() {
        format!("Power for \"{hypothesis}\" in one animal against trials")
    } else {
        format!("Power for \"{hypothesis}\" against trials")
    };
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(56)
            .build_cartesian_2d(0.0..x_max, 0.0..1.0)?;
        chart::styled_mesh(&mut c)
            .x_desc("trials per condition")
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_desc("power (share of experiments rejecting H₀)")
            .draw()?;
        // α, for reference: where a true null's rejection rate belongs.
        c.draw_series(DashedLineSeries::new(
            vec![(0.0, alpha), (x_max, alpha)],
            2,
            4,
            SHADE.stroke_width(1),
        ))?
        .label(format!("α = {alpha}"))
        .legend(key(None, SHADE, true));
        if let Some(t) = target {
            c.draw_series(LineSeries::new(
                vec![(0.0, t), (x_max, t)],
                INK.stroke_width(1),
            ))?
            .label(format!("target power {t}"))
            .legend(key(None, INK, false));
        }
        for (i, s) in all.iter().enumerate() {
            let col = colour(i);
            if s.simulated.len() > 1 {
                let mut band: Vec<(f64, f64)> = s.simulated.iter().map(|p| (p.0, p.2)).collect();
                band.extend(s.simulated.iter().rev().map(|p| (p.0, p.3)));
                c.draw_series(std::iter::once(Polygon::new(band, col.mix(0.15).filled())))?;
            }
            c.draw_series(LineSeries::new(
                s.simulated.iter().map(|p| (p.0, p.1)),
                col.stroke_width(2),
            ))?
            .label(format!("{}: simulated, 95% Wilson band", s.design))
            .legend(key(Some(marker_of(i)), col, false));
            c.draw_series(
                s.simulated
                    .iter()
                    .map(|p| PathElement::new(vec![(p.0, p.2), (p.0, p.3)], col.stroke_width(1))),
            )?;
            c.draw_series(
                s.simulated
                    .iter()
                    .map(|p| marker(marker_of(i), (p.0, p.1), col)),
            )?;
            let curve: Vec<(f64, f64)> = s.curve.iter().copied().filter(|p| p.0 <= x_max).collect();
            if !curve.is_empty() {
                c.draw_series(DashedLineSeries::new(curve, 6, 4, col.stroke_width(1)))?;
            }
            if let Some((n, p, lo, hi)) = s.chosen {
                c.draw_series(std::iter::once(PathElement::new(
                    vec![(n, 0.0), (n, lo)],
                    col.mix(0.6).stroke_width(1),
                )))?;
                c.draw_series(std::iter::once(PathElement::new(
                    vec![(n, lo), (n, hi)],
                    col.stroke_width(2),
                )))?;
                c.draw_series(std::iter::once(
                    EmptyElement::at((n, p))
                        + Circle::new((0, 0), 7, col.stroke_width(2))
                        + Text::new(format!("{n}"), (6, -20), chart::font(12)),
                ))?;
            }
        }
        // Keys for the line styles every design shares.
        c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
            .label("expected information (Wald, normal approx.)")
            .legend(key(None, INK, true));
        if all.iter().any(|s| s.chosen.is_some()) {
            c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
                .label("count the search chose, with its interval")
                .legend(|(x, y)| Circle::new((x + 10, y), 6, INK.stroke_width(2)));
        }
        chart::draw_legend(&mut c, SeriesLabelPosition::LowerRight)?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}
