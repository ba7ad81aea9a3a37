//! The `surface` form and the measured error bound, on analytic surfaces
//! standing in for the engine (so the true error is known everywhere):
//! exact recovery of a surface inside the basis, a reported bound at least
//! the true maximum error found by dense sampling, a large error reported
//! for an underfit surface, and the conservative factor holding on a fresh
//! validation grid.

mod common;

use common::{fit_grid, linspace, logspace};
use ltb_atlas::fit::{
    self, Check, Domain, Formula, Model, Sample, ValidationSettings, mu0, surface,
};

type Eng<'a> = Box<dyn FnMut(&[(f64, f64)]) -> Result<Vec<Option<(f64, f64)>>, ()> + 'a>;

fn engine(f: fn(f64, f64) -> f64, e: f64) -> Eng<'static> {
    Box::new(move |pts: &[(f64, f64)]| Ok(pts.iter().map(|&(k, z)| Some((f(k, z), e))).collect()))
}

/// A surface inside the basis: μcr/μ0 a polynomial of degree 2 in ln κ and
/// degree 2 in ζ.
fn in_basis(k: f64, z: f64) -> f64 {
    let l = k.ln();
    mu0(k) * (1.1 + 0.05 * l - 0.3 * z + 0.02 * l * l + 0.04 * z * z - 0.01 * l * z * z)
}

#[test]
fn recovers_a_surface_inside_the_basis_to_1e_10_before_rounding() {
    // Least squares reproduces data lying in the span of the basis exactly
    // (Golub & Van Loan, Matrix Computations, 4th ed., 2013, §5.5).
    let ks = logspace(0.1, 3.0, 7);
    let zs = linspace(-0.6, 0.6, 7);
    let s = fit_grid(in_basis, &ks, &zs, false, 0.0);
    let d = Domain::rectangle([0.1, 3.0], [-0.6, 0.6]);
    let o = surface::SurfaceOptions {
        target: 1e-12,
        ..Default::default()
    };
    let fit = surface::fit(&s, &d, o).unwrap();
    assert!(fit.target_met);
    assert_eq!((fit.p, fit.q), (2, 2), "fewest terms that meet the target");
    for k in logspace(0.1, 3.0, 23) {
        for z in linspace(-0.6, 0.6, 19) {
            let exact = in_basis(k, z) / mu0(k);
            assert!((fit.ratio(k, z) - exact).abs() < 1e-10, "{k} {z}");
        }
    }
}

/// A surface outside any polynomial basis (band domain, ζ = t·κ).
fn curved(k: f64, z: f64) -> f64 {
    let l = k.ln();
    let t = z / k;
    mu0(k) * (1.0 + 0.25 * (1.3 * l).sin() * (0.8 * t).exp() + 0.1 * (2.0 * t * l).cos())
}

fn true_max_error(f: &Formula, truth: fn(f64, f64) -> f64, d: &Domain) -> (f64, f64) {
    let c = f.compile().unwrap();
    let (mut rel, mut unc): (f64, f64) = (0.0, 0.0);
    for k in logspace(d.kappa_min, d.kappa_max, 301) {
        for t in linspace(-1.0, 1.0, 201) {
            let z = t * k;
            let e = c.mu_cr(k, z) / truth(k, z) - 1.0;
            rel = rel.max(e.abs());
            unc = unc.max(e);
        }
    }
    (rel, unc)
}

/// Print `fit` (4 digits), measure its bound against the analytic
/// stand-in `truth` as the stage does, and assert that neither the
/// relative nor the unconservative bound is below the dense-sampled truth.
/// Returns the bounds and the true largest relative error.
fn bound_covers_truth(
    fit: &surface::SurfaceFit,
    truth: fn(f64, f64) -> f64,
    d: &Domain,
    s: &[Sample],
    e: f64,
    max_degree: usize,
) -> (fit::Bounds, f64) {
    let f = Formula {
        model: Model::Surface(fit.printed(4)),
        factor: None,
    };
    let c = f.compile().unwrap();
    let mut eng = engine(truth, e);
    let checks = fit::validate(&c, d, s, ValidationSettings::default(), &mut *eng).unwrap();
    let b = fit::bounds(&checks);
    let (rel, unc) = true_max_error(&f, truth, d);
    assert!(
        b.max_rel_error.value >= rel,
        "degree {max_degree}: bound {} below the true maximum {rel}",
        b.max_rel_error.value
    );
    assert!(
        b.max_unconservative_error.value >= unc,
        "degree {max_degree}: bound {} below the true unconservative maximum {unc}",
        b.max_unconservative_error.value
    );
    (b, rel)
}

