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
    pub fn column(&self) -> &'static str {
        match self {
            Axis::Kappa(_) => "kappa",
            Axis::Zeta(_) => "zeta",
            Axis::Direction(_) => "direction",
            Axis::Variant(_) => "variant",
        }
    }
    fn len(&self) -> usize {
        match self {
            Axis::Kappa(v) => v.len(),
            Axis::Zeta(v) => v.len(),
            Axis::Direction(v) => v.len(),
            Axis::Variant(v) => v.len(),
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
    /// The member to solve.
    pub member: Member,
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
        self.axes.iter().map(Axis::len).product()
    }

    /// The point with linear index `i` (last axis fastest).
    pub fn point(&self, i: usize) -> Point {
        let mut idx = vec![0; self.axes.len()];
        let mut r = i;
        for (a, ix) in self.axes.iter().zip(idx.iter_mut()).rev() {
            *ix = r % a.len();
            r /= a.len();
        }
        let mut variant: Option<&Variant> = None;
        for (a, &ix) in self.axes.iter().zip(&idx) {
            if let Axis::Variant(v) = a {
                variant = Some(&self.variants[v[ix]]);
            }
        }
        let case = variant.map_or(&self.case, |v| &v.case);
        let mut m = case.member.clone();
        let mut direction = Direction::Down;
        let mut zeta_value: Option<AxisValue> = None;
        for (a, &ix) in self.axes.iter().zip(&idx) {
            match a {
                Axis::Kappa(v) => m.kappa = v[ix],
                Axis::Zeta(v) => zeta_value = Some(v[ix]),
                Axis::Direction(v) => direction = v[ix],
                Axis::Variant(_) => {}
            }
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
        if direction == Direction::Up {
            for l in m.loads.iter_mut() {
                match l {
                    Load::Point { fz, .. } => *fz = -*fz,
                    Load::Distributed { fz_from, fz_to, .. } => {
                        *fz_from = -*fz_from;
                        *fz_to = -*fz_to;
                    }
                    Load::EndMoments { start, end } => {
                        *start = -*start;
                        *end = -*end;
                    }
                }
            }
        }
        let zeta = m.loads.iter().enumerate().find_map(|(k, l)| match l {
            Load::Point { zeta, .. } | Load::Distributed { zeta, .. } if targeted(k) => Some(*zeta),
            _ => None,
        });
        Point {
            kappa: m.kappa,
            zeta,
            direction,
            variant: variant.map(|v| v.name.clone()),
            member: m,
        }
    }
}

/// Solve one point.
pub fn solve_point(p: Point, s: &Settings) -> Row {
    let mu0 = PI * (1.0 + p.kappa * p.kappa).sqrt();
    match solve::solve(&p.member, s) {
        Ok(sol) => {
            let d = sol.forward;
            let ok = d.status != Status::NoBuckling;
            Row {
                status: d.status.as_str().into(),
                mu_cr: d.mu_cr,
                mu0,
                load_factor: d.load_factor,
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

/// The CSV header of a family.
pub fn header(f: &Family) -> Vec<&'static str> {
    let mut h: Vec<&'static str> = f.axes.iter().map(Axis::column).collect();
    for c in ["kappa", "zeta", "direction"] {
        if !h.contains(&c) {
            h.push(c);
        }
    }
    h.extend([
        "mu_cr",
        "mu_ratio",
        "le_over_l",
        "load_factor",
        "error_estimate",
        "elements",
        "status",
    ]);
    h
}

/// A number as CSV text: shortest round-trip form, −0 as 0.
pub fn fmt_num(x: f64) -> String {
    if x == 0.0 { "0".into() } else { format!("{x}") }
}

fn opt(x: Option<f64>) -> String {
    x.filter(|v| v.is_finite()).map(fmt_num).unwrap_or_default()
}

/// The `#` lines that open a family's CSV.
pub fn preamble(w: &mut dyn Write, f: &Family, spec_hash: &str, tolerance: f64) -> io::Result<()> {
    writeln!(w, "# {}", crate::CAUTION)?;
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
         direction down = loads as given, up = every load reversed; mu_cr = Mcr*L/sqrt(E*Iz*G*It) with Mcr the largest |M|; \
         mu_ratio = mu_cr/(pi*sqrt(1+kappa^2)) (equals C1 only with forks and zeta = 0); le_over_l = length ratio giving the same Mcr \
         in the uniform-moment fork formula; load_factor dimensionless; error_estimate relative; elements count"
    )?;
    writeln!(
        w,
        "# status: ok | no-buckling | not-converged | error: ... (failed cases keep their row with empty numbers)"
    )?;
    Ok(())
}

/// Write one row.
pub fn write_row(
    w: &mut csv::Writer<&mut dyn Write>,
    f: &Family,
    r: &Row,
) -> Result<(), csv::Error> {
    let mut rec: Vec<String> = Vec::new();
    for c in header(f) {
        let p = &r.point;
        rec.push(match c {
            "kappa" => fmt_num(p.kappa),
            "zeta" => opt(p.zeta),
            "direction" => if p.direction == Direction::Up {
                "up"
            } else {
                "down"
            }
            .into(),
            "variant" => p.variant.clone().unwrap_or_default(),
            "mu_cr" => opt(r.mu_cr),
            "mu_ratio" => opt(r.mu_cr.map(|m| m / r.mu0)),
            "le_over_l" => opt(r.mu_cr.map(|m| le_over_l(m, p.kappa))),
            "load_factor" => opt(r.load_factor),
            "error_estimate" => opt(r.error_estimate),
            "elements" => r.elements.to_string(),
            "status" => r.status.clone(),
            _ => String::new(),
        });
    }
    w.write_record(&rec)
}
