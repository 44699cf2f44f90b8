//! Running the `kernstep` binary from the integration tests: paths of the bundled examples,
//! the command with a private cache directory, exit-code checks that print both streams, and
//! the answers of scenario days in `batch`'s words; `convex` evaluates a model file's convex
//! objective independently.
#![allow(dead_code)] // each test binary uses its own part of this shared module

pub mod convex;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Output, Stdio};

use serde_json::Value;

/// `examples/` of this repository.
pub fn examples() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("examples")
}

/// `examples/scenarios/` of this repository.
pub fn scenarios() -> PathBuf {
    examples().join("scenarios")
}

/// `kernstep ARGS --cache-dir CACHE`, not yet run.
pub fn command(cache: &Path, args: &[&str]) -> Command {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_kernstep"));
    cmd.args(args).arg("--cache-dir").arg(cache);
    cmd
}

/// Runs `kernstep ARGS --cache-dir CACHE` to completion.
pub fn kernstep(cache: &Path, args: &[&str]) -> Output {
    command(cache, args).output().expect("the binary runs")
}

/// Starts `count` copies of `kernstep ARGS --cache-dir CACHE` at once and waits for them all.
pub fn run_concurrently(cache: &Path, args: &[&str], count: usize) -> Vec<Output> {
    let children: Vec<Child> = (0..count)
        .map(|_| command(cache, args).stdout(Stdio::piped()).spawn().unwrap())
        .collect();
    children
        .into_iter()
        .map(|c| c.wait_with_output().unwrap())
        .collect()
}

/// Process output as text.
pub fn text(bytes: &[u8]) -> String {
    String::from_utf8_lossy(bytes).into_owned()
}

/// Runs and requires exit code `code`; returns stdout and stderr.
pub fn expect_both(cache: &Path, args: &[&str], code: i32) -> (String, String) {
    let out = kernstep(cache, args);
    let (stdout, stderr) = (text(&out.stdout), text(&out.stderr));
    assert_eq!(
        out.status.code(),
        Some(code),
        "{args:?}\nstdout: {stdout}\nstderr: {stderr}"
    );
    (stdout, stderr)
}

/// Runs and requires exit code `code`; returns stdout.
pub fn expect(cache: &Path, args: &[&str], code: i32) -> String {
    expect_both(cache, args, code).0
}

/// A `--json` document; for `build --json` (`kernstep.build/1`) its rows, the `models` list.
pub fn json_rows(stdout: &str) -> Value {
    let doc: Value = serde_json::from_str(stdout).expect("JSON output");
    match doc["schema"].as_str() {
        Some("kernstep.build/1") => doc["models"].clone(),
        _ => doc,
    }
}

/// An integer the JSON contract writes as a decimal string (`None` for `null`).
pub fn int(value: &Value) -> Option<i128> {
    value.as_str().map(|s| s.parse().expect("a decimal string"))
}

/// [`int`] for a value that fits `i64` (a plan value, a step length).
pub fn int64(value: &Value) -> Option<i64> {
    value
        .as_str()
        .map(|s| s.parse().expect("a decimal string in i64"))
}

/// A list of decimal strings (a plan `x`) as integers (`None` for `null`).
pub fn ints(value: &Value) -> Option<Vec<i64>> {
    value.as_array().map(|a| {
        a.iter()
            .map(|v| int64(v).expect("a decimal string"))
            .collect()
    })
}

/// Writes the `p x q` transportation model (supplies, then demands; invented zero plan).
pub fn transport_model(dir: &Path, p: usize, q: usize) -> PathBuf {
    let rows = kernstep::IntMatrix::transportation(p, q).to_rows();
    let doc = serde_json::json!({
        "matrix": rows,
        "rhs": vec![0; p + q],
        "lower": vec![0; p * q],
    });
    let path = dir.join(format!("transport_{p}x{q}.json"));
    std::fs::write(&path, doc.to_string()).unwrap();
    path
}

/// A day's answer as `batch` writes it: the status word, the objective of an answered day, the
/// augmenting steps (none without an integer solution) and the nonzero plan values of an
/// answered day by name.
pub type DayAnswer = (String, Option<i128>, Option<u64>, BTreeMap<String, i64>);