#[test]
fn reported_bound_is_at_least_the_true_maximum_error_by_dense_sampling() {
    // Check against dense sampling of the known surface (common practice,
    // no source): the measured bound must not understate the error.
    let ks = logspace(0.1, 2.0, 8);
    let ts = linspace(-1.0, 1.0, 7);
    let e = 1e-4;
    let s = fit_grid(curved, &ks, &ts, true, e);
    let d = Domain::band([0.1, 2.0], [-1.0, 1.0]);
    for max_degree in [2, 3, 6] {
        let o = surface::SurfaceOptions {
            max_degree,
            ..Default::default()
        };
        let fit = surface::fit(&s, &d, o).unwrap();
        let (b, rel) = bound_covers_truth(&fit, curved, &d, &s, e, max_degree);
        // And not wildly above it (the bound adds only the estimate e).
        assert!(b.max_rel_error.value <= rel + 2.0 * e + 1e-9);
    }
}

#[test]
fn an_underfit_surface_reports_a_large_error() {
    // A plane in (u, v) cannot follow this surface, whose μcr/μ0 varies by
    // about ±30 % (common practice, no source: the bound must show it).
    let ks = logspace(0.1, 2.0, 8);
    let ts = linspace(-1.0, 1.0, 7);
    let s = fit_grid(curved, &ks, &ts, true, 1e-4);
    let d = Domain::band([0.1, 2.0], [-1.0, 1.0]);
    let o = surface::SurfaceOptions {
        max_degree: 1,
        ..Default::default()
    };
    let fit = surface::fit(&s, &d, o).unwrap();
    assert!(!fit.target_met);
    let f = Formula {
        model: Model::Surface(fit.printed(4)),
        factor: None,
    };
    let c = f.compile().unwrap();
    let mut eng = engine(curved, 1e-4);
    let checks = fit::validate(&c, &d, &s, ValidationSettings::default(), &mut *eng).unwrap();
    let b = fit::bounds(&checks);
    assert!(b.max_rel_error.value > 0.05, "{}", b.max_rel_error.value);
    assert!(b.max_unconservative_error.value > 0.02);
}

#[test]
fn conservative_factor_holds_on_a_fresh_validation_grid() {
    // The factor puts the formula at or below the engine's lower bracket at
    // every checked point; re-checked here on the validation grid (where the
    // issue asks it to hold) with fresh evaluations of the analytic
    // stand-in through the compiled, printed formula: this checks that the
    // factor is applied as printed, not that it holds between those points
    // (common practice, no source).
    let ks = logspace(0.1, 2.0, 8);
    let ts = linspace(-1.0, 1.0, 7);
    let e = 1e-4;
    let s = fit_grid(curved, &ks, &ts, true, e);
    let d = Domain::band([0.1, 2.0], [-1.0, 1.0]);
    let fit = surface::fit(
        &s,
        &d,
        surface::SurfaceOptions {
            max_degree: 2,
            ..Default::default()
        },
    )
    .unwrap();
    let mut f = Formula {
        model: Model::Surface(fit.printed(4)),
        factor: None,
    };
    let checks = {
        let c = f.compile().unwrap();
        let mut eng = engine(curved, e);
        fit::validate(&c, &d, &s, ValidationSettings::default(), &mut *eng).unwrap()
    };
    assert!(fit::bounds(&checks).max_unconservative_error.value > 0.0);
    let factor = fit::safe_factor(&checks, 4);
    assert!(factor.value < 1.0);
    assert_eq!(factor.value, factor.text.parse::<f64>().unwrap());
    f.factor = Some(factor);
    let c = f.compile().unwrap();
    for (k, z) in fit::validation_points(&d, &s, 2) {
        let fe = curved(k, z);
        let chk = Check {
            kappa: k,
            zeta: z,
            delta: 0.0,
            fe,
            error_estimate: e,
            fit: c.mu_cr(k, z),
            origin: fit::Origin::Validation,
        };
        assert!(
            chk.unconservative() <= 0.0,
            "{k} {z}: {}",
            chk.unconservative()
        );
    }
}

#[test]
fn printed_coefficients_are_what_the_formula_uses() {
    // The bound is for the coefficients as printed: every value is the
    // parse of its text (issue contract).
    let ks = logspace(0.1, 3.0, 6);
    let zs = linspace(-0.6, 0.6, 5);
    let s = fit_grid(in_basis, &ks, &zs, false, 0.0);
    let d = Domain::rectangle([0.1, 3.0], [-0.6, 0.6]);
    let fit = surface::fit(&s, &d, Default::default()).unwrap();
    let m = fit.printed(3);
    for c in m.coefficients() {
        assert_eq!(c.value, c.text.parse::<f64>().unwrap(), "{}", c.name);
    }
    // With 3 digits the printed surface differs from the unrounded one.
    let diff = (m.ratio(0.7, 0.2) - fit.ratio(0.7, 0.2)).abs();
    assert!(diff > 0.0 && diff < 5e-3);
}

