//! Properties of the exact lattice core against simple, independent oracles: brute-force
//! search in a box, determinants of minors, ranks of stacked matrices.

mod proptest_cases;
use proptest_cases::Class;

use itertools::Itertools;
use kernstep::lattice::{
    det, rank, reduced_kernel_basis, to_i64_vec, HermiteForm, IntegerSolution, RowSpaceKey,
};
use kernstep::{Error, IntMatrix};
use num_bigint::BigInt;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Zero};
use proptest::prelude::*;

fn matrix(rows: &[Vec<i64>]) -> IntMatrix {
    IntMatrix::from_rows(rows).unwrap()
}

fn matrix_with_cols(max_rows: usize, n: usize, bound: i64) -> impl Strategy<Value = IntMatrix> {
    (1..=max_rows).prop_flat_map(move |m| {
        prop::collection::vec(prop::collection::vec(-bound..=bound, n), m)
            .prop_map(|rows| matrix(&rows))
    })
}

fn small_matrix(max_rows: usize, max_cols: usize, bound: i64) -> impl Strategy<Value = IntMatrix> {
    (1..=max_cols).prop_flat_map(move |n| matrix_with_cols(max_rows, n, bound))
}

/// Two matrices with the same number of columns.
fn matrix_pair(
    max_rows: usize,
    max_cols: usize,
    bound: i64,
) -> impl Strategy<Value = (IntMatrix, IntMatrix)> {
    (1..=max_cols).prop_flat_map(move |n| {
        (
            matrix_with_cols(max_rows, n, bound),
            matrix_with_cols(max_rows, n, bound),
        )
    })
}

fn big_to_i64(v: &[BigInt]) -> Vec<i64> {
    to_i64_vec(v, "test vector").unwrap()
}

/// The gcd of all `d x d` minors of the `n x d` matrix whose columns are `basis`.
fn gcd_of_maximal_minors(basis: &[Vec<i64>], n: usize) -> BigInt {
    let d = basis.len();
    (0..n).combinations(d).fold(BigInt::zero(), |g, rows| {
        let minor: Vec<Vec<i64>> = rows
            .iter()
            .map(|&i| basis.iter().map(|b| b[i]).collect())
            .collect();
        g.gcd(&det(&matrix(&minor)))
    })
}

/// A Z-basis of `ker_Z(A)`: in the kernel, `n - rank` vectors, and saturated. A full-column-
/// rank integer matrix spans `span_Q ∩ Z^n` exactly when the gcd of its maximal minors is 1
/// (Schrijver, Theory of Linear and Integer Programming, 1986, Cor. 4.1c; Cohen, A Course in
/// Computational Algebraic Number Theory, 1993, Sec. 2.4.3).
fn assert_kernel_z_basis(a: &IntMatrix, basis: &[Vec<i64>]) {
    let n = a.cols();
    assert_eq!(basis.len(), n - rank(a), "dimension n - rank");
    for v in basis {
        assert_eq!(a.mul_vec(v), Some(vec![0; a.rows()]), "{v:?} in the kernel");
    }
    if !basis.is_empty() {
        assert_eq!(gcd_of_maximal_minors(basis, n), BigInt::one(), "index 1");
    }
}

/// Solves `B c = v` for the columns `B` of `basis` and checks the integral `c` found.
fn expresses_integrally(basis: &[Vec<i64>], v: &[i64]) -> bool {
    let n = v.len();
    let b = matrix(
        &(0..n)
            .map(|i| basis.iter().map(|col| col[i]).collect())
            .collect::<Vec<_>>(),
    );
    match HermiteForm::new(&b).solve(v) {
        IntegerSolution::Solution(c) => b.mul_vec(&big_to_i64(&c)) == Some(v.to_vec()),
        IntegerSolution::NoSolution(cert) => {
            assert!(cert.check(&b, v));
            false
        }
    }
}

