//! The sweep driver: families (a base case plus axes) solved over their grid,
//! in parallel, written as CSV tables in axis order, with a manifest last.
//!
//! A family's grid is the Cartesian product of its axes in the order they
//! appear in the spec, the last varying fastest. Each point changes the
//! resolved base case (κ, the height of the transverse loads or of a named
//! one, the load direction) and is solved on its own — no warm start from
//! another case — so a row is exactly the engine's single solve. Rows are
//! solved in chunks on a rayon pool and written in order, so the output is
//! byte-identical whatever the thread count, and memory stays bounded.

pub mod cache;
pub mod path;
mod physical;
pub mod run;
pub mod spec;
mod variant;

use crate::case::ResolvedCase;
use crate::model::{Load, Member};
use crate::report::le_over_l;
use crate::solve::{self, Settings, Status};
use std::f64::consts::PI;
use std::io::{self, Write};

/// Load direction of a grid point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Direction {
    /// The loads as given in the case.
    Down,
    /// Every load reversed (uplift for gravity loads).
    Up,
}

/// A value on the ζ axis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum AxisValue {
    /// A plain number.
    Num(f64),
    /// A multiple of the point's κ (flange lines of a doubly symmetric I-section at ±1).
    KappaTimes(f64),
}

/// One axis of a family.
#[derive(Debug, Clone, PartialEq)]
pub enum Axis {
    /// Torsion parameter values.
    Kappa(Vec<f64>),
    /// Load heights.
    Zeta(Vec<AxisValue>),
    /// Load directions.
    Direction(Vec<Direction>),
    /// End-condition variants (indices into [`Family::variants`]).
    Variant(Vec<usize>),
    /// Backspan-to-overhang length ratios (with [`Family::backspan`]).
    Backspan(Vec<f64>),
    /// A physical axis (`section`, `length` or `height`): values patched
    /// into a physical base case, resolved into [`Family::patched`].
    Case {
        /// Column name: "section", "length" or "height".
        column: &'static str,
        /// The values as written (sections by their label).
        labels: Vec<String>,
    },
    /// Any numeric field of the case, by path (see [`path`]).
    Path {
        /// The path as written (the CSV column name).
        name: String,
        /// The resolved field.
        field: path::FieldPath,
        /// Values, in the model's dimensionless units.
        values: Vec<f64>,
    },
}

/// A named end-condition variant: the base case with a patch merged in.
#[derive(Debug, Clone)]
pub struct Variant {
    /// File-name-safe name (the `variant` column).
    pub name: String,
    /// The resolved case of this variant.
    pub case: ResolvedCase,
    /// Restraints whose height follows κ: (restraint index, multiple of κ).
    pub kappa_zetas: Vec<(usize, f64)>,
}

impl Axis {
    /// The CSV column name.
    pub fn column(&self) -> &str {
        match self {
            Axis::Kappa(_) => "kappa",
            Axis::Zeta(_) => "zeta",
            Axis::Direction(_) => "direction",
            Axis::Variant(_) => "variant",
            Axis::Backspan(_) => "backspan_ratio",
            Axis::Case { column, .. } => column,
            Axis::Path { name, .. } => name,
        }
    }
    /// True when the axis has no value (never for a parsed spec).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Number of values on the axis.
    pub fn len(&self) -> usize {
        match self {
            Axis::Kappa(v) => v.len(),
            Axis::Zeta(v) => v.len(),
            Axis::Direction(v) => v.len(),
            Axis::Variant(v) => v.len(),
            Axis::Backspan(v) => v.len(),
            Axis::Case { labels, .. } => labels.len(),
            Axis::Path { values, .. } => values.len(),
        }
    }
}

/// A family: a base case and its axes.
#[derive(Debug, Clone)]
pub struct Family {
    /// File-name-safe name.
    pub name: String,
    /// The resolved base case.
    pub case: ResolvedCase,
    /// Axes in spec order.
    pub axes: Vec<Axis>,
    /// ζ applies to this named load only (else to every transverse load).
    pub zeta_load: Option<String>,
    /// End-condition variants, if the family has a `variant` axis.
    pub variants: Vec<Variant>,
    /// The backspan in front of the case (with a `backspan_ratio` axis):
    /// the case is the overhang and stays the reference length.
    pub backspan: Option<Backspan>,
    /// With physical axes: the resolved case of every combination of the
    /// variant (or the base case) and the physical axes' values, indexed by
    /// `variant · P + combination` (combination in axis order, last fastest).
    pub patched: Vec<ResolvedCase>,
}

