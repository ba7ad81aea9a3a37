//! Fitted formulas for a family's critical moments, with measured error
//! bounds. Numerics only: no I/O, no global state; the engine is reached
//! through a caller-supplied solve function (the fit stage passes
//! `stage::solve_points`), so validation and the local search stay testable
//! on analytic surfaces.
//!
//! Three forms ([`Model`]):
//! - `surface`: a tensor-product polynomial (or rational, P/Q: [`rational`])
//!   correction surface for μcr/μ0 in u = (ln κ − a)/b and v = (z − c)/d,
//!   where z = ζ on a rectangle or z = ζ/κ on a band |ζ| ≤ c·κ (ζ written
//!   as multiples of κ): [`surface`];
//! - `c-curves`: C1(κ) and C2(κ) of the three-factor form (and C3(κ) across
//!   a monosymmetry axis δ), smoothed in ln κ: [`ccurves`];
//! - `expression`: a user-written closed form with named parameters, fitted
//!   by Levenberg–Marquardt: [`expr`].
//!
//! Every formula is evaluated with its coefficients as printed
//! ([`Coef::value`] is parsed back from [`Coef::text`]), and its error bound
//! ([`Bounds`]) is measured on those printed coefficients: the fit grid, a
//! denser validation grid offset from it, and a local pattern search around
//! the worst validation points, each with the finite-element error estimate
//! added ([`validate`]).
//!
//! # References
//! - NCCI SN003a, *Elastic critical moment for lateral torsional buckling*,
//!   SCI/Access Steel, 2005/2010 (the three-factor form and its C1, C2).
//! - Hastie, Tibshirani & Friedman, *The Elements of Statistical Learning*,
//!   2nd ed., Springer 2009, §7.10 (k-fold cross-validation).
//! - Hooke & Jeeves, "Direct search solution of numerical and statistical
//!   problems", J. ACM 8 (1961) 212–229 (pattern search).

pub mod ccurves;
pub mod expr;
pub mod poly;
pub mod rational;
pub mod surface;

use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// Errors of the fit numerics.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FitError {
    /// The data cannot carry the form (too few points, bad values).
    #[error("{0}")]
    Data(String),
    /// The expression does not parse or uses names it may not.
    #[error("expression: {0}")]
    Expression(String),
    /// The expression uses a name that is neither a variable nor a declared
    /// parameter.
    #[error(
        "expression: unknown name `{0}`: declare it under `parameters` with a start value, or use kappa, zeta, pi"
    )]
    UnknownName(String),
    /// The nonlinear fit failed.
    #[error("the nonlinear fit did not converge: {0}")]
    NotConverged(String),
}

/// One solved case used by a fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sample {
    /// κ.
    pub kappa: f64,
    /// ζ.
    pub zeta: f64,
    /// δ (monosymmetry; 0 for a doubly symmetric section). Only the
    /// c-curves form fitted across a δ axis reads it; every other form
    /// fits one δ at a time.
    pub delta: f64,
    /// μcr from the engine (an upper bound of the exact value).
    pub mu_cr: f64,
    /// Its relative error estimate.
    pub error_estimate: f64,
}

/// μ0 = π·√(1 + κ²), the uniform-moment fork value.
///
/// ```text
/// μ0 = π · √(1 + κ²)
/// ```
///
/// # References
/// Timoshenko & Gere, *Theory of Elastic Stability*, 2nd ed., McGraw-Hill
/// 1961, §6.2.
pub fn mu0(kappa: f64) -> f64 {
    PI * (1.0 + kappa * kappa).sqrt()
}

/// The domain a fit holds for: κ range, and ζ either a plain range or a
/// band of multiples of κ (ζ/κ in [t_min, t_max], band c = max |t|).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Domain {
    /// Smallest κ.
    pub kappa_min: f64,
    /// Largest κ.
    pub kappa_max: f64,
    /// Smallest ζ over the domain.
    pub zeta_min: f64,
    /// Largest ζ over the domain.
    pub zeta_max: f64,
    /// c of |ζ| ≤ c·κ when ζ follows κ (ζ written as multiples of κ), else None.
    pub band: Option<f64>,
    /// ζ/κ range when ζ follows κ.
    pub zeta_over_kappa: Option<[f64; 2]>,
    /// Smallest δ when the fit spans a monosymmetry axis (else None: the
    /// fit holds for δ = 0, or for its combination's one δ).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub delta_min: Option<f64>,
    /// Largest δ when the fit spans a monosymmetry axis.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub delta_max: Option<f64>,
}

