//! An overhang continued over a support into a backspan: the dimensionless
//! member of the whole beam built from a case that describes the overhang
//! alone.
//!
//! The case's length L is the overhang (root to tip, the reference length of
//! κ, ζ, δ and μ, as for any cantilever). A backspan of length r·L is put in
//! front of it: the far end of the backspan gets a support of its own, and
//! the case's start support becomes an intermediate support at the root.
//! The whole beam has length (1 + r)·L; with s = 1/(1 + r) every quantity of
//! the overhang case is re-expressed on the whole length so that each
//! physical quantity is unchanged:
//!
//! ```text
//! positions      x_total = r·s + s·x           (x in units of the overhang)
//! κ, ζ, δ, a     × s                           (they carry 1/L)
//! springs        lateral, vertical × (1+r)³; lateral and in-plane rotation,
//!                twist × (1+r); warping × s; continuous lateral × (1+r)⁴,
//!                continuous twist × (1+r)²
//! loads          point × (1+r)²; distributed × (1+r)³; end moments × (1+r);
//!                axial N·L²/(E·Iz) × (1+r)²
//! μ_overhang     = s · μ_total                 (μ carries L)
//! ```
//!
//! The load factor is unchanged (the loads are the same physical loads).
//! End moments of the case act at the ends of the whole beam: the far end of
//! the backspan and the tip.
//!
//! # References
//! - Dimensionless parameters: the project's domain notes (κ, ζ, δ, μ carry the
//!   reference length as 1/L, 1/L, 1/L and L).
//! - Trahair, N. S. (1993). *Flexural-Torsional Buckling of Structures*, ch. 7
//!   (cantilevers and overhanging beams: the backspan restrains the root).

use super::{ContinuousRestraint, Fixity, Load, Member, PointSupport, Restraint, Segment, Support};

/// Whether loads of the overhang continue over the backspan.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BackspanLoads {
    /// The backspan carries no load.
    None,
    /// Every distributed load that covers the whole overhang continues over
    /// the whole backspan with the same intensity (its value at the root) and
    /// height; point loads stay on the overhang.
    Continue,
}

/// The overhang fraction s = 1/(1 + r) of the whole length for a
/// backspan-to-overhang ratio r: μ in overhang units = s · μ of the whole.
pub fn overhang_fraction(ratio: f64) -> f64 {
    1.0 / (1.0 + ratio)
}

fn scale_fixity(f: Fixity, k: f64) -> Fixity {
    match f {
        Fixity::Spring(v) => Fixity::Spring(v * k),
        other => other,
    }
}

/// Scale the springs of a support. Units (domain notes): lateral and
/// vertical E·I/L³, rotations and twist E·I/L or G·It/L, warping G·It·L.
fn scale_support(s: Support, g: f64) -> Support {
    Support {
        lateral: scale_fixity(s.lateral, g.powi(3)),
        lateral_rotation: scale_fixity(s.lateral_rotation, g),
        twist: scale_fixity(s.twist, g),
        warping: scale_fixity(s.warping, 1.0 / g),
        vertical: scale_fixity(s.vertical, g.powi(3)),
        in_plane_rotation: scale_fixity(s.in_plane_rotation, g),
    }
}

