//! The parsed TOML document → [`ResolvedCase`]: the dimensionless and the
//! physical schema, unit conversion, and the mapping of model errors back to
//! file positions.
//!
//! Conversions of a physical case (E, G in MPa; section in mm; L in m), as
//! fixed by the project's domain notes:
//!
//! ```text
//! E·Iz [kN·m²] = E·Iz·1e-9     G·It = G·It·1e-9     E·Iy = E·Iy·1e-9     E·Iw [kN·m⁴] = E·Iw·1e-15
//! κ  = (π/L)·√(E·Iw/(G·It))
//! ζ  = (π·a/L)·√(E·Iz/(G·It))          a: height above the shear centre, m
//! δ  = (βy/L)·√(E·Iz/(G·It))
//! Mu = √(E·Iz·G·It)/L                  moment unit, kN·m; force unit Mu/L; distributed Mu/L²
//! n  = N·L²/(E·Iz)                     axial, compression positive
//! springs: lateral k·L³/EIz, lateral rotation k·L/EIz, twist k·L/GIt, warping k/(GIt·L),
//!          vertical k·L³/EIy, in-plane rotation k·L/EIy,
//!          continuous lateral k·L⁴/EIz, continuous twist k·L²/GIt
//! ```
//!
//! # References
//! - ltb-atlas project, *Domain notes: elastic lateral–torsional buckling, conventions for this
//!   project* (`shared/domain-notes.md`), sections "Dimensionless parameters" and "Energy functional".

use super::schema::{Num, Tab, did_you_mean_value, number, quoted_list, string_list, type_name};
use super::span::Source;
use super::units::{HEIGHT_NAMES, parse_length};
use super::{CaseError, CaseKind, LoadInfo, PhysicalInfo, ResolvedCase};
use crate::model::{
    Axial, ContinuousRestraint, Fixity, Load, Member, ModelError, PointSupport, Restraint, Scales,
    Segment, Support,
};
use crate::section::{self, Properties, SectionError, Shape};
use std::collections::HashMap;
use std::f64::consts::PI;
use std::ops::Range;
use toml::de::{DeTable, DeValue};

/// Top-level keys shared by both kinds of case.
const COMMON_TOP: &[&str] = &[
    "solver",
    "start",
    "end",
    "support",
    "load",
    "restraint",
    "continuous_restraint",
    "segment",
];
/// Top-level keys of a dimensionless case (before [`COMMON_TOP`]).
const DIMLESS_TOP: &[&str] = &["kappa", "delta", "axial", "zeta_centroid", "rho"];
/// Top-level keys of a physical case (before [`COMMON_TOP`]).
/// (`design` is read by `crate::resistance`, not here.)
const PHYS_TOP: &[&str] = &["length", "section", "material", "axial", "design"];
/// Support presets.
const PRESETS: &[&str] = &["fork", "built-in", "free"];
/// Load kinds.
const LOAD_KINDS: &[&str] = &["point", "uniform", "distributed", "end-moments"];
/// Section kinds.
const SECTION_KINDS: &[&str] = &["i", "mono-i", "rectangle", "properties"];

/// Keys of each section kind.
fn section_keys(kind: &str) -> &'static [&'static str] {
    match kind {
        "i" => &["kind", "h", "b", "tf", "tw", "r"],
        "mono-i" => &[
            "kind",
            "h",
            "b_top",
            "tf_top",
            "b_bottom",
            "tf_bottom",
            "tw",
            "r",
        ],
        "rectangle" => &["kind", "h", "b"],
        _ => &[
            "kind",
            "iy",
            "iz",
            "it",
            "iw",
            "zs",
            "beta_y",
            "area",
            "top_flange",
            "top_surface",
            "bottom_flange",
            "bottom_surface",
        ],
    }
}

fn concat(a: &[&'static str], b: &[&'static str]) -> Vec<&'static str> {
    a.iter().chain(b.iter()).copied().collect()
}

/// Which stiffness a spring is, for its unit and its conversion.
#[derive(Debug, Clone, Copy)]
enum Dof {
    Lateral,
    LateralRotation,
    Twist,
    Warping,
    Vertical,
    InPlaneRotation,
    ContLateral,
    ContTwist,
}

impl Dof {
    fn of(name: &str) -> Dof {
        match crate::model::Component::from_key(name) {
            Some(crate::model::Component::Lateral) => Dof::Lateral,
            Some(crate::model::Component::LateralRotation) => Dof::LateralRotation,
            Some(crate::model::Component::Twist) => Dof::Twist,
            Some(crate::model::Component::Warping) => Dof::Warping,
            Some(crate::model::Component::Vertical) => Dof::Vertical,
            _ => Dof::InPlaneRotation,
        }
    }
    /// Unit of the spring in a physical case.
    fn phys_unit(self) -> &'static str {
        match self {
            Dof::Lateral | Dof::Vertical => "kN/m",
            Dof::LateralRotation | Dof::Twist | Dof::InPlaneRotation => "kN·m/rad",
            Dof::Warping => "kN·m³/rad",
            Dof::ContLateral => "kN/m per m of length",
            Dof::ContTwist => "kN·m/rad per m of length",
        }
    }
    /// Unit of the spring in a dimensionless case.
    fn dimless_unit(self) -> &'static str {
        match self {
            Dof::Lateral => "E·Iz/L³",
            Dof::LateralRotation => "E·Iz/L",
            Dof::Twist => "G·It/L",
            Dof::Warping => "G·It·L",
            Dof::Vertical => "E·Iy/L³",
            Dof::InPlaneRotation => "E·Iy/L",
            Dof::ContLateral => "E·Iz/L⁴",
            Dof::ContTwist => "G·It/L²",
        }
    }
}

/// A section as read from a `[section]` table.
#[derive(Debug, Clone)]
struct SectionData {
    props: Properties,
    /// top_flange, top_surface, bottom_flange, bottom_surface (mm above the
    /// shear centre); None when a `properties` section leaves them out.
    heights: [Option<f64>; 4],
    area_given: bool,
    label: String,
}

/// Everything a physical case converts with.
struct Phys {
    l: f64,
    eiz: f64,
    git: f64,
    eiy: f64,
    /// Moment unit Mu = √(E·Iz·G·It)/L, kN·m.
    mu: f64,
    /// ζ per metre of height: (π/L)·√(E·Iz/(G·It)).
    zeta_per_m: f64,
    sec: SectionData,
}

impl Phys {
    fn spring_factor(&self, dof: Dof) -> f64 {
        let l = self.l;
        match dof {
            Dof::Lateral => l.powi(3) / self.eiz,
            Dof::LateralRotation => l / self.eiz,
            Dof::Twist => l / self.git,
            Dof::Warping => 1.0 / (self.git * l),
            Dof::Vertical => l.powi(3) / self.eiy,
            Dof::InPlaneRotation => l / self.eiy,
            Dof::ContLateral => l.powi(4) / self.eiz,
            Dof::ContTwist => l * l / self.git,
        }
    }
}

/// Model field path → (schema key path, span), to place model errors.
#[derive(Default)]
struct Reg {
    map: HashMap<String, (String, Range<usize>)>,
}

