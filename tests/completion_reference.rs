//! Completion against published test sets and standard counts.

mod completion_support;

use std::collections::BTreeSet;

use completion_support::*;
use kernstep::completion::{Method, Request};

/// Number of cycles of `K_{r,s}`: `Σ_{k>=2} C(r,k) C(s,k) k! (k-1)! / 2` (standard count; for
/// `r = s` OEIS A070968). For the transportation matrix these cycles are the Graver basis
/// (totally unimodular matrix: circuits = Graver basis).
fn bipartite_cycles(r: u64, s: u64) -> u64 {
    let binom = |n: u64, k: u64| (0..k).fold(1u64, |acc, i| acc * (n - i) / (i + 1));
    let fact = |k: u64| (1..=k).product::<u64>();
    (2..=r.min(s))
        .map(|k| binom(r, k) * binom(s, k) * fact(k) * fact(k - 1) / 2)
        .sum()
}

#[test]
fn cycle_count_formula_matches_its_quoted_values() {
    // Values quoted with the formula: 2x3 -> 3, 3x3 -> 15, 3x4 -> 42, 4x4 -> 204, 4x5 -> 660,
    // 5x5 -> 3940, 6x6 -> 113865.
    let quoted = [
        (2, 3, 3),
        (3, 3, 15),
        (3, 4, 42),
        (4, 4, 204),
        (4, 5, 660),
        (5, 5, 3940),
    ];
    for (r, s, count) in quoted {
        assert_eq!(bipartite_cycles(r, s), count);
    }
    assert_eq!(bipartite_cycles(6, 6), 113_865);
}

#[test]
fn transport_graver_bases_are_the_cycles() {
    for (r, s) in [(2, 3), (3, 3), (3, 4), (4, 4), (4, 5)] {
        let a = transport(r, s);
        let set = graver(&a, Method::ProjectAndLift);
        assert_eq!(
            set.len() as u64,
            bipartite_cycles(r as u64, s as u64),
            "K_{{{r},{s}}}"
        );
        assert_valid(&a, &Request::graver(a.cols()).signs, &set);
    }
}

#[test]
fn entries_beyond_a_byte_take_wider_stores() {
    // The Graver basis of (1, 1, -N) is (1, -1, 0) and (i, N - i, 1) for 0 <= i <= N, N + 2
    // elements up to sign (derived by hand: with x3 = 0 only (1, -1, 0) is primitive, x3 = 1
    // needs x1 + x2 = N with both signs nonnegative, and x3 >= 2 splits conformally). With
    // N = 200 the entries outgrow one byte, so the lifting's stores widen on the way.
    for n in [100, 200, 1000] {
        let a = matrix(&[&[-n, 1, 1]]);
        let mut expected: Vec<Vec<i64>> = (0..=n).map(|i| canonical_sign(&[1, i, n - i])).collect();
        expected.push(canonical_sign(&[0, 1, -1]));
        expected.sort();
        for method in [Method::ProjectAndLift, Method::Pottier] {
            assert_eq!(sorted(&graver(&a, method)), expected, "N = {n}, {method:?}");
        }
    }
}

#[test]
fn twisted_cubic() {
    // Sturmfels, Gröbner Bases and Convex Polytopes (1996): the Graver basis of
    // [[1,1,1,1],[0,1,2,3]] has these 5 elements.
    let a = matrix(&[&[1, 1, 1, 1], &[0, 1, 2, 3]]);
    let mut expected = vec![
        vec![1, -2, 1, 0],
        vec![0, 1, -2, 1],
        vec![1, -1, -1, 1],
        vec![2, -3, 0, 1],
        vec![1, 0, -3, 2],
    ];
    expected.sort();
    for method in [Method::ProjectAndLift, Method::Pottier] {
        assert_eq!(sorted(&graver(&a, method)), expected, "{method:?}");
    }
}

