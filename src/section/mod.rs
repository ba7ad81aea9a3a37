//! Cross-section properties from dimensions (mm). No I/O.
//!
//! INTERFACE FIXED BY THE ENGINE (do not rename): [`Shape`], [`Properties`],
//! [`properties`], [`SectionError`]. Heights are measured upward and given
//! relative to the shear centre, in mm.
//!
//! # Axes and what is computed how
//!
//! ```text
//!   z (up)                     y is horizontal (lateral), z vertical, both in mm;
//!   ^    b_top                 the origin of the moments below is the section's
//!   |  ┌───────┐  tf_top       mid-depth on the web centre line, results are
//!   |  └──┐ ┌──┘               about the centroid (A, Iy, Iz, βy) or the shear
//!   |     │ │ tw  (fillets r   centre (Iw, heights).
//!   |     │ │      at the four
//!   |  ┌──┘ └──┐   junctions)
//!   |  └───────┘  tf_bottom
//!   +-------------> y
//! ```
//!
//! * Area, centroid, Iy, Iz and the monosymmetry integral ∫z(y²+z²)dA are exact
//!   for the idealised rolled shape: rectangles for the flanges and the web plus
//!   four circular root fillets, each fillet being a square r × r less a quarter
//!   disc of radius r (area (4 − π)·r²/4). The integrals are evaluated in closed
//!   form from polynomial area moments (see `Moments`).
//! * The torsion constant It uses the junction formula of El Darwish & Johnston
//!   (1965) for filleted sections and the plate sum for welded ones (r = 0).
//! * Warping constant and shear centre follow thin-walled theory with the flange
//!   plates as the warping elements (Kitipornchai & Trahair 1980).
//! * Tests compare with published section tables (tests/section_tables.rs).

mod moduli;

pub use moduli::{Moduli, moduli};

use std::f64::consts::PI;
use std::ops::{Add, Sub};

/// A cross-section described by its dimensions, all in mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Shape {
    /// Doubly symmetric I-section: depth h, flange width b, flange thickness
    /// tf, web thickness tw, root radius r (r = 0 for welded).
    I {
        /// Overall depth, mm.
        h: f64,
        /// Flange width, mm.
        b: f64,
        /// Flange thickness, mm.
        tf: f64,
        /// Web thickness, mm.
        tw: f64,
        /// Root radius of the web–flange fillets, mm (0 for welded plates).
        r: f64,
    },
    /// Monosymmetric I-section with different flanges: overall depth h, top
    /// flange b_top × tf_top, bottom flange b_bottom × tf_bottom, web tw,
    /// root radius r (both web–flange junctions; 0 for welded).
    MonoI {
        /// Overall depth, mm.
        h: f64,
        /// Top flange width, mm.
        b_top: f64,
        /// Top flange thickness, mm.
        tf_top: f64,
        /// Bottom flange width, mm.
        b_bottom: f64,
        /// Bottom flange thickness, mm.
        tf_bottom: f64,
        /// Web thickness, mm.
        tw: f64,
        /// Root radius at both web–flange junctions, mm (0 for welded plates).
        r: f64,
    },
    /// Solid rectangle: depth h (vertical) and width b.
    Rectangle {
        /// Depth (vertical), mm.
        h: f64,
        /// Width (horizontal), mm.
        b: f64,
    },
}

/// Section properties (mm-based units) and reference heights.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Properties {
    /// Area A, mm².
    pub area: f64,
    /// Second moment about the major (horizontal) axis, Iy, mm⁴.
    pub iy: f64,
    /// Second moment about the minor (vertical) axis, Iz, mm⁴.
    pub iz: f64,
    /// St Venant torsion constant It, mm⁴.
    pub it: f64,
    /// Warping constant Iw about the shear centre, mm⁶.
    pub iw: f64,
    /// Height of the shear centre above the centroid, zs, mm.
    pub zs: f64,
    /// Monosymmetry constant βy = (1/Iy)∫z(y²+z²)dA − 2·zs, mm (domain notes; < 0 when the larger flange is on top).
    pub beta_y: f64,
    /// Height above the shear centre of the top flange centroid, mm.
    pub top_flange: f64,
    /// Height above the shear centre of the top surface, mm.
    pub top_surface: f64,
    /// Height above the shear centre of the bottom flange centroid, mm (negative).
    pub bottom_flange: f64,
    /// Height above the shear centre of the bottom surface, mm (negative).
    pub bottom_surface: f64,
}

