//! The `c-curves` form: C1(κ) and C2(κ) of the three-factor form
//!
//! ```text
//! μcr ≈ C1 · π · [ √(1 + κ² + (C2·ζ)²) − C2·ζ ]
//! ```
//!
//! Per κ of the grid, least squares on the relative error across ζ
//! (|ζ| < 0.1 excluded, where C2 is undetermined): for a fixed C2 the best
//! C1 is closed-form,
//!
//! ```text
//! g_i = π·[√(1 + κ² + (C2·ζ_i)²) − C2·ζ_i],   r_i = g_i/μ_i,   C1 = Σ r_i / Σ r_i²
//! ```
//!
//! and C2 minimises the remaining sum of squares, found by a scan over
//! [−6, 6] and a golden-section refinement. Each coefficient is then
//! smoothed as a polynomial in u = (ln κ − a)/b of the fewest degree that
//! follows the per-κ values within a fifth of the target (leave-one-out
//! guarded).
//!
//! Across a monosymmetry axis δ (a family sweeping the path `delta`) the
//! form gains C3, written in this project's parameters as
//!
//! ```text
//! μcr ≈ C1 · π · [ √(1 + κ² + (C2·ζ + C3·π·δ/2)²) − (C2·ζ + C3·π·δ/2) ]
//! ```
//!
//! Sign: the published form carries (C2·zg − C3·zj) with
//! zj = zs − (1/2Iy)·∫ z·(y² + z²) dA = −βy/2 (z up, the domain notes' βy);
//! made dimensionless like ζ, ζj = (π/L)·√(E·Iz/G·It)·zj = −π·δ/2, so
//! C2·ζg − C3·ζj = C2·ζ + C3·π·δ/2. Under uniform sagging moment with
//! forks the closed form μcr = π·[√(1 + κ² + (π·δ/2)²) − π·δ/2] (larger
//! flange on top: δ < 0, higher μcr) is this form with C1 = 1, C3 = 1 at
//! every κ. Under hogging moment the compression flange is the bottom one
//! and the sign of δ in the closed form flips: the fit then gives C3 = −1.
//! C3 here therefore belongs to the geometric δ of the domain notes (βy
//! with z up), not to the compression flange; tables that quote C3 for the
//! compression flange (a positive C3 for a hogging span) differ in sign.
//!
//! Per κ the fit is least squares on the relative error across (ζ, δ):
//! points with |ζ| ≥ 0.1 or δ ≠ 0 are used (|ζ| < 0.1 at δ = 0 is left
//! out, as without δ; C3 is determined by the δ ≠ 0 points). C1 is
//! eliminated in closed form as above, (C2, C3) start from a scan over
//! [−6, 6]² and all three are refined by Levenberg–Marquardt. Without a ζ
//! axis (every point at ζ = 0, for example end moments) C2 is not
//! determined: it is reported as such and left out of the formula, which
//! then holds at ζ = 0 only.
//!
//! # References
//! - NCCI SN003a, *Elastic critical moment for lateral torsional buckling*,
//!   SCI/Access Steel (the three-factor form, k = kw = 1, doubly symmetric).
//! - Kiefer, "Sequential minimax search for a maximum", Proc. AMS 4 (1953)
//!   502–506 (golden-section search).
//! - ENV 1993-1-1:1992/A1, Annex F, F.1.2 (the general three-factor form
//!   with C3 and zj).
//! - Trahair, *Flexural-Torsional Buckling of Structures*, E & FN Spon
//!   1993 (monosymmetric beams under uniform moment, the closed form
//!   above, written there with the opposite sign convention).
//! - Moré, "The Levenberg–Marquardt algorithm: implementation and theory",
//!   Springer LNM 630 (1978) 105–116 (the `levenberg-marquardt` crate).

use super::poly::{powers, smooth};
use super::{Coef, Domain, FitError, Sample, Transform, typst_num};
use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{DMatrix, DVector, Dyn, Owned};
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// |ζ| below this is left out of the per-κ fits.
pub const ZETA_MIN: f64 = 0.1;

/// The three-factor value.
///
/// ```text
/// μcr = C1 · π · [ √(1 + κ² + (C2·ζ)²) − C2·ζ ]
/// ```
pub fn three_factor(c1: f64, c2: f64, kappa: f64, zeta: f64) -> f64 {
    c1 * PI * ((1.0 + kappa * kappa + (c2 * zeta).powi(2)).sqrt() - c2 * zeta)
}