/// The whole beam: a backspan of `ratio` times the overhang, ending at
/// `far` (for example a fork), in front of the overhang `m`, whose start
/// support becomes the intermediate support at the root.
pub fn with_backspan(m: &Member, ratio: f64, far: Support, loads: BackspanLoads) -> Member {
    let s = overhang_fraction(ratio);
    let g = 1.0 + ratio; // total length / overhang length
    let x0 = ratio * s; // the root
    let pos = |x: f64| x0 + s * x;
    let mut supports = vec![PointSupport {
        at: x0,
        support: scale_support(m.start, g),
    }];
    supports.extend(m.supports.iter().map(|p| PointSupport {
        at: pos(p.at),
        support: scale_support(p.support, g),
    }));
    let restraints = m
        .restraints
        .iter()
        .map(|r| Restraint {
            at: pos(r.at),
            zeta: r.zeta * s,
            lateral: scale_fixity(r.lateral, g.powi(3)),
            twist: scale_fixity(r.twist, g),
        })
        .collect();
    let continuous = m
        .continuous
        .iter()
        .map(|c| ContinuousRestraint {
            from: pos(c.from),
            to: pos(c.to),
            zeta: c.zeta * s,
            lateral: c.lateral * g.powi(4),
            twist: c.twist * g.powi(2),
        })
        .collect();
    let mut out_loads = Vec::new();
    for l in &m.loads {
        match *l {
            Load::Point { at, fz, zeta } => out_loads.push(Load::Point {
                at: pos(at),
                fz: fz * g * g,
                zeta: zeta * s,
            }),
            Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                zeta,
            } => {
                let q = g.powi(3);
                out_loads.push(Load::Distributed {
                    from: pos(from),
                    to: pos(to),
                    fz_from: fz_from * q,
                    fz_to: fz_to * q,
                    zeta: zeta * s,
                });
                if loads == BackspanLoads::Continue && from <= 0.0 && to >= 1.0 {
                    out_loads.push(Load::Distributed {
                        from: 0.0,
                        to: x0,
                        fz_from: fz_from * q,
                        fz_to: fz_from * q,
                        zeta: zeta * s,
                    });
                }
            }
            Load::EndMoments { start, end } => out_loads.push(Load::EndMoments {
                start: start * g,
                end: end * g,
            }),
        }
    }
    let segments = m
        .segments
        .iter()
        .map(|sg| Segment {
            from: pos(sg.from),
            to: pos(sg.to),
            delta: sg.delta * s,
            ..*sg
        })
        .collect();
    Member {
        kappa: m.kappa * s,
        delta: m.delta * s,
        start: scale_support(far, g),
        end: scale_support(m.end, g),
        supports,
        restraints,
        continuous,
        loads: out_loads,
        axial: m.axial.map(|a| super::Axial {
            n: a.n * g * g,
            zeta_centroid: a.zeta_centroid * s,
            rho: a.rho * s,
        }),
        segments,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::solve::{Settings, solve};
    use std::f64::consts::PI;

    fn mu_overhang(m: &Member, ratio: f64, far: Support) -> f64 {
        let whole = with_backspan(m, ratio, far, BackspanLoads::None);
        let sol = solve(&whole, &Settings::default()).unwrap();
        sol.forward.mu_cr.unwrap() * overhang_fraction(ratio)
    }

    #[test]
    fn a_fully_fixed_root_decouples_the_backspan() {
        // With every component held at the root (built-in, warping fixed) the
        // overhang is a built-in cantilever whatever the backspan: μ equals the
        // cantilever's own (a property of the model, no outside value needed);
        // the tip-load cantilever at κ = 0.1 is near Timoshenko & Gere's
        // 4.013 for κ = 0 (Theory of Elastic Stability, 1961, §6.4 — value from
        // memory, see reference-values §2).
        let m = Member::new(0.5, Support::BUILT_IN, Support::FREE).with_load(Load::Point {
            at: 1.0,
            fz: -1.0,
            zeta: 0.3,
        });
        let alone = solve(&m, &Settings::default())
            .unwrap()
            .forward
            .mu_cr
            .unwrap();
        for r in [0.5, 1.0, 3.0] {
            let mu = mu_overhang(&m, r, Support::FORK);
            assert!((mu / alone - 1.0).abs() < 3e-4, "r = {r}: {mu} vs {alone}");
        }
    }

    #[test]
    fn equal_spans_under_uniform_moment_buckle_as_single_fork_spans() {
        // Two equal spans with forks at 0, the root and the tip, under a
        // uniform moment: the antisymmetric mode sin(2πx/2L) has zero lateral
        // curvature and warping at the interior support, so each span buckles as
        // a fork-supported span: μ = π·√(1 + κ²) in overhang units
        // (Timoshenko & Gere 1961, §6.2).
        for kappa in [0.2, 1.0, 2.0] {
            // The root holds the beam out of plane only, so that the end
            // couples give a uniform moment over both spans.
            let root = Support {
                vertical: Fixity::Free,
                ..Support::FORK
            };
            let m = Member::new(kappa, root, Support::FORK).with_load(Load::EndMoments {
                start: 1.0,
                end: 1.0,
            });
            let mu = mu_overhang(&m, 1.0, Support::FORK);
            let exact = PI * (1.0 + kappa * kappa).sqrt();
            assert!(
                (mu / exact - 1.0).abs() < 2e-4,
                "κ = {kappa}: {mu} vs {exact}"
            );
        }
    }

    #[test]
    fn positions_and_parameters_map_to_the_whole_length() {
        let m = Member::new(1.0, Support::FORK, Support::FREE).with_load(Load::Point {
            at: 1.0,
            fz: -1.0,
            zeta: 0.5,
        });
        let w = with_backspan(&m, 2.0, Support::FORK, BackspanLoads::None);
        assert!((w.kappa - 1.0 / 3.0).abs() < 1e-15);
        assert!((w.supports[0].at - 2.0 / 3.0).abs() < 1e-15);
        match w.loads[0] {
            Load::Point { at, fz, zeta } => {
                assert!((at - 1.0).abs() < 1e-15);
                assert!((fz + 9.0).abs() < 1e-12);
                assert!((zeta - 0.5 / 3.0).abs() < 1e-15);
            }
            _ => panic!("a point load"),
        }
    }
}
