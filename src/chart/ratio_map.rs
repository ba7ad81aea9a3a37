//! Ratio maps: a rule's critical moment over the finite-element value,
//! r = Mcr,rule / Mcr,FE, over (κ, ζ), on a perceptually uniform colour
//! scale with a colour bar; unconservative cells hatched (survives
//! grayscale printing), the r = 1 frontier drawn, the flange lines ζ = ±κ
//! of a doubly symmetric I-section drawn and labelled, cells where the rule
//! does not apply left blank.
//!
//! Colour scale: viridis (van der Walt & Smith 2015), perceptually uniform
//! and monotonic in lightness, from plotters' colour maps.
//!
//! # References
//! - S. van der Walt, N. Smith, "A Better Default Colormap for Matplotlib", SciPy 2015 (viridis).

use super::style::{self, FRAME, GRID, GUIDE, HATCH_SENTINEL, INK, MARGIN, TEXT, WIDTH};
use super::xy::draw_title;
use super::{
    Area, ChartError, SMALL_LEADING, anchored, bold, clip_polyline, draw_err, draw_lines, fmt_tick,
    font, footer_lines, wrap,
};
use plotters::backend::SVGBackend;
use plotters::coord::ranged1d::{AsRangedCoord, Ranged, ValueFormatter};
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

/// A rule's verdict on one cell.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// r ≤ 1 beyond the tolerance.
    Conservative,
    /// r > 1 beyond the tolerance.
    Unconservative,
    /// Within the tolerance of 1.
    Indeterminate,
    /// The rule does not cover the case.
    NotApplicable,
}

impl Verdict {
    /// Parse the check CSV's spelling.
    pub fn parse(s: &str) -> Option<Verdict> {
        Some(match s {
            "conservative" => Verdict::Conservative,
            "unconservative" => Verdict::Unconservative,
            "indeterminate" => Verdict::Indeterminate,
            "not-applicable" => Verdict::NotApplicable,
            _ => return None,
        })
    }
}

/// One grid point of the map.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cell {
    /// κ of the point.
    pub kappa: f64,
    /// ζ of the point.
    pub zeta: f64,
    /// r = Mcr,rule / Mcr,FE (None where not applicable or not solved).
    pub ratio: Option<f64>,
    /// The check's verdict.
    pub verdict: Verdict,
}

/// A ratio map.
#[derive(Debug, Clone, PartialEq)]
pub struct RatioMap {
    /// Title.
    pub title: String,
    /// Second title line.
    pub subtitle: String,
    /// Logarithmic κ axis.
    pub kappa_log: bool,
    /// The grid points.
    pub cells: Vec<Cell>,
    /// Branches of the r = 1 frontier, each a polyline of (κ, ζ).
    pub frontier: Vec<Vec<(f64, f64)>>,
    /// Notes printed under the map.
    pub notes: Vec<String>,
    /// Print the caution under the map.
    pub caution: bool,
}

/// One drawn cell: its rectangle in (κ, ζ) and the point it stands for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Patch {
    /// κ range.
    pub kappa: (f64, f64),
    /// ζ range.
    pub zeta: (f64, f64),
    /// The grid point.
    pub cell: Cell,
}

fn same(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * a.abs().max(b.abs()).max(1e-12)
}

/// The rectangles of the map: each point's cell reaches halfway (in the
/// axis' own scale) to its neighbours; κ columns first, ζ rows within each
/// column (ζ grids that follow κ, such as ζ = ±κ, give columns of their own
/// heights).
pub fn patches(cells: &[Cell], kappa_log: bool) -> Vec<Patch> {
    let t = |x: f64| if kappa_log { x.ln() } else { x };
    let ti = |u: f64| if kappa_log { u.exp() } else { u };
    let mut ks: Vec<f64> = cells
        .iter()
        .map(|c| c.kappa)
        .filter(|k| k.is_finite() && (!kappa_log || *k > 0.0))
        .collect();
    ks.sort_by(f64::total_cmp);
    ks.dedup_by(|a, b| same(*a, *b));
    let edges = |v: &[f64], tf: &dyn Fn(f64) -> f64, inv: &dyn Fn(f64) -> f64| -> Vec<(f64, f64)> {
        let u: Vec<f64> = v.iter().map(|&x| tf(x)).collect();
        (0..u.len())
            .map(|i| {
                let lo = if i > 0 {
                    (u[i - 1] + u[i]) / 2.0
                } else if u.len() > 1 {
                    u[0] - (u[1] - u[0]) / 2.0
                } else {
                    u[0] - 0.5
                };
                let hi = if i + 1 < u.len() {
                    (u[i] + u[i + 1]) / 2.0
                } else if u.len() > 1 {
                    u[i] + (u[i] - u[i - 1]) / 2.0
                } else {
                    u[0] + 0.5
                };
                (inv(lo), inv(hi))
            })
            .collect()
    };
    let kedges = edges(&ks, &t, &ti);
    let id = |x: f64| x;
    let mut out = Vec::new();
    for (k, ke) in ks.iter().zip(kedges) {
        let mut col: Vec<Cell> = cells
            .iter()
            .filter(|c| same(c.kappa, *k) && c.zeta.is_finite())
            .copied()
            .collect();
        col.sort_by(|a, b| a.zeta.total_cmp(&b.zeta));
        col.dedup_by(|a, b| same(a.zeta, b.zeta));
        let zs: Vec<f64> = col.iter().map(|c| c.zeta).collect();
        for (c, ze) in col.iter().zip(edges(&zs, &id, &id)) {
            out.push(Patch {
                kappa: ke,
                zeta: ze,
                cell: *c,
            });
        }
    }
    out
}

