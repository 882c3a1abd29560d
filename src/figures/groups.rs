//! Groups: the power of one group test over animals × trials per animal as a heat map
//! (each cell printed with its value, so the figure reads without colour), and the effort
//! frontier: cost against the weakest test's power for the allocations the effort split
//! simulated, with the budget line, the target and the chosen allocations.

use super::chart::{self, key, marker};
use super::palette::{INK, colour, light_text_on, marker as marker_of, sequential};
use super::{FigureError, Svg};
use crate::groups::DesignGroups;
use crate::groups::effort::Allocation;
use plotters::coord::ranged1d::{IntoSegmentedCoord, SegmentValue};
use plotters::prelude::*;

/// Heat map of test `t`'s two-stage power for one design.
pub fn heat_map(design: &DesignGroups, t: usize, name: &str) -> Result<Option<Svg>, FigureError> {
    let Some(test) = design.tests.get(t) else {
        return Ok(None);
    };
    if design.cells.is_empty() {
        return Ok(None);
    }
    let columns: Vec<u32> = design.trials.clone();
    let rows: Vec<u32> = design.animals.clone();
    let per_animal: Vec<String> = columns
        .iter()
        .map(|&n| {
            design
                .cells
                .iter()
                .find(|c| c.trials == n)
                .map_or_else(|| n.to_string(), |c| c.trials_per_animal.to_string())
        })
        .collect();
    let target = test.target;
    let title = format!("Group power for \"{}\": {}", test.name, design.design);
    let (nx, ny) = (columns.len() as i32, rows.len() as i32);
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .margin_bottom(28)
            .x_label_area_size(44)
            .y_label_area_size(56)
            // A segmented range of 0..n − 1 has n segments, one per column (row).
            .build_cartesian_2d((0..nx - 1).into_segmented(), (0..ny - 1).into_segmented())?;
        let centre = |v: &SegmentValue<i32>| match v {
            SegmentValue::CenterOf(i) => usize::try_from(*i).ok(),
            _ => None,
        };
        let column_label = |v: &SegmentValue<i32>| {
            centre(v)
                .and_then(|i| per_animal.get(i).cloned())
                .unwrap_or_default()
        };
        let row_label = |v: &SegmentValue<i32>| {
            centre(v)
                .and_then(|i| rows.get(i))
                .map_or_else(String::new, u32::to_string)
        };
        c.configure_mesh()
            .disable_mesh()
            .x_desc("trials per animal (all conditions)")
            .y_desc("animals")
            .x_label_formatter(&column_label)
            .y_label_formatter(&row_label)
            .label_style(chart::font(12))
            .axis_desc_style(chart::font(13))
            .draw()?;
        for (i, &n) in columns.iter().enumerate() {
            for (j, &m) in rows.iter().enumerate() {
                let Some(cell) = design.cell(m, n) else {
                    continue;
                };
                let Some(p) = cell.summary.tests.get(t).map(|s| s.two_stage) else {
                    continue;
                };
                let (x, y) = (i as i32, j as i32);
                let corner = |a: i32, b: i32| (SegmentValue::Exact(a), SegmentValue::Exact(b));
                c.draw_series(std::iter::once(Rectangle::new(
                    [corner(x, y), corner(x + 1, y + 1)],
                    sequential(p.value).filled(),
                )))?;
                if target.is_some_and(|t| p.value >= t) {
                    c.draw_series(std::iter::once(Rectangle::new(
                        [corner(x, y), corner(x + 1, y + 1)],
                        INK.stroke_width(3),
                    )))?;
                }
                let ink = if light_text_on(p.value) { WHITE } else { BLACK };
                let style =
                    chart::font(12)
                        .color(&ink)
                        .pos(plotters::style::text_anchor::Pos::new(
                            plotters::style::text_anchor::HPos::Center,
                            plotters::style::text_anchor::VPos::Center,
                        ));
                c.draw_series(std::iter::once(Text::new(
                    format!("{:.2} ({:.2}–{:.2})", p.value, p.low, p.high),
                    (SegmentValue::CenterOf(x), SegmentValue::CenterOf(y)),
                    style,
                )))?;
            }
        }
        let note = match target {
            Some(t) => format!(
                "cell: simulated two-stage power (95% Wilson interval); outlined: meets the target {t}"
            ),
            None => "cell: simulated two-stage power (95% Wilson interval)".to_string(),
        };
        root.draw(&Text::new(
            note,
            (70, chart::SIZE.1 as i32 - 16),
            chart::font(11),
        ))?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}

/// `(cost, power, low, high)`.
type Point = (f64, f64, f64, f64);

