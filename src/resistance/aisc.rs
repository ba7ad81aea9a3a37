//! AISC 360-16 Chapter F, Sections F2 (doubly symmetric compact I-shapes)
//! and F3 (compact web, noncompact flanges), with the engine's Mcr entering
//! through an equivalent Cb. Numerics only. Monosymmetric sections (F4/F5),
//! noncompact or slender webs (F4/F5) and slender flanges are refused.

use super::catalogue::Fabrication;
use crate::section::{Properties, Shape};

/// The edition every table names.
pub const EDITION: &str = "AISC 360-16 (ANSI/AISC 360-16), Chapter F, Sections F2 and F3";

/// LRFD or ASD.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Method {
    /// φb·Mn.
    Lrfd {
        /// φb (0.90 in F1).
        phi: f64,
    },
    /// Mn/Ωb.
    Asd {
        /// Ωb (1.67 in F1).
        omega: f64,
    },
}

impl Method {
    /// Design (LRFD) or allowable (ASD) strength from Mn.
    pub fn factor(self, mn: f64) -> f64 {
        match self {
            Method::Lrfd { phi } => phi * mn,
            Method::Asd { omega } => mn / omega,
        }
    }
    /// Text for tables.
    pub fn describe(self) -> String {
        match self {
            Method::Lrfd { phi } => format!("LRFD, φb = {phi}"),
            Method::Asd { omega } => format!("ASD, Ωb = {omega}"),
        }
    }
}

/// Section quantities of Chapter F (mm, mm², mm³, mm⁴, mm⁶).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Section {
    /// Sx, elastic modulus about the major axis.
    pub sx: f64,
    /// Zx, plastic modulus about the major axis.
    pub zx: f64,
    /// ry, radius of gyration about the minor axis (AISC's y).
    pub ry: f64,
    /// rts, effective radius of gyration, Eq. (F2-7): rts² = √(Iy·Cw)/Sx.
    pub rts: f64,
    /// J, torsion constant.
    pub j: f64,
    /// ho, distance between flange centroids.
    pub ho: f64,
    /// bf/(2·tf).
    pub lambda_f: f64,
    /// h/tw with h = d − 2·tf − 2·r (clear web less the fillets).
    pub h_tw: f64,
}

impl Section {
    /// From a doubly symmetric I shape and its properties (y major here, x in AISC).
    ///
    /// # Errors
    ///
    /// A message for shapes Sections F2/F3 do not cover (monosymmetric:
    /// F4/F5; rectangles: F11).
    pub fn from_shape(shape: &Shape, p: &Properties, sx: f64, zx: f64) -> Result<Section, String> {
        match *shape {
            Shape::I { h, b, tf, tw, r } => Ok(Section {
                sx,
                zx,
                ry: (p.iz / p.area).sqrt(),
                rts: ((p.iz * p.iw).sqrt() / sx).sqrt(),
                j: p.it,
                ho: h - tf,
                lambda_f: b / (2.0 * tf),
                h_tw: (h - 2.0 * tf - 2.0 * r) / tw,
            }),
            Shape::MonoI { .. } => Err(
                "monosymmetric I-section: AISC 360-16 Sections F4/F5 are not implemented (only F2/F3 for doubly symmetric I-shapes)".into(),
            ),
            Shape::Rectangle { .. } => {
                Err("rectangular section: AISC 360-16 Section F11 is not implemented".into())
            }
        }
    }
}

/// Limiting unbraced lengths of F2, mm.
///
/// ```text
/// Lp = 1.76·ry·√(E/Fy)                                                (F2-5)
/// Lr = 1.95·rts·(E/(0.7·Fy))·√( J·c/(Sx·ho) + √((J·c/(Sx·ho))² + 6.76·(0.7·Fy/E)²) )   (F2-6)
/// c = 1 for doubly symmetric I-shapes                                  (F2-8a)
/// ```
///
/// # References
/// * ANSI/AISC 360-16, Specification for Structural Steel Buildings, F2.2,
///   Eqs. (F2-5), (F2-6), (F2-8a).
pub fn limiting_lengths(s: &Section, e: f64, fy: f64) -> (f64, f64) {
    let lp = 1.76 * s.ry * (e / fy).sqrt();
    let jc = s.j / (s.sx * s.ho);
    let k = 0.7 * fy / e;
    let lr = 1.95 * s.rts * (1.0 / k) * (jc + (jc * jc + 6.76 * k * k).sqrt()).sqrt();
    (lp, lr)
}

