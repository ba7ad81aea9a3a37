//! The house style of every chart, defined once: palette, line weights,
//! dash patterns, marker shapes, fonts, sizes and margins.
//!
//! Charts are drawn on a large canvas ([`WIDTH`] px wide) and scaled down to
//! the handbook's text width (about 160 mm), so one canvas pixel is about
//! 0.09 mm: a 34 px font prints at about 8.5 pt, a 5 px line at about 0.45 mm.
//!
//! The series palette is original to this project: six colours spread in
//! lightness (so that they stay apart in grayscale), each paired with its
//! own dash pattern and marker shape, so a series can be told apart by any
//! one of colour, dash or marker.

use plotters::style::RGBColor;

/// The one font family every chart names (shipped in `assets/fonts/`).
pub const FONT: &str = "DejaVu Sans";

/// Canvas width of every chart, px.
pub const WIDTH: u32 = 1800;
/// Canvas height of a family chart, mode shape or resistance chart, px.
pub const HEIGHT: u32 = 1150;

/// Body text (legends, notes), px as printed in the SVG.
pub const TEXT: f64 = 32.0;
/// Tick labels, px.
pub const TICK: f64 = 31.0;
/// Axis titles, px.
pub const AXIS: f64 = 34.0;
/// Chart title, px.
pub const TITLE: f64 = 38.0;
/// Small print (the caution), px.
pub const SMALL: f64 = 22.0;

/// Series line width, px.
pub const LINE: u32 = 5;
/// Thin series line (FE points joined when no fitted curve is given), px.
pub const LINE_THIN: u32 = 3;
/// Axis and frame lines, px.
pub const FRAME: u32 = 3;
/// Major grid lines, px.
pub const GRID: u32 = 2;
/// Marker radius, px.
pub const MARKER: i32 = 11;

/// Outer margin of every chart, px.
pub const MARGIN: i32 = 28;
/// Room for x tick labels and the x axis title, px.
pub const X_LABEL_AREA: u32 = 115;
/// Room for y tick labels and the y axis title, px.
pub const Y_LABEL_AREA: u32 = 150;
/// Width of the legend column right of the plot, px.
pub const LEGEND_WIDTH: u32 = 560;

/// Ink: text, axes, frontier lines.
pub const INK: RGBColor = RGBColor(0x1A, 0x1A, 0x1A);
/// Major grid lines.
pub const GRID_COLOUR: RGBColor = RGBColor(0xCC, 0xCC, 0xCC);
/// Minor grid lines.
pub const GRID_LIGHT: RGBColor = RGBColor(0xE6, 0xE6, 0xE6);
/// Member outline in schematics.
pub const MEMBER: RGBColor = RGBColor(0x2E, 0x2E, 0x2E);
/// Held components in schematics.
pub const HELD: RGBColor = RGBColor(0x23, 0x3D, 0x5C);
/// Loads in schematics.
pub const LOAD: RGBColor = RGBColor(0xA8, 0x3A, 0x1E);
/// Restraints at a height in schematics.
pub const BRACE: RGBColor = RGBColor(0x3E, 0x7A, 0x4F);
/// Faint marks (free components, validity bands).
pub const FAINT: RGBColor = RGBColor(0x9A, 0x9A, 0x9A);
/// Dashed guide lines (flange lines ζ = ±κ). Used for nothing else: the
/// SVG post-processing dashes every line of this colour.
pub const GUIDE: RGBColor = RGBColor(0x30, 0x30, 0x31);
/// Fill of regions the post-processing turns into the hatch pattern. Used
/// for nothing else.
pub const HATCH_SENTINEL: RGBColor = RGBColor(0x01, 0x02, 0x03);

/// Marker shapes of the series.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    /// Filled circle.
    Disc,
    /// Filled square.
    Square,
    /// Filled triangle, point up.
    TriangleUp,
    /// Filled diamond.
    Diamond,
    /// Filled triangle, point down.
    TriangleDown,
    /// Hollow circle.
    Ring,
    /// Hollow square.
    Box,
    /// Hollow diamond.
    Rhomb,
}

/// One series' look.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeriesStyle {
    /// Line and marker colour (unique to the series: the SVG
    /// post-processing finds the series' lines by it).
    pub colour: RGBColor,
    /// SVG `stroke-dasharray` ("" for a solid line), px.
    pub dash: &'static str,
    /// Marker shape.
    pub marker: Marker,
}

