//! Exact square subdeterminants and subset counts.
//!
//! A minor is first evaluated by fraction-free elimination (Bareiss 1968) in checked `i128`
//! arithmetic, which is fast for the small entries of real models; when any step would
//! overflow, the same minor is recomputed with big integers by [`crate::lattice::det`].

use num_bigint::BigInt;

use crate::lattice;
use crate::matrix::IntMatrix;

/// The determinant of the submatrix of `a` on `rows` x `cols` (equal lengths), exactly.
pub(crate) fn minor(a: &IntMatrix, rows: &[usize], cols: &[usize]) -> BigInt {
    debug_assert_eq!(rows.len(), cols.len(), "a minor needs a square selection");
    let w: Vec<Vec<i128>> = rows
        .iter()
        .map(|&i| cols.iter().map(|&j| i128::from(a.get(i, j))).collect())
        .collect();
    match bareiss_i128(w) {
        Some(d) => BigInt::from(d),
        None => lattice::det(&a.select_rows(rows).select_cols(cols)),
    }
}

/// Determinant by Bareiss elimination; `None` when an intermediate value overflows `i128`.
fn bareiss_i128(mut w: Vec<Vec<i128>>) -> Option<i128> {
    let n = w.len();
    let mut sign = 1i128;
    let mut prev = 1i128;
    for k in 0..n {
        let Some(p) = (k..n).find(|&i| w[i][k] != 0) else {
            return Some(0);
        };
        if p != k {
            w.swap(k, p);
            sign = -sign;
        }
        for i in k + 1..n {
            for j in k + 1..n {
                let a = w[k][k].checked_mul(w[i][j])?;
                let b = w[i][k].checked_mul(w[k][j])?;
                w[i][j] = a.checked_sub(b)? / prev;
            }
        }
        prev = w[k][k];
    }
    if n == 0 {
        return Some(1);
    }
    w[n - 1][n - 1].checked_mul(sign)
}

/// The binomial coefficient `C(n, k)`, saturating at `u128::MAX` (also when an intermediate
/// product `C(n, i) (n - i)` would exceed it); used only to compare work against a limit.
pub(crate) fn binomial(n: usize, k: usize) -> u128 {
    if k > n {
        return 0;
    }
    let k = k.min(n - k);
    let mut acc: u128 = 1;
    for i in 0..k {
        // acc * (n - i) / (i + 1) is exact: acc = C(n, i) and C(n, i) (n - i) = C(n, i+1) (i+1).
        let Some(next) = acc.checked_mul((n - i) as u128) else {
            return u128::MAX;
        };
        acc = next / (i as u128 + 1);
    }
    acc
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn minors_match_the_big_integer_determinant() {
        // Reference: lattice::det (big-integer Bareiss, checked by cofactor expansion there).
        let a =
            IntMatrix::from_rows(&[vec![3, 1, 4, 1], vec![5, 9, 2, 6], vec![5, 3, 5, 8]]).unwrap();
        for cols in [[0, 1, 2], [0, 2, 3], [1, 2, 3], [0, 1, 3]] {
            let reference = lattice::det(&a.select_cols(&cols));
            assert_eq!(minor(&a, &[0, 1, 2], &cols), reference);
        }
        assert_eq!(minor(&a, &[], &[]), BigInt::from(1));
    }

    #[test]
    fn huge_entries_fall_back_to_big_integers() {
        // det [[M, 1, 0], [1, M, 1], [0, 1, M]] = M^3 - 2M, by cofactor expansion; with
        // M = i64::MAX the second elimination step needs about 2^252.
        let big = i64::MAX;
        let a = IntMatrix::from_rows(&[vec![big, 1, 0], vec![1, big, 1], vec![0, 1, big]]).unwrap();
        let m = BigInt::from(big);
        let expected = &m * &m * &m - 2 * &m;
        assert_eq!(minor(&a, &[0, 1, 2], &[0, 1, 2]), expected);
    }

    #[test]
    fn binomials_by_pascal_and_saturation() {
        // Values: the standard counting formula C(n, k) = n! / (k! (n - k)!).
        assert_eq!(binomial(15, 5), 3003);
        assert_eq!(binomial(5, 0), 1);
        assert_eq!(binomial(3, 4), 0);
        assert_eq!(binomial(60, 30), 118_264_581_564_861_424);
        assert_eq!(binomial(400, 200), u128::MAX);
    }
}
