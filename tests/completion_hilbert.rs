//! Hilbert bases of sign-restricted kernels against published values.

mod completion_support;

use completion_support::*;
use kernstep::completion::{Method, Request};

#[test]
fn semi_magic_squares_are_generated_by_permutation_matrices() {
    // Birkhoff-von Neumann: the Hilbert basis of 3x3 nonnegative integer squares with equal
    // row and column sums consists of the 6 permutation matrices.
    let a = equal_line_sums(3, false);
    for method in [Method::ProjectAndLift, Method::Pottier] {
        let mut request = Request::hilbert(9);
        request.method = method;
        let set = run(&a, &request);
        assert_eq!(set.len(), 6, "{method:?}");
        for e in set.rows() {
            assert_eq!(e.iter().filter(|&&x| x == 1).count(), 3);
            assert_eq!(e.iter().sum::<i64>(), 3);
        }
        assert_valid(&a, &request.signs, &set);
    }
}

#[test]
fn magic_squares_of_order_three() {
    // Ahmed, De Loera and Hemmecke (2003), from memory: the Hilbert basis of 3x3 magic squares
    // (rows, columns and both diagonals with equal sums, entries >= 0) has 5 elements: the
    // all-ones square and four squares with entries 0, 1, 2, all of magic sum 3.
    let a = equal_line_sums(3, true);
    let set = run(&a, &Request::hilbert(9));
    assert_eq!(set.len(), 5);
    assert!(set.rows().any(|e| e == [1; 9]));
    for e in set.rows() {
        assert_eq!(e[0] + e[1] + e[2], 3);
    }
    assert_valid(&a, &Request::hilbert(9).signs, &set);
    let pottier = Request {
        method: Method::Pottier,
        ..Request::hilbert(9)
    };
    assert_eq!(sorted(&set), sorted(&run(&a, &pottier)));
}
