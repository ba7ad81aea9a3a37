//! The `c-curves` form on data made by the three-factor form itself (NCCI
//! SN003, k = kw = 1): per-κ C1 and C2 recovered, the smoothing in ln κ
//! follows them, |ζ| < 0.1 is left out, and too few ζ values are refused.

use ltb_atlas::fit::ccurves::{self, three_factor};
use ltb_atlas::fit::{Domain, Sample};

fn c1(k: f64) -> f64 {
    1.13 + 0.01 * k.ln()
}
fn c2(k: f64) -> f64 {
    0.45 - 0.02 * k.ln()
}

#[test]
fn recovers_coefficients_of_the_three_factor_form() {
    // Exact data: the least-squares per-κ fit must return C1, C2 (to the
    // golden-section tolerance), and a degree-1 curve in ln κ follows them.
    let ks = [0.1, 0.2, 0.5, 1.0, 2.0];
    let zs = [-0.6, -0.3, -0.15, 0.0, 0.05, 0.15, 0.3, 0.6];
    let mut s = Vec::new();
    for &k in &ks {
        for &z in &zs {
            s.push(Sample {
                kappa: k,
                zeta: z,
                delta: 0.0,
                mu_cr: three_factor(c1(k), c2(k), k, z),
                error_estimate: 0.0,
            });
        }
    }
    let d = Domain::rectangle([0.1, 2.0], [-0.6, 0.6]);
    let f = ccurves::fit(&s, &d, 0.01).unwrap();
    for p in &f.per_kappa {
        assert!((p.c1 - c1(p.kappa)).abs() < 1e-8, "{p:?}");
        assert!((p.c2 - c2(p.kappa)).abs() < 1e-7, "{p:?}");
        assert_eq!(p.points, 6, "|zeta| < 0.1 left out");
        assert!((p.c1_at_zeta0.unwrap() - c1(p.kappa)).abs() < 1e-12);
    }
    assert_eq!(f.c1.len(), 2, "C1 linear in ln kappa");
    let m = f.printed(6);
    for k in [0.15, 0.7, 1.6] {
        let (a, b) = m.c(k);
        assert!(
            (a - c1(k)).abs() < 1e-5 && (b - c2(k)).abs() < 1e-5,
            "{k}: {a} {b}"
        );
    }
}

#[test]
fn too_few_load_heights_are_refused() {
    let pts = [(0.05, 3.5), (0.3, 3.2)];
    let e = ccurves::fit_at(0.5, &pts).unwrap_err().to_string();
    assert!(e.contains("kappa = 0.5") && e.contains("zeta"), "{e}");
}

#[test]
fn a_coefficient_at_the_edge_of_the_scan_is_flagged() {
    // Values made by the three-factor form itself (domain notes) with C2 = 8,
    // outside the scanned [-6, 6]: the per-kappa fit must say so; with
    // C2 = 0.45 it has nothing to say.
    use ltb_atlas::fit::ccurves::fit_at;
    let kappa = 0.5;
    let zs = [-0.4, -0.2, 0.2, 0.4];
    for (c2, flagged) in [(8.0, true), (0.45, false)] {
        let pts: Vec<(f64, f64)> = zs
            .iter()
            .map(|&z| (z, three_factor(1.1, c2, kappa, z)))
            .collect();
        let pk = fit_at(kappa, &pts).unwrap();
        assert_eq!(
            !pk.search_notes.is_empty(),
            flagged,
            "C2 = {c2}: {:?}",
            pk.search_notes
        );
        if flagged {
            assert!(pk.search_notes[0].contains("C2"), "{:?}", pk.search_notes);
        }
    }
}