/// The series palette, in order of use. Neighbours differ in lightness
/// (CIE L*) so that they stay apart in grayscale, and every pair differs in
/// both dash pattern and marker.
pub const SERIES: [SeriesStyle; 8] = [
    SeriesStyle {
        colour: RGBColor(0x14, 0x24, 0x3B),
        dash: "",
        marker: Marker::Disc,
    },
    SeriesStyle {
        colour: RGBColor(0xE0, 0x8A, 0x4B),
        dash: "22 10",
        marker: Marker::Square,
    },
    SeriesStyle {
        colour: RGBColor(0x1F, 0x66, 0x5A),
        dash: "6 9",
        marker: Marker::TriangleUp,
    },
    SeriesStyle {
        colour: RGBColor(0xC9, 0xB6, 0x4A),
        dash: "30 8 6 8",
        marker: Marker::Diamond,
    },
    SeriesStyle {
        colour: RGBColor(0x8E, 0x4B, 0x88),
        dash: "14 7 3 7 3 7",
        marker: Marker::TriangleDown,
    },
    SeriesStyle {
        colour: RGBColor(0x5E, 0x96, 0xB8),
        dash: "40 12",
        marker: Marker::Ring,
    },
    SeriesStyle {
        colour: RGBColor(0x7A, 0x2E, 0x2E),
        dash: "3 6",
        marker: Marker::Box,
    },
    SeriesStyle {
        colour: RGBColor(0x8C, 0x9A, 0x5B),
        dash: "24 6 24 14",
        marker: Marker::Rhomb,
    },
];

/// The style of series `i` (the palette repeats after eight series: split
/// such a chart).
pub fn series(i: usize) -> SeriesStyle {
    SERIES[i % SERIES.len()]
}

/// Dash pattern of the guide lines.
pub const GUIDE_DASH: &str = "18 12";

/// Hatch of unconservative regions: line spacing and width, px.
pub const HATCH_SPACING: u32 = 16;
/// Hatch line width, px.
pub const HATCH_WIDTH: f64 = 3.0;

/// Approximate advance width of `text` set in [`FONT`] at `size` px, for
/// layout (legend columns, label boxes): 0.6 em per character, markup of
/// subscripts (`_{..}`) not counted and the subscript itself at 75 %.
pub fn text_width(text: &str, size: f64) -> f64 {
    let mut w = 0.0;
    let mut sub = false;
    let mut chars = text.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '_' | '^' if chars.peek() == Some(&'{') => {
                chars.next();
                sub = true;
            }
            '}' if sub => sub = false,
            _ => w += if sub { 0.45 } else { 0.6 },
        }
    }
    w * size
}

/// CIE L* (0–100) of a colour, the lightness a grayscale print shows.
pub fn lightness(c: RGBColor) -> f64 {
    let lin = |u: u8| {
        let s = u as f64 / 255.0;
        if s <= 0.04045 {
            s / 12.92
        } else {
            ((s + 0.055) / 1.055).powf(2.4)
        }
    };
    let y = 0.2126 * lin(c.0) + 0.7152 * lin(c.1) + 0.0722 * lin(c.2);
    if y > 216.0 / 24389.0 {
        116.0 * y.cbrt() - 16.0
    } else {
        y * 24389.0 / 27.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Formula of CIE L* from CIE 15:2004 "Colorimetry", 3rd ed., §8.2.1
    // (with the sRGB transfer of IEC 61966-2-1): white is 100, black 0.
    #[test]
    fn lightness_of_black_and_white() {
        assert!((lightness(RGBColor(255, 255, 255)) - 100.0).abs() < 1e-9);
        assert!(lightness(RGBColor(0, 0, 0)).abs() < 1e-9);
    }

    // Common practice, no source: neighbouring series should differ by at
    // least ~8 L* units in grayscale, and every pair by dash and marker.
    #[test]
    fn palette_separates_in_grayscale() {
        for i in 1..SERIES.len() {
            let d = (lightness(SERIES[i].colour) - lightness(SERIES[i - 1].colour)).abs();
            assert!(d >= 8.0, "series {i} and {} differ by L* {d:.1}", i - 1);
        }
        for i in 0..SERIES.len() {
            for j in 0..i {
                assert_ne!(SERIES[i].dash, SERIES[j].dash);
                assert_ne!(SERIES[i].marker, SERIES[j].marker);
                assert_ne!(SERIES[i].colour, SERIES[j].colour);
            }
        }
    }
}
