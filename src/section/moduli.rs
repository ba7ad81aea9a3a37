//! Elastic and plastic section moduli about the major axis. No I/O.

use super::{Properties, SectionError, Shape, properties};

/// Major-axis bending moduli of a section, mm³ (and the plastic neutral axis).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moduli {
    /// Elastic modulus Wel,y = Iy / (largest distance from the centroid to an
    /// extreme fibre), mm³ (the smaller of the two fibre moduli).
    pub wel_y: f64,
    /// Plastic modulus Wpl,y = ∫|z − zp| dA, mm³.
    pub wpl_y: f64,
    /// Height of the plastic neutral axis above the bottom surface, mm.
    pub z_pna: f64,
    /// Height of the centroid above the bottom surface, mm.
    pub z_centroid: f64,
}

/// Elastic and plastic moduli about the major (horizontal) axis.
///
/// The section is integrated exactly slab by slab over its width function
/// (flanges, root fillets, web): each root fillet is the square r × r less a
/// quarter disc, as in [`properties`], so the fillets enter exactly.
///
/// ```text
/// width at height z (measured up from the bottom surface):
///   flange                b
///   fillet zone, d = distance from the flange face (0 ≤ d ≤ r):
///                         tw + 2·(r − √(r² − (r − d)²))
///   web                   tw
/// plastic neutral axis zp:  ∫₀^zp w dz = A/2
/// Wpl,y = ∫ |z − zp| · w(z) dz
/// Wel,y = Iy / max(h − zc, zc)          (zc the centroid height)
/// doubly symmetric rolled I (closed form, for checking):
///   Wpl,y = tw·h²/4 + (b − tw)·(h − tf)·tf + (4 − π)/2·r²·(h − 2·tf) + (3π − 10)/3·r³
/// rectangle: Wel,y = b·h²/6, Wpl,y = b·h²/4
/// ```
///
/// # Errors
///
/// [`SectionError`] as [`properties`] for invalid dimensions.
///
/// # References
///
/// * EN 1993-1-1:2005, 6.2.5(2): Wpl for Class 1 and 2, Wel,min for Class 3.
/// * SCI P363 (2013), Steel Building Design: Design Data ("Blue Book"),
///   explanatory notes 3.4–3.5 (elastic and plastic moduli of rolled I
///   sections, root fillets included).
/// * Trahair, N.S., Bradford, M.A., Nethercot, D.A. & Gardner, L. (2008). The
///   Behaviour and Design of Steel Structures to EC3, 4th ed. Taylor & Francis,
///   London. Chapter 5 (plastic moment, plastic neutral axis of monosymmetric
///   sections).
pub fn moduli(shape: &Shape) -> Result<Moduli, SectionError> {
    let p: Properties = properties(shape)?;
    match *shape {
        Shape::Rectangle { h, b } => Ok(Moduli {
            wel_y: b * h * h / 6.0,
            wpl_y: b * h * h / 4.0,
            z_pna: h / 2.0,
            z_centroid: h / 2.0,
        }),
        Shape::I { h, b, tf, tw, r } => Ok(i_moduli(&p, h, b, tf, b, tf, tw, r)),
        Shape::MonoI {
            h,
            b_top,
            tf_top,
            b_bottom,
            tf_bottom,
            tw,
            r,
        } => Ok(i_moduli(&p, h, b_top, tf_top, b_bottom, tf_bottom, tw, r)),
    }
}

/// Area and first moment (about z = 0) of the slab z0..z1 of an I-section
/// with the given pieces; z from the bottom surface.
struct Profile {
    pieces: Vec<Piece>,
}

/// A horizontal band of constant or filleted width.
enum Piece {
    /// Constant width between two heights.
    Band { z0: f64, z1: f64, w: f64 },
    /// A pair of fillets on a web of thickness tw: the flange face at `face`,
    /// the fillets extending `r` away from it in direction `dir` (+1 up, −1 down).
    Fillets {
        face: f64,
        r: f64,
        tw: f64,
        dir: f64,
    },
}

impl Profile {
    /// (area, first moment about z = 0) of the part of the section between z0 and z1.
    fn slab(&self, z0: f64, z1: f64) -> (f64, f64) {
        let mut a = 0.0;
        let mut s = 0.0;
        for p in &self.pieces {
            let (pa, ps) = match *p {
                Piece::Band { z0: b0, z1: b1, w } => {
                    let (lo, hi) = (z0.max(b0), z1.min(b1));
                    if hi <= lo {
                        (0.0, 0.0)
                    } else {
                        (w * (hi - lo), w * (hi * hi - lo * lo) / 2.0)
                    }
                }
                Piece::Fillets { face, r, tw, dir } => fillet_slab(face, r, tw, dir, z0, z1),
            };
            a += pa;
            s += ps;
        }
        (a, s)
    }
}