/// A backspan in front of an overhang case (see [`crate::model::backspan`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Backspan {
    /// Support at the far end of the backspan.
    pub far: crate::model::Support,
    /// Whether the overhang's distributed loads continue over the backspan.
    pub loads: crate::model::backspan::BackspanLoads,
}

/// One grid point, resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct Point {
    /// κ of the point.
    pub kappa: f64,
    /// ζ of the point (None when the case has no transverse load to carry it).
    pub zeta: Option<f64>,
    /// Load direction.
    pub direction: Direction,
    /// Variant name (None without a variant axis).
    pub variant: Option<String>,
    /// Values of the path axes, in axis order.
    pub paths: Vec<f64>,
    /// Backspan-to-overhang ratio (None without a backspan axis).
    pub backspan: Option<f64>,
    /// Mcr in kN·m per unit of μcr (physical cases only).
    pub mcr_scale: Option<f64>,
    /// (column, value) of the physical axes, in axis order.
    pub case_labels: Vec<(&'static str, String)>,
    /// The member to solve (with a backspan: the whole beam).
    pub member: Member,
}

impl Point {
    /// A point that is just `member` (no family axes): κ from the member, ζ
    /// none, loads as given.
    pub fn of_member(member: Member) -> Point {
        Point {
            kappa: member.kappa,
            zeta: None,
            direction: Direction::Down,
            variant: None,
            paths: Vec::new(),
            backspan: None,
            mcr_scale: None,
            case_labels: Vec::new(),
            member,
        }
    }

    /// Factor from the solved member's μ to the point's reference length
    /// (the overhang with a backspan; else 1).
    pub fn mu_scale(&self) -> f64 {
        self.backspan
            .map_or(1.0, crate::model::backspan::overhang_fraction)
    }
}

/// One result row.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// The point.
    pub point: Point,
    /// Outcome: the solve's status, or "error" with the message.
    pub status: String,
    /// μcr.
    pub mu_cr: Option<f64>,
    /// μ0 = π√(1+κ²).
    pub mu0: f64,
    /// Critical load factor.
    pub load_factor: Option<f64>,
    /// Relative error estimate.
    pub error_estimate: Option<f64>,
    /// Elements of the finest mesh.
    pub elements: usize,
}

impl Family {
    /// Number of grid points.
    pub fn size(&self) -> usize {
        self.checked_size().unwrap_or(usize::MAX)
    }

    /// Number of grid points, or None when it does not fit in a usize.
    pub fn checked_size(&self) -> Option<usize> {
        self.axes
            .iter()
            .try_fold(1usize, |a, x| a.checked_mul(x.len()))
    }

    /// Index into [`Family::patched`] of axis indices `idx`.
    fn patched_index(&self, idx: &[usize]) -> usize {
        let mut vi = 0;
        let mut comb = 0;
        for (a, &ix) in self.axes.iter().zip(idx) {
            match a {
                Axis::Variant(v) => vi = v[ix],
                Axis::Case { labels, .. } => comb = comb * labels.len() + ix,
                _ => {}
            }
        }
        let p: usize = self
            .axes
            .iter()
            .map(|a| match a {
                Axis::Case { labels, .. } => labels.len(),
                _ => 1,
            })
            .product();
        vi * p + comb
    }

    /// True when the family's cases are physical (Mcr in kN·m is written).
    pub fn is_physical(&self) -> bool {
        matches!(self.case.kind, crate::case::CaseKind::Physical(_))
    }

    /// The point with linear index `i` (last axis fastest).
    pub fn point(&self, i: usize) -> Point {
        let mut idx = vec![0; self.axes.len()];
        let mut r = i;
        for (a, ix) in self.axes.iter().zip(idx.iter_mut()).rev() {
            *ix = r % a.len();
            r /= a.len();
        }
        self.point_at(&idx, None, None)
    }

    /// The point at axis indices `idx` (one per axis, in axis order), with
    /// κ and/or ζ optionally replaced by free values off the grid (for
    /// validation grids and frontier refinement): `kappa` replaces the κ
    /// axis value, and restraint heights and ζ values written as multiples
    /// of κ follow it; `zeta` replaces the ζ axis value (a plain height).
    pub fn point_at(&self, idx: &[usize], kappa: Option<f64>, zeta: Option<f64>) -> Point {
        self.point_with(idx, kappa, zeta, &[])
    }

