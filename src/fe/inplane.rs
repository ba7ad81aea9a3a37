//! Pre-buckling in-plane analysis: the bending moment M(x), exact.
//!
//! A Hermite-cubic beam model in the vertical plane (DOFs w, θ = w' per
//! node, w up) with nodes at the key points only. For a prismatic element
//! with consistent nodal loads the nodal displacements are exact, so the
//! element end forces r = Kₑ·uₑ − fₑ are exact too; between nodes
//!
//! ```text
//! M(s) = M(0) + M'(0)·s + q₀·s²/2 + (q₁ − q₀)/h · s³/6     (M'' = fz, sagging positive)
//! M(0) = −r[θ₁],   M'(0) = r[w₁]
//! ```
//!
//! which is exact for statically indeterminate members (propped, fixed-ended,
//! continuous) as well.
//!
//! # References
//! - Przemieniecki, J. S. (1968). *Theory of Matrix Structural Analysis*, ch. 5 (beam
//!   stiffness, consistent load vectors for linearly varying loads).
//! - Timoshenko, S. P. & Gere, J. M. (1961). *Theory of Elastic Stability*, §1.1 (M'' = q).

use super::mesh::{KeyPoint, node_at};
use crate::linalg::band::BandMatrix;
use crate::model::{Fixity, Load, Member, Support};

/// The pre-buckling moment along the member: a cubic per key span.
#[derive(Debug, Clone, PartialEq)]
pub struct MomentField {
    /// Key node positions.
    pub x: Vec<f64>,
    /// M(s) = c[0] + c[1]·s + c[2]·s² + c[3]·s³ with s measured from `x[i]`.
    pub coef: Vec<[f64; 4]>,
}

/// The member is a mechanism in its own plane.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{0}")]
pub struct InPlaneMechanism(pub String);

fn eval(c: &[f64; 4], s: f64) -> f64 {
    c[0] + s * (c[1] + s * (c[2] + s * c[3]))
}

impl MomentField {
    /// A zero field (no transverse load).
    pub fn zero(x: Vec<f64>) -> MomentField {
        let n = x.len() - 1;
        MomentField {
            x,
            coef: vec![[0.0; 4]; n],
        }
    }

    fn span(&self, x: f64) -> usize {
        let mut i = match self.x.binary_search_by(|p| p.total_cmp(&x)) {
            Ok(i) => i,
            Err(i) => i.saturating_sub(1),
        };
        if i >= self.coef.len() {
            i = self.coef.len() - 1;
        }
        i
    }

    /// M at x.
    pub fn at(&self, x: f64) -> f64 {
        let i = self.span(x);
        eval(&self.coef[i], x - self.x[i])
    }

    /// Cubic coefficients of M on [a, b], in s measured from a. The interval
    /// must lie inside one key span (true for every element of a mesh built
    /// on these key points).
    pub fn on(&self, a: f64, b: f64) -> [f64; 4] {
        let i = self.span(0.5 * (a + b));
        let c = &self.coef[i];
        let d = a - self.x[i];
        // Taylor shift of the cubic to the new origin.
        [
            eval(c, d),
            c[1] + d * (2.0 * c[2] + 3.0 * c[3] * d),
            c[2] + 3.0 * c[3] * d,
            c[3],
        ]
    }

    /// The largest |M(x)| over the member and where it occurs.
    pub fn max_abs(&self) -> (f64, f64) {
        let mut best = (0.0, 0.0);
        let mut consider = |x: f64, m: f64| {
            if m.abs() > best.0 + 1e-14 * best.0 {
                best = (m.abs(), x);
            }
        };
        for (i, c) in self.coef.iter().enumerate() {
            let h = self.x[i + 1] - self.x[i];
            consider(self.x[i], eval(c, 0.0));
            consider(self.x[i + 1], eval(c, h));
            // interior stationary points: c1 + 2c2 s + 3c3 s² = 0
            let (a, b, cc) = (3.0 * c[3], 2.0 * c[2], c[1]);
            let mut roots = [f64::NAN; 2];
            if a.abs() > 1e-14 * (b.abs() + cc.abs()) {
                let disc = b * b - 4.0 * a * cc;
                if disc >= 0.0 {
                    let sq = disc.sqrt();
                    let q = -0.5 * (b + b.signum() * sq);
                    roots = [q / a, if q != 0.0 { cc / q } else { f64::NAN }];
                }
            } else if b != 0.0 {
                roots[0] = -cc / b;
            }
            for s in roots {
                if s.is_finite() && s > 0.0 && s < h {
                    consider(self.x[i] + s, eval(c, s));
                }
            }
        }
        best
    }
}