const EDGE: f64 = 1e-9;

impl Domain {
    /// A rectangle in (κ, ζ).
    pub fn rectangle(k: [f64; 2], z: [f64; 2]) -> Domain {
        Domain {
            kappa_min: k[0],
            kappa_max: k[1],
            zeta_min: z[0],
            zeta_max: z[1],
            band: None,
            zeta_over_kappa: None,
            delta_min: None,
            delta_max: None,
        }
    }
    /// A band: κ in k, ζ/κ in t.
    pub fn band(k: [f64; 2], t: [f64; 2]) -> Domain {
        let ends = [t[0] * k[0], t[0] * k[1], t[1] * k[0], t[1] * k[1]];
        Domain {
            kappa_min: k[0],
            kappa_max: k[1],
            zeta_min: ends.iter().copied().fold(f64::INFINITY, f64::min),
            zeta_max: ends.iter().copied().fold(f64::NEG_INFINITY, f64::max),
            band: Some(t[0].abs().max(t[1].abs())),
            zeta_over_kappa: Some(t),
            delta_min: None,
            delta_max: None,
        }
    }
    /// The same domain spanning δ in `d` as a third coordinate.
    pub fn with_delta(mut self, d: [f64; 2]) -> Domain {
        self.delta_min = Some(d[0]);
        self.delta_max = Some(d[1]);
        self
    }
    /// The δ range when the domain spans δ.
    pub fn delta_range(&self) -> Option<[f64; 2]> {
        match (self.delta_min, self.delta_max) {
            (Some(a), Some(b)) => Some([a, b]),
            _ => None,
        }
    }
    /// Why (κ, ζ, δ) lies outside the domain, or None when it lies inside.
    /// A domain without δ holds only for δ = 0.
    pub fn outside_delta(&self, kappa: f64, zeta: f64, delta: f64) -> Option<String> {
        if let Some(w) = self.outside(kappa, zeta) {
            return Some(w);
        }
        match self.delta_range() {
            None if delta != 0.0 => Some(format!(
                "delta = {delta}: this fit was not made across a monosymmetry axis and holds for delta = 0 only"
            )),
            None => None,
            Some([d0, d1]) => {
                let tol = |a: f64, b: f64| EDGE * (1.0 + a.abs().max(b.abs()));
                if !(delta >= d0 - tol(delta, d0) && delta <= d1 + tol(delta, d1)) {
                    Some(format!(
                        "delta = {delta} lies outside the fitted range {d0} to {d1}"
                    ))
                } else {
                    None
                }
            }
        }
    }
    /// The second fit coordinate: ζ, or ζ/κ on a band.
    pub fn z(&self, kappa: f64, zeta: f64) -> f64 {
        match self.zeta_over_kappa {
            Some(_) => zeta / kappa,
            None => zeta,
        }
    }
    /// ζ from the second coordinate.
    pub fn zeta(&self, kappa: f64, z: f64) -> f64 {
        match self.zeta_over_kappa {
            Some(_) => z * kappa,
            None => z,
        }
    }
    /// Range of the second coordinate.
    pub fn z_range(&self) -> [f64; 2] {
        self.zeta_over_kappa
            .unwrap_or([self.zeta_min, self.zeta_max])
    }
    /// Why (κ, ζ) lies outside the domain, or None when it lies inside.
    pub fn outside(&self, kappa: f64, zeta: f64) -> Option<String> {
        let tol = |a: f64, b: f64| EDGE * (1.0 + a.abs().max(b.abs()));
        if !(kappa >= self.kappa_min - tol(kappa, self.kappa_min)
            && kappa <= self.kappa_max + tol(kappa, self.kappa_max))
        {
            return Some(format!(
                "kappa = {kappa} lies outside the fitted range {} to {}",
                self.kappa_min, self.kappa_max
            ));
        }
        match self.zeta_over_kappa {
            Some([t0, t1]) => {
                let t = if kappa > 0.0 { zeta / kappa } else { f64::NAN };
                if !(t >= t0 - tol(t, t0) && t <= t1 + tol(t, t1)) {
                    return Some(format!(
                        "zeta = {zeta} is {} times kappa, outside the fitted band {t0}*kappa to {t1}*kappa",
                        t
                    ));
                }
            }
            None => {
                if !(zeta >= self.zeta_min - tol(zeta, self.zeta_min)
                    && zeta <= self.zeta_max + tol(zeta, self.zeta_max))
                {
                    return Some(format!(
                        "zeta = {zeta} lies outside the fitted range {} to {}",
                        self.zeta_min, self.zeta_max
                    ));
                }
            }
        }
        None
    }
}

