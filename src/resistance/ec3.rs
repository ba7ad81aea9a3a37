//! EN 1993-1-1:2005 lateral–torsional buckling resistance of I-sections
//! (6.3.2.2 general case, 6.3.2.3 rolled and equivalent welded sections),
//! cross-section class (Table 5.2) and fy by thickness (EN 10025-2 Table 7).
//! Numerics only; Mcr comes from the engine. 2005 edition only: the rules of
//! the 2022 edition (EN 1993-1-1:2022) are not implemented.

use super::catalogue::Fabrication;
use crate::section::Shape;

/// The edition every table names.
pub const EDITION: &str = "EN 1993-1-1:2005 (+AC:2009), 6.3.2.2/6.3.2.3; 2005 edition only";

/// Buckling curve of Table 6.3 / 6.4 / 6.5.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Curve {
    /// αLT = 0.21.
    A,
    /// αLT = 0.34.
    B,
    /// αLT = 0.49.
    C,
    /// αLT = 0.76.
    D,
}

impl Curve {
    /// Imperfection factor αLT (EN 1993-1-1:2005 Table 6.3).
    ///
    /// ```text
    /// curve  a     b     c     d
    /// αLT    0.21  0.34  0.49  0.76
    /// ```
    ///
    /// # References
    /// * EN 1993-1-1:2005, Table 6.3 (recommended values).
    pub fn alpha(self) -> f64 {
        match self {
            Curve::A => 0.21,
            Curve::B => 0.34,
            Curve::C => 0.49,
            Curve::D => 0.76,
        }
    }
    /// The letter.
    pub fn letter(self) -> &'static str {
        match self {
            Curve::A => "a",
            Curve::B => "b",
            Curve::C => "c",
            Curve::D => "d",
        }
    }
    /// Parse a letter.
    pub fn from_letter(s: &str) -> Option<Curve> {
        match s {
            "a" => Some(Curve::A),
            "b" => Some(Curve::B),
            "c" => Some(Curve::C),
            "d" => Some(Curve::D),
            _ => None,
        }
    }
}

/// Which clause of 6.3.2 is used.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// 6.3.2.2, the general case (curves of Table 6.4).
    General,
    /// 6.3.2.3, rolled or equivalent welded sections (curves of Table 6.5).
    Rolled,
}

/// The nationally determined parameters and choices.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Clause.
    pub method: Method,
    /// γM1 (recommended 1.0).
    pub gamma_m1: f64,
    /// λ̄LT,0 of 6.3.2.3 (recommended 0.4).
    pub lambda_lt0: f64,
    /// β of 6.3.2.3 (recommended 0.75).
    pub beta: f64,
    /// Curve chosen by the user instead of the table.
    pub curve: Option<Curve>,
    /// kc of Table 6.6 for the modification factor f of 6.3.2.3(2); None: f = 1.
    pub kc: Option<f64>,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            method: Method::Rolled,
            gamma_m1: 1.0,
            lambda_lt0: 0.4,
            beta: 0.75,
            curve: None,
            kc: None,
        }
    }
}

/// Buckling curve from the tables of the 2005 edition.
///
/// ```text
/// Table 6.4 (6.3.2.2 general case)       Table 6.5 (6.3.2.3 rolled/equivalent welded)
/// rolled I  h/b ≤ 2: a;  h/b > 2: b      rolled I  h/b ≤ 2: b;  h/b > 2: c
/// welded I  h/b ≤ 2: c;  h/b > 2: d      welded I  h/b ≤ 2: c;  h/b > 2: d
/// ```
///
/// For a monosymmetric section b is the narrower flange (conservative; the
/// tables are written for doubly symmetric sections).
///
/// # References
/// * EN 1993-1-1:2005, Tables 6.4 and 6.5. Table 6.5's rolled rows read in
///   SCI/ECCS, Steel Buildings in Europe, Part 10 (infosteel.be, MSB10 p. 22);
///   Table 6.4 from memory (the same h/b split one curve lower).
pub fn curve(method: Method, fabrication: Fabrication, h: f64, b: f64) -> Curve {
    let slender = h / b > 2.0;
    match (method, fabrication, slender) {
        (Method::General, Fabrication::Rolled, false) => Curve::A,
        (Method::General, Fabrication::Rolled, true) => Curve::B,
        (Method::Rolled, Fabrication::Rolled, false) => Curve::B,
        (Method::Rolled, Fabrication::Rolled, true) => Curve::C,
        (_, Fabrication::Welded, false) => Curve::C,
        (_, Fabrication::Welded, true) => Curve::D,
    }
}

