//! Assembly of the banded elastic and geometric matrices over a mesh, with
//! supports and restraints eliminated exactly.
//!
//! Each node carries five *full* DOFs `[v, v', φ, φ'₋, φ'₊]` (warping on the
//! left and right of the node). Linear constraints at the node —
//! `φ'₋ = φ'₊` (warping continuity, dropped only where the section has no
//! warping stiffness on either side and a concentrated torque acts, so the
//! twist may kink), `v = 0`, `v' = 0`, `φ = 0`, `φ' = 0`, and a lateral
//! restraint at height a, `v − a·φ = 0` — are eliminated by a null-space
//! basis T (full = T·reduced), so every constraint is exact and the band
//! structure survives: each element couples two consecutive nodes only.
//!
//! Point springs and point-load heights are node matrices in full DOFs:
//!
//! ```text
//! ½·k·(v − a·φ)²      lateral spring at height a
//! ½·Fz·a·φ²            point load Fz (up positive) at height a (geometric)
//! ```

use super::element::{self, ElementData, Mat8};
use super::inplane::{MomentField, distributed_on};
use super::mesh::node_at;
use crate::linalg::band::BandMatrix;
use crate::model::{Fixity, Load, Member, Support};
use std::f64::consts::PI;

/// Full DOFs per node.
pub const NFULL: usize = 5;

/// How one node's full DOFs follow from its reduced DOFs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NodeDofs {
    /// First reduced global index of the node.
    pub offset: usize,
    /// Number of reduced DOFs.
    pub r: usize,
    /// full[f] = Σ_c t[f][c] · reduced[offset + c].
    pub t: [[f64; NFULL]; NFULL],
    /// When every full DOF is either held (None) or equal to one reduced DOF
    /// (coefficient 1), that reduced DOF: the fast path of the scatter.
    pub sel: Option<[Option<u8>; NFULL]>,
    /// The node carries warping continuity alone (t is the tied basis):
    /// its four reduced DOFs are [v, v', φ, φ'] in order.
    pub tied: bool,
}

fn selection(t: &[[f64; NFULL]; NFULL], r: usize) -> Option<[Option<u8>; NFULL]> {
    let mut sel = [None; NFULL];
    for f in 0..NFULL {
        for c in 0..r {
            let v = t[f][c];
            if v == 0.0 {
                continue;
            }
            if v != 1.0 || sel[f].is_some() {
                return None;
            }
            sel[f] = Some(c as u8);
        }
    }
    Some(sel)
}

/// The assembled eigenproblem (K + λ·Kg)·x = 0 on one mesh.
#[derive(Debug, Clone, Default)]
pub struct System {
    /// Node positions.
    pub x: Vec<f64>,
    /// Per-node DOF maps.
    pub dofs: Vec<NodeDofs>,
    /// Elastic stiffness (reduced).
    pub k: BandMatrix,
    /// Geometric matrix (reduced).
    pub g: BandMatrix,
    /// Element data of the last assembly (storage reused by the next).
    els: Vec<ElementData>,
}

/// The basis of a node whose only constraint is warping continuity
/// (φ'₋ = φ'₊): reduced DOFs [v, v', φ, φ'].
const TIED: [[f64; NFULL]; NFULL] = [
    [1.0, 0.0, 0.0, 0.0, 0.0],
    [0.0, 1.0, 0.0, 0.0, 0.0],
    [0.0, 0.0, 1.0, 0.0, 0.0],
    [0.0, 0.0, 0.0, 1.0, 0.0],
    [0.0, 0.0, 0.0, 1.0, 0.0],
];

