//! A-priori mesh: nodes at every key point, elements graded toward boundary
//! layers of the twist.
//!
//! With warping restrained at a point, or a concentrated torque on the twist
//! (a point load or restraint at a height, a twist restraint), the twist has
//! a boundary layer there of width about
//!
//! ```text
//! w = √(E·Iw / G·It)   (= κ·L/π for the reference section)
//! ```
//!
//! A uniform mesh converges only as h to h^2.3 until its elements are
//! smaller than w; so elements next to such points start at a fraction of w
//! and grow geometrically to the base spacing. Refinement level ℓ splits every
//! base element into 2^ℓ equal parts, so meshes are nested and the discrete
//! critical factor decreases monotonically with ℓ (Rayleigh–Ritz on nested
//! subspaces), which the error estimate relies on.
//!
//! # References
//! - Domain notes of this project, "Discretisation facts worth knowing".
//! - Schwab, C. (1998). *p- and hp-Finite Element Methods*. Oxford, ch. 3
//!   (geometric meshes for boundary layers).

use crate::model::{Fixity, Load, Member};

/// Mesh controls.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MeshControls {
    /// Largest base element length, units of L.
    pub h_max: f64,
    /// First graded element length as a fraction of the layer width.
    pub first: f64,
    /// Growth ratio of graded elements.
    pub growth: f64,
}

impl Default for MeshControls {
    fn default() -> Self {
        MeshControls {
            h_max: 0.25,
            first: 1.5,
            growth: 2.2,
        }
    }
}

/// Positions closer than this (units of L) are one node.
pub const MERGE: f64 = 1e-9;

/// A key point of the member: where a node must sit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KeyPoint {
    /// Position.
    pub x: f64,
    /// The twist has a boundary layer here (warping restraint or concentrated torque).
    pub layer: bool,
}

/// Sorted, merged key points of a member (always includes 0 and 1).
pub fn key_points(m: &Member) -> Vec<KeyPoint> {
    let mut pts: Vec<KeyPoint> = Vec::new();
    let mut add = |x: f64, layer: bool| pts.push(KeyPoint { x, layer });
    add(0.0, !m.start.warping.is_free());
    add(1.0, !m.end.warping.is_free());
    for s in &m.supports {
        let torque = !s.support.twist.is_free() || !s.support.warping.is_free();
        add(s.at, torque);
    }
    for r in &m.restraints {
        let torque = !r.twist.is_free() || (!r.lateral.is_free() && r.zeta != 0.0);
        add(r.at, torque);
    }
    for c in &m.continuous {
        add(c.from, false);
        add(c.to, false);
    }
    for s in &m.segments {
        add(s.from, false);
        add(s.to, false);
    }
    for l in &m.loads {
        match *l {
            Load::Point { at, zeta, .. } => add(at, zeta != 0.0),
            Load::Distributed { from, to, .. } => {
                add(from, false);
                add(to, false);
            }
            Load::EndMoments { .. } => {}
        }
    }
    pts.sort_by(|a, b| a.x.total_cmp(&b.x));
    let mut out: Vec<KeyPoint> = Vec::with_capacity(pts.len());
    for p in pts {
        match out.last_mut() {
            Some(q) if (p.x - q.x).abs() <= MERGE => q.layer |= p.layer,
            _ => out.push(p),
        }
    }
    out
}

/// Whether a fixity acts on warping (anything not free).
pub fn acts(f: Fixity) -> bool {
    !f.is_free()
}

/// Element lengths covering `len` from a layer of width `w` outward.
fn graded(len: f64, w: f64, c: &MeshControls) -> Vec<f64> {
    let mut sizes = Vec::new();
    let mut h = c.first * w;
    let mut t = 0.0;
    if h > 0.0 {
        while h < c.h_max && t + h < len {
            sizes.push(h);
            t += h;
            h *= c.growth;
        }
    }
    let rem = len - t;
    if rem > 0.0 {
        let last = sizes.last().copied().unwrap_or(0.0);
        if rem < 0.5 * last {
            *sizes.last_mut().unwrap() += rem;
        } else {
            let n = (rem / c.h_max).ceil().max(1.0) as usize;
            sizes.extend(std::iter::repeat_n(rem / n as f64, n));
        }
    }
    sizes
}

/// Base (level 0) node positions for a member. `layer_width(x)` gives the
/// twist layer width √(E·Iw/G·It) of the segment around x (0 for no warping
/// stiffness, where no grading is needed).
pub fn base_nodes(
    keys: &[KeyPoint],
    layer_width: impl Fn(f64) -> f64,
    c: &MeshControls,
) -> Vec<f64> {
    base_nodes_with(keys, layer_width, |_| c.h_max, c)
}