impl Reg {
    fn add(&mut self, model: impl Into<String>, key: impl Into<String>, span: Range<usize>) {
        self.map.insert(model.into(), (key.into(), span));
    }
    fn add_num(&mut self, model: impl Into<String>, n: &Num) {
        self.add(model, n.key.clone(), n.span.clone());
    }
}

/// A resolved height: ζ, and where it came from.
struct Height {
    zeta: f64,
    key: String,
    span: Range<usize>,
}

/// Whether a load is non-zero, and where its magnitude is written.
struct Magnitude {
    nonzero: bool,
    key: String,
    span: Range<usize>,
}

/// Loads, their report entries and their magnitudes, in file order.
type LoadsOut = (Vec<Load>, Vec<LoadInfo>, Vec<Magnitude>);

/// The state of one resolution.
struct Builder<'s> {
    src: &'s Source<'s>,
    phys: Option<Phys>,
    reg: Reg,
    notes: Vec<String>,
    named_height_used: bool,
    /// κ to use when the case gives neither `kappa` nor `length` (sweeps).
    kappa_default: Option<f64>,
    /// `name` of each restraint, in file order.
    restraint_names: Vec<Option<String>>,
}

impl<'s> Builder<'s> {
    fn new(src: &'s Source<'s>, kappa_default: Option<f64>) -> Builder<'s> {
        Builder {
            src,
            phys: None,
            reg: Reg::default(),
            notes: Vec::new(),
            named_height_used: false,
            kappa_default,
            restraint_names: Vec::new(),
        }
    }
}

/// Resolve a parsed document.
pub(crate) fn resolve(src: &Source<'_>, root: &DeTable<'_>) -> Result<ResolvedCase, CaseError> {
    resolve_in(src, root, "", 0..0, None)
}

/// Resolve a case held in a table of a larger document (for example a
/// family's `[family.case]` in a sweep spec): `path` prefixes every key in
/// errors and `span` is the table's header, where errors about the table as
/// a whole point.
pub(crate) fn resolve_in(
    src: &Source<'_>,
    root: &DeTable<'_>,
    path: &str,
    root_span: Range<usize>,
    kappa_default: Option<f64>,
) -> Result<ResolvedCase, CaseError> {
    let top = Tab {
        src,
        path,
        span: &root_span,
        t: root,
    };
    match (top.get("kappa"), top.get("length")) {
        (Some(k), Some(l)) => {
            let later = if k.key_span.start > l.key_span.start {
                k
            } else {
                l
            };
            Err(src.error(
                &later.key_span,
                &later.key,
                "a case is either dimensionless (top-level `kappa`) or physical (top-level `length`), not both; \
                 remove one of the two",
            ))
        }
        (None, None) if kappa_default.is_some() => {
            // A sweep family supplies κ from its axis.
            let mut b = Builder::new(src, kappa_default);
            b.dimensionless(&top)
        }
        (None, None) => {
            let mut all = concat(DIMLESS_TOP, PHYS_TOP);
            all.extend_from_slice(COMMON_TOP);
            top.check_keys(&all, &|_| None)?;
            let mut message = "the case needs a top-level `kappa` (a dimensionless case) or `length` (a physical \
                               case, with [section])"
                .to_string();
            for e in top.entries() {
                if let DeValue::Table(t) = e.v {
                    for k in ["kappa", "length"] {
                        if let Some((kk, _)) = t.iter().find(|(kk, _)| kk.get_ref() == k) {
                            let (line, _) = src.line_col(kk.span().start);
                            message += &format!(
                                "; `{k}` was found inside [{}] (line {line}): top-level keys must come before \
                                 the first [table] header",
                                e.name
                            );
                            return Err(src.error(&kk.span(), &format!("{}.{k}", e.name), message));
                        }
                    }
                }
            }
            Err(src.error(&root_span, "", message))
        }
        (Some(_), None) => {
            let mut b = Builder::new(src, None);
            b.dimensionless(&top)
        }
        (None, Some(_)) => {
            let mut b = Builder::new(src, None);
            b.physical(&top)
        }
    }
}

/// Key and span of `k` in `tab`: its value if present, else the table header.
fn loc(tab: &Tab<'_>, k: &str) -> (String, Range<usize>) {
    match tab.get(k) {
        Some(v) => (v.key, v.span),
        None => (tab.key(k), tab.span.clone()),
    }
}

fn fmt_m(x: f64) -> String {
    format!("{x:.3} m")
}

impl<'s> Builder<'s> {
    fn is_phys(&self) -> bool {
        self.phys.is_some()
    }

