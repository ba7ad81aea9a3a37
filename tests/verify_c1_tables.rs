//! Verification of the three-factor coefficients C1 and C2 against published tables.
//!
//! Source: NCCI SN003, "Elastic critical moment for lateral torsional buckling" (Access Steel),
//! Table 3.1 (end moments, k = kw = 1) and Table 3.2 (transverse loads, k = 1), as listed in the
//! project's reference-values §3 (ψ = −1 entry from memory). Conversion at the boundary: the NCCI
//! tabulates C1 with Mcr = C1·π²·E·Iz/L²·√(Iw/Iz + L²·G·It/(π²·E·Iz)), which in the project's
//! parameters is μcr = C1·μ0, μ0 = π·√(1 + κ²) (domain notes, three-factor form with kz = kw = 1);
//! so C1 = mu_cr/μ0 with mu_cr taken at the largest |M| (reference-values §3).
//! C2 follows from a ζ ≠ 0 solve by inverting the three-factor formula (domain notes)
//!
//! ```text
//! μcr = C1·π·[√(1 + κ² + (C2·ζ)²) − C2·ζ]
//! r = μcr/(C1·π)  →  C2·ζ = (1 + κ² − r²)/(2·r)
//! ```
//!
//! Goal: C1 in the κ → 0 limit the tables represent, and the rise of C1 with κ that reference-values
//! §3 describes; C2 = 0.454 for the uniform load. C2 = 0.630 (central point) and 1.645 (fixed-end
//! point) are NOT asserted (reference-values §3: they hold only in the small-κ, large-ζ corner).
//!
//! ```text
//!   end moments                 uniform load q                 central point load P
//!   M=1 (            ) M=ψ      q q q q q q q q                        P
//!      o============o           o==============o             o=======v=======o
//!    fork          fork        fork (or fork with           fork (or fork with
//!                               major-axis rotation fixed)   major-axis rotation fixed)
//! ```
//!
//! Tolerances: C1 within 0.3 % (reference-values §3: Table 3.1 equals the κ → 0 limit within 0.2 %,
//! Table 3.2 within 0.3 %; 0.2 % is also half a unit of Table 3.1's two decimals at C1 ≈ 2.5). C2
//! within 1 % (reference-values §3). All solves at tolerance 1e-6 so that the solver's own error
//! (estimate ≤ 1e-5 required) is negligible against these bands.

mod common;

use common::{
    fork_major_axis_fixed, mu0, point, rel_diff, simple_span_central_point, simple_span_uniform,
    solved, udl,
};
use ltb_atlas::model::{Load, Member, Support};
use ltb_atlas::solve::{Direction, Settings};
use std::f64::consts::PI;

fn settings() -> Settings {
    Settings {
        tolerance: 1e-6,
        ..Default::default()
    }
}

fn mu_cr(m: &Member) -> f64 {
    let s = solved(m, &settings());
    assert!(
        certified(&s.forward),
        "{:?}, estimate {:.1e}: {m:?}",
        s.forward.status,
        s.forward.error_estimate
    );
    s.forward.mu_cr.expect("buckles")
}

/// Good enough for the 0.3 % / 1 % bands: a factor with an estimate ≤ 1e-5 (status Ok, or
/// not-converged where the 1e-6 request is below the solver's round-off level).
fn certified(d: &Direction) -> bool {
    common::certified(d, 1e-5)
}

fn end_moments(kappa: f64, psi: f64) -> Member {
    Member::new(kappa, Support::FORK, Support::FORK).with_load(Load::EndMoments {
        start: 1.0,
        end: psi,
    })
}

/// Print a computed C1 against the published one and assert it within the relative `tol`.
/// `what` names the table row and κ; the source is named where this is called.
fn assert_c1(what: &str, c1: f64, c1_pub: f64, tol: f64) {
    let r = rel_diff(c1, c1_pub);
    println!(
        "{what}: C1 = {c1:.4}, NCCI {c1_pub}, diff {:+.2} %",
        100.0 * r
    );
    assert!(r.abs() <= tol, "{what}: C1 = {c1}, NCCI {c1_pub}");
}

/// NCCI SN003 Table 3.1 (k = kw = 1): ψ and C1; ψ = −1 from memory (reference-values §3).
const TABLE_3_1: [(f64, f64); 9] = [
    (1.0, 1.00),
    (0.75, 1.14),
    (0.5, 1.31),
    (0.25, 1.52),
    (0.0, 1.77),
    (-0.25, 2.05),
    (-0.5, 2.33),
    (-0.75, 2.57),
    (-1.0, 2.55),
];

#[test]
fn c1_end_moments_table_3_1_small_kappa() {
    // The table is the κ → 0 limit (reference-values §3); κ = 0.02 sits in that limit (C1 moves
    // by less than 0.03 % between κ = 0 and 0.02 for every ψ). At κ = 0.1 the reverse-curvature
    // entries are already 0.6–0.9 % higher, as reference-values §3 predicts ("C1 rises with κ"),
    // which the next test checks separately.
    let kappa = 0.02;
    for (psi, c1_pub) in TABLE_3_1 {
        let c1 = mu_cr(&end_moments(kappa, psi)) / mu0(kappa);
        // NCCI SN003 Table 3.1 (ψ = −1: memory), κ = 0.02, within 0.3 %.
        assert_c1(
            &format!("Table 3.1 ψ = {psi:+.2}, κ = {kappa}"),
            c1,
            c1_pub,
            0.003,
        );
    }
}

