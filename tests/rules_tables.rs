//! The tabulated values of the rule library reproduce their published values and agree with the
//! engine where they should (values typed from memory are checked here before they ship).
//!
//! Sources:
//! - NCCI SN003a-EN-EU (Access Steel), Table 3.1 (end moments, k = kw = 1) and Table 3.2
//!   (transverse loads, k = 1), values as listed in the project's reference-values §3; the ψ = −1
//!   C1 (2.55) and the C2 of the fixed-end uniform load (1.554) from memory.
//! - ENV 1993-1-1:1992 Annex F, Table F.1.2: C1 1.132 (uniform) and 1.365 (central point) as listed
//!   in reference-values §3, which says they match the large-κ values.
//! - AS 4100-1998, Tables 5.6.1, 5.6.2, 5.6.3(2), 5.6.3(3): every value from memory.
//!
//! ```text
//!   end moments            uniform load            central point        cantilever, tip / uniform
//!   M (==========) ψM      o==v=v=v=v=v==o          o=====v=====o        |==========v   |=v=v=v=v=v
//! ```

mod common;

use common::{
    cantilever_tip, cantilever_uniform, fork_major_axis_fixed, mu0, point,
    simple_span_central_point, simple_span_uniform, solved, udl,
};
use ltb_atlas::model::{Fixity, Load, Member, Support};
use ltb_atlas::rules::as4100::{As4100, alpha_m_end_moments, alpha_m_formula};
use ltb_atlas::rules::{Outcome, Rule};
use ltb_atlas::solve::Settings;
use std::f64::consts::PI;

fn fe(m: &Member) -> f64 {
    let s = solved(
        m,
        &Settings {
            tolerance: 1e-6,
            ..Default::default()
        },
    );
    s.forward.mu_cr.expect("buckles")
}

fn rule(name: &str, m: &Member) -> Outcome {
    Rule::built_in(name).expect("built-in").evaluate(m)
}

fn mu(name: &str, m: &Member) -> f64 {
    match rule(name, m) {
        Outcome::Applies { mu, .. } => mu,
        Outcome::NotApplicable(r) => panic!("{name} not applicable: {r}"),
    }
}

fn end_moments(kappa: f64, psi: f64) -> Member {
    Member::new(kappa, Support::FORK, Support::FORK).with_load(Load::EndMoments {
        start: 1.0,
        end: psi,
    })
}

