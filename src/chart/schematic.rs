//! Case schematics drawn from the case definition ([`Member`]): the member
//! in elevation with its loads at their height and direction, supports and
//! restraints, a table of which out-of-plane components each support holds
//! (lateral, lateral rotation, twist, warping), and a sketch of the
//! I-section at the same vertical scale, showing load and restraint heights.
//!
//! Symbols (this project's own): a filled square marks a held component, an
//! outlined square with "k" a spring, a short dash a free one; a circle
//! with a cross marks a lateral restraint at a height, a double ring a
//! twist restraint; a wall marks an end built in in plane, a triangle a
//! vertical support. Heights are drawn in ζ units, flanges at ζ = ±κ (a
//! doubly symmetric I-section).

use super::style::{self, BRACE, FAINT, GUIDE, HELD, INK, LOAD, MARGIN, MEMBER, TEXT, WIDTH};
use super::xy::draw_title;
use super::{
    Area, ChartError, SMALL_LEADING, anchored, draw_err, draw_lines, fmt_tick, font, footer_lines,
    wrap,
};
use crate::model::{Fixity, Load, Member, Support};
use plotters::backend::SVGBackend;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

/// A schematic to draw.
#[derive(Debug, Clone, PartialEq)]
pub struct Schematic {
    /// Title.
    pub title: String,
    /// Second title line.
    pub subtitle: String,
    /// The member (heights in ζ units at its κ).
    pub member: Member,
    /// Further load heights to mark on the section (a family's ζ axis),
    /// (label, ζ).
    pub load_heights: Vec<(String, f64)>,
    /// The loads act in both directions (a direction axis).
    pub both_directions: bool,
    /// Notes under the drawing.
    pub notes: Vec<String>,
    /// Print the caution.
    pub caution: bool,
}

/// The out-of-plane rows of the restraint table.
pub const ROWS: [&str; 4] = ["lateral v", "lateral rotation v′", "twist φ", "warping φ′"];

/// One column of the restraint table: a support or a restraint.
#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    /// Position x/L.
    pub at: f64,
    /// Heading ("x = 0", ...).
    pub heading: String,
    /// Second heading line (what it is).
    pub what: String,
    /// The four rows (None: the row does not apply to this kind of column).
    pub cells: [Option<Fixity>; 4],
}

fn support_cells(s: &Support) -> [Option<Fixity>; 4] {
    [
        Some(s.lateral),
        Some(s.lateral_rotation),
        Some(s.twist),
        Some(s.warping),
    ]
}

fn at_text(x: f64) -> String {
    if x == 0.0 {
        "x = 0".into()
    } else if (x - 1.0).abs() < 1e-12 {
        "x = L".into()
    } else {
        format!("x = {}L", fmt_tick(x, 3))
    }
}

/// The restraint table's columns, in order of position (ends, supports,
/// point restraints).
pub fn columns(m: &Member) -> Vec<Column> {
    let mut cols = vec![Column {
        at: 0.0,
        heading: at_text(0.0),
        what: "start".into(),
        cells: support_cells(&m.start),
    }];
    for s in &m.supports {
        cols.push(Column {
            at: s.at,
            heading: at_text(s.at),
            what: "support".into(),
            cells: support_cells(&s.support),
        });
    }
    for r in &m.restraints {
        cols.push(Column {
            at: r.at,
            heading: at_text(r.at),
            what: format!("brace ζ = {}", fmt_tick(r.zeta, 2)),
            cells: [Some(r.lateral), None, Some(r.twist), None],
        });
    }
    cols.push(Column {
        at: 1.0,
        heading: at_text(1.0),
        what: "end".into(),
        cells: support_cells(&m.end),
    });
    cols.sort_by(|a, b| a.at.total_cmp(&b.at));
    cols
}

/// Geometry of the drawing.
struct Geo {
    x0: i32,
    x1: i32,
    yc: i32,
    per_zeta: f64,
    flange: f64,
}

impl Geo {
    fn x(&self, at: f64) -> i32 {
        self.x0 + ((self.x1 - self.x0) as f64 * at).round() as i32
    }
    fn y(&self, zeta: f64) -> i32 {
        self.yc - (zeta * self.per_zeta).round() as i32
    }
}