/// Bad dimensions.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{field}: {message}")]
pub struct SectionError {
    /// The offending dimension's key (for example `tf_top`).
    pub field: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

impl SectionError {
    fn new(field: &str, message: String) -> Self {
        Self {
            field: field.to_owned(),
            message,
        }
    }
}

/// Compute the properties of a shape.
///
/// All inputs and outputs are in mm (mm², mm⁴, mm⁶); z is up, heights are
/// relative to the shear centre.
///
/// * `Shape::I` and `Shape::MonoI`: exact A, Iy, Iz and monosymmetry integral
///   including the four root fillets (each a square r × r less a quarter disc);
///   It by the junction formula of El Darwish & Johnston (1965) when r > 0 and
///   by the plate sum when r = 0; shear centre and Iw by thin-walled theory
///   with the flange plates (Kitipornchai & Trahair 1980). For `Shape::I`
///   zs = βy = 0 and Iw = Iz·hs²/4 with hs = h − tf (as in the SCI tables,
///   SCI P057).
/// * `Shape::Rectangle`: exact Saint-Venant series for It (Timoshenko &
///   Goodier), warping neglected (Iw = 0), zs = βy = 0.
///
/// ```text
/// I-sections (t = top, b = bottom flange):
///   A  = b_t·tf_t + b_b·tf_b + (h − tf_t − tf_b)·tw + (4 − π)·r²
///   Iy = ∫z'² dA,  Iz = ∫y² dA,  z' = z − zc  (fillets included exactly)
///   ρ  = Iz,t/(Iz,t + Iz,b),  Iz,t = tf_t·b_t³/12,  Iz,b = tf_b·b_b³/12
///   hs = h − (tf_t + tf_b)/2;  shear centre hs·(1 − ρ) below the top flange centroid
///   Iw = ρ·(1 − ρ)·Iz·hs²                      (Iz·hs²/4 for equal flanges)
///   βy = (1/Iy)·∫z'(y² + z'²) dA − 2·zs        (< 0 with the larger flange on top)
///   It = Σ_flanges b·tf³·[1/3 − 0.21·(tf/b)·(1 − tf⁴/(12·b⁴))]
///        + (h − tf_t − tf_b)·tw³/3 + Σ_junctions α·D⁴       (junctions if r > 0)
///   α  = −0.042 + 0.2204·tw/tf + 0.1355·r/tf − 0.0865·r·tw/tf² − 0.0725·(tw/tf)²
///   D  = [(tf + r)² + tw·(r + tw/4)]/(2·r + tf)
/// rectangle (a = max(h, b), t = min(h, b)):
///   It = (a·t³/3)·[1 − (192/π⁵)·(t/a)·Σ_{n odd} tanh(n·π·a/(2·t))/n⁵]
/// heights above the shear centre:
///   top_flange = top flange plate centroid (rectangle: top surface, h/2)
///   bottom_flange = bottom flange plate centroid (rectangle: bottom surface)
/// ```
///
/// # Errors
///
/// [`SectionError`] naming the dimension key (`h`, `b`, `tf`, `tw`, `r`,
/// `b_top`, `tf_top`, `b_bottom`, `tf_bottom`) when a dimension is not finite,
/// not positive (r: negative), when the flanges fill the depth, when the web is
/// not narrower than a flange, or when the root fillets do not fit across a
/// flange or between the flanges.
///
/// # Examples
///
/// ```
/// use ltb_atlas::section::{properties, Shape};
/// // IPE 300 (EN 10365 dimensions).
/// let p = properties(&Shape::I { h: 300.0, b: 150.0, tf: 10.7, tw: 7.1, r: 15.0 }).unwrap();
/// assert!((p.area - 5381.0).abs() < 5.0);       // 53.8 cm²
/// assert!((p.it / 1e4 - 19.9).abs() < 0.1);     // 19.9 cm⁴ (UK tables)
/// assert_eq!(p.beta_y, 0.0);
/// ```
///
/// # References
///
/// * El Darwish, I.A. & Johnston, B.G. (1965). Torsion of structural shapes.
///   Journal of the Structural Division, ASCE, 91(ST1), 203–227.
/// * Seaburg, P.A. & Carter, C.J. (1997). Torsional Analysis of Structural Steel
///   Members. AISC Steel Design Guide 9, AISC, Chicago. Appendix C.
/// * Kitipornchai, S. & Trahair, N.S. (1980). Buckling properties of
///   monosymmetric I-beams. Journal of the Structural Division, ASCE, 106(ST5),
///   941–957.
/// * Nethercot, D.A., Salter, P.R. & Malik, A.S. (1989). Design of Members
///   Subject to Combined Bending and Torsion. SCI Publication P057, The Steel
///   Construction Institute, Ascot.
/// * Timoshenko, S.P. & Goodier, J.N. (1970). Theory of Elasticity, 3rd ed.
///   McGraw-Hill, New York. Chapter 10 (torsion of rectangular bars).
/// * Young, W.C. & Budynas, R.G. (2002). Roark's Formulas for Stress and Strain,
///   7th ed. McGraw-Hill, New York. Table 10.7 (solid rectangular section).
pub fn properties(shape: &Shape) -> Result<Properties, SectionError> {
    match *shape {
        Shape::I { h, b, tf, tw, r } => {
            check_dimensions(&[("h", h), ("b", b), ("tf", tf), ("tw", tw)], r)?;
            if 2.0 * tf >= h {
                return Err(SectionError::new(
                    "tf",
                    format!(
                        "the two flanges (2 × {tf} mm) fill the whole depth h = {h} mm; \
                         tf must be less than h/2 = {} mm",
                        h / 2.0
                    ),
                ));
            }
            check_web_and_fillets(h, &[("b", b)], tf + tf, tw, r, "h − 2·tf")?;
            let mut p = i_section(&IGeometry {
                h,
                b_top: b,
                tf_top: tf,
                b_bottom: b,
                tf_bottom: tf,
                tw,
                r,
            });
            // Doubly symmetric: shear centre and centroid coincide and the
            // Wagner integral vanishes identically; remove round-off.
            p.zs = 0.0;
            p.beta_y = 0.0;
            Ok(p)
        }
        Shape::MonoI {
            h,
            b_top,
            tf_top,
            b_bottom,
            tf_bottom,
            tw,
            r,
        } => {
            check_dimensions(
                &[
                    ("h", h),
                    ("b_top", b_top),
                    ("tf_top", tf_top),
                    ("b_bottom", b_bottom),
                    ("tf_bottom", tf_bottom),
                    ("tw", tw),
                ],
                r,
            )?;
            if tf_top + tf_bottom >= h {
                let field = if tf_top >= tf_bottom {
                    "tf_top"
                } else {
                    "tf_bottom"
                };
                return Err(SectionError::new(
                    field,
                    format!(
                        "the flanges (tf_top + tf_bottom = {} mm) fill the whole depth \
                         h = {h} mm; make the flanges thinner or the section deeper",
                        tf_top + tf_bottom
                    ),
                ));
            }
            check_web_and_fillets(
                h,
                &[("b_top", b_top), ("b_bottom", b_bottom)],
                tf_top + tf_bottom,
                tw,
                r,
                "h − tf_top − tf_bottom",
            )?;
            Ok(i_section(&IGeometry {
                h,
                b_top,
                tf_top,
                b_bottom,
                tf_bottom,
                tw,
                r,
            }))
        }
        Shape::Rectangle { h, b } => {
            check_dimensions(&[("h", h), ("b", b)], 0.0)?;
            Ok(rectangle(h, b))
        }
    }
}

/// Every dimension finite and > 0; the root radius finite and ≥ 0.
fn check_dimensions(dims: &[(&str, f64)], r: f64) -> Result<(), SectionError> {
    for &(key, value) in dims {
        if !value.is_finite() {
            return Err(SectionError::new(
                key,
                format!("must be a finite number of millimetres, got {value}"),
            ));
        }
        if value <= 0.0 {
            return Err(SectionError::new(
                key,
                format!("must be greater than 0 mm, got {value} mm; give the dimension in mm"),
            ));
        }
    }
    if !r.is_finite() {
        return Err(SectionError::new(
            "r",
            format!("must be a finite number of millimetres, got {r}"),
        ));
    }
    if r < 0.0 {
        return Err(SectionError::new(
            "r",
            format!("must not be negative, got {r} mm; use r = 0 for a welded section"),
        ));
    }
    Ok(())
}

/// Web narrower than every flange; fillets fit across the flanges and along
/// the clear web depth.
fn check_web_and_fillets(
    h: f64,
    flanges: &[(&str, f64)],
    tf_sum: f64,
    tw: f64,
    r: f64,
    clear_name: &str,
) -> Result<(), SectionError> {
    for &(key, b) in flanges {
        if tw >= b {
            return Err(SectionError::new(
                "tw",
                format!(
                    "the web ({tw} mm) must be thinner than the flange width {key} = {b} mm; \
                     check that tw and {key} are not swapped"
                ),
            ));
        }
    }
    for &(key, b) in flanges {
        if tw + 2.0 * r > b {
            return Err(SectionError::new(
                "r",
                format!(
                    "the root fillets do not fit across the flange: tw + 2·r = {} mm exceeds \
                     {key} = {b} mm; use r ≤ ({key} − tw)/2 = {} mm",
                    tw + 2.0 * r,
                    (b - tw) / 2.0
                ),
            ));
        }
    }
    let clear = h - tf_sum;
    if 2.0 * r > clear {
        return Err(SectionError::new(
            "r",
            format!(
                "the root fillets do not fit between the flanges: 2·r = {} mm exceeds the \
                 clear web depth {clear_name} = {clear} mm; use r ≤ {} mm",
                2.0 * r,
                clear / 2.0
            ),
        ));
    }
    Ok(())
}

/// Validated I-section geometry (doubly symmetric when top = bottom).
#[derive(Debug, Clone, Copy)]
struct IGeometry {
    h: f64,
    b_top: f64,
    tf_top: f64,
    b_bottom: f64,
    tf_bottom: f64,
    tw: f64,
    r: f64,
}

/// Properties of a (mono)symmetric I-section with root fillets.
///
/// # Input
///
/// Validated dimensions in mm; z is measured up, the origin of the moment
/// integrals is at mid-depth on the web centre line.
///
/// # Output
///
/// Area, centroidal Iy and Iz, It, Iw, zs, βy and the reference heights.
///
/// ```text
/// exact, fillets included (each fillet: square r×r minus quarter disc):
///   A  = b_t·tf_t + b_b·tf_b + (h − tf_t − tf_b)·tw + (4 − π)·r²
///   zc = ∫z dA / A
///   Iy = ∫z² dA − A·zc²,      Iz = ∫y² dA
///   βy = (1/Iy)·∫z'(y² + z'²) dA − 2·zs,   z' = z − zc
///
/// thin-walled flanges (plates only):
///   Iz,t = tf_t·b_t³/12,  Iz,b = tf_b·b_b³/12,  ρ = Iz,t/(Iz,t + Iz,b)
///   hs = h − (tf_t + tf_b)/2                      (between flange centroids)
///   shear centre: hs·(1 − ρ) below the top flange centroid
///   zs = z_sc − zc
///   Iw = ρ·(1 − ρ)·Iz·hs²                         (= Iz·hs²/4 when ρ = ½)
///
/// torsion (El Darwish & Johnston 1965, per junction, r > 0):
///   It = J1,t + J1,b + (h − tf_t − tf_b)·tw³/3 + α_t·D_t⁴ + α_b·D_b⁴
///   J1 = b·tf³·[1/3 − 0.21·(tf/b)·(1 − tf⁴/(12·b⁴))]
///   α  = −0.042 + 0.2204·tw/tf + 0.1355·r/tf − 0.0865·r·tw/tf² − 0.0725·(tw/tf)²
///   D  = [(tf + r)² + tw·(r + tw/4)]/(2·r + tf)
/// welded (r = 0): the plate sum J1,t + J1,b + (h − tf_t − tf_b)·tw³/3.
/// ```
///
/// Iw uses the whole-section Iz, so that for a doubly symmetric section
/// Iw = Iz·hs²/4 exactly, the convention of the domain notes (ζ = κ at the
/// flange centroid) and of the SCI/ArcelorMittal UK tables, which agree with it
/// to three figures. Thin-walled theory neglects the warping of the web and the
/// fillets (a fraction of a percent for rolled sections).
///
/// The junction terms of El Darwish & Johnston are fitted to rolled shapes;
/// here they are applied junction by junction with each flange's thickness.
/// They reproduce the SCI/ArcelorMittal UK-table values of It to three figures
/// (tests/section_tables.rs). For r = 0 the plate sum is used, the usual
/// (slightly conservative) value for welded plate girders; It therefore jumps
/// by 1–2 % between r = 0 and a vanishingly small fillet.
///
/// # References
///
/// * El Darwish, I.A. & Johnston, B.G. (1965). Torsion of structural shapes.
///   Journal of the Structural Division, ASCE, 91(ST1), 203–227.
/// * Seaburg, P.A. & Carter, C.J. (1997). Torsional Analysis of Structural Steel
///   Members. AISC Steel Design Guide 9, American Institute of Steel
///   Construction, Chicago. Appendix C (the α, D formulas above, as printed
///   there; recalled, and checked against the tables in the tests).
/// * Kitipornchai, S. & Trahair, N.S. (1980). Buckling properties of
///   monosymmetric I-beams. Journal of the Structural Division, ASCE, 106(ST5),
///   941–957 (shear centre, Iw = ρ(1 − ρ)·Iz·hs², definition of βy).
/// * Trahair, N.S. (1993). Flexural-Torsional Buckling of Structures. E & FN
///   Spon, London (monosymmetric beams; βy sign convention differs, see the
///   domain notes).
/// * Nethercot, D.A., Salter, P.R. & Malik, A.S. (1989). Design of Members
///   Subject to Combined Bending and Torsion. SCI Publication P057, The Steel
///   Construction Institute, Ascot (Iw = Iz·hs²/4 and It for rolled I-sections,
///   as used in the SCI section tables).
fn i_section(g: &IGeometry) -> Properties {
    let IGeometry {
        h,
        b_top,
        tf_top,
        b_bottom,
        tf_bottom,
        tw,
        r,
    } = *g;
    let half = h / 2.0;
    let z_top_inner = half - tf_top; // underside of the top flange
    let z_bottom_inner = -half + tf_bottom; // top side of the bottom flange

    // Plates first in mirrored pairs so that a doubly symmetric section sums
    // its odd moments to exactly zero.
    let flanges = Moments::rectangle(-b_top / 2.0, b_top / 2.0, z_top_inner, half)
        + Moments::rectangle(-b_bottom / 2.0, b_bottom / 2.0, -half, z_bottom_inner);
    let web = Moments::rectangle(-tw / 2.0, tw / 2.0, z_bottom_inner, z_top_inner);
    let mut m = flanges + web;
    if r > 0.0 {
        let c = tw / 2.0;
        let top = Moments::fillet(c, z_top_inner, r, 1.0, -1.0)
            + Moments::fillet(-c, z_top_inner, r, -1.0, -1.0);
        let bottom = Moments::fillet(c, z_bottom_inner, r, 1.0, 1.0)
            + Moments::fillet(-c, z_bottom_inner, r, -1.0, 1.0);
        m = m + (top + bottom);
    }

    let area = m.get(0, 0);
    let zc = m.get(0, 1) / area;
    let iy = m.get(0, 2) - zc * m.get(0, 1);
    let iz = m.get(2, 0) - m.get(1, 0) * m.get(1, 0) / area;
    // ∫ z'(y² + z'²) dA with z' = z − zc (y measured from the symmetry axis).
    let wagner = m.get(2, 1) - zc * m.get(2, 0) + m.get(0, 3) - 3.0 * zc * m.get(0, 2)
        + 3.0 * zc * zc * m.get(0, 1)
        - zc * zc * zc * area;

    let iz_top = tf_top * b_top.powi(3) / 12.0;
    let iz_bottom = tf_bottom * b_bottom.powi(3) / 12.0;
    let rho = iz_top / (iz_top + iz_bottom);
    let hs = h - (tf_top + tf_bottom) / 2.0;
    let z_top_flange = half - tf_top / 2.0;
    let z_bottom_flange = -half + tf_bottom / 2.0;
    let symmetric = b_top == b_bottom && tf_top == tf_bottom;
    let (z_sc, zs, beta_y) = if symmetric {
        (0.0, 0.0, 0.0)
    } else {
        let z_sc = z_top_flange - (1.0 - rho) * hs;
        let zs = z_sc - zc;
        (z_sc, zs, wagner / iy - 2.0 * zs)
    };
    let iw = rho * (1.0 - rho) * iz * hs * hs;

    Properties {
        area,
        iy,
        iz,
        it: i_torsion_constant(g),
        iw,
        zs,
        beta_y,
        top_flange: z_top_flange - z_sc,
        top_surface: half - z_sc,
        bottom_flange: z_bottom_flange - z_sc,
        bottom_surface: -half - z_sc,
    }
}

/// St Venant torsion constant of a rolled (r > 0) or welded (r = 0) I-section.
///
/// ```text
/// It = J1(b_t, tf_t) + J1(b_b, tf_b) + (h − tf_t − tf_b)·tw³/3 + Σ_junctions α·D⁴
/// ```
///
/// Formulas and references as in [`i_section`] (El Darwish & Johnston 1965;
/// AISC Design Guide 9, Appendix C); junction terms only when r > 0.
fn i_torsion_constant(g: &IGeometry) -> f64 {
    let web = (g.h - g.tf_top - g.tf_bottom) * g.tw.powi(3) / 3.0;
    let plates = flange_torsion(g.b_top, g.tf_top) + flange_torsion(g.b_bottom, g.tf_bottom) + web;
    if g.r > 0.0 {
        plates + junction_torsion(g.tf_top, g.tw, g.r) + junction_torsion(g.tf_bottom, g.tw, g.r)
    } else {
        plates
    }
}

/// Torsion constant of one flange plate b × t with the end correction.
///
/// ```text
/// J1 = b·t³·[1/3 − 0.21·(t/b)·(1 − t⁴/(12·b⁴))]      (t ≤ b)
/// ```
///
/// # References
///
/// * Young, W.C. & Budynas, R.G. (2002). Roark's Formulas for Stress and Strain,
///   7th ed. McGraw-Hill, New York. Table 10.7, solid rectangular section.
/// * El Darwish & Johnston (1965), who use it for the flanges (see [`i_section`]).
fn flange_torsion(b: f64, t: f64) -> f64 {
    let (long, short) = if b >= t { (b, t) } else { (t, b) };
    let q = short / long;
    long * short.powi(3) * (1.0 / 3.0 - 0.21 * q * (1.0 - q.powi(4) / 12.0))
}

/// El Darwish & Johnston junction increment α·D⁴ for one filleted web–flange
/// junction.
///
/// ```text
/// α = −0.042 + 0.2204·tw/tf + 0.1355·r/tf − 0.0865·r·tw/tf² − 0.0725·(tw/tf)²
/// D = [(tf + r)² + tw·(r + tw/4)]/(2·r + tf)       (inscribed circle diameter)
/// ```
///
/// # References
///
/// El Darwish & Johnston (1965); Seaburg & Carter (1997), AISC Design Guide 9,
/// Appendix C. Full citations in [`i_section`].
fn junction_torsion(tf: f64, tw: f64, r: f64) -> f64 {
    let alpha = -0.042 + 0.2204 * tw / tf + 0.1355 * r / tf
        - 0.0865 * r * tw / (tf * tf)
        - 0.0725 * (tw / tf).powi(2);
    let d = ((tf + r).powi(2) + tw * (r + tw / 4.0)) / (2.0 * r + tf);
    alpha * d.powi(4)
}

/// Properties of a solid rectangle h (vertical) × b (horizontal).
///
/// ```text
/// A  = b·h,   Iy = b·h³/12,   Iz = h·b³/12,   zs = 0,   βy = 0
/// It = (a·t³/3)·[1 − (192/π⁵)·(t/a)·Σ_{n = 1,3,5,…} tanh(n·π·a/(2·t))/n⁵]
///      with a = max(h, b), t = min(h, b)             (exact Saint-Venant series)
/// Iw = 0   (the small warping constant of a solid rectangle is neglected, the
///           usual assumption for narrow rectangular beams)
/// heights: top_flange = top_surface = h/2, bottom_flange = bottom_surface = −h/2
/// ```
///
/// The series is summed as (31/32)·ζ(5) − Σ (1 − tanh xₙ)/n⁵, whose second sum
/// decays like e^(−n·π) and so needs only a few terms. The standard
/// approximation It ≈ a·t³·[1/3 − 0.21·(t/a)·(1 − (t/a)⁴/12)] (Roark) agrees
/// within 0.5 % (checked in the tests).
///
/// # References
///
/// * Timoshenko, S.P. & Goodier, J.N. (1970). Theory of Elasticity, 3rd ed.
///   McGraw-Hill, New York. Chapter 10, torsion of a bar of rectangular
///   cross-section.
/// * Young, W.C. & Budynas, R.G. (2002). Roark's Formulas for Stress and Strain,
///   7th ed. McGraw-Hill, New York. Table 10.7, solid rectangular section.
/// * Timoshenko, S.P. & Gere, J.M. (1961). Theory of Elastic Stability, 2nd ed.
///   McGraw-Hill, New York. Chapter 6, narrow rectangular beams (warping
///   neglected).
fn rectangle(h: f64, b: f64) -> Properties {
    Properties {
        area: b * h,
        iy: b * h.powi(3) / 12.0,
        iz: h * b.powi(3) / 12.0,
        it: rectangle_torsion(h, b),
        iw: 0.0,
        zs: 0.0,
        beta_y: 0.0,
        top_flange: h / 2.0,
        top_surface: h / 2.0,
        bottom_flange: -h / 2.0,
        bottom_surface: -h / 2.0,
    }
}

/// Exact St Venant torsion constant of a solid rectangle (either orientation).
///
/// Formula and references in [`rectangle`].
fn rectangle_torsion(h: f64, b: f64) -> f64 {
    /// ζ(5), Apéry-like constant, to double precision.
    const ZETA_5: f64 = 1.036_927_755_143_37;
    let (a, t) = if h >= b { (h, b) } else { (b, h) };
    let odd_sum = 31.0 / 32.0 * ZETA_5; // Σ over odd n of 1/n⁵
    let mut deficit = 0.0; // Σ (1 − tanh xₙ)/n⁵
    let mut n = 1.0_f64;
    loop {
        let e = (-n * PI * a / t).exp(); // e^(−2xₙ), xₙ = n·π·a/(2t)
        deficit += 2.0 * e / (1.0 + e) / n.powi(5);
        if e < 1e-18 {
            break;
        }
        n += 2.0;
    }
    let sum = odd_sum - deficit;
    a * t.powi(3) / 3.0 * (1.0 - 192.0 / PI.powi(5) * (t / a) * sum)
}

/// Polynomial area moments ∫ yⁱ·zʲ dA for i + j ≤ 3 about a fixed origin.
///
/// Rectangles and quarter discs have closed forms; a region built from them by
/// addition and subtraction inherits exact moments, and `shifted` moves the
/// origin by the binomial theorem.
///
/// ```text
/// rectangle [y0,y1]×[z0,z1]:  mᵢⱼ = ∫y⁰..y¹ yⁱ dy · ∫z⁰..z¹ zʲ dz
///   ∫ over c ± e of xᵏ dx = 2e·{1, c, c² + e²/3, c³ + c·e²}  for k = 0…3
/// quarter disc, centre (0,0), radius r, quadrant (sy, sz):
///   mᵢⱼ = syⁱ·szʲ · r^(i+j+2)/(i+j+2) · ∫₀^(π/2) cosⁱθ·sinʲθ dθ
/// shift by (dy, dz):
///   m'ᵢⱼ = Σₚ≤ᵢ Σ_q≤ⱼ C(i,p)·C(j,q)·dy^(i−p)·dz^(j−q)·mₚq
/// ```
#[derive(Debug, Clone, Copy, Default, PartialEq)]
struct Moments([[f64; 4]; 4]);

impl Moments {
    fn get(&self, i: usize, j: usize) -> f64 {
        self.0[i][j]
    }

