//! Deliberately simple oracles for tiny instances: Graver bases by kernel enumeration and
//! integer programs by enumerating the box.

#![allow(dead_code)] // each test binary uses a different subset of the helpers

use augment::Objective;

/// `A x`.
pub fn times(a: &[Vec<i64>], x: &[i64]) -> Vec<i64> {
    a.iter()
        .map(|row| row.iter().zip(x).map(|(p, q)| p * q).sum())
        .collect()
}

/// `u ⊑ v`: same signs and `|u_i| <= |v_i|` everywhere.
pub fn conformal(u: &[i64], v: &[i64]) -> bool {
    u.iter()
        .zip(v)
        .all(|(&p, &q)| p * q >= 0 && p.abs() <= q.abs())
}

/// Every integer vector of length `n` with l1 norm at most `bound`.
fn l1_ball(n: usize, bound: i64) -> Vec<Vec<i64>> {
    let mut out = vec![Vec::new()];
    for _ in 0..n {
        out = out
            .into_iter()
            .flat_map(|prefix: Vec<i64>| {
                let used: i64 = prefix.iter().map(|v| v.abs()).sum();
                let left = bound - used;
                (-left..=left).map(move |v| {
                    let mut next = prefix.clone();
                    next.push(v);
                    next
                })
            })
            .collect();
    }
    out
}

/// The Graver basis of `ker_Z(A)`, one vector per `±` pair (first nonzero entry positive),
/// assuming every element has l1 norm at most `bound`: all nonzero kernel vectors of the l1
/// ball, sorted by norm, keeping those that no smaller kept vector is conformal to.
pub fn graver(a: &[Vec<i64>], n: usize, bound: i64) -> Vec<Vec<i64>> {
    let mut kernel: Vec<Vec<i64>> = l1_ball(n, bound)
        .into_iter()
        .filter(|v| v.iter().any(|&e| e != 0) && times(a, v).iter().all(|&e| e == 0))
        .collect();
    kernel.sort_by_key(|v| v.iter().map(|e| e.abs()).sum::<i64>());
    let mut minimal: Vec<Vec<i64>> = Vec::new();
    for v in kernel {
        if !minimal.iter().any(|u| conformal(u, &v)) {
            minimal.push(v);
        }
    }
    minimal.retain(|v| v.iter().find(|&&e| e != 0).is_some_and(|&e| e > 0));
    minimal
}

/// Every integer point of the box `[lower, upper]`.
pub fn box_points(lower: &[i64], upper: &[i64]) -> Vec<Vec<i64>> {
    let mut out = vec![Vec::new()];
    for (&l, &u) in lower.iter().zip(upper) {
        out = out
            .into_iter()
            .flat_map(|prefix: Vec<i64>| {
                (l..=u).map(move |v| {
                    let mut next = prefix.clone();
                    next.push(v);
                    next
                })
            })
            .collect();
    }
    out
}

/// `min f(x)` over the integer points of the box with `A x = b`, `None` when there is none.
pub fn brute_force(
    a: &[Vec<i64>],
    b: &[i64],
    lower: &[i64],
    upper: &[i64],
    objective: &Objective,
) -> Option<i128> {
    box_points(lower, upper)
        .into_iter()
        .filter(|x| times(a, x) == b)
        .map(|x| objective.value(&x).expect("tiny values fit"))
        .min()
}