/// The colour of a ratio on the map's scale.
pub fn colour(r: f64, lo: f64, hi: f64) -> RGBColor {
    ViridisRGB::get_color_normalized(r.clamp(lo, hi), lo, hi)
}

/// Colour-scale range: the finite ratios, widened to include 1.
pub fn scale(cells: &[Cell]) -> (f64, f64) {
    let mut lo = 1.0f64;
    let mut hi = 1.0f64;
    for c in cells {
        if let Some(r) = c.ratio.filter(|r| r.is_finite()) {
            lo = lo.min(r);
            hi = hi.max(r);
        }
    }
    if hi - lo < 1e-6 {
        lo -= 0.05;
        hi += 0.05;
    }
    (lo, hi)
}

/// Render a ratio map to SVG text.
pub fn render(m: &RatioMap) -> Result<String, ChartError> {
    let ps = patches(&m.cells, m.kappa_log);
    if ps.is_empty() {
        return Err(ChartError::Empty(format!("{}: no grid points", m.title)));
    }
    let k0 = ps.iter().map(|p| p.kappa.0).fold(f64::INFINITY, f64::min);
    let k1 = ps
        .iter()
        .map(|p| p.kappa.1)
        .fold(f64::NEG_INFINITY, f64::max);
    let z0 = ps.iter().map(|p| p.zeta.0).fold(f64::INFINITY, f64::min);
    let z1 = ps
        .iter()
        .map(|p| p.zeta.1)
        .fold(f64::NEG_INFINITY, f64::max);
    let text_w = WIDTH as f64 - 2.0 * MARGIN as f64;
    let foot = footer_lines(&m.notes, m.caution, text_w);
    let head_h = 120u32;
    let body_h = 1000u32;
    let foot_h = (foot.len() as f64 * SMALL_LEADING).ceil() as u32 + 40;
    let bar_w = 600u32;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, head_h + body_h + foot_h))
            .into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        draw_title(&root, &m.title, &m.subtitle)?;
        let (_, rest) = root.split_vertically(head_h);
        let (body, footer) = rest.split_vertically(body_h);
        let (plot, side) = body.split_horizontally(WIDTH - bar_w);
        let (lo, hi) = scale(&m.cells);
        if m.kappa_log {
            let (major, _) = super::log_ticks(k0, k1);
            let x = (k0..k1).log_scale().with_key_points(major);
            map_panel(&plot, x, (z0, z1), m, &ps, (lo, hi))?;
        } else {
            map_panel(&plot, k0..k1, (z0, z1), m, &ps, (lo, hi))?;
        }
        colour_bar(&side, (lo, hi), &m.cells)?;
        draw_lines(
            &footer,
            &foot,
            (MARGIN, 20),
            &font(style::SMALL),
            SMALL_LEADING,
        )?;
        root.present().map_err(draw_err)?;
    }
    Ok(super::finish(svg))
}

