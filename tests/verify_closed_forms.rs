//! Verification against closed-form critical values.
//!
//! Sources:
//! - Timoshenko, S. P. & Gere, J. M. (1961). *Theory of Elastic Stability*, 2nd ed., McGraw-Hill:
//!   §6.2 (uniform moment, forks), ch. 2 (Euler column) and ch. 5 (torsional and
//!   flexural-torsional buckling of centrally compressed bars; section numbers from memory).
//! - Trahair, N. S. (1993). *Flexural-Torsional Buckling of Structures*, E & FN Spon
//!   (monosymmetric beam under uniform moment; formula from memory, written here in the project's
//!   sign convention, checked value κ = 0.5, δ = −0.3 → 5.2921 from reference-values §1).
//! - Project domain notes (dimensionless parameters, functional, sign conventions) and
//!   reference-values §1.
//!
//! Goal: the solver reproduces exact values for cases whose mode is a single sine half-wave.
//!
//! ```text
//!   uniform moment (end moments M, M)         column (axial N, compression positive)
//!
//!   M (                               ) M        N -->                         <-- N
//!     o===============================o            o===========================o
//!    fork                            fork         fork                        fork
//!    v = φ = 0                     v = φ = 0
//! ```
//!
//! Closed forms (derived from the domain-notes functional with v = A·sin πx, φ = B·sin πx,
//! E·Iz = G·It = L = 1, E·Iw = κ²/π², heights in ζ units, geometric height = ζ/π):
//!
//! ```text
//! uniform moment:        μ = π·[√(1 + κ² + (π·δ/2)²) − π·δ/2]      (sagging; hogging: δ → −δ)
//! Euler column:          N̄ = π²
//! torsional column:      N̄ = (1 + κ²)/ρ̂²  = π²·(1 + κ²)/rho²      (ρ̂ = rho/π, z_c = 0)
//! flexural-torsional:    r₀²·(π² − N̄)·(N_t − N̄) − N̄²·ẑc² = 0,  r₀² = ρ̂² + ẑc², N_t = (1+κ²)/r₀²
//! ```
//!
//! Tolerance: 1e-6 relative on a converged model (reference-values §1: "assert to 1e-6 on a
//! converged model"). Models are solved with tolerance 1e-7 and must report an estimate ≤ 1e-6
//! (status Ok, or not-converged where the solver's round-off level is above 1e-7); the Hermite
//! element converges as h⁴ for these smooth modes, so the true error is far below 1e-6. A request
//! for 1e-8 must still return a value within 1e-6, whatever status it reports. The
//! published 4-digit value 5.2921 is checked to half a unit of its last digit.

mod common;

use common::{fork_column, mu0, rel};
use ltb_atlas::model::{Load, Member, Support};
use ltb_atlas::solve::{Direction, Settings, Status, solve};
use std::f64::consts::PI;

fn tight() -> Settings {
    Settings {
        tolerance: 1e-7,
        ..Default::default()
    }
}

/// μ under uniform sagging moment with forks (domain notes; Trahair 1993, from memory).
fn mu_mono_sagging(kappa: f64, delta: f64) -> f64 {
    let d = PI * delta / 2.0;
    PI * ((1.0 + kappa * kappa + d * d).sqrt() - d)
}

fn uniform_moment(kappa: f64, delta: f64, m: f64) -> Member {
    let mut b = Member::new(kappa, Support::FORK, Support::FORK)
        .with_load(Load::EndMoments { start: m, end: m });
    b.delta = delta;
    b
}

/// A result good enough for a 1e-6 comparison: a factor, with an estimate ≤ 1e-6 (status Ok, or
/// not-converged when the 1e-7 request sits below the solver's round-off level).
fn certified(d: &Direction) -> bool {
    common::certified(d, 1e-6)
}

/// Largest |x| of a mode field.
fn max_abs(xs: &[f64]) -> f64 {
    xs.iter().fold(0.0_f64, |a, x| a.max(x.abs()))
}