/// Every integer point of the box `[-r, r]^n`.
fn box_points(n: usize, r: i64) -> impl Iterator<Item = Vec<i64>> {
    (0..n).map(|_| -r..=r).multi_cartesian_product()
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::SmallExact))]

    #[test]
    fn kernel_bases_span_exactly_the_integer_kernel(a in small_matrix(4, 6, 4)) {
        let hf = HermiteForm::new(&a);
        let raw: Vec<Vec<i64>> = hf.kernel_basis().iter().map(|v| big_to_i64(v)).collect();
        assert_kernel_z_basis(&a, &raw);
        assert_kernel_z_basis(&a, &reduced_kernel_basis(&a).unwrap());
    }

    #[test]
    fn reduced_and_hermite_bases_express_each_other(a in small_matrix(3, 6, 5)) {
        let raw: Vec<Vec<i64>> = HermiteForm::new(&a)
            .kernel_basis()
            .iter()
            .map(|v| big_to_i64(v))
            .collect();
        let reduced = reduced_kernel_basis(&a).unwrap();
        for v in &reduced {
            prop_assert!(expresses_integrally(&raw, v));
        }
        for v in &raw {
            prop_assert!(expresses_integrally(&reduced, v));
        }
    }

    #[test]
    fn solve_agrees_with_brute_force(a in small_matrix(2, 3, 3), b in prop::collection::vec(-4i64..=4, 2)) {
        let b = &b[..a.rows()];
        // Oracle: search the box [-8, 8]^n for an integer solution.
        let brute = box_points(a.cols(), 8).find(|x| a.mul_vec(x).as_deref() == Some(b));
        match HermiteForm::new(&a).solve(b) {
            IntegerSolution::Solution(x) => {
                prop_assert_eq!(a.mul_vec(&big_to_i64(&x)), Some(b.to_vec()));
            }
            IntegerSolution::NoSolution(cert) => {
                prop_assert!(cert.check(&a, b), "certificate must check");
                prop_assert!(brute.is_none(), "brute force found {:?}", brute);
            }
        }
    }

    #[test]
    fn key_ignores_row_scaling_permutation_and_added_combinations(
        a in small_matrix(4, 5, 4),
        scales in prop::collection::vec(prop_oneof![-3i64..=-1, 1i64..=3], 4),
        mix in prop::collection::vec(-2i64..=2, 4),
        seed in any::<u64>(),
    ) {
        let key = RowSpaceKey::of(&a);
        let rows = a.to_rows();
        let scaled: Vec<Vec<i64>> = rows
            .iter()
            .zip(&scales)
            .map(|(r, s)| r.iter().map(|v| v * s).collect())
            .collect();
        prop_assert_eq!(&RowSpaceKey::of(&matrix(&scaled)), &key);
        let mut permuted = rows.clone();
        permuted.rotate_left((seed as usize) % rows.len());
        permuted.reverse();
        prop_assert_eq!(&RowSpaceKey::of(&matrix(&permuted)), &key);
        let combination: Vec<i64> = (0..a.cols())
            .map(|j| rows.iter().zip(&mix).map(|(r, c)| r[j] * c).sum())
            .collect();
        let mut with_sum = rows.clone();
        with_sum.push(combination.clone());
        prop_assert_eq!(&RowSpaceKey::of(&matrix(&with_sum)), &key);
        let target = (seed as usize) % rows.len();
        let mut added = rows.clone();
        added[target] = (0..a.cols())
            .map(|j| {
                let others: i64 = (0..rows.len())
                    .filter(|&i| i != target)
                    .map(|i| rows[i][j] * mix[i])
                    .sum();
                rows[target][j] * scales[target] + others
            })
            .collect();
        prop_assert_eq!(&RowSpaceKey::of(&matrix(&added)), &key);
    }

    #[test]
    fn keys_are_equal_exactly_when_row_spaces_are((a, b) in matrix_pair(3, 4, 2)) {
        // Oracle: equal row spaces iff rank A = rank B = rank [A; B] (common practice).
        let mut stacked = a.to_rows();
        stacked.extend(b.to_rows());
        let r = rank(&matrix(&stacked));
        let same_space = rank(&a) == r && rank(&b) == r;
        prop_assert_eq!(RowSpaceKey::of(&a) == RowSpaceKey::of(&b), same_space);
        let text_equal = RowSpaceKey::of(&a).canonical_text() == RowSpaceKey::of(&b).canonical_text();
        prop_assert_eq!(text_equal, same_space);
    }
}

