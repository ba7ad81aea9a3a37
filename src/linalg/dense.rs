//! Dense reference path: every critical factor of (K + λ·Kg)·x = 0 from a
//! symmetric standard eigenproblem, via nalgebra. Slow (O(n³)) but
//! independent of the banded solver and the iteration; tests compare the two.
//!
//! ```text
//! K = L·Lᵀ (Cholesky);  C = L⁻¹·(−Kg)·L⁻ᵀ;  C·y = μ·y;  λ = 1/μ for μ > 0
//! ```
//!
//! # References
//! - Golub, G. H. & Van Loan, C. F. (2013). *Matrix Computations*, 4th ed., §8.7.2
//!   (the symmetric-definite generalised problem by Cholesky reduction).

use super::band::BandMatrix;
use nalgebra::DMatrix;

/// Dense copy of a band matrix.
pub fn to_dense(a: &BandMatrix) -> DMatrix<f64> {
    let n = a.n();
    DMatrix::from_fn(n, n, |i, j| a.get(i, j))
}

/// All positive critical factors, ascending, and all negative ones as
/// positive factors of the reversed load, ascending. `None` when K is not
/// positive definite.
pub fn critical_factors(k: &BandMatrix, g: &BandMatrix) -> Option<(Vec<f64>, Vec<f64>)> {
    let kd = to_dense(k);
    let gd = to_dense(g);
    let l = kd.cholesky()?.l();
    let li = l.clone().try_inverse()?;
    let c = &li * (-gd) * li.transpose();
    let c = (&c + c.transpose()) * 0.5;
    let eig = c.symmetric_eigen();
    let scale = eig.eigenvalues.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    let mut pos: Vec<f64> = eig
        .eigenvalues
        .iter()
        .filter(|&&m| m > 1e-13 * scale)
        .map(|m| 1.0 / m)
        .collect();
    let mut neg: Vec<f64> = eig
        .eigenvalues
        .iter()
        .filter(|&&m| m < -1e-13 * scale)
        .map(|m| -1.0 / m)
        .collect();
    pos.sort_by(f64::total_cmp);
    neg.sort_by(f64::total_cmp);
    Some((pos, neg))
}
