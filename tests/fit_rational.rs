//! The rational basis of the `surface` form (P/Q, Loeb / Sanathanan–Koerner
//! then Levenberg–Marquardt): exact recovery of a rational surface, a
//! reported bound at least the true error found by dense sampling, a
//! positive denominator, and a cantilever family solved by the engine with
//! both bases.

mod common;

use common::{fit_grid, linspace, logspace};
use ltb_atlas::fit::{self, Domain, Formula, Model, ValidationSettings, mu0, surface};
use ltb_atlas::stage::{self, CacheChoice, Options};
use serde_json::Value;

/// μcr/μ0 a ratio of a bilinear numerator and a linear denominator in
/// (ln κ, ζ): inside the rational basis (an affine change of variables
/// keeps the degrees), with a denominator between 0.48 and 1.28 here.
fn in_rational_basis(k: f64, z: f64) -> f64 {
    let l = k.ln();
    mu0(k) * (1.1 + 0.05 * l - 0.3 * z + 0.02 * l * z) / (1.0 + 0.2 * l - 0.1 * z)
}

#[test]
fn recovers_a_rational_surface_to_1e_10_before_rounding() {
    // Exact data in the span of the form: Loeb's linearised problem is
    // then solved exactly (Loeb 1960; Golub & Van Loan, Matrix
    // Computations, 4th ed., 2013, §5.5 for the least squares).
    let ks = logspace(0.1, 3.0, 7);
    let zs = linspace(-0.6, 0.6, 7);
    let s = fit_grid(in_rational_basis, &ks, &zs, false, 0.0);
    let d = Domain::rectangle([0.1, 3.0], [-0.6, 0.6]);
    let o = surface::SurfaceOptions {
        target: 1e-12,
        basis: surface::Basis::Rational,
        ..Default::default()
    };
    let fit = surface::fit(&s, &d, o).unwrap();
    assert!(fit.target_met && fit.is_rational());
    assert_eq!(
        fit.powers.len() + fit.den_powers.len(),
        6,
        "fewest coefficients"
    );
    for k in logspace(0.1, 3.0, 23) {
        for z in linspace(-0.6, 0.6, 19) {
            let exact = in_rational_basis(k, z) / mu0(k);
            assert!((fit.ratio(k, z) - exact).abs() < 1e-10, "{k} {z}");
        }
    }
    // The polynomial basis cannot represent it exactly: with the same
    // target it misses (the reason for the rational basis).
    let p = surface::fit(
        &s,
        &d,
        surface::SurfaceOptions {
            target: 1e-12,
            ..Default::default()
        },
    )
    .unwrap();
    assert!(!p.target_met && !p.is_rational());
    // Printed coefficients (what every bound and eval use) parse back, and
    // the printed Q stays positive over the domain.
    let m = fit.printed(4);
    for c in m.coefficients() {
        assert_eq!(c.value, c.text.parse::<f64>().unwrap(), "{}", c.name);
    }
    assert!(m.q_min(&d) > 0.4);
    assert!(m.typst().starts_with("Q mu_\"cr\" / mu_0 = "));
    assert!(m.typst().contains(", quad Q = 1 "));
}

/// A surface outside every polynomial and rational basis (band domain):
/// the test surface of tests/fit_surface.rs.
fn curved(k: f64, z: f64) -> f64 {
    let l = k.ln();
    let t = z / k;
    mu0(k) * (1.0 + 0.25 * (1.3 * l).sin() * (0.8 * t).exp() + 0.1 * (2.0 * t * l).cos())
}

#[test]
fn rational_bound_is_at_least_the_true_maximum_error_by_dense_sampling() {
    // Dense sampling of the known surface (common practice, no source):
    // the measured bound of the printed rational fit must not understate
    // the error anywhere in the domain.
    let ks = logspace(0.1, 2.0, 8);
    let ts = linspace(-1.0, 1.0, 7);
    let e = 1e-4;
    let s = fit_grid(curved, &ks, &ts, true, e);
    let d = Domain::band([0.1, 2.0], [-1.0, 1.0]);
    for max_degree in [2, 3] {
        let o = surface::SurfaceOptions {
            max_degree,
            basis: surface::Basis::Rational,
            ..Default::default()
        };
        let fit = surface::fit(&s, &d, o).unwrap();
        assert!(fit.is_rational());
        let f = Formula {
            model: Model::Surface(fit.printed(4)),
            factor: None,
        };
        let c = f.compile().unwrap();
        let mut eng = |pts: &[(f64, f64)]| -> Result<Vec<Option<(f64, f64)>>, ()> {
            Ok(pts.iter().map(|&(k, z)| Some((curved(k, z), e))).collect())
        };
        let checks = fit::validate(&c, &d, &s, ValidationSettings::default(), &mut eng).unwrap();
        let b = fit::bounds(&checks);
        let (mut rel, mut unc): (f64, f64) = (0.0, 0.0);
        for k in logspace(0.1, 2.0, 301) {
            for t in linspace(-1.0, 1.0, 201) {
                let r = c.mu_cr(k, t * k) / curved(k, t * k) - 1.0;
                rel = rel.max(r.abs());
                unc = unc.max(r);
            }
        }
        assert!(
            b.max_rel_error.value >= rel,
            "degree {max_degree}: bound {} below the true maximum {rel}",
            b.max_rel_error.value
        );
        assert!(b.max_unconservative_error.value >= unc);
        assert!(b.max_rel_error.value <= rel + 2.0 * e + 1e-9);
    }
}