#[test]
fn uniform_moment_forks_equals_pi_sqrt_one_plus_kappa_squared() {
    for kappa in [0.02, 0.1, 0.5, 1.0, 2.0, 3.0, 10.0] {
        let sol = solve(&uniform_moment(kappa, 0.0, 1.0), &tight()).expect("solve");
        let f = &sol.forward;
        let exact = mu0(kappa);
        let mu = f.mu_cr.expect("buckles");
        println!(
            "uniform moment κ = {kappa}: μ = {mu:.10}, exact {exact:.10}, rel {:.2e}, est {:.1e}, {:?}",
            rel(mu, exact),
            f.error_estimate,
            f.status
        );
        assert!(
            certified(f),
            "κ = {kappa}: {:?}, estimate {:.1e}",
            f.status,
            f.error_estimate
        );
        // Timoshenko & Gere 1961 §6.2: μcr = π·√(1 + κ²); κ stated in the loop.
        assert!(
            rel(mu, exact) <= 1e-6,
            "κ = {kappa}: μ = {mu}, exact {exact}"
        );
        // Conforming element: the discrete factor is an upper bound (domain notes,
        // "Discretisation facts"); allow the round-off the estimate admits.
        assert!(
            mu >= exact * (1.0 - f.error_estimate),
            "κ = {kappa}: μ = {mu} below exact {exact}"
        );
        // μ0 reported by the solver is the same closed form (Timoshenko & Gere 1961 §6.2).
        assert!(rel(sol.mu0, exact) <= 1e-14);

        // A tolerance below the certifiable floor (1e-8): the value must still be right to 1e-6
        // (Timoshenko & Gere 1961 §6.2), and the estimate must not claim more than it reached.
        let deep = solve(
            &uniform_moment(kappa, 0.0, 1.0),
            &Settings {
                tolerance: 1e-8,
                ..Default::default()
            },
        )
        .expect("solve at 1e-8");
        let d = &deep.forward;
        let mu8 = d.mu_cr.expect("buckles");
        println!(
            "   tolerance 1e-8: μ = {mu8:.10}, rel {:.2e}, est {:.1e}, {:?}, {} el",
            rel(mu8, exact),
            d.error_estimate,
            d.status,
            d.elements
        );
        assert!(d.status != Status::NoBuckling);
        assert!(
            rel(mu8, exact) <= 1e-6,
            "κ = {kappa}, tolerance 1e-8: μ = {mu8}, exact {exact}"
        );
        assert!(
            rel(mu8, exact) <= d.error_estimate.max(1e-9),
            "κ = {kappa}, tolerance 1e-8: true error above the estimate"
        );
    }
}

#[test]
fn monosymmetric_uniform_moment_sagging_and_hogging() {
    // Published check value: κ = 0.5, δ = −0.3 (larger flange on top), sagging → 5.2921
    // (reference-values §1, Trahair 1993, memory-checked against an independent solver).
    let s = solve(&uniform_moment(0.5, -0.3, 1.0), &tight()).unwrap();
    let mu = s.forward.mu_cr.unwrap();
    assert!(
        (mu - 5.2921).abs() <= 0.5e-4,
        "κ = 0.5, δ = −0.3: μ = {mu}, published 5.2921"
    );

    for kappa in [0.3, 1.0, 2.5] {
        for delta in [-0.3, -0.1, 0.15, 0.3] {
            // Sagging, end moments (+1, +1): domain notes / Trahair 1993 (memory), κ and δ as looped.
            let sag = solve(&uniform_moment(kappa, delta, 1.0), &tight()).unwrap();
            let mu_s = sag.forward.mu_cr.unwrap();
            let ex_s = mu_mono_sagging(kappa, delta);
            assert!(certified(&sag.forward));
            assert!(
                rel(mu_s, ex_s) <= 1e-6,
                "sagging κ = {kappa}, δ = {delta}: μ = {mu_s}, exact {ex_s}"
            );
            // Hogging, end moments (−1, −1): the sign of δ flips (domain notes), κ and δ as looped.
            let hog = solve(&uniform_moment(kappa, delta, -1.0), &tight()).unwrap();
            let mu_h = hog.forward.mu_cr.unwrap();
            let ex_h = mu_mono_sagging(kappa, -delta);
            assert!(certified(&hog.forward));
            assert!(
                rel(mu_h, ex_h) <= 1e-6,
                "hogging κ = {kappa}, δ = {delta}: μ = {mu_h}, exact {ex_h}"
            );
            // Larger flange in compression is the more stable orientation (domain notes: "a T-beam
            // whose flange is in compression is far more stable"): δ < 0 sagging beats hogging.
            if delta < 0.0 {
                assert!(
                    mu_s > mu_h,
                    "κ = {kappa}, δ = {delta}: sagging {mu_s} should exceed hogging {mu_h}"
                );
            } else {
                assert!(
                    mu_s < mu_h,
                    "κ = {kappa}, δ = {delta}: sagging {mu_s} should be below hogging {mu_h}"
                );
            }
        }
    }
}

#[test]
fn monosymmetric_reversed_direction_is_the_hogging_case() {
    // Settings{reversed} on the sagging case must give the hogging closed form (domain notes:
    // under hogging the sign of δ flips); κ = 0.8, δ = 0.25.
    let (kappa, delta) = (0.8, 0.25);
    let s = solve(
        &uniform_moment(kappa, delta, 1.0),
        &Settings {
            reversed: true,
            ..tight()
        },
    )
    .unwrap();
    let fwd = s.forward.mu_cr.unwrap();
    let rev = s.reversed.expect("reversed asked").mu_cr.unwrap();
    assert!(
        rel(fwd, mu_mono_sagging(kappa, delta)) <= 1e-6,
        "forward {fwd}"
    );
    assert!(
        rel(rev, mu_mono_sagging(kappa, -delta)) <= 1e-6,
        "reversed {rev}"
    );
}