    /// [`Family::point_at`] with path axes set off their grid values:
    /// `paths` holds (axis index in [`Family::axes`], value) pairs, each
    /// replacing that path axis's value (for fits that span δ).
    pub fn point_with(
        &self,
        idx: &[usize],
        kappa: Option<f64>,
        zeta: Option<f64>,
        paths: &[(usize, f64)],
    ) -> Point {
        assert_eq!(idx.len(), self.axes.len(), "one index per axis");
        let path_value = |a: usize, v: f64| paths.iter().find(|p| p.0 == a).map_or(v, |p| p.1);
        let mut variant: Option<&Variant> = None;
        for (a, &ix) in self.axes.iter().zip(idx) {
            if let Axis::Variant(v) = a {
                variant = Some(&self.variants[v[ix]]);
            }
        }
        let case = if self.patched.is_empty() {
            variant.map_or(&self.case, |v| &v.case)
        } else {
            &self.patched[self.patched_index(idx)]
        };
        let mut m = case.member.clone();
        let mut direction = Direction::Down;
        let mut zeta_value: Option<AxisValue> = None;
        for (a, &ix) in self.axes.iter().zip(idx) {
            match a {
                Axis::Kappa(v) => m.kappa = v[ix],
                Axis::Zeta(v) => zeta_value = Some(zeta.map_or(v[ix], AxisValue::Num)),
                Axis::Direction(v) => direction = v[ix],
                Axis::Variant(_) | Axis::Backspan(_) | Axis::Case { .. } | Axis::Path { .. } => {}
            }
        }
        if let Some(k) = kappa {
            m.kappa = k;
        }
        if let (Some(z), None) = (zeta, zeta_value) {
            zeta_value = Some(AxisValue::Num(z));
        }
        if let Some(v) = variant {
            for &(r, c) in &v.kappa_zetas {
                if let Some(rr) = m.restraints.get_mut(r) {
                    rr.zeta = c * m.kappa;
                }
            }
        }
        let targeted = |k: usize| match &self.zeta_load {
            Some(n) => self.case.loads.get(k).and_then(|l| l.name.as_deref()) == Some(n.as_str()),
            None => true,
        };
        if let Some(z) = zeta_value {
            let z = match z {
                AxisValue::Num(x) => x,
                AxisValue::KappaTimes(c) => c * m.kappa,
            };
            for (k, l) in m.loads.iter_mut().enumerate() {
                if targeted(k) {
                    match l {
                        Load::Point { zeta, .. } | Load::Distributed { zeta, .. } => *zeta = z,
                        Load::EndMoments { .. } => {}
                    }
                }
            }
        }
        // Path axes last among the changes, so an explicit path wins.
        for (ai, (a, &ix)) in self.axes.iter().zip(idx).enumerate() {
            if let Axis::Path { field, values, .. } = a {
                path::apply(&mut m, field, path_value(ai, values[ix]));
            }
        }
        // The direction axis sets the direction of every transverse load
        // (gravity down, uplift up); end moments are reversed for "up".
        // Without the axis the loads stay as given, and the column reports
        // the direction of the first load the ζ axis acts on.
        let has_direction_axis = self.axes.iter().any(|a| matches!(a, Axis::Direction(_)));
        if has_direction_axis {
            let s = if direction == Direction::Up {
                1.0
            } else {
                -1.0
            };
            for l in m.loads.iter_mut() {
                match l {
                    Load::Point { fz, .. } => *fz = s * fz.abs(),
                    Load::Distributed { fz_from, fz_to, .. } => {
                        *fz_from = s * fz_from.abs();
                        *fz_to = s * fz_to.abs();
                    }
                    Load::EndMoments { start, end } => {
                        if direction == Direction::Up {
                            *start = -*start;
                            *end = -*end;
                        }
                    }
                }
            }
        } else if let Some(up) = m.loads.iter().enumerate().find_map(|(k, l)| match *l {
            Load::Point { fz, .. } if targeted(k) => Some(fz > 0.0),
            Load::Distributed { fz_from, fz_to, .. } if targeted(k) => Some(fz_from + fz_to > 0.0),
            _ => None,
        }) {
            direction = if up { Direction::Up } else { Direction::Down };
        }
        let zeta = m.loads.iter().enumerate().find_map(|(k, l)| match l {
            Load::Point { zeta, .. } | Load::Distributed { zeta, .. } if targeted(k) => Some(*zeta),
            _ => None,
        });
        let backspan = self.axes.iter().zip(idx).find_map(|(a, &ix)| match a {
            Axis::Backspan(v) => Some(v[ix]),
            _ => None,
        });
        let kappa_ref = m.kappa;
        if let (Some(r), Some(b)) = (backspan, &self.backspan) {
            m = crate::model::backspan::with_backspan(&m, r, b.far, b.loads);
        }
        Point {
            kappa: kappa_ref,
            zeta,
            direction,
            variant: variant.map(|v| v.name.clone()),
            backspan,
            mcr_scale: matches!(case.kind, crate::case::CaseKind::Physical(_))
                .then_some(case.scales.moment),
            case_labels: self
                .axes
                .iter()
                .zip(idx)
                .filter_map(|(a, &ix)| match a {
                    Axis::Case { column, labels } => Some((*column, labels[ix].clone())),
                    _ => None,
                })
                .collect(),
            paths: self
                .axes
                .iter()
                .zip(idx)
                .enumerate()
                .filter_map(|(ai, (a, &ix))| match a {
                    Axis::Path { values, .. } => Some(path_value(ai, values[ix])),
                    _ => None,
                })
                .collect(),
            member: m,
        }
    }
}

