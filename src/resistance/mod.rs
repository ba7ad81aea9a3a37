//! Member design resistance to lateral–torsional buckling from the engine's
//! elastic critical moment: EN 1993-1-1:2005 (6.3.2.2, 6.3.2.3) and AISC
//! 360-16 (F2, F3), the section catalogue, and the `[design]` table.
//!
//! Mcr always comes from the finite-element engine (`crate::solve`) for the
//! declared load pattern, supports, restraints and load height; nothing here
//! computes an Mcr from a formula (AISC's Eq. F2-4 enters only to express the
//! engine's Mcr as an equivalent Cb). Numerics (`ec3`, `aisc`, [`evaluate`],
//! [`design_ratio`]) do no I/O; [`catalogue::load`] reads a user's file.

pub mod aisc;
pub mod catalogue;
pub mod ec3;
pub mod spec;

use crate::section::{Moduli, Properties, Shape, moduli, properties};
use catalogue::Fabrication;

/// The code and its options.
#[derive(Debug, Clone, PartialEq)]
pub enum Code {
    /// EN 1993-1-1:2005.
    Ec3(ec3::Options),
    /// AISC 360-16.
    Aisc(aisc::Method),
}

/// What the `[design]` table asks for.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// Code and options.
    pub code: Code,
    /// Steel grade (S235…S450 for EN 1993-1-1; A992, A572-50, A36 for AISC).
    pub grade: Option<String>,
    /// fy in MPa given directly (overrides the grade's table).
    pub fy: Option<f64>,
    /// Rolled or welded (overrides the catalogue / the r = 0 rule).
    pub fabrication: Option<Fabrication>,
}

/// A section as the design needs it.
#[derive(Debug, Clone, PartialEq)]
pub struct DesignSection {
    /// A name for tables (catalogue name, or the dimensions).
    pub name: String,
    /// Dimensions, mm.
    pub shape: Shape,
    /// Rolled or welded.
    pub fabrication: Fabrication,
    /// Where the dimensions come from.
    pub source: String,
    /// Properties, mm.
    pub props: Properties,
    /// Bending moduli, mm³.
    pub moduli: Moduli,
}

impl DesignSection {
    /// Build from a shape.
    ///
    /// # Errors
    ///
    /// The section module's message for bad dimensions.
    pub fn new(
        name: &str,
        shape: Shape,
        fabrication: Fabrication,
        source: &str,
    ) -> Result<Self, String> {
        let props = properties(&shape).map_err(|e| e.to_string())?;
        let moduli = moduli(&shape).map_err(|e| e.to_string())?;
        Ok(DesignSection {
            name: name.to_owned(),
            shape,
            fabrication,
            source: source.to_owned(),
            props,
            moduli,
        })
    }

    /// From a catalogue entry.
    pub fn from_entry(e: &catalogue::Entry) -> Result<Self, String> {
        DesignSection::new(&e.name, e.shape, e.fabrication, &e.source)
    }
}

/// One evaluated design resistance.
#[derive(Debug, Clone, PartialEq)]
pub struct Outcome {
    /// The engine's Mcr, kN·m.
    pub mcr: f64,
    /// λ̄LT (EN) or √(Mp/Mcr) (AISC, for comparison).
    pub lambda_lt: f64,
    /// χLT,mod (EN) or Mn/Mp (AISC).
    pub chi_lt: f64,
    /// Mb,Rd (EN) or φb·Mn / Mn/Ωb (AISC), kN·m.
    pub mb_rd: f64,
    /// The short-length plateau: Wy·fy/γM1 (EN) or φ·Mp, Mp/Ω (AISC), kN·m.
    pub m_plateau: f64,
    /// fy used, MPa.
    pub fy: f64,
    /// Details per code.
    pub detail: Detail,
}

/// Code-specific details.
#[derive(Debug, Clone, PartialEq)]
pub enum Detail {
    /// EN 1993-1-1.
    Ec3(ec3::Resistance),
    /// AISC 360-16.
    Aisc(aisc::Resistance),
}

/// The fy of a design for a section, MPa, and how it was found.
///
/// # Errors
///
/// A message when neither `fy` nor a known grade is given.
pub fn yield_strength(d: &Design, s: &DesignSection) -> Result<(f64, String), String> {
    if let Some(fy) = d.fy {
        return Ok((fy, format!("fy = {fy} MPa as given")));
    }
    let Some(g) = &d.grade else {
        return Err("give `grade` (for example \"S355\" or \"A992\") or `fy` in MPa".into());
    };
    match d.code {
        Code::Ec3(_) => {
            let t = ec3::governing_thickness(&s.shape);
            let fy = ec3::fy_en10025_2(g, t)?;
            Ok((
                fy,
                format!("fy = {fy} MPa: {g}, thickest plate {t:.1} mm, EN 10025-2:2004 Table 7"),
            ))
        }
        Code::Aisc(_) => {
            let fy = aisc::fy_astm(g)?;
            Ok((
                fy,
                format!(
                    "Fy = {:.1} MPa ({:.0} ksi): ASTM {g}",
                    fy,
                    fy / 6.894_757_293
                ),
            ))
        }
    }
}

