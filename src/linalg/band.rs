//! Symmetric banded matrices and their LDLᵀ factorisation with an inertia
//! count.
//!
//! Storage: the lower band by rows, `n × (b + 1)` values, where `b` is the
//! half-bandwidth; entry (i, j) with i − b ≤ j ≤ i sits at
//! `i·(b+1) + (j + b − i)`.
//!
//! The factorisation is the textbook LDLᵀ without pivoting. For a symmetric
//! matrix A = L·D·Lᵀ, Sylvester's law of inertia makes the number of negative
//! entries of D equal to the number of negative eigenvalues of A; with
//! A = K + σ·Kg and K positive definite this is the number of critical factors
//! in (0, σ) (Sturm sequence property). Pivoting would destroy the band; a
//! pivot that vanishes to round-off is reported instead so that the caller
//! can move the shift.
//!
//! # References
//! - Golub, G. H. & Van Loan, C. F. (2013). *Matrix Computations*, 4th ed.,
//!   Johns Hopkins, §4.3 (band LDLᵀ) and §8.4 (Sylvester inertia).
//! - Bathe, K.-J. (1996). *Finite Element Procedures*. Prentice Hall, §11.4.3
//!   (Sturm sequence check in eigenvalue solutions).

/// A symmetric band matrix (lower band stored).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct BandMatrix {
    n: usize,
    b: usize,
    a: Vec<f64>,
}

/// Why a factorisation stopped.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum BandError {
    /// Pivot `row` vanished (|d| below round-off of the row's scale).
    #[error("zero pivot at row {row}")]
    ZeroPivot {
        /// The row whose pivot vanished.
        row: usize,
    },
}

impl BandMatrix {
    /// An n×n zero matrix with half-bandwidth b.
    pub fn zeros(n: usize, b: usize) -> BandMatrix {
        BandMatrix {
            n,
            b,
            a: vec![0.0; n * (b + 1)],
        }
    }
    /// Make self an n×n zero matrix with half-bandwidth b, reusing storage.
    pub fn reset(&mut self, n: usize, b: usize) {
        self.n = n;
        self.b = b;
        self.a.clear();
        self.a.resize(n * (b + 1), 0.0);
    }
    /// Order.
    pub fn n(&self) -> usize {
        self.n
    }
    /// Half-bandwidth.
    pub fn bandwidth(&self) -> usize {
        self.b
    }
    #[inline]
    fn idx(&self, i: usize, j: usize) -> usize {
        debug_assert!(j <= i && i - j <= self.b);
        i * (self.b + 1) + (j + self.b - i)
    }
    /// Entry (i, j) of the symmetric matrix (zero outside the band).
    pub fn get(&self, i: usize, j: usize) -> f64 {
        let (i, j) = if i >= j { (i, j) } else { (j, i) };
        if i - j > self.b {
            0.0
        } else {
            self.a[self.idx(i, j)]
        }
    }
    /// Add `v` to entry (i, j) (and implicitly (j, i)). Only call with i ≥ j
    /// inside the band.
    #[inline]
    pub fn add_lower(&mut self, i: usize, j: usize, v: f64) {
        let k = self.idx(i, j);
        self.a[k] += v;
    }
    /// Add the lower triangle of a symmetric 8×8 block whose local index l
    /// is global index `o + l` (needs a half-bandwidth of exactly 7, the
    /// band of four-DOF nodes).
    #[inline]
    pub fn add_block8(&mut self, o: usize, m: &[[f64; 8]; 8]) {
        assert!(self.b == 7 && o + 8 <= self.n, "block outside the band");
        let rows: &mut [f64; 64] = (&mut self.a[o * 8..(o + 8) * 8])
            .try_into()
            .expect("8 rows of 8");
        for (i, mi) in m.iter().enumerate() {
            // entry (o + i, o + j) sits at j + 7 − i of its row
            for j in 0..=i {
                rows[i * 8 + 7 - i + j] += mi[j];
            }
        }
    }
    /// Set entry (i, j) of the lower triangle (i ≥ j, within the band).
    pub fn set_lower(&mut self, i: usize, j: usize, v: f64) {
        let k = self.idx(i, j);
        self.a[k] = v;
    }
    /// Multiply every entry by `s`.
    pub fn scale(&mut self, s: f64) {
        self.a.iter_mut().for_each(|x| *x *= s);
    }
    /// Set every entry to zero.
    pub fn clear(&mut self) {
        self.a.iter_mut().for_each(|x| *x = 0.0);
    }
    /// y = A·x.
    pub fn mul_vec(&self, x: &[f64], y: &mut [f64]) {
        match self.b {
            7 => self.mul_vec_fixed::<7>(x, y),
            8 => self.mul_vec_fixed::<8>(x, y),
            9 => self.mul_vec_fixed::<9>(x, y),
            _ => self.mul_vec_general(x, y),
        }
    }