/// Render a schematic to SVG text.
pub fn render(s: &Schematic) -> Result<String, ChartError> {
    let m = &s.member;
    let text_w = WIDTH as f64 - 2.0 * MARGIN as f64;
    let foot = footer_lines(&s.notes, s.caution, text_w);
    let body_h = 1140u32;
    let foot_h = (foot.len() as f64 * SMALL_LEADING).ceil() as u32 + 40;
    // Vertical scale: flanges at ±κ; every height shown fits in ±170 px.
    let mut hmax = m.kappa.abs();
    for l in &m.loads {
        if let Load::Point { zeta, .. } | Load::Distributed { zeta, .. } = l {
            hmax = hmax.max(zeta.abs());
        }
    }
    for r in &m.restraints {
        hmax = hmax.max(r.zeta.abs());
    }
    for c in &m.continuous {
        hmax = hmax.max(c.zeta.abs());
    }
    for (_, z) in &s.load_heights {
        hmax = hmax.max(z.abs());
    }
    let nominal = m.kappa <= 0.0;
    let flange = if nominal {
        (hmax * 0.6).max(0.5)
    } else {
        m.kappa
    };
    let hmax = hmax.max(flange);
    let g = Geo {
        x0: 470,
        x1: 1230,
        yc: 430,
        per_zeta: 165.0 / hmax,
        flange,
    };
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (WIDTH, body_h + foot_h)).into_drawing_area();
        root.fill(&WHITE).map_err(draw_err)?;
        draw_title(&root, &s.title, &s.subtitle)?;
        elevation(&root, s, &g)?;
        section(&root, s, &g)?;
        table(&root, m, &g)?;
        key(&root)?;
        let (_, footer) = root.split_vertically(body_h);
        let mut notes = Vec::new();
        if nominal {
            notes.push("κ = 0: flange heights drawn nominally.".to_string());
        }
        let lines: Vec<String> = notes
            .iter()
            .flat_map(|n| wrap(n, style::SMALL, text_w))
            .chain(foot)
            .collect();
        draw_lines(
            &footer,
            &lines,
            (MARGIN, 10),
            &font(style::SMALL),
            SMALL_LEADING,
        )?;
        root.present().map_err(draw_err)?;
    }
    Ok(super::finish(svg))
}

fn text(
    area: &Area,
    t: &str,
    (x, y): (i32, i32),
    h: HPos,
    v: VPos,
    size: f64,
) -> Result<(), ChartError> {
    area.draw(&Text::new(
        t.to_string(),
        (x, y),
        anchored(font(size), h, v),
    ))
    .map_err(draw_err)
}

fn arrow(
    area: &Area,
    from: (i32, i32),
    to: (i32, i32),
    c: RGBColor,
    w: u32,
) -> Result<(), ChartError> {
    area.draw(&PathElement::new(vec![from, to], c.stroke_width(w)))
        .map_err(draw_err)?;
    let (dx, dy) = ((to.0 - from.0) as f64, (to.1 - from.1) as f64);
    let len = (dx * dx + dy * dy).sqrt().max(1.0);
    let (ux, uy) = (dx / len, dy / len);
    let (hl, hw) = (26.0, 12.0);
    let bx = to.0 as f64 - ux * hl;
    let by = to.1 as f64 - uy * hl;
    let p = |x: f64, y: f64| (x.round() as i32, y.round() as i32);
    area.draw(&Polygon::new(
        vec![
            to,
            p(bx - uy * hw, by + ux * hw),
            p(bx + uy * hw, by - ux * hw),
        ],
        c.filled(),
    ))
    .map_err(draw_err)
}