/// Area and first moment of the part of a fillet pair (plus the web strip
/// beside it, width tw) between z0 and z1.
///
/// With d the distance from the flange face and u = r − d the distance from
/// the level of the fillet circles' centres, the width is
/// tw + 2·r − 2·√(r² − u²), integrated in closed form:
/// ∫√(r² − u²) du = (u·√(r² − u²) + r²·asin(u/r))/2 and
/// ∫u·√(r² − u²) du = −(r² − u²)^{3/2}/3.
fn fillet_slab(face: f64, r: f64, tw: f64, dir: f64, z0: f64, z1: f64) -> (f64, f64) {
    if r <= 0.0 {
        return (0.0, 0.0);
    }
    // Distances from the face covered by the slab.
    let (za, zb) = if dir > 0.0 {
        (face, face + r)
    } else {
        (face - r, face)
    };
    let (lo, hi) = (z0.max(za), z1.min(zb));
    if hi <= lo {
        return (0.0, 0.0);
    }
    // Constant part (tw + 2r) over [lo, hi].
    let w0 = tw + 2.0 * r;
    let mut a = w0 * (hi - lo);
    let mut s = w0 * (hi * hi - lo * lo) / 2.0;
    // Subtract 2·√(r² − u²) with u = r − d, d = dir·(z − face), z = face + dir·(r − u).
    let u_of = |z: f64| r - dir * (z - face);
    let (u_lo, u_hi) = {
        let (a1, b1) = (u_of(lo), u_of(hi));
        (a1.min(b1), a1.max(b1))
    };
    let f = |u: f64| {
        let q = (r * r - u * u).max(0.0).sqrt();
        (u * q + r * r * (u / r).clamp(-1.0, 1.0).asin()) / 2.0
    };
    let g = |u: f64| -((r * r - u * u).max(0.0)).powf(1.5) / 3.0;
    let int_q = f(u_hi) - f(u_lo); // ∫ √(r² − u²) du over the slab
    let int_uq = g(u_hi) - g(u_lo); // ∫ u·√(r² − u²) du
    // z = face + dir·r − dir·u, dz = |du| over the slab.
    let zc = face + dir * r;
    a -= 2.0 * int_q;
    s -= 2.0 * (zc * int_q - dir * int_uq);
    (a, s)
}

#[allow(clippy::too_many_arguments)]
fn i_moduli(
    p: &Properties,
    h: f64,
    b_top: f64,
    tf_top: f64,
    b_bottom: f64,
    tf_bottom: f64,
    tw: f64,
    r: f64,
) -> Moduli {
    let prof = Profile {
        pieces: vec![
            Piece::Band {
                z0: 0.0,
                z1: tf_bottom,
                w: b_bottom,
            },
            Piece::Band {
                z0: tf_bottom + r,
                z1: h - tf_top - r,
                w: tw,
            },
            Piece::Band {
                z0: h - tf_top,
                z1: h,
                w: b_top,
            },
            Piece::Fillets {
                face: tf_bottom,
                r,
                tw,
                dir: 1.0,
            },
            Piece::Fillets {
                face: h - tf_top,
                r,
                tw,
                dir: -1.0,
            },
        ],
    };
    let (area, s_total) = prof.slab(0.0, h);
    let zc = s_total / area;
    // Plastic neutral axis: bisection on the area below (monotone in z).
    let (mut lo, mut hi) = (0.0, h);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if prof.slab(0.0, mid).0 < area / 2.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let zp = 0.5 * (lo + hi);
    let (a_lo, s_lo) = prof.slab(0.0, zp);
    let (a_hi, s_hi) = prof.slab(zp, h);
    let wpl = (zp * a_lo - s_lo) + (s_hi - zp * a_hi);
    let wel = p.iy / (h - zc).max(zc);
    Moduli {
        wel_y: wel,
        wpl_y: wpl,
        z_pna: zp,
        z_centroid: zc,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::PI;

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    // Closed form for the doubly symmetric rolled I (SCI P363 explanatory
    // notes; derived: web tw·h²/4, flanges beyond the web (b − tw)·tf·(h − tf),
    // four fillets of area (4 − π)r²/4 at a lever arm h/2 − tf − r(10 − 3π)/(12 − 3π)).
    #[test]
    fn doubly_symmetric_matches_closed_form() {
        let (h, b, tf, tw, r) = (300.0, 150.0, 10.7, 7.1, 15.0);
        let m = moduli(&Shape::I { h, b, tf, tw, r }).unwrap();
        let want = tw * h * h / 4.0
            + (b - tw) * (h - tf) * tf
            + (4.0 - PI) / 2.0 * r * r * (h - 2.0 * tf)
            + (3.0 * PI - 10.0) / 3.0 * r.powi(3);
        assert!(rel(m.wpl_y, want) < 1e-9, "{} vs {want}", m.wpl_y);
        assert!((m.z_pna - h / 2.0).abs() < 1e-9);
        assert!((m.z_centroid - h / 2.0).abs() < 1e-9);
    }

    // Welded monosymmetric plates (r = 0), by hand: top 200×20, bottom
    // 100×10, web 8 × 370 (h = 400). A = 4000 + 1000 + 2960 = 7960 mm²,
    // half 3980. Below the top flange (z < 380) lie 3960 mm², so the PNA is in
    // the top flange: zp = 380 + 20/200 = 380.1 mm. Wpl = 1000·375.1 (bottom
    // flange) + 8·370.1²/2 − 8·0.1²/2 (web) + 200·0.1²/2 + 200·19.9²/2 (top
    // flange) = 375100 + 547896 + 1 + 39601 = 962598 mm³.
    #[test]
    fn welded_monosymmetric_by_hand() {
        let s = Shape::MonoI {
            h: 400.0,
            b_top: 200.0,
            tf_top: 20.0,
            b_bottom: 100.0,
            tf_bottom: 10.0,
            tw: 8.0,
            r: 0.0,
        };
        let m = moduli(&s).unwrap();
        assert!((m.z_pna - 380.1).abs() < 1e-9, "{}", m.z_pna);
        assert!(rel(m.wpl_y, 962598.0) < 1e-9, "{}", m.wpl_y);
    }

    #[test]
    fn rectangle_closed_form() {
        let m = moduli(&Shape::Rectangle { h: 200.0, b: 50.0 }).unwrap();
        assert!(rel(m.wel_y, 50.0 * 200.0 * 200.0 / 6.0) < 1e-12);
        assert!(rel(m.wpl_y, 50.0 * 200.0 * 200.0 / 4.0) < 1e-12);
    }
}