/// Reduced row echelon form of constraint rows: the independent rows (at
/// most `NFULL`), each with a unit pivot.
fn rref(rows: &[[f64; NFULL]]) -> Vec<[f64; NFULL]> {
    let mut a: Vec<[f64; NFULL]> = rows.to_vec();
    let mut row = 0;
    for col in 0..NFULL {
        if row >= a.len() {
            break;
        }
        let (p, mx) = (row..a.len())
            .map(|i| (i, a[i][col].abs()))
            .fold((row, 0.0), |b, c| if c.1 > b.1 { c } else { b });
        if mx < 1e-12 {
            continue;
        }
        a.swap(row, p);
        let d = a[row][col];
        for v in a[row].iter_mut() {
            *v /= d;
        }
        for i in 0..a.len() {
            if i != row {
                let f = a[i][col];
                if f != 0.0 {
                    for j in 0..NFULL {
                        a[i][j] -= f * a[row][j];
                    }
                }
            }
        }
        row += 1;
    }
    a.truncate(row);
    a
}

/// Null-space basis T (columns 0..r) of constraint rows over `NFULL` unknowns.
fn null_space(rows: &[[f64; NFULL]]) -> ([[f64; NFULL]; NFULL], usize) {
    if rows.len() == 1 && rows[0] == [0.0, 0.0, 0.0, 1.0, -1.0] {
        return (TIED, 4);
    }
    let a = rref(rows);
    // pivot column of each independent row
    let pivots: Vec<(usize, usize)> = a
        .iter()
        .enumerate()
        .map(|(r, row)| (r, row.iter().position(|v| v.abs() > 1e-12).unwrap_or(NFULL)))
        .collect();
    let mut t = [[0.0; NFULL]; NFULL];
    let mut c = 0;
    for free in 0..NFULL {
        if pivots.iter().any(|&(_, pc)| pc == free) {
            continue;
        }
        t[free][c] = 1.0;
        for &(pr, pc) in &pivots {
            if pc < NFULL {
                t[pc][c] = -a[pr][free];
            }
        }
        c += 1;
    }
    (t, c)
}

/// Everything point-like that acts at one node.
#[derive(Default, Clone, Copy)]
struct NodeActions {
    rows: Rows,
    spring: [[f64; NFULL]; NFULL],
    geo: [[f64; NFULL]; NFULL],
    torque: bool,
}

/// Node actions of the nodes where something acts, in insertion order (a
/// handful per member: a linear search beats a map).
#[derive(Default)]
struct Acts(Vec<(usize, NodeActions)>);

impl Acts {
    fn at(&mut self, i: usize) -> &mut NodeActions {
        let k = match self.0.iter().position(|(j, _)| *j == i) {
            Some(k) => k,
            None => {
                self.0.push((i, NodeActions::default()));
                self.0.len() - 1
            }
        };
        &mut self.0[k].1
    }
    fn get_mut(&mut self, i: usize) -> Option<&mut NodeActions> {
        self.0.iter_mut().find(|(j, _)| *j == i).map(|(_, a)| a)
    }
}

/// Constraint rows at a node (a handful at most; no heap allocation).
#[derive(Clone, Copy)]
struct Rows {
    r: [[f64; NFULL]; 12],
    n: usize,
}

impl Default for Rows {
    fn default() -> Self {
        Rows {
            r: [[0.0; NFULL]; 12],
            n: 0,
        }
    }
}

impl Rows {
    fn push(&mut self, c: [f64; NFULL]) {
        if self.as_slice().contains(&c) {
            return;
        }
        if self.n == self.r.len() {
            // Keep a basis of the row space (at most five rows): the null
            // space, which is all that matters, is unchanged.
            let mut basis = Rows::default();
            for row in rref(self.as_slice()) {
                basis.r[basis.n] = row;
                basis.n += 1;
            }
            *self = basis;
        }
        self.r[self.n] = c;
        self.n += 1;
    }
    fn as_slice(&self) -> &[[f64; NFULL]] {
        &self.r[..self.n]
    }
}

fn add_outer(m: &mut [[f64; NFULL]; NFULL], c: &[f64; NFULL], k: f64) {
    for i in 0..NFULL {
        for j in 0..NFULL {
            m[i][j] += k * c[i] * c[j];
        }
    }
}

fn unit(i: usize) -> [f64; NFULL] {
    let mut c = [0.0; NFULL];
    c[i] = 1.0;
    c
}