/// A coefficient as printed, and the value parsed back from the print.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Coef {
    /// Its name in the formula.
    pub name: String,
    /// The printed text.
    pub text: String,
    /// The value of the printed text (what every evaluation uses).
    pub value: f64,
}

impl Coef {
    /// Round `x` to `digits` significant digits and keep the print.
    pub fn new(name: &str, x: f64, digits: usize) -> Coef {
        let text = print_sig(x, digits);
        Coef {
            name: name.into(),
            value: text.parse().expect("a printed number parses"),
            text,
        }
    }
    /// Like [`Coef::new`] but rounded toward zero (for safe-side factors ≤ 1).
    pub fn floor(name: &str, x: f64, digits: usize) -> Coef {
        let e = x.abs().log10().floor() as i32;
        let q = 10f64.powi(digits as i32 - 1 - e);
        let y = (x * q).floor() / q;
        let mut c = Coef::new(name, y, digits);
        if c.value > x {
            // Decimal print rounded up by a hair: step one unit down.
            c = Coef::new(name, y - 1.0 / q, digits);
        }
        c
    }
}

/// `x` with `digits` significant digits, plain decimal when the exponent
/// is moderate, else `1.234e-7`; never "-0".
///
/// ```text
/// e = ⌊log10 |x|⌋,   decimals = max(0, digits − 1 − e)
/// ```
pub fn print_sig(x: f64, digits: usize) -> String {
    let digits = digits.clamp(1, 17);
    if x == 0.0 || !x.is_finite() {
        return "0".into();
    }
    // Round through the exponent form first so that the decimal print
    // carries exactly the significant digits asked for.
    let r: f64 = format!("{:.*e}", digits - 1, x).parse().expect("float");
    let e = r.abs().log10().floor() as i32;
    let s = if (-5..15).contains(&e) {
        let decimals = (digits as i32 - 1 - e).max(0) as usize;
        format!("{:.*}", decimals, r)
    } else {
        format!("{:.*e}", digits - 1, r)
    };
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// An affine change of variable x → (x − shift)/scale, both as printed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Transform {
    /// The shift.
    pub shift: Coef,
    /// The scale.
    pub scale: Coef,
}

impl Transform {
    /// The transform mapping [lo, hi] onto about [−1, 1] (printed to 4 digits).
    pub fn onto_unit(name: &str, lo: f64, hi: f64) -> Transform {
        let half = 0.5 * (hi - lo);
        Transform {
            shift: Coef::new(&format!("{name}_shift"), 0.5 * (hi + lo), 4),
            scale: Coef::new(
                &format!("{name}_scale"),
                if half > 0.0 { half } else { 1.0 },
                4,
            ),
        }
    }
    /// (x − shift)/scale.
    pub fn apply(&self, x: f64) -> f64 {
        (x - self.shift.value) / self.scale.value
    }
}

/// A fitted formula.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Model {
    /// Correction surface μcr/μ0 = Σ c_ij·u^i·v^j.
    Surface(surface::SurfaceModel),
    /// Three-factor form with C1(κ), C2(κ) (and C3(κ) across δ).
    CCurves(ccurves::CCurvesModel),
    /// A user-written closed form.
    Expression(expr::ExpressionModel),
}

/// A model plus an optional safe-side factor (the `conservative` option).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Formula {
    /// The fitted model.
    pub model: Model,
    /// Factor applied to the model's μcr (None: not scaled).
    pub factor: Option<Coef>,
}

/// A formula ready to evaluate (expressions parsed once).
#[derive(Debug, Clone)]
pub struct Compiled<'a> {
    formula: &'a Formula,
    tree: Option<expr::Expr>,
}

