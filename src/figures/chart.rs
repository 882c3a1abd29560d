//! What every figure shares: the canvas, the fonts, markers, keys for the legend, and the
//! translation of plotters' errors. Text is SVG `<text>` with the generic `sans-serif`
//! family, so the viewer's own font draws it and no font file is needed (plotters' layout
//! uses its built-in width estimate, which is enough for axis labels).

use super::FigureError;
use super::palette::{INK, Marker, SHADE};
use plotters::chart::MeshStyle;
use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::element::{Drawable, PointCollection};
use plotters::prelude::*;
use plotters_backend::{BackendCoord, DrawingErrorKind};

/// The drawing area of a figure.
pub type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// Width and height of every figure, in SVG user units (pixels at 100%).
pub const SIZE: (u32, u32) = (720, 440);

/// The font family of every text element.
pub const FAMILY: &str = "sans-serif";

/// Text style of `size` pixels.
pub fn font(size: u32) -> TextStyle<'static> {
    (FAMILY, size).into_font().color(&INK)
}

/// Draws a figure with `draw` onto a fresh white canvas and returns its SVG text.
pub fn render(
    name: &str,
    draw: impl for<'a, 'b> FnOnce(&'a Area<'b>) -> Result<(), Box<dyn std::error::Error + 'b>>,
) -> Result<String, FigureError> {
    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, SIZE).into_drawing_area();
        let fail = |e: &dyn std::fmt::Display| FigureError {
            name: name.to_string(),
            message: e.to_string(),
        };
        root.fill(&WHITE).map_err(|e| fail(&e))?;
        draw(&root).map_err(|e| fail(&e))?;
        root.present().map_err(|e| fail(&e))?;
    }
    Ok(text)
}

/// A data marker of one shape at a point: one concrete element for every shape, so a
/// series can mix them and legends can show them (plotters' boxed elements cannot be nested
/// in legends).
#[derive(Debug, Clone)]
pub struct Mark<C> {
    at: C,
    shape: Marker,
    colour: RGBColor,
}

/// A data marker of shape `m` at `at`.
pub fn marker<C>(m: Marker, at: C, colour: RGBColor) -> Mark<C> {
    Mark {
        at,
        shape: m,
        colour,
    }
}

impl<'a, C> PointCollection<'a, C> for &'a Mark<C> {
    type Point = &'a C;
    type IntoIter = std::iter::Once<&'a C>;
    fn point_iter(self) -> Self::IntoIter {
        std::iter::once(&self.at)
    }
}

impl<C, DB: DrawingBackend> Drawable<DB> for Mark<C> {
    fn draw<I: Iterator<Item = BackendCoord>>(
        &self,
        mut pos: I,
        backend: &mut DB,
        _: (u32, u32),
    ) -> Result<(), DrawingErrorKind<DB::ErrorType>> {
        let Some((x, y)) = pos.next() else {
            return Ok(());
        };
        draw_mark(backend, self.shape, (x, y), self.colour)
    }
}

fn draw_mark<DB: DrawingBackend>(
    backend: &mut DB,
    shape: Marker,
    (x, y): BackendCoord,
    colour: RGBColor,
) -> Result<(), DrawingErrorKind<DB::ErrorType>> {
    let fill = ShapeStyle::from(&colour).filled();
    match shape {
        Marker::Circle => backend.draw_circle((x, y), 4, &fill, true),
        Marker::Triangle => {
            backend.fill_polygon(vec![(x, y - 5), (x - 5, y + 4), (x + 5, y + 4)], &fill)
        }
        Marker::Square => backend.draw_rect((x - 4, y - 4), (x + 4, y + 4), &fill, true),
        Marker::Cross => {
            let line = colour.stroke_width(2);
            backend.draw_line((x - 4, y - 4), (x + 4, y + 4), &line)?;
            backend.draw_line((x - 4, y + 4), (x + 4, y - 4), &line)
        }
    }
}

/// A legend key: a short solid or dashed line, with the series' marker on it if any.
#[derive(Debug, Clone)]
pub struct Key {
    at: BackendCoord,
    shape: Option<Marker>,
    colour: RGBColor,
    dashed: bool,
}

impl<'a> PointCollection<'a, BackendCoord> for &'a Key {
    type Point = &'a BackendCoord;
    type IntoIter = std::iter::Once<&'a BackendCoord>;
    fn point_iter(self) -> Self::IntoIter {
        std::iter::once(&self.at)
    }
}

impl<DB: DrawingBackend> Drawable<DB> for Key {
    fn draw<I: Iterator<Item = BackendCoord>>(
        &self,
        mut pos: I,
        backend: &mut DB,
        _: (u32, u32),
    ) -> Result<(), DrawingErrorKind<DB::ErrorType>> {
        let Some((x, y)) = pos.next() else {
            return Ok(());
        };
        let style = self.colour.stroke_width(2);
        if self.dashed {
            for a in [0, 8, 16] {
                backend.draw_line((x + a, y), (x + a + 4, y), &style)?;
            }
        } else {
            backend.draw_line((x, y), (x + 20, y), &style)?;
        }
        match self.shape {
            Some(m) => draw_mark(backend, m, (x + 10, y), self.colour),
            None => Ok(()),
        }
    }
}

/// The legend drawing of a series: a line (dashed or solid) with its marker.
pub fn key(m: Option<Marker>, colour: RGBColor, dashed: bool) -> impl Fn(BackendCoord) -> Key {
    move |at| Key {
        at,
        shape: m,
        colour,
        dashed,
    }
}

/// A filled box key for shaded regions and bands.
pub fn band_key(colour: RGBColor) -> impl Fn(BackendCoord) -> Rectangle<BackendCoord> {
    move |(x, y)| Rectangle::new([(x, y - 5), (x + 20, y + 5)], colour.mix(0.3).filled())
}

/// The legend box every figure draws: white, framed, in the given corner.
pub fn legend_style() -> (ShapeStyle, ShapeStyle) {
    (WHITE.mix(0.9).filled(), INK.stroke_width(1))
}

/// Draws the series legend at `position` in the one style every figure uses.
pub fn draw_legend<'a, DB: DrawingBackend + 'a, CT: CoordTranslate>(
    c: &mut ChartContext<'a, DB, CT>,
    position: SeriesLabelPosition,
) -> Result<(), DrawingAreaErrorKind<DB::ErrorType>> {
    let (bg, border) = legend_style();
    c.configure_series_labels()
        .position(position)
        .background_style(bg)
        .border_style(border)
        .label_font(font(12))
        .draw()
}

/// Rounded-up axis end with a margin: the smallest round multiple of 10^k at or above
/// `x × 1.05` (so the largest point is not on the frame).
pub fn nice_ceiling(x: f64) -> f64 {
    if !(x.is_finite() && x > 0.0) {
        return 1.0;
    }
    let x = x * 1.05;
    let p = 10f64.powf(x.log10().floor());
    [1.0, 1.2, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0]
        .iter()
        .map(|m| m * p)
        .find(|&v| v >= x)
        .unwrap_or(10.0 * p)
}

/// The axis grid every linear figure uses: no minor lines, faint major lines, the figure
/// fonts; the caller adds its axis descriptions and formatters, then draws.
pub fn styled_mesh<'a, 'b, DB: DrawingBackend>(
    c: &'b mut ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
) -> MeshStyle<'a, 'b, RangedCoordf64, RangedCoordf64, DB> {
    let mut mesh = c.configure_mesh();
    mesh.light_line_style(TRANSPARENT)
        .bold_line_style(SHADE.mix(0.4))
        .label_style(font(12))
        .axis_desc_style(font(13));
    mesh
}