fn apply(act: &mut NodeActions, f: Fixity, c: [f64; NFULL]) {
    match f {
        Fixity::Fixed => act.rows.push(c),
        Fixity::Spring(k) if k > 0.0 => add_outer(&mut act.spring, &c, k),
        _ => {}
    }
}

/// Assemble K and Kg for `m` on nodes `x` (which contain every key point),
/// with the pre-buckling moment field `mf`.
pub fn assemble(m: &Member, x: &[f64], mf: &MomentField) -> System {
    let mut sys = System::default();
    assemble_into(&mut sys, m, x, mf);
    sys
}

/// [`assemble`] into an existing system, reusing its storage (the solve
/// driver keeps two systems and alternates them over the mesh levels, so a
/// solve allocates its matrices once). The result does not depend on what
/// `sys` held before.
pub fn assemble_into(sys: &mut System, m: &Member, x: &[f64], mf: &MomentField) {
    let nn = x.len();
    let ne = nn - 1;
    // Element data.
    let ax = m
        .axial
        .map(|a| [a.n, a.zeta_centroid / PI, (a.rho / PI).powi(2)])
        .unwrap_or([0.0; 3]);
    let mut els = std::mem::take(&mut sys.els);
    els.clear();
    els.extend((0..ne).map(|e| {
        let (a, b) = (x[e], x[e + 1]);
        let mid = 0.5 * (a + b);
        let s = m.stiffness_at(mid);
        let mut spring = [0.0; 3];
        for c in &m.continuous {
            if mid > c.from && mid < c.to {
                let z = c.zeta / PI;
                spring[0] += c.lateral;
                spring[1] -= c.lateral * z;
                spring[2] += c.lateral * z * z + c.twist;
            }
        }
        ElementData {
            h: b - a,
            eiz: s.eiz,
            git: s.git,
            eiw: s.eiw,
            beta: s.beta,
            m: mf.on(a, b),
            qa: distributed_on(m, a, b, |z| z / PI),
            axial: ax,
            spring,
        }
    }));

    // Node actions, kept only for the few nodes where something acts
    // (supports, restraints, point loads); every other node carries warping
    // continuity alone.
    let mut acts = Acts::default();
    let warping_at = |i: usize| {
        let l = if i > 0 { els[i - 1].eiw } else { 0.0 };
        let r = if i < ne { els[i].eiw } else { 0.0 };
        l > 0.0 || r > 0.0
    };
    let sup = |i: usize, s: &Support, acts: &mut Acts| {
        let a = acts.at(i);
        apply(a, s.lateral, unit(0));
        apply(a, s.lateral_rotation, unit(1));
        apply(a, s.twist, unit(2));
        if warping_at(i) {
            match s.warping {
                Fixity::Fixed => {
                    a.rows.push(unit(3));
                    a.rows.push(unit(4));
                }
                Fixity::Spring(k) if k > 0.0 => {
                    add_outer(&mut a.spring, &unit(if i + 1 == nn { 3 } else { 4 }), k)
                }
                _ => {}
            }
        }
        if !s.twist.is_free() && i != 0 && i + 1 != nn {
            a.torque = true;
        }
    };
    sup(0, &m.start, &mut acts);
    sup(nn - 1, &m.end, &mut acts);
    for s in &m.supports {
        sup(node_at(x, s.at), &s.support, &mut acts);
    }
    for r in &m.restraints {
        let i = node_at(x, r.at);
        let a = r.zeta / PI;
        let mut c = unit(0);
        c[2] = -a;
        let act = acts.at(i);
        apply(act, r.lateral, c);
        apply(act, r.twist, unit(2));
        act.torque |= !r.twist.is_free() || (!r.lateral.is_free() && a != 0.0);
    }
    for l in &m.loads {
        if let Load::Point { at, fz, zeta } = *l {
            let act = acts.at(node_at(x, at));
            act.geo[2][2] += fz * zeta / PI;
            act.torque |= zeta != 0.0 && fz != 0.0;
        }
    }

    // DOF maps.
    let mut dofs = std::mem::take(&mut sys.dofs);
    dofs.clear();
    let mut off = 0;
    let tied_sel = selection(&TIED, 4);
    for i in 0..nn {
        let Some(a) = acts.get_mut(i) else {
            dofs.push(NodeDofs {
                offset: off,
                r: 4,
                t: TIED,
                sel: tied_sel,
                tied: true,
            });
            off += 4;
            continue;
        };
        let interior = i > 0 && i + 1 < nn;
        let split = interior && a.torque && els[i - 1].eiw == 0.0 && els[i].eiw == 0.0;
        if !split {
            let mut c = [0.0; NFULL];
            c[3] = 1.0;
            c[4] = -1.0;
            a.rows.push(c);
        }
        // At the ends one warping DOF is unused: tie it as well.
        let (t, r) = null_space(a.rows.as_slice());
        dofs.push(NodeDofs {
            offset: off,
            r,
            t,
            sel: selection(&t, r),
            tied: r == 4 && t == TIED,
        });
        off += r;
    }
    let n = off;
    let bw = dofs
        .windows(2)
        .map(|w| w[0].r + w[1].r)
        .max()
        .unwrap_or(1)
        .max(1)
        - 1;
    let mut k = std::mem::take(&mut sys.k);
    let mut g = std::mem::take(&mut sys.g);
    k.reset(n, bw);
    g.reset(n, bw);

    // Element matrices.
    for (e, ed) in els.iter().enumerate() {
        let ke = element::stiffness(ed);
        let ge = element::geometric(ed);
        scatter_element(&mut k, &mut g, &ke, &ge, &dofs[e], &dofs[e + 1]);
    }
    // Node matrices.
    for (i, a) in &acts.0 {
        scatter_node(&mut k, &a.spring, &dofs[*i]);
        scatter_node(&mut g, &a.geo, &dofs[*i]);
    }
    sys.x.clear();
    sys.x.extend_from_slice(x);
    sys.dofs = dofs;
    sys.k = k;
    sys.g = g;
    sys.els = els;
}