/// Sharply curved across ζ: μcr/μ0 = 1 + 2·ζ⁴ (its quartic swing is
/// invisible on three rows ζ ∈ {−1, 0, 1}, where a quadratic interpolates
/// it exactly).
fn quartic_in_zeta(k: f64, z: f64) -> f64 {
    mu0(k) * (1.0 + 2.0 * z.powi(4))
}

#[test]
fn points_between_the_rows_keep_a_surface_from_claiming_the_target() {
    // Three ζ rows: the interior row is all cross-validation can hold out,
    // and a quadratic in ζ meets the target on the grid and under
    // cross-validation while its interpolating quadratic 1 + 2ζ² misses
    // the quartic by 30 % at ζ = ±0.75 (2.125 against 1.633, exact algebra).
    // With engine points between the rows the fit must not claim the target
    // and must report that error. Common practice, no source.
    let ks = logspace(0.2, 2.0, 6);
    let zs = [-1.0, 0.0, 1.0];
    let s = fit_grid(quartic_in_zeta, &ks, &zs, false, 0.0);
    let dom = Domain::rectangle([0.2, 2.0], [-1.0, 1.0]);
    let o = surface::SurfaceOptions::default();
    let blind = surface::fit(&s, &dom, o).unwrap();
    assert!(
        blind.target_met,
        "grid and cross-validation alone see no error"
    );
    let between: Vec<Sample> = fit::validation_points(&dom, &s, 2)
        .into_iter()
        .map(|(kappa, zeta)| Sample {
            kappa,
            zeta,
            delta: 0.0,
            mu_cr: quartic_in_zeta(kappa, zeta),
            error_estimate: 0.0,
        })
        .collect();
    let guarded = surface::fit_with_validation(&s, &between, &dom, o).unwrap();
    assert!(!guarded.target_met);
    // the validation rows sit at ζ = ±0.25, ±0.75 (sub-cell centres)
    assert!(
        guarded.validation_max_rel > 0.25,
        "validation error {}",
        guarded.validation_max_rel
    );
}

#[test]
fn a_formula_value_that_is_not_a_number_is_an_unbounded_error() {
    // A check where the formula gives NaN (an expression outside its own
    // domain, say) must not vanish from the bound, first or not, and must
    // admit no conservative factor. Common practice, no source.
    let at = |fit: f64| Check {
        kappa: 1.0,
        zeta: 0.0,
        delta: 0.0,
        fe: 3.0,
        error_estimate: 1e-4,
        fit,
        origin: fit::Origin::Grid,
    };
    for checks in [vec![at(f64::NAN), at(3.0)], vec![at(3.0), at(f64::NAN)]] {
        let b = fit::bounds(&checks);
        assert_eq!(b.max_rel_error.value, f64::INFINITY);
        assert_eq!(b.max_unconservative_error.value, f64::INFINITY);
        assert_eq!(fit::safe_factor(&checks, 4).value, 0.0);
    }
}

/// Steepest at the band's edges: μcr/μ0 = 1 + 0.4·t⁵ + 0.1·ln κ·t, t = ζ/κ.
fn edge_steep(k: f64, z: f64) -> f64 {
    let t = z / k;
    mu0(k) * (1.0 + 0.4 * t.powi(5) + 0.1 * k.ln() * t)
}

#[test]
fn the_stage_path_bound_covers_peaks_on_the_domains_edges() {
    // The stage chooses the terms on engine points (fit_with_validation)
    // and measures the bound on the same validation grid plus a search;
    // for surfaces whose error peaks on the edges of the band, between grid
    // nodes, the bound must still be at least the dense-sampled truth
    // (common practice, no source; an independent review found an edge
    // peak the earlier interior-only validation grid missed).
    let ks = logspace(0.1, 2.0, 6);
    let ts = linspace(-1.0, 1.0, 5);
    let e = 1e-4;
    let d = Domain::band([0.1, 2.0], [-1.0, 1.0]);
    for truth in [curved as fn(f64, f64) -> f64, edge_steep] {
        let s = fit_grid(truth, &ks, &ts, true, e);
        let between: Vec<Sample> = fit::validation_points(&d, &s, 2)
            .into_iter()
            .map(|(kappa, zeta)| Sample {
                kappa,
                zeta,
                delta: 0.0,
                mu_cr: truth(kappa, zeta),
                error_estimate: e,
            })
            .collect();
        for max_degree in [2, 3] {
            let o = surface::SurfaceOptions {
                max_degree,
                ..Default::default()
            };
            let fit = surface::fit_with_validation(&s, &between, &d, o).unwrap();
            bound_covers_truth(&fit, truth, &d, &s, e, max_degree);
        }
    }
}
