//! Verification by invariants: properties every correct solution has, whatever its value.
//!
//! Sources: project domain notes (functional, sign conventions, "Discretisation facts worth
//! knowing", the cantilever tip-restraint statement); Timoshenko & Gere (1961), *Theory of Elastic
//! Stability*, 2nd ed., §6.2 (uniform moment closed form, used as the exact value for the
//! convergence order); the rest is mechanics common practice, no source (linearity of the
//! eigenproblem in the loads, mirror symmetry, Rayleigh's principle for added constraints).
//!
//! Goal:
//! - loads ×c → load factor ÷c, μcr unchanged;
//! - mirroring the member end to end gives the same factor;
//! - a finer starting mesh gives the same converged factor;
//! - gravity load on the top flange < shear centre < bottom flange;
//! - a tip restraint on the top flange of a gravity-loaded cantilever raises the factor more than
//!   one on the bottom flange; at midspan of a sagging span likewise (compression flange on top);
//! - h⁴ convergence for a smooth mode;
//! - the reversed load at height ζ equals the forward load at −ζ (doubly symmetric section).
//!
//! ```text
//!   propped cantilever used for scaling / mirroring / mesh checks
//!
//!   |   P(ζ=0.4)      q(x) from 0.1 to 0.8 at ζ = −0.2        M_end
//!   |      v      v v v v v v v v v                            (
//!   |======o======================o======x=====================o
//!   |     0.3                           0.6 spring at ζ = 0.5  fork
//!   built-in
//!
//!   cantilever, tip load, tip restraint at ζr = ±κ       simple span, restraint at midspan
//!   |                         ->x ζr                      o============x============o
//!   |=========================o P (ζ = κ, gravity)       fork        ζr = ±κ       fork
//! ```
//!
//! Tolerances: scaling is exact arithmetic up to round-off (1e-9); comparisons between two
//! converged solutions use the larger of their own error estimates (each discrete factor is an
//! upper bound within its estimate of the exact one); the convergence order must lie in
//! [3.5, 4.5] (Hermite cubics: h⁴, domain notes).

mod common;

use common::{
    cantilever_tip, cantilever_uniform, certified, mu0, point, simple_span_central_point,
    simple_span_uniform, solved, uniform_moment,
};
use ltb_atlas::fe::mesh::MeshControls;
use ltb_atlas::model::{Axial, Fixity, Load, Member, Restraint, Support};
use ltb_atlas::solve::{Direction, Settings, Status, solve};

fn run(m: &Member, s: &Settings) -> Direction {
    let d = solved(m, s).forward;
    // Comparisons below use each result's own estimate, so a not-converged status (a tight
    // request below the round-off level) is acceptable if the estimate is at least as good as a
    // default solve's.
    assert!(
        certified(&d, 1e-4),
        "{:?}, estimate {:.1e}: {m:?}",
        d.status,
        d.error_estimate
    );
    d
}

fn lf(d: &Direction) -> f64 {
    d.load_factor.expect("buckles")
}

/// |a − b| within the larger relative estimate of the two (plus round-off).
fn agree(a: &Direction, b: &Direction) -> bool {
    let (la, lb) = (lf(a), lf(b));
    (la - lb).abs() <= (a.error_estimate.max(b.error_estimate) + 1e-9) * la.max(lb)
}

/// The shared propped cantilever (κ = 0.7; point load, end moment, spring at a height) plus a
/// linearly varying load from 0.1 to 0.8 at ζ = −0.2 and monosymmetry δ = 0.1 (header sketch).
fn propped_cantilever() -> Member {
    let mut m = common::propped_cantilever().with_load(Load::Distributed {
        from: 0.1,
        to: 0.8,
        fz_from: -0.5,
        fz_to: -2.0,
        zeta: -0.2,
    });
    m.delta = 0.1;
    m
}