/// The base mesh of a member: twist layers graded as in [`base_nodes`], and
/// under a continuous restraint the element length limited to half the
/// half-wave length of a beam on an elastic foundation,
///
/// ```text
/// ℓ_v = π·(E·Iz / k_l)^¼      ℓ_φ = π·(E·Iw / k_φ)^¼  (or π·(G·It / k_φ)^½ without warping)
/// k_φ = k_t + k_l·z²
/// ```
///
/// so that the short waves a stiff restraint forces are resolved from the
/// first level (Hetényi, M. (1946). *Beams on Elastic Foundation*, ch. 2).
pub fn member_base_nodes(m: &Member, c: &MeshControls) -> Vec<f64> {
    let keys = key_points(m);
    let local = |x: f64| {
        let s = m.stiffness_at(x);
        let mut h = c.h_max;
        for r in &m.continuous {
            if x > r.from && x < r.to {
                let z = r.zeta / std::f64::consts::PI;
                if r.lateral > 0.0 {
                    h = h.min(0.5 * std::f64::consts::PI * (s.eiz / r.lateral).powf(0.25));
                }
                let kp = r.twist + r.lateral * z * z;
                if kp > 0.0 {
                    let l = if s.eiw > 0.0 {
                        (s.eiw / kp).powf(0.25)
                    } else {
                        (s.git / kp).sqrt()
                    };
                    h = h.min(0.5 * std::f64::consts::PI * l);
                }
            }
        }
        h.max(MIN_ELEMENT)
    };
    base_nodes_with(
        &keys,
        |x| (m.stiffness_at(x).eiw / m.stiffness_at(x).git).sqrt(),
        local,
        c,
    )
}

/// Smallest base element a continuous restraint may ask for (units of L).
pub const MIN_ELEMENT: f64 = 1.0 / 256.0;

fn base_nodes_with(
    keys: &[KeyPoint],
    layer_width: impl Fn(f64) -> f64,
    local_h_max: impl Fn(f64) -> f64,
    c0: &MeshControls,
) -> Vec<f64> {
    let mut x = vec![keys[0].x];
    for pair in keys.windows(2) {
        let (a, b) = (pair[0], pair[1]);
        let len = b.x - a.x;
        let c = &MeshControls {
            h_max: local_h_max(0.5 * (a.x + b.x)).min(c0.h_max),
            ..*c0
        };
        let w = layer_width(0.5 * (a.x + b.x));
        let la = a.layer && w > 0.0 && c.first * w < c.h_max;
        let lb = b.layer && w > 0.0 && c.first * w < c.h_max;
        let sizes: Vec<f64> = match (la, lb) {
            (false, false) => {
                let n = (len / c.h_max).ceil().max(1.0) as usize;
                vec![len / n as f64; n]
            }
            (true, false) => graded(len, w, c),
            (false, true) => {
                let mut s = graded(len, w, c);
                s.reverse();
                s
            }
            (true, true) => {
                let mut s = graded(0.5 * len, w, c);
                let mut r = s.clone();
                r.reverse();
                s.extend(r);
                s
            }
        };
        let mut t = a.x;
        for (k, h) in sizes.iter().enumerate() {
            t += h;
            x.push(if k + 1 == sizes.len() { b.x } else { t });
        }
    }
    x
}

/// Split every element of `base` into 2^level equal parts.
pub fn refine(base: &[f64], level: u32) -> Vec<f64> {
    let p = 1usize << level;
    let mut x = Vec::with_capacity((base.len() - 1) * p + 1);
    for w in base.windows(2) {
        for k in 0..p {
            x.push(w[0] + (w[1] - w[0]) * k as f64 / p as f64);
        }
    }
    x.push(*base.last().unwrap());
    x
}

/// Index of the node at position `x` (nearest, which must be within
/// [`MERGE`] for key points).
pub fn node_at(nodes: &[f64], x: f64) -> usize {
    match nodes.binary_search_by(|p| p.total_cmp(&x)) {
        Ok(i) => i,
        Err(i) => {
            if i == 0 {
                0
            } else if i >= nodes.len() {
                nodes.len() - 1
            } else if (nodes[i] - x).abs() < (x - nodes[i - 1]).abs() {
                i
            } else {
                i - 1
            }
        }
    }
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn graded_mesh_covers_span_and_grows() {
        let c = MeshControls::default();
        let keys = [
            KeyPoint {
                x: 0.0,
                layer: true,
            },
            KeyPoint {
                x: 1.0,
                layer: false,
            },
        ];
        let x = base_nodes(&keys, |_| 0.01, &c);
        assert_eq!(x[0], 0.0);
        assert_eq!(*x.last().unwrap(), 1.0);
        assert!(x[1] - x[0] <= c.first * 0.01 + 1e-15);
        for w in x.windows(2) {
            assert!(w[1] > w[0]);
            assert!(w[1] - w[0] <= c.h_max + 1e-12);
        }
    }

    #[test]
    fn refinement_is_nested() {
        let base = [0.0, 0.1, 0.5, 1.0];
        let f = refine(&base, 2);
        assert_eq!(f.len(), 13);
        for b in base {
            assert!(f.contains(&b));
        }
    }
}