impl Formula {
    /// Parse what needs parsing.
    pub fn compile(&self) -> Result<Compiled<'_>, FitError> {
        let tree = match &self.model {
            Model::Expression(m) => Some(m.tree()?),
            _ => None,
        };
        Ok(Compiled {
            formula: self,
            tree,
        })
    }

    /// Every printed coefficient, in formula order (factor last).
    pub fn coefficients(&self) -> Vec<Coef> {
        let mut c = match &self.model {
            Model::Surface(m) => m.coefficients(),
            Model::CCurves(m) => m.coefficients(),
            Model::Expression(m) => m.parameters.clone(),
        };
        c.extend(self.factor.clone());
        c
    }

    /// The formula as typst math source (no surrounding `$`), coefficients
    /// as printed.
    pub fn typst(&self) -> Result<String, FitError> {
        let body = match &self.model {
            Model::Surface(m) => m.typst(),
            Model::CCurves(m) => m.typst(),
            Model::Expression(m) => m.typst()?,
        };
        // A safe-side factor multiplies the right-hand side of the main
        // equation (up to the first ", quad" of the definitions).
        Ok(match (&self.factor, body.split_once(" = ")) {
            (Some(f), Some((lhs, rest))) => {
                let (rhs, defs) = match rest.find(", quad") {
                    Some(i) => rest.split_at(i),
                    None => (rest, ""),
                };
                format!("{lhs} = {} dot ({rhs}){defs}", typst_num(&f.text))
            }
            _ => body,
        })
    }
}

impl Compiled<'_> {
    /// μcr predicted by the formula at (κ, ζ, δ): δ enters only a c-curves
    /// formula fitted across δ (every other form holds for one δ, and the
    /// caller keeps to it).
    pub fn mu_cr_delta(&self, kappa: f64, zeta: f64, delta: f64) -> f64 {
        match &self.formula.model {
            Model::CCurves(m) if !m.c3.is_empty() => {
                m.mu_cr_delta(kappa, zeta, delta)
                    * self.formula.factor.as_ref().map_or(1.0, |f| f.value)
            }
            _ => self.mu_cr(kappa, zeta),
        }
    }

    /// μcr predicted by the formula at (κ, ζ).
    pub fn mu_cr(&self, kappa: f64, zeta: f64) -> f64 {
        let m = match &self.formula.model {
            Model::Surface(m) => m.ratio(kappa, zeta) * mu0(kappa),
            Model::CCurves(m) => m.mu_cr(kappa, zeta),
            Model::Expression(m) => m.mu_cr(
                self.tree.as_ref().expect("compiled expression"),
                kappa,
                zeta,
            ),
        };
        m * self.formula.factor.as_ref().map_or(1.0, |f| f.value)
    }
}

/// A number as typst math: exponent forms become `× 10^(e)`.
pub fn typst_num(t: &str) -> String {
    match t.split_once('e') {
        Some((m, e)) => format!("{m} times 10^({e})"),
        None => t.to_string(),
    }
}

/// Where a check point came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Origin {
    /// A point of the fit grid.
    Grid,
    /// A point of the validation grid.
    Validation,
    /// A point of the local search.
    Search,
}

/// One point where the formula was compared with the engine.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Check {
    /// κ.
    pub kappa: f64,
    /// ζ.
    pub zeta: f64,
    /// δ (see [`Sample::delta`]).
    pub delta: f64,
    /// μcr from the engine.
    pub fe: f64,
    /// Its relative error estimate.
    pub error_estimate: f64,
    /// μcr from the formula.
    pub fit: f64,
    /// Where the point came from.
    pub origin: Origin,
}

impl Check {
    /// Largest relative error of the formula against any value in the
    /// engine's bracket [fe·(1 − e), fe]:
    ///
    /// ```text
    /// max( |fit/fe − 1|, |fit/(fe·(1 − e)) − 1| )
    /// ```
    pub fn rel_bound(&self) -> f64 {
        let lo = self.fe * (1.0 - self.error_estimate);
        (self.fit / self.fe - 1.0)
            .abs()
            .max((self.fit / lo - 1.0).abs())
    }
    /// Unconservative error: how far the formula may lie above the exact
    /// value (the engine's value is an upper bound, the exact one at least
    /// fe·(1 − e)):
    ///
    /// ```text
    /// fit/(fe·(1 − e)) − 1
    /// ```
    pub fn unconservative(&self) -> f64 {
        self.fit / (self.fe * (1.0 - self.error_estimate)) - 1.0
    }
    /// The plain relative error fit/fe − 1.
    pub fn rel(&self) -> f64 {
        self.fit / self.fe - 1.0
    }
}