#[test]
fn scaling_the_loads_scales_the_factor() {
    // Common practice, no source: (K + λ·c·Kg) = (K + (λc)·Kg), so λ(c·loads) = λ(loads)/c and
    // μcr = λ·max|M| is unchanged. Axial force scales with the loads too.
    let mut base = propped_cantilever();
    base.axial = Some(Axial {
        n: 0.5,
        zeta_centroid: 0.2,
        rho: 1.0,
    });
    let s = Settings::default();
    let d0 = run(&base, &s);
    for c in [3.7, 0.05] {
        let mut m = base.clone();
        for l in m.loads.iter_mut() {
            match l {
                Load::Point { fz, .. } => *fz *= c,
                Load::Distributed { fz_from, fz_to, .. } => {
                    *fz_from *= c;
                    *fz_to *= c;
                }
                Load::EndMoments { start, end } => {
                    *start *= c;
                    *end *= c;
                }
            }
        }
        m.axial.as_mut().unwrap().n *= c;
        let d = run(&m, &s);
        let r = (lf(&d) * c - lf(&d0)).abs() / lf(&d0);
        assert!(r <= 1e-9, "c = {c}: λ·c = {}, λ = {}", lf(&d) * c, lf(&d0));
        let (m1, m0) = (d.mu_cr.unwrap(), d0.mu_cr.unwrap());
        assert!((m1 - m0).abs() <= 1e-9 * m0, "c = {c}: μcr {m1} vs {m0}");
    }
}

fn mirror(m: &Member) -> Member {
    let mut r = m.clone();
    r.start = m.end;
    r.end = m.start;
    for s in r.supports.iter_mut() {
        s.at = 1.0 - s.at;
    }
    for q in r.restraints.iter_mut() {
        q.at = 1.0 - q.at;
    }
    for c in r.continuous.iter_mut() {
        (c.from, c.to) = (1.0 - c.to, 1.0 - c.from);
    }
    for g in r.segments.iter_mut() {
        (g.from, g.to) = (1.0 - g.to, 1.0 - g.from);
    }
    for l in r.loads.iter_mut() {
        match l {
            Load::Point { at, .. } => *at = 1.0 - *at,
            Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                ..
            } => {
                (*from, *to) = (1.0 - *to, 1.0 - *from);
                std::mem::swap(fz_from, fz_to);
            }
            // Sagging stays sagging: the end moments swap ends.
            Load::EndMoments { start, end } => std::mem::swap(start, end),
        }
    }
    r
}

#[test]
fn mirrored_member_has_the_same_factor() {
    // Common practice, no source: x → L − x maps the functional onto itself (v'' and φ, φ' squared
    // or paired, M(x) and the loads mirrored), so the critical factor is unchanged.
    let s = Settings {
        tolerance: 1e-6,
        ..Default::default()
    };
    let cases = [
        propped_cantilever(),
        // End moments ψ = −0.5 with monosymmetry, a warping-fixed start.
        {
            let mut st = Support::FORK;
            st.warping = Fixity::Fixed;
            let mut m = Member::new(1.2, st, Support::FORK).with_load(Load::EndMoments {
                start: 1.0,
                end: -0.5,
            });
            m.delta = -0.2;
            m
        },
        // Off-centre point load on the top flange, κ = 0.4.
        Member::new(0.4, Support::FORK, Support::FORK).with_load(point(0.25, 0.4)),
    ];
    for m in cases {
        let a = run(&m, &s);
        let b = run(&mirror(&m), &s);
        println!("mirror: {:.10} vs {:.10}", lf(&a), lf(&b));
        assert!(
            agree(&a, &b),
            "mirror changed the factor: {} vs {}\n  member {m:?}",
            lf(&a),
            lf(&b)
        );
    }
}

#[test]
fn finer_starting_mesh_gives_the_same_converged_factor() {
    // Common practice, no source: the converged value must not depend on the mesh controls.
    let s = Settings {
        tolerance: 1e-6,
        ..Default::default()
    };
    let fine = Settings {
        mesh: MeshControls {
            h_max: 0.1,
            first: 0.2,
            growth: 1.6,
        },
        ..s
    };
    let cases = [
        propped_cantilever(),
        cantilever_tip(0.15, 0.15),
        simple_span_uniform(2.0, -1.0),
    ];
    for m in cases {
        let a = run(&m, &s);
        let b = run(&m, &fine);
        println!(
            "mesh: {:.10} ({} el) vs {:.10} ({} el)",
            lf(&a),
            a.elements,
            lf(&b),
            b.elements
        );
        assert!(
            agree(&a, &b),
            "mesh changed the factor: {} vs {}\n  member {m:?}",
            lf(&a),
            lf(&b)
        );
    }
}

