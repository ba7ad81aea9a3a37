//! Charts: data in, SVG text out (no file I/O), in one house style
//! ([`style`]).
//!
//! Chart kinds: family charts and resistance curves ([`xy`]), ratio maps
//! ([`ratio_map`]), case schematics ([`schematic`]) and mode shapes
//! ([`mode`]). Each takes plain data and returns the finished SVG text;
//! [`crate::stage::chart`] reads the stage outputs and writes the files.
//!
//! plotters draws axes, ticks and series; [`post`] adds what its SVG backend
//! cannot express (subscripts, dash patterns, hatch fills). Data are clipped
//! to the axis ranges here, since plotters clamps points to the border
//! instead of clipping lines. Output bytes depend only on the input (no
//! clock, no host, no hash-map order), so two renders are identical.

pub mod mode;
pub mod post;
pub mod ratio_map;
pub mod schematic;
pub mod style;
pub mod xy;

use plotters::backend::SVGBackend;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use style::{FONT, INK, SMALL, SeriesStyle};

/// Why a chart could not be drawn.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ChartError {
    /// The input holds nothing to draw.
    #[error("nothing to draw: {0}")]
    Empty(String),
    /// plotters refused a drawing operation.
    #[error("drawing failed: {0}")]
    Draw(String),
}

pub(crate) fn draw_err<E: std::fmt::Debug>(e: E) -> ChartError {
    ChartError::Draw(format!("{e:?}"))
}

/// The drawing area type of every chart.
pub(crate) type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// Text style in the house font; `size` is the size printed in the SVG
/// (plotters divides the requested size by 1.24, undone here).
pub(crate) fn font(size: f64) -> TextStyle<'static> {
    TextStyle::from((FONT, size * 1.24).into_font()).color(&INK)
}

/// Bold text style.
pub(crate) fn bold(size: f64) -> TextStyle<'static> {
    TextStyle::from(FontDesc::new(
        FontFamily::Name(FONT),
        size * 1.24,
        FontStyle::Bold,
    ))
    .color(&INK)
}