/// Full DOFs of an element end: left node uses φ'₊ (index 4), right node φ'₋ (3).
const LEFT: [usize; 4] = [0, 1, 2, 4];
const RIGHT: [usize; 4] = [0, 1, 2, 3];

fn scatter_element(
    k: &mut BandMatrix,
    g: &mut BandMatrix,
    ke: &Mat8,
    ge: &Mat8,
    d1: &NodeDofs,
    d2: &NodeDofs,
) {
    // Fastest path: two nodes with warping continuity only, whose eight
    // reduced DOFs are the element's local DOFs in order.
    if d1.tied && d2.tied && d2.offset == d1.offset + 4 && k.bandwidth() == 7 {
        k.add_block8(d1.offset, ke);
        g.add_block8(d1.offset, ge);
        return;
    }
    // Fast path: every full DOF of both nodes is held or equals one reduced
    // DOF (coefficient 1), so each local DOF has at most one global index.
    if let (Some(s1), Some(s2)) = (d1.sel, d2.sel) {
        let mut gidx = [usize::MAX; 8];
        for l in 0..8 {
            let (d, s, f) = if l < 4 {
                (d1, &s1, LEFT[l])
            } else {
                (d2, &s2, RIGHT[l - 4])
            };
            if let Some(c) = s[f] {
                gidx[l] = d.offset + c as usize;
            }
        }
        for i in 0..8 {
            let gi = gidx[i];
            if gi == usize::MAX {
                continue;
            }
            for j in 0..8 {
                let gj = gidx[j];
                if gj == usize::MAX || gi < gj {
                    continue;
                }
                k.add_lower(gi, gj, ke[i][j]);
                g.add_lower(gi, gj, ge[i][j]);
            }
        }
        return;
    }
    // For each local full DOF, its (global reduced index, coefficient) list.
    let mut lists: [([(usize, f64); NFULL], usize); 8] = [([(0, 0.0); NFULL], 0); 8];
    for l in 0..8 {
        let (d, f) = if l < 4 {
            (d1, LEFT[l])
        } else {
            (d2, RIGHT[l - 4])
        };
        let mut cnt = 0;
        for c in 0..d.r {
            let v = d.t[f][c];
            if v != 0.0 {
                lists[l].0[cnt] = (d.offset + c, v);
                cnt += 1;
            }
        }
        lists[l].1 = cnt;
    }
    for i in 0..8 {
        for j in 0..8 {
            let (kij, gij) = (ke[i][j], ge[i][j]);
            if kij == 0.0 && gij == 0.0 {
                continue;
            }
            for &(gi, ci) in &lists[i].0[..lists[i].1] {
                for &(gj, cj) in &lists[j].0[..lists[j].1] {
                    if gi >= gj {
                        let c = ci * cj;
                        k.add_lower(gi, gj, c * kij);
                        g.add_lower(gi, gj, c * gij);
                    }
                }
            }
        }
    }
}