#[test]
fn gravity_load_height_orders_the_factor() {
    // Domain notes ("Axes and signs"): a gravity load destabilises above the shear centre; for a
    // doubly symmetric I the top flange is ζ = +κ, the bottom ζ = −κ. So on a simple span
    // λ(top) < λ(shear centre) < λ(bottom); κ = 0.3, 1, 2.
    let s = Settings::default();
    for kappa in [0.3, 1.0, 2.0] {
        // Uniform load and central point load, forks at both ends.
        let spans: [fn(f64, f64) -> Member; 2] = [simple_span_uniform, simple_span_central_point];
        for span in spans {
            let l: Vec<Direction> = [kappa, 0.0, -kappa]
                .iter()
                .map(|&z| run(&span(kappa, z), &s))
                .collect();
            let (top, sc, bot) = (lf(&l[0]), lf(&l[1]), lf(&l[2]));
            println!("κ = {kappa}: top {top:.4} < shear centre {sc:.4} < bottom {bot:.4}");
            // Domain notes, load-height rule; κ as looped.
            assert!(
                top * (1.0 + l[0].error_estimate) < sc && sc * (1.0 + l[1].error_estimate) < bot,
                "κ = {kappa}: {top}, {sc}, {bot}"
            );
        }
    }
}

/// Factors (none, top, bottom) of `base` without a restraint and with a rigid lateral restraint at
/// `at` on the top flange (ζr = +κ) and on the bottom flange (ζr = −κ), printed under `label`.
/// Asserts the two checks both restraint tests make: the top-flange restraint beats the bottom one
/// beyond its estimate (source named by each caller), and the bottom one does not lower the factor.
fn flange_restraints(label: &str, kappa: f64, base: &Member, at: f64) -> (f64, f64, f64) {
    let s = Settings::default();
    let restrained = |zr: f64| {
        base.clone().with_restraint(Restraint {
            at,
            zeta: zr,
            lateral: Fixity::Fixed,
            twist: Fixity::Free,
        })
    };
    let (none, top, bot) = (
        run(base, &s),
        run(&restrained(kappa), &s),
        run(&restrained(-kappa), &s),
    );
    println!(
        "{label} κ = {kappa}: none {:.4}, top-flange restraint {:.4}, bottom-flange restraint {:.4}",
        lf(&none),
        lf(&top),
        lf(&bot)
    );
    assert!(
        lf(&top) > lf(&bot) * (1.0 + bot.error_estimate),
        "κ = {kappa}: top {} vs bottom {}",
        lf(&top),
        lf(&bot)
    );
    // Rayleigh (common practice, no source): a restraint never lowers the factor.
    assert!(
        lf(&bot) >= lf(&none) * (1.0 - none.error_estimate),
        "κ = {kappa}: a restraint lowered the factor"
    );
    (lf(&none), lf(&top), lf(&bot))
}

#[test]
fn top_flange_tip_restraint_beats_bottom_flange_on_a_cantilever() {
    // Domain notes ("Discretisation facts"): in a cantilever under gravity load the tension (top)
    // flange at the tip moves most, so a tip restraint on the top flange is far more effective.
    // κ = 0.5 and 1, tip load on the top flange (ζ = κ), lateral restraint at the tip at ζr = ±κ.
    // Rayleigh (common practice, no source): a restraint never lowers the factor.
    for kappa in [0.5, 1.0] {
        // Top beats bottom (domain notes) and no restraint lowers the factor (Rayleigh).
        let (none, top, bot) =
            flange_restraints("cantilever", kappa, &cantilever_tip(kappa, kappa), 1.0);
        // "Far more effective": the top restraint at least doubles the gain of the bottom one.
        assert!(
            top - none > 2.0 * (bot - none),
            "κ = {kappa}: gains not far apart"
        );
    }
}

#[test]
fn top_flange_midspan_restraint_beats_bottom_flange_on_a_sagging_span() {
    // Common practice, no source (same mechanism as the domain notes' cantilever statement): under
    // sagging the top flange is in compression and moves most, so a midspan lateral restraint at
    // ζr = +κ raises the factor more than one at −κ. Uniform load at the shear centre, κ = 0.5, 1.
    for kappa in [0.5, 1.0] {
        // Top beats bottom (common practice, as above) and no restraint lowers the factor.
        flange_restraints("span", kappa, &simple_span_uniform(kappa, 0.0), 0.5);
    }
}

