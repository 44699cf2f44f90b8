//! Graver bases of node-arc incidence matrices against the signed cycles of the graph.
//!
//! The incidence matrix of a directed graph is totally unimodular, so its Graver basis is the
//! set of its circuits (Sturmfels 1996, Gröbner Bases and Convex Polytopes, Prop. 8.11): one
//! vector per simple cycle of the underlying undirected graph, `+1` on arcs traversed forward
//! and `-1` on arcs traversed backward. The cycles of seeded random digraphs (and of the
//! Petersen graph with seeded random arc directions) are enumerated by
//! networkx `simple_cycles` in `scripts/graph_cycles_reference.py`, which writes
//! `tests/fixtures/cycles/`.

mod completion_support;

use std::path::Path;

use completion_support::*;
use kernstep::completion::{ElementSet, Method};
use kernstep::IntMatrix;
use serde::Deserialize;

/// Number of fixture files the generator writes (12 random digraphs and the Petersen graph).
const FIXTURES: usize = 13;

/// Pottier's procedure runs on the fixtures with fewer cycles than this (test time).
const POTTIER_CYCLE_LIMIT: usize = 300;

#[derive(Deserialize)]
struct Fixture {
    name: String,
    generator: String,
    nodes: usize,
    arcs: Vec<(usize, usize)>,
    incidence: Vec<Vec<i64>>,
    cycles: Vec<Vec<i64>>,
}

impl Fixture {
    fn matrix(&self) -> IntMatrix {
        IntMatrix::from_rows(&self.incidence).unwrap()
    }
}

fn fixtures() -> Vec<Fixture> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/cycles");
    let mut paths: Vec<_> = std::fs::read_dir(&dir)
        .expect("fixture directory is readable")
        .map(|entry| entry.expect("directory entry").path())
        .filter(|path| path.extension().is_some_and(|e| e == "json"))
        .collect();
    paths.sort();
    assert_eq!(paths.len(), FIXTURES, "fixture files in {}", dir.display());
    paths
        .iter()
        .map(|path| {
            let text = std::fs::read_to_string(path).expect("fixture is readable");
            serde_json::from_str(&text)
                .unwrap_or_else(|e| panic!("{}: invalid fixture: {e}", path.display()))
        })
        .collect()
}

/// The incidence matrix rebuilt from the arc list: `+1` at the tail, `-1` at the head.
fn incidence_of(nodes: usize, arcs: &[(usize, usize)]) -> Vec<Vec<i64>> {
    let mut rows = vec![vec![0i64; arcs.len()]; nodes];
    for (j, &(tail, head)) in arcs.iter().enumerate() {
        rows[tail][j] = 1;
        rows[head][j] = -1;
    }
    rows
}

#[test]
fn fixtures_are_incidence_matrices_with_networkx_cycles() {
    for f in fixtures() {
        assert!(
            f.generator.starts_with("networkx ") && f.generator.ends_with(" simple_cycles"),
            "{}: generator {:?}",
            f.name,
            f.generator
        );
        assert_eq!(f.incidence, incidence_of(f.nodes, &f.arcs), "{}", f.name);
        assert!(!f.cycles.is_empty(), "{}: no cycles", f.name);
        let a = f.matrix();
        for c in &f.cycles {
            let image = a.mul_vec(c).unwrap();
            assert!(
                image.iter().all(|&v| v == 0),
                "{}: {c:?} not a cycle",
                f.name
            );
        }
        assert!(
            f.cycles.iter().all(|c| c == &orient(c)),
            "{}: orientation",
            f.name
        );
    }
}

fn assert_cycles(f: &Fixture, set: &ElementSet, method: Method) {
    assert_eq!(set.width(), f.arcs.len(), "{}: width", f.name);
    // Reference: networkx simple_cycles (scripts/graph_cycles_reference.py); Graver basis =
    // signed cycles for a digraph incidence matrix (Sturmfels 1996, Prop. 8.11).
    assert_eq!(sorted(set), f.cycles, "{}: {method:?}", f.name);
}

#[test]
fn project_and_lift_finds_the_networkx_cycles() {
    for f in fixtures() {
        let set = graver(&f.matrix(), Method::ProjectAndLift);
        assert_cycles(&f, &set, Method::ProjectAndLift);
    }
}

#[test]
fn pottier_finds_the_networkx_cycles() {
    let small: Vec<Fixture> = fixtures()
        .into_iter()
        .filter(|f| f.cycles.len() < POTTIER_CYCLE_LIMIT)
        .collect();
    assert!(!small.is_empty(), "no fixture is small enough for Pottier");
    for f in small {
        let set = graver(&f.matrix(), Method::Pottier);
        assert_cycles(&f, &set, Method::Pottier);
    }
}

fn graver_on_threads(a: &IntMatrix, threads: usize) -> ElementSet {
    rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .unwrap()
        .install(|| graver(a, Method::ProjectAndLift))
}

#[test]
fn thread_count_does_not_change_the_result() {
    for f in fixtures() {
        let a = f.matrix();
        let one = graver_on_threads(&a, 1);
        let two = graver_on_threads(&a, 2);
        assert_eq!(one, two, "{}: 1 thread vs 2 threads", f.name);
        assert_cycles(&f, &one, Method::ProjectAndLift);
    }
}