/// Text style anchored at (h, v).
pub(crate) fn anchored(t: TextStyle<'static>, h: HPos, v: VPos) -> TextStyle<'static> {
    t.pos(Pos::new(h, v))
}

/// Break `text` into lines no wider than `width` px at `size`.
pub(crate) fn wrap(text: &str, size: f64, width: f64) -> Vec<String> {
    let mut lines = Vec::new();
    let mut cur = String::new();
    // Break at plain spaces only: a no-break space (U+00A0) keeps "r > 1"
    // together.
    for w in text.split(' ').filter(|w| !w.is_empty()) {
        let cand = if cur.is_empty() {
            w.to_string()
        } else {
            format!("{cur} {w}")
        };
        if style::text_width(&cand, size) > width && !cur.is_empty() {
            lines.push(std::mem::take(&mut cur));
            cur = w.to_string();
        } else {
            cur = cand;
        }
    }
    if !cur.is_empty() {
        lines.push(cur);
    }
    lines
}

/// Draw wrapped lines from (x, y) down; returns the y below the last line.
pub(crate) fn draw_lines(
    area: &Area,
    lines: &[String],
    (x, y): (i32, i32),
    st: &TextStyle<'static>,
    leading: f64,
) -> Result<i32, ChartError> {
    let mut y = y;
    for l in lines {
        area.draw(&Text::new(
            l.clone(),
            (x, y),
            anchored(st.clone(), HPos::Left, VPos::Top),
        ))
        .map_err(draw_err)?;
        y += leading.round() as i32;
    }
    Ok(y)
}

/// Lines of small print at the foot of a standalone chart: the notes, then
/// the caution (when asked for).
pub(crate) fn footer_lines(notes: &[String], caution: bool, width: f64) -> Vec<String> {
    let mut out = Vec::new();
    for n in notes {
        out.extend(wrap(n, SMALL, width));
    }
    if caution {
        out.extend(wrap(crate::CAUTION, SMALL, width));
    }
    out
}

/// Height of one small-print line, px.
pub(crate) const SMALL_LEADING: f64 = SMALL * 1.3;

/// Draw a series marker centred at a pixel position.
pub(crate) fn marker(area: &Area, (x, y): (i32, i32), st: SeriesStyle) -> Result<(), ChartError> {
    use style::Marker as M;
    let r = style::MARKER;
    let c = st.colour;
    let fill = c.filled();
    let res = match st.marker {
        M::Disc => area.draw(&Circle::new((x, y), r as u32, fill)),
        M::Ring => area.draw(&Circle::new((x, y), r as u32, c.stroke_width(4))),
        M::Box => {
            let h = (r as f64 * 0.85).round() as i32;
            area.draw(&Rectangle::new(
                [(x - h, y - h), (x + h, y + h)],
                c.stroke_width(4),
            ))
        }
        // Hollow diamond: a filled one with a white core (a stroked
        // polyline in the series colour would pick up the series' dashes).
        M::Rhomb => area
            .draw(&Polygon::new(
                vec![
                    (x, y - r - 3),
                    (x + r + 1, y),
                    (x, y + r + 3),
                    (x - r - 1, y),
                ],
                fill,
            ))
            .and_then(|_| {
                area.draw(&Polygon::new(
                    vec![
                        (x, y - r + 3),
                        (x + r - 5, y),
                        (x, y + r - 3),
                        (x - r + 5, y),
                    ],
                    WHITE.filled(),
                ))
            }),
        M::Square => {
            let h = (r as f64 * 0.85).round() as i32;
            area.draw(&Rectangle::new([(x - h, y - h), (x + h, y + h)], fill))
        }
        M::TriangleUp => area.draw(&Polygon::new(
            vec![
                (x, y - r - 2),
                (x + r + 1, y + r - 2),
                (x - r - 1, y + r - 2),
            ],
            fill,
        )),
        M::TriangleDown => area.draw(&Polygon::new(
            vec![
                (x, y + r + 2),
                (x + r + 1, y - r + 2),
                (x - r - 1, y - r + 2),
            ],
            fill,
        )),
        M::Diamond => area.draw(&Polygon::new(
            vec![
                (x, y - r - 3),
                (x + r + 1, y),
                (x, y + r + 3),
                (x - r - 1, y),
            ],
            fill,
        )),
    };
    res.map_err(draw_err)
}

/// Clip a polyline to the box [x0, x1] × [y0, y1]: the parts inside, as
/// separate polylines. Interpolation is linear in (t(x), y), where t is ln
/// for a logarithmic x axis (so a cut lands where the drawn line crosses the
/// border).
pub fn clip_polyline(
    pts: &[(f64, f64)],
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
    x_log: bool,
) -> Vec<Vec<(f64, f64)>> {
    let t = |x: f64| if x_log { x.ln() } else { x };
    let ti = |u: f64| if x_log { u.exp() } else { u };
    let (u0, u1) = (t(x0), t(x1));
    let mut out: Vec<Vec<(f64, f64)>> = Vec::new();
    let mut cur: Vec<(f64, f64)> = Vec::new();
    for w in pts.windows(2) {
        let (a, b) = (w[0], w[1]);
        if !(a.0.is_finite() && a.1.is_finite() && b.0.is_finite() && b.1.is_finite())
            || (x_log && (a.0 <= 0.0 || b.0 <= 0.0))
        {
            if cur.len() > 1 {
                out.push(std::mem::take(&mut cur));
            }
            cur.clear();
            continue;
        }
        // Liang–Barsky on the segment in (u, y).
        let (ax, ay, bx, by) = (t(a.0), a.1, t(b.0), b.1);
        let (dx, dy) = (bx - ax, by - ay);
        let mut lo = 0.0f64;
        let mut hi = 1.0f64;
        let mut inside = true;
        for (p, q) in [(-dx, ax - u0), (dx, u1 - ax), (-dy, ay - y0), (dy, y1 - ay)] {
            if p == 0.0 {
                if q < 0.0 {
                    inside = false;
                }
            } else {
                let r = q / p;
                if p < 0.0 {
                    lo = lo.max(r);
                } else {
                    hi = hi.min(r);
                }
            }
        }
        if !inside || lo > hi {
            if cur.len() > 1 {
                out.push(std::mem::take(&mut cur));
            }
            cur.clear();
            continue;
        }
        let p0 = (ti(ax + lo * dx), ay + lo * dy);
        let p1 = (ti(ax + hi * dx), ay + hi * dy);
        if cur.is_empty() || lo > 0.0 {
            if cur.len() > 1 {
                out.push(std::mem::take(&mut cur));
            }
            cur = vec![p0];
        }
        cur.push(p1);
        if hi < 1.0 {
            out.push(std::mem::take(&mut cur));
        }
    }
    if cur.len() > 1 {
        out.push(cur);
    }
    out
}

/// A number for a tick or label: at most `digits` decimals, trailing zeros
/// dropped, −0 as 0, a true minus sign.
pub fn fmt_tick(x: f64, digits: usize) -> String {
    let s = format!("{x:.digits$}");
    let s = if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    };
    let s = if s == "-0" { "0".to_string() } else { s };
    s.replacen('-', "−", 1)
}