/// `(cost, power, low, high)` of an allocation's weakest test.
fn point(a: &Allocation) -> Option<Point> {
    let p = a.weakest()?;
    Some((a.cost, p.value, p.low, p.high))
}

/// The effort frontier of one design, or `None` without an effort split.
pub fn frontier(design: &DesignGroups, name: &str) -> Result<Option<Svg>, FigureError> {
    let Some(e) = &design.effort else {
        return Ok(None);
    };
    let lines: [(&str, &[Allocation], Option<usize>); 2] = [
        (
            "most animals the budget buys",
            &e.budget_frontier,
            e.best_for_budget,
        ),
        (
            "fewest animals that meet the targets",
            &e.target_frontier,
            e.least_cost,
        ),
    ];
    if lines.iter().all(|l| l.1.is_empty()) {
        return Ok(None);
    }
    let all: Vec<Point> = lines
        .iter()
        .flat_map(|l| l.1.iter().filter_map(point))
        .collect();
    // Zoomed to the simulated allocations and the budget: they differ little in cost.
    let costs = all.iter().map(|p| p.0).chain(e.budget.total);
    let (lo, hi) = costs.fold((f64::INFINITY, 0.0f64), |(a, b), x| (a.min(x), b.max(x)));
    let pad = 0.1 * (hi - lo).max(0.05 * hi.max(1.0));
    let (x_min, x_max) = ((lo - pad).max(0.0), hi + pad);
    let y_min = all.iter().map(|p| p.2).fold(1.0, f64::min);
    let y_min = ((y_min - 0.1).max(0.0) * 10.0).floor() / 10.0;
    let target = e
        .goals
        .iter()
        .filter_map(|g| g.target)
        .fold(f64::NAN, f64::max);
    let title = format!("Effort frontier: {}", design.design);
    let text = chart::render(name, |root| {
        let mut c = ChartBuilder::on(root)
            .caption(&title, chart::font(18))
            .margin(12)
            .x_label_area_size(44)
            .y_label_area_size(56)
            .build_cartesian_2d(x_min..x_max, y_min..1.0)?;
        chart::styled_mesh(&mut c)
            .x_desc("cost (the plan's budget units)")
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_desc("power of the weakest group test")
            .draw()?;
        if let Some(total) = e.budget.total {
            c.draw_series(DashedLineSeries::new(
                vec![(total, y_min), (total, 1.0)],
                8,
                4,
                INK.stroke_width(1),
            ))?
            .label(format!("budget {total}"))
            .legend(key(None, INK, true));
        }
        if target.is_finite() {
            c.draw_series(LineSeries::new(
                vec![(x_min, target), (x_max, target)],
                INK.stroke_width(1),
            ))?
            .label(format!("target power {target}"))
            .legend(key(None, INK, false));
        }
        for (i, (label, rows, chosen)) in lines.iter().enumerate() {
            if rows.is_empty() {
                continue;
            }
            let col = colour(i);
            let mut pts: Vec<(&Allocation, Point)> =
                rows.iter().filter_map(|a| Some((a, point(a)?))).collect();
            pts.sort_by(|a, b| a.1.0.total_cmp(&b.1.0));
            c.draw_series(LineSeries::new(
                pts.iter().map(|(_, p)| (p.0, p.1)),
                col.stroke_width(1),
            ))?;
            c.draw_series(pts.iter().map(|(_, p)| {
                PathElement::new(vec![(p.0, p.2), (p.0, p.3)], col.stroke_width(1))
            }))?;
            c.draw_series(pts.iter().map(|(a, p)| {
                EmptyElement::at((p.0, p.1))
                    + Text::new(
                        format!("{}×{}", a.animals, a.trials_per_animal),
                        (6, -14),
                        chart::font(10),
                    )
            }))?;
            c.draw_series(
                pts.iter()
                    .map(|(_, p)| marker(marker_of(i), (p.0, p.1), col)),
            )?
            .label(format!("{label} (animals × trials each)"))
            .legend(key(Some(marker_of(i)), col, false));
            if let Some(a) = chosen.and_then(|k| rows.get(k)).and_then(point) {
                c.draw_series(std::iter::once(
                    EmptyElement::at((a.0, a.1)) + Circle::new((0, 0), 8, col.stroke_width(2)),
                ))?;
            }
        }
        c.draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())?
            .label("chosen allocation (95% Wilson bars on every point)")
            .legend(|(x, y)| Circle::new((x + 10, y), 6, INK.stroke_width(2)));
        chart::draw_legend(&mut c, SeriesLabelPosition::LowerRight)?;
        Ok(())
    })?;
    Ok(Some(Svg {
        name: name.to_string(),
        title,
        text,
    }))
}