/// The three-factor value with monosymmetry (C3 across δ; see the module
/// documentation for the sign).
///
/// ```text
/// w = C2·ζ + C3·π·δ/2,   μcr = C1 · π · [ √(1 + κ² + w²) − w ]
/// ```
pub fn three_factor_mono(c1: f64, c2: f64, c3: f64, kappa: f64, zeta: f64, delta: f64) -> f64 {
    let w = c2 * zeta + c3 * PI * delta / 2.0;
    c1 * PI * ((1.0 + kappa * kappa + w * w).sqrt() - w)
}

/// The per-κ fit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PerKappa {
    /// κ.
    pub kappa: f64,
    /// C1.
    pub c1: f64,
    /// C2 (0 when not determined: see `c2_determined`).
    pub c2: f64,
    /// False when the points carry no |ζ| ≥ 0.1 (ζ not swept).
    pub c2_determined: bool,
    /// C3 (fits across δ only).
    pub c3: Option<f64>,
    /// Points used.
    pub points: usize,
    /// μcr(κ, 0)/μ0 when the grid holds ζ = 0: C1 by its definition in the
    /// three-factor form.
    pub c1_at_zeta0: Option<f64>,
    /// Largest relative error of the per-κ fit on those points.
    pub max_rel: f64,
    /// Largest unconservative error (fit above FE) with ζ > 0.
    pub unconservative_zeta_positive: f64,
    /// Largest unconservative error with ζ < 0.
    pub unconservative_zeta_negative: f64,
    /// Largest unconservative error at ζ = 0 (only a fit across δ uses
    /// such points, those with δ ≠ 0; 0 otherwise).
    pub unconservative_zeta_zero: f64,
    /// What the coefficient search could not do at this κ (empty when it
    /// went as designed): a coefficient at the edge of the scanned range,
    /// a refinement that did not improve on the scan.
    pub search_notes: Vec<String>,
}

/// Half-width of the scanned range of C2 and C3.
const SCAN: f64 = 6.0;

fn at_scan_edge(name: &str, c: f64, step: f64) -> Option<String> {
    (c.abs() >= SCAN - step).then(|| {
        format!("{name} = {c:.4} lies at the edge of the scanned range [-{SCAN}, {SCAN}]: the optimum may lie outside it")
    })
}

fn c1_and_ss(c2: f64, kappa: f64, pts: &[(f64, f64)]) -> (f64, f64) {
    let r: Vec<f64> = pts
        .iter()
        .map(|&(z, mu)| three_factor(1.0, c2, kappa, z) / mu)
        .collect();
    let s1: f64 = r.iter().sum();
    let s2: f64 = r.iter().map(|x| x * x).sum();
    let c1 = s1 / s2;
    let ss = r.iter().map(|x| (c1 * x - 1.0).powi(2)).sum();
    (c1, ss)
}