/// Solve one point.
pub fn solve_point(p: Point, s: &Settings) -> Row {
    solve_point_in(&mut solve::Workspace::new(), p, s)
}

/// [`solve_point`] with a worker's reusable workspace (storage only: the
/// row does not depend on what the workspace held).
pub fn solve_point_in(ws: &mut solve::Workspace, p: Point, s: &Settings) -> Row {
    let mu0 = PI * (1.0 + p.kappa * p.kappa).sqrt();
    match solve::solve_in(ws, &p.member, s) {
        Ok(sol) => {
            let d = sol.forward;
            // Only a converged case carries numbers (issue contract: failed
            // rows keep their status and empty numbers).
            let ok = d.status == Status::Ok;
            let scale = p.mu_scale();
            Row {
                status: d.status.as_str().into(),
                mu_cr: d.mu_cr.filter(|_| ok).map(|mu| mu * scale),
                mu0,
                load_factor: d.load_factor.filter(|_| ok),
                error_estimate: ok.then_some(d.error_estimate),
                elements: d.elements,
                point: p,
            }
        }
        Err(e) => Row {
            status: format!("error: {e}"),
            mu_cr: None,
            mu0,
            load_factor: None,
            error_estimate: None,
            elements: 0,
            point: p,
        },
    }
}

/// Columns every family's CSV carries for the point (after its axis columns).
pub const POINT_COLUMNS: [&str; 3] = ["kappa", "zeta", "direction"];

/// Result columns of every family's CSV (the contract), in order.
pub const RESULT_COLUMNS: [&str; 7] = [
    "mu_cr",
    "mu_ratio",
    "le_over_l",
    "load_factor",
    "error_estimate",
    "elements",
    "status",
];

/// The CSV header of a family.
pub fn header(f: &Family) -> Vec<String> {
    let mut h = point_columns(f);
    h.extend(RESULT_COLUMNS.map(String::from));
    if f.is_physical() {
        h.push(MCR_COLUMN.to_string());
    }
    h
}

/// Extra result column of physical families: Mcr in kN·m.
pub const MCR_COLUMN: &str = "mcr_knm";

