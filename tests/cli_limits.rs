//! Limits wherever a build can happen, through the binary: `solve`, `trace`, `batch` and
//! `demo` take `--max-elements`, `--max-memory` and `--time-limit` for the build they start on
//! a cache miss; a limit that stops it exits 1 with a message naming the limit and the
//! `kernstep build` command that goes on, and stores no set. `--threads` above the machine's
//! parallelism is capped with one warning, and the answers stay the same.

use std::path::{Path, PathBuf};

mod cli_support;
use cli_support::{examples, expect_both, kernstep, scenarios, text, transport_model};

fn path_str(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// The stored entries (not checkpoints or locks) in `dir`.
fn entries(dir: &Path) -> Vec<PathBuf> {
    std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().and_then(|e| e.to_str()) == Some(cache::ENTRY_SUFFIX))
        .collect()
}

/// Runs `args` and requires exit 1 with a stop message naming `limit`; returns stderr.
fn stopped(cache: &Path, args: &[&str], limit: &str) -> String {
    let (stdout, stderr) = expect_both(cache, args, 1);
    assert!(stdout.is_empty(), "{args:?}: {stdout}");
    assert!(
        stderr.contains("building the test set stopped") && stderr.contains(limit),
        "{args:?}: {stderr}"
    );
    assert!(stderr.contains("`kernstep build "), "{args:?}: {stderr}");
    assert!(entries(cache).is_empty(), "{args:?}: a set was stored");
    stderr
}

#[test]
fn solve_build_stops_at_max_elements_and_stores_nothing() {
    let models = tempfile::tempdir().unwrap();
    // K_{3,4}: 42 circuits (by the formula in cli_build.rs), far more than 10 members.
    let model = transport_model(models.path(), 3, 4);
    let cache = tempfile::tempdir().unwrap();
    let args = [
        "solve",
        path_str(&model),
        "--build",
        "--engine",
        "moves",
        "--max-elements",
        "10",
    ];
    let stderr = stopped(cache.path(), &args, "--max-elements 10 reached");
    assert!(
        stderr.contains("kernstep build ") && stderr.contains("--engine moves"),
        "the way on builds the same set: {stderr}"
    );
    // Without the limit the same command builds (from the checkpoint) and solves.
    let (stdout, _) = expect_both(cache.path(), &args[..5], 0);
    assert!(stdout.contains("optimal"), "{stdout}");
    assert_eq!(entries(cache.path()).len(), 1);
}

#[test]
fn trace_batch_and_demo_stop_on_their_limits() {
    let model = examples().join("twisted_cubic.json");
    let cache = tempfile::tempdir().unwrap();
    stopped(
        cache.path(),
        &["trace", path_str(&model), "--build", "--max-memory", "1K"],
        "--max-memory 1000 bytes reached",
    );
    let scenario = scenarios().join("vell_valley.toml");
    let days = scenarios().join("vell_valley_days.jsonl");
    stopped(
        cache.path(),
        &[
            "batch",
            path_str(&scenario),
            path_str(&days),
            "--build",
            "--time-limit",
            "0.000001",
        ],
        "--time-limit 0.000001 s reached",
    );
    stopped(
        cache.path(),
        &["demo", "--max-elements", "5"],
        "--max-elements 5 reached",
    );
}

#[test]
fn limits_without_a_build_are_refused() {
    let cache = tempfile::tempdir().unwrap();
    let model = examples().join("twisted_cubic.json");
    let (_, stderr) = expect_both(
        cache.path(),
        &["solve", path_str(&model), "--max-elements", "10"],
        2,
    );
    assert!(stderr.contains("add --build"), "{stderr}");
}

/// `batch` records without their timings.
fn answers(stdout: &str) -> Vec<serde_json::Value> {
    stdout
        .lines()
        .map(|line| {
            let mut record: serde_json::Value = serde_json::from_str(line).unwrap();
            record.as_object_mut().unwrap().remove("seconds");
            record
        })
        .collect()
}

/// The count of threads this machine runs at once, as the binary sees it.
fn cores() -> usize {
    std::thread::available_parallelism().unwrap().get()
}

#[test]
fn too_many_threads_are_capped_with_one_warning_and_the_answers_stay() {
    let cache = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("vell_valley.toml");
    let days = scenarios().join("vell_valley_days.jsonl");
    let (s, d) = (path_str(&scenario), path_str(&days));
    // Exit 1: the demo days include an infeasible one on purpose.
    let (plain, _) = expect_both(cache.path(), &["batch", s, d, "--build"], 1);
    let out = kernstep(
        cache.path(),
        &["batch", s, d, "--threads", "100000", "--json"],
    );
    assert_eq!(out.status.code(), Some(1));
    assert_eq!(
        answers(&text(&out.stdout)),
        answers(&plain),
        "the days' results"
    );
    let stderr = text(&out.stderr);
    let warning = format!(
        "--threads 100000 is more than the {0} threads this machine runs at once; using {0}",
        cores()
    );
    assert_eq!(
        stderr.lines().filter(|l| l.contains("warning")).count(),
        1,
        "{stderr}"
    );
    assert!(stderr.contains(&warning), "{stderr}");
    // The JSON summary (on stderr here) reports the threads used.
    let summary: serde_json::Value =
        serde_json::from_str(&stderr[stderr.find('{').unwrap()..]).unwrap();
    assert_eq!(summary["threads"], cores());

    // build: the same set with the cap as with one thread.
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 3, 3);
    let build = |threads: &str, dir: &Path| {
        let out = kernstep(
            dir,
            &[
                "build",
                path_str(&model),
                "--engine",
                "moves",
                "--threads",
                threads,
                "--json",
            ],
        );
        assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
        let rows = cli_support::json_rows(&text(&out.stdout));
        (
            rows[0]["key"].clone(),
            rows[0]["elements"].clone(),
            text(&out.stderr),
        )
    };
    let (one_dir, many_dir) = (tempfile::tempdir().unwrap(), tempfile::tempdir().unwrap());
    let one = build("1", one_dir.path());
    let many = build("100000", many_dir.path());
    assert_eq!((&one.0, &one.1), (&many.0, &many.1));
    assert!(!one.2.contains("warning"), "{}", one.2);
    assert!(many.2.contains(&warning), "{}", many.2);
    let stored = |dir: &Path| {
        let store = cache::Store::open(dir).unwrap();
        store.export(one.0.as_str().unwrap()).unwrap().elements
    };
    assert_eq!(stored(one_dir.path()), stored(many_dir.path()));
}

