//! A machine-integer copy of a Hermite form, for solving `A x = b` many times over.
//!
//! Re-planning solves the same matrix for thousands of right-hand sides; the exact solver in
//! `solve.rs` allocates big integers for every one. [`QuickSolver`] runs the same forward
//! substitution (`H z = b` on the pivot rows, then `x = U_r z` with `U_r` the first `r`
//! columns of `U`) in checked 64-bit arithmetic over row-major copies (each step a dot
//! product of two contiguous slices). It answers only when everything fits and a solution
//! exists; every other case (overflow, a pivot that does not divide, an inconsistent row)
//! returns `None`, and the caller asks the exact solver, which also yields the certificate.
//! Its solutions are not size-reduced; callers round them themselves.

use super::hermite::HermiteForm;

/// The first `r` columns of `H` and of `U` in `i64`, row by row.
#[derive(Clone, Debug)]
pub struct QuickSolver {
    rows: usize,
    cols: usize,
    pivot_rows: Vec<usize>,
    /// `h[i * r + k]`: entry `(i, k)` of `H`, `k < r`.
    h: Vec<i64>,
    /// `u[j * r + k]`: entry `(j, k)` of `U`, `k < r`.
    u: Vec<i64>,
}

impl QuickSolver {
    /// The copy of `form`, or `None` when one of its entries does not fit in `i64`.
    pub fn new(form: &HermiteForm) -> Option<Self> {
        let rank = form.rank();
        let small = |columns: &[Vec<num_bigint::BigInt>], length: usize| -> Option<Vec<i64>> {
            let mut flat = vec![0; length * rank];
            for (k, column) in columns[..rank].iter().enumerate() {
                for (i, v) in column.iter().enumerate() {
                    flat[i * rank + k] = i64::try_from(v).ok()?;
                }
            }
            Some(flat)
        };
        Some(Self {
            rows: form.rows(),
            cols: form.cols(),
            pivot_rows: form.pivot_rows().to_vec(),
            h: small(form.hermite_columns(), form.rows())?,
            u: small(form.transform_columns(), form.cols())?,
        })
    }

    /// An integer `x` with `A x = b`, or `None` when there is none or a value overflows.
    ///
    /// # Panics
    /// If `b.len()` differs from the number of rows of `A`.
    pub fn solve(&self, b: &[i64]) -> Option<Vec<i64>> {
        assert_eq!(
            b.len(),
            self.rows,
            "right-hand side length must equal the row count"
        );
        let rank = self.pivot_rows.len();
        let mut z: Vec<i64> = Vec::with_capacity(rank);
        for (k, &p) in self.pivot_rows.iter().enumerate() {
            let residual = self.residual(p, b, &z)?;
            let pivot = self.h[p * rank + k];
            if residual.checked_rem(pivot)? != 0 {
                return None;
            }
            z.push(residual.checked_div(pivot)?);
        }
        let mut pivots = self.pivot_rows.iter().peekable();
        for i in 0..self.rows {
            if pivots.next_if_eq(&&i).is_none() && self.residual(i, b, &z)? != 0 {
                return None;
            }
        }
        if rank == 0 {
            return Some(vec![0; self.cols]);
        }
        self.u.chunks_exact(rank).map(|row| dot(row, &z)).collect()
    }

    /// `b_i - sum_k H[i][k] z_k` over the `z` known so far, checked.
    fn residual(&self, i: usize, b: &[i64], z: &[i64]) -> Option<i64> {
        let rank = self.pivot_rows.len();
        let row = &self.h[i * rank..i * rank + z.len()];
        b[i].checked_sub(dot(row, z)?)
    }
}

/// `sum_k a_k b_k`, checked.
fn dot(a: &[i64], b: &[i64]) -> Option<i64> {
    a.iter()
        .zip(b)
        .try_fold(0i64, |sum, (x, y)| sum.checked_add(x.checked_mul(*y)?))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lattice::IntegerSolution;
    use crate::matrix::IntMatrix;

    fn matrix(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    fn product(a: &IntMatrix, x: &[i64]) -> Vec<i64> {
        (0..a.rows())
            .map(|i| (0..a.cols()).map(|j| a.get(i, j) * x[j]).sum())
            .collect()
    }

    #[test]
    fn agrees_with_the_exact_solver_on_solvability_and_solves_exactly() {
        // Rank-deficient rows, a pivot of 2 and an inconsistent combination among the cases.
        let a = matrix(&[&[2, 4, 0, 1], &[0, 2, 6, 3], &[2, 6, 6, 4]]);
        let form = HermiteForm::new(&a);
        let quick = QuickSolver::new(&form).unwrap();
        for b0 in -4..=4 {
            for b1 in -4..=4 {
                for b2 in [b0 + b1, b0 + b1 + 1] {
                    let b = [b0, b1, b2];
                    let exact = matches!(form.solve(&b), IntegerSolution::Solution(_));
                    match quick.solve(&b) {
                        Some(x) => assert_eq!(product(&a, &x), b, "b = {b:?}"),
                        None => assert!(!exact, "b = {b:?} is solvable"),
                    }
                }
            }
        }
    }

    #[test]
    fn a_zero_matrix_gives_the_zero_point_of_full_length() {
        let a = matrix(&[&[0, 0, 0]]);
        let quick = QuickSolver::new(&HermiteForm::new(&a)).unwrap();
        assert_eq!(quick.solve(&[0]), Some(vec![0, 0, 0]));
        assert_eq!(quick.solve(&[1]), None);
    }

    #[test]
    fn near_the_limits_it_is_right_or_silent_never_wrong() {
        for (row, b) in [
            (vec![1, 1], i64::MAX),
            (vec![3, 1 << 40], i64::MAX),
            (vec![3, 1 << 40], i64::MIN + 1),
            (vec![-7, 1 << 50, 5], i64::MAX - 3),
        ] {
            let a = IntMatrix::from_rows(std::slice::from_ref(&row)).unwrap();
            let form = HermiteForm::new(&a);
            let quick = QuickSolver::new(&form).unwrap();
            assert!(matches!(form.solve(&[b]), IntegerSolution::Solution(_)));
            if let Some(x) = quick.solve(&[b]) {
                let ax: i128 = row
                    .iter()
                    .zip(&x)
                    .map(|(r, v)| i128::from(*r) * i128::from(*v))
                    .sum();
                assert_eq!(ax, i128::from(b), "{row:?}");
            }
        }
    }
}