/// χLT of the general case, EN 1993-1-1:2005 Eq. (6.56).
///
/// ```text
/// ΦLT = 0.5·[1 + αLT·(λ̄LT − 0.2) + λ̄LT²]
/// χLT = 1 / (ΦLT + √(ΦLT² − λ̄LT²)) ≤ 1
/// ```
///
/// # References
/// * EN 1993-1-1:2005, 6.3.2.2(1), Eq. (6.56).
pub fn chi_general(lambda: f64, alpha: f64) -> f64 {
    let phi = 0.5 * (1.0 + alpha * (lambda - 0.2) + lambda * lambda);
    (1.0 / (phi + (phi * phi - lambda * lambda).max(0.0).sqrt())).min(1.0)
}

/// χLT for rolled and equivalent welded sections, Eq. (6.57).
///
/// ```text
/// ΦLT = 0.5·[1 + αLT·(λ̄LT − λ̄LT,0) + β·λ̄LT²]
/// χLT = 1 / (ΦLT + √(ΦLT² − β·λ̄LT²)),  χLT ≤ 1 and χLT ≤ 1/λ̄LT²
/// ```
///
/// # References
/// * EN 1993-1-1:2005, 6.3.2.3(1), Eq. (6.57).
pub fn chi_rolled(lambda: f64, alpha: f64, lambda0: f64, beta: f64) -> f64 {
    let phi = 0.5 * (1.0 + alpha * (lambda - lambda0) + beta * lambda * lambda);
    let chi = 1.0 / (phi + (phi * phi - beta * lambda * lambda).max(0.0).sqrt());
    let cap = if lambda > 0.0 {
        1.0 / (lambda * lambda)
    } else {
        f64::INFINITY
    };
    chi.min(1.0).min(cap)
}

/// Modification factor f of 6.3.2.3(2), Eq. (6.58).
///
/// ```text
/// f = 1 − 0.5·(1 − kc)·[1 − 2.0·(λ̄LT − 0.8)²],  f ≤ 1
/// χLT,mod = χLT / f,  χLT,mod ≤ 1 and ≤ 1/λ̄LT²
/// ```
///
/// # References
/// * EN 1993-1-1:2005, 6.3.2.3(2), Eqs. (6.58) and (6.59).
pub fn modification_f(kc: f64, lambda: f64) -> f64 {
    let d = lambda - 0.8;
    (1.0 - 0.5 * (1.0 - kc) * (1.0 - 2.0 * d * d)).min(1.0)
}

/// Cross-section class for major-axis bending.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Class {
    /// Class 1.
    One = 1,
    /// Class 2.
    Two = 2,
    /// Class 3.
    Three = 3,
    /// Class 4 (outside this tool's scope).
    Four = 4,
}

/// Classification details.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Classification {
    /// The governing class.
    pub class: Class,
    /// c/t of the flange outstand (the worse flange).
    pub flange_ct: f64,
    /// Class of the flanges.
    pub flange_class: Class,
    /// c/t of the web.
    pub web_ct: f64,
    /// Class of the web.
    pub web_class: Class,
    /// ε = √(235/fy).
    pub epsilon: f64,
}