/// A cantilever, built in at the root (warping prevented), free at the
/// tip, with a tip point load at heights up to the flange lines ζ = ±κ.
const CANTILEVER: &str = r#"[[family]]
name = "tip"
kappa = { from = 0.3, to = 3.0, count = 6, spacing = "log" }
zeta = ["-kappa", "-0.5*kappa", 0.0, "0.5*kappa", "kappa"]
fit = [{ form = "surface", name = "poly" }, { form = "surface", name = "rat", basis = "rational" }]
[family.case]
start = { preset = "built-in" }
end = { preset = "free" }
[[family.case.load]]
kind = "point"
at = 1.0
"#;

#[test]
fn cantilever_with_flange_loads_fitted_with_both_bases() {
    // Measured on this 6 × 5 grid (2026-12-02): polynomial 27 terms,
    // grid 0.16 %, cross-validated 1.95 % (target missed), measured bound
    // 13.2 %; rational 25 + 2 terms, grid 0.06 %, cross-validated 0.85 %
    // (target met on the grid), measured bound 13.4 %. Both peak at κ = 3,
    // ζ ≈ 0.81κ, between the ζ nodes 0.5κ and κ, where μcr/μ0 is small
    // and steep: five ζ values cannot carry either basis there. With
    // κ = 0.3 … 3 over 8 values the rational bound was 10.1 % against
    // 13.4 %. What is asserted is what holds whatever the grid: the bound
    // is honest and the denominator positive.
    let d = tempfile::tempdir().unwrap();
    let p = d.path().join("spec.toml");
    std::fs::write(&p, CANTILEVER).unwrap();
    let ls = stage::load_spec(&p).unwrap();
    let opts = Options {
        quiet: true,
        cache: CacheChoice::Off,
        ..Default::default()
    };
    stage::fit::run(&ls, &d.path().join("fit"), &opts).unwrap();
    let read = |n: &str| -> Value {
        serde_json::from_str(
            &std::fs::read_to_string(d.path().join(format!("fit/tip.{n}.fit.json"))).unwrap(),
        )
        .unwrap()
    };
    let (poly, rat) = (read("poly"), read("rat"));
    assert_eq!(rat["fit"]["basis_family"], "rational");
    assert!(rat["fit"]["denominator_min"].as_f64().unwrap() > 0.0);
    assert!(
        poly["fit"].get("basis_family").is_none(),
        "default output unchanged"
    );
    let coefs = std::fs::read_to_string(d.path().join("fit/tip.rat.coefficients.csv")).unwrap();
    assert!(coefs.contains("Q = 1 + sum of q<i><j>") && coefs.contains("\nall,q"));
    // Fresh engine solves at points on no grid the fit used: each printed
    // formula within its own reported bound (an honest bound holds where it
    // was not measured; common practice, no source).
    let f = &ls.spec.families[0];
    let idx = vec![0; f.axes.len()];
    let pts = [
        (0.41, -0.83),
        (0.77, 0.29),
        (1.37, -0.64),
        (2.2, 0.13),
        (0.55, 0.71),
    ];
    let points = pts
        .iter()
        .map(|&(k, t)| f.point_at(&idx, Some(k), Some(t * k)))
        .collect();
    let rows = stage::solve_points(
        points,
        &opts.settings(),
        &opts.pool().unwrap(),
        &mut opts.open_cache().unwrap(),
    )
    .unwrap();
    for (name, v) in [("poly", &poly), ("rat", &rat)] {
        let bound = v["max_rel_error"].as_f64().unwrap();
        let file = d.path().join(format!("fit/tip.{name}.fit.json"));
        for (&(k, t), r) in pts.iter().zip(&rows) {
            let fe = r.mu_cr.unwrap();
            let e = stage::fit::eval(&file, k, t * k, false).unwrap();
            assert!(
                (e.mu_cr / fe - 1.0).abs() <= bound,
                "{name} κ {k} ζ/κ {t}: fit {} engine {fe}, bound {bound}",
                e.mu_cr
            );
        }
    }
}

#[test]
fn basis_is_a_surface_option_with_a_located_error() {
    let d = tempfile::tempdir().unwrap();
    let p = d.path().join("spec.toml");
    let spec = CANTILEVER.replace(
        "fit = [{ form = \"surface\", name = \"poly\" }, { form = \"surface\", name = \"rat\", basis = \"rational\" }]",
        "fit = [{ form = \"c-curves\", basis = \"rational\" }]",
    );
    std::fs::write(&p, spec).unwrap();
    let ls = stage::load_spec(&p).unwrap();
    let e = stage::fit::parse_fits(&ls).unwrap_err().to_string();
    assert!(
        e.contains("spec.toml:5:") && e.contains("`basis` belongs to form = \"surface\""),
        "{e}"
    );
    let spec = CANTILEVER.replace("basis = \"rational\"", "basis = \"rationl\"");
    std::fs::write(&p, spec).unwrap();
    let ls = stage::load_spec(&p).unwrap();
    let e = stage::fit::parse_fits(&ls).unwrap_err().to_string();
    assert!(e.contains("rationl") && e.contains("rational"), "{e}");
}