fn support_at(m: &Member, k: &[KeyPoint]) -> Vec<(usize, Support)> {
    let xs: Vec<f64> = k.iter().map(|p| p.x).collect();
    let mut v = vec![(0, m.start), (xs.len() - 1, m.end)];
    for s in &m.supports {
        v.push((node_at(&xs, s.at), s.support));
    }
    v
}

/// True when the member carries any transverse load or end couple.
pub fn has_bending(m: &Member) -> bool {
    m.loads.iter().any(|l| match *l {
        Load::Point { fz, .. } => fz != 0.0,
        Load::Distributed { fz_from, fz_to, .. } => fz_from != 0.0 || fz_to != 0.0,
        Load::EndMoments { start, end } => start != 0.0 || end != 0.0,
    })
}

/// Linear load intensity (sum of all distributed loads) over [a, b], which
/// must not straddle a load's end. Returns (q(a), q(b)); `weight` maps each
/// load to a factor (1 for the load itself, its height for fz·a).
pub fn distributed_on(m: &Member, a: f64, b: f64, weight: impl Fn(f64) -> f64) -> [f64; 2] {
    let mid = 0.5 * (a + b);
    let mut q = [0.0; 2];
    for l in &m.loads {
        if let Load::Distributed {
            from,
            to,
            fz_from,
            fz_to,
            zeta,
        } = *l
            && mid > from
            && mid < to
        {
            let f = |x: f64| fz_from + (fz_to - fz_from) * (x - from) / (to - from);
            let w = weight(zeta);
            q[0] += w * f(a);
            q[1] += w * f(b);
        }
    }
    q
}