fn elevation(root: &Area, s: &Schematic, g: &Geo) -> Result<(), ChartError> {
    let m = &s.member;
    let (yt, yb) = (g.y(g.flange), g.y(-g.flange));
    // Web outline and flanges.
    root.draw(&Rectangle::new(
        [(g.x0, yt), (g.x1, yb)],
        RGBColor(0xF2, 0xF2, 0xF2).filled(),
    ))
    .map_err(draw_err)?;
    for y in [yt, yb] {
        root.draw(&PathElement::new(
            vec![(g.x0, y), (g.x1, y)],
            MEMBER.stroke_width(7),
        ))
        .map_err(draw_err)?;
    }
    // Shear-centre axis.
    root.draw(&PathElement::new(
        vec![(g.x0 - 30, g.yc), (g.x1 + 30, g.yc)],
        GUIDE.stroke_width(2),
    ))
    .map_err(draw_err)?;
    // In-plane supports.
    for (at, sup, end) in [(0.0, &m.start, -1), (1.0, &m.end, 1)] {
        let x = g.x(at);
        if sup.vertical.is_fixed() && sup.in_plane_rotation.is_fixed() {
            let xw = x + end * 6;
            root.draw(&PathElement::new(
                vec![(xw, yt - 40), (xw, yb + 40)],
                INK.stroke_width(7),
            ))
            .map_err(draw_err)?;
            let mut y = yt - 40;
            while y < yb + 40 {
                root.draw(&PathElement::new(
                    vec![(xw, y + 22), (xw + end * 24, y)],
                    INK.stroke_width(3),
                ))
                .map_err(draw_err)?;
                y += 24;
            }
        } else if !sup.vertical.is_free() {
            triangle(root, x, yb)?;
        }
    }
    for ps in &m.supports {
        if !ps.support.vertical.is_free() {
            triangle(root, g.x(ps.at), yb)?;
        }
    }
    // Continuous restraints.
    for c in &m.continuous {
        let y = g.y(c.zeta);
        let (a, b) = (g.x(c.from), g.x(c.to));
        root.draw(&PathElement::new(
            vec![(a, y), (b, y)],
            BRACE.stroke_width(6),
        ))
        .map_err(draw_err)?;
        let mut x = a;
        while x <= b {
            root.draw(&PathElement::new(
                vec![(x, y - 12), (x, y + 12)],
                BRACE.stroke_width(3),
            ))
            .map_err(draw_err)?;
            x += 40;
        }
        let what = match (c.lateral > 0.0, c.twist > 0.0) {
            (true, true) => "continuous lateral and twist springs",
            (true, false) => "continuous lateral spring",
            (false, true) => "continuous twist spring",
            (false, false) => "continuous restraint (zero stiffness)",
        };
        text(
            root,
            what,
            ((a + b) / 2, y + 18),
            HPos::Center,
            VPos::Top,
            style::SMALL,
        )?;
    }
    // Point restraints at their height.
    for r in &m.restraints {
        let (mut x, y) = (g.x(r.at), g.y(r.zeta));
        // Beside a load acting at the same point, not on top of it.
        let on_load = m.loads.iter().any(|l| match *l {
            Load::Point { at, zeta, .. } => (g.x(at) - x).abs() < 40 && (g.y(zeta) - y).abs() < 40,
            _ => false,
        });
        if on_load {
            root.draw(&PathElement::new(
                vec![(x, y), (x + 48, y)],
                BRACE.stroke_width(4),
            ))
            .map_err(draw_err)?;
            x += 48;
        }
        if !r.lateral.is_free() {
            brace_lateral(root, (x, y), r.lateral.spring().is_some())?;
        }
        if !r.twist.is_free() {
            brace_twist(root, (x, y))?;
        }
    }
    // Loads.
    let len = 120;
    for l in &m.loads {
        match *l {
            Load::Point { at, fz, zeta } => {
                let (x, y) = (g.x(at), g.y(zeta));
                load_arrow(root, x, y, fz, len, s.both_directions)?;
                let ty = if fz <= 0.0 { y - len - 8 } else { y + len + 8 };
                text(
                    root,
                    "F",
                    (x + 18, ty),
                    HPos::Left,
                    if fz <= 0.0 { VPos::Top } else { VPos::Bottom },
                    TEXT,
                )?;
            }
            Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                zeta,
            } => {
                let (a, b) = (g.x(from), g.x(to));
                let y = g.y(zeta);
                let fmax = fz_from.abs().max(fz_to.abs()).max(1e-300);
                let n = (((b - a) as f64) / 60.0).round().max(1.0) as i32;
                let mut tails = Vec::new();
                for i in 0..=n {
                    let t = i as f64 / n as f64;
                    let f = fz_from + (fz_to - fz_from) * t;
                    let x = a + ((b - a) as f64 * t).round() as i32;
                    let l = ((len as f64 * 0.8) * f.abs() / fmax).round() as i32;
                    if l > 30 {
                        load_arrow(root, x, y, f, l, false)?;
                    }
                    tails.push((x, if f <= 0.0 { y - l } else { y + l }));
                }
                root.draw(&PathElement::new(tails.clone(), LOAD.stroke_width(3)))
                    .map_err(draw_err)?;
                let down = fz_from + fz_to <= 0.0;
                let (tx, ty) = tails[tails.len() / 2];
                text(
                    root,
                    if s.both_directions {
                        "q (down and up)"
                    } else {
                        "q"
                    },
                    (tx + 12, if down { ty - 8 } else { ty + 8 }),
                    HPos::Left,
                    if down { VPos::Bottom } else { VPos::Top },
                    TEXT,
                )?;
            }
            Load::EndMoments { start, end } => {
                for (at, v, dir) in [(0.0, start, -1), (1.0, end, 1)] {
                    if v != 0.0 {
                        let x = g.x(at) + dir * 40;
                        moment(root, (x, g.yc), dir, v)?;
                    }
                }
            }
        }
    }
    Ok(())
}