    fn mul_vec_general(&self, x: &[f64], y: &mut [f64]) {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        let x = &x[..n];
        let y = &mut y[..n];
        y.iter_mut().for_each(|v| *v = 0.0);
        for (i, row) in self.a.chunks_exact(w).enumerate() {
            let j0 = i.saturating_sub(b);
            let band = &row[j0 + b - i..b];
            let xi = x[i];
            let mut s = row[b] * xi;
            for ((aij, xj), yj) in band.iter().zip(&x[j0..i]).zip(y[j0..i].iter_mut()) {
                s += aij * xj;
                *yj += aij * xi;
            }
            y[i] += s;
        }
    }

    fn mul_vec_fixed<const B: usize>(&self, x: &[f64], y: &mut [f64]) {
        // y_i = Σ_{j ≤ i} A_ij·x_j (along the stored row) + Σ_{k=1..B}
        // A_{i+k, i}·x_{i+k} (down the column): two dot products per row
        // and no update of other rows, so rows are independent.
        let n = self.n;
        let w = B + 1;
        let a = &self.a[..n * w];
        let x = &x[..n];
        let y = &mut y[..n];
        for i in 0..n {
            let row = &a[i * w..(i + 1) * w];
            let (mut p0, mut p1) = (row[B] * x[i], 0.0);
            if i >= B {
                let xs = &x[i - B..i];
                let mut c = 0;
                while c + 1 < B {
                    p0 += row[c] * xs[c];
                    p1 += row[c + 1] * xs[c + 1];
                    c += 2;
                }
                if c < B {
                    p0 += row[c] * xs[c];
                }
            } else {
                for j in 0..i {
                    p1 += row[j + B - i] * x[j];
                }
            }
            if i + B < n {
                // entry (i + k, i) at i·w + B + k·B: one slice, fixed offsets
                let col = &a[i * w + B..i * w + B + B * B + 1];
                let xs = &x[i..i + B + 1];
                for k in 1..B + 1 {
                    if k % 2 == 1 {
                        p0 += col[k * B] * xs[k];
                    } else {
                        p1 += col[k * B] * xs[k];
                    }
                }
            } else {
                for r in i + 1..n {
                    p0 += a[r * w + B - (r - i)] * x[r];
                }
            }
            y[i] = p0 + p1;
        }
    }

    /// Σ Aᵢᵢ·xᵢ² (the diagonal part of xᵀ·A·x).
    pub fn diag_quad(&self, x: &[f64]) -> f64 {
        let w = self.b + 1;
        self.a
            .chunks_exact(w)
            .zip(x)
            .map(|(row, xi)| row[self.b] * xi * xi)
            .sum()
    }
    /// Take the shape of `other` (order and bandwidth), reusing storage;
    /// entries are left unspecified (overwrite them, e.g. by
    /// [`BandMatrix::set_combination`]).
    pub fn reshape_like(&mut self, other: &BandMatrix) {
        self.n = other.n;
        self.b = other.b;
        self.a.resize(other.a.len(), 0.0);
    }
    /// xᵀ·A·x.
    pub fn quad(&self, x: &[f64], work: &mut [f64]) -> f64 {
        self.mul_vec(x, work);
        x.iter().zip(work.iter()).map(|(a, b)| a * b).sum()
    }
    /// Largest absolute diagonal entry.
    pub fn max_diag(&self) -> f64 {
        (0..self.n)
            .map(|i| self.a[i * (self.b + 1) + self.b].abs())
            .fold(0.0, f64::max)
    }
    /// Overwrite self with A + s·B (same shape).
    pub fn set_combination(&mut self, a: &BandMatrix, s: f64, bm: &BandMatrix) {
        debug_assert!(a.n == bm.n && a.b == bm.b && self.n == a.n && self.b == a.b);
        for ((d, x), y) in self.a.iter_mut().zip(&a.a).zip(&bm.a) {
            *d = x + s * y;
        }
    }

    /// Factorise in place as L·D·Lᵀ (unit L below the diagonal; the
    /// diagonal then holds 1/D, so that solves multiply instead of divide).
    /// Returns the number of negative pivots. A pivot whose magnitude falls
    /// below `rel_tol` times the largest absolute entry of its original row is
    /// a [`BandError::ZeroPivot`].
    pub fn factorize(&mut self, rel_tol: f64) -> Result<usize, BandError> {
        match self.b {
            7 => self.factorize_fixed::<7>(rel_tol),
            8 => self.factorize_fixed::<8>(rel_tol),
            9 => self.factorize_fixed::<9>(rel_tol),
            _ => self.factorize_rows(0, self.n, rel_tol).map(|(neg, _)| neg),
        }
    }

