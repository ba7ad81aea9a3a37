//! Robustness over random members (proptest): whatever the supports,
//! restraints and loads, `solve` returns either a typed error (a mechanism or
//! bad data) or a result whose numbers are all finite, with a positive
//! factor, a non-negative error estimate and a finite mode — never a panic
//! and never a NaN (project rule: no NaN in any output; common practice, no
//! source). Where it reports a factor, the reversed solve is consistent with
//! it in sign conventions: both factors positive.

use ltb_atlas::model::{Fixity, Load, Member, Restraint, Support};
use ltb_atlas::solve::{Settings, Status, solve};
use proptest::prelude::*;

fn fixity() -> impl Strategy<Value = Fixity> {
    prop_oneof![
        Just(Fixity::Free),
        Just(Fixity::Fixed),
        (0.01f64..100.0).prop_map(Fixity::Spring)
    ]
}

fn support() -> impl Strategy<Value = Support> {
    (
        prop_oneof![
            Just(Support::FORK),
            Just(Support::BUILT_IN),
            Just(Support::FREE)
        ],
        proptest::option::of(fixity()),
        proptest::option::of(fixity()),
    )
        .prop_map(|(mut s, w, t)| {
            if let Some(w) = w {
                s.warping = w;
            }
            if let Some(t) = t {
                s.twist = t;
            }
            s
        })
}

fn load() -> impl Strategy<Value = Load> {
    prop_oneof![
        (0.0f64..=1.0, -2.0f64..2.0, -1.5f64..1.5).prop_map(|(at, fz, zeta)| Load::Point {
            at,
            fz,
            zeta
        }),
        (
            0.0f64..0.5,
            0.5f64..=1.0,
            -2.0f64..2.0,
            -2.0f64..2.0,
            -1.5f64..1.5
        )
            .prop_map(|(from, to, a, b, zeta)| Load::Distributed {
                from,
                to,
                fz_from: a,
                fz_to: b,
                zeta
            }),
    ]
}

fn restraint() -> impl Strategy<Value = Restraint> {
    (0.0f64..=1.0, -1.5f64..1.5, fixity(), fixity()).prop_map(|(at, zeta, lateral, twist)| {
        Restraint {
            at,
            zeta,
            lateral,
            twist,
        }
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn solve_never_panics_and_never_reports_nan(
        kappa in prop_oneof![Just(0.0), 0.02f64..5.0],
        start in support(),
        end in support(),
        loads in proptest::collection::vec(load(), 1..3),
        restraints in proptest::collection::vec(restraint(), 0..2),
    ) {
        let mut m = Member::new(kappa, start, end);
        m.loads = loads;
        m.restraints = restraints;
        let s = Settings { reversed: true, ..Default::default() };
        if let Ok(sol) = solve(&m, &s) {
            for d in [Some(&sol.forward), sol.reversed.as_ref()].into_iter().flatten() {
                prop_assert!(d.error_estimate.is_finite() && d.error_estimate >= 0.0);
                match d.status {
                    Status::NoBuckling => prop_assert!(d.load_factor.is_none() && d.mu_cr.is_none()),
                    _ => {
                        let l = d.load_factor.unwrap();
                        prop_assert!(l.is_finite() && l > 0.0, "factor {l}");
                        if let Some(mu) = d.mu_cr {
                            prop_assert!(mu.is_finite() && mu > 0.0);
                        }
                        let mode = d.mode.as_ref().unwrap();
                        prop_assert!(mode.v.iter().chain(&mode.phi).all(|x| x.is_finite()));
                    }
                }
                for i in &d.inertia {
                    prop_assert!(i.shift.is_finite());
                }
            }
        }
    }
}
