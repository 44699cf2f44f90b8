//! Integer solutions of `A x = b` from the Hermite normal form, or a certificate that none
//! exists.
//!
//! With `H = A U` and `x = U z`, the system becomes `H z = b`; since `H` is lower echelon the
//! pivot rows fix `z` by forward substitution. Two things can fail, and each yields a rational
//! `y` with `y^T A` integral and `y^T b` not (integer Farkas lemma: Schrijver, "Theory of
//! Linear and Integer Programming", 1986, Cor. 4.1a):
//! - a pivot does not divide its residual: `y` is the matching row of `H_P^{-1}` (the pivot
//!   rows of `H`), so `y^T H` is a unit vector and `y^T b` is the fractional value of `z_k`;
//! - a non-pivot row is inconsistent: `y` combines it with the pivot rows so that `y^T A = 0`,
//!   scaled to give `y^T b = 1/2`.
//!
//! `U` is unimodular, so `y^T A` is integral exactly when `y^T H` is. A solution is reduced
//! against the LLL-reduced kernel basis (Babai's nearest plane) to keep its entries small.

use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Zero};

use super::convert::to_big_vec;
use super::hermite::HermiteForm;
use crate::matrix::IntMatrix;

/// The outcome of solving `A x = b` over the integers.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum IntegerSolution {
    /// An integer `x` with `A x = b` exactly.
    Solution(Vec<BigInt>),
    /// No integer solution exists; the certificate proves it.
    NoSolution(Certificate),
}

/// Proof that `A x = b` has no integer solution: a rational `y` (one entry per row of `A`)
/// with `y^T A` integral and `y^T b` not. For integer `x` with `A x = b`, `y^T b = (y^T A) x`
/// would be an integer.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Certificate {
    /// The multipliers of the rows of `A`.
    pub y: Vec<BigRational>,
}

impl Certificate {
    /// Verifies the certificate against `A` and `b` independently of how it was found: `false`
    /// when sizes disagree, some entry of `y^T A` is fractional, or `y^T b` is an integer.
    pub fn check(&self, a: &IntMatrix, b: &[i64]) -> bool {
        if self.y.len() != a.rows() || b.len() != a.rows() {
            return false;
        }
        let combine = |values: Vec<i64>| -> BigRational {
            self.y
                .iter()
                .zip(values)
                .map(|(y, v)| y * BigInt::from(v))
                .sum()
        };
        (0..a.cols()).all(|j| combine(a.col(j)).is_integer()) && !combine(b.to_vec()).is_integer()
    }
}

fn rational(v: &BigInt) -> BigRational {
    BigRational::from_integer(v.clone())
}

impl HermiteForm {
    /// Solves `A x = b` over the integers. See [`HermiteForm::solve_big`].
    ///
    /// # Panics
    /// If `b.len()` differs from the number of rows of `A`.
    pub fn solve(&self, b: &[i64]) -> IntegerSolution {
        self.solve_big(&to_big_vec(b))
    }

    /// Solves `A x = b` over the integers: a solution with small entries, or a certificate of
    /// infeasibility. Both are exact; nothing can overflow.
    ///
    /// # Panics
    /// If `b.len()` differs from the number of rows of `A`.
    pub fn solve_big(&self, b: &[BigInt]) -> IntegerSolution {
        assert_eq!(
            b.len(),
            self.rows,
            "right-hand side length must equal the row count"
        );
        let mut z: Vec<BigInt> = Vec::with_capacity(self.rank());
        for (k, &p) in self.pivot_rows.iter().enumerate() {
            let (q, rem) = self.residual(p, b, &z).div_rem(&self.h[k][p]);
            if !rem.is_zero() {
                return IntegerSolution::NoSolution(self.fractional_certificate(k));
            }
            z.push(q);
        }
        for i in (0..self.rows).filter(|i| !self.pivot_rows.contains(i)) {
            let s = self.residual(i, b, &z);
            if !s.is_zero() {
                return IntegerSolution::NoSolution(self.inconsistency_certificate(i, &s));
            }
        }
        let mut x = vec![BigInt::zero(); self.cols()];
        for (zk, uk) in z.iter().zip(&self.u) {
            for (xi, ui) in x.iter_mut().zip(uk) {
                *xi += zk * ui;
            }
        }
        IntegerSolution::Solution(self.reduced.size_reduce(&x))
    }

    /// `b_i - sum_j H[i][j] z_j` over the known `z`.
    fn residual(&self, i: usize, b: &[BigInt], z: &[BigInt]) -> BigInt {
        z.iter()
            .zip(&self.h)
            .fold(b[i].clone(), |acc, (zj, col)| acc - zj * &col[i])
    }

    /// Solves `H_P^T w = rhs` (upper triangular) by back substitution, where `H_P` holds the
    /// pivot rows and first `r` columns of `H`.
    fn solve_transposed(&self, rhs: Vec<BigRational>) -> Vec<BigRational> {
        let mut w = rhs;
        for j in (0..w.len()).rev() {
            let pj = self.pivot_rows[j];
            let later: BigRational = (j + 1..w.len())
                .map(|i| &w[i] * rational(&self.h[j][self.pivot_rows[i]]))
                .sum();
            w[j] = (&w[j] - later) / rational(&self.h[j][pj]);
        }
        w
    }