/// `batch SCENARIO DAYS --build EXTRA` (exit 0 or 1): every day's answer, by day name.
pub fn batch_answers(
    cache: &Path,
    scenario: &Path,
    days: &Path,
    extra: &[&str],
) -> BTreeMap<String, DayAnswer> {
    let (s, d) = (scenario.to_str().unwrap(), days.to_str().unwrap());
    let mut args = vec!["batch", s, d, "--build"];
    args.extend_from_slice(extra);
    let out = kernstep(cache, &args);
    assert!(
        matches!(out.status.code(), Some(0 | 1)),
        "{args:?}: {}",
        text(&out.stderr)
    );
    text(&out.stdout)
        .lines()
        .map(|line| {
            let r: Value = serde_json::from_str(line).expect("a JSON line");
            let plan = r["plan"].as_object().map_or_else(BTreeMap::new, |m| {
                m.iter()
                    .map(|(k, v)| (k.clone(), int64(v).unwrap()))
                    .collect()
            });
            let answer = (
                r["status"].as_str().unwrap().to_string(),
                int(&r["objective"]),
                r["steps"].as_u64(),
                plan,
            );
            (r["day"].as_str().unwrap().to_string(), answer)
        })
        .collect()
}

/// The answer of a `solve --json` (`status`) or `trace --json` (`outcome`) document, in the
/// words `batch` uses for the same outcome.
pub fn document_answer(doc: &Value) -> DayAnswer {
    let outcome = if doc["status"].is_null() {
        &doc["outcome"]
    } else {
        &doc["status"]
    };
    let word = match outcome["tag"].as_str().unwrap() {
        "optimal" => "optimal",
        "optimal_for_moves_up_to" => "optimal_within_norm",
        "no_integer_solution"
        | "empty_range"
        | "no_lattice_point_in_box"
        | "infeasible_cut"
        | "infeasible_unproven" => "infeasible",
        "unbounded" => "unbounded",
        "step_limit" => "step_limit",
        "cancelled" => "interrupted",
        other => panic!("unknown status tag {other:?}"),
    };
    let steps = match &doc["steps"] {
        _ if doc["x"].is_null() => None,
        Value::Array(steps) => Some(steps.len() as u64),
        counts => Some(counts["feasibility"].as_u64().unwrap() + counts["cost"].as_u64().unwrap()),
    };
    if !word.starts_with("optimal") {
        return (word.to_string(), None, steps, BTreeMap::new());
    }
    let objective = doc["objective"].as_str().unwrap().parse().unwrap();
    let names = doc["variables"].as_array().unwrap();
    let x = ints(&doc["x"]).unwrap();
    let plan = names
        .iter()
        .zip(x)
        .map(|(n, v)| (n.as_str().unwrap().to_string(), v))
        .filter(|(_, v)| *v != 0)
        .collect();
    (word.to_string(), Some(objective), steps, plan)
}

/// The tick labels of a step plot (`trace --svg`, `demo`), one list per axis in drawing
/// order: for each panel, its value axis (right-aligned labels) and then its step axis. A
/// panel starts at its rotated axis title; the picture's title and the `step` axis title are
/// not ticks.
pub fn plot_tick_labels(svg: &str) -> Vec<Vec<String>> {
    let tree = roxmltree::Document::parse(svg).expect("the plot is XML");
    let mut axes: Vec<Vec<String>> = Vec::new();
    for node in tree.descendants().filter(|n| n.tag_name().name() == "text") {
        let label = node.text().unwrap_or("").trim().to_owned();
        if node.attribute("transform").is_some() {
            axes.push(Vec::new());
            axes.push(Vec::new());
            continue;
        }
        let Some(panel) = axes.len().checked_sub(2) else {
            continue;
        };
        match node.attribute("text-anchor") {
            Some("end") => axes[panel].push(label),
            Some("middle") if label != "step" => axes[panel + 1].push(label),
            _ => {}
        }
    }
    axes
}

/// Requires every axis of a step plot to carry at least one tick label, all of them distinct
/// integers written without a fraction or a "-0"; returns how many axes there are.
pub fn check_integer_ticks(svg: &str) -> usize {
    let axes = plot_tick_labels(svg);
    for labels in &axes {
        assert!(!labels.is_empty(), "an axis without ticks: {axes:?}");
        for label in labels {
            assert!(label.parse::<i128>().is_ok(), "tick {label:?}: {axes:?}");
            assert!(!label.starts_with("-0"), "tick {label:?}: {axes:?}");
        }
        let mut distinct = labels.clone();
        distinct.sort();
        distinct.dedup();
        assert_eq!(distinct.len(), labels.len(), "duplicate ticks: {axes:?}");
    }
    axes.len()
}

/// What a `solve --json` document answers: status, objective and plan (the file names and
/// times aside).
pub fn solve_answer(doc: &str) -> (Value, Value, Value) {
    let doc: Value = serde_json::from_str(doc).unwrap();
    (
        doc["status"].clone(),
        doc["objective"].clone(),
        doc["x"].clone(),
    )
}