fn map_panel<X>(
    area: &Area,
    x: X,
    (z0, z1): (f64, f64),
    m: &RatioMap,
    ps: &[Patch],
    (lo, hi): (f64, f64),
) -> Result<(), ChartError>
where
    X: AsRangedCoord<Value = f64>,
    X::CoordDescType: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    let mut chart = ChartBuilder::on(area)
        .margin(MARGIN)
        .margin_right(30)
        .x_label_area_size(style::X_LABEL_AREA)
        .y_label_area_size(style::Y_LABEL_AREA)
        .build_cartesian_2d(x, z0..z1)
        .map_err(draw_err)?;
    let xr = chart.x_range();
    let (k0, k1) = (xr.start, xr.end);
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc("κ = (π/L)·√(EI_{w}/GI_{t})  (dimensionless)")
        .y_desc("ζ = (π·a/L)·√(EI_{z}/GI_{t})  (dimensionless)")
        .label_style(font(style::TICK))
        .axis_desc_style(font(style::AXIS))
        .axis_style(INK.stroke_width(FRAME))
        .x_labels(10)
        .y_labels(9)
        .x_label_formatter(&|v| fmt_tick(*v, 2))
        .y_label_formatter(&|v| fmt_tick(*v, 2))
        .draw()
        .map_err(draw_err)?;
    // Cells: colour, or blank with a faint outline where not applicable.
    for p in ps {
        let rect = [(p.kappa.0, p.zeta.0), (p.kappa.1, p.zeta.1)];
        match (p.cell.verdict, p.cell.ratio.filter(|r| r.is_finite())) {
            (Verdict::NotApplicable, _) | (_, None) => {
                chart
                    .draw_series(std::iter::once(Rectangle::new(
                        rect,
                        style::FAINT.stroke_width(1),
                    )))
                    .map_err(draw_err)?;
            }
            (_, Some(r)) => {
                chart
                    .draw_series(std::iter::once(Rectangle::new(
                        rect,
                        colour(r, lo, hi).filled(),
                    )))
                    .map_err(draw_err)?;
            }
        }
    }
    // Hatch over unconservative cells (the post-processing turns the
    // sentinel fill into the pattern).
    for p in ps
        .iter()
        .filter(|p| p.cell.verdict == Verdict::Unconservative)
    {
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(p.kappa.0, p.zeta.0), (p.kappa.1, p.zeta.1)],
                HATCH_SENTINEL.filled(),
            )))
            .map_err(draw_err)?;
    }
    // Indeterminate cells: a ring at the point.
    let (ox, oy) = area.get_base_pixel();
    for p in ps
        .iter()
        .filter(|p| p.cell.verdict == Verdict::Indeterminate)
    {
        let c = chart.backend_coord(&(p.cell.kappa, p.cell.zeta));
        area.draw(&Circle::new((c.0 - ox, c.1 - oy), 9, WHITE.stroke_width(4)))
            .map_err(draw_err)?;
        area.draw(&Circle::new((c.0 - ox, c.1 - oy), 9, INK.stroke_width(2)))
            .map_err(draw_err)?;
    }
    let kb = (k0, k1);
    let zb = (z0, z1);
    // Flange lines ζ = ±κ (doubly symmetric I-section), labelled.
    let n = 60;
    for (sgn, name) in [(1.0, "top flange ζ = κ"), (-1.0, "bottom flange ζ = −κ")] {
        let line: Vec<(f64, f64)> = (0..=n)
            .map(|i| {
                let k = if m.kappa_log {
                    k0 * (k1 / k0).powf(i as f64 / n as f64)
                } else {
                    k0 + (k1 - k0) * i as f64 / n as f64
                };
                (k, sgn * k)
            })
            .collect();
        let parts = clip_polyline(&line, kb, zb, m.kappa_log);
        for part in &parts {
            chart
                .draw_series(std::iter::once(PathElement::new(
                    part.clone(),
                    WHITE.stroke_width(9),
                )))
                .map_err(draw_err)?;
            chart
                .draw_series(std::iter::once(PathElement::new(
                    part.clone(),
                    GUIDE.stroke_width(4),
                )))
                .map_err(draw_err)?;
        }
        // Label at the last visible point, on a white box.
        if let Some(&(k, z)) = parts.last().and_then(|p| p.last()) {
            let c = chart.backend_coord(&(k, z));
            let w = style::text_width(name, TEXT) as i32 + 16;
            let (x, y) = (
                c.0 - ox - w - 10,
                c.1 - oy + if sgn > 0.0 { 12 } else { -56 },
            );
            area.draw(&Rectangle::new(
                [(x, y), (x + w, y + 44)],
                WHITE.mix(0.85).filled(),
            ))
            .map_err(draw_err)?;
            area.draw(&Text::new(
                name.to_string(),
                (x + 8, y + 6),
                anchored(font(TEXT), HPos::Left, VPos::Top),
            ))
            .map_err(draw_err)?;
        }
    }
    // The r = 1 frontier: ink on a white halo.
    for b in &m.frontier {
        for part in clip_polyline(b, kb, zb, m.kappa_log) {
            chart
                .draw_series(std::iter::once(PathElement::new(
                    part.clone(),
                    WHITE.stroke_width(11),
                )))
                .map_err(draw_err)?;
            chart
                .draw_series(std::iter::once(PathElement::new(part, INK.stroke_width(5))))
                .map_err(draw_err)?;
        }
    }
    chart
        .draw_series(std::iter::once(Rectangle::new(
            [(k0, z0), (k1, z1)],
            INK.stroke_width(GRID),
        )))
        .map_err(draw_err)?;
    Ok(())
}

