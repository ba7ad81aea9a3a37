//! Mode shapes: the lateral displacement of both flanges (and of the shear
//! centre) and the twist along the member, from the solver's mode.
//!
//! A point at height z above the shear centre moves laterally by
//!
//! ```text
//! u(z) = v − z·φ        (domain notes, "Axes and signs")
//! ```
//!
//! so the top flange (z = a_top) moves v − a_top·φ and the bottom flange
//! v − a_bot·φ. Both panels are normalised: displacements by the largest
//! |flange displacement|, the twist by its largest |φ|.
//!
//! # References
//! - ltb-atlas project, *Domain notes: elastic lateral–torsional buckling, conventions for this
//!   project* (`shared/domain-notes.md`), section "Axes and signs".

use super::style::{self, LEGEND_WIDTH, MARGIN, WIDTH};
use super::xy::{Series, XyChart, draw_legend, draw_title, panel};
use super::{ChartError, SMALL_LEADING, draw_err, draw_lines, font, footer_lines, wrap};
use plotters::backend::SVGBackend;
use plotters::prelude::*;

/// A mode shape to draw.
#[derive(Debug, Clone, PartialEq)]
pub struct ModeShape {
    /// Title.
    pub title: String,
    /// Second title line.
    pub subtitle: String,
    /// Node positions x/L.
    pub x: Vec<f64>,
    /// Lateral displacement of the shear centre.
    pub v: Vec<f64>,
    /// Twist, rad.
    pub phi: Vec<f64>,
    /// Heights of the top and bottom flange above the shear centre, in the
    /// units of v (None: flanges unknown, only v is drawn).
    pub flanges: Option<(f64, f64)>,
    /// Notes under the chart.
    pub notes: Vec<String>,
    /// Print the caution.
    pub caution: bool,
}

/// The lateral-displacement series (top flange, shear centre, bottom
/// flange), normalised, and the twist series, normalised.
pub fn series(m: &ModeShape) -> Result<(Vec<Series>, Series), ChartError> {
    let n = m.x.len();
    if n < 2 || m.v.len() != n || m.phi.len() != n {
        return Err(ChartError::Empty(format!(
            "{}: the mode needs at least two nodes with v and φ",
            m.title
        )));
    }
    let mut lat: Vec<(String, Vec<f64>)> = Vec::new();
    if let Some((top, bot)) = m.flanges {
        lat.push((
            "top flange".into(),
            (0..n).map(|i| m.v[i] - top * m.phi[i]).collect(),
        ));
        lat.push(("shear centre".into(), m.v.clone()));
        lat.push((
            "bottom flange".into(),
            (0..n).map(|i| m.v[i] - bot * m.phi[i]).collect(),
        ));
    } else {
        lat.push(("shear centre".into(), m.v.clone()));
    }
    let scale = lat
        .iter()
        .flat_map(|(_, u)| u.iter())
        .fold(0.0f64, |a, &u| a.max(u.abs()));
    let scale = if scale > 0.0 { scale } else { 1.0 };
    let lat = lat
        .into_iter()
        .map(|(label, u)| Series {
            label,
            points: Vec::new(),
            curve: Some(m.x.iter().zip(u).map(|(&x, u)| (x, u / scale)).collect()),
        })
        .collect();
    let pmax = m.phi.iter().fold(0.0f64, |a, &p| a.max(p.abs()));
    let pmax = if pmax > 0.0 { pmax } else { 1.0 };
    let twist = Series {
        label: "twist φ".into(),
        points: Vec::new(),
        curve: Some(
            m.x.iter()
                .zip(&m.phi)
                .map(|(&x, &p)| (x, p / pmax))
                .collect(),
        ),
    };
    Ok((lat, twist))
}

/// Render a mode shape to SVG text.
pub fn render(m: &ModeShape) -> Result<String, ChartError> {
    let (lat, twist) = series(m)?;
    let text_w = WIDTH as f64 - 2.0 * MARGIN as f64;
    let foot = footer_lines(&m.notes, m.caution, text_w);
    let head_h = 120u32;
    let panel_h = 600u32;
    let foot_h = (foot.len() as f64 * SMALL_LEADING).ceil() as u32 + 40;
    let h = head_h + 2 * panel_h + foot_h;
    let top = XyChart {
        title: m.title.clone(),
        subtitle: String::new(),
        x_label: "x/L  (dimensionless)".into(),
        y_label: "u/max|u|  (dimensionless)".into(),
        x_log: false,
        y_from_zero: false,
        series: lat,
        legend_title: "Lateral displacement u".into(),
        valid_x: None,
        notes: Vec::new(),
        caution: false,
        style_offset: 0,
    };
    let n_lat = top.series.len();
    let bottom = XyChart {
        y_label: "φ/max|φ|  (dimensionless)".into(),
        series: vec![twist],
        style_offset: 3,
        ..top.clone()
    };
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, h)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        draw_title(&root, &m.title, &m.subtitle)?;
        let (_, rest) = root.split_vertically(head_h);
        let (body, footer) = rest.split_vertically(2 * panel_h);
        let (plots, legend) = body.split_horizontally(WIDTH - LEGEND_WIDTH);
        let (p1, p2) = plots.split_vertically(panel_h);
        let sym = |c: &XyChart| {
            let a = c
                .series
                .iter()
                .flat_map(|s| s.curve.iter().flatten())
                .fold(0.0f64, |a, p| a.max(p.1.abs()));
            let a = if a > 0.0 { a } else { 1.0 };
            (-1.1 * a, 1.1 * a)
        };
        panel(&p1, 0.0..1.0, sym(&top), &top)?;
        panel(&p2, 0.0..1.0, sym(&bottom), &bottom)?;
        let y = draw_legend(&legend, &top.legend_title, &top.series, 0, false)?;
        let (_, low) = legend.split_vertically(y as u32 + 10);
        let y2 = draw_legend(&low, "Twist", &bottom.series, n_lat.max(3), false)?;
        let (_, note) = low.split_vertically(y2 as u32 + 30);
        let lines = wrap(
            "u = v − z·φ at height z above the shear centre (v: shear centre, φ: twist); each panel normalised to its largest value; x from the start of the member",
            style::SMALL,
            LEGEND_WIDTH as f64 - 40.0,
        );
        draw_lines(&note, &lines, (10, 0), &font(style::SMALL), SMALL_LEADING)?;
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
