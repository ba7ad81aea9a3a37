//! Section properties of standard rolled I-sections against published tables.
//!
//! Sources (each row below names its own):
//!
//! * [OB-UK] ArcelorMittal / SCI "Orange Book", Eurocode 3 UK National Annex,
//!   "Parallel flange I sections – IPE / Wide flange beams – HE, Dimensions and
//!   properties" (3 significant figures; Iw in dm⁶, It in cm⁴). Read as
//!   copied in the public repository waynemaranga/steelsnakes,
//!   src/steelsnakes/EU/data/IPE.json and HE.json.
//! * [BB] SCI P363 "Blue Book", Universal Beams, dimensions and properties
//!   (3 significant figures). Read as copied in waynemaranga/steelsnakes,
//!   src/steelsnakes/UK/data/UB.json.
//! * [BS4] Corus, "Universal Beams: Dimensions and Properties, to BS 4: Part 1:
//!   1993" (section table, read at paperzz.com/doc/9470657; 4 figures).
//! * [AM] ArcelorMittal section data with 4 significant figures (A, Iy, Iz, It;
//!   no Iw), read as copied in xcfem/xc,
//!   python_modules/materials/sections/structural_shapes/aux/
//!   arcelor_ipe_profiles.json and arcelor_he_profiles.json (the folder's
//!   readme cites the ArcelorMittal Orange Book). Its It comes from a different
//!   torsion formula than the UK tables (IPE 300: 20.12 against 19.9 cm⁴,
//!   HE 300 B: 185.0 against 189 cm⁴), so It is checked against it loosely.
//!
//! Axis names follow this project (y major, z minor); the tables' Iy/Iz use the
//! same names. Units converted at the boundary: cm² → mm², cm⁴ → mm⁴,
//! dm⁶ → mm⁶.

mod common;

use common::rel_diff;
use ltb_atlas::section::{Properties, Shape, properties};

/// Dimensions of a rolled I-section in mm (h, b, tw, tf, r as the tables print them).
struct Dims {
    h: f64,
    b: f64,
    tw: f64,
    tf: f64,
    r: f64,
}

/// Dimensions of the designations both [OB-UK] and [AM] list (the two give the same values).
#[rustfmt::skip]
mod dims {
    use super::Dims;
    pub const IPE_200: Dims = Dims { h: 200.0, b: 100.0, tw: 5.6, tf: 8.5, r: 12.0 };
    pub const IPE_300: Dims = Dims { h: 300.0, b: 150.0, tw: 7.1, tf: 10.7, r: 15.0 };
    pub const IPE_400: Dims = Dims { h: 400.0, b: 180.0, tw: 8.6, tf: 13.5, r: 21.0 };
    pub const HE_200_A: Dims = Dims { h: 190.0, b: 200.0, tw: 6.5, tf: 10.0, r: 18.0 };
    pub const HE_300_B: Dims = Dims { h: 300.0, b: 300.0, tw: 11.0, tf: 19.0, r: 27.0 };
}

/// One published row: dimensions in mm, properties in table units.
struct Row {
    /// Designation and source tag.
    name: &'static str,
    /// Dimensions in mm.
    dims: Dims,
    /// A in cm².
    a: f64,
    /// Iy in cm⁴.
    iy: f64,
    /// Iz in cm⁴.
    iz: f64,
    /// It in cm⁴.
    it: f64,
    /// Iw in dm⁶ (NaN where the source gives none).
    iw: f64,
}

