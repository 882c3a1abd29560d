//! Cholesky factorisation, solve and inverse for small symmetric matrices (n ≤ 13) on the
//! stack.
//!
//! Hand-written on purpose: this is the hot path of the Monte Carlo engine (one or more
//! solves per Newton iteration, millions of fits), the matrices are at most 13 × 13, and a
//! general library would allocate or carry dimension checks we do not need. The
//! factorisation doubles as the test for positive definiteness that the solver and the
//! covariance need.

// Index loops mirror the textbook formulas of the factorisation; iterators would hide them.
#![allow(clippy::needless_range_loop)]

use super::{MAX_PARAMS, Matrix, Vector};

/// Smallest pivot kept, relative to the diagonal entry it came from: below this the matrix
/// is treated as not positive definite (condition number beyond about 1e13).
const RELATIVE_PIVOT: f64 = 1e-13;

/// Cholesky factorisation in place: the lower triangle (with the diagonal) of the leading
/// n × n block of the symmetric matrix `a` is overwritten by L with L·Lᵀ = A; the upper
/// triangle is neither read nor written. Returns `false` when A is not (numerically)
/// positive definite, leaving `a` partly overwritten.
pub(crate) fn cholesky_in_place(a: &mut Matrix, n: usize) -> bool {
    for j in 0..n {
        let diag = a[j][j];
        let mut d = diag;
        for t in 0..j {
            d -= a[j][t] * a[j][t];
        }
        let positive = d.is_finite() && d > RELATIVE_PIVOT * diag.abs();
        if !positive {
            return false;
        }
        let root = d.sqrt();
        a[j][j] = root;
        let inv = 1.0 / root;
        for i in j + 1..n {
            let mut s = a[i][j];
            for t in 0..j {
                s -= a[i][t] * a[j][t];
            }
            a[i][j] = s * inv;
        }
    }
    true
}

/// Overwrites b with x, L·Lᵀ·x = b, given the factor from [`cholesky_in_place`].
pub(crate) fn solve_in_place(l: &Matrix, n: usize, b: &mut Vector) {
    for i in 0..n {
        let mut s = b[i];
        for t in 0..i {
            s -= l[i][t] * b[t];
        }
        b[i] = s / l[i][i];
    }
    for i in (0..n).rev() {
        let mut s = b[i];
        for t in i + 1..n {
            s -= l[t][i] * b[t];
        }
        b[i] = s / l[i][i];
    }
}

/// A⁻¹ = L⁻ᵀ·L⁻¹ from the factor of [`cholesky_in_place`]: W = L⁻¹ by forward
/// substitution, then A⁻¹[r][c] = Σ_{t ≥ max(r, c)} W[t][r]·W[t][c], exactly symmetric.
pub(crate) fn inverse(l: &Matrix, n: usize) -> Matrix {
    let mut w = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    for j in 0..n {
        w[j][j] = 1.0 / l[j][j];
        for i in j + 1..n {
            let mut s = 0.0;
            for t in j..i {
                s += l[i][t] * w[t][j];
            }
            w[i][j] = -s / l[i][i];
        }
    }
    let mut inv = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    for r in 0..n {
        for c in 0..=r {
            let mut s = 0.0;
            for t in r..n {
                s += w[t][r] * w[t][c];
            }
            inv[r][c] = s;
            inv[c][r] = s;
        }
    }
    inv
}

#[cfg(test)]
mod tests {
    use super::*;

    fn matrix(rows: &[&[f64]]) -> Matrix {
        let mut m = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        for (i, row) in rows.iter().enumerate() {
            m[i][..row.len()].copy_from_slice(row);
        }
        m
    }

    #[test]
    fn solves_and_inverts() {
        let a = matrix(&[&[4.0, 2.0, 0.6], &[2.0, 5.0, 1.0], &[0.6, 1.0, 3.0]]);
        let mut l = a;
        assert!(cholesky_in_place(&mut l, 3));
        let mut b = [0.0; MAX_PARAMS];
        b[..3].copy_from_slice(&[1.0, -2.0, 0.5]);
        let mut x = b;
        solve_in_place(&l, 3, &mut x);
        for i in 0..3 {
            let ax: f64 = (0..3).map(|j| a[i][j] * x[j]).sum();
            assert!((ax - b[i]).abs() < 1e-14);
        }
        let inv = inverse(&l, 3);
        for i in 0..3 {
            for j in 0..3 {
                let p: f64 = (0..3).map(|t| a[i][t] * inv[t][j]).sum();
                let e = if i == j { 1.0 } else { 0.0 };
                assert!((p - e).abs() < 1e-14);
            }
        }
    }

    #[test]
    fn refuses_indefinite_and_singular() {
        let mut a = matrix(&[&[1.0, 2.0], &[2.0, 1.0]]);
        assert!(!cholesky_in_place(&mut a, 2));
        let mut a = matrix(&[&[1.0, 1.0], &[1.0, 1.0]]);
        assert!(!cholesky_in_place(&mut a, 2));
        let mut a = matrix(&[&[f64::NAN, 0.0], &[0.0, 1.0]]);
        assert!(!cholesky_in_place(&mut a, 2));
    }
}
