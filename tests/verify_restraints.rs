//! Continuous lateral restraint (sheeting, decking) at a height.
//!
//! Source: restrained-axis buckling of a beam with forks under uniform
//! moment, with its lateral displacement held continuously at a height a_r
//! on the tension side of the shear centre — Trahair, N. S. (1993),
//! *Flexural-Torsional Buckling of Structures*, ch. 9 (restrained beams),
//! from memory:
//!
//! ```text
//! M_cr = (π²·E·Iz·a_r²/L² + G·It + π²·E·Iw/L²) / (2·|a_r|)
//! μ    = π·(1 + κ² + ζ_r²) / (2·|ζ_r|)            (dimensionless, ζ_r = π·a_r/L·√(E·Iz/G·It))
//! ```
//!
//! ```text
//!   M ( ===================================== ) M      sagging, forks at both ends
//!       ~~~~~~~~~~~~~~ springs at ζ_r < 0 ~~~~~~~~      (below the shear centre: tension side)
//! ```
//!
//! The rigid restraint is approached with a stiff spring (k = 10⁷ in units
//! of E·Iz/L⁴); the spring's flexibility adds about 1e-6 relative, so the
//! tolerance is 1e-5.

mod common;

use common::{mu0, uniform_moment};
use ltb_atlas::model::{ContinuousRestraint, Member};
use ltb_atlas::solve::{Settings, Status, solve};
use std::f64::consts::PI;

/// Uniform moment with forks, lateral springs of stiffness `k` per unit length along the whole
/// member at height ζr, no torsional springs.
fn restrained(kappa: f64, zeta_r: f64, k: f64) -> Member {
    let mut m = uniform_moment(kappa);
    m.continuous.push(ContinuousRestraint {
        from: 0.0,
        to: 1.0,
        zeta: zeta_r,
        lateral: k,
        twist: 0.0,
    });
    m
}

/// μcr of the forward direction.
fn mu_cr(m: &Member, s: &Settings) -> f64 {
    solve(m, s).unwrap().forward.mu_cr.unwrap()
}

#[test]
fn restrained_axis_buckling_on_the_tension_side() {
    for (kappa, zr) in [(0.5, -0.5), (0.5, -1.0), (1.5, -0.8), (0.2, -2.0)] {
        let s = solve(
            &restrained(kappa, zr, 1e7),
            &Settings {
                tolerance: 1e-6,
                ..Default::default()
            },
        )
        .unwrap();
        assert_eq!(s.forward.status, Status::Ok);
        let mu = s.forward.mu_cr.unwrap();
        // Trahair (1993) ch. 9, from memory (formula in the header).
        let exact = PI * (1.0 + kappa * kappa + zr * zr) / (2.0 * zr.abs());
        assert!(
            (mu - exact).abs() < 1e-5 * exact,
            "κ = {kappa}, ζr = {zr}: {mu} vs {exact}"
        );
    }
}

#[test]
fn restraint_on_the_compression_side_is_far_more_effective() {
    // Common practice, no source: sheeting on the compression flange
    // practically prevents lateral–torsional buckling; on the tension flange
    // it does not. κ = 0.5, flanges at ζ = ±κ.
    let s = Settings::default();
    let top = mu_cr(&restrained(0.5, 0.5, 1e4), &s);
    let bottom = mu_cr(&restrained(0.5, -0.5, 1e4), &s);
    assert!(top > 5.0 * bottom, "top {top}, bottom {bottom}");
}

#[test]
fn a_vanishing_restraint_changes_nothing() {
    // Uniform moment, forks: π√(1+κ²) (Timoshenko & Gere 1961, §6.2).
    let s = Settings {
        tolerance: 1e-7,
        ..Default::default()
    };
    let mu = mu_cr(&restrained(0.8, -0.8, 1e-9), &s);
    let exact = mu0(0.8);
    assert!((mu - exact).abs() < 1e-6 * exact);
}
