//! Rational least squares for the `surface` form: f = P/Q with
//!
//! ```text
//! P = Σ_j p_j·φ_j(x),   Q = 1 + Σ_k q_k·ψ_k(x)   (ψ without a constant term)
//! minimise Σ_i ( P(x_i) / (Q(x_i)·y_i) − 1 )²   (relative error)
//! ```
//!
//! First the linearised problem (Loeb): multiply through by Q, which makes
//! it linear in (p, q),
//!
//! ```text
//! Σ_j p_j·φ_j(x_i)/y_i − Σ_k q_k·ψ_k(x_i) ≈ 1
//! ```
//!
//! then the Sanathanan–Koerner iteration reweights each row by the previous
//! 1/Q(x_i), so that the weighted linear residual tends to the relative
//! residual itself; finally Levenberg–Marquardt (the `levenberg-marquardt`
//! crate) minimises the true relative residual from there, with the
//! analytic Jacobian
//!
//! ```text
//! ∂r_i/∂p_j = φ_j/(Q·y_i),   ∂r_i/∂q_k = −P·ψ_k/(Q²·y_i)
//! ```
//!
//! A candidate whose Q is not positive at a data point is rejected here;
//! the caller checks Q over its whole domain ([`min_denominator`]).
//!
//! # References
//! - Loeb, "On rational function approximations to functions of several
//!   variables", in *Mathematical Methods for Digital Computers*, Wiley
//!   1960 (the linearised problem).
//! - Sanathanan & Koerner, "Transfer function synthesis as a ratio of two
//!   complex polynomials", IEEE Trans. Automatic Control 8 (1963) 56–58
//!   (the reweighting iteration).
//! - Moré, "The Levenberg–Marquardt algorithm: implementation and theory",
//!   Springer LNM 630 (1978) 105–116.
//! - Golub & Van Loan, *Matrix Computations*, 4th ed., 2013, §5.5 (least
//!   squares by the SVD).

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{DMatrix, DVector, Dyn, Owned};

/// Sanathanan–Koerner iterations after the first (Loeb) solve.
const SK_ITERATIONS: usize = 8;

/// Smallest Q accepted at a data point (Q = 1 at the start).
pub const Q_MIN: f64 = 1e-2;

fn lstsq(a: DMatrix<f64>, b: DVector<f64>) -> Option<Vec<f64>> {
    let svd = a.svd(true, true);
    let smax = svd.singular_values.max();
    svd.solve(&b, 1e-13 * smax)
        .ok()
        .map(|c| c.iter().copied().collect())
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// A rational fit: numerator and denominator coefficients.
#[derive(Debug, Clone, PartialEq)]
pub struct Rational {
    /// p_j.
    pub p: Vec<f64>,
    /// q_k (Q = 1 + Σ q_k·ψ_k).
    pub q: Vec<f64>,
}

impl Rational {
    /// P/Q at a row of numerator values `n` and denominator values `d`.
    pub fn value(&self, n: &[f64], d: &[f64]) -> f64 {
        dot(&self.p, n) / (1.0 + dot(&self.q, d))
    }
}

struct Problem<'a> {
    n: &'a [Vec<f64>],
    d: &'a [Vec<f64>],
    y: &'a [f64],
    x: DVector<f64>,
}

impl Problem<'_> {
    fn split(&self) -> (&[f64], &[f64]) {
        self.x.as_slice().split_at(self.n[0].len())
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.x.copy_from(x);
    }
    fn params(&self) -> DVector<f64> {
        self.x.clone()
    }
    fn residuals(&self) -> Option<DVector<f64>> {
        let (p, q) = self.split();
        let r = DVector::from_iterator(
            self.y.len(),
            (0..self.y.len())
                .map(|i| dot(p, &self.n[i]) / ((1.0 + dot(q, &self.d[i])) * self.y[i]) - 1.0),
        );
        r.iter().all(|x| x.is_finite()).then_some(r)
    }
    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let (p, q) = self.split();
        let (np, nq) = (p.len(), q.len());
        let mut j = DMatrix::zeros(self.y.len(), np + nq);
        for i in 0..self.y.len() {
            let pv = dot(p, &self.n[i]);
            let qv = 1.0 + dot(q, &self.d[i]);
            for c in 0..np {
                j[(i, c)] = self.n[i][c] / (qv * self.y[i]);
            }
            for c in 0..nq {
                j[(i, np + c)] = -pv * self.d[i][c] / (qv * qv * self.y[i]);
            }
        }
        j.iter().all(|x| x.is_finite()).then_some(j)
    }
}

