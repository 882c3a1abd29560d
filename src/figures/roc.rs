//! ROC and zROC of the hypothesised observer (lapses left out, so the curve is the
//! evidence model's own), with each design's operating points: one per condition for a
//! yes/no record, every criterion of the scale for a rating design. Rates come from
//! `Observer::rates`, the one formula the rest of the program uses.

use super::chart::{self, key, marker};
use super::inputs::Inputs;
use super::palette::{INK, SHADE, colour, marker as marker_of};
use super::{FigureError, Svg};
use crate::design::Response;
use crate::model::Observer;
use crate::model::normal::z;
use plotters::prelude::*;

/// `(F, H)` of `o` with criterion `c` and no lapses.
fn rates_at(o: &Observer, c: f64) -> (f64, f64) {
    let r = Observer {
        criterion: c,
        lapse: None,
        ..*o
    }
    .rates();
    (r.false_alarm, r.hit)
}

/// One design's operating points: `(F, H)` per condition and criterion.
fn operating_points(inputs: &Inputs, d: usize) -> Vec<(f64, f64)> {
    let design = &inputs.plan.designs()[d];
    let base = inputs.plan.observer();
    design
        .conditions
        .iter()
        .flat_map(|cond| {
            let o = cond.observer(base);
            let criteria: Vec<f64> = match &design.response {
                Response::YesNo => vec![cond.criterion],
                // The whole scale moves with the condition's criterion (as in the model).
                Response::Rating(s) => {
                    let shift = cond.criterion - s.criteria[s.boundary - 1];
                    s.criteria.iter().map(|c| c + shift).collect()
                }
            };
            criteria
                .into_iter()
                .map(move |c| rates_at(&o, c))
                .collect::<Vec<_>>()
        })
        .collect()
}

/// The ROC (`z_scale` false) or zROC (`true`) figure.
pub fn render(inputs: &Inputs, z_scale: bool, name: &str) -> Result<Option<Svg>, FigureError> {
    let o = inputs.plan.observer();
    let to_axes = |(f, h): (f64, f64)| -> Option<(f64, f64)> {
        if z_scale {
            Some((z(f)?, z(h)?))
        } else {
            Some((f, h))
        }
    };
    let curve: Vec<(f64, f64)> = (0..=200)
        .map(|k| -4.0 + 8.0 * f64::from(k) / 200.0)
        .filter_map(|c| to_axes(rates_at(o, c)))
        .collect();
    let points: Vec<Vec<(f64, f64)>> = (0..inputs.plan.designs().len())
        .map(|d| {
            operating_points(inputs, d)
                .into_iter()
                .filter_map(to_axes)
                .collect()
        })
        .collect();
    let (lo, hi) = if z_scale { (-3.0, 3.0) } else { (0.0, 1.0) };
    let title = if z_scale {
        format!(
            "zROC of the hypothesised observer (slope 1/σ = {:.2})",
            1.0 / o.sigma
        )
    } else {
        format!(
            "ROC of the hypothesised observer (d′ = {:.2}, σ = {:.2})",
            o.d_prime, o.sigma
        )
    };
    let (x_desc, y_desc) = if z_scale {
        ("z(false-alarm rate)", "z(hit rate)")
    } else {
        ("false-alarm rate F", "hit rate H")
    };
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(56)
            .build_cartesian_2d(lo..hi, lo..hi)?;
        chart::styled_mesh(&mut c)
            .x_desc(x_desc)
            .y_desc(y_desc)
            .draw()?;
        c.draw_series(DashedLineSeries::new(
            vec![(lo, lo), (hi, hi)],
            2,
            4,
            SHADE.stroke_width(1),
        ))?
        .label("chance (d′ = 0)")
        .legend(key(None, SHADE, true));
        let inside: Vec<(f64, f64)> = curve
            .iter()
            .copied()
            .filter(|p| (lo..=hi).contains(&p.0) && (lo..=hi).contains(&p.1))
            .collect();
        c.draw_series(LineSeries::new(inside, INK.stroke_width(2)))?
            .label("hypothesised observer")
            .legend(key(None, INK, false));
        for (d, pts) in points.iter().enumerate() {
            if pts.is_empty() {
                continue;
            }
            let col = colour(d);
            c.draw_series(pts.iter().map(|&p| marker(marker_of(d), p, col)))?
                .label(format!(
                    "{}: operating points",
                    inputs.plan.designs()[d].name
                ))
                .legend(key(Some(marker_of(d)), col, false));
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