fn triangle(root: &Area, x: i32, y: i32) -> Result<(), ChartError> {
    root.draw(&Polygon::new(
        vec![(x, y + 4), (x + 24, y + 44), (x - 24, y + 44)],
        INK.filled(),
    ))
    .map_err(draw_err)
}

fn brace_lateral(root: &Area, (x, y): (i32, i32), spring: bool) -> Result<(), ChartError> {
    root.draw(&Circle::new((x, y), 17, WHITE.filled()))
        .map_err(draw_err)?;
    root.draw(&Circle::new((x, y), 17, BRACE.stroke_width(4)))
        .map_err(draw_err)?;
    for (a, b) in [((-11, -11), (11, 11)), ((-11, 11), (11, -11))] {
        root.draw(&PathElement::new(
            vec![(x + a.0, y + a.1), (x + b.0, y + b.1)],
            BRACE.stroke_width(4),
        ))
        .map_err(draw_err)?;
    }
    if spring {
        text(
            root,
            "k",
            (x + 22, y - 6),
            HPos::Left,
            VPos::Bottom,
            style::SMALL,
        )?;
    }
    Ok(())
}

fn brace_twist(root: &Area, (x, y): (i32, i32)) -> Result<(), ChartError> {
    root.draw(&Circle::new((x, y), 26, BRACE.stroke_width(3)))
        .map_err(draw_err)?;
    root.draw(&Circle::new((x, y), 33, BRACE.stroke_width(3)))
        .map_err(draw_err)
}

fn load_arrow(
    root: &Area,
    x: i32,
    y: i32,
    fz: f64,
    len: i32,
    both: bool,
) -> Result<(), ChartError> {
    if fz <= 0.0 {
        arrow(root, (x, y - len), (x, y), LOAD, 6)?;
    } else {
        arrow(root, (x, y + len), (x, y), LOAD, 6)?;
    }
    if both {
        // The reversed load, drawn light beside it.
        let x2 = x - 34;
        if fz <= 0.0 {
            arrow(
                root,
                (x2, y),
                (x2, y - len + 20),
                LOAD.mix(0.45).to_rgba().into_color(),
                4,
            )?;
        } else {
            arrow(
                root,
                (x2, y),
                (x2, y + len - 20),
                LOAD.mix(0.45).to_rgba().into_color(),
                4,
            )?;
        }
    }
    root.draw(&Circle::new((x, y), 9, LOAD.filled()))
        .map_err(draw_err)
}

trait IntoRgb {
    fn into_color(self) -> RGBColor;
}
impl IntoRgb for RGBAColor {
    // A light tint of the colour on white (plotters' opacity is written as
    // an attribute; an opaque tint prints the same in every renderer).
    fn into_color(self) -> RGBColor {
        let t = |c: u8| (255.0 - (255.0 - c as f64) * self.3).round() as u8;
        RGBColor(t(self.0), t(self.1), t(self.2))
    }
}

fn moment(root: &Area, (x, y): (i32, i32), dir: i32, v: f64) -> Result<(), ChartError> {
    // A three-quarter arc with an arrow head; sagging moments turn so that
    // the top fibres shorten.
    let r = 46.0;
    let n = 24;
    let sgn = if (v > 0.0) == (dir < 0) { 1.0 } else { -1.0 };
    let pts: Vec<(i32, i32)> = (0..=n)
        .map(|i| {
            let a = std::f64::consts::PI * (0.25 + 1.5 * i as f64 / n as f64) * sgn;
            (
                x + (r * a.cos()).round() as i32,
                y - (r * a.sin()).round() as i32,
            )
        })
        .collect();
    root.draw(&PathElement::new(
        pts[..n - 2].to_vec(),
        LOAD.stroke_width(5),
    ))
    .map_err(draw_err)?;
    arrow(root, pts[n - 3], pts[n], LOAD, 5)?;
    text(
        root,
        "M",
        (x + dir * 58, y - 50),
        if dir < 0 { HPos::Right } else { HPos::Left },
        VPos::Center,
        TEXT,
    )
}

