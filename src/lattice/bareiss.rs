//! Fraction-free Gaussian elimination (Bareiss 1968, "Sylvester's identity and multistep
//! integer-preserving Gaussian elimination"): every intermediate entry is a minor of the input,
//! so the values stay exact and as small as exact elimination allows.

use num_bigint::BigInt;
use num_traits::{One, Signed, Zero};

use crate::matrix::IntMatrix;

/// The outcome of fraction-free row reduction of a matrix.
#[derive(Clone, Debug)]
pub struct Echelon {
    /// Pivot columns, in increasing order; their number is the rank.
    pub pivot_cols: Vec<usize>,
    /// Original indices of the rows that hold the pivots: a maximal set of independent rows.
    pub pivot_rows: Vec<usize>,
}

/// Row-reduces `a` without fractions, choosing pivots column by column.
pub fn echelon(a: &IntMatrix) -> Echelon {
    let (m, n) = (a.rows(), a.cols());
    let mut w: Vec<Vec<BigInt>> = (0..m)
        .map(|i| a.row(i).iter().map(|&v| BigInt::from(v)).collect())
        .collect();
    let mut order: Vec<usize> = (0..m).collect();
    let mut prev = BigInt::one();
    let mut r = 0;
    let mut pivot_cols = Vec::new();
    for c in 0..n {
        if r == m {
            break;
        }
        let Some(p) = (r..m).find(|&i| !w[i][c].is_zero()) else {
            continue;
        };
        w.swap(r, p);
        order.swap(r, p);
        for i in r + 1..m {
            for j in c + 1..n {
                let v = (&w[r][c] * &w[i][j] - &w[i][c] * &w[r][j]) / &prev;
                w[i][j] = v;
            }
            w[i][c] = BigInt::zero();
        }
        prev = w[r][c].clone();
        pivot_cols.push(c);
        r += 1;
    }
    let mut pivot_rows = order[..r].to_vec();
    pivot_rows.sort_unstable();
    Echelon {
        pivot_cols,
        pivot_rows,
    }
}

/// Rank of `a` over the rationals.
pub fn rank(a: &IntMatrix) -> usize {
    echelon(a).pivot_cols.len()
}

/// Determinant of the square matrix `a`, exactly.
///
/// # Panics
/// If `a` is not square.
pub fn det(a: &IntMatrix) -> BigInt {
    let n = a.rows();
    assert_eq!(n, a.cols(), "det needs a square matrix");
    let mut w: Vec<Vec<BigInt>> = (0..n)
        .map(|i| a.row(i).iter().map(|&v| BigInt::from(v)).collect())
        .collect();
    let mut sign = BigInt::one();
    let mut prev = BigInt::one();
    for k in 0..n {
        let Some(p) = (k..n).find(|&i| !w[i][k].is_zero()) else {
            return BigInt::zero();
        };
        if p != k {
            w.swap(k, p);
            sign = -sign;
        }
        for i in k + 1..n {
            for j in k + 1..n {
                let v = (&w[k][k] * &w[i][j] - &w[i][k] * &w[k][j]) / &prev;
                w[i][j] = v;
            }
        }
        prev = w[k][k].clone();
    }
    if n == 0 {
        return BigInt::one();
    }
    let d = w[n - 1][n - 1].clone();
    if sign.is_negative() {
        -d
    } else {
        d
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    #[test]
    fn det_of_small_matrices_by_cofactor_expansion() {
        // Values by hand (cofactor expansion).
        assert_eq!(det(&m(&[&[2, 1], &[1, 3]])), BigInt::from(5));
        assert_eq!(det(&m(&[&[0, 1], &[1, 0]])), BigInt::from(-1));
        assert_eq!(
            det(&m(&[&[1, 2, 3], &[4, 5, 6], &[7, 8, 10]])),
            BigInt::from(-3)
        );
        assert_eq!(det(&m(&[&[1, 2], &[2, 4]])), BigInt::zero());
    }

    #[test]
    fn rank_and_pivots() {
        let a = m(&[&[1, 2, 3], &[2, 4, 6], &[0, 1, 1]]);
        let e = echelon(&a);
        assert_eq!(e.pivot_cols, vec![0, 1]);
        assert_eq!(e.pivot_rows, vec![0, 2]);
        assert_eq!(rank(&m(&[&[0, 0], &[0, 0]])), 0);
    }
}
