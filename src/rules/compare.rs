//! Comparison of a rule with the engine: the verdict of one case, the root
//! update used to refine the frontier r = 1 between grid points, and the
//! assembly of refined crossings into polylines (marching squares on the
//! (κ, ζ) grid, each crossing found by the engine, never interpolated).
//!
//! ```text
//! r = Mcr(rule)/Mcr(FE)          both at the largest |M|
//! indeterminate    |r − 1| ≤ e   (e the FE relative error estimate)
//! unconservative   r > 1 + t     (t the rule tolerance, default 0.001)
//! conservative     otherwise
//! ```
//!
//! # References
//! - Dowell, M. & Jarratt, P. (1971). A modified regula falsi method for computing the root of
//!   an equation. *BIT* 11, 168–174 (the Illinois update of [`illinois`]).
//! - Lorensen, W. E. & Cline, H. E. (1987). Marching cubes. *SIGGRAPH '87*, 163–169 (the
//!   two-dimensional case, marching squares, with the saddle decided by the cell mean).

use std::collections::BTreeMap;

/// The verdict of one case.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Verdict {
    /// r ≤ 1 + tolerance and outside the FE error band.
    Conservative,
    /// r > 1 + tolerance and outside the FE error band.
    Unconservative,
    /// |r − 1| within the FE error estimate.
    Indeterminate,
    /// The rule does not cover the case (never compared).
    NotApplicable,
}

impl Verdict {
    /// The CSV word.
    pub fn as_str(self) -> &'static str {
        match self {
            Verdict::Conservative => "conservative",
            Verdict::Unconservative => "unconservative",
            Verdict::Indeterminate => "indeterminate",
            Verdict::NotApplicable => "not-applicable",
        }
    }
}

/// Default rule tolerance: ten times the default solver tolerance (1e-4).
pub const DEFAULT_TOLERANCE: f64 = 1e-3;

/// The verdict of a ratio r with FE error estimate `estimate` and rule tolerance `tol`.
///
/// ```text
/// |r − 1| ≤ e → indeterminate;  r > 1 + t → unconservative;  else conservative
/// ```
pub fn verdict(r: f64, estimate: f64, tol: f64) -> Verdict {
    if (r - 1.0).abs() <= estimate {
        Verdict::Indeterminate
    } else if r > 1.0 + tol {
        Verdict::Unconservative
    } else {
        Verdict::Conservative
    }
}

/// A bracket of a sign change of g = r − 1 along one grid line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bracket {
    /// One end (parameter, g).
    pub a: (f64, f64),
    /// The other end.
    pub b: (f64, f64),
    /// Which end was kept last (−1 a, +1 b, 0 none), for the Illinois halving.
    pub kept: i8,
}

/// The next trial point of a bracket (false position with the Illinois
/// modification: an end kept twice in a row has its g halved).
///
/// ```text
/// x = b − g_b·(b − a)/(g_b − g_a)
/// ```
pub fn illinois(br: &Bracket) -> f64 {
    let (xa, ga) = br.a;
    let (xb, gb) = br.b;
    let x = xb - gb * (xb - xa) / (gb - ga);
    if x.is_finite() && x > xa.min(xb) && x < xa.max(xb) {
        x
    } else {
        0.5 * (xa + xb)
    }
}

/// Update a bracket with the value g at x.
pub fn update(br: &mut Bracket, x: f64, g: f64) {
    if g * br.b.1 < 0.0 {
        // Root between x and b: a is replaced.
        br.a = (x, g);
        if br.kept == 1 {
            br.b.1 *= 0.5;
        }
        br.kept = 1;
    } else {
        br.b = (x, g);
        if br.kept == -1 {
            br.a.1 *= 0.5;
        }
        br.kept = -1;
    }
}

/// A grid edge: between (i, j) and (i + 1, j) (`along_i`) or (i, j + 1).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Edge {
    /// 0: along the first grid direction (κ), 1: along the second (ζ).
    pub dir: u8,
    /// First index.
    pub i: usize,
    /// Second index.
    pub j: usize,
}

/// Edges of a grid (ni × nj values, None where not compared) whose ends
/// have values of opposite sign.
pub fn sign_changes(ni: usize, nj: usize, g: &dyn Fn(usize, usize) -> Option<f64>) -> Vec<Edge> {
    let mut out = Vec::new();
    for i in 0..ni {
        for j in 0..nj {
            if i + 1 < ni
                && let (Some(a), Some(b)) = (g(i, j), g(i + 1, j))
                && a * b < 0.0
            {
                out.push(Edge { dir: 0, i, j });
            }
            if j + 1 < nj
                && let (Some(a), Some(b)) = (g(i, j), g(i, j + 1))
                && a * b < 0.0
            {
                out.push(Edge { dir: 1, i, j });
            }
        }
    }
    out
}

