//! Shared builders and helpers for the integration tests (included with `mod common;`).
//!
//! Every member here is dimensionless (E·Iz = G·It = L = 1, domain notes) and carries unit
//! gravity loads (Fz = −1, or fz = −1 per unit length); heights are ζ, geometric, positive up.
//! Each test crate uses only some of these, hence the `dead_code` allowance.
//!
//! ```text
//!   uniform moment         simple span, uniform   simple span, central   cantilever, tip / uniform
//!   M (==========) M       o==v=v=v=v=v=v==o      o=======v=======o      |==============v  |=v=v=v=v=v
//!   fork        fork       fork         fork      fork   L/2     fork    built-in     free
//! ```

#![allow(dead_code)]

use ltb_atlas::model::{Axial, Fixity, Load, Member, Restraint, Support};
use std::path::{Path, PathBuf};

/// The typst 0.15.1 binary for end-to-end PDF tests: `TYPST_BIN`, else the
/// stable tools folder that `scripts/install-typst` fills (`LTB_TOOLS_DIR`
/// or `~/.cache/ltb-atlas-tools`). Panics, never skips, without it: the
/// README's test command installs it first.
pub fn typst() -> PathBuf {
    if let Some(p) = std::env::var_os("TYPST_BIN").filter(|p| !p.is_empty()) {
        return PathBuf::from(p);
    }
    let tools = std::env::var_os("LTB_TOOLS_DIR")
        .map(PathBuf::from)
        .or_else(|| std::env::var_os("HOME").map(|h| Path::new(&h).join(".cache/ltb-atlas-tools")));
    if let Some(t) = tools.map(|t| t.join("bin/typst")).filter(|p| p.is_file()) {
        return t;
    }
    panic!(
        "typst 0.15.1 is needed for the end-to-end PDF tests: run scripts/install-typst (the README's test command does) or set TYPST_BIN"
    );
}

use ltb_atlas::solve::{Direction, Settings, Solution, Status, solve};
use std::f64::consts::PI;

/// Unit gravity load fz = −1 over the whole member, at height ζ.
pub fn udl(zeta: f64) -> Load {
    Load::Distributed {
        from: 0.0,
        to: 1.0,
        fz_from: -1.0,
        fz_to: -1.0,
        zeta,
    }
}

/// Unit gravity point load Fz = −1 at `at` (units of L), at height ζ.
pub fn point(at: f64, zeta: f64) -> Load {
    Load::Point { at, fz: -1.0, zeta }
}

/// Forks at both ends, equal sagging end moments M(0) = M(1) = 1 (uniform moment).
pub fn uniform_moment(kappa: f64) -> Member {
    Member::new(kappa, Support::FORK, Support::FORK).with_load(Load::EndMoments {
        start: 1.0,
        end: 1.0,
    })
}

/// Simply supported (forks at both ends), unit uniform load at height ζ.
pub fn simple_span_uniform(kappa: f64, zeta: f64) -> Member {
    Member::new(kappa, Support::FORK, Support::FORK).with_load(udl(zeta))
}

/// Simply supported (forks at both ends), unit point load at midspan at height ζ.
pub fn simple_span_central_point(kappa: f64, zeta: f64) -> Member {
    Member::new(kappa, Support::FORK, Support::FORK).with_load(point(0.5, zeta))
}

/// Built-in cantilever (root at x = 0, warping fixed; tip free), unit tip load at height ζ.
pub fn cantilever_tip(kappa: f64, zeta: f64) -> Member {
    Member::new(kappa, Support::BUILT_IN, Support::FREE).with_load(point(1.0, zeta))
}

/// Built-in cantilever (root at x = 0, warping fixed; tip free), unit uniform load at height ζ.
pub fn cantilever_uniform(kappa: f64, zeta: f64) -> Member {
    Member::new(kappa, Support::BUILT_IN, Support::FREE).with_load(udl(zeta))
}

/// The same member with its start (a cantilever's root) free to warp: a root welded or
/// end-plated without stiffeners (domain notes, "What the model leaves out").
pub fn with_warping_free_root(mut m: Member) -> Member {
    m.start.warping = Fixity::Free;
    m
}

/// Fork laterally with the major-axis (in-plane) rotation fixed: NCCI SN003's "fixed ends" with
/// k = 1 laterally.
pub fn fork_major_axis_fixed() -> Support {
    let mut s = Support::FORK;
    s.in_plane_rotation = Fixity::Fixed;
    s
}

/// A column with forks at both ends, no transverse load: axial force `n` (compression positive,
/// units E·Iz/L²), centroid at ζc above the shear centre, polar radius of gyration `rho` (ζ units).
pub fn fork_column(kappa: f64, n: f64, zeta_centroid: f64, rho: f64) -> Member {
    let mut m = Member::new(kappa, Support::FORK, Support::FORK);
    m.axial = Some(Axial {
        n,
        zeta_centroid,
        rho,
    });
    m
}

