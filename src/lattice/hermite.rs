//! Column-style Hermite normal form `H = A U` with its unimodular transform `U`
//! (Hermite 1851; see Schrijver, "Theory of Linear and Integer Programming", 1986, Ch. 4, or
//! Cohen, "A Course in Computational Algebraic Number Theory", 1993, Sec. 2.4).
//!
//! Invariants of [`HermiteForm`], for `A` of size `m x n` and rank `r`:
//! - `H = A U`, `U` is `n x n` with determinant `±1`;
//! - the first `r` columns of `H` are nonzero, the others zero; column `k < r` has its first
//!   nonzero entry (the pivot, positive) in row `pivot_rows[k]`, and the pivot rows increase;
//! - left of a pivot every entry of its row lies in `[0, pivot)`;
//! - the last `n - r` columns of `U` are a basis of `ker_Z(A)` (Schrijver, Cor. 4.3c): `U` is
//!   invertible over `Z`, so every integer kernel vector is an integer combination of them.
//!
//! The form is built by integer column operations on `A` stacked over the identity; each row is
//! cleared by a Euclid-style loop that always divides by the entry of least magnitude and
//! rounds to the nearest quotient. The first `r` columns of `U` may still grow large; once the
//! kernel basis is LLL-reduced they are size-reduced against it (adding kernel vectors leaves
//! `H` unchanged and `U` unimodular), so `U` and every solution built from it stay small.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};

use super::lll::{round_div, ReducedBasis};
use crate::matrix::IntMatrix;

/// The Hermite normal form of an integer matrix, its transform and the LLL-reduced kernel.
#[derive(Clone, Debug)]
pub struct HermiteForm {
    pub(super) rows: usize,
    pub(super) h: Vec<Vec<BigInt>>,
    pub(super) u: Vec<Vec<BigInt>>,
    pub(super) pivot_rows: Vec<usize>,
    pub(super) reduced: ReducedBasis,
}

/// `x -= q * y`, entry by entry.
fn sub_multiple(x: &mut [BigInt], q: &BigInt, y: &[BigInt]) {
    for (a, b) in x.iter_mut().zip(y) {
        *a -= q * b;
    }
}

/// The integer nearest to `a / b` for any nonzero `b`.
fn nearest_quotient(a: &BigInt, b: &BigInt) -> BigInt {
    if b.is_negative() {
        round_div(&-a, &-b)
    } else {
        round_div(a, b)
    }
}

/// Clears row `i` in the stacked columns `r..` so that only column `r` keeps a nonzero entry,
/// made positive. Returns `false` (and changes nothing) when the row is already zero there.
fn clear_row(cols: &mut [Vec<BigInt>], i: usize, r: usize) -> bool {
    loop {
        let Some(p) = (r..cols.len())
            .filter(|&j| !cols[j][i].is_zero())
            .min_by(|&x, &y| cols[x][i].magnitude().cmp(cols[y][i].magnitude()))
        else {
            return false;
        };
        cols.swap(r, p);
        let (head, tail) = cols.split_at_mut(r + 1);
        let pivot = &mut head[r];
        let mut cleared = true;
        for c in tail.iter_mut().filter(|c| !c[i].is_zero()) {
            let q = nearest_quotient(&c[i], &pivot[i]);
            sub_multiple(c, &q, pivot);
            cleared &= c[i].is_zero();
        }
        if cleared {
            if pivot[i].is_negative() {
                pivot.iter_mut().for_each(|v| *v = -&*v);
            }
            return true;
        }
    }
}

/// Reduces the entries of row `i` left of the pivot column `r` into `[0, pivot)`.
fn reduce_left_of_pivot(cols: &mut [Vec<BigInt>], i: usize, r: usize) {
    let (head, tail) = cols.split_at_mut(r);
    let pivot = &tail[0];
    for c in head {
        let q = c[i].div_floor(&pivot[i]);
        if !q.is_zero() {
            sub_multiple(c, &q, pivot);
        }
    }
}

impl HermiteForm {
    /// Computes the Hermite normal form of `a`, its transform and an LLL-reduced kernel basis.
    pub fn new(a: &IntMatrix) -> Self {
        let (m, n) = (a.rows(), a.cols());
        let mut cols: Vec<Vec<BigInt>> = (0..n)
            .map(|j| {
                let mut c: Vec<BigInt> = a.col(j).into_iter().map(BigInt::from).collect();
                c.extend((0..n).map(|k| BigInt::from(u8::from(k == j))));
                c
            })
            .collect();
        let mut pivot_rows = Vec::new();
        for i in 0..m {
            let r = pivot_rows.len();
            if r == n {
                break;
            }
            if clear_row(&mut cols, i, r) {
                reduce_left_of_pivot(&mut cols, i, r);
                pivot_rows.push(i);
            }
        }
        let (h, mut u): (Vec<_>, Vec<_>) = cols
            .into_iter()
            .map(|mut c| {
                let u = c.split_off(m);
                (c, u)
            })
            .unzip();
        let r = pivot_rows.len();
        // Shortest vectors first: the reduction then needs fewer exchanges.
        let mut kernel = u[r..].to_vec();
        kernel.sort_by_cached_key(|v| v.iter().map(|x| x * x).sum::<BigInt>());
        let reduced = ReducedBasis::new(kernel);
        for c in &mut u[..r] {
            *c = reduced.size_reduce(c);
        }
        Self {
            rows: m,
            h,
            u,
            pivot_rows,
            reduced,
        }
    }

