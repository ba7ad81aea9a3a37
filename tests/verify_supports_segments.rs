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

mod common;

use common::{cantilever_tip, factor, mu0, uniform_moment};
use ltb_atlas::model::{Fixity, Member, PointSupport, Restraint, Segment, Support};
use ltb_atlas::solve::{Settings, solve};

/// Solver settings for the closed-form checks (tolerance 1e-8, header).
fn tight() -> Settings {
    Settings {
        tolerance: 1e-8,
        ..Default::default()
    }
}

/// μ of uniform moment with a fork at midspan: each half is a fork-supported member of length
/// L/2 (κ' = 2κ), so μ = 2·μ0(2κ) = 2π·√(1 + 4κ²) (Timoshenko & Gere 1961, §6.2, per half span).
fn mu_braced_at_midspan(kappa: f64) -> f64 {
    2.0 * mu0(2.0 * kappa)
}

/// `base` with one stiffness segment over [from, to]: ratios (E·Iz, G·It, E·Iw, E·Iy), δ = 0.
fn with_segment(base: &Member, from: f64, to: f64, [eiz, git, eiw, eiy]: [f64; 4]) -> Member {
    let mut m = base.clone();
    m.segments.push(Segment {
        from,
        to,
        eiz,
        git,
        eiw,
        eiy,
        delta: 0.0,
    });
    m
}

fn mid_fork() -> Support {
    Support {
        vertical: Fixity::Free,
        ..Support::FORK
    }
}

#[test]
fn fork_at_midspan_halves_the_buckling_length() {
    let s = tight();
    for kappa in [0.1, 0.5, 1.0, 2.0] {
        let mut m = uniform_moment(kappa);
        m.supports.push(PointSupport {
            at: 0.5,
            support: mid_fork(),
        });
        let mu = solve(&m, &s).unwrap().forward.mu_cr.unwrap();
        // Timoshenko & Gere 1961, §6.2, per half span.
        let exact = mu_braced_at_midspan(kappa);
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
    let s = tight();
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
    let exact = mu_braced_at_midspan(kappa);
    assert!((mu - exact).abs() < 1e-6 * exact, "{mu} vs {exact}");
}

#[test]
fn segments_scale_and_neutral_segments_change_nothing() {
    let s = Settings::default();
    let base = cantilever_tip(0.7, 0.7);
    let (l0, e0) = factor(&base, &s);
    // All rigidities ×3 over the whole member: factor ×3.
    let (l1, e1) = factor(&with_segment(&base, 0.0, 1.0, [3.0; 4]), &s);
    assert!(
        (l1 - 3.0 * l0).abs() <= (e0 + e1) * 3.0 * l0,
        "{l1} vs {}",
        3.0 * l0
    );
    // A segment with unit ratios over part of the member: nothing changes.
    let (l2, e2) = factor(&with_segment(&base, 0.3, 0.6, [1.0; 4]), &s);
    assert!((l2 - l0).abs() <= (e0 + e2) * l0, "{l2} vs {l0}");
    // A stiffer middle segment cannot lower the factor (Rayleigh quotient:
    // K grows, Kg of a statically determinate member is unchanged).
    let (l3, _) = factor(&with_segment(&base, 0.3, 0.6, [2.0, 2.0, 2.0, 1.0]), &s);
    assert!(l3 > l0 * (1.0 + 1e-3), "{l3} vs {l0}");
}