/// Elastic critical stress of Eq. (F2-4), MPa.
///
/// ```text
/// Fcr = Cb·π²·E/(Lb/rts)² · √(1 + 0.078·(J·c/(Sx·ho))·(Lb/rts)²)
/// ```
///
/// # References
/// * ANSI/AISC 360-16, F2.2, Eq. (F2-4).
pub fn fcr(s: &Section, e: f64, lb: f64, cb: f64) -> f64 {
    let q = lb / s.rts;
    cb * std::f64::consts::PI.powi(2) * e / (q * q)
        * (1.0 + 0.078 * s.j / (s.sx * s.ho) * q * q).sqrt()
}

/// Nominal flexural strength for lateral–torsional buckling, Eqs. (F2-1)–(F2-3), N·mm.
///
/// ```text
/// Mp = Fy·Zx
/// Lb ≤ Lp:        Mn = Mp                                              (F2-1)
/// Lp < Lb ≤ Lr:   Mn = Cb·[Mp − (Mp − 0.7·Fy·Sx)·(Lb − Lp)/(Lr − Lp)] ≤ Mp   (F2-2)
/// Lb > Lr:        Mn = Fcr·Sx ≤ Mp                                     (F2-3)
/// ```
///
/// # References
/// * ANSI/AISC 360-16, F2.1 and F2.2.
pub fn mn_ltb(mp: f64, m07: f64, fcr_sx: f64, lb: f64, lp: f64, lr: f64, cb: f64) -> f64 {
    if lb <= lp {
        mp
    } else if lb <= lr {
        (cb * (mp - (mp - m07) * (lb - lp) / (lr - lp))).min(mp)
    } else {
        fcr_sx.min(mp)
    }
}

/// Nominal strength for compression flange local buckling, Eq. (F3-1), N·mm.
///
/// ```text
/// λ = bf/(2·tf),  λpf = 0.38·√(E/Fy),  λrf = 1.0·√(E/Fy)   (Table B4.1b, case 10)
/// Mn = Mp − (Mp − 0.7·Fy·Sx)·(λ − λpf)/(λrf − λpf)          (F3-1)
/// ```
///
/// # References
/// * ANSI/AISC 360-16, F3.2 Eq. (F3-1); Table B4.1b case 10.
pub fn mn_flb(mp: f64, m07: f64, lambda: f64, lpf: f64, lrf: f64) -> f64 {
    if lambda <= lpf {
        mp
    } else {
        mp - (mp - m07) * (lambda - lpf) / (lrf - lpf)
    }
}

/// The AISC result for one engine Mcr.
#[derive(Debug, Clone, PartialEq)]
pub struct Resistance {
    /// "F2" (compact flanges) or "F3" (noncompact flanges).
    pub section_clause: &'static str,
    /// Lp, mm.
    pub lp: f64,
    /// Lr, mm.
    pub lr: f64,
    /// Equivalent Cb = Mcr,FE / (Fcr(Cb = 1)·Sx).
    pub cb: f64,
    /// Mcr of Eq. (F2-4) with Cb = 1 at Lb, kN·m.
    pub mcr_f24: f64,
    /// Mn, kN·m.
    pub mn: f64,
    /// φMn or Mn/Ω, kN·m.
    pub m_design: f64,
    /// Mp, kN·m.
    pub mp: f64,
    /// Slenderness in the EN sense √(Mp/Mcr), for comparison columns.
    pub lambda: f64,
    /// Mn/Mp (the reduction factor in the EN sense).
    pub ratio: f64,
}

