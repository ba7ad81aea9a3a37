//! Verification of the "no buckling" outcome and of the refusal of an ambiguous load.
//!
//! Sources:
//! - Project domain notes, "Discretisation facts": "A load pattern can have no positive critical
//!   factor (all stabilising); report that plainly." Energy functional: the axial term
//!   −½∫N·[(v' + zs·φ')² + ((Iy+Iz)/A)·φ'²] is positive for tension (N < 0), so tension only
//!   stiffens; with compression the same member is an Euler column, N̄ = π² (Timoshenko & Gere
//!   1961, *Theory of Elastic Stability*, 2nd ed., ch. 2, section from memory).
//! - Domain notes, "Energy functional" and reference-values §5 (traps): a couple at a free end is
//!   ambiguous and must be refused until a moment type is chosen.
//!
//! Goal: a member in pure tension returns Status::NoBuckling with no factor and no μcr, proven by an
//! inertia count of zero; its reversed load (compression) buckles at π²; a tip couple on a
//! cantilever is refused with a model error.
//!
//! ```text
//!   <-- T  o===========================o  T -->        |==========================o )  M
//!        fork                        fork              built-in               free tip
//! ```
//!
//! Tolerance: π² to 1e-6 (reference-values §1, closed forms on a converged model; solved with
//! tolerance 1e-7).

mod common;

use common::fork_column;
use ltb_atlas::model::{Load, Member, Support};
use ltb_atlas::solve::{Settings, SolveError, Status, solve};
use std::f64::consts::PI;

#[test]
fn pure_tension_does_not_buckle() {
    for (kappa, zc, rho) in [(0.0, 0.0, 0.0), (1.0, 0.0, 1.0), (0.5, 0.7, 1.5)] {
        let s = solve(
            &fork_column(kappa, -1.0, zc, rho),
            &Settings {
                tolerance: 1e-7,
                reversed: true,
                ..Default::default()
            },
        )
        .expect("solve");
        let f = &s.forward;
        // Domain notes: an all-stabilising pattern is reported plainly.
        assert_eq!(
            f.status,
            Status::NoBuckling,
            "tension, κ = {kappa}, ζc = {zc}, rho = {rho}"
        );
        assert!(f.load_factor.is_none() && f.mu_cr.is_none());
        assert!(f.mode.is_none());
        // Domain notes: the count of negative pivots at a factor is the number of critical factors
        // below it; "no buckling" must be proven by a count of zero.
        assert!(
            !f.inertia.is_empty() && f.inertia.iter().all(|i| i.negative == 0),
            "inertia {:?}",
            f.inertia
        );
        // Reversed: compression N̄ = 1 per unit factor. Euler π² when flexure governs (ζc = 0 and a
        // torsional load π²(1+κ²)/rho² ≥ π²); otherwise lower.
        let r = s.reversed.expect("reversed asked");
        assert!(
            r.status != Status::NoBuckling && r.error_estimate <= 1e-6,
            "{:?}",
            r.status
        );
        let lr = r.load_factor.unwrap();
        if zc == 0.0 {
            // Timoshenko & Gere 1961 ch. 2, Euler load π² (κ and rho as looped; torsional load
            // π²(1+κ²)/rho² = 2π² > π² for (1, 1)).
            assert!(
                (lr - PI * PI).abs() <= 1e-6 * PI * PI,
                "reversed (compression): {lr}, Euler π²"
            );
        } else {
            assert!(
                lr < PI * PI,
                "flexural-torsional coupling must lower the load below π²: {lr}"
            );
        }
    }
}

#[test]
fn couple_at_a_free_end_is_refused() {
    // Domain notes ("Energy functional", last paragraph) and reference-values §5: refuse end
    // moments at a free end until a moment type is chosen. Cantilever, κ = 1, tip couple.
    let m = Member::new(1.0, Support::BUILT_IN, Support::FREE).with_load(Load::EndMoments {
        start: 0.0,
        end: 1.0,
    });
    match solve(&m, &Settings::default()) {
        Err(SolveError::Model(e)) => {
            assert!(e.field.contains("end"), "error should name the end: {e}")
        }
        other => panic!("a tip couple must be refused, got {other:?}"),
    }
}
