//! `kernstep demo` through the binary: it runs end to end, its per-day objectives and total
//! equal the HiGHS 1.16 optima recorded by `scripts/demo_reference.py`
//! (`tests/fixtures/demo/vell_valley.json`), the second run loads the set from the cache, an
//! unusable cache falls back to building in memory, and the highlighted day's files exist, its
//! plot with distinct integer tick labels; the summary carries the caution.

mod cli_support;

use std::path::Path;
use std::process::{Command, Output};

use serde_json::Value;

fn demo(cache: &Path, extra: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .arg("demo")
        .arg("--cache-dir")
        .arg(cache)
        .args(extra)
        .output()
        .expect("the binary runs")
}

fn json_report(out: &Output) -> Value {
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("one JSON document")
}

fn fixture() -> Value {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/demo/vell_valley.json");
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

#[test]
fn demo_days_and_total_equal_the_highs_reference() {
    let dir = tempfile::tempdir().unwrap();
    let traces = dir.path().join("traces");
    let out = demo(
        &dir.path().join("cache"),
        &["--json", "--trace-dir", traces.to_str().unwrap()],
    );
    let report = json_report(&out);
    // Reference: HiGHS 1.16 through highspy, scripts/demo_reference.py.
    let reference = fixture();
    let want = reference["days"].as_array().unwrap();
    let got = report["days"].as_array().unwrap();
    assert_eq!(got.len(), 30);
    for (g, w) in got.iter().zip(want) {
        assert_eq!(g["day"], w["day"]);
        assert_eq!(g["status"], w["status"], "{}", w["day"]);
        // The report writes objectives as decimal strings (the JSON contract).
        let objective = cli_support::int64(&g["objective"]);
        assert_eq!(objective, w["objective"].as_i64(), "{}", w["day"]);
    }
    assert_eq!(
        cli_support::int64(&report["tally"]["total_objective"]),
        reference["total_objective"].as_i64()
    );
    assert_eq!(report["moves"], 795);
    let svg = std::fs::read_to_string(report["trace"]["svg"].as_str().unwrap()).unwrap();
    // The highlighted day repairs a violation of 1 and then lowers the cost: two panels.
    assert_eq!(cli_support::check_integer_ticks(&svg), 4, "{svg}");
    let trace: Value = serde_json::from_str(
        &std::fs::read_to_string(report["trace"]["json"].as_str().unwrap()).unwrap(),
    )
    .unwrap();
    assert!(!trace["steps"].as_array().unwrap().is_empty());
}

#[test]
fn the_second_run_loads_the_set_and_days_can_be_limited() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().join("cache");
    let traces = dir.path().join("traces");
    let args = [
        "--json",
        "--days",
        "5",
        "--trace-dir",
        traces.to_str().unwrap(),
    ];
    let first = json_report(&demo(&cache, &args));
    assert_eq!(first["set"], "built for this run");
    let second = json_report(&demo(&cache, &args));
    assert!(second["set"]
        .as_str()
        .unwrap()
        .starts_with("loaded from the cache"));
    assert_eq!(second["days"].as_array().unwrap().len(), 5);
    assert_eq!(first["days"], {
        let mut d = second["days"].clone();
        for (a, b) in d
            .as_array_mut()
            .unwrap()
            .iter_mut()
            .zip(first["days"].as_array().unwrap())
        {
            a["ms"] = b["ms"].clone();
        }
        d
    });
}

#[test]
fn an_unusable_cache_falls_back_to_building_in_memory() {
    let dir = tempfile::tempdir().unwrap();
    let not_a_dir = dir.path().join("file");
    std::fs::write(&not_a_dir, "not a cache").unwrap();
    let traces = dir.path().join("traces");
    let out = demo(
        &not_a_dir,
        &["--days", "3", "--trace-dir", traces.to_str().unwrap()],
    );
    assert_eq!(out.status.code(), Some(0));
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("warning"), "{stderr}");
    assert!(stdout.contains("day         status"), "{stdout}");
    assert!(stdout.contains("total: 3 days, 3 optimal"), "{stdout}");
}

#[test]
fn the_summary_carries_the_caution() {
    // The wording of README, Caution.
    let caution = "plans must also meet vehicle limits, working-time rules and local regulations (not checked)";
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().join("cache");
    let traces = dir.path().join("traces");
    let args = ["--days", "1", "--trace-dir", traces.to_str().unwrap()];
    let out = demo(&cache, &args);
    assert_eq!(out.status.code(), Some(0));
    let stdout = String::from_utf8_lossy(&out.stdout);
    let lines: Vec<&str> = stdout
        .lines()
        .filter(|l| l.starts_with("caution"))
        .collect();
    assert_eq!(lines, [format!("caution: {caution}")], "{stdout}");
    let report = json_report(&demo(&cache, &[&["--json"], &args[..]].concat()));
    assert_eq!(report["caution"], caution);
}