/// A value and where it occurs.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct At {
    /// The value.
    pub value: f64,
    /// κ where it occurs.
    pub kappa: f64,
    /// ζ where it occurs.
    pub zeta: f64,
    /// δ where it occurs.
    pub delta: f64,
}

/// Measured error bounds of a formula.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Bounds {
    /// Largest relative error (FE error estimate included) over every point checked.
    pub max_rel_error: At,
    /// Largest unconservative error (formula above the exact value; 0 when
    /// the formula is at or below the engine's lower bracket everywhere).
    pub max_unconservative_error: At,
    /// RMS of fit/fe − 1 over the validation grid.
    pub rms_error: f64,
    /// Largest unconservative error with ζ > 0 (None without such points).
    pub unconservative_zeta_positive: Option<At>,
    /// Largest unconservative error with ζ < 0.
    pub unconservative_zeta_negative: Option<At>,
    /// Points checked: fit grid, validation grid, local search.
    pub points: [usize; 3],
}

fn worst(checks: &[Check], f: impl Fn(&Check) -> f64) -> Option<At> {
    let mut best: Option<At> = None;
    for c in checks {
        // A formula value that is not a number is an unbounded error.
        let v = f(c);
        let v = if v.is_nan() { f64::INFINITY } else { v };
        if best.is_none_or(|b| v > b.value) {
            best = Some(At {
                value: v,
                kappa: c.kappa,
                zeta: c.zeta,
                delta: c.delta,
            });
        }
    }
    best
}

/// Error bounds over the checked points.
pub fn bounds(checks: &[Check]) -> Bounds {
    let zero = At {
        value: 0.0,
        kappa: f64::NAN,
        zeta: f64::NAN,
        delta: f64::NAN,
    };
    let max_rel = worst(checks, Check::rel_bound).unwrap_or(zero);
    let mut unc = worst(checks, Check::unconservative).unwrap_or(zero);
    unc.value = unc.value.max(0.0);
    let side = |pos: bool| -> Option<At> {
        let s: Vec<Check> = checks
            .iter()
            .filter(|c| if pos { c.zeta > 0.0 } else { c.zeta < 0.0 })
            .copied()
            .collect();
        worst(&s, Check::unconservative).map(|mut a| {
            a.value = a.value.max(0.0);
            a
        })
    };
    let val: Vec<f64> = checks
        .iter()
        .filter(|c| c.origin == Origin::Validation)
        .map(|c| c.rel())
        .collect();
    let rms = if val.is_empty() {
        0.0
    } else {
        (val.iter().map(|r| r * r).sum::<f64>() / val.len() as f64).sqrt()
    };
    let count = |o: Origin| checks.iter().filter(|c| c.origin == o).count();
    Bounds {
        max_rel_error: max_rel,
        max_unconservative_error: unc,
        rms_error: rms,
        unconservative_zeta_positive: side(true),
        unconservative_zeta_negative: side(false),
        points: [
            count(Origin::Grid),
            count(Origin::Validation),
            count(Origin::Search),
        ],
    }
}

/// Settings of the measured error bound.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ValidationSettings {
    /// Validation points per fit-grid cell and direction (sub-cell centres):
    /// 2 gives 4 points per cell at 1/4 and 3/4 of each side.
    pub density: usize,
    /// Worst validation points (of each kind: relative, unconservative)
    /// searched around.
    pub search_starts: usize,
    /// Halvings of the search step before a search stops.
    pub search_halvings: usize,
}

impl Default for ValidationSettings {
    fn default() -> Self {
        ValidationSettings {
            density: 2,
            search_starts: 3,
            search_halvings: 8,
        }
    }
}

/// The engine as the fit sees it: μcr and its error estimate at (κ, ζ)
/// points, None for a case that did not solve.
pub type Engine<'a, E> = dyn FnMut(&[(f64, f64)]) -> Result<Vec<Option<(f64, f64)>>, E> + 'a;

/// The engine at (κ, ζ, δ) points (fits that span δ; see [`validate_delta`]).
pub type EngineDelta<'a, E> = dyn FnMut(&[[f64; 3]]) -> Result<Vec<Option<(f64, f64)>>, E> + 'a;

fn sorted_unique(mut v: Vec<f64>) -> Vec<f64> {
    v.sort_by(f64::total_cmp);
    v.dedup_by(|a, b| (*a - *b).abs() <= 1e-12 * (1.0 + b.abs()));
    v
}

