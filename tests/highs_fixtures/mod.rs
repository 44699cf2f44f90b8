//! The HiGHS reference fixtures of `tests/fixtures/solve/` (written by
//! `scripts/solve_fixtures.py`; every file names HiGHS 1.16.0 through highspy as its source),
//! read into Rust data for the solver tests.
#![allow(dead_code)] // each test binary uses its own part of this shared module

use std::path::{Path, PathBuf};

use serde::Deserialize;

/// One family of variants over one matrix.
#[derive(Deserialize)]
pub struct Fixture {
    /// The family's name.
    pub name: String,
    /// The solver that recorded the expectations.
    pub reference: Reference,
    /// One name per column.
    pub variables: Vec<String>,
    /// The constraint matrix.
    pub matrix: Vec<Vec<i64>>,
    /// The instances.
    pub variants: Vec<Case>,
}

/// Solver and version named in a fixture.
#[derive(Deserialize)]
pub struct Reference {
    /// The solver.
    pub solver: String,
    /// Its version.
    pub version: String,
}

/// One instance and what HiGHS found for it.
#[derive(Deserialize)]
pub struct Case {
    /// The instance's name.
    pub id: String,
    /// What the generator meant it to exercise (feasible, parity, box, unbounded, ...).
    pub kind: String,
    /// Right-hand side.
    pub rhs: Vec<i64>,
    /// Linear cost.
    pub cost: Vec<i64>,
    /// Lower bounds (`None`: unbounded).
    pub lower: Vec<Option<i64>>,
    /// Upper bounds (`None`: unbounded).
    pub upper: Vec<Option<i64>>,
    /// HiGHS's answer.
    pub expect: Expect,
}

/// HiGHS's status and optimum for one instance.
#[derive(Deserialize)]
pub struct Expect {
    /// `optimal`, `infeasible` or `unbounded`.
    pub status: String,
    /// The optimum when optimal.
    pub objective: Option<i128>,
}

fn dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/solve")
}

/// Reads `tests/fixtures/solve/NAME` and checks that it names HiGHS 1.16.0 as its source.
pub fn fixture(name: &str) -> Fixture {
    let fixture: Fixture =
        serde_json::from_str(&std::fs::read_to_string(dir().join(name)).unwrap()).unwrap();
    assert_eq!(
        (
            fixture.reference.solver.as_str(),
            fixture.reference.version.as_str()
        ),
        ("HiGHS", "1.16.0"),
        "{name}"
    );
    fixture
}

/// Every fixture, in file-name order.
pub fn fixtures() -> Vec<Fixture> {
    let mut names: Vec<String> = std::fs::read_dir(dir())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".json"))
        .collect();
    names.sort();
    names.iter().map(|n| fixture(n)).collect()
}