/// The design resistance for one engine Mcr (kN·m) at unbraced length
/// `lb_m` (m), with Young's modulus `e` (MPa, AISC formulas only).
///
/// ```text
/// EN 1993-1-1:2005:  λ̄LT = √(Wy·fy/Mcr),  Mb,Rd = χLT,mod·Wy·fy/γM1
/// AISC 360-16:       Cb,eq = Mcr/(Fcr(F2-4; Cb = 1)·Sx),  φb·Mn or Mn/Ωb by F2/F3
/// ```
///
/// # Errors
///
/// Class 4, sections outside F2/F3, Mcr ≤ 0, unknown grade: a message.
///
/// # References
/// * EN 1993-1-1:2005, 6.3.2; ANSI/AISC 360-16, Chapter F (see [`ec3`], [`aisc`]).
pub fn evaluate(
    d: &Design,
    s: &DesignSection,
    lb_m: f64,
    mcr: f64,
    e: f64,
) -> Result<Outcome, String> {
    let (fy, _) = yield_strength(d, s)?;
    let fab = d.fabrication.unwrap_or(s.fabrication);
    match &d.code {
        Code::Ec3(o) => {
            let class = ec3::classify(&s.shape, fy, fab, s.moduli.z_pna, s.moduli.z_centroid);
            let (h, b) = height_and_narrow_flange(&s.shape);
            let curve = o.curve.unwrap_or_else(|| ec3::curve(o.method, fab, h, b));
            let r = ec3::resistance(mcr, class, s.moduli.wpl_y, s.moduli.wel_y, fy, curve, o)?;
            Ok(Outcome {
                mcr,
                lambda_lt: r.lambda_lt,
                chi_lt: r.chi_lt_mod,
                mb_rd: r.mb_rd,
                m_plateau: r.m_rd,
                fy,
                detail: Detail::Ec3(r),
            })
        }
        Code::Aisc(m) => {
            let sec =
                aisc::Section::from_shape(&s.shape, &s.props, s.moduli.wel_y, s.moduli.wpl_y)?;
            let r = aisc::resistance(&sec, fab, e, fy, lb_m * 1000.0, mcr, *m)?;
            Ok(Outcome {
                mcr,
                lambda_lt: r.lambda,
                chi_lt: r.ratio,
                mb_rd: r.m_design,
                m_plateau: m.factor(r.mp * 1e6) / 1e6,
                fy,
                detail: Detail::Aisc(r),
            })
        }
    }
}

/// Depth and the narrower flange width (for the h/b curve rules), mm.
fn height_and_narrow_flange(s: &Shape) -> (f64, f64) {
    match *s {
        Shape::I { h, b, .. } => (h, b),
        Shape::MonoI {
            h, b_top, b_bottom, ..
        } => (h, b_top.min(b_bottom)),
        Shape::Rectangle { h, b } => (h, b),
    }
}

/// The design consequence of a simplified Mcr rule: the ratio of design
/// resistances Mb,Rd(Mcr,rule) / Mb,Rd(Mcr,FE) for one section and grade.
///
/// A ratio above 1 means the rule's Mcr leads to a larger — unconservative —
/// design resistance than the engine's; the ratio is closer to 1 than the
/// ratio of the Mcr values themselves because χLT flattens at low slenderness
/// (both are 1 on the plateau).
///
/// ```text
/// ratio = Mb,Rd(λ̄(Mcr,rule)) / Mb,Rd(λ̄(Mcr,FE))      (EN 1993-1-1:2005 6.3.2)
///       = φMn(Cb,eq(Mcr,rule)) / φMn(Cb,eq(Mcr,FE))   (AISC 360-16 F2/F3)
/// ```
///
/// Inputs: both Mcr in kN·m at the same unbraced length `lb_m` (m); `e` in MPa.
///
/// # Errors
///
/// As [`evaluate`].
///
/// # References
/// * EN 1993-1-1:2005, 6.3.2.2 and 6.3.2.3; ANSI/AISC 360-16, F2 and F3.
pub fn design_ratio(
    d: &Design,
    s: &DesignSection,
    lb_m: f64,
    e: f64,
    mcr_rule: f64,
    mcr_fe: f64,
) -> Result<f64, String> {
    let a = evaluate(d, s, lb_m, mcr_rule, e)?;
    let b = evaluate(d, s, lb_m, mcr_fe, e)?;
    Ok(a.mb_rd / b.mb_rd)
}