/// Propped cantilever (built-in start, fork end), κ = 0.7: a unit gravity point load at x = 0.3,
/// ζ = 0.4; an end moment M(1) = 0.3; a lateral spring k = 20 at x = 0.6, ζ = 0.5.
pub fn propped_cantilever() -> Member {
    Member::new(0.7, Support::BUILT_IN, Support::FORK)
        .with_load(point(0.3, 0.4))
        .with_load(Load::EndMoments {
            start: 0.0,
            end: 0.3,
        })
        .with_restraint(Restraint {
            at: 0.6,
            zeta: 0.5,
            lateral: Fixity::Spring(20.0),
            twist: Fixity::Free,
        })
}

/// Critical moment of uniform moment with forks at both ends (exact).
///
/// ```text
/// μ0 = π·√(1 + κ²)
/// ```
///
/// # References
/// Timoshenko, S. P. & Gere, J. M. (1961), *Theory of Elastic Stability*, 2nd ed., McGraw-Hill,
/// §6.2; project domain notes ("reference value") and reference-values §1.
pub fn mu0(kappa: f64) -> f64 {
    PI * (1.0 + kappa * kappa).sqrt()
}

/// Relative difference |a − b|/|b| (b the reference value).
pub fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

/// Signed relative difference (got − want)/want, for printing and one-sided checks.
pub fn rel_diff(got: f64, want: f64) -> f64 {
    (got - want) / want
}

/// Solve, panicking with the member and the settings when the solve returns an error.
pub fn solved(m: &Member, s: &Settings) -> Solution {
    solve(m, s).unwrap_or_else(|e| panic!("solve failed: {e}\n  member {m:?}\n  settings {s:?}"))
}

/// Solve and return the forward direction's (load factor, error estimate); panics when the solve
/// fails or the member does not buckle.
pub fn factor(m: &Member, s: &Settings) -> (f64, f64) {
    let d = solved(m, s).forward;
    (d.load_factor.expect("buckles"), d.error_estimate)
}

/// A result good enough for a comparison at a given level: a factor, not "no buckling", and an
/// estimate ≤ `max_estimate` (status Ok, or not-converged where the request sits below the
/// solver's round-off level).
pub fn certified(d: &Direction, max_estimate: f64) -> bool {
    d.load_factor.is_some() && d.status != Status::NoBuckling && d.error_estimate <= max_estimate
}

/// Run `f` over the items on two threads (the suite's budget is two cores); results in order.
pub fn par_map<I: Sync, T: Send>(items: &[I], f: impl Fn(&I) -> T + Sync) -> Vec<T> {
    let half = items.len().div_ceil(2);
    let (a, b) = items.split_at(half);
    std::thread::scope(|s| {
        let h = s.spawn(|| b.iter().map(&f).collect::<Vec<T>>());
        let mut out: Vec<T> = a.iter().map(&f).collect();
        out.extend(h.join().unwrap());
        out
    })
}

/// Print each failure as a `FAIL` line, then assert that there are none.
pub fn report_failures(failures: &[String]) {
    for f in failures {
        println!("FAIL {f}");
    }
    assert!(
        failures.is_empty(),
        "{} failing cases:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

/// `n` values from `a` to `b` evenly spaced in ln (both ends included).
pub fn logspace(a: f64, b: f64, n: usize) -> Vec<f64> {
    (0..n)
        .map(|i| (a.ln() + (b.ln() - a.ln()) * i as f64 / (n - 1) as f64).exp())
        .collect()
}

/// `n` values from `a` to `b` evenly spaced (both ends included).
pub fn linspace(a: f64, b: f64, n: usize) -> Vec<f64> {
    (0..n)
        .map(|i| a + (b - a) * i as f64 / (n - 1) as f64)
        .collect()
}

/// Fit samples of an analytic `f(κ, ζ)` on the grid κ ∈ `ks` × ζ ∈ `zs` (ζ = z·κ when `band`),
/// each with error estimate `e` (δ = 0).
pub fn fit_grid(
    f: fn(f64, f64) -> f64,
    ks: &[f64],
    zs: &[f64],
    band: bool,
    e: f64,
) -> Vec<ltb_atlas::fit::Sample> {
    let mut s = Vec::new();
    for &k in ks {
        for &z in zs {
            let zeta = if band { z * k } else { z };
            s.push(ltb_atlas::fit::Sample {
                kappa: k,
                zeta,
                delta: 0.0,
                mu_cr: f(k, zeta),
                error_estimate: e,
            });
        }
    }
    s
}