/// A number as CSV text: shortest round-trip form, −0 as 0.
pub fn fmt_num(x: f64) -> String {
    if x == 0.0 {
        "0".into()
    } else if x.abs() >= 1e15 || x.abs() < 1e-5 {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

fn opt(x: Option<f64>) -> String {
    x.filter(|v| v.is_finite()).map(fmt_num).unwrap_or_default()
}

/// What the model leaves out, printed with every table (domain notes).
pub const CAVEATS: &str = "elastic critical values for a rigid cross-section with the restraints stated; pre-buckling \
deflections ignored (conservative); web distortion ignored (unconservative for slender webs and for restraints on the \
tension flange only); a cantilever's root warping condition is stated with its case below";

/// The `#` lines that open a family's CSV.
pub fn preamble(w: &mut dyn Write, f: &Family, spec_hash: &str, tolerance: f64) -> io::Result<()> {
    writeln!(w, "# {}", crate::CAUTION)?;
    writeln!(w, "# {CAVEATS}")?;
    writeln!(
        w,
        "# base case (before the axes act): {}",
        crate::report::case_summary(&f.case.member)
    )?;
    for v in &f.variants {
        let follows: Vec<String> = v
            .kappa_zetas
            .iter()
            .map(|(i, c)| format!("restraint {} at zeta = {}*kappa", i + 1, fmt_num(*c)))
            .collect();
        let follows = if follows.is_empty() {
            String::new()
        } else {
            format!(
                " (heights following the kappa axis: {})",
                follows.join(", ")
            )
        };
        writeln!(
            w,
            "# variant {}: {}{follows}",
            v.name,
            crate::report::case_summary(&v.case.member)
        )?;
    }
    writeln!(
        w,
        "# family {}: {} cases; ltb-atlas {}; spec sha256 {spec_hash}; solver tolerance {}",
        f.name,
        f.size(),
        env!("CARGO_PKG_VERSION"),
        fmt_num(tolerance)
    )?;
    writeln!(
        w,
        "# units: kappa = (pi/L)*sqrt(E*Iw/(G*It)); zeta = (pi*a/L)*sqrt(E*Iz/(G*It)) with a the load height above the shear centre; \
         direction down = every transverse load downward (gravity), up = every transverse load upward (uplift, end moments reversed), without a direction axis the direction of the loads as given; mu_cr = Mcr*L/sqrt(E*Iz*G*It) with Mcr the largest |M|; \
         mu_ratio = mu_cr/(pi*sqrt(1+kappa^2)) (equals C1 only with forks and zeta = 0); le_over_l = length ratio giving the same Mcr \
         in the uniform-moment fork formula; load_factor dimensionless; error_estimate relative; elements count"
    )?;
    if f.is_physical() {
        writeln!(
            w,
            "# physical family: kappa and zeta are derived from each case's section, length, material and load heights \
             (E and G of the case's [material], default 210000 and 81000 MPa); mcr_knm = Mcr in kN*m; section, length and \
             height columns hold the values as written in the spec"
        )?;
    }
    if let Some(b) = &f.backspan {
        writeln!(
            w,
            "# backspan: L is the overhang (root to tip) and the reference length of kappa, zeta and mu_cr; a backspan of \
             backspan_ratio*L lies in front of the root, whose support is the case's start support; far end of the backspan: {}; \
             backspan loads: {}; load_factor refers to the loads as given; Mcr is the largest |M| over the whole beam",
            crate::report::support_summary(&b.far),
            match b.loads {
                crate::model::backspan::BackspanLoads::None => "none",
                crate::model::backspan::BackspanLoads::Continue =>
                    "the overhang's distributed loads continue with the same intensity and height",
            }
        )?;
    }
    writeln!(
        w,
        "# status: ok | no-buckling | not-converged | error: ... (failed cases keep their row with empty numbers)"
    )?;
    Ok(())
}

/// The point's columns of a family (its axes, then kappa, zeta, direction
/// where they are not axes), in header order.
pub fn point_columns(f: &Family) -> Vec<String> {
    let mut h: Vec<String> = f.axes.iter().map(|a| a.column().to_string()).collect();
    for c in POINT_COLUMNS {
        if !h.iter().any(|x| x == c) {
            h.push(c.to_string());
        }
    }
    h
}

/// The point's values for [`point_columns`], as the CSV writes them.
pub fn point_values(f: &Family, p: &Point) -> Vec<String> {
    let mut paths = p.paths.iter();
    point_columns(f)
        .iter()
        .map(|c| match c.as_str() {
            "kappa" => fmt_num(p.kappa),
            "zeta" => opt(p.zeta),
            "direction" => if p.direction == Direction::Up {
                "up"
            } else {
                "down"
            }
            .into(),
            "variant" => p.variant.clone().unwrap_or_default(),
            "backspan_ratio" => opt(p.backspan),
            "section" | "length" | "height" => p
                .case_labels
                .iter()
                .find(|(col, _)| col == c)
                .map(|(_, v)| v.clone())
                .unwrap_or_default(),
            _ => paths.next().map(|v| fmt_num(*v)).unwrap_or_default(),
        })
        .collect()
}

/// Write one row.
pub fn write_row<W: Write>(w: &mut csv::Writer<W>, f: &Family, r: &Row) -> Result<(), csv::Error> {
    let p = &r.point;
    let mut rec = point_values(f, p);
    for c in &header(f)[rec.len()..] {
        rec.push(match c.as_str() {
            MCR_COLUMN => opt(r.mu_cr.zip(p.mcr_scale).map(|(m, s)| m * s)),
            "mu_cr" => opt(r.mu_cr),
            "mu_ratio" => opt(r.mu_cr.map(|m| m / r.mu0)),
            "le_over_l" => opt(r.mu_cr.map(|m| le_over_l(m, p.kappa))),
            "load_factor" => opt(r.load_factor),
            "error_estimate" => opt(r.error_estimate),
            "elements" => r.elements.to_string(),
            _ => r.status.clone(),
        });
    }
    w.write_record(&rec)
}

/// What a print table needs of one row.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cell {
    /// μcr, if the case buckled.
    pub mu_cr: Option<f64>,
    /// Its relative error estimate.
    pub error_estimate: Option<f64>,
    /// True when the status is "ok".
    pub ok: bool,
    /// Mcr in kN·m (physical cases).
    pub mcr: Option<f64>,
}

impl From<&Row> for Cell {
    fn from(r: &Row) -> Cell {
        Cell {
            mu_cr: r.mu_cr,
            error_estimate: r.error_estimate,
            ok: r.status == "ok",
            mcr: r.mu_cr.zip(r.point.mcr_scale).map(|(m, s)| m * s),
        }
    }
}

/// A critical value `x` (a finite-element upper bound with relative error
/// estimate `e`) printed on the safe side: the lower end x·(1 − e) of its
/// bracket, rounded down to the last decimal the absolute error x·e leaves
/// meaningful:
///
/// ```text
/// q = ⌈log10(x·e)⌉,   printed = ⌊x·(1 − e) / 10^q⌋ · 10^q   with max(0, −q) decimals
/// ```
pub fn round_down(x: f64, estimate: f64) -> String {
    let e = estimate.clamp(1e-12, 0.5);
    let err = (x.abs() * e).max(f64::MIN_POSITIVE);
    let q = err.log10().ceil() as i32;
    let step = 10f64.powi(q);
    // The finite-element value is an upper bound and its relative error is
    // at most e, so the exact value is at least x·(1 − e): round that down.
    let v = (x * (1.0 - e) / step).floor() * step;
    let decimals = (-q).max(0) as usize;
    let s = format!("{:.*}", decimals, v);
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

fn axis_label(a: &Axis, i: usize, f: &Family) -> String {
    match a {
        Axis::Kappa(v) => fmt_num(v[i]),
        Axis::Zeta(v) => match v[i] {
            AxisValue::Num(x) => fmt_num(x),
            AxisValue::KappaTimes(1.0) => "kappa".into(),
            AxisValue::KappaTimes(-1.0) => "-kappa".into(),
            AxisValue::KappaTimes(c) => format!("{}*kappa", fmt_num(c)),
        },
        Axis::Direction(v) => if v[i] == Direction::Up { "up" } else { "down" }.into(),
        Axis::Variant(v) => f.variants[v[i]].name.clone(),
        Axis::Backspan(v) => fmt_num(v[i]),
        Axis::Case { labels, .. } => labels[i].clone(),
        Axis::Path { values, .. } => fmt_num(values[i]),
    }
}

/// One combination of a family's axes other than κ and ζ (direction,
/// variant, path axes): the unit of print tables, fits, rule checks and
/// charts.
#[derive(Debug, Clone, PartialEq)]
pub struct Combination {
    /// File-name-safe name: the axis values joined by '_' (which no part
    /// contains), or "all" when the family has no other axis.
    pub name: String,
    /// (column, value as written) of each other axis, in spec order.
    pub labels: Vec<(String, String)>,
    /// Indices of the other axes in [`Family::axes`].
    pub axes: Vec<usize>,
    /// A full axis index vector with the other axes set (κ and ζ at 0).
    pub index: Vec<usize>,
}

/// File-name-safe form of an axis value: ASCII letters (lower-cased),
/// digits, '.', '-', '+'; anything else becomes '-'.
pub fn safe_name(t: &str) -> String {
    t.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '.' || c == '-' || c == '+' {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect()
}

/// The combinations of a family's axes other than κ and ζ, in grid order.
pub fn combinations(f: &Family) -> Vec<Combination> {
    let skip: Vec<usize> = f
        .axes
        .iter()
        .enumerate()
        .filter(|(_, a)| matches!(a, Axis::Kappa(_) | Axis::Zeta(_)))
        .map(|(i, _)| i)
        .collect();
    combinations_without(f, &skip)
}

/// The combinations of a family's axes other than those in `skip`, in grid
/// order, named like [`combinations`].
pub fn combinations_without(f: &Family, skip: &[usize]) -> Vec<Combination> {
    let lens: Vec<usize> = f.axes.iter().map(Axis::len).collect();
    let others: Vec<usize> = (0..f.axes.len()).filter(|a| !skip.contains(a)).collect();
    let count: usize = others.iter().map(|&a| lens[a]).product();
    (0..count)
        .map(|c| {
            let mut idx = vec![0; f.axes.len()];
            let mut r = c;
            for &a in others.iter().rev() {
                idx[a] = r % lens[a];
                r /= lens[a];
            }
            let labels: Vec<(String, String)> = others
                .iter()
                .map(|&a| {
                    (
                        f.axes[a].column().to_string(),
                        axis_label(&f.axes[a], idx[a], f),
                    )
                })
                .collect();
            let name = if labels.is_empty() {
                "all".to_string()
            } else {
                labels
                    .iter()
                    .map(|(_, v)| safe_name(v))
                    .collect::<Vec<_>>()
                    .join("_")
            };
            Combination {
                name,
                labels,
                axes: others.clone(),
                index: idx,
            }
        })
        .collect()
}

/// The combination name of grid point `i` (see [`combinations`]).
pub fn combination_of(f: &Family, i: usize) -> String {
    let lens: Vec<usize> = f.axes.iter().map(Axis::len).collect();
    let mut idx = vec![0; f.axes.len()];
    let mut r = i;
    for (a, ix) in idx.iter_mut().enumerate().rev() {
        *ix = r % lens[a];
        r /= lens[a];
    }
    let parts: Vec<String> = f
        .axes
        .iter()
        .zip(&idx)
        .filter(|(a, _)| !matches!(a, Axis::Kappa(_) | Axis::Zeta(_)))
        .map(|(a, &ix)| safe_name(&axis_label(a, ix, f)))
        .collect();
    if parts.is_empty() {
        "all".to_string()
    } else {
        parts.join("_")
    }
}

/// Wide tables of a family: the values of `row` down and of `col` across
/// (one column headed `single` without a `col` axis), one table per
/// combination of the other axes (in spec order, named like
/// [`combinations`]), each value the lower end of its error bracket rounded
/// down ([`round_down`]); a case that did not end "ok" shows "not-ok".
struct Wide<'a> {
    row: usize,
    col: Option<usize>,
    single: &'a str,
    what: &'a str,
    value: fn(&Cell) -> Option<f64>,
}

fn wide_tables(
    f: &Family,
    cells: &[Cell],
    spec_hash: &str,
    w: &Wide<'_>,
) -> Vec<(String, Vec<u8>)> {
    let lens: Vec<usize> = f.axes.iter().map(Axis::len).collect();
    let index = |idx: &[usize]| idx.iter().zip(&lens).fold(0, |acc, (i, n)| acc * n + i);
    let skip: Vec<usize> = std::iter::once(w.row).chain(w.col).collect();
    let mut out = Vec::new();
    for combo in combinations_without(f, &skip) {
        let mut idx = combo.index.clone();
        let (labels, name) = (&combo.labels, &combo.name);
        let mut b: Vec<u8> = Vec::new();
        let _ = writeln!(b, "# {}", crate::CAUTION);
        let _ = writeln!(
            b,
            "# family {} ({}); ltb-atlas {}; spec sha256 {spec_hash}",
            f.name,
            if labels.is_empty() {
                "all cases".to_string()
            } else {
                labels
                    .iter()
                    .map(|(k, v)| format!("{k} = {v}"))
                    .collect::<Vec<_>>()
                    .join(", ")
            },
            env!("CARGO_PKG_VERSION")
        );
        let _ = writeln!(b, "# {}", CAVEATS);
        let _ = writeln!(b, "# {}", w.what);
        let mut header = vec![f.axes[w.row].column().to_string()];
        match w.col {
            Some(h) => header.extend(
                (0..lens[h])
                    .map(|i| format!("{}={}", f.axes[h].column(), axis_label(&f.axes[h], i, f))),
            ),
            None => header.push(w.single.to_string()),
        }
        let _ = writeln!(b, "{}", header.join(","));
        for ri in 0..lens[w.row] {
            idx[w.row] = ri;
            let mut line = vec![axis_label(&f.axes[w.row], ri, f)];
            for ci in 0..w.col.map_or(1, |h| lens[h]) {
                if let Some(h) = w.col {
                    idx[h] = ci;
                }
                let cell = &cells[index(&idx)];
                line.push(match (cell.ok, (w.value)(cell), cell.error_estimate) {
                    (true, Some(m), Some(e)) => round_down(m, e),
                    _ => "not-ok".into(),
                });
            }
            let _ = writeln!(b, "{}", line.join(","));
        }
        out.push((format!("{}.{name}.table.csv", f.name), b));
    }
    out
}

/// Wide print tables of a family with both a κ and a ζ axis: μcr with κ
/// down and ζ across, one table per combination of the other axes (in spec
/// order), values rounded down to the digits their error estimate supports;
/// a case that did not end "ok" shows its status. A physical family with a
/// `length` axis gets Mcr (kN·m) with the length down and the load height
/// across (one column without a height axis). Returns (file name, bytes).
pub fn print_tables(f: &Family, cells: &[Cell], spec_hash: &str) -> Vec<(String, Vec<u8>)> {
    let find = |c: &str| {
        f.axes
            .iter()
            .position(|a| matches!(a, Axis::Case { column, .. } if *column == c))
    };
    if f.is_physical() {
        let Some(row) = find("length") else {
            return Vec::new();
        };
        return wide_tables(
            f,
            cells,
            spec_hash,
            &Wide {
                row,
                col: find("height"),
                single: MCR_COLUMN,
                what: "Mcr in kN·m (the largest |M| at the elastic critical load), length down, load height across; values \
                       rounded down to the digits their error estimate supports",
                value: |c| c.mcr,
            },
        );
    }
    let ka = f.axes.iter().position(|a| matches!(a, Axis::Kappa(_)));
    let za = f.axes.iter().position(|a| matches!(a, Axis::Zeta(_)));
    let (Some(row), Some(col)) = (ka, za) else {
        return Vec::new();
    };
    wide_tables(
        f,
        cells,
        spec_hash,
        &Wide {
            row,
            col: Some(col),
            single: "mu_cr",
            what: "mu_cr = Mcr*L/sqrt(E*Iz*G*It), kappa down, zeta across (height above the shear centre; \"kappa\" = top flange \
                   centroid of a doubly symmetric I-section); values rounded down to the digits their error estimate supports",
            value: |c| c.mu_cr,
        },
    )
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_down_keeps_the_digits_the_estimate_supports() {
        // Absolute error 3.7787·7e-5 = 2.6e-4 → three decimals; the lower end
        // of the bracket, 3.7785, rounded down.
        assert_eq!(round_down(3.778761, 7e-5), "3.778");
        // 3.778761·(1 − 1e-7) = 3.7787606 → six decimals, rounded down.
        assert_eq!(round_down(3.778761, 1e-7), "3.778760");
        // 18.4199·(1 − 5e-5) = 18.41898 → three decimals, rounded down.
        assert_eq!(round_down(18.4199, 5e-5), "18.418");
        // Never above the lower end of the bracket.
        for (x, e) in [
            (9.295345, 9.6e-5),
            (0.0123456, 3e-4),
            (1.0, 1e-4),
            (123.456, 2e-6),
        ] {
            let p: f64 = round_down(x, e).parse().unwrap();
            assert!(p <= x * (1.0 - e), "{x} {e}: {p}");
        }
        // Absolute error 1.2 → the units digit is not supported.
        assert_eq!(round_down(1234.5, 1e-3), "1230");
        assert_eq!(round_down(1234.5, 1e-4), "1234");
    }

    #[test]
    fn off_grid_points_match_grid_points_at_grid_values() {
        let text = r#"
[[family]]
name = "t"
kappa = [0.5, 1.0]
zeta = ["kappa", 0.2]
direction = ["down", "up"]
[family.case]
start = { preset = "built-in" }
end = { preset = "free" }
[[family.case.load]]
kind = "point"
at = 1.0
"#;
        let spec = spec::parse_spec(text, "t.toml", std::path::Path::new(".")).unwrap();
        let f = &spec.families[0];
        let combos = combinations(f);
        assert_eq!(combos.len(), 2);
        assert_eq!(combos[1].name, "up");
        for i in 0..f.size() {
            assert_eq!(combination_of(f, i), if i % 2 == 0 { "down" } else { "up" });
        }
        // Grid point 1: κ = 0.5, ζ = κ, up.
        let p = f.point(1);
        let q = f.point_at(&[0, 0, 1], Some(0.5), None);
        assert_eq!(p, q);
        // Off the grid: κ follows, ζ = κ follows κ; an explicit ζ wins.
        let r = f.point_at(&[0, 0, 1], Some(0.7), None);
        assert_eq!((r.kappa, r.zeta), (0.7, Some(0.7)));
        let r = f.point_at(&[0, 0, 1], Some(0.7), Some(-0.3));
        assert_eq!((r.kappa, r.zeta), (0.7, Some(-0.3)));
        assert_eq!(r.direction, Direction::Up);
    }

    #[test]
    fn kappa_multiples_parse() {
        use super::spec::parse_kappa_multiple as p;
        assert_eq!(p("kappa"), Some(1.0));
        assert_eq!(p("-kappa"), Some(-1.0));
        assert_eq!(p("1.05*kappa"), Some(1.05));
        assert_eq!(p("-0.5 * kappa"), Some(-0.5));
        assert_eq!(p("2*kapa"), None);
        assert_eq!(p("kappa*2"), None);
    }
}