/// Chain refined crossings into polylines: within each grid cell whose four
/// corners are compared, crossings on two edges are joined (four: the saddle
/// is decided by the mean of the corners); chains are followed from their
/// ends, then closed loops. Returns the edges of each polyline in order,
/// polylines in a deterministic order.
pub fn polylines(
    ni: usize,
    nj: usize,
    g: &dyn Fn(usize, usize) -> Option<f64>,
    found: &BTreeMap<Edge, (f64, f64)>,
) -> Vec<Vec<Edge>> {
    let mut adj: BTreeMap<Edge, Vec<Edge>> = found.keys().map(|e| (*e, Vec::new())).collect();
    let link = |a: Edge, b: Edge, adj: &mut BTreeMap<Edge, Vec<Edge>>| {
        adj.get_mut(&a).expect("found").push(b);
        adj.get_mut(&b).expect("found").push(a);
    };
    for i in 0..ni.saturating_sub(1) {
        for j in 0..nj.saturating_sub(1) {
            let (Some(g00), Some(g10), Some(g01), Some(g11)) =
                (g(i, j), g(i + 1, j), g(i, j + 1), g(i + 1, j + 1))
            else {
                continue;
            };
            let bottom = Edge { dir: 0, i, j };
            let top = Edge {
                dir: 0,
                i,
                j: j + 1,
            };
            let left = Edge { dir: 1, i, j };
            let right = Edge {
                dir: 1,
                i: i + 1,
                j,
            };
            let cut: Vec<Edge> = [bottom, right, top, left]
                .into_iter()
                .filter(|e| found.contains_key(e))
                .collect();
            match cut.len() {
                2 => link(cut[0], cut[1], &mut adj),
                4 => {
                    let centre = 0.25 * (g00 + g10 + g01 + g11);
                    if centre * g00 > 0.0 {
                        // The 00–11 diagonal is connected: cut off corners 10 and 01.
                        link(bottom, right, &mut adj);
                        link(left, top, &mut adj);
                    } else {
                        link(bottom, left, &mut adj);
                        link(top, right, &mut adj);
                    }
                }
                _ => {}
            }
        }
    }
    let mut seen: BTreeMap<Edge, bool> = adj.keys().map(|e| (*e, false)).collect();
    let mut out = Vec::new();
    let walk = |start: Edge, seen: &mut BTreeMap<Edge, bool>| {
        let mut line = vec![start];
        seen.insert(start, true);
        let mut cur = start;
        while let Some(next) = adj[&cur].iter().copied().find(|n| !seen[n]) {
            seen.insert(next, true);
            line.push(next);
            cur = next;
        }
        line
    };
    let ends: Vec<Edge> = adj
        .iter()
        .filter(|(_, v)| v.len() <= 1)
        .map(|(e, _)| *e)
        .collect();
    for e in ends {
        if !seen[&e] {
            out.push(walk(e, &mut seen));
        }
    }
    let rest: Vec<Edge> = adj.keys().copied().collect();
    for e in rest {
        if !seen[&e] {
            let mut l = walk(e, &mut seen);
            l.push(e); // close the loop
            out.push(l);
        }
    }
    out
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn verdict_bands() {
        assert_eq!(verdict(1.0005, 1e-4, 1e-3), Verdict::Conservative);
        assert_eq!(verdict(1.002, 1e-4, 1e-3), Verdict::Unconservative);
        assert_eq!(verdict(1.002, 3e-3, 1e-3), Verdict::Indeterminate);
        assert_eq!(verdict(0.9, 1e-4, 1e-3), Verdict::Conservative);
    }

    #[test]
    fn illinois_finds_a_root() {
        // g(x) = x³ − 2, root 2^(1/3) (closed form).
        let f = |x: f64| x * x * x - 2.0;
        let mut b = Bracket {
            a: (0.0, f(0.0)),
            b: (2.0, f(2.0)),
            kept: 0,
        };
        let mut x = 0.0;
        for _ in 0..60 {
            x = illinois(&b);
            let g = f(x);
            if g.abs() < 1e-13 {
                break;
            }
            update(&mut b, x, g);
        }
        assert!((x - 2f64.powf(1.0 / 3.0)).abs() < 1e-12);
    }

    #[test]
    fn polylines_follow_a_circle() {
        // g = x² + y² − r² on a 6 × 6 grid: one closed loop through every crossing.
        let n = 6;
        let val =
            |i: usize, j: usize| Some((i as f64 - 2.5).powi(2) + (j as f64 - 2.5).powi(2) - 4.0);
        let edges = sign_changes(n, n, &val);
        let found: BTreeMap<Edge, (f64, f64)> = edges.iter().map(|e| (*e, (0.0, 0.0))).collect();
        let lines = polylines(n, n, &val, &found);
        assert_eq!(lines.len(), 1);
        assert_eq!(lines[0].len(), edges.len() + 1);
        assert_eq!(lines[0].first(), lines[0].last());
    }
}