#[test]
fn euler_column_with_forks() {
    // Timoshenko & Gere 1961 ch. 2 (Euler load π²·E·Iz/L², from memory for the section number);
    // reference-values §1 "Columns: Euler π²·E·Iz/L²". Dimensionless N̄ = π².
    for (kappa, rho) in [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0)] {
        // Set-up check: the torsional load π²(1+κ²)/rho² (infinite for rho = 0) is above π².
        assert!(rho == 0.0 || PI * PI * (1.0 + kappa * kappa) / (rho * rho) > PI * PI);
        let s = solve(&fork_column(kappa, 1.0, 0.0, rho), &tight()).unwrap();
        let f = &s.forward;
        let lf = f.load_factor.expect("column buckles");
        assert!(certified(f));
        assert!(f.mu_cr.is_none(), "no bending: μcr must be None");
        assert!(
            rel(lf, PI * PI) <= 1e-6,
            "κ = {kappa}, rho = {rho}: N = {lf}, Euler π² = {}",
            PI * PI
        );
        // Mode is pure lateral bending: no twist (z_c = 0 decouples v and φ).
        let mode = f.mode.as_ref().unwrap();
        let (vmax, pmax) = (max_abs(&mode.v), max_abs(&mode.phi));
        assert!(
            pmax <= 1e-6 * vmax,
            "Euler mode has twist: |φ|max = {pmax}, |v|max = {vmax}"
        );
    }
}

#[test]
fn torsional_column_with_forks() {
    // Reference-values §1: torsional load (G·It + π²·E·Iw/L²)/r0² (Timoshenko & Gere 1961 ch. 5,
    // from memory). In the model's units (z_c = 0, ρ̂ = rho/π): N̄ = (1 + κ²)/ρ̂² = π²(1+κ²)/rho².
    // rho is chosen so that N̄ < π² (torsion governs): rho² > 1 + κ².
    for (kappa, rho) in [(0.0, 1.6), (0.5, 2.0), (2.0, 3.0)] {
        let s = solve(&fork_column(kappa, 1.0, 0.0, rho), &tight()).unwrap();
        let f = &s.forward;
        let lf = f.load_factor.unwrap();
        let exact = PI * PI * (1.0 + kappa * kappa) / (rho * rho);
        assert!(exact < PI * PI, "test set-up: torsion must govern");
        assert!(certified(f));
        assert!(
            rel(lf, exact) <= 1e-6,
            "κ = {kappa}, rho = {rho}: N = {lf}, torsional {exact}"
        );
        let mode = f.mode.as_ref().unwrap();
        let vmax = max_abs(&mode.v);
        assert!(
            vmax <= 1e-6,
            "torsional mode must not bend: |v|max = {vmax}"
        );
    }
}

#[test]
fn flexural_torsional_column_singly_symmetric() {
    // Timoshenko & Gere 1961 ch. 5 (flexural-torsional buckling of a bar with one axis of symmetry,
    // from memory): r₀²·(N_z − N)·(N_t − N) − N²·z₀² = 0, lower root, with z₀ the distance
    // between centroid and shear centre and r₀² = ρ² + z₀² the polar radius about the shear centre.
    // Dimensionless: N_z = π², N_t = (1 + κ²)/r₀², lengths ẑc = zeta_centroid/π, ρ̂ = rho/π.
    for (kappa, zc, rho) in [(0.5, 0.8, 1.2), (1.0, -1.5, 2.0), (0.2, 2.0, 0.5)] {
        let s = solve(&fork_column(kappa, 1.0, zc, rho), &tight()).unwrap();
        let lf = s.forward.load_factor.unwrap();
        let (z, r) = (zc / PI, rho / PI);
        let r0 = r * r + z * z;
        let nz = PI * PI;
        let nt = (1.0 + kappa * kappa) / r0;
        // r0 (nz − N)(nt − N) − N² z² = 0  →  a N² + b N + c = 0
        let a = r0 - z * z;
        let b = -r0 * (nz + nt);
        let c = r0 * nz * nt;
        let exact = (-b - (b * b - 4.0 * a * c).sqrt()) / (2.0 * a);
        assert!(
            exact < nz.min(nt),
            "coupling lowers the load below both uncoupled loads"
        );
        assert!(
            rel(lf, exact) <= 1e-6,
            "κ = {kappa}, ζc = {zc}, rho = {rho}: N = {lf}, closed form {exact}"
        );
    }
}
