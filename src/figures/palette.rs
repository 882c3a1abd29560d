//! Colours, dashes and markers that stay apart in colour, for colour-blind readers and in
//! greyscale print: the Okabe–Ito palette (Okabe & Ito 2008, "Color universal design"), each
//! series also with its own marker shape, so no series is told apart by hue alone.

use plotters::style::RGBColor;

/// Okabe–Ito colours in the order series take them (blue, vermillion, bluish green,
/// reddish purple, orange, sky blue, black): neighbours differ in lightness as well as hue.
pub const SERIES: [RGBColor; 7] = [
    RGBColor(0x00, 0x72, 0xB2),
    RGBColor(0xD5, 0x5E, 0x00),
    RGBColor(0x00, 0x9E, 0x73),
    RGBColor(0xCC, 0x79, 0xA7),
    RGBColor(0xE6, 0x9F, 0x00),
    RGBColor(0x56, 0xB4, 0xE9),
    RGBColor(0x00, 0x00, 0x00),
];

/// Ink for axes, reference lines and keys.
pub const INK: RGBColor = RGBColor(0x22, 0x22, 0x22);
/// Light grey for shaded regions and reference lines behind the data.
pub const SHADE: RGBColor = RGBColor(0xBB, 0xBB, 0xBB);

/// Colour of series `i`.
pub fn colour(i: usize) -> RGBColor {
    SERIES[i % SERIES.len()]
}

/// Marker shape of series `i`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    Circle,
    Triangle,
    Square,
    Cross,
}

/// Marker of series `i` (cycles independently of the colour count, so pairs stay unique).
pub fn marker(i: usize) -> Marker {
    [
        Marker::Circle,
        Marker::Triangle,
        Marker::Square,
        Marker::Cross,
    ][i % 4]
}

/// A sequential scale for heat maps: viridis anchors (perceptually uniform, monotone in
/// lightness, so it prints as a grey ramp), linearly interpolated; `t` in [0, 1].
pub fn sequential(t: f64) -> RGBColor {
    const ANCHORS: [(u8, u8, u8); 5] = [
        (0x44, 0x01, 0x54),
        (0x3B, 0x52, 0x8B),
        (0x21, 0x90, 0x8C),
        (0x5D, 0xC8, 0x63),
        (0xFD, 0xE7, 0x25),
    ];
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    let x = t * (ANCHORS.len() - 1) as f64;
    let i = (x.floor() as usize).min(ANCHORS.len() - 2);
    let f = x - i as f64;
    let mix = |a: u8, b: u8| (f64::from(a) + f * (f64::from(b) - f64::from(a))).round() as u8;
    let (a, b) = (ANCHORS[i], ANCHORS[i + 1]);
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

/// Whether text on a heat-map cell of shade `t` should be white (dark cells) or black.
pub fn light_text_on(t: f64) -> bool {
    t < 0.55
}