    /// The name of the height key in this kind of case.
    fn height_key(&self) -> &'static str {
        if self.is_phys() { "height" } else { "zeta" }
    }

    /// Hints shared by all tables that take a height.
    fn height_hint(&self, k: &str) -> Option<String> {
        match (k, self.is_phys()) {
            ("zeta", true) => Some(
                "a physical case gives heights with `height`: a name (\"top-flange\", \"top-surface\", \
                 \"shear-centre\", \"bottom-flange\", \"bottom-surface\") or a length such as \"120 mm\"; use `height`"
                    .into(),
            ),
            ("height", false) => Some(
                "`height` belongs to physical cases (with top-level `length`); a dimensionless case gives the \
                 height above the shear centre as `zeta`"
                    .into(),
            ),
            _ => None,
        }
    }

    fn spring_unit(&self, dof: Dof) -> String {
        if self.is_phys() {
            dof.phys_unit().to_string()
        } else {
            format!("units of {}", dof.dimless_unit())
        }
    }

    // ----- value readers -------------------------------------------------

    /// A position along the member as a fraction of L: a number (fraction of
    /// L, 0..1), or in a physical case a length with unit from the start.
    fn position(
        &self,
        tab: &Tab<'_>,
        k: &str,
        default: Option<f64>,
        what: &str,
    ) -> Result<Num, CaseError> {
        let Some(v) = tab.get(k) else {
            return match default {
                Some(value) => Ok(Num {
                    value,
                    key: tab.key(k),
                    span: tab.span.clone(),
                }),
                None => {
                    let form = if self.is_phys() {
                        "a fraction of L (0 to 1) or a distance from the start such as \"2.5 m\""
                    } else {
                        "in units of L, 0 to 1"
                    };
                    Err(tab.err_at(k, format!("missing `{k}` ({what}, {form})")))
                }
            };
        };
        let src = self.src;
        match (&self.phys, v.v) {
            (Some(p), DeValue::String(s)) => {
                let d = parse_length(s).map_err(|m| src.error(&v.span, &v.key, m))?;
                let tol = 1e-9 * p.l;
                if d < -tol || d > p.l + tol {
                    return Err(src.error(
                        &v.span,
                        &v.key,
                        format!(
                            "x = {} lies outside the member, which runs from x = 0 to x = {}; give a distance \
                             from the start within the length",
                            fmt_m(d),
                            fmt_m(p.l)
                        ),
                    ));
                }
                Ok(Num { value: (d / p.l).clamp(0.0, 1.0), key: v.key, span: v.span })
            }
            (Some(_), DeValue::Integer(_) | DeValue::Float(_)) => {
                let n = number(src, &v, " (fraction of L) or a length with unit")?;
                if !(0.0..=1.0).contains(&n.value) {
                    return Err(src.error(
                        &v.span,
                        &v.key,
                        format!(
                            "position {} lies outside the member: a plain number is a fraction of L, from 0 to 1; \
                             for a distance from the start give a unit, for example \"2.5 m\"",
                            n.value
                        ),
                    ));
                }
                Ok(n)
            }
            (Some(_), other) => Err(src.error(
                &v.span,
                &v.key,
                format!(
                    "expected a number (fraction of L, 0 to 1) or a length with unit such as \"2.5 m\", found {}",
                    type_name(other)
                ),
            )),
            (None, _) => {
                let n = number(src, &v, " (position in units of L, 0 to 1)")?;
                if !(0.0..=1.0).contains(&n.value) {
                    return Err(src.error(
                        &v.span,
                        &v.key,
                        format!(
                            "position {} lies outside the member; positions are in units of L, from 0 to 1",
                            n.value
                        ),
                    ));
                }
                Ok(n)
            }
        }
    }

    /// "fixed", "free" or a spring stiffness ≥ 0 (converted to the model's units).
    fn fixity(
        &self,
        tab: &Tab<'_>,
        k: &str,
        default: Fixity,
        dof: Dof,
    ) -> Result<Fixity, CaseError> {
        let Some(v) = tab.get(k) else {
            return Ok(default);
        };
        let unit = self.spring_unit(dof);
        let accepted =
            format!("\"fixed\", \"free\" or a spring stiffness (a number ≥ 0, in {unit})");
        match v.v {
            DeValue::String(s) => match s.as_ref() {
                "fixed" => Ok(Fixity::Fixed),
                "free" => Ok(Fixity::Free),
                other => Err(self.src.error(
                    &v.span,
                    &v.key,
                    format!(
                        "unknown value \"{other}\"{}; accepted: {accepted}",
                        did_you_mean_value(other, &["fixed", "free"])
                    ),
                )),
            },
            DeValue::Integer(_) | DeValue::Float(_) => {
                let n = number(self.src, &v, "")?;
                if n.value < 0.0 {
                    return Err(self.src.error(
                        &v.span,
                        &v.key,
                        format!(
                            "a spring stiffness must be 0 or more ({unit}), got {}",
                            n.value
                        ),
                    ));
                }
                let factor = self
                    .phys
                    .as_ref()
                    .map(|p| p.spring_factor(dof))
                    .unwrap_or(1.0);
                Ok(Fixity::Spring(n.value * factor))
            }
            other => Err(self.src.error(
                &v.span,
                &v.key,
                format!("expected {accepted}, found {}", type_name(other)),
            )),
        }
    }

    /// The height of a load or restraint in ζ units (`zeta` or `height`).
    fn height(&mut self, tab: &Tab<'_>) -> Result<Height, CaseError> {
        let Some(p) = &self.phys else {
            let (key, span) = loc(tab, "zeta");
            let zeta = tab.num("zeta")?.map(|n| n.value).unwrap_or(0.0);
            return Ok(Height { zeta, key, span });
        };
        let (key, span) = loc(tab, "height");
        let Some(v) = tab.get("height") else {
            return Ok(Height {
                zeta: 0.0,
                key,
                span,
            });
        };
        let names = string_list(HEIGHT_NAMES);
        let a_m = match v.v {
            DeValue::String(s) if HEIGHT_NAMES.contains(&s.as_ref()) => {
                let (idx, field) = match s.as_ref() {
                    "top-flange" => (Some(0), "top_flange"),
                    "top-surface" => (Some(1), "top_surface"),
                    "bottom-flange" => (Some(2), "bottom_flange"),
                    "bottom-surface" => (Some(3), "bottom_surface"),
                    _ => (None, ""),
                };
                match idx {
                    None => 0.0,
                    Some(i) => {
                        self.named_height_used = true;
                        match p.sec.heights[i] {
                            Some(mm) => mm / 1000.0,
                            None => {
                                return Err(self.src.error(
                                    &v.span,
                                    &v.key,
                                    format!(
                                        "the [section] (kind \"properties\") does not give `{field}`; add \
                                         `{field} = …` (mm above the shear centre) to [section], or give the \
                                         height as a length such as \"150 mm\""
                                    ),
                                ));
                            }
                        }
                    }
                }
            }
            DeValue::String(s) => {
                let looks_numeric = s
                    .trim_start()
                    .starts_with(|c: char| c.is_ascii_digit() || c == '-' || c == '+' || c == '.');
                if looks_numeric {
                    parse_length(s).map_err(|m| self.src.error(&v.span, &v.key, m))?
                } else {
                    return Err(self.src.error(
                        &v.span,
                        &v.key,
                        format!(
                            "unknown height \"{s}\"{}; accepted: {names}, or a length with unit above the shear \
                             centre (negative below), such as \"120 mm\"",
                            did_you_mean_value(s, HEIGHT_NAMES)
                        ),
                    ));
                }
            }
            DeValue::Integer(_) | DeValue::Float(_) => {
                number(self.src, &v, "")?;
                return Err(self.src.error(
                    &v.span,
                    &v.key,
                    format!(
                        "a bare number is ambiguous here: give a length with unit above the shear centre (negative \
                         below), such as \"{} mm\", or one of {names}",
                        self.src.slice(&v.span).trim()
                    ),
                ));
            }
            other => {
                return Err(self.src.error(
                    &v.span,
                    &v.key,
                    format!("expected one of {names} or a length with unit such as \"120 mm\", found {}", type_name(other)),
                ));
            }
        };
        Ok(Height {
            zeta: a_m * p.zeta_per_m,
            key,
            span,
        })
    }

    // ----- tables ---------------------------------------------------------

    fn solver(&mut self, top: &Tab<'_>) -> Result<Option<f64>, CaseError> {
        let Some(loc) = top.table("solver")? else {
            return Ok(None);
        };
        let t = loc.tab(self.src);
        t.check_keys(&["tolerance"], &|_| None)?;
        let Some(n) = t.num("tolerance")? else {
            return Ok(None);
        };
        if !(n.value > 0.0 && n.value < 0.1) {
            return Err(self.src.error(
                &n.span,
                &n.key,
                format!(
                    "the tolerance is a relative error target and must lie between 0 and 0.1 (exclusive), got {}; \
                     for example 1e-4",
                    n.value
                ),
            ));
        }
        Ok(Some(n.value))
    }

    /// `[start]`, `[end]` or one `[[support]]`.
    fn support(
        &mut self,
        t: &Tab<'_>,
        model: &str,
        intermediate: bool,
    ) -> Result<Support, CaseError> {
        let mut keys = vec!["preset"];
        keys.extend(crate::model::Component::ALL.map(crate::model::Component::key));
        if intermediate {
            keys.push("at");
        }
        let hk = self.height_key();
        t.check_keys(&keys, &|k| match k {
            "zeta" | "height" => Some(format!(
                "supports act at the shear centre; to hold a point at a height use a [[restraint]] with `{hk}`"
            )),
            "at" => Some(
                "[start] and [end] sit at the ends of the member; for a support in between use a [[support]] \
                 table with `at`"
                    .into(),
            ),
            "kind" => Some(format!(
                "a support's type is set with `preset` ({}), then single components may be overridden",
                string_list(PRESETS)
            )),
            _ => None,
        })?;
        let base = match t.choice("preset", PRESETS, "preset")? {
            Some(("fork", _)) => Support::FORK,
            Some(("built-in", _)) => Support::BUILT_IN,
            _ => Support::FREE,
        };
        let preset_loc = t.get("preset").map(|v| (v.key, v.span));
        let mut s = base;
        for c in crate::model::Component::ALL {
            let name = &c.key();
            let slot = s.component_mut(c);
            *slot = self.fixity(t, name, *slot, Dof::of(name))?;
            let (key, span) = match (t.get(name), &preset_loc) {
                (Some(v), _) => (v.key, v.span),
                (None, Some((k, sp))) => (k.clone(), sp.clone()),
                (None, None) => (t.key(name), t.span.clone()),
            };
            self.reg.add(format!("{model}.{name}"), key, span);
        }
        self.reg
            .add(model.to_string(), t.path.to_string(), t.span.clone());
        Ok(s)
    }

    fn end_support(&mut self, top: &Tab<'_>, which: &str) -> Result<Support, CaseError> {
        let Some(loc) = top.table(which)? else {
            return Err(self.src.error(
                &(0..0),
                which,
                format!(
                    "missing [{which}]: every case needs a [start] and an [end] table, for example\n  [{which}]\n  \
                     preset = \"fork\"    # one of {}",
                    string_list(PRESETS)
                ),
            ));
        };
        let t = loc.tab(self.src);
        self.support(&t, which, false)
    }

    fn supports(&mut self, top: &Tab<'_>) -> Result<Vec<PointSupport>, CaseError> {
        let mut out = Vec::new();
        for (i, loc) in top.tables("support")?.iter().enumerate() {
            let t = loc.tab(self.src);
            let support = self.support(&t, &format!("support[{i}]"), true)?;
            let at = self.position(&t, "at", None, "position of the support")?;
            self.reg.add_num(format!("support[{i}].at"), &at);
            out.push(PointSupport {
                at: at.value,
                support,
            });
        }
        Ok(out)
    }

    fn restraints(&mut self, top: &Tab<'_>) -> Result<Vec<Restraint>, CaseError> {
        let mut out = Vec::new();
        for (i, loc) in top.tables("restraint")?.iter().enumerate() {
            let t = loc.tab(self.src);
            let hk = self.height_key();
            t.check_keys(&["name", "at", "lateral", "twist", hk], &|k| {
                self.height_hint(k).or_else(|| match k {
                    "lateral_rotation" | "warping" | "vertical" | "in_plane_rotation" | "preset" => Some(
                        "a [[restraint]] holds only `lateral` (at its height) and `twist`; for other components \
                         use a [[support]] with `at`"
                            .into(),
                    ),
                    "from" | "to" => Some(
                        "a [[restraint]] acts at one point `at`; for restraint along a range use \
                         [[continuous_restraint]]"
                            .into(),
                    ),
                    _ => None,
                })
            })?;
            let name = t.string("name")?.map(|(s, _)| s);
            self.restraint_names.push(name);
            let at = self.position(&t, "at", None, "position of the restraint")?;
            let lateral = self.fixity(&t, "lateral", Fixity::Free, Dof::Lateral)?;
            let twist = self.fixity(&t, "twist", Fixity::Free, Dof::Twist)?;
            let h = self.height(&t)?;
            let p = format!("restraint[{i}]");
            self.reg.add_num(format!("{p}.at"), &at);
            self.reg.add(format!("{p}.zeta"), h.key, h.span);
            for k in ["lateral", "twist"] {
                let (key, span) = loc_of(&t, k);
                self.reg.add(format!("{p}.{k}"), key, span);
            }
            self.reg.add(p.clone(), t.path.to_string(), t.span.clone());
            out.push(Restraint {
                at: at.value,
                zeta: h.zeta,
                lateral,
                twist,
            });
        }
        Ok(out)
    }

    fn continuous(&mut self, top: &Tab<'_>) -> Result<Vec<ContinuousRestraint>, CaseError> {
        let mut out = Vec::new();
        for (i, loc) in top.tables("continuous_restraint")?.iter().enumerate() {
            let t = loc.tab(self.src);
            let hk = self.height_key();
            t.check_keys(&["from", "to", hk, "lateral", "twist"], &|k| {
                self.height_hint(k).or_else(|| match k {
                    "at" => Some("a [[continuous_restraint]] acts over `from`..`to`; for a point use [[restraint]]".into()),
                    _ => None,
                })
            })?;
            let from = self.position(&t, "from", Some(0.0), "start of the range")?;
            let to = self.position(&t, "to", Some(1.0), "end of the range")?;
            if to.value <= from.value {
                return Err(self
                    .src
                    .error(&to.span, &to.key, "`to` must be greater than `from`"));
            }
            let h = self.height(&t)?;
            let mut k = [0.0; 2];
            for (j, (name, dof)) in [("lateral", Dof::ContLateral), ("twist", Dof::ContTwist)]
                .into_iter()
                .enumerate()
            {
                let what = format!("the {name} stiffness ({})", self.spring_unit(dof));
                if let Some(n) = t.num_min(name, None, false, &what)? {
                    k[j] = n.value
                        * self
                            .phys
                            .as_ref()
                            .map(|p| p.spring_factor(dof))
                            .unwrap_or(1.0);
                }
                let (key, span) = loc_of(&t, name);
                self.reg.add(format!("continuous[{i}].{name}"), key, span);
            }
            let p = format!("continuous[{i}]");
            self.reg.add_num(format!("{p}.from"), &from);
            self.reg.add_num(format!("{p}.to"), &to);
            self.reg.add(format!("{p}.zeta"), h.key, h.span);
            self.reg.add(p, t.path.to_string(), t.span.clone());
            out.push(ContinuousRestraint {
                from: from.value,
                to: to.value,
                zeta: h.zeta,
                lateral: k[0],
                twist: k[1],
            });
        }
        Ok(out)
    }

    /// All `[[load]]` tables. Returns the loads, their report entries, and
    /// for each whether it is non-zero and where its magnitude is.
    fn loads(&mut self, top: &Tab<'_>) -> Result<LoadsOut, CaseError> {
        let (mut loads, mut infos, mut mags) = (Vec::new(), Vec::new(), Vec::new());
        let locs = top.tables("load")?;
        if let Some(first) = locs.first() {
            self.reg.add("load", first.path.clone(), first.span.clone());
        }
        for (i, loc) in locs.iter().enumerate() {
            let t = loc.tab(self.src);
            let (load, info, mag) = self.load(&t, i)?;
            loads.push(load);
            infos.push(info);
            mags.push(mag);
        }
        Ok((loads, infos, mags))
    }

    fn load(&mut self, t: &Tab<'_>, i: usize) -> Result<(Load, LoadInfo, Magnitude), CaseError> {
        let src = self.src;
        let kind = match t.choice("kind", LOAD_KINDS, "load kind")? {
            Some((k, _)) => k,
            None => {
                return Err(t.err_at(
                    "kind",
                    format!("missing `kind`; accepted: {}", string_list(LOAD_KINDS)),
                ));
            }
        };
        let hk = self.height_key();
        let keys: Vec<&str> = match kind {
            "point" => vec!["kind", "name", "at", "value", "direction", hk],
            "uniform" => vec!["kind", "name", "value", "direction", hk],
            "distributed" => vec![
                "kind",
                "name",
                "from",
                "to",
                "value",
                "value_end",
                "direction",
                hk,
            ],
            _ => vec!["kind", "name", "start", "end"],
        };
        let moment_unit = if self.is_phys() { " (kN·m)" } else { "" };
        t.check_keys(&keys, &|k| {
            if kind == "end-moments" && ["value", "value_end", "direction", "zeta", "height", "at", "from", "to"].contains(&k) {
                return Some(format!(
                    "end-moments loads take only `start` and `end`{moment_unit}: the bending moments at x = 0 and \
                     x = L, sagging positive"
                ));
            }
            if let Some(h) = self.height_hint(k) {
                return Some(h);
            }
            match (kind, k) {
                ("point", "from" | "to") => {
                    Some("a point load takes `at`; for a load over a range use kind = \"distributed\"".into())
                }
                ("point" | "uniform", "value_end") => {
                    Some("only a \"distributed\" load varies; use kind = \"distributed\" with `from` and `to`".into())
                }
                ("uniform", "at" | "from" | "to") => Some(
                    "a uniform load covers the whole span; for part of it use kind = \"distributed\" with `from` \
                     and `to`"
                        .into(),
                ),
                ("distributed", "at") => Some("a distributed load takes `from` and `to`".into()),
                (_, "start" | "end") => Some("`start` and `end` belong to kind = \"end-moments\"".into()),
                _ => None,
            }
        })?;
        let name = t.string("name")?.map(|(s, _)| s);
        let p = format!("load[{i}]");
        let (unit, factor) = match (&self.phys, kind) {
            (None, _) => ("", 1.0),
            (Some(ph), "point") => ("kN", ph.l / ph.mu),
            (Some(ph), "end-moments") => ("kN·m", 1.0 / ph.mu),
            (Some(ph), _) => ("kN/m", ph.l * ph.l / ph.mu),
        };
        let alt = if self.is_phys() {
            format!(" (in {unit}, written without the unit)")
        } else {
            String::new()
        };
        let length = self.phys.as_ref().map(|ph| ph.l);
        let pos_l = |x: f64| match length {
            Some(l) => format!("x = {}", fmt_m(x * l)),
            None => format!("x = {x} L"),
        };

        if kind == "end-moments" {
            let start = t.num_with("start", &alt)?;
            let end = t.num_with("end", &alt)?;
            if self.is_phys() && start.is_none() && end.is_none() {
                return Err(t.err_here(
                    "an end-moments load needs `start` and/or `end` (kN·m, the bending moments at x = 0 and x = L, \
                     sagging positive)",
                ));
            }
            let (ms, me) = (
                start.as_ref().map_or(0.0, |n| n.value),
                end.as_ref().map_or(0.0, |n| n.value),
            );
            for (k, n) in [("start", &start), ("end", &end)] {
                match n {
                    Some(n) => self.reg.add_num(format!("{p}.{k}"), n),
                    None => self.reg.add(format!("{p}.{k}"), t.key(k), t.span.clone()),
                }
            }
            let mag = start.as_ref().or(end.as_ref()).map_or_else(
                || (t.key("start"), t.span.clone()),
                |n| (n.key.clone(), n.span.clone()),
            );
            let position = match &self.phys {
                Some(ph) => format!("x = 0 m and x = {}", fmt_m(ph.l)),
                None => "at the ends".to_string(),
            };
            let info = LoadInfo {
                name,
                kind: kind.into(),
                values: vec![ms, me],
                unit: unit.into(),
                zeta: None,
                position,
                direction: None,
            };
            let load = Load::EndMoments {
                start: ms * factor,
                end: me * factor,
            };
            return Ok((
                load,
                info,
                Magnitude {
                    nonzero: ms != 0.0 || me != 0.0,
                    key: mag.0,
                    span: mag.1,
                },
            ));
        }

        let value = match t.num_with("value", &alt)? {
            Some(n) => n,
            None if self.is_phys() => {
                return Err(t.err_at("value", format!(
                    "missing `value` ({unit}): loads of a physical case have no default magnitude"
                )));
            }
            None => Num {
                value: 1.0,
                key: t.key("value"),
                span: t.span.clone(),
            },
        };
        let sign = match t.choice("direction", &["down", "up"], "direction")? {
            Some(("up", _)) => 1.0,
            _ => -1.0,
        };
        let h = self.height(t)?;
        self.reg.add_num(format!("{p}.value"), &value);
        self.reg
            .add(format!("{p}.zeta"), h.key.clone(), h.span.clone());
        let mut nonzero = value.value != 0.0;
        let (load, values, position) = match kind {
            "point" => {
                let at = self.position(t, "at", None, "position of the load")?;
                self.reg.add_num(format!("{p}.at"), &at);
                let load = Load::Point {
                    at: at.value,
                    fz: sign * value.value * factor,
                    zeta: h.zeta,
                };
                (load, vec![value.value], pos_l(at.value))
            }
            "uniform" => {
                let load = Load::Distributed {
                    from: 0.0,
                    to: 1.0,
                    fz_from: sign * value.value * factor,
                    fz_to: sign * value.value * factor,
                    zeta: h.zeta,
                };
                (load, vec![value.value], "whole span".to_string())
            }
            _ => {
                let from = self.position(t, "from", None, "start of the load")?;
                let to = self.position(t, "to", None, "end of the load")?;
                if to.value <= from.value {
                    return Err(src.error(&to.span, &to.key, "`to` must be greater than `from`"));
                }
                let value_end = match t.num_with("value_end", &alt)? {
                    Some(n) => n,
                    None => Num {
                        value: value.value,
                        key: value.key.clone(),
                        span: value.span.clone(),
                    },
                };
                nonzero |= value_end.value != 0.0;
                self.reg.add_num(format!("{p}.from"), &from);
                self.reg.add_num(format!("{p}.to"), &to);
                self.reg.add_num(format!("{p}.value_end"), &value_end);
                let load = Load::Distributed {
                    from: from.value,
                    to: to.value,
                    fz_from: sign * value.value * factor,
                    fz_to: sign * value_end.value * factor,
                    zeta: h.zeta,
                };
                let position = format!(
                    "{} to {}",
                    pos_l(from.value),
                    pos_l(to.value).trim_start_matches("x = ")
                );
                (load, vec![value.value, value_end.value], position)
            }
        };
        let direction = if sign * values.first().copied().unwrap_or(1.0) >= 0.0 {
            "up"
        } else {
            "down"
        };
        let info = LoadInfo {
            name,
            kind: kind.into(),
            values,
            unit: unit.into(),
            zeta: Some(h.zeta),
            position,
            direction: Some(direction),
        };
        Ok((
            load,
            info,
            Magnitude {
                nonzero,
                key: value.key,
                span: value.span,
            },
        ))
    }

    // ----- the two kinds of case -------------------------------------------

    fn dimensionless(&mut self, top: &Tab<'_>) -> Result<ResolvedCase, CaseError> {
        let keys = concat(DIMLESS_TOP, COMMON_TOP);
        top.check_keys(&keys, &|k| match k {
            "section" | "material" => Some(format!(
                "[{k}] belongs to physical cases (with top-level `length`); a dimensionless case gives `kappa` \
                 (and optionally `delta`) instead"
            )),
            _ => None,
        })?;
        let kappa = top
            .num_min(
                "kappa",
                self.kappa_default,
                false,
                "the torsion parameter κ",
            )?
            .expect("kappa present or defaulted");
        self.reg.add_num("kappa", &kappa);
        let delta = top.num("delta")?;
        let (dk, ds) = loc(top, "delta");
        self.reg.add("delta", dk, ds);
        let delta = delta.map_or(0.0, |n| n.value);
        let axial = top.num("axial")?;
        let zc = top.num("zeta_centroid")?;
        let rho = top.num_min("rho", None, false, "the polar radius of gyration ρ")?;
        for k in ["axial", "zeta_centroid", "rho"] {
            let (key, span) = loc(top, k);
            self.reg.add(k, key, span);
        }
        if axial.is_none() && (zc.is_some() || rho.is_some()) {
            self.notes.push(
                "`zeta_centroid` and `rho` are used only with `axial`; they are ignored here"
                    .into(),
            );
        }
        let axial = axial.map(|n| Axial {
            n: n.value,
            zeta_centroid: zc.as_ref().map_or(0.0, |z| z.value),
            rho: rho.as_ref().map_or(0.0, |r| r.value),
        });
        let tolerance = self.solver(top)?;
        let start = self.end_support(top, "start")?;
        let end = self.end_support(top, "end")?;
        let supports = self.supports(top)?;

        let mut segments = Vec::new();
        for (i, loc) in top.tables("segment")?.iter().enumerate() {
            let t = loc.tab(self.src);
            let ratios = ["eiz", "git", "eiw", "eiy"];
            let mut keys = vec!["from", "to", "delta"];
            keys.extend_from_slice(&ratios);
            t.check_keys(&keys, &|k| match k {
                "section" => Some(
                    "a segment's [segment.section] belongs to physical cases; a dimensionless case gives the \
                     stiffness ratios `eiz`, `git`, `eiw`, `eiy`"
                        .into(),
                ),
                _ => None,
            })?;
            let from = self.position(&t, "from", None, "start of the segment")?;
            let to = self.position(&t, "to", None, "end of the segment")?;
            let mut r = [1.0; 4];
            for (j, k) in ratios.iter().enumerate() {
                let strict = *k != "eiw";
                if let Some(n) =
                    t.num_min(k, None, strict, &format!("the stiffness ratio `{k}`"))?
                {
                    r[j] = n.value;
                }
                let (key, span) = loc_of(&t, k);
                self.reg.add(format!("segment[{i}].{k}"), key, span);
            }
            let d = t.num("delta")?.map_or(delta, |n| n.value);
            let p = format!("segment[{i}]");
            self.reg.add_num(format!("{p}.from"), &from);
            self.reg.add_num(format!("{p}.to"), &to);
            let (key, span) = loc_of(&t, "delta");
            self.reg.add(format!("{p}.delta"), key, span);
            self.reg.add(p, t.path.to_string(), t.span.clone());
            segments.push(Segment {
                from: from.value,
                to: to.value,
                eiz: r[0],
                git: r[1],
                eiw: r[2],
                eiy: r[3],
                delta: d,
            });
        }

        let (loads, infos, mags) = self.loads(top)?;
        let restraints = self.restraints(top)?;
        let continuous = self.continuous(top)?;
        let member = Member {
            kappa: kappa.value,
            delta,
            start,
            end,
            supports,
            restraints,
            continuous,
            loads,
            axial,
            segments,
        };
        self.finish(
            member,
            Scales::UNIT,
            CaseKind::Dimensionless,
            infos,
            mags,
            tolerance,
        )
    }

    fn physical(&mut self, top: &Tab<'_>) -> Result<ResolvedCase, CaseError> {
        let src = self.src;
        let keys = concat(PHYS_TOP, COMMON_TOP);
        top.check_keys(&keys, &|k| match k {
            "delta" => Some(
                "in a physical case the monosymmetry comes from the section (βy); give a \"mono-i\" section or \
                 `beta_y` in a \"properties\" section"
                    .into(),
            ),
            "zeta_centroid" | "rho" => Some(format!("in a physical case `{k}` is computed from the section")),
            "e" | "g" => Some(format!("give `{k}` (MPa) in [material]")),
            _ => None,
        })?;
        // Length.
        let lv = top.get("length").expect("length present");
        let l = match lv.v {
            DeValue::String(s) => parse_length(s).map_err(|m| src.error(&lv.span, &lv.key, m))?,
            DeValue::Integer(_) | DeValue::Float(_) => {
                number(src, &lv, " (metres) or a length with unit")?.value
            }
            other => {
                return Err(src.error(
                    &lv.span,
                    &lv.key,
                    format!(
                        "expected a length such as \"6 m\" or a number of metres, found {}",
                        type_name(other)
                    ),
                ));
            }
        };
        if l <= 0.0 {
            return Err(src.error(
                &lv.span,
                &lv.key,
                format!("the length must be greater than 0, got {}", fmt_m(l)),
            ));
        }
        // Section.
        let Some(sloc) = top.table("section")? else {
            return Err(src.error(
                &(0..0),
                "section",
                "missing [section]: a physical case needs the cross-section, for example\n  [section]\n  kind = \"i\"\n  \
                 h = 300.0\n  b = 150.0\n  tf = 10.7\n  tw = 7.1\n  r = 15.0",
            ));
        };
        let st = sloc.tab(src);
        let sec = parse_section(src, &st)?;
        // Material.
        let (mut e, mut g) = (210000.0, 81000.0);
        if let Some(mloc) = top.table("material")? {
            let mt = mloc.tab(src);
            mt.check_keys(&["e", "g"], &|k| {
                (k == "axial").then(|| "give the axial force at the top level as `axial` (kN, compression positive)".into())
            })?;
            e = mt
                .num_min("e", Some(e), true, "Young's modulus E (MPa)")?
                .map_or(e, |n| n.value);
            g = mt
                .num_min("g", Some(g), true, "the shear modulus G (MPa)")?
                .map_or(g, |n| n.value);
        }
        let mut axial_kn = None;
        if let Some(n) = top.num("axial")? {
            if !sec.area_given {
                return Err(src.error(
                    &n.span,
                    &n.key,
                    "an axial force needs the section area: add `area` (mm²) to the [section] of kind \
                     \"properties\"",
                ));
            }
            self.reg.add_num("axial", &n);
            axial_kn = Some(n.value);
        }
        let pr = sec.props;
        let eiz = e * pr.iz * 1e-9;
        let git = g * pr.it * 1e-9;
        let eiy = e * pr.iy * 1e-9;
        let eiw = e * pr.iw * 1e-15;
        let kappa = PI / l * (eiw / git).sqrt();
        let zeta_per_m = PI / l * (eiz / git).sqrt();
        let delta = pr.beta_y / 1000.0 / l * (eiz / git).sqrt();
        let mu = (eiz * git).sqrt() / l;
        for k in ["kappa", "delta", "zeta_centroid", "rho"] {
            self.reg.add(k, "section", st.span.clone());
        }
        let axial = axial_kn.map(|n| Axial {
            n: n * l * l / eiz,
            zeta_centroid: -pr.zs / 1000.0 * zeta_per_m,
            rho: ((pr.iy + pr.iz) / pr.area).sqrt() / 1000.0 * zeta_per_m,
        });
        self.phys = Some(Phys {
            l,
            eiz,
            git,
            eiy,
            mu,
            zeta_per_m,
            sec: sec.clone(),
        });

        let tolerance = self.solver(top)?;
        let start = self.end_support(top, "start")?;
        let end = self.end_support(top, "end")?;
        let supports = self.supports(top)?;

        let mut segments = Vec::new();
        for (i, loc) in top.tables("segment")?.iter().enumerate() {
            let t = loc.tab(src);
            t.check_keys(&["from", "to", "section"], &|k| match k {
                "eiz" | "git" | "eiw" | "eiy" | "delta" => Some(
                    "in a physical case a segment's stiffness comes from its own [segment.section] table (kind and \
                     dimensions, like [section])"
                        .into(),
                ),
                _ => None,
            })?;
            let from = self.position(&t, "from", None, "start of the segment")?;
            let to = self.position(&t, "to", None, "end of the segment")?;
            let Some(ssl) = t.table("section")? else {
                return Err(t.err_at("section",
                    "missing [segment.section]: give the segment's cross-section below the [[segment]] table, as \
                     `[segment.section]` with `kind` and dimensions like [section]",
                ));
            };
            let sst = ssl.tab(src);
            let ss = parse_section(src, &sst)?.props;
            let eiw_ratio = if pr.iw > 0.0 {
                ss.iw / pr.iw
            } else if ss.iw == 0.0 {
                0.0
            } else {
                return Err(sst.err_here(
                    "the reference [section] has no warping stiffness (Iw = 0), so this segment's warping stiffness \
                     cannot be expressed relative to it; make the section with warping stiffness the reference \
                     [section]",
                ));
            };
            let p = format!("segment[{i}]");
            self.reg.add_num(format!("{p}.from"), &from);
            self.reg.add_num(format!("{p}.to"), &to);
            for k in ["eiz", "git", "eiw", "eiy", "delta"] {
                self.reg
                    .add(format!("{p}.{k}"), sst.path.to_string(), sst.span.clone());
            }
            self.reg.add(p, t.path.to_string(), t.span.clone());
            segments.push(Segment {
                from: from.value,
                to: to.value,
                eiz: ss.iz / pr.iz,
                git: ss.it / pr.it,
                eiw: eiw_ratio,
                eiy: ss.iy / pr.iy,
                delta: ss.beta_y / 1000.0 / l * (eiz / git).sqrt(),
            });
        }

        let (loads, infos, mags) = self.loads(top)?;
        let restraints = self.restraints(top)?;
        let continuous = self.continuous(top)?;
        if self.named_height_used && !segments.is_empty() {
            self.notes.push(
                "named heights (\"top-flange\", …) are taken from the reference [section], also inside segments \
                 with another section; give heights as lengths where that matters"
                    .into(),
            );
        }
        let member = Member {
            kappa,
            delta,
            start,
            end,
            supports,
            restraints,
            continuous,
            loads,
            axial,
            segments,
        };
        let scales = Scales {
            length: l,
            moment: mu,
            force: mu / l,
            lateral: l * (git / eiz).sqrt(),
            height: l / PI * (git / eiz).sqrt(),
            axial: eiz / (l * l),
        };
        let kind = CaseKind::Physical(PhysicalInfo {
            length: l,
            e,
            g,
            section: sec.props,
            section_label: sec.label,
        });
        self.finish(member, scales, kind, infos, mags, tolerance)
    }

    /// Common checks, notes and validation.
    fn finish(
        &mut self,
        member: Member,
        scales: Scales,
        kind: CaseKind,
        loads: Vec<LoadInfo>,
        mags: Vec<Magnitude>,
        tolerance: Option<f64>,
    ) -> Result<ResolvedCase, CaseError> {
        let axial_nonzero = member.axial.is_some_and(|a| a.n != 0.0);
        if !axial_nonzero {
            if mags.is_empty() {
                return Err(self.src.error(
                    &(0..0),
                    "load",
                    "the case has no [[load]]: add at least one, for example\n  [[load]]\n  kind = \"uniform\"\n  \
                     value = 1.0",
                ));
            }
            if mags.iter().all(|m| !m.nonzero) {
                let Magnitude { key, span, .. } = &mags[0];
                return Err(self.src.error(
                    span,
                    key,
                    "all loads are zero: give at least one load a non-zero magnitude (the critical factor scales \
                     all loads together)",
                ));
            }
        }
        // (The note that warping restraints mean nothing at κ = 0 is the
        // solver's: it applies to every way a member reaches it.)
        member.validate().map_err(|e| self.model_error(e))?;
        // Where the supports and restraints are written, for errors about the
        // support system as a whole (mechanisms).
        let mut names = vec!["start".to_string(), "end".to_string()];
        names.extend((0..member.supports.len()).map(|i| format!("support[{i}]")));
        names.extend((0..member.restraints.len()).map(|i| format!("restraint[{i}]")));
        let supports_at = names
            .iter()
            .filter_map(|n| self.reg.map.get(n))
            .map(|(key, span)| {
                let (line, column) = self.src.line_col(span.start);
                (key.clone(), line, column)
            })
            .collect();
        Ok(ResolvedCase {
            member,
            scales,
            kind,
            loads,
            tolerance,
            notes: std::mem::take(&mut self.notes),
            restraint_names: std::mem::take(&mut self.restraint_names),
            supports_at,
        })
    }

    /// Place a model error at the key it came from.
    fn model_error(&self, e: ModelError) -> CaseError {
        let mut f = e.field.as_str();
        loop {
            if let Some((key, span)) = self.reg.map.get(f) {
                return self.src.error(span, key, e.message);
            }
            match f.rfind('.') {
                Some(i) => f = &f[..i],
                None => break,
            }
        }
        self.src.error(&(0..0), &e.field, e.message)
    }
}