/// C1 and C2 at one κ from (ζ, μcr) pairs (|ζ| ≥ 0.1 only).
pub fn fit_at(kappa: f64, pts: &[(f64, f64)]) -> Result<PerKappa, FitError> {
    let used: Vec<(f64, f64)> = pts
        .iter()
        .copied()
        .filter(|(z, _)| z.abs() >= ZETA_MIN)
        .collect();
    if used.len() < 2 {
        return Err(FitError::Data(format!(
            "at kappa = {kappa} fewer than two zeta values with |zeta| >= {ZETA_MIN}: C2 is undetermined; add zeta values (both signs are best)"
        )));
    }
    let ss = |c2: f64| c1_and_ss(c2, kappa, &used).1;
    let (lo, hi, n) = (-SCAN, SCAN, 241);
    let grid: Vec<f64> = (0..n)
        .map(|i| lo + (hi - lo) * i as f64 / (n - 1) as f64)
        .collect();
    let ib = (0..n)
        .min_by(|&a, &b| ss(grid[a]).total_cmp(&ss(grid[b])))
        .expect("grid");
    let (mut a, mut b) = (grid[ib.saturating_sub(1)], grid[(ib + 1).min(n - 1)]);
    let g = (5f64.sqrt() - 1.0) / 2.0;
    let (mut x1, mut x2) = (b - g * (b - a), a + g * (b - a));
    let (mut f1, mut f2) = (ss(x1), ss(x2));
    for _ in 0..100 {
        if f1 < f2 {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = b - g * (b - a);
            f1 = ss(x1);
        } else {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = a + g * (b - a);
            f2 = ss(x2);
        }
        if (b - a).abs() < 1e-12 {
            break;
        }
    }
    let c2 = 0.5 * (a + b);
    let (c1, _) = c1_and_ss(c2, kappa, &used);
    let search_notes: Vec<String> = at_scan_edge("C2", c2, 2.0 * SCAN / 240.0)
        .into_iter()
        .collect();
    let mut pk = PerKappa {
        kappa,
        c1,
        c2,
        c2_determined: true,
        c3: None,
        points: used.len(),
        c1_at_zeta0: pts
            .iter()
            .find(|(z, _)| *z == 0.0)
            .map(|&(_, mu)| mu / three_factor(1.0, 0.0, kappa, 0.0)),
        max_rel: 0.0,
        unconservative_zeta_positive: 0.0,
        unconservative_zeta_negative: 0.0,
        unconservative_zeta_zero: 0.0,
        search_notes,
    };
    for &(z, mu) in &used {
        let e = three_factor(c1, c2, kappa, z) / mu - 1.0;
        pk.max_rel = pk.max_rel.max(e.abs());
        if z > 0.0 {
            pk.unconservative_zeta_positive = pk.unconservative_zeta_positive.max(e);
        } else {
            pk.unconservative_zeta_negative = pk.unconservative_zeta_negative.max(e);
        }
    }
    Ok(pk)
}

struct MonoProblem<'a> {
    kappa: f64,
    /// (ζ, δ, μ) of the points used.
    pts: &'a [(f64, f64, f64)],
    with_c2: bool,
    /// c1, (c2), c3.
    p: DVector<f64>,
}

impl MonoProblem<'_> {
    fn coefs(&self, p: &[f64]) -> (f64, f64, f64) {
        if self.with_c2 {
            (p[0], p[1], p[2])
        } else {
            (p[0], 0.0, p[1])
        }
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for MonoProblem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.p.copy_from(x);
    }
    fn params(&self) -> DVector<f64> {
        self.p.clone()
    }
    fn residuals(&self) -> Option<DVector<f64>> {
        let (c1, c2, c3) = self.coefs(self.p.as_slice());
        let r = DVector::from_iterator(
            self.pts.len(),
            self.pts
                .iter()
                .map(|&(z, d, mu)| three_factor_mono(c1, c2, c3, self.kappa, z, d) / mu - 1.0),
        );
        r.iter().all(|x| x.is_finite()).then_some(r)
    }
    fn jacobian(&self) -> Option<DMatrix<f64>> {
        // r = C1·g(w)/μ − 1, g = π(√(1 + κ² + w²) − w), w = C2·ζ + C3·π·δ/2,
        // g'(w) = π(w/√(1 + κ² + w²) − 1).
        let (c1, c2, c3) = self.coefs(self.p.as_slice());
        let n = self.p.len();
        let mut j = DMatrix::zeros(self.pts.len(), n);
        for (i, &(z, d, mu)) in self.pts.iter().enumerate() {
            let w = c2 * z + c3 * PI * d / 2.0;
            let root = (1.0 + self.kappa * self.kappa + w * w).sqrt();
            let g = PI * (root - w);
            let gp = PI * (w / root - 1.0);
            j[(i, 0)] = g / mu;
            if self.with_c2 {
                j[(i, 1)] = c1 * gp * z / mu;
            }
            j[(i, n - 1)] = c1 * gp * PI * d / 2.0 / mu;
        }
        j.iter().all(|x| x.is_finite()).then_some(j)
    }
}