/// Solve the in-plane problem on the key points.
pub fn moments(m: &Member, keys: &[KeyPoint]) -> Result<MomentField, InPlaneMechanism> {
    let x: Vec<f64> = keys.iter().map(|p| p.x).collect();
    if !has_bending(m) {
        return Ok(MomentField::zero(x));
    }
    let nn = x.len();
    let nd = 2 * nn;
    let mut k = BandMatrix::zeros(nd, 3);
    let mut f = vec![0.0; nd];
    let mut elem = Vec::with_capacity(nn - 1);
    for i in 0..nn - 1 {
        let h = x[i + 1] - x[i];
        let ei = m.stiffness_at(0.5 * (x[i] + x[i + 1])).eiy;
        let c = ei / (h * h * h);
        let ke = [
            [12.0 * c, 6.0 * h * c, -12.0 * c, 6.0 * h * c],
            [6.0 * h * c, 4.0 * h * h * c, -6.0 * h * c, 2.0 * h * h * c],
            [-12.0 * c, -6.0 * h * c, 12.0 * c, -6.0 * h * c],
            [6.0 * h * c, 2.0 * h * h * c, -6.0 * h * c, 4.0 * h * h * c],
        ];
        let [q0, q1] = distributed_on(m, x[i], x[i + 1], |_| 1.0);
        let fe = [
            h * (7.0 * q0 + 3.0 * q1) / 20.0,
            h * h * (3.0 * q0 + 2.0 * q1) / 60.0,
            h * (3.0 * q0 + 7.0 * q1) / 20.0,
            -h * h * (2.0 * q0 + 3.0 * q1) / 60.0,
        ];
        for a in 0..4 {
            f[2 * i + a] += fe[a];
            for b in 0..=a {
                k.add_lower(2 * i + a, 2 * i + b, ke[a][b]);
            }
        }
        elem.push((h, ke, fe, q0, q1));
    }
    for l in &m.loads {
        match *l {
            Load::Point { at, fz, .. } => f[2 * node_at(&x, at)] += fz,
            Load::EndMoments { start, end } => {
                f[1] -= start;
                f[nd - 1] += end;
            }
            Load::Distributed { .. } => {}
        }
    }
    // Springs, then exact elimination of fixed DOFs (unit row and column).
    let sup = support_at(m, keys);
    let mut fixed = vec![false; nd];
    for &(node, s) in &sup {
        for (dof, fx) in [(2 * node, s.vertical), (2 * node + 1, s.in_plane_rotation)] {
            match fx {
                Fixity::Fixed => fixed[dof] = true,
                Fixity::Spring(kk) if kk > 0.0 => k.add_lower(dof, dof, kk),
                _ => {}
            }
        }
    }
    let scale = k.max_diag();
    for (dof, &fx) in fixed.iter().enumerate() {
        if fx {
            for j in dof.saturating_sub(3)..dof {
                k.add_lower(dof, j, -k.get(dof, j));
            }
            for i in dof + 1..(dof + 4).min(nd) {
                k.add_lower(i, dof, -k.get(i, dof));
            }
            k.add_lower(dof, dof, scale - k.get(dof, dof));
            f[dof] = 0.0;
        }
    }
    // Symmetric diagonal scaling (Jacobi): elements of very different
    // lengths (a load a hair from a support) give stiffnesses that differ by
    // many orders of magnitude; scaled, every diagonal is 1 and the pivot
    // test below sees only a genuine mechanism.
    let d: Vec<f64> = (0..nd)
        .map(|i| k.get(i, i).max(f64::MIN_POSITIVE).sqrt())
        .collect();
    for i in 0..nd {
        for j in i.saturating_sub(3)..=i {
            let v = k.get(i, j);
            k.set_lower(i, j, v / (d[i] * d[j]));
        }
    }
    // A straight beam in its own plane is a mechanism exactly when nothing
    // holds it vertically, or one support does and no rotation is held
    // anywhere (the rigid motions are a translation and a rotation): decided
    // from the supports, not from a pivot, since a nearly rigid short element
    // beside a free end (a load a hair from a tip) leaves a legitimately
    // small scaled pivot (about the ratio of the element stiffnesses).
    let vertical = sup.iter().filter(|(_, s)| !s.vertical.is_free()).count();
    let rotation = sup
        .iter()
        .filter(|(_, s)| !s.in_plane_rotation.is_free())
        .count();
    if vertical == 0 || (vertical == 1 && rotation == 0) {
        return Err(InPlaneMechanism(mechanism_message(&sup)));
    }
    // Scaled, the smallest pivot is about the stiffness ratio of the
    // shortest element to its neighbours, (h_short/h_long)³, and the moments
    // lose about ε/pivot of their accuracy (measured: 4e-7 at a gap of 1e-3
    // of the neighbour span). Below 1e-9 (key points closer than about 1e-3
    // of their neighbour spans) refuse, saying why.
    let mut kf = k;
    if kf.factorize(1e-9).is_err() {
        let gap = x
            .windows(2)
            .map(|w| w[1] - w[0])
            .fold(f64::INFINITY, f64::min);
        // The other cause of a vanishing scaled pivot: a spring so soft
        // against the member's bending stiffness that it holds nothing
        // the analysis can resolve.
        let xs = &x;
        let springs: Vec<String> = sup
            .iter()
            .flat_map(|&(node, s)| {
                [
                    ("vertical", s.vertical),
                    ("in_plane_rotation", s.in_plane_rotation),
                ]
                .into_iter()
                .filter_map(move |(key, f)| match f {
                    Fixity::Spring(k) if k > 0.0 => {
                        Some(format!("`{key}` = {k:e} at x = {:.3} L", xs[node]))
                    }
                    _ => None,
                })
            })
            .collect();
        if gap >= 1e-3 && !springs.is_empty() {
            return Err(InPlaneMechanism(format!(
                "the in-plane spring(s) {} are too soft to resolve against the member's bending stiffness \
                 (below about 1e-9 of it in units of E·Iy/L³ or E·Iy/L): the in-plane analysis cannot find the \
                 moments; give a stiffer spring or \"fixed\"",
                springs.join(", ")
            )));
        }
        return Err(InPlaneMechanism(format!(
            "two key points (supports, loads, restraints, segment ends) lie only {gap:.2e} L apart: the in-plane \
             analysis cannot resolve so short a span against the rest of the member; put them at the same \
             position or at least 1e-3 L apart"
        )));
    }
    let mut u: Vec<f64> = f.iter().zip(&d).map(|(fi, di)| fi / di).collect();
    kf.solve_in_place(&mut u);
    for (ui, di) in u.iter_mut().zip(&d) {
        *ui /= di;
    }
    let mut coef = Vec::with_capacity(nn - 1);
    for (i, (h, ke, fe, q0, q1)) in elem.iter().enumerate() {
        let ue = [u[2 * i], u[2 * i + 1], u[2 * i + 2], u[2 * i + 3]];
        let r: Vec<f64> = (0..4)
            .map(|a| (0..4).map(|b| ke[a][b] * ue[b]).sum::<f64>() - fe[a])
            .collect();
        coef.push([-r[1], r[0], 0.5 * q0, (q1 - q0) / (6.0 * h)]);
    }
    Ok(MomentField { x, coef })
}

