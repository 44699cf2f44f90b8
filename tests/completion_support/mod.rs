//! Matrices and oracles shared by the completion tests.
#![allow(dead_code)] // each test binary uses its own part of this shared module

use kernstep::completion::{
    complete_kernel, Completion, Control, ElementSet, Method, Request, Sign,
};
use kernstep::IntMatrix;

/// Node-arc incidence matrix of the complete bipartite digraph `K_{r,s}` (the `r x s`
/// transportation matrix): variable `(i, k)` has `+1` in supply row `i` and `+1` in demand row
/// `r + k`.
pub fn transport(r: usize, s: usize) -> IntMatrix {
    IntMatrix::transportation(r, s)
}

/// The one-row matrix `(1 2 ... n)`.
pub fn primitive_partition(n: usize) -> IntMatrix {
    IntMatrix::from_rows(&[(1..=n as i64).collect()]).unwrap()
}

/// Builds a matrix from literal rows.
pub fn matrix(rows: &[&[i64]]) -> IntMatrix {
    IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
}

/// Runs a completion to the end and returns the set.
pub fn run(a: &IntMatrix, request: &Request) -> ElementSet {
    match complete_kernel(a, request, &Control::new(), None).unwrap() {
        Completion::Finished(set, _) => set,
        Completion::Stopped(reason) => panic!("completion stopped: {reason:?}"),
    }
}

/// The Graver basis by the given method.
pub fn graver(a: &IntMatrix, method: Method) -> ElementSet {
    let mut request = Request::graver(a.cols());
    request.method = method;
    run(a, &request)
}

/// `u ⊑ v`: same signs where `u` is nonzero and no larger in absolute value.
pub fn conformal(u: &[i64], v: &[i64]) -> bool {
    u.iter()
        .zip(v)
        .all(|(&x, &y)| x * y >= 0 && x.abs() <= y.abs())
}

/// Whether `v` respects the sign pattern.
pub fn fits_signs(v: &[i64], signs: &[Sign]) -> bool {
    v.iter().zip(signs).all(|(&x, s)| match s {
        Sign::Free => true,
        Sign::NonNegative => x >= 0,
        Sign::NonPositive => x <= 0,
    })
}

/// Orients a vector of a symmetric pair so that its first nonzero entry is positive.
pub fn orient(v: &[i64]) -> Vec<i64> {
    match v.iter().find(|&&x| x != 0) {
        Some(&x) if x < 0 => v.iter().map(|&y| -y).collect(),
        _ => v.to_vec(),
    }
}

/// Independent oracle: every nonzero `x` with `A x = 0`, `|x_i| <= bound` and the signs,
/// kept if no other such vector is ⊑ it, one per `±` pair when both signs are allowed.
/// Exact whenever `bound` is at least the largest entry of any minimal element.
pub fn brute_force_minimal(a: &IntMatrix, signs: &[Sign], bound: i64) -> Vec<Vec<i64>> {
    let n = a.cols();
    let mut kernel = Vec::new();
    let mut x = vec![-bound; n];
    loop {
        if x.iter().any(|&v| v != 0)
            && fits_signs(&x, signs)
            && a.mul_vec(&x).unwrap().iter().all(|&v| v == 0)
        {
            kernel.push(x.clone());
        }
        let Some(i) = (0..n).find(|&i| x[i] < bound) else {
            break;
        };
        x[i] += 1;
        x[..i].iter_mut().for_each(|v| *v = -bound);
    }
    let mut minimal: Vec<Vec<i64>> = kernel
        .iter()
        .filter(|v| !kernel.iter().any(|u| u != *v && conformal(u, v)))
        .map(|v| {
            let neg: Vec<i64> = v.iter().map(|&y| -y).collect();
            if fits_signs(&neg, signs) {
                orient(v)
            } else {
                v.clone()
            }
        })
        .collect();
    minimal.sort();
    minimal.dedup();
    minimal
}

/// The elements of a set, sorted, for comparison with an oracle.
pub fn sorted(set: &ElementSet) -> Vec<Vec<i64>> {
    let mut e = set.to_rows();
    e.sort();
    e
}

/// Checks the invariants every returned element must satisfy: in the kernel, within the signs,
/// primitive, and no other element ⊑ it.
pub fn assert_valid(a: &IntMatrix, signs: &[Sign], set: &ElementSet) {
    let rows = set.to_rows();
    for g in &rows {
        assert!(
            a.mul_vec(g).unwrap().iter().all(|&v| v == 0),
            "{g:?} not in kernel"
        );
        assert!(fits_signs(g, signs), "{g:?} violates the signs");
        let gcd = g.iter().fold(0i64, |acc, &x| num_integer::gcd(acc, x));
        assert_eq!(gcd, 1, "{g:?} is not primitive");
        for h in &rows {
            let neg: Vec<i64> = h.iter().map(|&x| -x).collect();
            assert!(h == g || !conformal(h, g), "{h:?} ⊑ {g:?}");
            assert!(!fits_signs(&neg, signs) || neg == *g || !conformal(&neg, g));
        }
    }
}

/// Constraints "every line sum equals the first row sum" for `k x k` squares with variables
/// `x[i][j]` at `i * k + j`; with `diagonals` the two diagonals too (magic squares).
pub fn equal_line_sums(k: usize, diagonals: bool) -> IntMatrix {
    let mut lines: Vec<Vec<usize>> = Vec::new();
    for i in 0..k {
        lines.push((0..k).map(|j| i * k + j).collect());
        lines.push((0..k).map(|j| j * k + i).collect());
    }
    if diagonals {
        lines.push((0..k).map(|i| i * k + i).collect());
        lines.push((0..k).map(|i| i * k + (k - 1 - i)).collect());
    }
    let rows: Vec<Vec<i64>> = lines[1..]
        .iter()
        .map(|line| {
            let mut row = vec![0i64; k * k];
            line.iter().for_each(|&v| row[v] += 1);
            lines[0].iter().for_each(|&v| row[v] -= 1);
            row
        })
        .collect();
    IntMatrix::from_rows(&rows).unwrap()
}

/// All 2-margins of a `p x q x s` table: every line sum `x[i][j][+]`, `x[i][+][k]`, `x[+][j][k]`
/// is a row; variable `(i, j, k)` sits at `(i * q + j) * s + k`.
pub fn three_way_margins(p: usize, q: usize, s: usize) -> IntMatrix {
    let var = |i: usize, j: usize, k: usize| (i * q + j) * s + k;
    let mut rows = Vec::new();
    let mut line = |cells: Vec<usize>| {
        let mut row = vec![0i64; p * q * s];
        cells.into_iter().for_each(|v| row[v] = 1);
        rows.push(row);
    };
    for i in 0..p {
        for j in 0..q {
            line((0..s).map(|k| var(i, j, k)).collect());
        }
    }
    for i in 0..p {
        for k in 0..s {
            line((0..q).map(|j| var(i, j, k)).collect());
        }
    }
    for j in 0..q {
        for k in 0..s {
            line((0..p).map(|i| var(i, j, k)).collect());
        }
    }
    IntMatrix::from_rows(&rows).unwrap()
}