/// Validation points: centres of `density`² sub-cells of every fit-grid
/// cell in (ln κ, z), and the same sub-cell positions along the domain's
/// edges (κ or z at an end of its range), so none coincides with a grid
/// point and peaks on the edges are seen.
///
/// ```text
/// ln κ = ln κ_a + (k + ½)/m · (ln κ_b − ln κ_a),   z = z_c + (l + ½)/m · (z_d − z_c),   k, l = 0 … m−1
/// plus (ln κ_min or ln κ_max, z sub-centre) and (ln κ sub-centre, z_min or z_max)
/// ```
pub fn validation_points(domain: &Domain, samples: &[Sample], density: usize) -> Vec<(f64, f64)> {
    validation_points_delta(domain, samples, density)
        .into_iter()
        .map(|p| (p[0], p[1]))
        .collect()
}

/// Validation points in (κ, ζ, δ): as [`validation_points`], and across δ
/// too when the samples hold more than one δ (sub-cell centres in δ as
/// well, `density`³ per cell); with one δ every point carries it.
pub fn validation_points_delta(
    domain: &Domain,
    samples: &[Sample],
    density: usize,
) -> Vec<[f64; 3]> {
    let ks = sorted_unique(samples.iter().map(|s| s.kappa.ln()).collect());
    let zs = sorted_unique(samples.iter().map(|s| domain.z(s.kappa, s.zeta)).collect());
    let ds = sorted_unique(samples.iter().map(|s| s.delta).collect());
    let m = density.max(1);
    let mut out = Vec::new();
    let subs = |v: &[f64]| -> Vec<f64> {
        if v.len() < 2 {
            return v.to_vec();
        }
        let mut o = Vec::new();
        for w in v.windows(2) {
            for k in 0..m {
                o.push(w[0] + (k as f64 + 0.5) / m as f64 * (w[1] - w[0]));
            }
        }
        o
    };
    // Each direction: the sub-cell centres, then the two ends of the range
    // (flagged), so that points also lie on the domain's edges and faces
    // between grid nodes; a point whose every swept coordinate is an end is
    // a grid corner and left out.
    let lines = |v: &[f64]| -> Vec<(f64, bool)> {
        let mut o: Vec<(f64, bool)> = subs(v).into_iter().map(|x| (x, false)).collect();
        if v.len() >= 2 {
            o.push((v[0], true));
            o.push((v[v.len() - 1], true));
        }
        o
    };
    let swept = |v: &[f64]| v.len() >= 2;
    let (lk_lines, z_lines, d_lines) = (lines(&ks), lines(&zs), lines(&ds));
    for &(lk, ek) in &lk_lines {
        let kappa = lk.exp();
        for &(z, ez) in &z_lines {
            for &(d, ed) in &d_lines {
                let corner = (ek || !swept(&ks)) && (ez || !swept(&zs)) && (ed || !swept(&ds));
                if corner && (ek || ez || ed) {
                    continue;
                }
                out.push([kappa, domain.zeta(kappa, z), d]);
            }
        }
    }
    out
}

/// Compare the formula with the engine: on the fit grid (the samples), on
/// the validation grid, then by a pattern search around the worst
/// validation points (step a quarter of the local grid spacing, eight
/// neighbours per step, step halved when no neighbour is worse, confined
/// to the neighbouring cells and the domain). Returns every check.
///
/// # References
/// Hooke & Jeeves, J. ACM 8 (1961) 212–229.
pub fn validate<E>(
    f: &Compiled<'_>,
    domain: &Domain,
    samples: &[Sample],
    settings: ValidationSettings,
    engine: &mut Engine<'_, E>,
) -> Result<Vec<Check>, E> {
    let mut e3 = |pts: &[[f64; 3]]| -> Result<Vec<Option<(f64, f64)>>, E> {
        let p2: Vec<(f64, f64)> = pts.iter().map(|p| (p[0], p[1])).collect();
        engine(&p2)
    };
    validate_delta(f, domain, samples, settings, &mut e3)
}