#[rustfmt::skip]
const UK_TABLES: &[Row] = &[
    // [OB-UK] IPE table, row IPE 200.
    Row { name: "IPE 200 [OB-UK]", dims: dims::IPE_200,
          a: 28.5, iy: 1940.0, iz: 142.0, it: 6.92, iw: 0.0130 },
    // [OB-UK] IPE table, row IPE 300.
    Row { name: "IPE 300 [OB-UK]", dims: dims::IPE_300,
          a: 53.8, iy: 8360.0, iz: 604.0, it: 19.9, iw: 0.126 },
    // [OB-UK] IPE table, row IPE 400.
    Row { name: "IPE 400 [OB-UK]", dims: dims::IPE_400,
          a: 84.5, iy: 23100.0, iz: 1320.0, it: 51.3, iw: 0.490 },
    // [OB-UK] HE table, row HE 200 A.
    Row { name: "HE 200 A [OB-UK]", dims: dims::HE_200_A,
          a: 53.8, iy: 3690.0, iz: 1340.0, it: 21.0, iw: 0.108 },
    // [OB-UK] HE table, row HE 300 B.
    Row { name: "HE 300 B [OB-UK]", dims: dims::HE_300_B,
          a: 149.0, iy: 25200.0, iz: 8560.0, it: 189.0, iw: 1.69 },
    // [BB] Universal Beams table, row 305 x 165 x 40.
    Row { name: "UB 305x165x40 [BB]", dims: Dims { h: 303.4, b: 165.0, tw: 6.0, tf: 10.2, r: 8.9 },
          a: 51.3, iy: 8500.0, iz: 764.0, it: 14.7, iw: 0.164 },
    // [BB] Universal Beams table, row 457 x 191 x 67.
    Row { name: "UB 457x191x67 [BB]", dims: Dims { h: 453.4, b: 189.9, tw: 8.5, tf: 12.7, r: 10.2 },
          a: 85.5, iy: 29400.0, iz: 1450.0, it: 37.1, iw: 0.705 },
    // [BB] Universal Beams table, row 356 x 171 x 51.
    Row { name: "UB 356x171x51 [BB]", dims: Dims { h: 355.0, b: 171.5, tw: 7.4, tf: 11.5, r: 10.2 },
          a: 64.9, iy: 14100.0, iz: 968.0, it: 23.8, iw: 0.286 },
    // [BS4] Corus BS 4 table, row 914 x 419 x 388 ([BB] gives the same to
    // 3 figures: 494, 720000, 45400, 1730, 88.9).
    Row { name: "UB 914x419x388 [BS4]", dims: Dims { h: 921.0, b: 420.5, tw: 21.4, tf: 36.6, r: 24.1 },
          a: 494.0, iy: 719600.0, iz: 45440.0, it: 1734.0, iw: 88.9 },
];

#[rustfmt::skip]
const AM_TABLES: &[Row] = &[
    // [AM] IPE 200.
    Row { name: "IPE 200 [AM]", dims: dims::IPE_200,
          a: 28.48, iy: 1943.0, iz: 142.4, it: 6.98, iw: f64::NAN },
    // [AM] IPE 300.
    Row { name: "IPE 300 [AM]", dims: dims::IPE_300,
          a: 53.81, iy: 8356.0, iz: 603.8, it: 20.12, iw: f64::NAN },
    // [AM] IPE 400.
    Row { name: "IPE 400 [AM]", dims: dims::IPE_400,
          a: 84.46, iy: 23130.0, iz: 1318.0, it: 51.08, iw: f64::NAN },
    // [AM] HE 200 A.
    Row { name: "HE 200 A [AM]", dims: dims::HE_200_A,
          a: 53.83, iy: 3692.0, iz: 1336.0, it: 20.98, iw: f64::NAN },
    // [AM] HE 300 B.
    Row { name: "HE 300 B [AM]", dims: dims::HE_300_B,
          a: 149.1, iy: 25170.0, iz: 8563.0, it: 185.0, iw: f64::NAN },
];

/// Tolerances (relative) per property: A, Iy, Iz, It, Iw.
struct Tolerances([f64; 5]);

/// UK tables: 3 significant figures, so rounding alone reaches 0.35 % (Iz of
/// IPE 200: 142 cm⁴); It and Iw come from the same formulas as ours (El Darwish
/// & Johnston; Iz·hs²/4), so 1 % covers rounding and fillet idealisation.
const UK_TOL: Tolerances = Tolerances([0.006, 0.006, 0.006, 0.01, 0.01]);
/// ArcelorMittal 4-figure values: tight on A, Iy, Iz; It by another formula
/// (up to 2.3 % apart from the UK tables' values), so 3 %.
const AM_TOL: Tolerances = Tolerances([0.001, 0.001, 0.001, 0.03, 0.03]);

const NAMES: [&str; 5] = ["A", "Iy", "Iz", "It", "Iw"];

fn computed(row: &Row) -> Properties {
    let d = &row.dims;
    properties(&Shape::I {
        h: d.h,
        b: d.b,
        tf: d.tf,
        tw: d.tw,
        r: d.r,
    })
    .unwrap_or_else(|e| panic!("{}: {e}", row.name))
}

/// Relative deviations (computed − table)/table for A, Iy, Iz, It, Iw.
fn deviations(row: &Row) -> [f64; 5] {
    let p = computed(row);
    let got = [
        p.area / 1e2,
        p.iy / 1e4,
        p.iz / 1e4,
        p.it / 1e4,
        p.iw / 1e12,
    ];
    let want = [row.a, row.iy, row.iz, row.it, row.iw];
    std::array::from_fn(|k| rel_diff(got[k], want[k]))
}