/// Cross-section class in major-axis bending from Table 5.2.
///
/// ```text
/// ε = √(235/fy)
/// flange outstand in compression (sheet 2):  c = (b − tw − 2r)/2 rolled, (b − tw)/2 welded
///     class 1: c/t ≤ 9ε;  class 2: ≤ 10ε;  class 3: ≤ 14ε
/// web, c = h − tf,t − tf,b − 2r (sheet 1):
///     doubly symmetric, pure bending: class 1 ≤ 72ε, 2 ≤ 83ε, 3 ≤ 124ε
///     monosymmetric: α = compressed share of c at the plastic neutral axis,
///       ψ = stress ratio of the web edges in the elastic state
///       class 1: α > 0.5: 396ε/(13α − 1), else 36ε/α
///       class 2: α > 0.5: 456ε/(13α − 1), else 41.5ε/α
///       class 3: ψ > −1: 42ε/(0.67 + 0.33ψ), else 62ε(1 − ψ)√(−ψ)
/// ```
///
/// Both flanges are checked as if in compression and, for monosymmetric
/// sections, the web for both bending directions: the worse result governs
/// (conservative, independent of the moment's sign). For welded sections
/// the weld throat is not deducted from c (conservative).
///
/// # References
/// * EN 1993-1-1:2005, Table 5.2 sheets 1 and 2 (read as printed in BS EN
///   1993-1-1:2005+A1:2014).
pub fn classify(
    shape: &Shape,
    fy: f64,
    fabrication: Fabrication,
    z_pna: f64,
    z_centroid: f64,
) -> Classification {
    let eps = (235.0 / fy).sqrt();
    let (h, bt, tft, bb, tfb, tw, r) = match *shape {
        Shape::I { h, b, tf, tw, r } => (h, b, tf, b, tf, tw, r),
        Shape::MonoI {
            h,
            b_top,
            tf_top,
            b_bottom,
            tf_bottom,
            tw,
            r,
        } => (h, b_top, tf_top, b_bottom, tf_bottom, tw, r),
        Shape::Rectangle { .. } => {
            return Classification {
                class: Class::One,
                flange_ct: 0.0,
                flange_class: Class::One,
                web_ct: 0.0,
                web_class: Class::One,
                epsilon: eps,
            };
        }
    };
    let rr = match fabrication {
        Fabrication::Rolled => r,
        Fabrication::Welded => 0.0,
    };
    let ct_f = |b: f64, tf: f64| (b - tw - 2.0 * rr) / 2.0 / tf;
    let flange_ct = ct_f(bt, tft).max(ct_f(bb, tfb));
    let fc = |ct: f64| {
        if ct <= 9.0 * eps {
            Class::One
        } else if ct <= 10.0 * eps {
            Class::Two
        } else if ct <= 14.0 * eps {
            Class::Three
        } else {
            Class::Four
        }
    };
    let flange_class = fc(flange_ct);
    let c = h - tft - tfb - 2.0 * rr;
    let web_ct = c / tw;
    let web_start = tfb + rr; // bottom of c, from the bottom surface
    let web_class = {
        let mut worst = Class::One;
        // Compression on top (sagging) and on the bottom (hogging).
        for top_in_compression in [true, false] {
            // α: compressed part of c at the plastic state.
            let comp = if top_in_compression {
                (web_start + c - z_pna).clamp(0.0, c)
            } else {
                (z_pna - web_start).clamp(0.0, c)
            };
            let alpha = comp / c;
            // ψ: stress at the tension edge over the compression edge (elastic).
            let (e_comp, e_ten) = if top_in_compression {
                (web_start + c - z_centroid, web_start - z_centroid)
            } else {
                (z_centroid - web_start, z_centroid - web_start - c)
            };
            let psi = e_ten / e_comp;
            let lim1 = if alpha > 0.5 {
                396.0 * eps / (13.0 * alpha - 1.0)
            } else {
                36.0 * eps / alpha
            };
            let lim2 = if alpha > 0.5 {
                456.0 * eps / (13.0 * alpha - 1.0)
            } else {
                41.5 * eps / alpha
            };
            let lim3 = if psi > -1.0 {
                42.0 * eps / (0.67 + 0.33 * psi)
            } else {
                62.0 * eps * (1.0 - psi) * (-psi).sqrt()
            };
            let cl = if web_ct <= lim1 {
                Class::One
            } else if web_ct <= lim2 {
                Class::Two
            } else if web_ct <= lim3 {
                Class::Three
            } else {
                Class::Four
            };
            worst = worst.max(cl);
        }
        worst
    };
    Classification {
        class: flange_class.max(web_class),
        flange_ct,
        flange_class,
        web_ct,
        web_class,
        epsilon: eps,
    }
}

/// Nominal yield strength fy (MPa) of a grade at a nominal thickness t (mm).
///
/// ```text
/// EN 10025-2 Table 7, minimum yield strength ReH (MPa) by nominal thickness (mm):
///          ≤16  >16–40  >40–63  >63–80  >80–100  >100–150  >150–200  >200–250
/// S235     235   225     215     215     215      195       185       175
/// S275     275   265     255     245     235      225       215       205
/// S355     355   345     335     325     315      295       285       275
/// S450     450   430     410     390     380      380       —         —    (long products)
/// ```
///
/// # Errors
///
/// A message when the grade is not in the table or t is beyond its range.
/// S460 is not a grade of EN 10025-2 (it belongs to parts 3, 4 and 6, not
/// implemented): give `fy` explicitly for it.
///
/// # References
/// * EN 10025-2:2004, Table 7 (mechanical properties of non-alloy structural
///   steels), read as reproduced at readle.co.uk "Steel Grades to Eurocodes".
pub fn fy_en10025_2(grade: &str, t: f64) -> Result<f64, String> {
    const STEPS: [f64; 8] = [16.0, 40.0, 63.0, 80.0, 100.0, 150.0, 200.0, 250.0];
    let row: &[f64] = match grade {
        "S235" => &[235.0, 225.0, 215.0, 215.0, 215.0, 195.0, 185.0, 175.0],
        "S275" => &[275.0, 265.0, 255.0, 245.0, 235.0, 225.0, 215.0, 205.0],
        "S355" => &[355.0, 345.0, 335.0, 325.0, 315.0, 295.0, 285.0, 275.0],
        "S450" => &[450.0, 430.0, 410.0, 390.0, 380.0, 380.0],
        other => {
            return Err(format!(
                "grade \"{other}\" is not in EN 10025-2 Table 7 as implemented (S235, S275, S355, S450); give `fy` in MPa for other grades"
            ));
        }
    };
    for (k, lim) in STEPS.iter().enumerate().take(row.len()) {
        if t <= *lim {
            return Ok(row[k]);
        }
    }
    Err(format!(
        "grade {grade}: the thickness {t} mm is beyond EN 10025-2 Table 7 ({} mm); give `fy` in MPa",
        STEPS[row.len() - 1]
    ))
}