/// Observed orders log2(e_ℓ/e_{ℓ+1}) from a history on uniformly halved meshes.
fn orders(history: &[(usize, f64)], exact: f64) -> Vec<f64> {
    let e: Vec<f64> = history.iter().map(|&(_, l)| (l - exact) / exact).collect();
    e.windows(2).map(|w| (w[0] / w[1]).log2()).collect()
}

#[test]
fn smooth_modes_converge_as_h_to_the_fourth() {
    // Domain notes ("Discretisation facts"): Hermite cubics converge as h⁴ when the mode is smooth.
    // Uniform meshes h = 1/4, 1/8, 1/16 (h_max = 1/4, levels 0..2, tolerance 0 so every level runs).
    let s = Settings {
        tolerance: 0.0,
        max_level: 2,
        mesh: MeshControls {
            h_max: 0.25,
            ..Default::default()
        },
        ..Default::default()
    };
    // Uniform moment with forks: exact μ = π√(1+κ²) (Timoshenko & Gere 1961 §6.2); κ = 0.5, 2.
    for kappa in [0.5, 2.0] {
        let d = solve(&uniform_moment(kappa), &s).unwrap().forward;
        let h: Vec<usize> = d.history.iter().map(|x| x.0).collect();
        assert_eq!(h, vec![4, 8, 16], "uniform meshes expected");
        let p = orders(&d.history, mu0(kappa));
        println!("uniform moment κ = {kappa}: orders {p:.3?}");
        for q in p {
            assert!((3.5..=4.5).contains(&q), "κ = {kappa}: observed order {q}");
        }
    }
    // Uniform load at the shear centre with forks (smooth M, no layer); reference from a solve at
    // tolerance 1e-7 (its error is < 1 % of the 16-element error). κ = 1.
    let m = simple_span_uniform(1.0, 0.0);
    let reference = lf(&run(
        &m,
        &Settings {
            tolerance: 1e-7,
            ..Default::default()
        },
    ));
    let d = solve(&m, &s).unwrap().forward;
    let p = orders(&d.history, reference);
    println!("uniform load κ = 1: orders {p:.3?}");
    for q in p {
        assert!((3.5..=4.5).contains(&q), "uniform load: observed order {q}");
    }
}

#[test]
fn reversed_load_at_height_equals_forward_load_at_minus_height() {
    // Domain notes (signs; load-height term ½·Fz·a·φ²): reversing a gravity load at ζ gives an
    // uplift at ζ. Reflecting a doubly symmetric section top-to-bottom (z → −z, φ → −φ, M → −M)
    // turns it into a gravity load at −ζ with the same factor. Both directions must agree.
    let s = Settings {
        reversed: true,
        ..Default::default()
    };
    // Each case as a function of the sign of its heights: (ζ, −ζ) = (case(1), case(−1)).
    let cases: [fn(f64) -> Member; 3] = [
        // Cantilever, κ = 1, tip load on the top flange (ζ = +κ) vs bottom flange.
        |sign| cantilever_tip(1.0, sign * 1.0),
        // Cantilever, κ = 0.3, uniform load at ζ = 0.5 vs −0.5.
        |sign| cantilever_uniform(0.3, sign * 0.5),
        // Simple span, κ = 0.8, point load at ζ = 0.8 plus uniform load at ζ = −0.3.
        |sign| {
            Member::new(0.8, Support::FORK, Support::FORK)
                .with_load(point(0.4, sign * 0.8))
                .with_load(Load::Distributed {
                    from: 0.0,
                    to: 1.0,
                    fz_from: -0.5,
                    fz_to: -0.5,
                    zeta: sign * -0.3,
                })
        },
    ];
    for case in cases {
        let (up, down) = (case(1.0), case(-1.0));
        let a = solve(&up, &s).unwrap();
        let b = solve(&down, &s).unwrap();
        let (a_rev, b_rev) = (a.reversed.unwrap(), b.reversed.unwrap());
        for d in [&a.forward, &b.forward, &a_rev, &b_rev] {
            assert_eq!(d.status, Status::Ok);
        }
        println!(
            "reversed(ζ) {:.6} = forward(−ζ) {:.6}; reversed(−ζ) {:.6} = forward(ζ) {:.6}",
            lf(&a_rev),
            lf(&b.forward),
            lf(&b_rev),
            lf(&a.forward)
        );
        assert!(
            agree(&a_rev, &b.forward),
            "reversed at ζ {} vs forward at −ζ {}\n  member {up:?}",
            lf(&a_rev),
            lf(&b.forward)
        );
        assert!(
            agree(&b_rev, &a.forward),
            "reversed at −ζ {} vs forward at ζ {}\n  member {down:?}",
            lf(&b_rev),
            lf(&a.forward)
        );
        // And the reversal is not trivially the same number (the load height matters).
        assert!((lf(&a.forward) - lf(&a_rev)).abs() > 0.01 * lf(&a.forward));
    }
}