/// Lines that state a design's assumptions (for preambles and reports).
pub fn assumptions(d: &Design, s: &DesignSection) -> Vec<String> {
    let fab = d.fabrication.unwrap_or(s.fabrication);
    let mut v = Vec::new();
    match &d.code {
        Code::Ec3(o) => {
            v.push(format!("code: {}", ec3::EDITION));
            v.push(match o.method {
                ec3::Method::General => "method: 6.3.2.2 general case, Eq. (6.56), curves of Table 6.4".into(),
                ec3::Method::Rolled => format!(
                    "method: 6.3.2.3 rolled and equivalent welded sections, Eq. (6.57), curves of Table 6.5, λ̄LT,0 = {}, β = {}",
                    o.lambda_lt0, o.beta
                ),
            });
            v.push(format!("γM1 = {}", o.gamma_m1));
            let (h, b) = height_and_narrow_flange(&s.shape);
            let c = o.curve.unwrap_or_else(|| ec3::curve(o.method, fab, h, b));
            v.push(format!(
                "buckling curve {} (αLT = {}){}; {fab} section, h/b = {:.2}",
                c.letter(),
                c.alpha(),
                if o.curve.is_some() {
                    " as chosen in the spec"
                } else {
                    " from the table"
                },
                h / b,
                fab = fab.as_str()
            ));
            v.push(match (o.method, o.kc) {
                (ec3::Method::Rolled, Some(kc)) => format!(
                    "modification factor f of 6.3.2.3(2) applied with kc = {kc} as given in the spec (EN 1993-1-1:2005 Table 6.6; check that the moment pattern matches the row chosen)"
                ),
                (ec3::Method::Rolled, None) => "f = 1: no kc given (the moment pattern is not matched to Table 6.6 by this tool)".into(),
                (ec3::Method::General, _) => "f not used (6.3.2.2)".into(),
            });
            v.push("cross-section class from Table 5.2 (flange outstand in compression, web in bending; Class 4 is outside this tool's scope); Wy = Wpl,y for Class 1/2, Wel,y for Class 3".into());
        }
        Code::Aisc(m) => {
            v.push(format!("code: {}", aisc::EDITION));
            v.push(format!("method: {}", m.describe()));
            v.push("interpretation: the engine's Mcr enters F2 through an equivalent Cb = Mcr,FE / Mcr(Eq. F2-4 with Cb = 1 at Lb); Mn ≤ Mp".into());
            v.push("compact web required (F4/F5 not implemented); noncompact flanges by F3 (FLB), monosymmetric sections refused".into());
        }
    }
    v
}

/// [`design_ratio`] for a point of a dimensionless family: the member length
/// that gives the section the family's κ, and both Mcr from their μ values.
///
/// ```text
/// L = (π/κ)·√(E·Iw/(G·It))            (κ = (π/L)·√(E·Iw/(G·It)), domain notes)
/// Mcr = μ·√(E·Iz·G·It)/L               (μ = Mcr·L/√(E·Iz·G·It))
/// ratio = Mb,Rd(Mcr,rule)/Mb,Rd(Mcr,FE) at that L
/// ```
///
/// Inputs: E and G in MPa, κ > 0, μ values dimensionless. Returns the ratio
/// and the length in m.
///
/// # Errors
///
/// As [`evaluate`]; also κ ≤ 0 or a section without warping stiffness.
///
/// # References
/// * ltb-atlas domain notes, "Dimensionless parameters"; EN 1993-1-1:2005
///   6.3.2; ANSI/AISC 360-16 F2/F3.
#[allow(clippy::too_many_arguments)]
pub fn design_ratio_at_kappa(
    d: &Design,
    s: &DesignSection,
    e: f64,
    g: f64,
    kappa: f64,
    mu_rule: f64,
    mu_fe: f64,
) -> Result<(f64, f64), String> {
    let p = &s.props;
    if !(kappa > 0.0) || !(p.iw > 0.0) {
        return Err("κ > 0 and a section with warping stiffness are needed to place a family point on a section".into());
    }
    let l_mm = std::f64::consts::PI / kappa * (e * p.iw / (g * p.it)).sqrt();
    let unit = (e * p.iz * g * p.it).sqrt() / l_mm / 1e6; // kN·m
    let ratio = design_ratio(d, s, l_mm / 1000.0, e, mu_rule * unit, mu_fe * unit)?;
    Ok((ratio, l_mm / 1000.0))
}