fn mechanism_message(sup: &[(usize, Support)]) -> String {
    let vertical = sup.iter().filter(|(_, s)| !s.vertical.is_free()).count();
    let rot = sup
        .iter()
        .filter(|(_, s)| !s.in_plane_rotation.is_free())
        .count();
    if vertical == 0 {
        "the member is a mechanism in its own plane: no support holds it vertically; \
         set `vertical = \"fixed\"` (or use preset \"fork\" or \"built-in\") at a support"
            .into()
    } else if vertical == 1 && rot == 0 {
        "the member is a mechanism in its own plane: it can rotate about its only vertical support; \
         add a second vertical support or fix `in_plane_rotation` at a support (preset \"built-in\" for a cantilever root)"
            .into()
    } else {
        "the member is a mechanism in its own plane: add `vertical` or `in_plane_rotation` restraint at a support".into()
    }
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn loads_near_a_tip_are_exact_or_refused_with_the_reason() {
        use crate::fe::mesh::key_points;
        use crate::model::{Load, Member, Support};
        // Root moment of a cantilever with a point load at a: F·a (statics).
        let m = |a: f64| {
            Member::new(0.5, Support::BUILT_IN, Support::FREE).with_load(Load::Point {
                at: a,
                fz: -1.0,
                zeta: 0.0,
            })
        };
        let near = m(0.995);
        let mf = moments(&near, &key_points(&near)).unwrap();
        assert!(
            (mf.max_abs().0 / 0.995 - 1.0).abs() < 1e-6,
            "{:?}",
            mf.max_abs()
        );
        let too_near = m(0.9999);
        let e = moments(&too_near, &key_points(&too_near)).unwrap_err();
        assert!(e.0.contains("apart"), "{}", e.0);
        // A genuine mechanism is named as such.
        let loose = Member::new(0.5, Support::FREE, Support::FREE).with_load(Load::Point {
            at: 0.5,
            fz: -1.0,
            zeta: 0.0,
        });
        let e = moments(&loose, &key_points(&loose)).unwrap_err();
        assert!(e.0.contains("no support holds it vertically"), "{}", e.0);
    }
    use crate::fe::mesh::key_points;

    fn member(start: Support, end: Support, load: Load) -> Member {
        Member::new(1.0, start, end).with_load(load)
    }

    /// A distributed load at the shear centre from `from` to `to`, intensity `fz_from` to `fz_to`.
    fn line_load(from: f64, to: f64, fz_from: f64, fz_to: f64) -> Load {
        Load::Distributed {
            from,
            to,
            fz_from,
            fz_to,
            zeta: 0.0,
        }
    }

    #[test]
    fn simply_supported_uniform_load() {
        // M = q·x·(1 − x)/2 for downward q (statics; Roark's Formulas for Stress and
        // Strain, 7th ed., Table 8.1 case 2e, from memory).
        let m = member(
            Support::FORK,
            Support::FORK,
            line_load(0.0, 1.0, -1.0, -1.0),
        );
        let f = moments(&m, &key_points(&m)).unwrap();
        for x in [0.1, 0.3, 0.5, 0.77] {
            assert!((f.at(x) - x * (1.0 - x) / 2.0).abs() < 1e-12);
        }
        let (mx, at) = f.max_abs();
        assert!((mx - 0.125).abs() < 1e-12 && (at - 0.5).abs() < 1e-9);
    }

    #[test]
    fn fixed_ended_uniform_load() {
        // Fixed-end moments −qL²/12, midspan +qL²/24 (Roark, 7th ed., Table 8.1
        // case 2e with both ends fixed, from memory).
        let mut fixed = Support::FORK;
        fixed.in_plane_rotation = Fixity::Fixed;
        let m = member(fixed, fixed, line_load(0.0, 1.0, -1.0, -1.0));
        let f = moments(&m, &key_points(&m)).unwrap();
        assert!((f.at(0.0) + 1.0 / 12.0).abs() < 1e-12);
        assert!((f.at(0.5) - 1.0 / 24.0).abs() < 1e-12);
    }

    #[test]
    fn propped_cantilever_point_load() {
        // Built-in at 0, propped at 1, central load P: root moment −3PL/16,
        // under the load +5PL/32 (Roark, 7th ed., Table 8.1 case 1c, from memory).
        let m = member(
            Support::BUILT_IN,
            Support::FORK,
            Load::Point {
                at: 0.5,
                fz: -1.0,
                zeta: 0.0,
            },
        );
        let f = moments(&m, &key_points(&m)).unwrap();
        assert!((f.at(0.0) + 3.0 / 16.0).abs() < 1e-12);
        assert!((f.at(0.5) - 5.0 / 32.0).abs() < 1e-12);
    }

    #[test]
    fn cantilever_tip_load_and_end_moments() {
        let m = member(
            Support::BUILT_IN,
            Support::FREE,
            Load::Point {
                at: 1.0,
                fz: -1.0,
                zeta: 0.0,
            },
        );
        let f = moments(&m, &key_points(&m)).unwrap();
        assert!((f.at(0.0) + 1.0).abs() < 1e-12 && f.at(1.0).abs() < 1e-12);
        let m = member(
            Support::FORK,
            Support::FORK,
            Load::EndMoments {
                start: 1.0,
                end: -0.5,
            },
        );
        let f = moments(&m, &key_points(&m)).unwrap();
        assert!((f.at(0.0) - 1.0).abs() < 1e-12 && (f.at(1.0) + 0.5).abs() < 1e-12);
        assert!((f.at(0.5) - 0.25).abs() < 1e-12);
    }

    #[test]
    fn two_equal_spans_uniform_load() {
        // Continuous beam, two equal spans l = L/2 under a uniform load q: support moment
        // −q·l²/8 at the middle support and the largest span moment 9·q·l²/128 at 3l/8 from each
        // end support (Clapeyron's three-moment equation, a standard textbook result, e.g.
        // Timoshenko & Young, *Theory of Structures*; values from memory, and they follow from
        // statics plus the equal-slope condition at the middle support).
        let mut m = member(
            Support::FORK,
            Support::FORK,
            line_load(0.0, 1.0, -1.0, -1.0),
        );
        m.supports.push(crate::model::PointSupport {
            at: 0.5,
            support: Support::FORK,
        });
        let f = moments(&m, &key_points(&m)).unwrap();
        let l: f64 = 0.5;
        assert!((f.at(0.5) + l * l / 8.0).abs() < 1e-12, "{}", f.at(0.5));
        for x in [3.0 * l / 8.0, 1.0 - 3.0 * l / 8.0] {
            assert!((f.at(x) - 9.0 * l * l / 128.0).abs() < 1e-12, "{}", f.at(x));
        }
    }

    #[test]
    fn triangular_and_partial_loads_on_a_simple_span() {
        // Triangular load rising from 0 to q0 over a simple span: M(x) = q0·x·(L² − x²)/(6L), largest
        // q0·L²/(9·√3) at x = L/√3 (statics; a standard beam-table case, e.g. Roark, 7th ed.,
        // Table 8.1, values from memory and derived here).
        let m = member(Support::FORK, Support::FORK, line_load(0.0, 1.0, 0.0, -1.0));
        let f = moments(&m, &key_points(&m)).unwrap();
        for x in [0.2, 0.5, 1.0 / 3f64.sqrt(), 0.9] {
            assert!(
                (f.at(x) - x * (1.0 - x * x) / 6.0).abs() < 1e-12,
                "x {x}: {}",
                f.at(x)
            );
        }
        let (mx, at) = f.max_abs();
        assert!(
            (mx - 1.0 / (9.0 * 3f64.sqrt())).abs() < 1e-12 && (at - 1.0 / 3f64.sqrt()).abs() < 1e-6
        );
        // Uniform load q on the left half only: R_A = 3qL/8, M(L/2) = qL²/16, and
        // M(x) = R_A·x − q·x²/2 on the loaded half (statics).
        let m = member(
            Support::FORK,
            Support::FORK,
            line_load(0.0, 0.5, -1.0, -1.0),
        );
        let f = moments(&m, &key_points(&m)).unwrap();
        assert!((f.at(0.5) - 1.0 / 16.0).abs() < 1e-12, "{}", f.at(0.5));
        assert!((f.at(0.25) - (0.375 * 0.25 - 0.25 * 0.25 / 2.0)).abs() < 1e-12);
        assert!((f.at(0.75) - 0.5 / 16.0).abs() < 1e-12, "{}", f.at(0.75));
    }

    #[test]
    fn mechanism_is_reported() {
        let m = member(
            Support::FREE,
            Support::FREE,
            Load::Point {
                at: 0.5,
                fz: -1.0,
                zeta: 0.0,
            },
        );
        assert!(moments(&m, &key_points(&m)).is_err());
    }
}
