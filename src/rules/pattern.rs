//! What a code rule needs to know about a member: its support system, the
//! shape of its load pattern, the height of the loads (on the destabilising
//! side positive) and the in-plane moment diagram.
//!
//! Rules cover prismatic, doubly symmetric members without intermediate
//! supports or restraints; everything else is classified as "not covered"
//! with the reason, so that a rule never extrapolates silently.

use crate::fe::inplane::{MomentField, moments};
use crate::fe::mesh::key_points;
use crate::model::{Fixity, Load, Member, Support};

/// How the member is held.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Span {
    /// Both ends hold lateral displacement and twist (at least forks).
    Beam {
        /// Lateral rotation (v') held at the start and at the end.
        lateral_rotation_fixed: [bool; 2],
        /// Warping (φ') held at the start and at the end.
        warping_fixed: [bool; 2],
        /// In-plane end conditions.
        in_plane: InPlane,
    },
    /// One end built in (lateral, twist, lateral rotation, vertical and
    /// in-plane rotation held), the other free.
    Cantilever {
        /// The root is at x = 0 (else at x = L).
        root_at_start: bool,
        /// Warping held at the root.
        root_warping_fixed: bool,
    },
}

/// In-plane end conditions of a beam.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum InPlane {
    /// Vertical support at both ends, in-plane rotation free at both.
    Simple,
    /// Vertical support and in-plane rotation held at both ends.
    Fixed,
    /// Anything else (propped, mixed).
    Other,
}

/// Shape of the load pattern.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Shape {
    /// End moments only; ψ = smaller/larger end moment (+1 uniform moment).
    EndMoments {
        /// Ratio of the smaller to the larger end moment, −1 ≤ ψ ≤ 1.
        psi: f64,
    },
    /// One uniform load over the whole length.
    Uniform,
    /// One point load at midspan.
    PointMid,
    /// One point load at a cantilever's tip.
    PointTip,
    /// Any other combination.
    Other,
}

impl Shape {
    /// A short name for notes.
    pub fn name(&self) -> &'static str {
        match self {
            Shape::EndMoments { .. } => "end moments",
            Shape::Uniform => "uniform load over the length",
            Shape::PointMid => "point load at midspan",
            Shape::PointTip => "point load at the tip",
            Shape::Other => "other load pattern",
        }
    }
}

/// A classified member.
#[derive(Debug, Clone, PartialEq)]
pub struct Pattern {
    /// κ of the member.
    pub kappa: f64,
    /// Support system.
    pub span: Span,
    /// Load pattern.
    pub shape: Shape,
    /// Height of the transverse loads, positive on the destabilising side
    /// (above the shear centre for gravity loads, below it for uplift);
    /// 0 without transverse loads; None when loads differ in height or in
    /// direction.
    pub zeta: Option<f64>,
    /// The pre-buckling moment diagram (exact, also for indeterminate members).
    pub moments: MomentField,
    /// The largest |M| (the moment every μ refers to).
    pub m_max: f64,
}

impl Pattern {
    /// ψ of an end-moment pattern.
    pub fn psi(&self) -> Option<f64> {
        match self.shape {
            Shape::EndMoments { psi } => Some(psi),
            _ => None,
        }
    }
    /// |M| at x (units of L).
    pub fn m_abs(&self, x: f64) -> f64 {
        self.moments.at(x).abs()
    }
}

fn held(f: Fixity) -> bool {
    f.is_fixed()
}

fn springs(s: &Support) -> bool {
    [
        s.lateral,
        s.lateral_rotation,
        s.twist,
        s.warping,
        s.vertical,
        s.in_plane_rotation,
    ]
    .iter()
    .any(|f| matches!(f, Fixity::Spring(k) if *k > 0.0))
}

fn built_in(s: &Support) -> bool {
    held(s.lateral)
        && held(s.twist)
        && held(s.lateral_rotation)
        && held(s.vertical)
        && held(s.in_plane_rotation)
}

fn free(s: &Support) -> bool {
    s.is_free_out_of_plane()
        && s.lateral_rotation.is_free()
        && s.warping.is_free()
        && s.vertical.is_free()
        && s.in_plane_rotation.is_free()
}

