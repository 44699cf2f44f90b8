//! Unimodularity and total unimodularity, decided by enumeration within a work limit.
//!
//! Definitions used here:
//! - `A` of rank `r` is *unimodular* when all nonzero `r x r` minors of its full-row-rank
//!   version `B` have the same absolute value (then that value is their gcd). The notion
//!   depends only on the row space, hence only on `ker_Z(A)`; for such matrices the circuits
//!   are exactly the Graver basis (Sturmfels, "Gröbner Bases and Convex Polytopes", 1996,
//!   ch. 8; from memory). When that common value is 1 this is Schrijver's unimodularity
//!   ("Theory of Linear and Integer Programming", 1986, §19.1 and §21.4).
//! - `A` is *totally unimodular* when every square submatrix has determinant 0, 1 or -1
//!   (Schrijver 1986, §19.1).

use serde::Serialize;

use super::columns::{transpose, ColumnClasses};
use super::delta::MinorSummary;
use super::minors::{binomial, minor};
use crate::matrix::IntMatrix;

/// The answer to a yes/no question about the matrix.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Decision {
    /// The property holds.
    Yes,
    /// The property fails.
    No,
    /// Deciding it would take more work than the configured limit allows.
    Undecided,
}

/// Unimodularity from the column classes of `A` and the maximal minors of `B` over one
/// representative column per parallel class.
///
/// A parallel class `{t_1 p, t_2 p}` with `|t_1| != |t_2|` already decides "no": `p` extends
/// to a basis of columns, whose minor `m != 0` gives the two values `t_1 m` and `t_2 m`. When
/// every class is uniform, all members give the same minors up to sign, so the
/// representatives decide.
pub(crate) fn unimodular(classes: &ColumnClasses, minors: &MinorSummary) -> Decision {
    if !classes.uniform() {
        return Decision::No;
    }
    match minors.equal_abs {
        Some(true) => Decision::Yes,
        Some(false) => Decision::No,
        None => Decision::Undecided,
    }
}

/// Total unimodularity of `a`, evaluating at most `limit` square submatrices of order >= 2.
///
/// Entries outside `{-1, 0, 1}` decide "no" at once. Zero rows and columns, and rows or
/// columns equal up to sign to an earlier one, are dropped first: a square submatrix that
/// uses a zero line or two such lines has determinant 0, and swapping a line for its
/// negative only flips the sign.
pub(crate) fn totally_unimodular(a: &IntMatrix, limit: u64) -> Decision {
    if a.max_abs() > 1 {
        return Decision::No;
    }
    let reduced = a.select_cols(&ColumnClasses::of(a).up_to_sign);
    let rows = ColumnClasses::of(&transpose(&reduced)).up_to_sign;
    let reduced = reduced.select_rows(&rows);
    let (m, n) = (reduced.rows(), reduced.cols());
    let work = (2..=m.min(n)).fold(0u128, |acc, k| {
        acc.saturating_add(binomial(m, k).saturating_mul(binomial(n, k)))
    });
    if work > u128::from(limit) {
        return Decision::Undecided;
    }
    for k in 2..=m.min(n) {
        for r in itertools::Itertools::combinations(0..m, k) {
            for c in itertools::Itertools::combinations(0..n, k) {
                if minor(&reduced, &r, &c).magnitude() > &1u32.into() {
                    return Decision::No;
                }
            }
        }
    }
    Decision::Yes
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::delta::maximal_minors;

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    #[test]
    fn odd_cycle_incidence_is_not_totally_unimodular() {
        // The vertex-edge incidence matrix of a triangle has determinant 2 (by expansion);
        // bipartite graphs give TU incidence matrices, odd cycles do not (Schrijver 1986, §19.3).
        let a = m(&[&[1, 1, 0], &[0, 1, 1], &[1, 0, 1]]);
        assert_eq!(totally_unimodular(&a, 1000), Decision::No);
        let path = m(&[&[1, 0], &[1, 1], &[0, 1]]);
        assert_eq!(totally_unimodular(&path, 1000), Decision::Yes);
    }

    #[test]
    fn large_entries_and_limits() {
        assert_eq!(totally_unimodular(&m(&[&[2, 1]]), 0), Decision::No);
        // After dropping repeated lines this 0/1 matrix is still 3 x 3: C(3,2)^2 + 1 = 10
        // square submatrices of order >= 2, more than a limit of 9.
        let a = m(&[&[1, 1, 0, 1], &[0, 1, 1, 0], &[1, 0, 1, 1]]);
        assert_eq!(totally_unimodular(&a, 9), Decision::Undecided);
        assert_eq!(totally_unimodular(&a, 10), Decision::No);
    }

    #[test]
    fn unequal_parallel_columns_are_not_unimodular() {
        // Columns (1,0), (2,0), (0,1): minors 1 and 2 (by hand).
        let a = m(&[&[1, 2, 0], &[0, 0, 1]]);
        let classes = ColumnClasses::of(&a);
        let minors = maximal_minors(&a, &classes.representatives(), 0);
        assert_eq!(unimodular(&classes, &minors), Decision::No);
        let b = m(&[&[1, -1, 0], &[0, 0, 1]]);
        let classes = ColumnClasses::of(&b);
        let minors = maximal_minors(&b, &classes.representatives(), 10);
        assert_eq!(unimodular(&classes, &minors), Decision::Yes);
        let undecided = maximal_minors(&b, &classes.representatives(), 0);
        assert_eq!(unimodular(&classes, &undecided), Decision::Undecided);
    }
}