/// The governing thickness for fy: the thickest plate of the section, mm.
pub fn governing_thickness(shape: &Shape) -> f64 {
    match *shape {
        Shape::I { tf, tw, .. } => tf.max(tw),
        Shape::MonoI {
            tf_top,
            tf_bottom,
            tw,
            ..
        } => tf_top.max(tf_bottom).max(tw),
        Shape::Rectangle { h, b } => h.min(b),
    }
}

/// Result of the EN 1993-1-1 check for one Mcr.
#[derive(Debug, Clone, PartialEq)]
pub struct Resistance {
    /// Cross-section class.
    pub class: Classification,
    /// Wy used (Wpl,y for class 1/2, Wel,y for class 3), mm³.
    pub wy: f64,
    /// fy, MPa.
    pub fy: f64,
    /// The curve used.
    pub curve: Curve,
    /// λ̄LT = √(Wy·fy/Mcr).
    pub lambda_lt: f64,
    /// χLT before the modification (Eq. 6.56 or 6.57).
    pub chi_lt: f64,
    /// f (1 when not applied).
    pub f: f64,
    /// χLT,mod (= χLT when f = 1).
    pub chi_lt_mod: f64,
    /// Mb,Rd = χLT,mod·Wy·fy/γM1, kN·m.
    pub mb_rd: f64,
    /// Mc,Rd-like plastic/elastic moment Wy·fy/γM1, kN·m (the short-length plateau).
    pub m_rd: f64,
}

/// Mb,Rd for a section, fy and Mcr (kN·m).
///
/// ```text
/// λ̄LT = √(Wy·fy/Mcr);   χLT by Eq. (6.56) or (6.57);   f by Eq. (6.58) if kc is given
/// Mb,Rd = χLT,mod·Wy·fy/γM1,  Wy = Wpl,y (class 1, 2) or Wel,y (class 3)
/// ```
///
/// # Errors
///
/// A message for Class 4 sections (outside this tool's scope) or Mcr ≤ 0.
///
/// # References
/// * EN 1993-1-1:2005, 6.3.2.1(3) Eq. (6.55), 6.3.2.2, 6.3.2.3.
#[allow(clippy::too_many_arguments)]
pub fn resistance(
    mcr_knm: f64,
    class: Classification,
    wpl: f64,
    wel: f64,
    fy: f64,
    curve: Curve,
    o: &Options,
) -> Result<Resistance, String> {
    let wy = match class.class {
        Class::One | Class::Two => wpl,
        Class::Three => wel,
        Class::Four => {
            return Err(format!(
                "Class 4 cross-section (flange c/t = {:.2}, web c/t = {:.2}, ε = {:.3}): effective sections (EN 1993-1-5) are outside this tool's scope",
                class.flange_ct, class.web_ct, class.epsilon
            ));
        }
    };
    if !(mcr_knm > 0.0) {
        return Err(
            "no positive critical moment: no lateral–torsional buckling resistance to compute"
                .into(),
        );
    }
    let m_y = wy * fy / 1e6; // kN·m
    let lambda = (m_y / mcr_knm).sqrt();
    let alpha = curve.alpha();
    let (chi, f, chi_mod) = match o.method {
        Method::General => {
            let c = chi_general(lambda, alpha);
            (c, 1.0, c)
        }
        Method::Rolled => {
            let c = chi_rolled(lambda, alpha, o.lambda_lt0, o.beta);
            let f = o.kc.map_or(1.0, |kc| modification_f(kc, lambda));
            let cap = if lambda > 0.0 {
                1.0 / (lambda * lambda)
            } else {
                f64::INFINITY
            };
            (c, f, (c / f).min(1.0).min(cap))
        }
    };
    Ok(Resistance {
        class,
        wy,
        fy,
        curve,
        lambda_lt: lambda,
        chi_lt: chi,
        f,
        chi_lt_mod: chi_mod,
        mb_rd: chi_mod * m_y / o.gamma_m1,
        m_rd: m_y / o.gamma_m1,
    })
}