/// Classify a member, or say why no rule of this module covers it.
pub fn classify(m: &Member) -> Result<Pattern, String> {
    if m.delta != 0.0 || m.segments.iter().any(|s| s.delta != 0.0) {
        return Err(
            "monosymmetric section (delta != 0): the rules cover doubly symmetric sections".into(),
        );
    }
    if !m.segments.is_empty() {
        return Err(
            "member with segments of other stiffness: the rules cover prismatic members".into(),
        );
    }
    if m.axial.is_some() {
        return Err("axial force present: the rules cover bending alone".into());
    }
    if !m.supports.is_empty() || !m.restraints.is_empty() || !m.continuous.is_empty() {
        return Err("intermediate supports or restraints: the rules here cover one unbraced segment between its ends".into());
    }
    if springs(&m.start) || springs(&m.end) {
        return Err("elastic (spring) end restraints: the rules know held or free only".into());
    }
    let span = if held(m.start.lateral)
        && held(m.start.twist)
        && held(m.end.lateral)
        && held(m.end.twist)
    {
        if !(held(m.start.vertical) && held(m.end.vertical)) {
            return Err("an end without vertical support".into());
        }
        let rot = [
            held(m.start.in_plane_rotation),
            held(m.end.in_plane_rotation),
        ];
        Span::Beam {
            lateral_rotation_fixed: [held(m.start.lateral_rotation), held(m.end.lateral_rotation)],
            warping_fixed: [held(m.start.warping), held(m.end.warping)],
            in_plane: match rot {
                [false, false] => InPlane::Simple,
                [true, true] => InPlane::Fixed,
                _ => InPlane::Other,
            },
        }
    } else if built_in(&m.start) && free(&m.end) {
        Span::Cantilever {
            root_at_start: true,
            root_warping_fixed: held(m.start.warping),
        }
    } else if built_in(&m.end) && free(&m.start) {
        Span::Cantilever {
            root_at_start: false,
            root_warping_fixed: held(m.end.warping),
        }
    } else {
        return Err("support system neither a beam held laterally and in twist at both ends nor a built-in cantilever with a free tip".into());
    };
    // Loads: heights and directions of the transverse loads.
    let mut heights: Vec<(f64, f64)> = Vec::new(); // (fz sign, ζ)
    let mut end_moments = (0.0, 0.0);
    let mut n_end = 0;
    let mut transverse: Vec<Load> = Vec::new();
    for l in &m.loads {
        match *l {
            Load::Point { fz, zeta, .. } if fz != 0.0 => {
                heights.push((fz.signum(), zeta));
                transverse.push(*l);
            }
            Load::Distributed {
                fz_from,
                fz_to,
                zeta,
                ..
            } if fz_from != 0.0 || fz_to != 0.0 => {
                if fz_from * fz_to < 0.0 {
                    heights.push((0.0, zeta));
                } else {
                    heights.push(((fz_from + fz_to).signum(), zeta));
                }
                transverse.push(*l);
            }
            Load::EndMoments { start, end } => {
                end_moments.0 += start;
                end_moments.1 += end;
                n_end += 1;
            }
            _ => {}
        }
    }
    let zeta = match heights.first() {
        None => Some(0.0),
        Some(&(s0, z0)) => {
            let same = heights.iter().all(|&(s, z)| s == s0 && z == z0) && s0 != 0.0;
            same.then_some(-s0 * z0)
        }
    };
    let has_end = n_end > 0 && (end_moments.0 != 0.0 || end_moments.1 != 0.0);
    let root_x = match span {
        Span::Cantilever { root_at_start, .. } => Some(if root_at_start { 0.0 } else { 1.0 }),
        Span::Beam { .. } => None,
    };
    let shape = if transverse.is_empty() && has_end {
        let (a, b) = if end_moments.0.abs() >= end_moments.1.abs() {
            end_moments
        } else {
            (end_moments.1, end_moments.0)
        };
        Shape::EndMoments { psi: b / a }
    } else if transverse.len() == 1 && !has_end {
        match transverse[0] {
            Load::Distributed {
                from,
                to,
                fz_from,
                fz_to,
                ..
            } if from == 0.0 && to == 1.0 && fz_from == fz_to => Shape::Uniform,
            Load::Point { at, .. } if root_x.is_none() && (at - 0.5).abs() < 1e-12 => {
                Shape::PointMid
            }
            Load::Point { at, .. } if root_x.is_some_and(|r| (at - (1.0 - r)).abs() < 1e-12) => {
                Shape::PointTip
            }
            _ => Shape::Other,
        }
    } else {
        Shape::Other
    };
    if has_end && root_x.is_some() {
        return Err("end moments on a cantilever: a couple at a free end needs a moment type the rules do not state".into());
    }
    let field = moments(m, &key_points(m)).map_err(|e| format!("in-plane mechanism: {e}"))?;
    let (m_max, _) = field.max_abs();
    if !(m_max > 0.0) {
        return Err("no bending moment".into());
    }
    Ok(Pattern {
        kappa: m.kappa,
        span,
        shape,
        zeta,
        moments: field,
        m_max,
    })
}