fn scatter_node(mat: &mut BandMatrix, s: &[[f64; NFULL]; NFULL], d: &NodeDofs) {
    if s.iter().all(|r| r.iter().all(|&v| v == 0.0)) {
        return;
    }
    for a in 0..d.r {
        for b in 0..=a {
            let mut v = 0.0;
            for i in 0..NFULL {
                for j in 0..NFULL {
                    v += d.t[i][a] * s[i][j] * d.t[j][b];
                }
            }
            if v != 0.0 {
                mat.add_lower(d.offset + a, d.offset + b, v);
            }
        }
    }
}

impl System {
    /// Number of reduced DOFs.
    pub fn n(&self) -> usize {
        self.k.n()
    }
    /// Number of elements.
    pub fn elements(&self) -> usize {
        self.x.len() - 1
    }
    /// Full nodal values [v, v', φ, φ'₋, φ'₊] from a reduced vector.
    pub fn expand(&self, red: &[f64]) -> Vec<[f64; NFULL]> {
        self.dofs
            .iter()
            .map(|d| {
                let mut f = [0.0; NFULL];
                for (i, fi) in f.iter_mut().enumerate() {
                    *fi = (0..d.r).map(|c| d.t[i][c] * red[d.offset + c]).sum();
                }
                f
            })
            .collect()
    }
    /// Reduced vector that best reproduces full nodal values (least squares per node).
    pub fn restrict(&self, full: &[[f64; NFULL]]) -> Vec<f64> {
        let mut out = vec![0.0; self.n()];
        for (d, f) in self.dofs.iter().zip(full) {
            restrict_node(d, f, &mut out);
        }
        out
    }
    /// A mode on the coarser nested mesh `coarse`, interpolated (Hermite) at
    /// this mesh's nodes and restricted to its reduced DOFs: the start of
    /// the next level's iteration. Equal to `restrict` of `interpolate` at
    /// every node, with the coarse element found by a forward walk.
    pub fn prolong(&self, coarse: &System, red: &[f64]) -> Vec<f64> {
        let full = coarse.expand(red);
        let mut out = vec![0.0; self.n()];
        let last = coarse.x.len() - 2;
        let mut e = 0;
        for (&xq, d) in self.x.iter().zip(&self.dofs) {
            while e < last && coarse.x[e + 1] <= xq {
                e += 1;
            }
            restrict_node(d, &coarse.interpolate_on(&full, e, xq), &mut out);
        }
        out
    }
    /// Hermite interpolation of full nodal fields at position `xq`.
    pub fn interpolate(&self, full: &[[f64; NFULL]], xq: f64) -> [f64; NFULL] {
        let mut e = match self.x.binary_search_by(|p| p.total_cmp(&xq)) {
            Ok(i) => i,
            Err(i) => i.saturating_sub(1),
        };
        if e + 1 >= self.x.len() {
            e = self.x.len() - 2;
        }
        self.interpolate_on(full, e, xq)
    }
    /// [`System::interpolate`] on element `e`.
    fn interpolate_on(&self, full: &[[f64; NFULL]], e: usize, xq: f64) -> [f64; NFULL] {
        let h = self.x[e + 1] - self.x[e];
        let xi = ((xq - self.x[e]) / h).clamp(0.0, 1.0);
        let (n, d, _) = element::hermite(xi, h);
        let (a, b) = (&full[e], &full[e + 1]);
        let v = n[0] * a[0] + n[1] * a[1] + n[2] * b[0] + n[3] * b[1];
        let dv = d[0] * a[0] + d[1] * a[1] + d[2] * b[0] + d[3] * b[1];
        let p = n[0] * a[2] + n[1] * a[4] + n[2] * b[2] + n[3] * b[3];
        let dp = d[0] * a[2] + d[1] * a[4] + d[2] * b[2] + d[3] * b[3];
        [v, dv, p, dp, dp]
    }
}