/// Tick positions of a logarithmic axis over [a, b]: 1, 2, 5 in each
/// decade (1, 2, 3, 5 when that gives fewer than four), and the minor grid
/// at 1…9 per decade.
pub fn log_ticks(a: f64, b: f64) -> (Vec<f64>, Vec<f64>) {
    let d0 = a.log10().floor() as i32;
    let d1 = b.log10().ceil() as i32;
    let pick = |ms: &[f64]| -> Vec<f64> {
        (d0..=d1)
            .flat_map(|d| ms.iter().map(move |m| m * 10f64.powi(d)))
            .filter(|x| *x >= a * (1.0 - 1e-12) && *x <= b * (1.0 + 1e-12))
            .collect()
    };
    let mut major = pick(&[1.0, 2.0, 5.0]);
    if major.len() < 4 {
        major = pick(&[1.0, 2.0, 3.0, 5.0]);
    }
    let minor = pick(&[1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0]);
    (major, minor)
}

/// Finish an SVG (see [`post::finish`]).
pub(crate) fn finish(svg: String) -> String {
    post::finish(&svg)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn clipping_cuts_at_the_border_instead_of_clamping() {
        // The line (-1,-1)→(4,2) in the box [0,3]×[0,1.1] (the example of
        // the ecosystem notes, where plotters clamps): y = 0.6x − 0.4, so it
        // enters at (2/3, 0) and leaves at (2.5, 1.1).
        let c = clip_polyline(&[(-1.0, -1.0), (4.0, 2.0)], (0.0, 3.0), (0.0, 1.1), false);
        assert_eq!(c.len(), 1);
        let (a, b) = (c[0][0], c[0][1]);
        assert!((a.0 - 2.0 / 3.0).abs() < 1e-12 && a.1.abs() < 1e-12);
        assert!((b.0 - 2.5).abs() < 1e-12 && (b.1 - 1.1).abs() < 1e-12);
    }

    #[test]
    fn clipping_splits_a_line_that_leaves_and_returns() {
        let c = clip_polyline(
            &[(0.0, 0.0), (1.0, 2.0), (2.0, 0.0)],
            (0.0, 2.0),
            (0.0, 1.0),
            false,
        );
        assert_eq!(c.len(), 2);
    }

    #[test]
    fn ticks_print_without_noise() {
        assert_eq!(fmt_tick(0.30000000000000004, 3), "0.3");
        assert_eq!(fmt_tick(-0.0, 2), "0");
        assert_eq!(fmt_tick(-1.5, 2), "−1.5");
        assert_eq!(fmt_tick(2.0, 2), "2");
    }
}