fn loc_of(t: &Tab<'_>, k: &str) -> (String, Range<usize>) {
    loc(t, k)
}

/// Place a [`SectionError`] at its key in the section table (at the header
/// when the key is not one of the table's keys).
pub(crate) fn section_error(t: &Tab<'_>, keys: &[&str], e: SectionError) -> CaseError {
    if !e.field.is_empty() && keys.contains(&e.field.as_str()) {
        t.err_at(&e.field, e.message)
    } else {
        t.err_here(if e.field.is_empty() {
            e.message
        } else {
            format!("{}: {}", e.field, e.message)
        })
    }
}

/// Read a `[section]` (or `[segment.section]`) table.
fn parse_section(src: &Source<'_>, t: &Tab<'_>) -> Result<SectionData, CaseError> {
    // A catalogue section (`name = "IPE 300"`, optional `catalogue`).
    if let Some((entry, label)) = crate::resistance::catalogue::case_lookup(src, t)? {
        let props =
            section::properties(&entry.shape).map_err(|e| t.err_at("name", e.to_string()))?;
        return Ok(SectionData {
            props,
            heights: [
                Some(props.top_flange),
                Some(props.top_surface),
                Some(props.bottom_flange),
                Some(props.bottom_surface),
            ],
            area_given: true,
            label,
        });
    }
    let kind = match t.choice("kind", SECTION_KINDS, "section kind")? {
        Some((k, _)) => k,
        None => {
            return Err(t.err_at("kind", format!(
                "missing `kind`; accepted: {} (\"i\": h, b, tf, tw, r; \"mono-i\": h, b_top, tf_top, b_bottom, \
                 tf_bottom, tw, r; \"rectangle\": h, b; \"properties\": iy, iz, it, iw, …)",
                string_list(SECTION_KINDS)
            )));
        }
    };
    let keys = section_keys(kind);
    t.check_keys(keys, &|k| {
        let owners: Vec<&str> = SECTION_KINDS
            .iter()
            .copied()
            .filter(|sk| *sk != kind && section_keys(sk).contains(&k))
            .collect();
        if owners.is_empty() {
            None
        } else {
            Some(format!(
                "`{k}` belongs to kind {}; this section has kind \"{kind}\", whose keys are {}",
                string_list(&owners),
                quoted_list(keys)
            ))
        }
    })?;
    let dim_u = |k: &str, what: &str, unit: &str| -> Result<f64, CaseError> {
        let alt = format!(" (in {unit}, written without the unit)");
        let n = t
            .num_with(k, &alt)?
            .ok_or_else(|| t.err_at(k, format!("missing `{k}` ({what}, {unit})")))?;
        if n.value <= 0.0 {
            return Err(src.error(
                &n.span,
                &n.key,
                format!("{what} must be greater than 0 {unit}, got {}", n.value),
            ));
        }
        Ok(n.value)
    };
    let dim = |k: &str, what: &str| dim_u(k, what, "mm");
    let root_radius = || -> Result<f64, CaseError> {
        Ok(t.num_min("r", Some(0.0), false, "the root radius r (mm)")?
            .map_or(0.0, |n| n.value))
    };
    let (shape, label) = match kind {
        "i" => {
            let (h, b, tf, tw) = (
                dim("h", "the depth h")?,
                dim("b", "the flange width b")?,
                dim("tf", "the flange thickness tf")?,
                dim("tw", "the web thickness tw")?,
            );
            let r = root_radius()?;
            (
                Some(Shape::I { h, b, tf, tw, r }),
                format!("I {h} × {b} × {tf} × {tw} mm, r = {r} mm"),
            )
        }
        "mono-i" => {
            let h = dim("h", "the depth h")?;
            let b_top = dim("b_top", "the top flange width b_top")?;
            let tf_top = dim("tf_top", "the top flange thickness tf_top")?;
            let b_bottom = dim("b_bottom", "the bottom flange width b_bottom")?;
            let tf_bottom = dim("tf_bottom", "the bottom flange thickness tf_bottom")?;
            let tw = dim("tw", "the web thickness tw")?;
            let r = root_radius()?;
            (
                Some(Shape::MonoI {
                    h,
                    b_top,
                    tf_top,
                    b_bottom,
                    tf_bottom,
                    tw,
                    r,
                }),
                format!(
                    "mono-I h = {h} mm, top flange {b_top} × {tf_top}, bottom flange {b_bottom} × {tf_bottom}, web {tw} mm, r = {r} mm"
                ),
            )
        }
        "rectangle" => {
            let (h, b) = (dim("h", "the depth h")?, dim("b", "the width b")?);
            (
                Some(Shape::Rectangle { h, b }),
                format!("rectangle {h} × {b} mm"),
            )
        }
        _ => (None, String::new()),
    };
    if let Some(shape) = shape {
        let props = section::properties(&shape).map_err(|e| section_error(t, keys, e))?;
        return Ok(SectionData {
            props,
            heights: [
                Some(props.top_flange),
                Some(props.top_surface),
                Some(props.bottom_flange),
                Some(props.bottom_surface),
            ],
            area_given: true,
            label,
        });
    }
    // kind = "properties"
    let iy = dim_u("iy", "the major-axis second moment of area Iy", "mm⁴")?;
    let iz = dim_u("iz", "the minor-axis second moment of area Iz", "mm⁴")?;
    let it = dim_u("it", "the torsion constant It", "mm⁴")?;
    let iw = t.num_min("iw", None, false, "the warping constant Iw (mm⁶)")?;
    let iw = iw.ok_or_else(|| t.err_at("iw", "missing `iw` (the warping constant Iw, mm⁶; 0 for a section without warping stiffness)"))?.value;
    let area = match t.num("area")? {
        Some(n) if n.value <= 0.0 => {
            return Err(src.error(
                &n.span,
                &n.key,
                format!("the area must be greater than 0 mm², got {}", n.value),
            ));
        }
        Some(n) => Some(n.value),
        None => None,
    };
    let zs = t.num("zs")?.map_or(0.0, |n| n.value);
    let beta_y = t.num("beta_y")?.map_or(0.0, |n| n.value);
    let mut heights = [None; 4];
    for (j, k) in [
        "top_flange",
        "top_surface",
        "bottom_flange",
        "bottom_surface",
    ]
    .iter()
    .enumerate()
    {
        heights[j] = t.num(k)?.map(|n| n.value);
    }
    let props = Properties {
        area: area.unwrap_or(f64::NAN),
        iy,
        iz,
        it,
        iw,
        zs,
        beta_y,
        top_flange: heights[0].unwrap_or(f64::NAN),
        top_surface: heights[1].unwrap_or(f64::NAN),
        bottom_flange: heights[2].unwrap_or(f64::NAN),
        bottom_surface: heights[3].unwrap_or(f64::NAN),
    };
    let label = format!(
        "section properties Iy = {iy:e} mm⁴, Iz = {iz:e} mm⁴, It = {it:e} mm⁴, Iw = {iw:e} mm⁶"
    );
    Ok(SectionData {
        props,
        heights,
        area_given: area.is_some(),
        label,
    })
}