/// Least-squares reduced values of one node from its full values, written
/// into `out` at the node's offset.
fn restrict_node(d: &NodeDofs, f: &[f64; NFULL], out: &mut [f64]) {
    if let Some(sel) = d.sel {
        for (fi, c) in sel.iter().enumerate() {
            if let Some(c) = c {
                out[d.offset + *c as usize] = f[fi];
            }
        }
        return;
    }
    // Normal equations (TᵀT)·r = Tᵀ·f, at most 5×5, by Gauss–Jordan.
    let r = d.r;
    let mut a = [[0.0; NFULL + 1]; NFULL];
    for i in 0..r {
        for j in 0..r {
            a[i][j] = (0..NFULL).map(|k| d.t[k][i] * d.t[k][j]).sum();
        }
        a[i][r] = (0..NFULL).map(|k| d.t[k][i] * f[k]).sum();
    }
    for c in 0..r {
        let p = a[c][c];
        if p.abs() < 1e-300 {
            continue;
        }
        for i in 0..r {
            if i != c {
                let q = a[i][c] / p;
                for j in c..=r {
                    a[i][j] -= q * a[c][j];
                }
            }
        }
    }
    for i in 0..r {
        out[d.offset + i] = if a[i][i] != 0.0 {
            a[i][r] / a[i][i]
        } else {
            0.0
        };
    }
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn null_space_of_height_restraint() {
        // v − a·φ = 0 and φ'₋ = φ'₊: basis must satisfy both.
        let a = 0.3;
        let rows = [[1.0, 0.0, -a, 0.0, 0.0], [0.0, 0.0, 0.0, 1.0, -1.0]];
        let (t, r) = null_space(&rows);
        assert_eq!(r, 3);
        for c in 0..r {
            for row in &rows {
                let s: f64 = (0..NFULL).map(|i| row[i] * t[i][c]).sum();
                assert!(s.abs() < 1e-14);
            }
        }
    }

    #[test]
    fn many_restraints_at_one_node_keep_their_null_space() {
        // Twenty rows, mostly repeated, at one node: the same basis as the
        // three distinct ones (exactness of the elimination, no source needed
        // beyond linear algebra).
        let mut rows = Rows::default();
        for k in 0..20 {
            rows.push([1.0, 0.0, -0.1 * (k % 2) as f64, 0.0, 0.0]);
            rows.push([0.0, 0.0, 0.0, 1.0, -1.0]);
        }
        let (_, r) = null_space(rows.as_slice());
        assert_eq!(r, 2); // v = φ = 0 and warping tied: v' and φ' remain
    }

    #[test]
    fn two_heights_fix_both_v_and_phi() {
        let rows = [
            [1.0, 0.0, -0.2, 0.0, 0.0],
            [1.0, 0.0, 0.4, 0.0, 0.0],
            [0.0, 0.0, 0.0, 1.0, -1.0],
        ];
        let (t, r) = null_space(&rows);
        assert_eq!(r, 2);
        for c in 0..r {
            assert!(t[0][c].abs() < 1e-14 && t[2][c].abs() < 1e-14);
        }
    }
}