    /// Row `k` of `H_P^{-1}`, spread over the pivot rows of `A`.
    fn fractional_certificate(&self, k: usize) -> Certificate {
        let r = self.rank();
        let unit = (0..r)
            .map(|j| BigRational::from_integer(BigInt::from(u8::from(j == k))))
            .collect();
        let w = self.solve_transposed(unit);
        let mut y = vec![BigRational::zero(); self.rows];
        for (&p, wp) in self.pivot_rows.iter().zip(w) {
            y[p] = wp;
        }
        Certificate { y }
    }

    /// `y = (e_i - sum_k w_k e_{p_k}) / (2 s)` with `w^T H_P = H_i`, so `y^T A = 0` and
    /// `y^T b = 1/2` for the residual `s` of row `i`.
    fn inconsistency_certificate(&self, i: usize, s: &BigInt) -> Certificate {
        let row_i = (0..self.rank()).map(|j| rational(&self.h[j][i])).collect();
        let w = self.solve_transposed(row_i);
        let scale = BigRational::one() / rational(&(s * 2));
        let mut y = vec![BigRational::zero(); self.rows];
        y[i] = scale.clone();
        for (&p, wp) in self.pivot_rows.iter().zip(w) {
            y[p] = -wp * &scale;
        }
        Certificate { y }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    fn assert_solves(a: &IntMatrix, b: &[i64]) -> Vec<BigInt> {
        match HermiteForm::new(a).solve(b) {
            IntegerSolution::Solution(x) => {
                for (i, bi) in b.iter().enumerate() {
                    let ax: BigInt = (0..a.cols())
                        .map(|j| BigInt::from(a.get(i, j)) * &x[j])
                        .sum();
                    assert_eq!(ax, BigInt::from(*bi), "row {i}");
                }
                x
            }
            IntegerSolution::NoSolution(c) => panic!("expected a solution, got {c:?}"),
        }
    }

    fn certificate(a: &IntMatrix, b: &[i64]) -> Certificate {
        match HermiteForm::new(a).solve(b) {
            IntegerSolution::Solution(x) => panic!("expected no solution, got {x:?}"),
            IntegerSolution::NoSolution(c) => {
                assert!(c.check(a, b), "certificate {c:?} must check");
                c
            }
        }
    }

    #[test]
    fn two_x_plus_four_y_equals_three_has_the_half_certificate() {
        // 2x + 4y = 3: gcd(2, 4) = 2 does not divide 3; y = 1/2 gives y^T A = (1, 2) and
        // y^T b = 3/2 (by hand).
        let a = m(&[&[2, 4]]);
        let c = certificate(&a, &[3]);
        assert_eq!(c.y, vec![BigRational::new(1.into(), 2.into())]);
    }

    #[test]
    fn inconsistent_rows_give_a_zero_combination_with_half_value() {
        // x + y = 1 and 2x + 2y = 3 have no rational solution (by hand).
        let a = m(&[&[1, 1], &[2, 2]]);
        let c = certificate(&a, &[1, 3]);
        let half = BigRational::new(1.into(), 2.into());
        let yb = &c.y[0] + &c.y[1] * BigRational::from_integer(3.into());
        assert_eq!(yb, half);
        assert!((&c.y[0] + &c.y[1] * BigRational::from_integer(2.into())).is_zero());
    }

    #[test]
    fn solvable_systems_are_solved_exactly() {
        assert_solves(&m(&[&[2, 4, 6], &[1, 3, 5]]), &[10, 9]);
        assert_solves(&m(&[&[6, 10, 15]]), &[1]);
        assert_solves(&m(&[&[1, 1], &[2, 2]]), &[3, 6]);
        assert_solves(&IntMatrix::zeros(0, 2), &[]);
        assert_solves(&IntMatrix::zeros(2, 0), &[0, 0]);
    }

    #[test]
    fn zero_columns_with_nonzero_rhs_are_infeasible() {
        certificate(&IntMatrix::zeros(2, 0), &[0, 5]);
        certificate(&IntMatrix::zeros(1, 3), &[-4]);
    }

    #[test]
    fn solutions_are_reduced_against_the_kernel() {
        // x - y = 1000 has the solution (1000, 0) and its neighbours (1000 + t, t); the one
        // nearest the origin after reduction is (500, -500) (by hand: Babai rounding).
        let x = assert_solves(&m(&[&[1, -1]]), &[1000]);
        assert_eq!(x, vec![BigInt::from(500), BigInt::from(-500)]);
    }

    #[test]
    fn a_certificate_for_other_data_does_not_check() {
        let a = m(&[&[2, 4]]);
        let c = certificate(&a, &[3]);
        assert!(!c.check(&a, &[4]));
        assert!(!c.check(&m(&[&[1, 4]]), &[3]));
        assert!(!c.check(&m(&[&[2, 4], &[1, 1]]), &[3, 1]));
    }
}
