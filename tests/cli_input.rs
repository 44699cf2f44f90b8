//! Input the way shells and archives hand it over: a model or days file compressed with gzip
//! (`.gz`, read through `flate2`) and `-` for standard input give the answers of the plain
//! files; a model on standard input is recognised by its text.

use std::io::Write;
use std::path::Path;
use std::process::Stdio;

use serde_json::Value;

mod cli_support;
use cli_support::{command, examples, expect, scenarios, solve_answer};

/// `path` compressed into `dir` under its own name plus `.gz`.
fn gzipped(path: &Path, dir: &Path) -> String {
    let name = format!("{}.gz", path.file_name().unwrap().to_str().unwrap());
    let target = dir.join(name);
    let mut encoder = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::default());
    encoder.write_all(&std::fs::read(path).unwrap()).unwrap();
    std::fs::write(&target, encoder.finish().unwrap()).unwrap();
    target.display().to_string()
}

/// Runs `kernstep ARGS` with `input` on standard input; returns the exit code and stdout.
fn piped(cache: &Path, args: &[&str], input: &[u8]) -> (Option<i32>, String) {
    let mut child = command(cache, args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .unwrap();
    child.stdin.take().unwrap().write_all(input).unwrap();
    let out = child.wait_with_output().unwrap();
    (out.status.code(), String::from_utf8(out.stdout).unwrap())
}

#[test]
fn compressed_and_piped_models_solve_as_the_plain_file() {
    let cache = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let cache_dir = cache.path();
    for name in ["lane_plan.toml", "transport_3x3.json"] {
        let plain = examples().join(name);
        let want = solve_answer(&expect(
            cache_dir,
            &["solve", plain.to_str().unwrap(), "--build", "--json"],
            0,
        ));
        let zipped = gzipped(&plain, dir.path());
        let got = solve_answer(&expect(cache_dir, &["solve", &zipped, "--json"], 0));
        assert_eq!(got, want, "{name}.gz");
        let text = std::fs::read(&plain).unwrap();
        let (code, out) = piped(cache_dir, &["solve", "-", "--json"], &text);
        assert_eq!(code, Some(0), "{name} on stdin");
        assert_eq!(solve_answer(&out), want, "{name} on stdin");
    }
    let mps = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/mps/orchard_crates.mps");
    let want = solve_answer(&expect(
        cache_dir,
        &["solve", mps.to_str().unwrap(), "--build", "--json"],
        0,
    ));
    let zipped = gzipped(&mps, dir.path());
    assert_eq!(
        solve_answer(&expect(cache_dir, &["solve", &zipped, "--json"], 0)),
        want
    );
    let (_, out) = piped(
        cache_dir,
        &["solve", "-", "--json"],
        &std::fs::read(&mps).unwrap(),
    );
    assert_eq!(solve_answer(&out), want, "MPS on stdin");
}

#[test]
fn compressed_and_piped_days_give_the_plain_results() {
    let cache = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("brackle_lanes.toml");
    let scenario = scenario.to_str().unwrap();
    for days in ["brackle_lanes_days.jsonl", "brackle_lanes_days.csv"] {
        let plain = scenarios().join(days);
        let args = |d: &str| {
            vec!["batch", scenario, d, "--build"]
                .into_iter()
                .map(String::from)
                .collect::<Vec<_>>()
        };
        let strip = |text: &str| -> Vec<Value> {
            text.lines()
                .map(|l| {
                    let mut v: Value = serde_json::from_str(l).unwrap();
                    v["seconds"] = Value::Null;
                    v
                })
                .collect()
        };
        let run = |a: Vec<String>| {
            let a: Vec<&str> = a.iter().map(String::as_str).collect();
            // Some days of the scenario are infeasible on purpose: exit 1.
            strip(&expect(cache.path(), &a, 1))
        };
        let want = run(args(plain.to_str().unwrap()));
        assert!(!want.is_empty());
        assert_eq!(run(args(&gzipped(&plain, dir.path()))), want, "{days}.gz");
        let (code, out) = piped(
            cache.path(),
            &["batch", scenario, "-", "--build"],
            &std::fs::read(&plain).unwrap(),
        );
        assert_eq!(code, Some(1), "{days} on stdin");
        assert_eq!(strip(&out), want, "{days} on stdin");
    }
}