/// The colour bar and the key of the map's marks.
fn colour_bar(area: &Area, (lo, hi): (f64, f64), cells: &[Cell]) -> Result<(), ChartError> {
    let (bar, key) = area.split_vertically(500);
    let mut chart = ChartBuilder::on(&bar)
        .margin_top(MARGIN + 80)
        .margin_bottom(20)
        .margin_left(20)
        .margin_right(330)
        .y_label_area_size(0)
        .right_y_label_area_size(120)
        .build_cartesian_2d(0.0..1.0, lo..hi)
        .map_err(draw_err)?;
    let step = (hi - lo) / 6.0;
    let ydig = ((-step.log10()).ceil() as i64 + 1).clamp(1, 4) as usize;
    chart
        .configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .label_style(font(style::TICK))
        .axis_style(INK.stroke_width(FRAME))
        .y_labels(7)
        .y_label_formatter(&|v| fmt_tick(*v, ydig))
        .draw()
        .map_err(draw_err)?;
    let steps = 64;
    for i in 0..steps {
        let a = lo + (hi - lo) * i as f64 / steps as f64;
        // Each step overlaps the next a little: no seams between them.
        let b = (lo + (hi - lo) * (i as f64 + 1.6) / steps as f64).min(hi);
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(0.0, a), (1.0, b)],
                colour((a + b) / 2.0, lo, hi).filled(),
            )))
            .map_err(draw_err)?;
    }
    // r = 1 marked on the bar.
    chart
        .draw_series(std::iter::once(PathElement::new(
            vec![(-0.1, 1.0), (1.1, 1.0)],
            INK.stroke_width(5),
        )))
        .map_err(draw_err)?;
    if hi > 1.0 {
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(0.55, 1.0), (1.0, hi)],
                HATCH_SENTINEL.filled(),
            )))
            .map_err(draw_err)?;
    }
    chart
        .draw_series(std::iter::once(Rectangle::new(
            [(0.0, lo), (1.0, hi)],
            INK.stroke_width(2),
        )))
        .map_err(draw_err)?;
    for (i, l) in ["r = M_{cr,rule} / M_{cr,FE}", "(dimensionless)"]
        .iter()
        .enumerate()
    {
        bar.draw(&Text::new(
            l.to_string(),
            (20, MARGIN + 4 + 40 * i as i32),
            anchored(
                if i == 0 { bold(TEXT) } else { font(TEXT) },
                HPos::Left,
                VPos::Top,
            ),
        ))
        .map_err(draw_err)?;
    }
    // Key.
    let x = 20;
    let mut y = 20;
    let width = 580.0;
    let ks = TEXT - 3.0;
    let has = |v: Verdict| cells.iter().any(|c| c.verdict == v);
    let entry = |draw: &dyn Fn(&Area, i32) -> Result<(), ChartError>,
                 text: &str,
                 y: &mut i32|
     -> Result<(), ChartError> {
        draw(&key, *y)?;
        let lines = wrap(text, ks, width - 100.0);
        *y = draw_lines(&key, &lines, (x + 90, *y), &font(ks), ks * 1.25)? + 14;
        Ok(())
    };
    entry(
        &|a, y| {
            a.draw(&Rectangle::new(
                [(x, y), (x + 70, y + 40)],
                HATCH_SENTINEL.filled(),
            ))
            .map_err(draw_err)?;
            a.draw(&Rectangle::new(
                [(x, y), (x + 70, y + 40)],
                INK.stroke_width(2),
            ))
            .map_err(draw_err)
        },
        "hatched: unconservative, r\u{a0}>\u{a0}1",
        &mut y,
    )?;
    entry(
        &|a, y| {
            a.draw(&PathElement::new(
                vec![(x, y + 20), (x + 70, y + 20)],
                INK.stroke_width(5),
            ))
            .map_err(draw_err)
        },
        "frontier r = 1",
        &mut y,
    )?;
    entry(
        &|a, y| {
            a.draw(&PathElement::new(
                vec![(x, y + 20), (x + 70, y + 20)],
                GUIDE.stroke_width(4),
            ))
            .map_err(draw_err)
        },
        "flange lines ζ = ±κ",
        &mut y,
    )?;
    if has(Verdict::Indeterminate) {
        entry(
            &|a, y| {
                a.draw(&Circle::new((x + 35, y + 20), 9, INK.stroke_width(2)))
                    .map_err(draw_err)
            },
            "ring: r within the tolerance of 1",
            &mut y,
        )?;
    }
    if has(Verdict::NotApplicable) || cells.iter().any(|c| c.ratio.is_none()) {
        entry(
            &|a, y| {
                a.draw(&Rectangle::new(
                    [(x, y), (x + 70, y + 40)],
                    style::FAINT.stroke_width(2),
                ))
                .map_err(draw_err)
            },
            "blank: rule not applicable",
            &mut y,
        )?;
    }
    Ok(())
}
