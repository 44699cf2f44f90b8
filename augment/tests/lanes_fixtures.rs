//! The lanes fixtures (HiGHS 1.16 optima, `tests/fixtures/solve/lanes_*.json`) solved with the
//! cycles of the complete bipartite graph, which form the Graver basis of a transport matrix
//! (Sturmfels, "Gröbner Bases and Convex Polytopes", 1996, ch. 14), from a north-west-corner
//! start that ignores the bounds (phase I repairs it).

use std::collections::BTreeSet;
use std::path::Path;

use augment::{
    solve, Coverage, InfeasibleReason, MoveSet, Objective, Options, Problem, Rule, Solution, Status,
};
use serde_json::Value;

/// One vector per `±` pair for every cycle of K_{p,q}, as `+1` on lane `(r_t, c_t)` and `-1`
/// on lane `(r_t, c_{t+1})`.
fn cycles(p: usize, q: usize) -> Vec<Vec<i64>> {
    fn tuples(n: usize, k: usize) -> Vec<Vec<usize>> {
        let mut out = vec![Vec::new()];
        for _ in 0..k {
            let mut longer = Vec::new();
            for t in &out {
                for v in (0..n).filter(|v| !t.contains(v)) {
                    let mut next = t.clone();
                    next.push(v);
                    longer.push(next);
                }
            }
            out = longer;
        }
        out
    }
    let mut set = BTreeSet::new();
    for k in 2..=p.min(q) {
        for rows in tuples(p, k) {
            for cols in tuples(q, k) {
                let mut g = vec![0i64; p * q];
                for t in 0..k {
                    g[rows[t] * q + cols[t]] += 1;
                    g[rows[t] * q + cols[(t + 1) % k]] -= 1;
                }
                if g.iter().find(|&&e| e != 0).is_some_and(|&e| e < 0) {
                    g.iter_mut().for_each(|e| *e = -*e);
                }
                set.insert(g);
            }
        }
    }
    set.into_iter().collect()
}

/// A plan meeting supplies and demands (north-west corner rule), `None` when they differ in
/// total, so that no rational plan exists.
fn north_west(supply: &[i64], demand: &[i64]) -> Option<Vec<i64>> {
    if supply.iter().sum::<i64>() != demand.iter().sum::<i64>() {
        return None;
    }
    let (mut s, mut d) = (supply.to_vec(), demand.to_vec());
    let mut x = vec![0; s.len() * d.len()];
    let (mut i, mut j) = (0, 0);
    while i < s.len() && j < d.len() {
        let amount = s[i].min(d[j]);
        x[i * d.len() + j] = amount;
        s[i] -= amount;
        d[j] -= amount;
        if s[i] == 0 {
            i += 1
        } else {
            j += 1
        }
    }
    Some(x)
}

fn ints(v: &Value) -> Vec<i64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|e| e.as_i64().unwrap())
        .collect()
}

fn bounds(v: &Value) -> Vec<Option<i64>> {
    v.as_array().unwrap().iter().map(Value::as_i64).collect()
}

fn check_file(name: &str, p: usize, q: usize) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../tests/fixtures/solve")
        .join(name);
    let doc: Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let moves = MoveSet::from_rows(p * q, &cycles(p, q), Coverage::Complete).unwrap();
    for variant in doc["variants"].as_array().unwrap() {
        let rhs = ints(&variant["rhs"]);
        let problem = Problem::new(
            Objective::linear(ints(&variant["cost"])),
            bounds(&variant["lower"]),
            bounds(&variant["upper"]),
        )
        .unwrap();
        let expect = &variant["expect"];
        let Some(start) = north_west(&rhs[..p], &rhs[p..]) else {
            assert_eq!(expect["status"], "infeasible", "{}", variant["id"]);
            continue;
        };
        let solution = solve(&problem, &moves, &start, &Options::default()).unwrap();
        let id = &variant["id"];
        every_path_agrees(&problem, &moves, &start, &solution);
        match expect["status"].as_str().unwrap() {
            "optimal" => {
                assert_eq!(solution.status, Status::Optimal, "{id}");
                assert_eq!(
                    solution.objective,
                    expect["objective"].as_i64().map(i128::from),
                    "{id}"
                );
            }
            "infeasible" => assert!(
                matches!(
                    solution.status,
                    Status::Infeasible(InfeasibleReason::NoLatticePointInBox { .. })
                ),
                "{id}: {:?}",
                solution.status
            ),
            "unbounded" => assert!(matches!(solution.status, Status::Unbounded(_)), "{id}"),
            other => panic!("{id}: unknown status {other}"),
        }
    }
}

/// Sequential and parallel scans give the same solution (time aside) for every rule and step
/// restriction, and every rule reaches the default rule's status and objective.
fn every_path_agrees(problem: &Problem, moves: &MoveSet, start: &[i64], reference: &Solution) {
    let timeless = |s: Solution| Solution {
        elapsed: Default::default(),
        ..s
    };
    for rule in [Rule::GraverBest, Rule::FirstImproving, Rule::Steepest] {
        for powers in [false, true] {
            let options = Options::default()
                .rule(rule)
                .powers_of_two(powers)
                .trace(true);
            let sequential = solve(problem, moves, start, &options).unwrap();
            let parallel = solve(problem, moves, start, &options.parallel(true)).unwrap();
            assert_eq!(
                std::mem::discriminant(&sequential.status),
                std::mem::discriminant(&reference.status)
            );
            if reference.status == Status::Optimal {
                assert_eq!(sequential.objective, reference.objective);
            }
            assert_eq!(timeless(sequential), timeless(parallel));
        }
    }
}

#[test]
fn k33_has_fifteen_cycles() {
    // 9 four-cycles (3 choose 2, squared) and 6 six-cycles (3! * 3! orderings / 3 rotations
    // / 2 directions); a standard count.
    assert_eq!(cycles(3, 3).len(), 15);
}

#[test]
fn lanes_3x3_match_highs() {
    check_file("lanes_3x3.json", 3, 3);
}

#[test]
fn lanes_3x4_match_highs() {
    check_file("lanes_3x4.json", 3, 4);
}
