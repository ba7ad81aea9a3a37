//! Line charts: family charts (μcr, μcr/μ0 or a coefficient against κ, one
//! series per ζ or per variant; FE points with the fitted curve) and
//! resistance curves (design resistance against unbraced length, one curve
//! per section).

use super::style::{self, FRAME, GRID, HEIGHT, INK, LEGEND_WIDTH, MARGIN, TEXT, WIDTH};
use super::{
    Area, ChartError, SMALL_LEADING, anchored, bold, clip_polyline, draw_err, draw_lines, fmt_tick,
    font, footer_lines, marker, wrap,
};
use plotters::backend::SVGBackend;
use plotters::coord::ranged1d::{AsRangedCoord, Ranged, ValueFormatter};
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

/// One series: points (drawn as markers) and/or a curve (drawn as a line).
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Legend text (`_{..}` for subscripts).
    pub label: String,
    /// Data points, drawn as markers (FE results).
    pub points: Vec<(f64, f64)>,
    /// A sampled curve through or near the points (a fitted formula, or a
    /// resistance curve), drawn as a line; None: the points are joined by a
    /// thin straight line instead.
    pub curve: Option<Vec<(f64, f64)>>,
}

/// A line chart.
#[derive(Debug, Clone, PartialEq)]
pub struct XyChart {
    /// Title (first line).
    pub title: String,
    /// Second title line (what the chart is of: combination, case).
    pub subtitle: String,
    /// x axis title with units.
    pub x_label: String,
    /// y axis title with units.
    pub y_label: String,
    /// Logarithmic x axis.
    pub x_log: bool,
    /// Start the y axis at 0 when every value is positive.
    pub y_from_zero: bool,
    /// The series.
    pub series: Vec<Series>,
    /// Heading of the legend.
    pub legend_title: String,
    /// The x range where a fitted formula is valid: outside it the plot is
    /// shaded.
    pub valid_x: Option<(f64, f64)>,
    /// Notes printed in small print under the chart.
    pub notes: Vec<String>,
    /// Print the caution under the chart (standalone charts).
    pub caution: bool,
    /// Palette index of the first series (panels sharing one legend).
    pub style_offset: usize,
}

/// An axis range (from, to).
pub type Range = (f64, f64);

/// Data range of the chart: (x range, y range).
pub fn ranges(c: &XyChart) -> Result<(Range, Range), ChartError> {
    let mut xs: Vec<f64> = Vec::new();
    let mut ys: Vec<f64> = Vec::new();
    for s in &c.series {
        for &(x, y) in s.points.iter().chain(s.curve.iter().flatten()) {
            if x.is_finite() && y.is_finite() && (!c.x_log || x > 0.0) {
                xs.push(x);
                ys.push(y);
            }
        }
    }
    if xs.is_empty() {
        return Err(ChartError::Empty(format!("{}: no finite data", c.title)));
    }
    let (mut x0, mut x1) = min_max(&xs);
    let (mut y0, mut y1) = min_max(&ys);
    if c.x_log {
        // A single κ (or a narrow range) still gets a readable axis.
        let r = (x1 / x0)
            .max(1.0001)
            .powf(0.04)
            .max(if x1 / x0 < 1.5 { 1.5 } else { 1.0 });
        x0 /= r;
        x1 *= r;
    } else {
        let w = x1 - x0;
        let p = if w > 1e-9 * x1.abs().max(1.0) {
            w * 0.03
        } else {
            (0.5 * x1.abs()).max(0.1)
        };
        x0 -= p;
        x1 += p;
    }
    let span = (y1 - y0).max(1e-9 * y1.abs().max(1.0));
    if c.y_from_zero && y0 >= 0.0 {
        y0 = 0.0;
    } else {
        y0 -= 0.05 * span;
    }
    y1 += 0.06 * span;
    Ok(((x0, x1), (y0, y1)))
}

fn min_max(v: &[f64]) -> (f64, f64) {
    v.iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| {
            (a.min(x), b.max(x))
        })
}