    /// Rows `i0..i1` of the factorisation for any bandwidth; returns the
    /// negative pivots found in those rows.
    fn factorize_rows(
        &mut self,
        i0: usize,
        i1: usize,
        rel_tol: f64,
    ) -> Result<(usize, ()), BandError> {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        let _ = n;
        let mut neg = 0;
        // t[j − j0] = L[i][j]·D[j] for the current row i.
        let mut t_store = [0.0_f64; 32];
        let mut t_heap = Vec::new();
        let t: &mut [f64] = if w <= 32 {
            &mut t_store[..w]
        } else {
            t_heap.resize(w, 0.0);
            &mut t_heap
        };
        for i in i0..i1 {
            let j0 = i.saturating_sub(b);
            let len = i - j0;
            let (done, rest) = self.a.split_at_mut(i * w);
            let row = &mut rest[..w];
            let scale = row[b - len..].iter().fold(0.0_f64, |m, x| m.max(x.abs()));
            for jj in 0..len {
                let j = j0 + jj;
                let rj = &done[j * w..(j + 1) * w];
                // L[j][k] for k in k0..j sits at rj[k + b − j]
                let k0 = j0.max(j.saturating_sub(b));
                let mut s = row[j + b - i];
                let lj = &rj[k0 + b - j..b];
                for (tk, ljk) in t[k0 - j0..jj].iter().zip(lj) {
                    s -= tk * ljk;
                }
                t[jj] = s;
                row[j + b - i] = s * rj[b];
            }
            let mut d = row[b];
            for (tk, lik) in t[..len].iter().zip(&row[b - len..b]) {
                d -= tk * lik;
            }
            if !(d.abs() > rel_tol * scale) {
                return Err(BandError::ZeroPivot { row: i });
            }
            if d < 0.0 {
                neg += 1;
            }
            row[b] = 1.0 / d;
        }
        Ok((neg, ()))
    }

    /// The same factorisation with the half-bandwidth fixed at compile time,
    /// so that the inner loops unroll (rows b.. only; the first b rows go
    /// through the general path).
    fn factorize_fixed<const B: usize>(&mut self, rel_tol: f64) -> Result<usize, BandError> {
        let n = self.n;
        let w = B + 1;
        let head = B.min(n);
        let mut neg = 0;
        let mut t = [0.0_f64; B];
        // First rows: columns from c0 = B − i on (entries left of column 0
        // do not exist).
        for i in 0..head {
            let c0 = B - i;
            let (done, rest) = self.a.split_at_mut(i * w);
            let row = &mut rest[..w];
            let scale = row[c0..].iter().fold(0.0_f64, |m, x| m.max(x.abs()));
            for c in c0..B {
                let j = i + c - B;
                let rj = &done[j * w..(j + 1) * w];
                let mut s = row[c];
                for c2 in c0..c {
                    s -= t[c2] * rj[c2 + B - c];
                }
                t[c] = s;
                row[c] = s * rj[B];
            }
            let mut d = row[B];
            for c in c0..B {
                d -= t[c] * row[c];
            }
            if !(d.abs() > rel_tol * scale) {
                return Err(BandError::ZeroPivot { row: i });
            }
            if d < 0.0 {
                neg += 1;
            }
            row[B] = 1.0 / d;
        }
        for i in head..n {
            let (done, rest) = self.a.split_at_mut(i * w);
            // the B rows above, as one slice read at fixed offsets
            let prev = &done[(i - B) * w..];
            let row = &mut rest[..w];
            let scale = row.iter().fold(0.0_f64, |m, x| m.max(x.abs()));
            // column j = i − B + c
            for c in 0..B {
                let rj = &prev[c * w..(c + 1) * w];
                let mut s = row[c];
                // k = i − B + c2 for c2 < c; L[j][k] at rj[c2 + B − c]
                for c2 in 0..c {
                    s -= t[c2] * rj[c2 + B - c];
                }
                t[c] = s;
                row[c] = s * rj[B];
            }
            let mut d = row[B];
            for c in 0..B {
                d -= t[c] * row[c];
            }
            if !(d.abs() > rel_tol * scale) {
                return Err(BandError::ZeroPivot { row: i });
            }
            if d < 0.0 {
                neg += 1;
            }
            row[B] = 1.0 / d;
        }
        Ok(neg)
    }