fn section(root: &Area, s: &Schematic, g: &Geo) -> Result<(), ChartError> {
    let m = &s.member;
    let xc = 1400;
    let half = 70;
    let (yt, yb) = (g.y(g.flange), g.y(-g.flange));
    text(
        root,
        "section",
        (xc, 100 + 60),
        HPos::Center,
        VPos::Bottom,
        TEXT,
    )?;
    for y in [yt, yb] {
        root.draw(&Rectangle::new(
            [(xc - half, y - 8), (xc + half, y + 8)],
            MEMBER.filled(),
        ))
        .map_err(draw_err)?;
    }
    root.draw(&Rectangle::new(
        [(xc - 4, yt), (xc + 4, yb)],
        MEMBER.filled(),
    ))
    .map_err(draw_err)?;
    // Shear centre.
    root.draw(&Circle::new((xc, g.yc), 11, WHITE.filled()))
        .map_err(draw_err)?;
    root.draw(&Circle::new((xc, g.yc), 11, INK.stroke_width(3)))
        .map_err(draw_err)?;
    // Heights, labelled on the right; labels pushed apart where close.
    let mut marks: Vec<(f64, String, RGBColor)> = Vec::new();
    marks.push((g.flange, "top flange".into(), INK));
    marks.push((0.0, "shear centre".into(), INK));
    marks.push((-g.flange, "bottom flange".into(), INK));
    let mut load_zetas: Vec<(String, f64)> = s.load_heights.clone();
    if load_zetas.is_empty() {
        for l in &m.loads {
            if let Load::Point { zeta, .. } | Load::Distributed { zeta, .. } = l {
                load_zetas.push((format!("load ζ = {}", fmt_tick(*zeta, 2)), *zeta));
            }
        }
    }
    for (label, z) in &load_zetas {
        marks.push((*z, label.clone(), LOAD));
        let y = g.y(*z);
        root.draw(&Circle::new((xc - half - 30, y), 8, LOAD.filled()))
            .map_err(draw_err)?;
        root.draw(&PathElement::new(
            vec![(xc - half - 30, y), (xc + half + 12, y)],
            LOAD.stroke_width(2),
        ))
        .map_err(draw_err)?;
    }
    for r in &m.restraints {
        let y = g.y(r.zeta);
        if !r.lateral.is_free() {
            brace_lateral(root, (xc - half - 70, y), r.lateral.spring().is_some())?;
            marks.push((r.zeta, format!("brace ζ = {}", fmt_tick(r.zeta, 2)), BRACE));
        }
    }
    for c in &m.continuous {
        marks.push((c.zeta, format!("cont. ζ = {}", fmt_tick(c.zeta, 2)), BRACE));
    }
    marks.sort_by(|a, b| b.0.total_cmp(&a.0));
    let mut ys: Vec<i32> = marks.iter().map(|mk| g.y(mk.0)).collect();
    for i in 1..ys.len() {
        if ys[i] < ys[i - 1] + 36 {
            ys[i] = ys[i - 1] + 36;
        }
    }
    let lx = xc + half + 40;
    for (mk, &ly) in marks.iter().zip(&ys) {
        let y = g.y(mk.0);
        root.draw(&PathElement::new(
            vec![(xc + half + 12, y), (lx - 6, ly)],
            FAINT.stroke_width(2),
        ))
        .map_err(draw_err)?;
        root.draw(&Text::new(
            mk.1.clone(),
            (lx, ly),
            anchored(font(style::SMALL + 4.0), HPos::Left, VPos::Center).color(&mk.2),
        ))
        .map_err(draw_err)?;
    }
    Ok(())
}