/// [`validate`] in (κ, ζ, δ): the validation grid is offset in δ as well
/// when the samples span several δ, and the pattern search moves in δ too
/// (26 neighbours per step); with one δ it is exactly [`validate`].
///
/// # References
/// Hooke & Jeeves, J. ACM 8 (1961) 212–229.
pub fn validate_delta<E>(
    f: &Compiled<'_>,
    domain: &Domain,
    samples: &[Sample],
    settings: ValidationSettings,
    engine: &mut EngineDelta<'_, E>,
) -> Result<Vec<Check>, E> {
    let mut checks: Vec<Check> = samples
        .iter()
        .map(|s| Check {
            kappa: s.kappa,
            zeta: s.zeta,
            delta: s.delta,
            fe: s.mu_cr,
            error_estimate: s.error_estimate,
            fit: f.mu_cr_delta(s.kappa, s.zeta, s.delta),
            origin: Origin::Grid,
        })
        .collect();
    let pts = validation_points_delta(domain, samples, settings.density);
    let solved = engine(&pts)?;
    let mut val: Vec<Check> = Vec::new();
    for (&[kappa, zeta, delta], r) in pts.iter().zip(solved) {
        if let Some((fe, e)) = r {
            val.push(Check {
                kappa,
                zeta,
                delta,
                fe,
                error_estimate: e,
                fit: f.mu_cr_delta(kappa, zeta, delta),
                origin: Origin::Validation,
            });
        }
    }
    checks.extend(val.iter().copied());
    // Local search around the worst validation (and grid) points.
    let ks = sorted_unique(samples.iter().map(|s| s.kappa.ln()).collect());
    let zs = sorted_unique(samples.iter().map(|s| domain.z(s.kappa, s.zeta)).collect());
    let ds = sorted_unique(samples.iter().map(|s| s.delta).collect());
    let spacing = |v: &[f64], x: f64| -> f64 {
        let mut h = f64::INFINITY;
        for w in v.windows(2) {
            if x >= w[0] - 1e-12 && x <= w[1] + 1e-12 {
                h = h.min(w[1] - w[0]);
            }
        }
        if h.is_finite() { h } else { 0.0 }
    };
    let (lk0, lk1) = (domain.kappa_min.ln(), domain.kappa_max.ln());
    let [z0, z1] = domain.z_range();
    let [d0, d1] = [
        ds.first().copied().unwrap_or(0.0),
        ds.last().copied().unwrap_or(0.0),
    ];
    type Objective = fn(&Check) -> f64;
    let objectives: [Objective; 2] = [Check::rel_bound, Check::unconservative];
    let mut starts: Vec<(Check, usize)> = Vec::new();
    for (oi, obj) in objectives.iter().enumerate() {
        let mut pool: Vec<Check> = checks.clone();
        pool.sort_by(|a, b| obj(b).total_cmp(&obj(a)));
        for c in pool.into_iter().take(settings.search_starts) {
            if !starts.iter().any(|(s, o)| {
                *o == oi && s.kappa == c.kappa && s.zeta == c.zeta && s.delta == c.delta
            }) {
                starts.push((c, oi));
            }
        }
    }
    let key = |p: &[f64; 3]| [p[0].to_bits(), p[1].to_bits(), p[2].to_bits()];
    let mut seen: std::collections::BTreeMap<[u64; 3], Option<Check>> = checks
        .iter()
        .map(|c| (key(&[c.kappa, c.zeta, c.delta]), Some(*c)))
        .collect();
    for (start, oi) in starts {
        let obj = objectives[oi];
        let lk = start.kappa.ln();
        let z = domain.z(start.kappa, start.zeta);
        let d = start.delta;
        let (hk, hz, hd) = (spacing(&ks, lk), spacing(&zs, z), spacing(&ds, d));
        // The climb may go anywhere in the domain, its edges included (a
        // box around the start stopped short of peaks on the edge).
        let lo = [lk0, z0, d0];
        let hi = [lk1, z1, d1];
        let mut cur = start;
        let mut pos = [lk, z, d];
        let mut step = [hk / 4.0, hz / 4.0, hd / 4.0];
        let mut halvings = 0;
        while halvings < settings.search_halvings && step.iter().any(|s| *s > 0.0) {
            let mut cand: Vec<[f64; 3]> = Vec::new();
            for dk in [-1.0, 0.0, 1.0] {
                for dz in [-1.0, 0.0, 1.0] {
                    for dd in [-1.0, 0.0, 1.0] {
                        if dk == 0.0 && dz == 0.0 && dd == 0.0 {
                            continue;
                        }
                        let p = [
                            pos[0] + dk * step[0],
                            pos[1] + dz * step[1],
                            pos[2] + dd * step[2],
                        ];
                        if (0..3).all(|i| p[i] >= lo[i] - 1e-12 && p[i] <= hi[i] + 1e-12)
                            && p != pos
                            && !cand.contains(&p)
                        {
                            cand.push(p);
                        }
                    }
                }
            }
            let pts: Vec<[f64; 3]> = cand
                .iter()
                .map(|p| {
                    let kappa = p[0].exp();
                    [kappa, domain.zeta(kappa, p[1]), p[2]]
                })
                .collect();
            // Points checked before (by this or another climb) are not
            // solved or counted again.
            let fresh: Vec<[f64; 3]> = pts
                .iter()
                .filter(|p| !seen.contains_key(&key(p)))
                .copied()
                .collect();
            let mut solved = engine(&fresh)?.into_iter();
            let mut moved = false;
            for (q, p) in pts.iter().zip(&cand) {
                let c = match seen.get(&key(q)) {
                    Some(c) => *c,
                    None => {
                        let r = solved.next().flatten();
                        let [kappa, zeta, delta] = *q;
                        let c = r.map(|(fe, e)| Check {
                            kappa,
                            zeta,
                            delta,
                            fe,
                            error_estimate: e,
                            fit: f.mu_cr_delta(kappa, zeta, delta),
                            origin: Origin::Search,
                        });
                        seen.insert(key(q), c);
                        if let Some(c) = c {
                            checks.push(c);
                        }
                        c
                    }
                };
                if let Some(c) = c
                    && obj(&c) > obj(&cur)
                {
                    cur = c;
                    pos = *p;
                    moved = true;
                }
            }
            if !moved {
                step = [step[0] / 2.0, step[1] / 2.0, step[2] / 2.0];
                halvings += 1;
            }
        }
    }
    Ok(checks)
}

