//! Every figure of every bundled plan is a valid SVG of the stated size that renders to a
//! non-blank image with data on it: parsed by usvg and rasterised by resvg (an SVG
//! renderer independent of plotters, which wrote them). Text is not rasterised here (resvg
//! is built without fonts), so the checks count the drawn lines, areas and markers.

mod common;

use resvg::{tiny_skia, usvg};
use vigil::analytic::scan::{ScanOptions, scan_plan};
use vigil::commands::run::results;
use vigil::evaluate::RunOptions;
use vigil::figures::{self, Inputs, Svg, chart, palette};
use vigil::plan::Plan;

/// Every figure of a bundled plan, with few experiments (the drawing, not the numbers, is
/// under test).
fn figures_of(name: &str) -> Vec<Svg> {
    let path = common::plans_dir().join(format!("{name}.toml"));
    let plan = Plan::load(&path).unwrap().with_experiments(120).unwrap();
    let r = results(&plan, RunOptions::default(), &|_| {}).unwrap();
    let scans = scan_plan(&plan, ScanOptions::default()).unwrap();
    let inputs = Inputs::new(&plan, &r.summaries, &r.searches, r.groups.as_ref(), &scans);
    figures::all(&inputs).unwrap()
}

/// Rasterises an SVG at its own size; panics if it does not parse.
fn render(f: &Svg) -> tiny_skia::Pixmap {
    let tree = usvg::Tree::from_str(&f.text, &usvg::Options::default())
        .unwrap_or_else(|e| panic!("{} does not parse: {e}", f.name));
    let size = tree.size();
    assert_eq!(
        (size.width() as u32, size.height() as u32),
        chart::SIZE,
        "{} has the wrong size",
        f.name
    );
    let mut pixmap = tiny_skia::Pixmap::new(chart::SIZE.0, chart::SIZE.1).unwrap();
    resvg::render(&tree, tiny_skia::Transform::default(), &mut pixmap.as_mut());
    pixmap
}

/// Share of pixels that are not white.
fn inked(p: &tiny_skia::Pixmap) -> f64 {
    let n = p
        .pixels()
        .iter()
        .filter(|c| (c.red(), c.green(), c.blue()) != (255, 255, 255))
        .count();
    n as f64 / p.pixels().len() as f64
}

/// Pixels within a small distance of a series colour (drawn data, not axes).
fn series_pixels(p: &tiny_skia::Pixmap) -> usize {
    let near = |c: &tiny_skia::PremultipliedColorU8, s: &plotters::style::RGBColor| {
        let d = |a: u8, b: u8| (i32::from(a) - i32::from(b)).abs();
        d(c.red(), s.0) + d(c.green(), s.1) + d(c.blue(), s.2) < 30
    };
    p.pixels()
        .iter()
        .filter(|c| c.alpha() == 255 && palette::SERIES[..6].iter().any(|s| near(c, s)))
        .count()
}

fn check_plan(name: &str, expected: &[&str]) {
    let figs = figures_of(name);
    for stem in expected {
        assert!(
            figs.iter().any(|f| f.name.contains(stem)),
            "{name}: no {stem} figure among {:?}",
            figs.iter().map(|f| &f.name).collect::<Vec<_>>()
        );
    }
    for f in &figs {
        let p = render(f);
        // Axes and frame alone ink about 0.5% of the canvas; data and legend add more.
        let share = inked(&p);
        assert!(share > 0.02, "{}: only {share:.4} of pixels inked", f.name);
        // Heat maps use the sequential scale, every other figure the series palette.
        if !f.name.contains("groups-power") {
            // One marker and its legend key already give about 90.
            let n = series_pixels(&p);
            assert!(n > 60, "{}: only {n} pixels in series colours", f.name);
        }
        assert!(f.text.contains("font-family=\"sans-serif\""), "{}", f.name);
    }
}

#[test]
fn single_animal_plan_figures_render() {
    check_plan(
        "base-rate-shift",
        &[
            "power-criterion-shift",
            "precision-yes-no",
            "tradeoff-ellipses",
            "tradeoff-correlation",
            "roc",
            "zroc",
            "explore-se",
            "explore-condition",
        ],
    );
}

#[test]
fn group_plan_figures_render() {
    check_plan(
        "predator-model-colony",
        &[
            "groups-power-flee-or-stay-jumpy",
            "effort-frontier-flee-or-stay",
        ],
    );
}

#[test]
fn rating_and_coarse_record_plans_render() {
    check_plan("graded-alarm-response", &["precision", "roc"]);
    check_plan("sentinel-error-records", &["precision", "explore-se"]);
}

#[test]
fn figures_are_the_same_bytes_on_every_run() {
    let a = figures_of("playback-yes-no");
    let b = figures_of("playback-yes-no");
    assert!(!a.is_empty());
    assert_eq!(a, b);
}
