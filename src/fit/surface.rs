//! The `surface` form: a correction surface for μcr/μ0 over the swept
//! domain, a tensor-product polynomial in scaled, transformed variables:
//!
//! ```text
//! μcr/μ0 ≈ f(κ, ζ) = Σ c_ij · u^i · v^j   over i ≤ p, j ≤ q (tensor product) or i + j ≤ n (total degree)
//! u = (ln κ − a)/b,   v = (z − c)/d,   z = ζ (rectangle) or ζ/κ (band |ζ| ≤ c·κ)
//! ```
//!
//! The basis is chosen automatically: tensor-product and total-degree
//! candidates in order of their number of terms, the first whose largest relative error on the fit
//! grid and on held-out interior points of a 5-fold cross-validation (the
//! grid's edge always trains: the formula is used only inside) both meet the
//! target wins (else the candidate with the smallest cross-validated
//! error, flagged as missing the target).
//!
//! # References
//! - Golub & Van Loan, *Matrix Computations*, 4th ed., 2013, §5.5.
//! - Hastie, Tibshirani & Friedman, *The Elements of Statistical Learning*,
//!   2nd ed., 2009, §7.10.

use super::poly::{cv_max_rel, max_rel, powers, relative_lsq};
use super::{Coef, Domain, FitError, Sample, Transform, mu0, typst_num};
use serde::{Deserialize, Serialize};

/// Options of the surface fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SurfaceOptions {
    /// Target largest relative error (on the fit grid and held out).
    pub target: f64,
    /// Highest degree in u and in v.
    pub max_degree: usize,
    /// Cross-validation folds.
    pub folds: usize,
}

impl Default for SurfaceOptions {
    fn default() -> Self {
        SurfaceOptions {
            target: 0.01,
            max_degree: 6,
            folds: 5,
        }
    }
}

/// One term c·u^i·v^j.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Term {
    /// Power of u.
    pub i: usize,
    /// Power of v.
    pub j: usize,
    /// The coefficient as printed.
    pub coef: Coef,
}

/// A fitted surface with printed coefficients.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SurfaceModel {
    /// u = (ln κ − a)/b.
    pub u: Transform,
    /// v = (z − c)/d.
    pub v: Transform,
    /// True when z = ζ/κ (band domain), false when z = ζ.
    pub zeta_over_kappa: bool,
    /// The terms.
    pub terms: Vec<Term>,
}

/// The unrounded fit and how it was chosen.
#[derive(Debug, Clone, PartialEq)]
pub struct SurfaceFit {
    /// Degree in u.
    pub p: usize,
    /// Degree in v.
    pub q: usize,
    /// The powers (i, j) of the terms, in order.
    pub powers: Vec<(usize, usize)>,
    /// True for a full tensor product (i ≤ p, j ≤ q), false for a total
    /// degree basis (i + j ≤ max(p, q)).
    pub tensor: bool,
    /// The transforms.
    pub u: Transform,
    /// The transforms.
    pub v: Transform,
    /// Band domain.
    pub zeta_over_kappa: bool,
    /// Coefficients c_ij in the order of `powers`, unrounded.
    pub coefficients: Vec<f64>,
    /// Largest relative error on the fit grid (unrounded).
    pub train_max_rel: f64,
    /// Largest held-out relative error of the cross-validation.
    pub cv_max_rel: f64,
    /// Whether both met the target.
    pub target_met: bool,
}

fn row(u: f64, v: f64, terms: &[(usize, usize)]) -> Vec<f64> {
    let p = terms.iter().map(|t| t.0).max().unwrap_or(0);
    let q = terms.iter().map(|t| t.1).max().unwrap_or(0);
    let pu = powers(u, p);
    let pv = powers(v, q);
    terms.iter().map(|&(i, j)| pu[i] * pv[j]).collect()
}