/// The safe-side factor of the `conservative` option: the largest factor
/// (rounded down to `digits`) that puts the formula at or below the
/// engine's lower bracket fe·(1 − e) at every checked point; 1 when it
/// already is.
///
/// ```text
/// s = min_i  fe_i·(1 − e_i) / fit_i   (capped at 1, rounded down)
/// ```
pub fn safe_factor(checks: &[Check], digits: usize) -> Coef {
    // A point where the formula is not a finite number admits no factor.
    let s = checks
        .iter()
        .map(|c| c.fe * (1.0 - c.error_estimate) / c.fit)
        .map(|r| if r.is_nan() { 0.0 } else { r })
        .fold(1.0f64, f64::min);
    if s >= 1.0 {
        Coef::new("factor", 1.0, digits)
    } else {
        Coef::floor("factor", s, digits)
    }
}

/// Apply a factor to checks already made (the ratio of formula to engine
/// scales with it, so the checked points stay valid).
pub fn scale_checks(checks: &[Check], factor: f64) -> Vec<Check> {
    checks
        .iter()
        .map(|c| Check {
            fit: c.fit * factor,
            ..*c
        })
        .collect()
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn print_sig_works() {
        assert_eq!(print_sig(1.23456, 4), "1.235");
        assert_eq!(print_sig(-0.0012345, 3), "-0.00123");
        assert_eq!(print_sig(1234.5, 2), "1200");
        assert_eq!(print_sig(9.9996, 4), "10.00");
        assert_eq!(print_sig(1.5e-9, 3), "1.50e-9");
        assert_eq!(print_sig(-0.0, 3), "0");
    }

    #[test]
    fn floor_never_rounds_up() {
        for x in [0.98765, 0.9, 0.123456789, 0.99999] {
            let c = Coef::floor("f", x, 4);
            assert!(c.value <= x, "{x} {}", c.text);
            assert!(x - c.value < 1e-3 * x, "{x} {}", c.text);
        }
    }

    #[test]
    fn domain_refuses_outside() {
        let d = Domain::band([0.1, 2.0], [-1.0, 1.0]);
        assert!(d.outside(1.0, 0.9).is_none());
        assert!(d.outside(1.0, 1.1).is_some());
        assert!(d.outside(3.0, 0.0).is_some());
        let r = Domain::rectangle([0.1, 2.0], [-0.5, 0.5]);
        assert!(r.outside(0.1, -0.5).is_none());
        assert!(r.outside(0.1, -0.6).is_some());
    }
}