/// Render a line chart to SVG text.
pub fn render(c: &XyChart) -> Result<String, ChartError> {
    let (xr, yr) = ranges(c)?;
    let text_w = WIDTH as f64 - 2.0 * MARGIN as f64;
    let foot = footer_lines(&c.notes, c.caution, text_w);
    let head_h = 120u32;
    let body_h = HEIGHT - head_h - 60;
    let foot_h = (foot.len() as f64 * SMALL_LEADING).ceil() as u32 + 40;
    let h = head_h + body_h + foot_h;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, h)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        draw_title(&root, &c.title, &c.subtitle)?;
        let (_, rest) = root.split_vertically(head_h);
        let (body, footer) = rest.split_vertically(body_h);
        let (plot, legend) = body.split_horizontally(WIDTH - LEGEND_WIDTH);
        if c.x_log {
            let (major, minor) = super::log_ticks(xr.0, xr.1);
            let x = (xr.0..xr.1)
                .log_scale()
                .with_key_points(major)
                .with_light_points(minor);
            panel(&plot, x, yr, c)?;
        } else {
            panel(&plot, xr.0..xr.1, yr, c)?;
        }
        draw_legend(&legend, &c.legend_title, &c.series, 0, c.valid_x.is_some())?;
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

/// Title and subtitle at the top of a chart.
pub(crate) fn draw_title(root: &Area, title: &str, subtitle: &str) -> Result<(), ChartError> {
    root.draw(&Text::new(
        title.to_string(),
        (MARGIN, MARGIN),
        anchored(bold(style::TITLE), HPos::Left, VPos::Top),
    ))
    .map_err(draw_err)?;
    if !subtitle.is_empty() {
        root.draw(&Text::new(
            subtitle.to_string(),
            (MARGIN, MARGIN + 52),
            anchored(font(TEXT), HPos::Left, VPos::Top),
        ))
        .map_err(draw_err)?;
    }
    Ok(())
}

/// Axes, grid and series on one plot area.
pub(crate) fn panel<X>(
    area: &Area,
    x: X,
    (y0, y1): (f64, f64),
    c: &XyChart,
) -> Result<(), ChartError>
where
    X: AsRangedCoord<Value = f64>,
    X::CoordDescType: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    let mut chart = ChartBuilder::on(area)
        .margin(MARGIN)
        .margin_right(40)
        .x_label_area_size(style::X_LABEL_AREA)
        .y_label_area_size(style::Y_LABEL_AREA)
        .build_cartesian_2d(x, y0..y1)
        .map_err(draw_err)?;
    let xspan = chart.x_range();
    let (x0, x1) = (xspan.start, xspan.end);
    let xdig = tick_digits(x0, x1, c.x_log);
    let ydig = tick_digits(y0, y1, false);
    chart
        .configure_mesh()
        .x_desc(c.x_label.clone())
        .y_desc(c.y_label.clone())
        .label_style(font(style::TICK))
        .axis_desc_style(font(style::AXIS))
        .bold_line_style(style::GRID_COLOUR.stroke_width(GRID))
        .light_line_style(style::GRID_LIGHT.stroke_width(1))
        .axis_style(INK.stroke_width(FRAME))
        .x_labels(10)
        .y_labels(8)
        .x_label_formatter(&|v| fmt_tick(*v, xdig))
        .y_label_formatter(&|v| fmt_tick(*v, ydig))
        .draw()
        .map_err(draw_err)?;
    // Outside the validity range of a fitted formula: shaded.
    if let Some((v0, v1)) = c.valid_x {
        let shade = style::GRID_LIGHT.mix(0.8).filled();
        for (a, b) in [(x0, v0.max(x0)), (v1.min(x1), x1)] {
            if b > a {
                chart
                    .draw_series(std::iter::once(Rectangle::new([(a, y0), (b, y1)], shade)))
                    .map_err(draw_err)?;
            }
        }
        for v in [v0, v1] {
            if v > x0 && v < x1 {
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        vec![(v, y0), (v, y1)],
                        style::GUIDE.stroke_width(3),
                    )))
                    .map_err(draw_err)?;
            }
        }
    }
    let (xb, yb) = ((x0, x1), (y0, y1));
    for (i, s) in c.series.iter().enumerate() {
        let st = style::series(i + c.style_offset);
        let (line, width) = match &s.curve {
            Some(curve) => (curve.clone(), style::LINE),
            None => (s.points.clone(), style::LINE_THIN),
        };
        for part in clip_polyline(&line, xb, yb, c.x_log) {
            chart
                .draw_series(std::iter::once(PathElement::new(
                    part,
                    st.colour.stroke_width(width),
                )))
                .map_err(draw_err)?;
        }
        let (ox, oy) = area.get_base_pixel();
        for &(x, y) in &s.points {
            if x >= x0 && x <= x1 && y >= y0 && y <= y1 && x.is_finite() && y.is_finite() {
                let p = chart.backend_coord(&(x, y));
                marker(area, (p.0 - ox, p.1 - oy), st)?;
            }
        }
    }
    Ok(())
}