/// C1, C2 and C3 at one κ from (ζ, δ, μcr) triples: points with
/// |ζ| ≥ 0.1 or δ ≠ 0 are used; C2 is not determined (reported so, and 0
/// in the formula) when no used point has |ζ| ≥ 0.1.
pub fn fit_at_delta(kappa: f64, pts: &[(f64, f64, f64)]) -> Result<PerKappa, FitError> {
    let used: Vec<(f64, f64, f64)> = pts
        .iter()
        .copied()
        .filter(|&(z, d, _)| z.abs() >= ZETA_MIN || d != 0.0)
        .collect();
    let with_c2 = used.iter().any(|p| p.0.abs() >= ZETA_MIN);
    if !used.iter().any(|p| p.1 != 0.0) {
        return Err(FitError::Data(format!(
            "at kappa = {kappa} no point has delta != 0: C3 is undetermined; add non-zero values to the delta axis"
        )));
    }
    let n_par = if with_c2 { 3 } else { 2 };
    if used.len() <= n_par {
        return Err(FitError::Data(format!(
            "at kappa = {kappa} {} usable points (|zeta| >= {ZETA_MIN} or delta != 0) cannot determine {n_par} coefficients; add zeta or delta values",
            used.len()
        )));
    }
    // C1 in closed form for given (C2, C3), as without δ.
    let c1_ss = |c2: f64, c3: f64| -> (f64, f64) {
        let r: Vec<f64> = used
            .iter()
            .map(|&(z, d, mu)| three_factor_mono(1.0, c2, c3, kappa, z, d) / mu)
            .collect();
        let s1: f64 = r.iter().sum();
        let s2: f64 = r.iter().map(|x| x * x).sum();
        let c1 = s1 / s2;
        (c1, r.iter().map(|x| (c1 * x - 1.0).powi(2)).sum())
    };
    let (lo, hi, n) = (-SCAN, SCAN, 121);
    let grid: Vec<f64> = (0..n)
        .map(|i| lo + (hi - lo) * i as f64 / (n - 1) as f64)
        .collect();
    let c2s: Vec<f64> = if with_c2 { grid.clone() } else { vec![0.0] };
    let mut best = (f64::INFINITY, 0.0, 0.0);
    for &c2 in &c2s {
        for &c3 in &grid {
            let ss = c1_ss(c2, c3).1;
            if ss < best.0 {
                best = (ss, c2, c3);
            }
        }
    }
    let (_, c2s0, c3s0) = best;
    let c1s0 = c1_ss(c2s0, c3s0).0;
    let start: Vec<f64> = if with_c2 {
        vec![c1s0, c2s0, c3s0]
    } else {
        vec![c1s0, c3s0]
    };
    let pr = MonoProblem {
        kappa,
        pts: &used,
        with_c2,
        p: DVector::from_vec(start.clone()),
    };
    let (done, report) = LevenbergMarquardt::new().minimize(pr);
    // Keep the scan's point when the refinement did not improve on it.
    let refined: Vec<f64> = done.p.iter().copied().collect();
    let ss_of = |p: &[f64]| -> f64 {
        let (c1, c2, c3) = done.coefs(p);
        used.iter()
            .map(|&(z, d, mu)| (three_factor_mono(c1, c2, c3, kappa, z, d) / mu - 1.0).powi(2))
            .sum()
    };
    let improved = report.termination.was_successful() && ss_of(&refined) <= ss_of(&start);
    let p = if improved { refined } else { start };
    let (c1, c2, c3) = done.coefs(&p);
    let step = 2.0 * SCAN / 120.0;
    let mut search_notes: Vec<String> = Vec::new();
    if !improved {
        search_notes.push(format!(
            "the Levenberg-Marquardt refinement did not improve on the scan: coefficients from the scan (steps of {step})"
        ));
    }
    if with_c2 {
        search_notes.extend(at_scan_edge("C2", c2, step));
    }
    search_notes.extend(at_scan_edge("C3", c3, step));
    let mut pk = PerKappa {
        kappa,
        c1,
        c2,
        c2_determined: with_c2,
        c3: Some(c3),
        points: used.len(),
        c1_at_zeta0: pts
            .iter()
            .find(|(z, d, _)| *z == 0.0 && *d == 0.0)
            .map(|&(_, _, mu)| mu / three_factor(1.0, 0.0, kappa, 0.0)),
        max_rel: 0.0,
        unconservative_zeta_positive: 0.0,
        unconservative_zeta_negative: 0.0,
        unconservative_zeta_zero: 0.0,
        search_notes,
    };
    for &(z, d, mu) in &used {
        let e = three_factor_mono(c1, c2, c3, kappa, z, d) / mu - 1.0;
        pk.max_rel = pk.max_rel.max(e.abs());
        if z > 0.0 {
            pk.unconservative_zeta_positive = pk.unconservative_zeta_positive.max(e);
        } else if z < 0.0 {
            pk.unconservative_zeta_negative = pk.unconservative_zeta_negative.max(e);
        } else {
            pk.unconservative_zeta_zero = pk.unconservative_zeta_zero.max(e);
        }
    }
    Ok(pk)
}