#[test]
fn sn003_table_3_1_c1_matches_the_small_kappa_limit() {
    // NCCI SN003 Table 3.1 (k = kw = 1), ψ = −1 from memory. The tables represent κ → 0
    // (reference-values §3: within 0.2 %); two decimals add up to 0.2 % → 0.4 % band at κ = 0.01.
    let table = [
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
    for (psi, c1) in table {
        let m = end_moments(0.01, psi);
        let rule_mu = mu("three-factor", &m);
        // The rule prints the tabulated C1 (no κ dependence).
        assert!((rule_mu / mu0(0.01) - c1).abs() < 1e-12, "psi {psi}");
        let r = rule_mu / fe(&m);
        assert!((r - 1.0).abs() < 4e-3, "psi {psi}: rule/FE = {r}");
    }
    // ψ between tabulated values: no interpolation, not applicable.
    assert!(matches!(
        rule("three-factor", &end_moments(0.5, 0.6)),
        Outcome::NotApplicable(_)
    ));
}

#[test]
fn sn003_table_3_2_c1_and_c2() {
    // NCCI SN003 Table 3.2 (k = 1), C1 at the κ → 0 limit within 0.3 % (reference-values §3).
    let fx = fork_major_axis_fixed();
    let cases = [
        (simple_span_uniform(0.05, 0.0), 1.127),
        (simple_span_central_point(0.05, 0.0), 1.348),
        (Member::new(0.05, fx, fx).with_load(udl(0.0)), 2.578),
        (Member::new(0.05, fx, fx).with_load(point(0.5, 0.0)), 1.683),
    ];
    for (m, c1) in &cases {
        let r = mu("three-factor", m) / fe(m);
        assert!((r - 1.0).abs() < 3e-3, "C1 {c1}: rule/FE = {r}");
    }
    // C2 = 0.454 (uniform load, listed) and 1.554 (fixed-end uniform load, from memory): the
    // engine's C2, by inverting the three-factor formula with the engine's own C1 at small κ
    // (domain notes: C2·ζ = (1 + κ² − ρ²)/(2ρ), ρ = μ/(C1·π)), within 1 % (reference-values §3
    // for 0.454; the same band is required of the value from memory before it ships).
    for (m0, m, c2) in [
        (
            simple_span_uniform(0.1, 0.0),
            simple_span_uniform(0.1, 0.5),
            0.454,
        ),
        (
            Member::new(0.1, fx, fx).with_load(udl(0.0)),
            Member::new(0.1, fx, fx).with_load(udl(0.5)),
            1.554,
        ),
    ] {
        let c1 = fe(&m0) / mu0(0.1);
        let rho = fe(&m) / (c1 * PI);
        let c2_fe = (1.0 + 0.01 - rho * rho) / (2.0 * rho) / 0.5;
        assert!((c2_fe / c2 - 1.0).abs() < 0.01, "C2 {c2}: engine {c2_fe}");
    }
}

#[test]
fn env_annex_f_values_match_the_large_kappa_limit_and_need_c2_off_the_shear_centre() {
    // ENV 1993-1-1 Annex F (k = 1): C1 1.132 (uniform load) / 1.365 (central point load), as
    // listed in the project's reference notes (reference-values §3, which records them as the
    // document's values and says they match the large-κ values); not re-read from the document
    // here. Asserted only at large κ (3), within 0.2 %, where the notes say they hold.
    for m in [
        simple_span_uniform(3.0, 0.0),
        simple_span_central_point(3.0, 0.0),
    ] {
        let r = mu("three-factor-env", &m) / fe(&m);
        assert!((r - 1.0).abs() < 2e-3, "{r}");
    }
    // No C2 could be cited: ζ ≠ 0 is not applicable, and so are end moments.
    assert!(matches!(
        rule("three-factor-env", &simple_span_uniform(1.0, 1.0)),
        Outcome::NotApplicable(_)
    ));
    assert!(matches!(
        rule("three-factor-env", &end_moments(1.0, 1.0)),
        Outcome::NotApplicable(_)
    ));
}

#[test]
fn as4100_alpha_m_formula_and_tables() {
    // Eq. 5.6.1.1(2) as arithmetic: uniform load (M2 = M4 = 0.75, M3 = 1) → 1.7/√2.125 = 1.1662;
    // central point (0.5, 1, 0.5) → 1.7/√1.5 = 1.3880; uniform moment → 1.7/√3 = 0.9815; the cap 2.5.
    assert!((alpha_m_formula(1.0, 0.75, 1.0, 0.75) - 1.7 / 2.125f64.sqrt()).abs() < 1e-12);
    assert!((alpha_m_formula(1.0, 0.5, 1.0, 0.5) - 1.388_0).abs() < 1e-4);
    assert!((alpha_m_formula(1.0, 0.0, 0.1, 0.0) - 2.5).abs() < 1e-12);
    // Table 5.6.1 end-moment formula (memory): βm = −1 (uniform moment) → 1.0; βm = 0 → 1.75.
    assert!((alpha_m_end_moments(1.0) - 1.0).abs() < 1e-12);
    assert!((alpha_m_end_moments(0.0) - 1.75).abs() < 1e-12);
    assert!((alpha_m_end_moments(-1.0) - 2.5).abs() < 1e-12);
    // Memory values against the engine's C1 at κ → 0 (SN003-listed limits within 0.3 %):
    // 1.13 (uniform), 1.35 (central point) within 0.5 %; the end-moment formula within 1.5 % of
    // the engine for 1 ≥ ψ ≥ −0.5 (it is a fit of the same curve; ψ < −0.5 reaches the cap).
    let t = As4100::new();
    for (m, a) in [
        (
            simple_span_uniform(0.01, 0.0),
            t.value("alpha_m", "uniform-simple"),
        ),
        (
            simple_span_central_point(0.01, 0.0),
            t.value("alpha_m", "point-mid-simple"),
        ),
    ] {
        let c1 = fe(&m) / mu0(0.01);
        assert!((a / c1 - 1.0).abs() < 5e-3, "alpha_m {a} against C1 {c1}");
    }
    for psi in [1.0, 0.5, 0.0, -0.5] {
        let m = end_moments(0.01, psi);
        let c1 = fe(&m) / mu0(0.01);
        let a = alpha_m_end_moments(psi);
        assert!((a / c1 - 1.0).abs() < 0.015, "psi {psi}: {a} against {c1}");
    }
}

#[test]
fn as4100_memory_factors_are_on_the_safe_side_where_the_literature_says() {
    // reference-values §4: AS 4100's cantilever rules (kl = 2) are conservative by 12–54 % for a
    // built-in (warping-fixed) cantilever with a top-flange tip load. Checked here over κ 0.2–3
    // for the tip and the uniform load, top flange and shear centre: every ratio below 1.
    for k in [0.2, 0.5, 1.0, 2.0, 3.0] {
        for m in [
            cantilever_tip(k, k),
            cantilever_tip(k, 0.0),
            cantilever_uniform(k, k),
            cantilever_uniform(k, 0.0),
        ] {
            let r = mu("as4100", &m) / fe(&m);
            assert!(r < 1.0, "kappa {k}: {r}");
        }
        // The 12–54 % band (ratio 0.46–0.88, ±0.01) for the κ range the literature value covers
        // (κ ≤ 2; at κ = 3 the ratio is nearer 1).
        let r = mu("as4100", &cantilever_tip(k, k)) / fe(&cantilever_tip(k, k));
        if k <= 2.0 {
            assert!(
                (0.45..=0.89).contains(&r),
                "kappa {k}: top-flange tip ratio {r}"
            );
        }
    }
    // kr (0.85, 0.7) and kl = 1.4 (memory) with lateral rotation held at the ends / top-flange
    // loads on a simple span: conservative against the engine at κ = 0.5, 1, 2.
    let mut lr = Support::FORK;
    lr.lateral_rotation = Fixity::Fixed;
    for k in [0.5, 1.0, 2.0] {
        for m in [
            Member::new(k, lr, lr).with_load(Load::EndMoments {
                start: 1.0,
                end: 1.0,
            }),
            Member::new(k, lr, Support::FORK).with_load(Load::EndMoments {
                start: 1.0,
                end: 1.0,
            }),
            simple_span_uniform(k, k),
            simple_span_central_point(k, k),
        ] {
            let r = mu("as4100", &m) / fe(&m);
            assert!(r < 1.0, "kappa {k}: {r}");
        }
    }
}