/// Fit P/Q to the values `y` (numerator rows `n`, denominator rows `d`, one
/// per point): Loeb's linearised solve, Sanathanan–Koerner reweighting,
/// then Levenberg–Marquardt on the relative residual (kept unless it is
/// unusable — non-finite, or Q below [`Q_MIN`] at a point — or worse than
/// the linearised solution in both the sum of squares and the largest
/// relative error). None when the points cannot determine the coefficients or Q
/// falls below [`Q_MIN`] at a point.
pub fn fit(n: &[Vec<f64>], d: &[Vec<f64>], y: &[f64]) -> Option<Rational> {
    let rows = y.len();
    let (np, nq) = (n.first()?.len(), d.first().map_or(0, Vec::len));
    if rows < np + nq || np == 0 {
        return None;
    }
    let mut w = vec![1.0; rows];
    let mut sol: Option<Rational> = None;
    for _ in 0..=SK_ITERATIONS {
        let a = DMatrix::from_fn(rows, np + nq, |i, j| {
            if j < np {
                n[i][j] / (y[i] * w[i])
            } else {
                -d[i][j - np] / w[i]
            }
        });
        let b = DVector::from_iterator(rows, w.iter().map(|wi| 1.0 / wi));
        let c = lstsq(a, b)?;
        let r = Rational {
            p: c[..np].to_vec(),
            q: c[np..].to_vec(),
        };
        let qs: Vec<f64> = d.iter().map(|di| 1.0 + dot(&r.q, di)).collect();
        if qs.iter().any(|q| !(*q >= Q_MIN)) {
            // Keep the last acceptable iterate, if any.
            break;
        }
        let change = qs
            .iter()
            .zip(&w)
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max);
        w = qs;
        sol = Some(r);
        if change < 1e-12 {
            break;
        }
    }
    let sk = sol?;
    let max_rel = |r: &Rational| -> f64 {
        (0..rows)
            .map(|i| (r.value(&n[i], &d[i]) / y[i] - 1.0).abs())
            .fold(0.0, f64::max)
    };
    if nq == 0 {
        return Some(sk);
    }
    let x0: Vec<f64> = sk.p.iter().chain(&sk.q).copied().collect();
    let pr = Problem {
        n,
        d,
        y,
        x: DVector::from_vec(x0),
    };
    let (done, _report) = LevenbergMarquardt::new().minimize(pr);
    let (p, q) = done.split();
    let lm = Rational {
        p: p.to_vec(),
        q: q.to_vec(),
    };
    let ok = d.iter().all(|di| 1.0 + dot(&lm.q, di) >= Q_MIN)
        && lm.p.iter().chain(&lm.q).all(|x| x.is_finite());
    // LM minimises the sum of squares; keep it unless it is unusable or
    // worse in both measures than the linearised solution.
    let ss = |r: &Rational| -> f64 {
        (0..rows)
            .map(|i| (r.value(&n[i], &d[i]) / y[i] - 1.0).powi(2))
            .sum()
    };
    if ok && (ss(&lm) <= ss(&sk) || max_rel(&lm) <= max_rel(&sk)) {
        Some(lm)
    } else {
        Some(sk)
    }
}

/// The smallest Q = 1 + Σ q_k·ψ_k over the given denominator rows (a dense
/// grid over the domain, supplied by the caller).
pub fn min_denominator(q: &[f64], rows: impl Iterator<Item = Vec<f64>>) -> f64 {
    rows.map(|d| 1.0 + dot(q, &d)).fold(f64::INFINITY, f64::min)
}

/// Largest held-out relative error of the rational fit by k-fold
/// cross-validation, as [`super::poly::cv_max_rel`] (edge rows always
/// train; infinite when no fold can be fitted; a fold whose fit fails
/// counts as infinite).
pub fn cv_max_rel(
    n: &[Vec<f64>],
    d: &[Vec<f64>],
    y: &[f64],
    k: usize,
    always_train: &[bool],
) -> f64 {
    let rows = y.len();
    let m = n.first().map_or(0, Vec::len) + d.first().map_or(0, Vec::len);
    let mut worst: f64 = 0.0;
    let mut any = false;
    for fold in 0..k {
        let (mut tn, mut td, mut ty, mut te) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
        for i in 0..rows {
            if !always_train[i] && super::poly::fold_of(i, k) == fold {
                te.push(i);
            } else {
                tn.push(n[i].clone());
                td.push(d[i].clone());
                ty.push(y[i]);
            }
        }
        if te.is_empty() || ty.len() < m {
            continue;
        }
        any = true;
        let Some(r) = fit(&tn, &td, &ty) else {
            return f64::INFINITY;
        };
        for i in te {
            let q = 1.0 + dot(&r.q, &d[i]);
            if !(q >= Q_MIN) {
                return f64::INFINITY;
            }
            worst = worst.max((r.value(&n[i], &d[i]) / y[i] - 1.0).abs());
        }
    }
    if any { worst } else { f64::INFINITY }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_an_exact_rational_function() {
        // f = (1 + 0.5x)/(1 + 0.3x) on x in [−1, 1]: exact data in the
        // span of the form must be reproduced (Loeb's solve is then exact).
        let xs: Vec<f64> = (0..11).map(|i| -1.0 + 0.2 * i as f64).collect();
        let n: Vec<Vec<f64>> = xs.iter().map(|&x| vec![1.0, x]).collect();
        let d: Vec<Vec<f64>> = xs.iter().map(|&x| vec![x]).collect();
        let y: Vec<f64> = xs
            .iter()
            .map(|&x| (1.0 + 0.5 * x) / (1.0 + 0.3 * x))
            .collect();
        let r = fit(&n, &d, &y).unwrap();
        assert!((r.p[0] - 1.0).abs() < 1e-12 && (r.p[1] - 0.5).abs() < 1e-12);
        assert!((r.q[0] - 0.3).abs() < 1e-12);
    }
}