#[test]
fn graver_complexity_of_the_twisted_cubic_is_six() {
    // Hemmecke and Nairn, "On the Gröbner complexity of matrices" (2009): the largest l1 norm
    // in the Graver basis of the matrix whose columns are the twisted cubic's Graver basis is 6.
    let g = matrix(&[
        &[1, 0, 1, 2, 1],
        &[-2, 1, -1, -3, 0],
        &[1, -2, -1, 0, -3],
        &[0, 1, 1, 1, 2],
    ]);
    let set = graver(&g, Method::ProjectAndLift);
    let largest = set
        .rows()
        .map(|e| e.iter().map(|x| x.abs()).sum::<i64>())
        .max();
    assert_eq!(largest, Some(6));
    assert_eq!(sorted(&set), sorted(&graver(&g, Method::Pottier)));
}

#[test]
fn primitive_partition_identities() {
    // Diaconis, Graham and Sturmfels, "Primitive partition identities" (1996): the Graver basis
    // of (1 2 ... n) has 5, 15, 47, 102 elements for n = 3..6, largest l1 norm 2n - 1.
    for (n, count) in [(3, 5), (4, 15), (5, 47), (6, 102)] {
        let set = graver(&primitive_partition(n), Method::ProjectAndLift);
        assert_eq!(set.len(), count, "n = {n}");
        let largest = set.rows().map(|e| e.iter().map(|x| x.abs()).sum::<i64>());
        assert_eq!(largest.max(), Some(2 * n as i64 - 1));
    }
}

#[test]
fn three_way_tables_with_all_two_margins() {
    // 3x3x3 tables with fixed 2-margins: 795 Graver elements (widely quoted; from memory),
    // and the independent baseline (Pottier's completion) finds the same set.
    let a = three_way_margins(3, 3, 3);
    let set = graver(&a, Method::ProjectAndLift);
    assert_eq!(set.len(), 795);
    assert_valid(&a, &Request::graver(27).signs, &set);
    assert_eq!(sorted(&graver(&a, Method::Pottier)), sorted(&set));
}

#[test]
fn wide_block_diagonal_matrices_take_wider_sign_masks() {
    // The Graver basis of a block-diagonal matrix is the union of its blocks' Graver bases,
    // each element padded with zeros: a conformal decomposition splits by block (from
    // memory). Blocks of the twisted cubic (5 elements each, Sturmfels 1996) on 68 and 132
    // columns exercise the two- and four-word sign masks of the completion.
    let block: [&[i64]; 2] = [&[1, 1, 1, 1], &[0, 1, 2, 3]];
    let cubic = graver(&matrix(&block), Method::ProjectAndLift);
    for blocks in [17, 33] {
        let cols = 4 * blocks;
        let rows: Vec<Vec<i64>> = (0..blocks)
            .flat_map(|b| {
                block.iter().map(move |row| {
                    let mut line = vec![0; cols];
                    line[4 * b..4 * b + 4].copy_from_slice(row);
                    line
                })
            })
            .collect();
        let refs: Vec<&[i64]> = rows.iter().map(Vec::as_slice).collect();
        let a = matrix(&refs);
        let want: BTreeSet<Vec<i64>> = (0..blocks)
            .flat_map(|b| {
                cubic.rows().map(move |g| {
                    let mut e = vec![0; cols];
                    e[4 * b..4 * b + 4].copy_from_slice(&g);
                    canonical_sign(&e)
                })
            })
            .collect();
        let set = graver(&a, Method::ProjectAndLift);
        assert_eq!(set.len(), 5 * blocks, "{cols} columns");
        let got: BTreeSet<Vec<i64>> = set.rows().map(|e| canonical_sign(&e)).collect();
        assert_eq!(got, want, "{cols} columns");
    }
}

/// `e` or `-e`, whichever has its first nonzero entry positive.
fn canonical_sign(e: &[i64]) -> Vec<i64> {
    match e.iter().find(|&&x| x != 0) {
        Some(&x) if x < 0 => e.iter().map(|v| -v).collect(),
        _ => e.to_vec(),
    }
}