#[test]
fn a_reused_workspace_gives_the_same_solution_bit_for_bit() {
    // Determinism requirement (developers' guide, no source needed): a sweep worker reuses one
    // solve workspace for many cases; only storage may carry over, never values. Cases of
    // different sizes, supports and load directions are solved in sequence with one workspace
    // and compared exactly with fresh solves.
    use ltb_atlas::solve::{Workspace, solve_in};
    let reversed = Settings {
        reversed: true,
        ..Default::default()
    };
    let cases = [
        (common::cantilever_tip(0.05, 0.8), Settings::default()),
        (common::simple_span_uniform(2.0, -0.5), reversed),
        (common::propped_cantilever(), reversed),
        (common::cantilever_uniform(0.3, 0.0), Settings::default()),
        (common::fork_column(0.7, 1.0, 0.2, 1.3), Settings::default()),
        (
            common::simple_span_central_point(0.02, 1.0),
            Settings::default(),
        ),
    ];
    let mut ws = Workspace::new();
    for round in 0..2 {
        for (i, (m, s)) in cases.iter().enumerate() {
            let fresh = ltb_atlas::solve::solve(m, s).unwrap();
            let reused = solve_in(&mut ws, m, s).unwrap();
            assert_eq!(fresh, reused, "case {i}, round {round}");
        }
    }
}

#[test]
fn soft_springs_are_not_mechanisms_and_too_soft_ones_are_named() {
    // Issue contract ("a soft spring is not a mechanism"); Rayleigh's principle (a softer support
    // cannot raise the lowest critical factor), common practice, no source; statics for the
    // cantilever root (the moments of a cantilever do not depend on its root's in-plane springs).
    let span = |f: Fixity| {
        let mut s = Support::FORK;
        s.twist = f;
        s.lateral = f;
        Member::new(0.5, s, s).with_load(common::udl(0.0))
    };
    let fixed = common::factor(&span(Fixity::Fixed), &Settings::default()).0;
    for k in [1e-6, 1e-3, 1.0] {
        let sol = solve(&span(Fixity::Spring(k)), &Settings::default())
            .unwrap_or_else(|e| panic!("spring {k:e} refused: {e}"));
        let lf = sol.forward.load_factor.expect("a factor");
        assert!(
            lf > 0.0 && lf < fixed,
            "spring {k:e}: {lf} vs fixed {fixed}"
        );
    }
    // In plane: a cantilever root on soft vertical and rotational springs carries the same moments.
    let cantilever = |f: Fixity| {
        let mut m = common::cantilever_tip(0.8, 0.3);
        m.start.vertical = f;
        m.start.in_plane_rotation = f;
        m
    };
    let held = solve(&cantilever(Fixity::Fixed), &Settings::default()).unwrap();
    let soft = solve(&cantilever(Fixity::Spring(1e-4)), &Settings::default()).unwrap();
    let (a, b) = (held.forward.mu_cr.unwrap(), soft.forward.mu_cr.unwrap());
    assert!(
        (a - b).abs() <= 1e-6 * a,
        "in-plane springs changed μcr: {a} vs {b}"
    );
    // Too soft to resolve: refused, naming the spring rather than a missing restraint.
    let e = solve(&cantilever(Fixity::Spring(1e-14)), &Settings::default()).unwrap_err();
    assert!(e.to_string().contains("`vertical` = 1e-14"), "{e}");
    let e = solve(&span(Fixity::Spring(1e-16)), &Settings::default()).unwrap_err();
    assert!(e.to_string().contains("`twist` = 1e-16"), "{e}");
}