/// Design strength with the engine's Mcr (kN·m) over unbraced length lb (mm).
///
/// ```text
/// Cb,eq = Mcr,FE / (Fcr(F2-4; Cb = 1, Lb)·Sx)        (interpretation, stated on each table)
/// Mn = min(Mn,LTB(Cb,eq) [F2-1..F2-3],  Mn,FLB [F3-1] for noncompact flanges)
/// design strength φb·Mn (LRFD) or Mn/Ωb (ASD)
/// ```
///
/// # Errors
///
/// A message for welded sections with noncompact flanges (kc of F3 not
/// implemented), slender flanges, noncompact or slender webs (F4/F5), or
/// Mcr ≤ 0.
///
/// # References
/// * ANSI/AISC 360-16, F1 (φb = 0.90, Ωb = 1.67), F2, F3; Table B4.1b cases 10 and 15.
#[allow(clippy::too_many_arguments)]
pub fn resistance(
    s: &Section,
    fabrication: Fabrication,
    e: f64,
    fy: f64,
    lb: f64,
    mcr_knm: f64,
    method: Method,
) -> Result<Resistance, String> {
    let root = (e / fy).sqrt();
    let (lpw, lrw) = (3.76 * root, 5.70 * root);
    if s.h_tw > lpw {
        return Err(format!(
            "web h/tw = {:.1} exceeds the compact limit 3.76·√(E/Fy) = {:.1}: noncompact and slender webs (AISC 360-16 F4/F5) are not implemented",
            s.h_tw, lpw
        ));
    }
    let _ = lrw;
    let (lpf, lrf) = (0.38 * root, 1.0 * root);
    if s.lambda_f > lrf {
        return Err(format!(
            "flange bf/2tf = {:.2} is slender (> {:.2}): Eq. (F3-2) is not implemented",
            s.lambda_f, lrf
        ));
    }
    if s.lambda_f > lpf && fabrication == Fabrication::Welded {
        return Err(
            "welded section with noncompact flanges: the kc of built-up sections (Table B4.1b case 11) is not implemented".into(),
        );
    }
    if !(mcr_knm > 0.0) {
        return Err(
            "no positive critical moment: no lateral–torsional buckling strength to compute".into(),
        );
    }
    let (lp, lr) = limiting_lengths(s, e, fy);
    let mp = fy * s.zx;
    let m07 = 0.7 * fy * s.sx;
    let mcr1 = fcr(s, e, lb, 1.0) * s.sx; // N·mm
    let cb = mcr_knm * 1e6 / mcr1;
    let ltb = mn_ltb(mp, m07, fcr(s, e, lb, cb) * s.sx, lb, lp, lr, cb);
    let (mn, clause) = if s.lambda_f > lpf {
        (ltb.min(mn_flb(mp, m07, s.lambda_f, lpf, lrf)), "F3")
    } else {
        (ltb, "F2")
    };
    Ok(Resistance {
        section_clause: clause,
        lp,
        lr,
        cb,
        mcr_f24: mcr1 / 1e6,
        mn: mn / 1e6,
        m_design: method.factor(mn) / 1e6,
        mp: mp / 1e6,
        lambda: (mp / 1e6 / mcr_knm).sqrt(),
        ratio: mn / mp,
    })
}

/// Nominal yield stress of an ASTM grade, MPa (1 ksi = 6.894757 MPa).
///
/// ```text
/// A992: Fy = 50 ksi (344.7 MPa);  A572-50: 50 ksi;  A36: 36 ksi (248.2 MPa)
/// ```
///
/// # Errors
///
/// A message for other grades (give `fy`).
///
/// # References
/// * ASTM A992/A992M (Fy = 50 ksi, as used in AISC Design Examples v15.0,
///   F.1); ASTM A572/A572M Grade 50; ASTM A36/A36M (36 ksi, from memory).
pub fn fy_astm(grade: &str) -> Result<f64, String> {
    const KSI: f64 = 6.894_757_293;
    match grade {
        "A992" | "A572-50" => Ok(50.0 * KSI),
        "A36" => Ok(36.0 * KSI),
        other => Err(format!(
            "grade \"{other}\" is not known for AISC 360-16 (A992, A572-50, A36); give `fy` in MPa"
        )),
    }
}
