//! Properties of the matrix analysis on random small matrices: `Δ` and the gcd equal a plain
//! enumeration of every maximal minor (no reductions), and column permutations, column
//! negations and repeated columns change nothing they should not.

use itertools::Itertools;
use kernstep::analysis::{AnalysisOptions, Delta, MatrixAnalysis};
use kernstep::{lattice, IntMatrix};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};
use proptest::prelude::*;

fn matrix() -> impl Strategy<Value = IntMatrix> {
    (1usize..=3, 1usize..=6).prop_flat_map(|(m, n)| {
        prop::collection::vec(prop::collection::vec(-3i64..=3, n), m)
            .prop_map(|rows| IntMatrix::from_rows(&rows).unwrap())
    })
}

/// Oracle: every `r x r` minor of the chosen rows over every column subset.
fn plain_delta_and_gcd(a: &IntMatrix, rows: &[usize]) -> (BigInt, BigInt) {
    let b = a.select_rows(rows);
    let (mut max, mut gcd) = (BigInt::zero(), BigInt::zero());
    for cols in (0..a.cols()).combinations(rows.len()) {
        let d = lattice::det(&b.select_cols(&cols)).abs();
        gcd = gcd.gcd(&d);
        max = max.max(d);
    }
    (max, gcd)
}

fn analyse(a: &IntMatrix) -> MatrixAnalysis {
    MatrixAnalysis::of(a, &AnalysisOptions::new())
}

proptest! {
    #[test]
    fn delta_matches_plain_enumeration(a in matrix()) {
        let got = analyse(&a);
        let (delta, gcd) = plain_delta_and_gcd(&a, &got.independent_rows);
        prop_assert_eq!(got.rank, lattice::rank(&a));
        prop_assert_eq!(got.delta, Delta::Exact(delta));
        prop_assert_eq!(got.maximal_minor_gcd, Some(gcd));
    }

    #[test]
    fn column_operations_keep_the_figures(a in matrix(), seed in any::<u64>()) {
        let n = a.cols();
        let mut order: Vec<usize> = (0..n).collect();
        order.sort_by_key(|&j| (j as u64).wrapping_mul(seed | 1).rotate_left(17));
        let mut changed = a.select_cols(&order);
        for i in 0..changed.rows() {
            changed.set(i, 0, -changed.get(i, 0));
        }
        let (x, y) = (analyse(&a), analyse(&changed));
        prop_assert_eq!(&x.delta, &y.delta);
        prop_assert_eq!(x.column_number, y.column_number);
        prop_assert_eq!(x.column_number_parallel, y.column_number_parallel);
        prop_assert_eq!(x.totally_unimodular, y.totally_unimodular);
        prop_assert_eq!(x.unimodular, y.unimodular);
        prop_assert_eq!(&x.bounds, &y.bounds);
    }

    #[test]
    fn a_repeated_column_keeps_delta_and_column_numbers(a in matrix(), pick in any::<usize>()) {
        let mut cols: Vec<usize> = (0..a.cols()).collect();
        cols.push(pick % a.cols());
        let (x, y) = (analyse(&a), analyse(&a.select_cols(&cols)));
        prop_assert_eq!(&x.delta, &y.delta);
        prop_assert_eq!(x.column_number, y.column_number);
        prop_assert_eq!(x.column_number_parallel, y.column_number_parallel);
        prop_assert_eq!(y.kernel_dimension, x.kernel_dimension + 1);
        prop_assert_eq!(&x.bounds.by_column_number, &y.bounds.by_column_number);
    }
}
