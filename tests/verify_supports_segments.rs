//! Intermediate supports, point restraints and stiffness segments against
//! closed forms.
//!
//! Source: uniform moment with forks, μ = π·√(1 + κ²) (Timoshenko & Gere
//! 1961, Theory of Elastic Stability, §6.2), applied to each braced segment:
//! a fork (lateral and twist held) at midspan makes each half a fork-supported
//! member of length L/2, so κ' = 2κ and
//!
//! ```text
//! μ = Mcr·L/√(EIz·GIt) = 2π·√(1 + 4κ²)
//! ```
//!
//! ```text
//!   M ( ==========+========== ) M      forks at 0, L/2 (out of plane only) and L
//! ```
//!
//! Segments: scaling every rigidity of the whole member by c scales the
//! critical factor by c (the elastic matrix scales, the pre-buckling moment of
//! a statically determinate member does not; linearity of the eigenproblem,
//! domain notes). A segment whose ratios are all 1 changes nothing.
//! Tolerance: 1e-6 relative at solver tolerance 1e-8 (closed forms), and the
//! sum of the two error estimates for the invariants.

use ltb_atlas::model::{Fixity, Load, Member, PointSupport, Restraint, Segment, Support};
use ltb_atlas::solve::{Settings, solve};
use std::f64::consts::PI;

fn uniform_moment(kappa: f64) -> Member {
    Member::new(kappa, Support::FORK, Support::FORK).with_load(Load::EndMoments {
        start: 1.0,
        end: 1.0,
    })
}

fn mid_fork() -> Support {
    Support {
        vertical: Fixity::Free,
        ..Support::FORK
    }
}

#[test]
fn fork_at_midspan_halves_the_buckling_length() {
    let s = Settings {
        tolerance: 1e-8,
        ..Default::default()
    };
    for kappa in [0.1, 0.5, 1.0, 2.0] {
        let mut m = uniform_moment(kappa);
        m.supports.push(PointSupport {
            at: 0.5,
            support: mid_fork(),
        });
        let mu = solve(&m, &s).unwrap().forward.mu_cr.unwrap();
        // Timoshenko & Gere 1961, §6.2, per half span.
        let exact = 2.0 * PI * (1.0 + 4.0 * kappa * kappa).sqrt();
        assert!(
            (mu - exact).abs() < 1e-6 * exact,
            "κ = {kappa}: {mu} vs {exact}"
        );
    }
}

#[test]
fn restraints_at_two_heights_act_as_a_fork() {
    // Lateral restraints at ζ = +κ and −κ at one point hold both v and φ
    // there: the same as a fork at midspan (same closed form).
    let s = Settings {
        tolerance: 1e-8,
        ..Default::default()
    };
    let kappa = 0.8;
    let mut m = uniform_moment(kappa);
    for z in [kappa, -kappa] {
        m.restraints.push(Restraint {
            at: 0.5,
            zeta: z,
            lateral: Fixity::Fixed,
            twist: Fixity::Free,
        });
    }
    let mu = solve(&m, &s).unwrap().forward.mu_cr.unwrap();
    let exact = 2.0 * PI * (1.0 + 4.0 * kappa * kappa).sqrt();
    assert!((mu - exact).abs() < 1e-6 * exact, "{mu} vs {exact}");
}

#[test]
fn segments_scale_and_neutral_segments_change_nothing() {
    let s = Settings::default();
    let base = Member::new(0.7, Support::BUILT_IN, Support::FREE).with_load(Load::Point {
        at: 1.0,
        fz: -1.0,
        zeta: 0.7,
    });
    let r0 = solve(&base, &s).unwrap().forward;
    // All rigidities ×3 over the whole member: factor ×3.
    let mut scaled = base.clone();
    scaled.segments.push(Segment {
        from: 0.0,
        to: 1.0,
        eiz: 3.0,
        git: 3.0,
        eiw: 3.0,
        eiy: 3.0,
        delta: 0.0,
    });
    let r1 = solve(&scaled, &s).unwrap().forward;
    let (l0, l1) = (r0.load_factor.unwrap(), r1.load_factor.unwrap());
    assert!(
        (l1 - 3.0 * l0).abs() <= (r0.error_estimate + r1.error_estimate) * 3.0 * l0,
        "{l1} vs {}",
        3.0 * l0
    );
    // A segment with unit ratios over part of the member: nothing changes.
    let mut neutral = base.clone();
    neutral.segments.push(Segment {
        from: 0.3,
        to: 0.6,
        eiz: 1.0,
        git: 1.0,
        eiw: 1.0,
        eiy: 1.0,
        delta: 0.0,
    });
    let r2 = solve(&neutral, &s).unwrap().forward;
    let l2 = r2.load_factor.unwrap();
    assert!(
        (l2 - l0).abs() <= (r0.error_estimate + r2.error_estimate) * l0,
        "{l2} vs {l0}"
    );
    // A stiffer middle segment cannot lower the factor (Rayleigh quotient:
    // K grows, Kg of a statically determinate member is unchanged).
    let mut stiff = base.clone();
    stiff.segments.push(Segment {
        from: 0.3,
        to: 0.6,
        eiz: 2.0,
        git: 2.0,
        eiw: 2.0,
        eiy: 1.0,
        delta: 0.0,
    });
    let l3 = solve(&stiff, &s).unwrap().forward.load_factor.unwrap();
    assert!(l3 > l0 * (1.0 + 1e-3), "{l3} vs {l0}");
}