/// Decimals for tick labels over a range.
fn tick_digits(a: f64, b: f64, log: bool) -> usize {
    if log {
        let lo = a.abs().max(1e-12);
        return ((-lo.log10()).ceil().max(0.0) as usize + 1).min(6);
    }
    let step = (b - a).abs() / 8.0;
    if step <= 0.0 || !step.is_finite() {
        return 2;
    }
    ((-step.log10()).ceil().max(0.0) as usize + 1).min(6)
}

/// The legend column: heading, one entry per series (line sample, marker,
/// label), and the key of the shading.
pub(crate) fn draw_legend(
    area: &Area,
    title: &str,
    series: &[Series],
    offset: usize,
    shaded: bool,
) -> Result<i32, ChartError> {
    let x = 10;
    let mut y = MARGIN + 10;
    let width = LEGEND_WIDTH as f64 - 40.0;
    let head = wrap(title, TEXT, width);
    y = draw_lines(area, &head, (x, y), &bold(TEXT), TEXT * 1.3)? + 12;
    for (i, s) in series.iter().enumerate() {
        let st = style::series(i + offset);
        let lines = wrap(&s.label, TEXT, width - 90.0);
        let yc = y + (TEXT * 0.6) as i32;
        let lw = if s.curve.is_some() {
            style::LINE
        } else {
            style::LINE_THIN
        };
        area.draw(&PathElement::new(
            vec![(x, yc), (x + 80, yc)],
            st.colour.stroke_width(lw),
        ))
        .map_err(draw_err)?;
        if !s.points.is_empty() {
            marker(area, (x + 40, yc), st)?;
        }
        y = draw_lines(area, &lines, (x + 95, y), &font(TEXT), TEXT * 1.25)? + 14;
    }
    if shaded {
        y += 10;
        area.draw(&Rectangle::new(
            [(x, y), (x + 90, y + 36)],
            style::GRID_LIGHT.mix(0.8).filled(),
        ))
        .map_err(draw_err)?;
        let lines = wrap(
            "outside the fitted formula's validity range",
            TEXT,
            width - 110.0,
        );
        y = draw_lines(area, &lines, (x + 110, y), &font(TEXT), TEXT * 1.25)?;
    }
    Ok(y)
}

/// Units of a resistance chart's axes.
#[derive(Debug, Clone, PartialEq)]
pub struct ResistanceUnits {
    /// Unit of the unbraced length, for example "m".
    pub length: String,
    /// Unit of the design resistance, for example "kN·m".
    pub resistance: String,
}

/// A resistance chart: design resistance M_b,Rd against the unbraced
/// length, one curve per section (`sections`: label and sampled
/// (length, resistance) points, as computed by the resistance stage). The
/// caller's `notes` name the code, clause and partial factors used.
pub fn resistance_chart(
    title: &str,
    subtitle: &str,
    sections: Vec<(String, Vec<(f64, f64)>)>,
    units: &ResistanceUnits,
    notes: Vec<String>,
    caution: bool,
) -> XyChart {
    XyChart {
        title: title.into(),
        subtitle: subtitle.into(),
        x_label: format!("unbraced length L_{{b}}  ({})", units.length),
        y_label: format!("design resistance M_{{b,Rd}}  ({})", units.resistance),
        x_log: false,
        y_from_zero: true,
        series: sections
            .into_iter()
            .map(|(label, curve)| Series {
                label,
                points: Vec::new(),
                curve: Some(curve),
            })
            .collect(),
        legend_title: "Section".into(),
        valid_x: None,
        notes,
        caution,
        style_offset: 0,
    }
}