fn table(root: &Area, m: &Member, g: &Geo) -> Result<(), ChartError> {
    let cols = columns(m);
    let top = 770;
    let row_h = 56;
    let size = TEXT - 2.0;
    text(
        root,
        "out of plane:",
        (MARGIN, top - 52),
        HPos::Left,
        VPos::Center,
        size,
    )?;
    for (i, r) in ROWS.iter().enumerate() {
        text(
            root,
            r,
            (MARGIN, top + 30 + row_h * i as i32),
            HPos::Left,
            VPos::Center,
            size,
        )?;
    }
    // Column positions: at the member position, pushed apart where close.
    let mut xs: Vec<i32> = cols.iter().map(|c| g.x(c.at)).collect();
    for i in 1..xs.len() {
        if xs[i] < xs[i - 1] + 170 {
            xs[i] = xs[i - 1] + 170;
        }
    }
    let yb = g.y(-g.flange);
    for (c, &x) in cols.iter().zip(&xs) {
        let xm = g.x(c.at);
        root.draw(&PathElement::new(
            vec![(xm, yb + 60), (x, top - 90)],
            FAINT.stroke_width(2),
        ))
        .map_err(draw_err)?;
        text(
            root,
            &c.heading,
            (x, top - 86),
            HPos::Center,
            VPos::Top,
            style::SMALL + 2.0,
        )?;
        text(
            root,
            &c.what,
            (x, top - 56),
            HPos::Center,
            VPos::Top,
            style::SMALL + 2.0,
        )?;
        for (i, cell) in c.cells.iter().enumerate() {
            let y = top + 30 + row_h * i as i32;
            glyph(root, (x, y), *cell)?;
        }
    }
    Ok(())
}

fn glyph(root: &Area, (x, y): (i32, i32), f: Option<Fixity>) -> Result<(), ChartError> {
    let h = 17;
    match f {
        None => Ok(()),
        Some(f) if f.is_fixed() => root
            .draw(&Rectangle::new(
                [(x - h, y - h), (x + h, y + h)],
                HELD.filled(),
            ))
            .map_err(draw_err),
        Some(f) if f.spring().is_some() => {
            // Outlined square (plotters writes no stroke width for outlined
            // rectangles, so: a filled square with a white core).
            root.draw(&Rectangle::new(
                [(x - h, y - h), (x + h, y + h)],
                HELD.filled(),
            ))
            .map_err(draw_err)?;
            root.draw(&Rectangle::new(
                [(x - h + 4, y - h + 4), (x + h - 4, y + h - 4)],
                WHITE.filled(),
            ))
            .map_err(draw_err)?;
            text(root, "k", (x, y), HPos::Center, VPos::Center, TEXT - 4.0)
        }
        Some(_) => root
            .draw(&PathElement::new(
                vec![(x - 12, y), (x + 12, y)],
                FAINT.stroke_width(4),
            ))
            .map_err(draw_err),
    }
}

fn key(root: &Area) -> Result<(), ChartError> {
    let y0 = 1030;
    let size = style::SMALL + 4.0;
    text(root, "key:", (MARGIN, y0), HPos::Left, VPos::Center, size)?;
    let mut x = MARGIN + 80;
    let mut y = y0;
    let items: [(&str, u8); 8] = [
        ("held", 0),
        ("spring", 1),
        ("free", 2),
        ("lateral brace at its height", 3),
        ("twist brace", 4),
        ("load at its height", 5),
        ("built in (in plane)", 6),
        ("vertical support", 7),
    ];
    for (label, k) in items {
        let w = 60 + style::text_width(label, size) as i32 + 40;
        if x + w > WIDTH as i32 - MARGIN {
            x = MARGIN + 80;
            y += 64;
        }
        match k {
            0 => glyph(root, (x + 20, y), Some(Fixity::Fixed))?,
            1 => glyph(root, (x + 20, y), Some(Fixity::Spring(1.0)))?,
            2 => glyph(root, (x + 20, y), Some(Fixity::Free))?,
            3 => brace_lateral(root, (x + 20, y), false)?,
            4 => brace_twist(root, (x + 20, y))?,
            5 => arrow(root, (x + 20, y - 26), (x + 20, y + 18), LOAD, 5)?,
            6 => {
                root.draw(&PathElement::new(
                    vec![(x + 20, y - 24), (x + 20, y + 24)],
                    INK.stroke_width(6),
                ))
                .map_err(draw_err)?;
                for d in [-24, -8, 8] {
                    root.draw(&PathElement::new(
                        vec![(x + 20, y + d + 16), (x + 4, y + d)],
                        INK.stroke_width(3),
                    ))
                    .map_err(draw_err)?;
                }
            }
            _ => triangle(root, x + 20, y - 24)?,
        }
        text(root, label, (x + 60, y), HPos::Left, VPos::Center, size)?;
        x += w;
    }
    Ok(())
}
