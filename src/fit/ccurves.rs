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
//! guarded). C3 (monosymmetry) is not fitted: a family's axes do not sweep
//! the monosymmetry parameter.
//!
//! # References
//! - NCCI SN003a, *Elastic critical moment for lateral torsional buckling*,
//!   SCI/Access Steel (the three-factor form, k = kw = 1, doubly symmetric).
//! - Kiefer, "Sequential minimax search for a maximum", Proc. AMS 4 (1953)
//!   502–506 (golden-section search).

use super::poly::{powers, smooth};
use super::{Coef, Domain, FitError, Sample, Transform, typst_num};
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

/// The per-κ fit.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PerKappa {
    /// κ.
    pub kappa: f64,
    /// C1.
    pub c1: f64,
    /// C2.
    pub c2: f64,
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
    let (lo, hi, n) = (-6.0, 6.0, 241);
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
    let mut pk = PerKappa {
        kappa,
        c1,
        c2,
        points: used.len(),
        c1_at_zeta0: pts
            .iter()
            .find(|(z, _)| *z == 0.0)
            .map(|&(_, mu)| mu / three_factor(1.0, 0.0, kappa, 0.0)),
        max_rel: 0.0,
        unconservative_zeta_positive: 0.0,
        unconservative_zeta_negative: 0.0,
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

/// The fitted curves, printed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CCurvesModel {
    /// u = (ln κ − a)/b.
    pub u: Transform,
    /// C1 = Σ a_i·u^i.
    pub c1: Vec<Coef>,
    /// C2 = Σ b_i·u^i.
    pub c2: Vec<Coef>,
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
    /// C2 polynomial in u.
    pub c2: Vec<f64>,
    /// Largest deviation of the smoothed C1 from the per-κ values (relative).
    pub c1_smoothing: f64,
    /// Largest deviation of the smoothed C2 (relative to max(|C2|, 0.1)).
    pub c2_smoothing: f64,
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
    let mut per = Vec::new();
    for &k in &ks {
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
    let (c2, d2) = smooth(&us, &c2s, 0.1, target / 5.0, 5);
    Ok(CCurvesFit {
        per_kappa: per,
        u,
        c1,
        c2,
        c1_smoothing: d1,
        c2_smoothing: d2,
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
    /// μcr at (κ, ζ).
    pub fn mu_cr(&self, kappa: f64, zeta: f64) -> f64 {
        let (c1, c2) = self.c(kappa);
        three_factor(c1, c2, kappa, zeta)
    }
    /// Printed coefficients: the transform, then C1's and C2's.
    pub fn coefficients(&self) -> Vec<Coef> {
        let mut c = vec![self.u.shift.clone(), self.u.scale.clone()];
        c.extend(self.c1.iter().cloned());
        c.extend(self.c2.iter().cloned());
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
        format!(
            "mu_\"cr\" = C_1 pi (sqrt(1 + kappa^2 + (C_2 zeta)^2) - C_2 zeta), quad C_1 = {}, quad C_2 = {}, quad u = {num} / {}",
            poly_typst(&self.c1),
            poly_typst(&self.c2),
            typst_num(&self.u.scale.text)
        )
    }
}