fn check(rows: &[Row], tol: &Tolerances) -> [f64; 5] {
    let mut worst = [0.0f64; 5];
    let mut failures = Vec::new();
    for row in rows {
        let d = deviations(row);
        let cells: Vec<String> = (0..5)
            .map(|k| {
                if d[k].is_nan() {
                    format!("{} n/a", NAMES[k])
                } else {
                    format!("{} {:+.3}%", NAMES[k], 100.0 * d[k])
                }
            })
            .collect();
        println!("{:<22} {}", row.name, cells.join("  "));
        for k in 0..5 {
            if d[k].is_nan() {
                continue; // property not published in this source
            }
            worst[k] = worst[k].max(d[k].abs());
            if d[k].abs() > tol.0[k] {
                failures.push(format!(
                    "{} {}: {:+.2}% (tolerance {:.1}%)",
                    row.name,
                    NAMES[k],
                    100.0 * d[k],
                    100.0 * tol.0[k]
                ));
            }
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
    worst
}

#[test]
fn rolled_sections_match_uk_tables() {
    let worst = check(UK_TABLES, &UK_TOL);
    println!("worst |dev| UK tables: {worst:.4?}");
}

#[test]
fn rolled_sections_match_arcelormittal_data() {
    let worst = check(AM_TABLES, &AM_TOL);
    println!("worst |dev| ArcelorMittal: {worst:.4?}");
}

// Doubly symmetric rolled sections: shear centre at the centroid, no
// monosymmetry, and Iw = Iz·hs²/4 with hs = h − tf (domain notes), so that a
// load on the top flange centroid has ζ = κ exactly.
#[test]
fn rolled_sections_are_doubly_symmetric() {
    for row in UK_TABLES {
        let p = computed(row);
        let h = row.dims.h;
        let hs = h - row.dims.tf;
        assert_eq!(p.zs, 0.0, "{}", row.name);
        assert_eq!(p.beta_y, 0.0, "{}", row.name);
        assert!(
            (p.iw / (p.iz * hs * hs / 4.0) - 1.0).abs() < 1e-12,
            "{}",
            row.name
        );
        // Flange centroids at ±hs/2, surfaces at ±h/2 (mm), each to 1e-9.
        for (what, got, want) in [
            ("top flange", p.top_flange, hs / 2.0),
            ("bottom flange", p.bottom_flange, -hs / 2.0),
            ("top surface", p.top_surface, h / 2.0),
            ("bottom surface", p.bottom_surface, -h / 2.0),
        ] {
            assert!(
                (got - want).abs() < 1e-9,
                "{} {what}: {got} vs {want}",
                row.name
            );
        }
    }
}

// A monosymmetric section built from two different rolled flanges: its
// properties must lie between those of the two parent I-sections, and the
// larger flange on top gives βy < 0 (domain notes).
#[test]
fn monosymmetric_section_between_parents() {
    let (h, tw, r) = (400.0, 8.6, 21.0);
    let parent = |b: f64, tf: f64| properties(&Shape::I { h, b, tf, tw, r }).unwrap();
    let small = parent(180.0, 13.5);
    let big = parent(300.0, 19.0);
    let m = properties(&Shape::MonoI {
        h,
        b_top: 300.0,
        tf_top: 19.0,
        b_bottom: 180.0,
        tf_bottom: 13.5,
        tw,
        r,
    })
    .unwrap();
    for (name, lo, mid, hi) in [
        ("A", small.area, m.area, big.area),
        ("Iy", small.iy, m.iy, big.iy),
        ("Iz", small.iz, m.iz, big.iz),
        ("It", small.it, m.it, big.it),
        ("Iw", small.iw, m.iw, big.iw),
    ] {
        assert!(lo < mid && mid < hi, "{name}: {lo} < {mid} < {hi}");
    }
    // Exact averages where the properties are additive over the two halves.
    assert!((m.it - (small.it + big.it) / 2.0).abs() < 1e-9 * m.it);
    assert!((m.iz - (small.iz + big.iz) / 2.0).abs() < 1e-9 * m.iz);
    assert!(m.beta_y < 0.0 && m.zs > 0.0);
    assert!(m.top_flange > 0.0 && m.top_flange < -m.bottom_flange);
}