#[test]
fn c1_end_moments_rises_with_kappa_by_up_to_twelve_percent() {
    // Reference-values §3 on NCCI SN003 Table 3.1: "C1 rises with κ, by up to 12 % at κ = 2".
    // Checked: C1(κ) non-decreasing over κ = 0.02, 0.5, 1, 2 for every ψ, and the largest rise at
    // κ = 2 rounds to 12 % (11.5 % … 12.5 %).
    let kappas = [0.02, 0.5, 1.0, 2.0];
    let mut max_rise = (0.0_f64, 0.0);
    for (psi, _) in TABLE_3_1 {
        let c1: Vec<f64> = kappas
            .iter()
            .map(|&k| mu_cr(&end_moments(k, psi)) / mu0(k))
            .collect();
        for w in c1.windows(2) {
            // Reference-values §3: C1 rises with κ (ψ as looped; κ = 0.02 → 2).
            assert!(
                w[1] >= w[0] * (1.0 - 1e-6),
                "ψ = {psi}: C1 over κ {kappas:?} = {c1:?} is not rising"
            );
        }
        let rise = c1[3] / c1[0] - 1.0;
        println!(
            "ψ = {psi:+.2}: C1 at κ = 0.02, 0.5, 1, 2 = {c1:.4?}, rise {:.1} %",
            100.0 * rise
        );
        if rise > max_rise.0 {
            max_rise = (rise, psi);
        }
    }
    // Reference-values §3: "by up to 12 % at κ = 2" (κ = 2 vs κ = 0.02).
    assert!(
        (0.115..0.125).contains(&max_rise.0),
        "largest rise {:.2} % at ψ = {}",
        100.0 * max_rise.0,
        max_rise.1
    );
}

#[test]
fn c1_transverse_loads_table_3_2_small_kappa() {
    // NCCI SN003 Table 3.2 (k = 1), loads at the shear centre (ζ = 0), κ → 0 values within 0.3 %
    // (reference-values §3). Asserted for κ = 0.02, 0.05 and 0.1.
    for kappa in [0.02, 0.05, 0.1] {
        let cases = [
            // Table 3.2: uniform load, forks, C1 = 1.127.
            (
                simple_span_uniform(kappa, 0.0),
                1.127,
                0.125,
                "uniform, forks",
            ),
            // Table 3.2: central point load, forks, C1 = 1.348.
            (
                simple_span_central_point(kappa, 0.0),
                1.348,
                0.25,
                "central point, forks",
            ),
            // Table 3.2: uniform load, major-axis fixed ends, C1 = 2.578 (largest |M| = qL²/12 at the ends).
            (
                Member::new(kappa, fork_major_axis_fixed(), fork_major_axis_fixed())
                    .with_load(udl(0.0)),
                2.578,
                1.0 / 12.0,
                "uniform, fixed ends",
            ),
            // Table 3.2: central point load, major-axis fixed ends, C1 = 1.683 (largest |M| = PL/8).
            (
                Member::new(kappa, fork_major_axis_fixed(), fork_major_axis_fixed())
                    .with_load(point(0.5, 0.0)),
                1.683,
                0.125,
                "central point, fixed ends",
            ),
        ];
        for (m, c1_pub, m_max, label) in cases {
            let s = solved(&m, &settings());
            assert!(
                certified(&s.forward),
                "{label}, κ = {kappa}: {:?}",
                s.forward.status
            );
            // Largest |M| under the unit load: statics / standard beam tables (qL²/8, PL/4, qL²/12, PL/8).
            assert!(
                (s.m_max.0 - m_max).abs() <= 1e-12,
                "{label}: max|M| = {}, expected {m_max}",
                s.m_max.0
            );
            let c1 = s.forward.mu_cr.unwrap() / mu0(kappa);
            // NCCI SN003 Table 3.2, κ as looped, within 0.3 %.
            assert_c1(
                &format!("Table 3.2 {label}, κ = {kappa}"),
                c1,
                c1_pub,
                0.003,
            );
        }
    }
}

/// C2 from one solve at load height ζ (gravity), given C1 at the same κ (three-factor form).
fn c2_from(kappa: f64, c1: f64, mu: f64, zeta: f64) -> f64 {
    let r = mu / (c1 * PI);
    (1.0 + kappa * kappa - r * r) / (2.0 * r) / zeta
}

#[test]
fn c2_uniform_load_table_3_2_small_kappa() {
    // NCCI SN003 Table 3.2, uniform load with forks: C2 = 0.454, agreeing within 1 % at small κ
    // (reference-values §3). C2 is derived from ζ = −0.5, +0.5 and +1 (gravity load below and
    // above the shear centre) at κ = 0.02 and 0.1. Further away the single published C2 fits less
    // well (printed, not asserted: ζ = −1 gives about 0.447, ζ = −2 about 0.439 at κ ≤ 0.1).
    for kappa in [0.02, 0.1] {
        let c1 = mu_cr(&simple_span_uniform(kappa, 0.0)) / mu0(kappa);
        for zeta in [-0.5, 0.5, 1.0] {
            let mu = mu_cr(&simple_span_uniform(kappa, zeta));
            let c2 = c2_from(kappa, c1, mu, zeta);
            let r = rel_diff(c2, 0.454);
            println!(
                "C2 uniform, κ = {kappa}, ζ = {zeta:+}: C2 = {c2:.4}, NCCI 0.454, diff {:+.2} %",
                100.0 * r
            );
            // NCCI SN003 Table 3.2, C2 = 0.454 (uniform load, k = 1), κ and ζ as looped, within 1 %.
            assert!(
                r.abs() <= 0.01,
                "κ = {kappa}, ζ = {zeta}: C2 = {c2}, NCCI 0.454"
            );
        }
        for zeta in [-2.0, -1.0, 2.0] {
            let mu = mu_cr(&simple_span_uniform(kappa, zeta));
            println!(
                "  (not asserted) κ = {kappa}, ζ = {zeta:+}: C2 = {:.4}",
                c2_from(kappa, c1, mu, zeta)
            );
        }
    }
}