    /// Solve (L·D·Lᵀ)·x = rhs in place, after [`BandMatrix::factorize`].
    pub fn solve_in_place(&self, x: &mut [f64]) {
        match self.b {
            7 => self.solve_fixed::<7>(x),
            8 => self.solve_fixed::<8>(x),
            9 => self.solve_fixed::<9>(x),
            _ => self.solve_general(x),
        }
    }

    fn solve_general(&self, x: &mut [f64]) {
        let (n, b) = (self.n, self.b);
        let w = b + 1;
        let x = &mut x[..n];
        for (i, row) in self.a.chunks_exact(w).enumerate() {
            let j0 = i.saturating_sub(b);
            let (head, tail) = x.split_at_mut(i);
            let mut s = tail[0];
            for (l, xj) in row[j0 + b - i..b].iter().zip(&head[j0..]) {
                s -= l * xj;
            }
            tail[0] = s;
        }
        for (xi, row) in x.iter_mut().zip(self.a.chunks_exact(w)) {
            *xi *= row[b];
        }
        for (i, row) in self.a.chunks_exact(w).enumerate().rev() {
            let j0 = i.saturating_sub(b);
            let (head, tail) = x.split_at_mut(i);
            let xi = tail[0];
            for (l, xj) in row[j0 + b - i..b].iter().zip(head[j0..].iter_mut()) {
                *xj -= l * xi;
            }
        }
    }

    fn solve_fixed<const B: usize>(&self, x: &mut [f64]) {
        let n = self.n;
        let w = B + 1;
        let a = &self.a[..n * w];
        let x = &mut x[..n];
        let head = n.min(B);
        // Forward: x_i −= Σ L_ij·x_j. The terms with x_{i−B} … x_{i−2} are
        // summed in two independent partial sums before x_{i−1} is known,
        // so the chain from row to row is one multiply and one subtraction.
        for i in 0..head {
            let row = &a[i * w..(i + 1) * w];
            let mut s = x[i];
            for j in 0..i {
                s -= row[j + B - i] * x[j];
            }
            x[i] = s;
        }
        for i in head..n {
            let row = &a[i * w..(i + 1) * w];
            let xs = &x[i - B..i];
            let (mut p0, mut p1) = (0.0, 0.0);
            let mut c = 0;
            while c + 2 < B {
                p0 += row[c] * xs[c];
                p1 += row[c + 1] * xs[c + 1];
                c += 2;
            }
            if c + 1 < B {
                p0 += row[c] * xs[c];
            }
            x[i] = (x[i] - (p0 + p1)) - row[B - 1] * xs[B - 1];
        }
        for (xi, row) in x.iter_mut().zip(a.chunks_exact(w)) {
            *xi *= row[B];
        }
        // Backward: x_j −= Σ_{k=1..B} L_{j+k, j}·x_{j+k}, read down the
        // column (entry (j + k, j) sits at (j + k)·w + B − k), with the
        // same split: x_{j+1} enters last.
        let tail = n.saturating_sub(B);
        for j in (tail..n).rev() {
            let mut s = x[j];
            for r in j + 1..n {
                s -= a[r * w + B - (r - j)] * x[r];
            }
            x[j] = s;
        }
        for j in (0..tail).rev() {
            // entry (j + k, j) at j·w + B + k·B: one slice, fixed offsets
            let col = &a[j * w + B..j * w + B + B * B + 1];
            let xs = &x[j..=j + B];
            let (mut p0, mut p1) = (0.0, 0.0);
            // k = B, B − 1, …, 2 in two partial sums; k = 1 last
            for k in (2..B + 1).rev() {
                if k % 2 == 0 {
                    p0 += col[k * B] * xs[k];
                } else {
                    p1 += col[k * B] * xs[k];
                }
            }
            x[j] = (x[j] - (p0 + p1)) - col[B] * xs[1];
        }
    }
}