    fn rectangle(y0: f64, y1: f64, z0: f64, z1: f64) -> Self {
        let fy = interval_powers(y0, y1);
        let fz = interval_powers(z0, z1);
        let mut m = [[0.0; 4]; 4];
        for (i, row) in m.iter_mut().enumerate() {
            for (j, v) in row.iter_mut().enumerate().take(4 - i) {
                *v = fy[i] * fz[j];
            }
        }
        Moments(m)
    }

    /// Quarter disc of radius r centred at the origin, occupying the points
    /// (sy·ρ·cos θ, sz·ρ·sin θ), 0 ≤ ρ ≤ r, 0 ≤ θ ≤ π/2.
    fn quarter_disc(r: f64, sy: f64, sz: f64) -> Self {
        // ∫₀^(π/2) cosⁱθ·sinʲθ dθ for i + j ≤ 3.
        const W: [[f64; 4]; 4] = [
            [PI / 2.0, 1.0, PI / 4.0, 2.0 / 3.0],
            [1.0, 0.5, 1.0 / 3.0, 0.0],
            [PI / 4.0, 1.0 / 3.0, 0.0, 0.0],
            [2.0 / 3.0, 0.0, 0.0, 0.0],
        ];
        let mut m = [[0.0; 4]; 4];
        for (i, row) in m.iter_mut().enumerate() {
            for (j, v) in row.iter_mut().enumerate().take(4 - i) {
                let k = (i + j + 2) as i32;
                *v = sy.powi(i as i32) * sz.powi(j as i32) * r.powi(k) / f64::from(k) * W[i][j];
            }
        }
        Moments(m)
    }

