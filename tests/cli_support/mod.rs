//! Running the `kernstep` binary from the integration tests: paths of the bundled examples,
//! the command with a private cache directory, and exit-code checks that print both streams.
#![allow(dead_code)] // each test binary uses its own part of this shared module

use std::path::{Path, PathBuf};
use std::process::{Child, Command, Output, Stdio};

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

/// Writes the `p x q` transportation model (supplies, then demands; invented zero plan).
pub fn transport_model(dir: &Path, p: usize, q: usize) -> PathBuf {
    let mut rows = Vec::new();
    for i in 0..p {
        rows.push(
            (0..p * q)
                .map(|j| i64::from(j / q == i))
                .collect::<Vec<_>>(),
        );
    }
    for k in 0..q {
        rows.push(
            (0..p * q)
                .map(|j| i64::from(j % q == k))
                .collect::<Vec<_>>(),
        );
    }
    let doc = serde_json::json!({
        "matrix": rows,
        "rhs": vec![0; p + q],
        "lower": vec![0; p * q],
    });
    let path = dir.join(format!("transport_{p}x{q}.json"));
    std::fs::write(&path, doc.to_string()).unwrap();
    path
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