#[test]
fn two_x_plus_four_y_equals_three_has_no_integer_solution() {
    // 2x + 4y = 3: y = 1/2 gives y^T A = (1, 2) integral and y^T b = 3/2 (by hand).
    let a = matrix(&[vec![2, 4]]);
    let IntegerSolution::NoSolution(cert) = HermiteForm::new(&a).solve(&[3]) else {
        panic!("2x + 4y = 3 has no integer solution");
    };
    assert!(cert.check(&a, &[3]));
    assert_eq!(cert.y, vec![BigRational::new(1.into(), 2.into())]);
}

#[test]
fn incidence_matrix_kernel_is_the_cycle_lattice() {
    // Node-arc incidence matrix of a directed graph on 4 nodes with arcs 0->1, 1->2, 2->0,
    // 2->3, 3->0: connected, so rank 3 and a kernel of dimension 5 - 3 = 2 spanned by cycles
    // (standard graph theory: the cycle space has dimension arcs - nodes + components).
    let a = matrix(&[
        vec![1, 0, -1, 0, -1],
        vec![-1, 1, 0, 0, 0],
        vec![0, -1, 1, 1, 0],
        vec![0, 0, 0, -1, 1],
    ]);
    let basis = reduced_kernel_basis(&a).unwrap();
    assert_kernel_z_basis(&a, &basis);
    // Totally unimodular: a reduced basis of the cycle lattice has entries in {-1, 0, 1}.
    assert!(basis.iter().flatten().all(|v| v.abs() <= 1), "{basis:?}");
}

#[test]
fn kernel_entries_past_i64_are_an_overflow_error() {
    // x1 M + x2 = 0, x2 M + x3 = 0 forces x = t (1, -M, M^2) (by hand); M^2 = 2^64 > i64::MAX.
    let big = 1i64 << 32;
    let a = matrix(&[vec![big, 1, 0], vec![0, big, 1]]);
    assert!(matches!(reduced_kernel_basis(&a), Err(Error::Overflow(_))));
    let hf = HermiteForm::new(&a);
    let expected = [BigInt::one(), -BigInt::from(big), BigInt::from(big) * big];
    let k = &hf.kernel_basis()[0];
    assert!(k[..] == expected[..] || k.iter().zip(&expected).all(|(x, e)| *x == -e));
}

#[test]
fn reduction_keeps_a_forty_dimensional_kernel_small() {
    // A deterministic dense 20 x 60 matrix with entries in [-5, 5] (a fixed linear congruential
    // sequence): the reduced kernel basis must be valid and have small entries, while the
    // transform stays exact.
    let mut state = 0x2545_f491_4f6c_dd1du64;
    let rows: Vec<Vec<i64>> = (0..20)
        .map(|_| {
            (0..60)
                .map(|_| {
                    state = state
                        .wrapping_mul(6_364_136_223_846_793_005)
                        .wrapping_add(1);
                    ((state >> 33) % 11) as i64 - 5
                })
                .collect()
        })
        .collect();
    let a = matrix(&rows);
    let basis = reduced_kernel_basis(&a).unwrap();
    assert_eq!(basis.len(), 60 - rank(&a));
    for v in &basis {
        assert_eq!(a.mul_vec(v), Some(vec![0; 20]));
    }
    let largest = basis.iter().flatten().map(|v| v.abs()).max().unwrap();
    assert!(largest <= 64, "largest reduced entry {largest}");
    let b: Vec<i64> = a.mul_vec(&[1; 60]).unwrap();
    let IntegerSolution::Solution(x) = HermiteForm::new(&a).solve(&b) else {
        panic!("A x = A 1 is solvable");
    };
    assert_eq!(a.mul_vec(&big_to_i64(&x)), Some(b));
}