/// The fitted curves, printed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CCurvesModel {
    /// u = (ln κ − a)/b.
    pub u: Transform,
    /// C1 = Σ a_i·u^i.
    pub c1: Vec<Coef>,
    /// C2 = Σ b_i·u^i (empty when C2 was not determined: ζ not swept).
    pub c2: Vec<Coef>,
    /// C3 = Σ c_i·u^i (fits across δ only; empty otherwise).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub c3: Vec<Coef>,
}

/// Unrounded result.
#[derive(Debug, Clone, PartialEq)]
pub struct CCurvesFit {
    /// Per-κ values.
    pub per_kappa: Vec<PerKappa>,
    /// u transform.
    pub u: Transform,
    /// C1 polynomial in u.
    pub c1: Vec<f64>,
    /// C2 polynomial in u (empty when not determined).
    pub c2: Vec<f64>,
    /// C3 polynomial in u (fits across δ; else empty).
    pub c3: Vec<f64>,
    /// Largest deviation of the smoothed C1 from the per-κ values (relative).
    pub c1_smoothing: f64,
    /// Largest deviation of the smoothed C2 (relative to max(|C2|, 0.1)).
    pub c2_smoothing: f64,
    /// Largest deviation of the smoothed C3 (relative to max(|C3|, 0.1)).
    pub c3_smoothing: f64,
}

/// Fit per κ, then smooth in ln κ.
pub fn fit(samples: &[Sample], domain: &Domain, target: f64) -> Result<CCurvesFit, FitError> {
    let mut ks: Vec<f64> = samples.iter().map(|s| s.kappa).collect();
    ks.sort_by(f64::total_cmp);
    ks.dedup();
    if ks.first().is_some_and(|k| *k <= 0.0) {
        return Err(FitError::Data(
            "c-curves are smoothed in ln κ: κ = 0 is not allowed; start the kappa axis at a small positive value".into(),
        ));
    }
    let mono = domain.delta_range().is_some();
    let mut per = Vec::new();
    for &k in &ks {
        if mono {
            let pts: Vec<(f64, f64, f64)> = samples
                .iter()
                .filter(|s| s.kappa == k)
                .map(|s| (s.zeta, s.delta, s.mu_cr))
                .collect();
            per.push(fit_at_delta(k, &pts)?);
            continue;
        }
        let pts: Vec<(f64, f64)> = samples
            .iter()
            .filter(|s| s.kappa == k)
            .map(|s| (s.zeta, s.mu_cr))
            .collect();
        per.push(fit_at(k, &pts)?);
    }
    let u = Transform::onto_unit("u", domain.kappa_min.ln(), domain.kappa_max.ln());
    let us: Vec<f64> = per.iter().map(|p| u.apply(p.kappa.ln())).collect();
    let c1s: Vec<f64> = per.iter().map(|p| p.c1).collect();
    let c2s: Vec<f64> = per.iter().map(|p| p.c2).collect();
    let (c1, d1) = smooth(&us, &c1s, 0.0, target / 5.0, 5);
    let (c2, d2) = if per.iter().all(|p| p.c2_determined) {
        smooth(&us, &c2s, 0.1, target / 5.0, 5)
    } else if per.iter().any(|p| p.c2_determined) {
        return Err(FitError::Data(
            "C2 is determined at some kappa values and not at others (|zeta| >= 0.1 missing there); give every kappa the same zeta values".into(),
        ));
    } else {
        (Vec::new(), 0.0)
    };
    let (c3, d3) = if mono {
        let c3s: Vec<f64> = per.iter().map(|p| p.c3.unwrap_or(0.0)).collect();
        smooth(&us, &c3s, 0.1, target / 5.0, 5)
    } else {
        (Vec::new(), 0.0)
    };
    Ok(CCurvesFit {
        per_kappa: per,
        u,
        c1,
        c2,
        c3,
        c1_smoothing: d1,
        c2_smoothing: d2,
        c3_smoothing: d3,
    })
}