impl SurfaceFit {
    /// μcr/μ0 with the unrounded coefficients.
    pub fn ratio(&self, kappa: f64, zeta: f64) -> f64 {
        let z = if self.zeta_over_kappa {
            zeta / kappa
        } else {
            zeta
        };
        let r = row(self.u.apply(kappa.ln()), self.v.apply(z), &self.powers);
        r.iter().zip(&self.coefficients).map(|(a, b)| a * b).sum()
    }

    /// The model with coefficients rounded to `digits` significant digits.
    pub fn printed(&self, digits: usize) -> SurfaceModel {
        let terms = self
            .powers
            .iter()
            .zip(&self.coefficients)
            .map(|(&(i, j), &c)| Term {
                i,
                j,
                coef: Coef::new(&format!("c{i}{j}"), c, digits),
            })
            .collect();
        SurfaceModel {
            u: self.u.clone(),
            v: self.v.clone(),
            zeta_over_kappa: self.zeta_over_kappa,
            terms,
        }
    }
}

/// Fit the surface to the samples over `domain`.
pub fn fit(samples: &[Sample], domain: &Domain, o: SurfaceOptions) -> Result<SurfaceFit, FitError> {
    if samples.iter().any(|s| s.kappa <= 0.0) {
        return Err(FitError::Data(
            "the surface uses ln κ: κ = 0 is not allowed; start the kappa axis at a small positive value such as 0.05".into(),
        ));
    }
    let u = Transform::onto_unit("u", domain.kappa_min.ln(), domain.kappa_max.ln());
    let [z0, z1] = domain.z_range();
    let v = Transform::onto_unit("v", z0, z1);
    let band = domain.zeta_over_kappa.is_some();
    let uv: Vec<(f64, f64)> = samples
        .iter()
        .map(|s| (u.apply(s.kappa.ln()), v.apply(domain.z(s.kappa, s.zeta))))
        .collect();
    let y: Vec<f64> = samples.iter().map(|s| s.mu_cr / mu0(s.kappa)).collect();
    let distinct = |f: &dyn Fn(&(f64, f64)) -> f64| {
        let mut d: Vec<f64> = uv.iter().map(f).collect();
        d.sort_by(f64::total_cmp);
        d.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
        d.len()
    };
    let (nk, nz) = (distinct(&|x| x.0), distinct(&|x| x.1));
    // The edge of the grid stays in every training set.
    let ext = |f: &dyn Fn(&(f64, f64)) -> f64| {
        let v: Vec<f64> = uv.iter().map(f).collect();
        (
            v.iter().copied().fold(f64::INFINITY, f64::min),
            v.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        )
    };
    let (eu, ev) = (ext(&|x| x.0), ext(&|x| x.1));
    let near = |a: f64, b: f64| (a - b).abs() < 1e-9;
    let edge: Vec<bool> = uv
        .iter()
        .map(|&(a, b)| near(a, eu.0) || near(a, eu.1) || near(b, ev.0) || near(b, ev.1))
        .collect();
    // Candidates: full tensor products (i ≤ p, j ≤ q) and total-degree
    // bases (i + j ≤ n), each within the degrees the grid can carry.
    let (pm, qm) = (
        o.max_degree.min(nk.saturating_sub(1)),
        o.max_degree.min(nz.saturating_sub(1)),
    );
    let mut cands: Vec<(Vec<(usize, usize)>, bool)> = Vec::new();
    for p in 0..=pm {
        for q in 0..=qm {
            let t: Vec<(usize, usize)> =
                (0..=p).flat_map(|i| (0..=q).map(move |j| (i, j))).collect();
            cands.push((t, true));
        }
    }
    for n in 2..=pm + qm {
        let t: Vec<(usize, usize)> = (0..=pm)
            .flat_map(|i| (0..=qm).map(move |j| (i, j)))
            .filter(|&(i, j)| i + j <= n)
            .collect();
        if !cands.iter().any(|(c, _)| *c == t) {
            cands.push((t, false));
        }
    }
    cands.retain(|(t, _)| t.len() < samples.len());
    if cands.is_empty() {
        return Err(FitError::Data(format!(
            "{} points are too few for a surface; add kappa or zeta values",
            samples.len()
        )));
    }
    let degree = |t: &[(usize, usize)]| t.iter().map(|&(i, j)| i + j).max().unwrap_or(0);
    let pmax = |t: &[(usize, usize)]| t.iter().map(|x| x.0).max().unwrap_or(0);
    cands.sort_by_key(|(t, tensor)| (t.len(), degree(t), pmax(t), !*tensor));
    let mut best: Option<SurfaceFit> = None;
    for (terms, tensor) in cands {
        let rows: Vec<Vec<f64>> = uv.iter().map(|&(a, b)| row(a, b, &terms)).collect();
        let (p, q) = (pmax(&terms), terms.iter().map(|x| x.1).max().unwrap_or(0));
        let Ok(c) = relative_lsq(&rows, &y) else {
            continue;
        };
        let train = max_rel(&rows, &y, &c);
        let cv = cv_max_rel(&rows, &y, o.folds, &edge);
        let met = train <= o.target && cv <= o.target;
        let f = SurfaceFit {
            p,
            q,
            powers: terms,
            tensor,
            u: u.clone(),
            v: v.clone(),
            zeta_over_kappa: band,
            coefficients: c,
            train_max_rel: train,
            cv_max_rel: cv,
            target_met: met,
        };
        if met {
            return Ok(f);
        }
        if best.as_ref().is_none_or(|b| cv < b.cv_max_rel) {
            best = Some(f);
        }
    }
    best.ok_or_else(|| FitError::Data("no candidate surface could be fitted".into()))
}

