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

use schemars::JsonSchema;
use serde::Serialize;

use super::columns::{transpose, ColumnClasses};
use super::delta::MinorSummary;
use super::minors::{binomial, minor};
use crate::matrix::IntMatrix;

/// The answer to a yes/no question about the matrix.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, JsonSchema)]
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

/// Total unimodularity decided from the structure of `a`, without enumeration, for matrices
/// with entries in `{-1, 0, 1}` and at most two nonzeros per column (incidence matrices of
/// digraphs and bipartite graphs, transportation matrices). Such a matrix is totally
/// unimodular if and only if its rows split into two classes so that the two nonzeros of a
/// column lie in different classes when they have the same sign and in the same class when
/// their signs differ (Heller and Tompkins 1956; Schrijver 1986, Thm. 19.3 and ch. 21).
/// A contradiction among the columns with at most two nonzeros is final (they form a
/// submatrix that is not totally unimodular); otherwise a column with more nonzeros leaves
/// the question open: `None`.
pub(crate) fn two_per_column(a: &IntMatrix) -> Option<Decision> {
    if a.max_abs() > 1 {
        return None;
    }
    // Union-find over rows with the parity of each row relative to its root.
    let mut parent: Vec<usize> = (0..a.rows()).collect();
    let mut parity = vec![false; a.rows()];
    fn root(parent: &mut [usize], parity: &mut [bool], i: usize) -> (usize, bool) {
        if parent[i] == i {
            return (i, false);
        }
        let (r, p) = root(parent, parity, parent[i]);
        parent[i] = r;
        parity[i] ^= p;
        (r, parity[i])
    }
    let mut applies = true;
    for j in 0..a.cols() {
        let nz: Vec<usize> = (0..a.rows()).filter(|&i| a.get(i, j) != 0).collect();
        match nz.as_slice() {
            [] | [_] => {}
            &[i, k] => {
                let differ = a.get(i, j) == a.get(k, j);
                let ((ri, pi), (rk, pk)) = (
                    root(&mut parent, &mut parity, i),
                    root(&mut parent, &mut parity, k),
                );
                if ri == rk {
                    if (pi ^ pk) != differ {
                        return Some(Decision::No);
                    }
                } else {
                    parent[ri] = rk;
                    parity[ri] = pi ^ pk ^ differ;
                }
            }
            _ => applies = false,
        }
    }
    applies.then_some(Decision::Yes)
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
    if let Some(decision) = two_per_column(a) {
        return decision;
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
        // No repeated lines in this 3 x 3 0/1 matrix: C(3,2)^2 + 1 = 10 square submatrices
        // of order >= 2, more than a limit of 9; its last column has three nonzeros, so the
        // structural test leaves it open. Every minor is 0 or ±1 (by hand).
        let a = m(&[&[1, 0, 1], &[0, 1, 1], &[1, 1, 1]]);
        assert_eq!(two_per_column(&a), None);
        assert_eq!(totally_unimodular(&a, 9), Decision::Undecided);
        assert_eq!(totally_unimodular(&a, 10), Decision::Yes);
        // Columns 0..2 of this one form an odd cycle: decided without enumeration.
        let b = m(&[&[1, 1, 0, 1], &[0, 1, 1, 1], &[1, 0, 1, 1]]);
        assert_eq!(totally_unimodular(&b, 0), Decision::No);
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

    #[test]
    fn incidence_matrices_are_recognised() {
        // Directed triangle (opposite signs per column) and a 2 x 2 transportation matrix.
        let digraph = m(&[&[1, 0, -1], &[-1, 1, 0], &[0, -1, 1]]);
        assert_eq!(two_per_column(&digraph), Some(Decision::Yes));
        let transport = m(&[&[1, 1, 0, 0], &[0, 0, 1, 1], &[1, 0, 1, 0], &[0, 1, 0, 1]]);
        assert_eq!(two_per_column(&transport), Some(Decision::Yes));
        // Undirected triangle: an odd cycle, determinant 2 (Schrijver 1986, ch. 19).
        let odd = m(&[&[1, 0, 1], &[1, 1, 0], &[0, 1, 1]]);
        assert_eq!(two_per_column(&odd), Some(Decision::No));
        assert_eq!(totally_unimodular(&odd, 0), Decision::No);
        assert_eq!(two_per_column(&m(&[&[1, 1], &[1, 1], &[1, 0]])), None);
    }
}