impl CCurvesFit {
    /// Rounded to `digits`.
    pub fn printed(&self, digits: usize) -> CCurvesModel {
        let p = |name: &str, c: &[f64]| -> Vec<Coef> {
            c.iter()
                .enumerate()
                .map(|(i, x)| Coef::new(&format!("{name}_{i}"), *x, digits))
                .collect()
        };
        CCurvesModel {
            u: self.u.clone(),
            c1: p("a", &self.c1),
            c2: p("b", &self.c2),
            c3: p("c", &self.c3),
        }
    }
}

fn poly(c: &[Coef], u: f64) -> f64 {
    powers(u, c.len().saturating_sub(1))
        .iter()
        .zip(c)
        .map(|(a, b)| a * b.value)
        .sum()
}

fn poly_typst(c: &[Coef]) -> String {
    let mut s = String::new();
    for (i, k) in c.iter().enumerate() {
        let (neg, mag) = match k.text.strip_prefix('-') {
            Some(m) => (true, m),
            None => (false, k.text.as_str()),
        };
        if i == 0 {
            if neg {
                s.push('-');
            }
        } else {
            s.push_str(if neg { " - " } else { " + " });
        }
        s.push_str(&typst_num(mag));
        match i {
            0 => {}
            1 => s.push_str(" u"),
            n => s.push_str(&format!(" u^{n}")),
        }
    }
    s
}

impl CCurvesModel {
    /// C1 and C2 at κ (printed coefficients).
    pub fn c(&self, kappa: f64) -> (f64, f64) {
        let u = self.u.apply(kappa.ln());
        (poly(&self.c1, u), poly(&self.c2, u))
    }
    /// C3 at κ (printed coefficients; 0 for a fit without δ).
    pub fn c3(&self, kappa: f64) -> f64 {
        poly(&self.c3, self.u.apply(kappa.ln()))
    }
    /// μcr at (κ, ζ) (δ = 0).
    pub fn mu_cr(&self, kappa: f64, zeta: f64) -> f64 {
        if !self.c3.is_empty() {
            return self.mu_cr_delta(kappa, zeta, 0.0);
        }
        let (c1, c2) = self.c(kappa);
        three_factor(c1, c2, kappa, zeta)
    }
    /// μcr at (κ, ζ, δ).
    pub fn mu_cr_delta(&self, kappa: f64, zeta: f64, delta: f64) -> f64 {
        let (c1, c2) = self.c(kappa);
        three_factor_mono(c1, c2, self.c3(kappa), kappa, zeta, delta)
    }
    /// Printed coefficients: the transform, then C1's, C2's and C3's.
    pub fn coefficients(&self) -> Vec<Coef> {
        let mut c = vec![self.u.shift.clone(), self.u.scale.clone()];
        c.extend(self.c1.iter().cloned());
        c.extend(self.c2.iter().cloned());
        c.extend(self.c3.iter().cloned());
        c
    }
    /// Typst math source.
    pub fn typst(&self) -> String {
        let sh = &self.u.shift.text;
        let num = if self.u.shift.value == 0.0 {
            "ln kappa".to_string()
        } else if let Some(m) = sh.strip_prefix('-') {
            format!("(ln kappa + {})", typst_num(m))
        } else {
            format!("(ln kappa - {})", typst_num(sh))
        };
        if !self.c3.is_empty() {
            let (w, c2) = if self.c2.is_empty() {
                ("C_3 (pi delta)/2".to_string(), String::new())
            } else {
                (
                    "C_2 zeta + C_3 (pi delta)/2".to_string(),
                    format!(", quad C_2 = {}", poly_typst(&self.c2)),
                )
            };
            return format!(
                "mu_\"cr\" = C_1 pi (sqrt(1 + kappa^2 + ({w})^2) - ({w})), quad C_1 = {}{c2}, quad C_3 = {}, quad u = {num} / {}",
                poly_typst(&self.c1),
                poly_typst(&self.c3),
                typst_num(&self.u.scale.text)
            );
        }
        format!(
            "mu_\"cr\" = C_1 pi (sqrt(1 + kappa^2 + (C_2 zeta)^2) - C_2 zeta), quad C_1 = {}, quad C_2 = {}, quad u = {num} / {}",
            poly_typst(&self.c1),
            poly_typst(&self.c2),
            typst_num(&self.u.scale.text)
        )
    }
}