impl SurfaceModel {
    /// μcr/μ0 with the printed coefficients.
    pub fn ratio(&self, kappa: f64, zeta: f64) -> f64 {
        let z = if self.zeta_over_kappa {
            zeta / kappa
        } else {
            zeta
        };
        let u = self.u.apply(kappa.ln());
        let v = self.v.apply(z);
        self.terms
            .iter()
            .map(|t| t.coef.value * u.powi(t.i as i32) * v.powi(t.j as i32))
            .sum()
    }

    /// Printed coefficients: the transforms, then c_ij.
    pub fn coefficients(&self) -> Vec<Coef> {
        let mut c = vec![
            self.u.shift.clone(),
            self.u.scale.clone(),
            self.v.shift.clone(),
            self.v.scale.clone(),
        ];
        c.extend(self.terms.iter().map(|t| t.coef.clone()));
        c
    }

    /// Typst math source.
    pub fn typst(&self) -> String {
        let mut s = String::from("mu_\"cr\" / mu_0 = ");
        let mut first = true;
        for t in &self.terms {
            let text = &t.coef.text;
            let (neg, mag) = match text.strip_prefix('-') {
                Some(m) => (true, m),
                None => (false, text.as_str()),
            };
            if first {
                if neg {
                    s.push('-');
                }
            } else {
                s.push_str(if neg { " - " } else { " + " });
            }
            first = false;
            s.push_str(&typst_num(mag));
            for (var, pw) in [("u", t.i), ("v", t.j)] {
                match pw {
                    0 => {}
                    1 => s.push_str(&format!(" {var}")),
                    n => s.push_str(&format!(" {var}^{n}")),
                }
            }
        }
        let z = if self.zeta_over_kappa {
            "zeta / kappa"
        } else {
            "zeta"
        };
        let aff = |x: &str, t: &Transform| {
            let sh = &t.shift.text;
            let num = if t.shift.value == 0.0 {
                x.to_string()
            } else if let Some(m) = sh.strip_prefix('-') {
                format!("({x} + {})", typst_num(m))
            } else {
                format!("({x} - {})", typst_num(sh))
            };
            if t.scale.value == 1.0 {
                num
            } else {
                format!("{num} / {}", typst_num(&t.scale.text))
            }
        };
        s.push_str(&format!(
            ", quad mu_0 = pi sqrt(1 + kappa^2), quad u = {}, quad v = {}",
            aff("ln kappa", &self.u),
            aff(z, &self.v)
        ));
        s
    }
}
