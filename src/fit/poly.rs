//! Linear least squares in a polynomial basis, with k-fold
//! cross-validation: the kernel of the `surface` form and of the smoothing
//! of C1(κ), C2(κ).
//!
//! ```text
//! minimise Σ_i ( (Σ_j c_j·φ_j(x_i) − y_i) / y_i )²      (relative error)
//! ```
//! solved by the singular value decomposition of the row-scaled design
//! matrix (variables scaled to about [−1, 1], so the monomials stay well
//! conditioned).
//!
//! # References
//! - Golub & Van Loan, *Matrix Computations*, 4th ed., Johns Hopkins 2013,
//!   §5.5 (least squares by the SVD).
//! - Hastie, Tibshirani & Friedman, *The Elements of Statistical Learning*,
//!   2nd ed., Springer 2009, §7.10 (k-fold cross-validation).

use super::FitError;
use nalgebra::{DMatrix, DVector};

/// Weighted least squares: the coefficients c minimising
/// Σ ((A·c − y)_i / y_i)², A given row by row.
pub fn relative_lsq(rows: &[Vec<f64>], y: &[f64]) -> Result<Vec<f64>, FitError> {
    let n = rows.len();
    let m = rows.first().map_or(0, Vec::len);
    if n < m || m == 0 {
        return Err(FitError::Data(format!(
            "{n} points cannot determine {m} coefficients"
        )));
    }
    let a = DMatrix::from_fn(n, m, |i, j| rows[i][j] / y[i]);
    let b = DVector::from_element(n, 1.0);
    let svd = a.svd(true, true);
    let smax = svd.singular_values.max();
    let c = svd
        .solve(&b, 1e-13 * smax)
        .map_err(|e| FitError::Data(format!("least squares failed: {e}")))?;
    Ok(c.iter().copied().collect())
}

/// Fold of sample `i` of `n` among `k` folds: a fixed scrambled order, so
/// that no fold takes a whole row or column of a grid.
pub fn fold_of(i: usize, k: usize) -> usize {
    let h = (i as u64 + 1).wrapping_mul(0x9E37_79B9_7F4A_7C15);
    ((h >> 33) % k as u64) as usize
}

/// Largest relative error of the fit on held-out points, by k-fold
/// cross-validation (folds with too few training points are skipped;
/// infinite when none can be fitted). Rows marked in `always_train` (the
/// edge of the domain) are never held out: a formula is used only inside
/// its domain, so held-out points measure interpolation, not
/// extrapolation beyond the grid.
pub fn cv_max_rel(rows: &[Vec<f64>], y: &[f64], k: usize, always_train: &[bool]) -> f64 {
    let n = rows.len();
    let m = rows.first().map_or(0, Vec::len);
    let mut worst: f64 = 0.0;
    let mut any = false;
    for fold in 0..k {
        let (mut tr, mut ty, mut te) = (Vec::new(), Vec::new(), Vec::new());
        for i in 0..n {
            if !always_train[i] && fold_of(i, k) == fold {
                te.push(i);
            } else {
                tr.push(rows[i].clone());
                ty.push(y[i]);
            }
        }
        if te.is_empty() || tr.len() < m {
            continue;
        }
        let Ok(c) = relative_lsq(&tr, &ty) else {
            continue;
        };
        any = true;
        for i in te {
            let p: f64 = rows[i].iter().zip(&c).map(|(a, b)| a * b).sum();
            worst = worst.max((p / y[i] - 1.0).abs());
        }
    }
    if any { worst } else { f64::INFINITY }
}

/// Largest relative error of coefficients `c` on the rows.
pub fn max_rel(rows: &[Vec<f64>], y: &[f64], c: &[f64]) -> f64 {
    rows.iter()
        .zip(y)
        .map(|(r, yi)| {
            let p: f64 = r.iter().zip(c).map(|(a, b)| a * b).sum();
            (p / yi - 1.0).abs()
        })
        .fold(0.0, f64::max)
}

/// 1, u, u², … u^p.
pub fn powers(u: f64, p: usize) -> Vec<f64> {
    let mut v = Vec::with_capacity(p + 1);
    let mut x = 1.0;
    for _ in 0..=p {
        v.push(x);
        x *= u;
    }
    v
}

/// A smoothed one-variable curve: the fewest-term polynomial in u whose
/// deviation from the values is within `tol` (relative to max(|y|, floor))
/// and whose leave-one-out deviation is within 2·tol; else the degree with
/// the smallest leave-one-out deviation. Returns (coefficients, deviation).
pub fn smooth(u: &[f64], y: &[f64], floor: f64, tol: f64, max_degree: usize) -> (Vec<f64>, f64) {
    let n = u.len();
    let scale: Vec<f64> = y.iter().map(|v| v.abs().max(floor)).collect();
    // Absolute-error fit with weights 1/scale: pass scaled rows.
    let fit = |idx: &[usize], p: usize| -> Option<Vec<f64>> {
        if idx.len() < p + 1 {
            return None;
        }
        let rows: Vec<Vec<f64>> = idx
            .iter()
            .map(|&i| powers(u[i], p).iter().map(|a| a / scale[i]).collect())
            .collect();
        let ys: Vec<f64> = idx.iter().map(|&i| y[i] / scale[i]).collect();
        // relative_lsq divides by y; use plain LSQ here through a unit target.
        let a = DMatrix::from_fn(rows.len(), p + 1, |i, j| rows[i][j]);
        let b = DVector::from_vec(ys);
        let svd = a.svd(true, true);
        let smax = svd.singular_values.max();
        svd.solve(&b, 1e-13 * smax)
            .ok()
            .map(|c| c.iter().copied().collect())
    };
    let dev = |c: &[f64], i: usize| -> f64 {
        let p: f64 = powers(u[i], c.len() - 1)
            .iter()
            .zip(c)
            .map(|(a, b)| a * b)
            .sum();
        (p - y[i]).abs() / scale[i]
    };
    let all: Vec<usize> = (0..n).collect();
    let mut best: Option<(f64, Vec<f64>, f64)> = None;
    for p in 0..=max_degree.min(n.saturating_sub(1)) {
        let Some(c) = fit(&all, p) else { continue };
        let d = all.iter().map(|&i| dev(&c, i)).fold(0.0, f64::max);
        let mut loo: f64 = 0.0;
        if n > p + 1 {
            for k in 0..n {
                let idx: Vec<usize> = all.iter().copied().filter(|&i| i != k).collect();
                if let Some(ck) = fit(&idx, p) {
                    loo = loo.max(dev(&ck, k));
                }
            }
        }
        if d <= tol && loo <= 2.0 * tol {
            return (c, d);
        }
        if best.as_ref().is_none_or(|b| loo < b.0) {
            best = Some((loo, c, d));
        }
    }
    let (_, c, d) = best.unwrap_or((0.0, vec![y.first().copied().unwrap_or(0.0)], 0.0));
    (c, d)
}