    /// Root fillet in the corner (yk, zk) between a web face and a flange face:
    /// the square reaching sy·r along y and sz·r along z, less the quarter disc
    /// of radius r centred at (yk + sy·r, zk + sz·r).
    fn fillet(yk: f64, zk: f64, r: f64, sy: f64, sz: f64) -> Self {
        let (ya, yb) = if sy > 0.0 { (0.0, r) } else { (-r, 0.0) };
        let (za, zb) = if sz > 0.0 { (0.0, r) } else { (-r, 0.0) };
        let square = Moments::rectangle(ya, yb, za, zb);
        let disc = Moments::quarter_disc(r, -sy, -sz).shifted(sy * r, sz * r);
        (square - disc).shifted(yk, zk)
    }

    /// Moments of the same region after moving it by (dy, dz).
    fn shifted(&self, dy: f64, dz: f64) -> Self {
        const C: [[f64; 4]; 4] = [
            [1.0, 0.0, 0.0, 0.0],
            [1.0, 1.0, 0.0, 0.0],
            [1.0, 2.0, 1.0, 0.0],
            [1.0, 3.0, 3.0, 1.0],
        ];
        let mut m = [[0.0; 4]; 4];
        for i in 0..4 {
            for j in 0..4 - i {
                let s: f64 = (0..=i)
                    .map(|p| {
                        (0..=j)
                            .map(|q| {
                                C[i][p]
                                    * C[j][q]
                                    * dy.powi((i - p) as i32)
                                    * dz.powi((j - q) as i32)
                                    * self.0[p][q]
                            })
                            .sum::<f64>()
                    })
                    .sum();
                m[i][j] = s;
            }
        }
        Moments(m)
    }
}

impl Add for Moments {
    type Output = Moments;
    fn add(self, rhs: Moments) -> Moments {
        let mut m = self.0;
        for (row, rrow) in m.iter_mut().zip(rhs.0.iter()) {
            for (v, w) in row.iter_mut().zip(rrow.iter()) {
                *v += *w;
            }
        }
        Moments(m)
    }
}

impl Sub for Moments {
    type Output = Moments;
    fn sub(self, rhs: Moments) -> Moments {
        let mut m = self.0;
        for (row, rrow) in m.iter_mut().zip(rhs.0.iter()) {
            for (v, w) in row.iter_mut().zip(rrow.iter()) {
                *v -= *w;
            }
        }
        Moments(m)
    }
}

/// ∫ from x0 to x1 of xᵏ dx for k = 0…3, written about the interval's centre
/// to avoid cancellation for thin plates far from the origin.
fn interval_powers(x0: f64, x1: f64) -> [f64; 4] {
    let c = (x0 + x1) / 2.0;
    let e = (x1 - x0) / 2.0;
    let w = 2.0 * e;
    [
        w,
        w * c,
        w * (c * c + e * e / 3.0),
        w * (c * c * c + c * e * e),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    fn mono(h: f64, bt: f64, tt: f64, bb: f64, tb: f64, tw: f64, r: f64) -> Properties {
        properties(&Shape::MonoI {
            h,
            b_top: bt,
            tf_top: tt,
            b_bottom: bb,
            tf_bottom: tb,
            tw,
            r,
        })
        .unwrap()
    }

    // Spandrel (square r×r less a quarter disc) closed forms, derived by hand
    // from the square and quarter-disc moments (textbook calculus, no source):
    // A = (1 − π/4)·r², centroid (10 − 3π)/(3·(4 − π))·r from each straight
    // edge, second moment about a straight edge (1 − 5π/16)·r⁴.
    #[test]
    fn fillet_moments_match_closed_forms() {
        let r = 7.0;
        let f = Moments::fillet(0.0, 0.0, r, 1.0, 1.0);
        let area = (1.0 - PI / 4.0) * r * r;
        let cbar = (10.0 - 3.0 * PI) / (3.0 * (4.0 - PI)) * r;
        assert!(rel(f.get(0, 0), area) < 1e-13);
        assert!(rel(f.get(1, 0) / area, cbar) < 1e-12);
        assert!(rel(f.get(0, 1) / area, cbar) < 1e-12);
        assert!(rel(f.get(0, 2), (1.0 - 5.0 * PI / 16.0) * r.powi(4)) < 1e-11);
        assert!(rel(f.get(2, 0), (1.0 - 5.0 * PI / 16.0) * r.powi(4)) < 1e-11);
        // Mirrored fillet: odd moments in y change sign, the rest are equal.
        let g = Moments::fillet(0.0, 0.0, r, -1.0, 1.0);
        for i in 0..4 {
            for j in 0..4 - i {
                let sign = if i % 2 == 1 { -1.0 } else { 1.0 };
                assert!((g.get(i, j) - sign * f.get(i, j)).abs() < 1e-9 * r.powi(5));
            }
        }
    }

    // Shifting must agree with integrating the moved rectangle directly.
    #[test]
    fn shifted_rectangle_equals_rectangle_at_new_place() {
        let a = Moments::rectangle(-3.0, 5.0, 1.0, 4.0).shifted(2.5, -7.0);
        let b = Moments::rectangle(-0.5, 7.5, -6.0, -3.0);
        for i in 0..4 {
            for j in 0..4 - i {
                assert!((a.get(i, j) - b.get(i, j)).abs() <= 1e-12 * b.get(i, j).abs().max(1.0));
            }
        }
    }

    // Quarter-disc moments: area πr²/4, centroid 4r/(3π) from each edge,
    // second moment about an edge πr⁴/16 (standard tables, e.g. Roark Table
    // A.1, quarter circle; from memory).
    #[test]
    fn quarter_disc_moments() {
        let r = 3.0;
        let q = Moments::quarter_disc(r, 1.0, 1.0);
        assert!(rel(q.get(0, 0), PI * r * r / 4.0) < 1e-15);
        assert!(rel(q.get(0, 1) / q.get(0, 0), 4.0 * r / (3.0 * PI)) < 1e-14);
        assert!(rel(q.get(2, 0), PI * r.powi(4) / 16.0) < 1e-14);
        let q2 = Moments::quarter_disc(r, -1.0, -1.0);
        assert!(rel(q2.get(1, 1), q.get(1, 1)) < 1e-15);
        assert!(rel(-q2.get(0, 3), q.get(0, 3)) < 1e-15);
    }

    // A welded doubly symmetric I (r = 0): hand formulas for plates
    // (textbook parallel-axis theorem, no source needed beyond statics).
    #[test]
    fn welded_i_matches_plate_formulas() {
        let (h, b, tf, tw) = (400.0, 200.0, 16.0, 10.0);
        let p = properties(&Shape::I {
            h,
            b,
            tf,
            tw,
            r: 0.0,
        })
        .unwrap();
        let hw = h - 2.0 * tf;
        let a = 2.0 * b * tf + hw * tw;
        let iy = b * h.powi(3) / 12.0 - (b - tw) * hw.powi(3) / 12.0;
        let iz = 2.0 * tf * b.powi(3) / 12.0 + hw * tw.powi(3) / 12.0;
        assert!(rel(p.area, a) < 1e-14);
        assert!(rel(p.iy, iy) < 1e-13);
        assert!(rel(p.iz, iz) < 1e-13);
        let hs = h - tf;
        assert!(rel(p.iw, iz * hs * hs / 4.0) < 1e-13);
        let it =
            2.0 * b * tf.powi(3) * (1.0 / 3.0 - 0.21 * tf / b * (1.0 - (tf / b).powi(4) / 12.0))
                + hw * tw.powi(3) / 3.0;
        assert!(rel(p.it, it) < 1e-13);
        assert_eq!(p.zs, 0.0);
        assert_eq!(p.beta_y, 0.0);
        assert!(rel(p.top_flange, hs / 2.0) < 1e-15);
        assert!(rel(-p.bottom_flange, hs / 2.0) < 1e-15);
        assert!(rel(p.top_surface, h / 2.0) < 1e-15);
        assert!(rel(-p.bottom_surface, h / 2.0) < 1e-15);
    }

    // Fillets add (4 − π)r² to the area and raise Iy by the four spandrels'
    // parallel-axis contributions (closed forms as in the fillet test).
    #[test]
    fn rolled_i_fillet_contribution() {
        let (h, b, tf, tw, r) = (300.0, 150.0, 10.7, 7.1, 15.0);
        let welded = properties(&Shape::I {
            h,
            b,
            tf,
            tw,
            r: 0.0,
        })
        .unwrap();
        let rolled = properties(&Shape::I { h, b, tf, tw, r }).unwrap();
        let af = (1.0 - PI / 4.0) * r * r;
        assert!(rel(rolled.area - welded.area, 4.0 * af) < 1e-11);
        let cbar = (10.0 - 3.0 * PI) / (3.0 * (4.0 - PI)) * r;
        let own = (1.0 - 5.0 * PI / 16.0) * r.powi(4) - af * cbar * cbar;
        let d = h / 2.0 - tf - cbar;
        assert!(rel(rolled.iy - welded.iy, 4.0 * (own + af * d * d)) < 1e-9);
        let dz = tw / 2.0 + cbar;
        assert!(rel(rolled.iz - welded.iz, 4.0 * (own + af * dz * dz)) < 1e-9);
    }

    // Monosymmetric welded section checked against a hand calculation with
    // plate formulas (statics; thin-walled shear centre and Iw from
    // Kitipornchai & Trahair 1980). For a plate b × t centred at height zᵢ
    // above the centroid, ∫z(y² + z²)dA = b·t·zᵢ·(b²/12 + zᵢ² + t²/4).
    #[test]
    fn monosymmetric_matches_hand_calculation() {
        let (h, bt, tt, bb, tb, tw) = (600.0, 300.0, 20.0, 150.0, 10.0, 8.0);
        let p = mono(h, bt, tt, bb, tb, tw, 0.0);
        let hw = h - tt - tb;
        // (b, t, centre height above the bottom face)
        let plates = [
            (bt, tt, h - tt / 2.0),
            (bb, tb, tb / 2.0),
            (tw, hw, tb + hw / 2.0),
        ];
        let a: f64 = plates.iter().map(|&(b, t, _)| b * t).sum();
        let zbar = plates.iter().map(|&(b, t, z)| b * t * z).sum::<f64>() / a;
        let iy: f64 = plates
            .iter()
            .map(|&(b, t, z)| b * t.powi(3) / 12.0 + b * t * (z - zbar).powi(2))
            .sum();
        let iz: f64 = plates.iter().map(|&(b, t, _)| t * b.powi(3) / 12.0).sum();
        let wagner: f64 = plates
            .iter()
            .map(|&(b, t, z)| {
                let zi = z - zbar;
                b * t * zi * (b * b / 12.0 + zi * zi + t * t / 4.0)
            })
            .sum();
        let i1 = tt * bt.powi(3) / 12.0;
        let i2 = tb * bb.powi(3) / 12.0;
        let hs = h - tt / 2.0 - tb / 2.0;
        let z_sc = (h - tt / 2.0) - hs * i2 / (i1 + i2); // above the bottom face
        let zs = z_sc - zbar;
        let beta = wagner / iy - 2.0 * zs;
        let iw = i1 * i2 / (i1 + i2) * hs * hs * iz / (i1 + i2);

        assert!(rel(p.area, a) < 1e-14);
        assert!(rel(p.iy, iy) < 1e-12);
        assert!(rel(p.iz, iz) < 1e-12);
        assert!(rel(p.zs, zs) < 1e-12);
        assert!(rel(p.beta_y, beta) < 1e-10);
        assert!(rel(p.iw, iw) < 1e-12);
        assert!(rel(p.top_flange, h - tt / 2.0 - z_sc) < 1e-12);
        assert!(rel(p.bottom_surface, -z_sc) < 1e-12);
        // Larger flange on top: βy < 0 (domain notes) and the shear centre
        // lies above the centroid.
        assert!(p.beta_y < 0.0 && p.zs > 0.0);
        // Kitipornchai & Trahair (1980) approximation, their sign convention
        // flipped to the domain notes': βy ≈ −0.9·hs·(2ρ − 1)·(1 − (Iz/Iy)²)
        // (formula from memory). Here βy = −458.2 mm against −461.8 mm.
        let rho = i1 / (i1 + i2);
        let approx = -0.9 * hs * (2.0 * rho - 1.0) * (1.0 - (iz / iy).powi(2));
        assert!(rel(p.beta_y, approx) < 0.03, "{} vs {}", p.beta_y, approx);
    }

    // Turning a section upside down flips the signs of zs and βy and swaps
    // the heights (symmetry; no source needed).
    #[test]
    fn flipping_the_section_flips_signs() {
        let up = mono(500.0, 250.0, 18.0, 120.0, 12.0, 9.0, 14.0);
        let down = mono(500.0, 120.0, 12.0, 250.0, 18.0, 9.0, 14.0);
        assert!(up.beta_y < 0.0 && down.beta_y > 0.0);
        assert!(rel(-down.beta_y, up.beta_y) < 1e-10);
        assert!(rel(-down.zs, up.zs) < 1e-10);
        assert!(rel(down.top_surface, -up.bottom_surface) < 1e-12);
        assert!(rel(down.top_flange, -up.bottom_flange) < 1e-12);
        for (a, b) in [
            (up.area, down.area),
            (up.iy, down.iy),
            (up.iz, down.iz),
            (up.it, down.it),
        ] {
            assert!(rel(a, b) < 1e-12);
        }
        assert!(rel(up.iw, down.iw) < 1e-12);
    }

    // Equal flanges: MonoI reduces to I exactly, and as the flanges approach
    // each other the general formulas tend to zs = βy = 0 continuously.
    #[test]
    fn equal_flanges_reduce_to_doubly_symmetric() {
        let (h, b, tf, tw, r) = (454.6, 152.9, 13.3, 8.1, 10.2);
        let i = properties(&Shape::I { h, b, tf, tw, r }).unwrap();
        let m = mono(h, b, tf, b, tf, tw, r);
        assert_eq!(i, m);
        let near = mono(h, b * (1.0 + 1e-9), tf, b, tf, tw, r);
        assert!(near.zs.abs() < 1e-6 * h);
        assert!(near.beta_y.abs() < 1e-6 * h);
        assert!(rel(near.iw, i.iw) < 1e-7);
        assert!(rel(near.it, i.it) < 1e-7);
        assert!(rel(near.top_flange, i.top_flange) < 1e-7);
        // The general expression for βy, evaluated without the symmetry
        // shortcut, also vanishes for identical flanges.
        let g = IGeometry {
            h,
            b_top: b,
            tf_top: tf,
            b_bottom: b,
            tf_bottom: tf,
            tw,
            r,
        };
        let half = h / 2.0;
        let m2 = Moments::rectangle(-b / 2.0, b / 2.0, half - tf, half)
            + Moments::rectangle(-b / 2.0, b / 2.0, -half, -half + tf);
        assert!(m2.get(0, 3).abs() < 1e-9 * m2.get(0, 0) * half.powi(3));
        assert!(rel(i_torsion_constant(&g), i.it) < 1e-15);
    }

    // Shear centre of a T-like section sits near the big flange; Iw → 0 as
    // the small flange vanishes (thin-walled theory, Kitipornchai & Trahair).
    #[test]
    fn tiny_bottom_flange_moves_shear_centre_to_top_flange() {
        let p = mono(400.0, 200.0, 15.0, 10.0, 1.0, 8.0, 0.0);
        assert!((p.top_flange).abs() < 0.1);
        assert!(p.iw < 1e-4 * p.iz * 400.0 * 400.0);
    }

    // Exact rectangle torsion against Timoshenko & Goodier's table of
    // k = It/(a·t³) (Theory of Elasticity, 1970, ch. 10; values from memory):
    // a/t = 1: 0.141, 1.5: 0.196, 2: 0.229, 3: 0.263, 4: 0.281, 5: 0.291,
    // 10: 0.312, ∞: 1/3.
    #[test]
    fn rectangle_torsion_matches_table() {
        for (ratio, k) in [
            (1.0, 0.141),
            (1.5, 0.196),
            (2.0, 0.229),
            (3.0, 0.263),
            (4.0, 0.281),
            (5.0, 0.291),
            (10.0, 0.312),
        ] {
            let t = 10.0;
            let a = ratio * t;
            let kk = rectangle_torsion(a, t) / (a * t.powi(3));
            assert!((kk - k).abs() <= 6e-4, "a/t = {ratio}: {kk} vs {k}");
            // Roark Table 10.7 approximation agrees within 0.5 %.
            assert!(rel(flange_torsion(a, t), rectangle_torsion(a, t)) < 5e-3);
        }
        let long = rectangle_torsion(1e4, 1.0) / 1e4;
        assert!(rel(long, 1.0 / 3.0 * (1.0 - 0.630_2 / 1e4)) < 1e-6);
        // Square: 0.1406·a⁴ (Timoshenko & Goodier; from memory).
        assert!((rectangle_torsion(1.0, 1.0) - 0.1406).abs() < 1e-4);
    }

    #[test]
    fn rectangle_properties_and_orientation() {
        let p = properties(&Shape::Rectangle { h: 300.0, b: 20.0 }).unwrap();
        assert_eq!(p.area, 6000.0);
        assert!(rel(p.iy, 20.0 * 300f64.powi(3) / 12.0) < 1e-15);
        assert!(rel(p.iz, 300.0 * 20f64.powi(3) / 12.0) < 1e-15);
        assert_eq!(p.iw, 0.0);
        assert_eq!(p.zs, 0.0);
        assert_eq!(p.beta_y, 0.0);
        assert_eq!(p.top_flange, 150.0);
        assert_eq!(p.top_surface, 150.0);
        assert_eq!(p.bottom_flange, -150.0);
        assert_eq!(p.bottom_surface, -150.0);
        let q = properties(&Shape::Rectangle { h: 20.0, b: 300.0 }).unwrap();
        assert!(rel(q.it, p.it) < 1e-15);
        assert!(rel(q.iy, p.iz) < 1e-15);
    }

    fn err(shape: Shape) -> SectionError {
        properties(&shape).unwrap_err()
    }

    #[test]
    fn bad_dimensions_name_the_field() {
        let i = |h, b, tf, tw, r| Shape::I { h, b, tf, tw, r };
        assert_eq!(err(i(f64::NAN, 100.0, 8.0, 5.0, 5.0)).field, "h");
        assert_eq!(err(i(200.0, 0.0, 8.0, 5.0, 5.0)).field, "b");
        assert_eq!(err(i(200.0, 100.0, -8.0, 5.0, 5.0)).field, "tf");
        assert_eq!(err(i(200.0, 100.0, 8.0, f64::INFINITY, 5.0)).field, "tw");
        assert_eq!(err(i(200.0, 100.0, 8.0, 5.0, -1.0)).field, "r");
        assert_eq!(err(i(200.0, 100.0, 8.0, 5.0, f64::NAN)).field, "r");
        assert_eq!(err(i(200.0, 100.0, 100.0, 5.0, 5.0)).field, "tf");
        assert_eq!(err(i(200.0, 100.0, 8.0, 100.0, 0.0)).field, "tw");
        let e = err(i(200.0, 100.0, 8.0, 10.0, 46.0));
        assert_eq!(e.field, "r");
        assert!(e.message.contains("45"), "{}", e.message);
        let e = err(i(100.0, 300.0, 20.0, 10.0, 31.0));
        assert_eq!(e.field, "r");
        assert!(e.message.contains("between the flanges"), "{}", e.message);
        assert!(properties(&i(200.0, 100.0, 8.0, 5.0, 0.0)).is_ok());

        let m = |bt, tt, bb, tb, tw| Shape::MonoI {
            h: 300.0,
            b_top: bt,
            tf_top: tt,
            b_bottom: bb,
            tf_bottom: tb,
            tw,
            r: 10.0,
        };
        assert_eq!(err(m(0.0, 10.0, 100.0, 10.0, 6.0)).field, "b_top");
        assert_eq!(err(m(150.0, f64::NAN, 100.0, 10.0, 6.0)).field, "tf_top");
        assert_eq!(err(m(150.0, 10.0, -1.0, 10.0, 6.0)).field, "b_bottom");
        assert_eq!(err(m(150.0, 10.0, 100.0, 0.0, 6.0)).field, "tf_bottom");
        assert_eq!(err(m(150.0, 100.0, 100.0, 200.0, 6.0)).field, "tf_bottom");
        assert_eq!(err(m(150.0, 200.0, 100.0, 100.0, 6.0)).field, "tf_top");
        let e = err(m(150.0, 10.0, 20.0, 10.0, 25.0));
        assert_eq!(e.field, "tw");
        assert!(e.message.contains("b_bottom"));
        let e = err(m(150.0, 10.0, 30.0, 10.0, 12.0));
        assert_eq!(e.field, "r");
        assert!(e.message.contains("b_bottom"));

        assert_eq!(err(Shape::Rectangle { h: -1.0, b: 10.0 }).field, "h");
        assert_eq!(
            err(Shape::Rectangle {
                h: 1.0,
                b: f64::NAN
            })
            .field,
            "b"
        );
        let e = err(Shape::Rectangle { h: 0.0, b: 10.0 });
        assert!(e.to_string().starts_with("h: "), "{e}");
    }
}