////////////////////////////////////////////////////////////////////////////////

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::DMatrix;

    fn sample(n: usize, b: usize, shift: f64) -> (BandMatrix, DMatrix<f64>) {
        let mut m = BandMatrix::zeros(n, b);
        let mut d = DMatrix::zeros(n, n);
        for i in 0..n {
            for j in i.saturating_sub(b)..=i {
                let v = if i == j {
                    4.0 + (i as f64).sin() - shift
                } else {
                    ((i * 7 + j * 3) as f64).cos() * 0.6
                };
                m.add_lower(i, j, v);
                d[(i, j)] = v;
                d[(j, i)] = v;
            }
        }
        (m, d)
    }

    #[test]
    fn solve_works_against_dense_lu() {
        // Reference: nalgebra's dense LU (a general-purpose library).
        let (mut m, d) = sample(23, 5, 0.0);
        let rhs: Vec<f64> = (0..23).map(|i| (i as f64 * 0.37).cos()).collect();
        let mut x = rhs.clone();
        m.factorize(1e-14).unwrap();
        m.solve_in_place(&mut x);
        let xr = d.lu().solve(&nalgebra::DVector::from_vec(rhs)).unwrap();
        for i in 0..23 {
            assert!((x[i] - xr[i]).abs() < 1e-10);
        }
    }

    #[test]
    fn inertia_matches_dense_eigenvalues() {
        // Sylvester's law of inertia (Golub & Van Loan §8.4): negative pivots
        // = negative eigenvalues, checked with nalgebra's symmetric eigen.
        for shift in [0.0, 2.0, 3.5, 4.2, 6.0] {
            let (mut m, d) = sample(17, 3, shift);
            let eig = d.symmetric_eigen();
            let neg_ref = eig.eigenvalues.iter().filter(|&&l| l < 0.0).count();
            let neg = m.factorize(1e-14).unwrap();
            assert_eq!(neg, neg_ref, "shift {shift}");
        }
    }

    #[test]
    fn fixed_bandwidth_kernels_match_dense() {
        // The unrolled paths for b = 7, 8, 9 against nalgebra (LU solve and
        // symmetric eigenvalues for the inertia).
        for b in [7, 8, 9] {
            for shift in [0.0, 3.9, 5.5] {
                let (mut m, d) = sample(31, b, shift);
                let neg_ref = d
                    .clone()
                    .symmetric_eigen()
                    .eigenvalues
                    .iter()
                    .filter(|&&l| l < 0.0)
                    .count();
                let rhs: Vec<f64> = (0..31).map(|i| (i as f64 * 0.61).sin()).collect();
                assert_eq!(m.factorize(1e-14).unwrap(), neg_ref, "b {b} shift {shift}");
                let mut x = rhs.clone();
                m.solve_in_place(&mut x);
                let xr = d.lu().solve(&nalgebra::DVector::from_vec(rhs)).unwrap();
                for i in 0..31 {
                    assert!((x[i] - xr[i]).abs() < 1e-9 * (1.0 + xr[i].abs()), "b {b}");
                }
            }
        }
    }

    #[test]
    fn fixed_bandwidth_kernels_match_dense_at_every_small_order() {
        // The unrolled product and solve have separate paths for the first
        // and last B rows; orders below, at and just above B exercise every
        // boundary. Reference: nalgebra's dense product and LU solve.
        for b in [7, 8, 9] {
            for n in [1, 2, 3, 6, 7, 8, 9, 10, 11, 15, 16, 17, 19] {
                let (mut m, d) = sample(n, b, 0.0);
                let x: Vec<f64> = (0..n).map(|i| (i as f64 * 0.83 + 0.1).cos()).collect();
                let mut y = vec![0.0; n];
                m.mul_vec(&x, &mut y);
                let yr = &d * nalgebra::DVector::from_vec(x.clone());
                for i in 0..n {
                    assert!(
                        (y[i] - yr[i]).abs() < 1e-12 * (1.0 + yr[i].abs()),
                        "mul b {b} n {n} row {i}"
                    );
                }
                m.factorize(1e-14).unwrap();
                let mut z = x.clone();
                m.solve_in_place(&mut z);
                let zr = d.lu().solve(&nalgebra::DVector::from_vec(x)).unwrap();
                for i in 0..n {
                    assert!(
                        (z[i] - zr[i]).abs() < 1e-9 * (1.0 + zr[i].abs()),
                        "solve b {b} n {n} row {i}"
                    );
                }
            }
        }
    }

    #[test]
    fn mul_vec_matches_dense() {
        let (m, d) = sample(11, 4, 0.0);
        let x: Vec<f64> = (0..11).map(|i| i as f64 - 3.0).collect();
        let mut y = vec![0.0; 11];
        m.mul_vec(&x, &mut y);
        let yr = &d * nalgebra::DVector::from_vec(x);
        for i in 0..11 {
            assert!((y[i] - yr[i]).abs() < 1e-12);
        }
    }

    #[test]
    fn factorize_handles_zero_pivot() {
        let mut m = BandMatrix::zeros(2, 1);
        m.add_lower(0, 0, 1.0);
        m.add_lower(1, 0, 1.0);
        m.add_lower(1, 1, 1.0);
        assert_eq!(m.factorize(1e-12), Err(BandError::ZeroPivot { row: 1 }));
    }
}