/// Writes a model of `matrix` with zero right-hand sides.
fn matrix_model(dir: &Path, name: &str, matrix: &str, rows: usize) -> PathBuf {
    let path = dir.join(name);
    let rhs = vec!["0"; rows].join(",");
    std::fs::write(&path, format!(r#"{{"matrix": {matrix}, "rhs": [{rhs}]}}"#)).unwrap();
    path
}

/// Issue 21: an entry of 2^31 passed the reader and every build then failed on an overflow
/// naming no file. The reader's limit is now 2^31 - 1, the completion's 32-bit entries: 2^31
/// is refused at read, naming the file and field, by every verb.
#[test]
fn a_matrix_entry_of_two_to_the_31_is_refused_at_read() {
    let dir = tempfile::tempdir().unwrap();
    let cache = tempfile::tempdir().unwrap();
    for entry in ["2147483648", "-2147483648"] {
        let model = matrix_model(dir.path(), "big.json", &format!("[[1, {entry}]]"), 1);
        let field = format!("big.json: matrix[0][1]: {entry} exceeds the limit of 2147483647");
        let (stdout, _) = expect_both(cache.path(), &["build", path_str(&model)], 2);
        assert!(stdout.contains(&field), "{stdout}");
        let (_, stderr) = expect_both(cache.path(), &["solve", path_str(&model), "--build"], 2);
        assert!(stderr.contains(&field), "{stderr}");
    }
    let mps = dir.path().join("big.mps");
    std::fs::write(
        &mps,
        "NAME big\nROWS\n N obj\n E r\nCOLUMNS\n M1 'MARKER' 'INTORG'\n x obj 1 r 1\n y obj 1 r 2147483648\n M2 'MARKER' 'INTEND'\nRHS\n rhs r 1\nENDATA\n",
    )
    .unwrap();
    let (_, stderr) = expect_both(cache.path(), &["solve", path_str(&mps), "--build"], 2);
    assert!(
        stderr.contains("big.mps: line 8") && stderr.contains("exceeds the limit of 2147483647"),
        "{stderr}"
    );
}

/// The largest accepted entry builds exactly: the kernel of [a 1] is spanned by (1, -a), so
/// that and its negation are the whole Graver basis (elementary: every kernel vector is an
/// integer multiple of it). A right-hand side at the value limit b = 2^62 then solves
/// exactly: the plans x >= 0 of a x1 + x2 = b are (k, b - k a) for 0 <= k <= b div a, and the
/// cost x2 is least at k = b div a (by hand).
#[test]
fn entries_at_the_limit_build_exactly_and_large_values_solve() {
    let dir = tempfile::tempdir().unwrap();
    let cache = tempfile::tempdir().unwrap();
    let a: i64 = (1 << 31) - 1;
    let b: i64 = 1 << 62;
    let model = dir.path().join("edge.json");
    std::fs::write(
        &model,
        format!(r#"{{"matrix": [[{a}, 1]], "rhs": [{b}], "cost": [0, 1], "lower": [0, 0]}}"#),
    )
    .unwrap();
    let out = dir.path().join("set.json");
    expect_both(
        cache.path(),
        &["build", path_str(&model), "--out", path_str(&out)],
        0,
    );
    let file: serde_json::Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    let elements: Vec<Vec<i64>> = serde_json::from_value(file["elements"].clone()).unwrap();
    assert!(
        elements == [vec![1, -a]] || elements == [vec![-1, a]],
        "{elements:?}"
    );
    let (stdout, _) = expect_both(
        cache.path(),
        &["solve", path_str(&model), "--build", "--json"],
        0,
    );
    let doc: serde_json::Value = serde_json::from_str(&stdout).unwrap();
    let k = b / a;
    assert_eq!(
        cli_support::ints(&doc["x"]),
        Some(vec![k, b - k * a]),
        "{doc}"
    );
}

/// Entries within the limit whose products are not: the kernel of [a 1 0; 0 a 1] holds
/// (1, -a, a^2), beyond 32 bits for a = 2^31 - 1. The build cannot hold the set and says so,
/// naming the file and its matrix, in `build` and in `solve --build`.
#[test]
fn a_set_beyond_32_bits_fails_naming_the_file_and_matrix() {
    let dir = tempfile::tempdir().unwrap();
    let cache = tempfile::tempdir().unwrap();
    let a = (1i64 << 31) - 1;
    let model = matrix_model(
        dir.path(),
        "wide.json",
        &format!("[[{a}, 1, 0], [0, {a}, 1]]"),
        2,
    );
    let named = "wide.json: matrix: its test set needs entries beyond 2^31 - 1";
    let (stdout, _) = expect_both(cache.path(), &["build", path_str(&model)], 2);
    assert!(stdout.contains(named), "{stdout}");
    let (_, stderr) = expect_both(cache.path(), &["solve", path_str(&model), "--build"], 2);
    assert!(stderr.contains(named), "{stderr}");
    assert!(entries(cache.path()).is_empty());
}