    /// Rank of `A` over the rationals (the number of pivots).
    pub fn rank(&self) -> usize {
        self.pivot_rows.len()
    }

    /// Number of rows `m` of `A`.
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Number of columns `n` of `A` (the lattice lives in `Z^n`).
    pub fn cols(&self) -> usize {
        self.u.len()
    }

    /// Rows of `A` that hold the pivots of `H`, increasing; they are linearly independent.
    pub fn pivot_rows(&self) -> &[usize] {
        &self.pivot_rows
    }

    /// The columns of `H = A U` (each of length `m`).
    pub fn hermite_columns(&self) -> &[Vec<BigInt>] {
        &self.h
    }

    /// The columns of the unimodular transform `U` (each of length `n`).
    pub fn transform_columns(&self) -> &[Vec<BigInt>] {
        &self.u
    }

    /// The last `n - r` columns of `U`: a basis of `ker_Z(A)`, exactly as the elimination left
    /// them (entries may be large; see [`HermiteForm::reduced_kernel`]).
    pub fn kernel_basis(&self) -> Vec<Vec<BigInt>> {
        self.u[self.rank()..].to_vec()
    }

    /// An LLL-reduced basis of `ker_Z(A)` (same lattice as [`HermiteForm::kernel_basis`],
    /// short vectors); integer solutions are reduced against it.
    pub fn reduced_kernel(&self) -> &[Vec<BigInt>] {
        self.reduced.vectors()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lattice::bareiss::det;

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    /// Checks every invariant stated in the module documentation.
    fn assert_invariants(a: &IntMatrix, hf: &HermiteForm) {
        let n = a.cols();
        assert!(hf.h.iter().all(|c| c.len() == a.rows()));
        for (j, (hc, uc)) in hf.h.iter().zip(&hf.u).enumerate() {
            for (i, hij) in hc.iter().enumerate() {
                let au: BigInt = (0..n).map(|k| BigInt::from(a.get(i, k)) * &uc[k]).sum();
                assert_eq!(&au, hij, "H = AU at ({i}, {j})");
            }
        }
        let uinv = IntMatrix::from_rows(
            &(0..n)
                .map(|i| {
                    (0..n)
                        .map(|j| i64::try_from(&hf.u[j][i]).unwrap())
                        .collect()
                })
                .collect::<Vec<_>>(),
        )
        .unwrap();
        assert_eq!(det(&uinv).abs(), BigInt::from(1), "U is unimodular");
        let r = hf.rank();
        assert!(hf.h[r..].iter().all(|c| c.iter().all(Zero::is_zero)));
        assert!(hf.pivot_rows.windows(2).all(|w| w[0] < w[1]));
        for (k, &p) in hf.pivot_rows.iter().enumerate() {
            assert!(
                hf.h[k][..p].iter().all(Zero::is_zero),
                "zeros above pivot {k}"
            );
            assert!(hf.h[k][p].is_positive());
            for c in &hf.h[..k] {
                assert!(
                    !c[p].is_negative() && c[p] < hf.h[k][p],
                    "reduced left of pivot"
                );
            }
        }
    }

    #[test]
    fn hermite_form_of_a_worked_example() {
        // [[2, 4, 6], [1, 3, 5]]: the columns generate {(2s, t)}, so the column HNF is
        // [[2, 0, 0], [0, 1, 0]], and the kernel is spanned by (1, -2, 1) (by hand).
        let a = m(&[&[2, 4, 6], &[1, 3, 5]]);
        let hf = HermiteForm::new(&a);
        assert_invariants(&a, &hf);
        assert_eq!(hf.rank(), 2);
        let h: Vec<Vec<i64>> =
            hf.h.iter()
                .map(|c| c.iter().map(|v| i64::try_from(v).unwrap()).collect())
                .collect();
        assert_eq!(h, vec![vec![2, 0], vec![0, 1], vec![0, 0]]);
        let k = &hf.kernel_basis()[0];
        let k: Vec<i64> = k.iter().map(|v| i64::try_from(v).unwrap()).collect();
        assert!(k == vec![1, -2, 1] || k == vec![-1, 2, -1], "{k:?}");
    }

    #[test]
    fn dependent_and_zero_rows_give_no_pivot() {
        let a = m(&[&[0, 0, 0], &[1, 2, 3], &[2, 4, 6], &[0, 1, 1]]);
        let hf = HermiteForm::new(&a);
        assert_invariants(&a, &hf);
        assert_eq!(hf.pivot_rows(), &[1, 3]);
        assert_eq!(hf.kernel_basis().len(), 1);
    }

    #[test]
    fn empty_shapes() {
        let no_rows = IntMatrix::zeros(0, 3);
        let hf = HermiteForm::new(&no_rows);
        assert_eq!((hf.rank(), hf.kernel_basis().len()), (0, 3));
        let no_cols = IntMatrix::zeros(2, 0);
        let hf = HermiteForm::new(&no_cols);
        assert_eq!((hf.rank(), hf.kernel_basis().len(), hf.cols()), (0, 0, 0));
    }

    #[test]
    fn full_column_rank_has_an_empty_kernel() {
        let a = m(&[&[3, 1], &[5, 2], &[7, 11]]);
        let hf = HermiteForm::new(&a);
        assert_invariants(&a, &hf);
        assert_eq!(hf.rank(), 2);
        assert!(hf.kernel_basis().is_empty() && hf.reduced_kernel().is_empty());
    }
}
