//! Builds and batches across MPI ranks (`cargo test --features mpi --test mpi_ranks`; needs
//! OpenMPI's `mpirun`, as `.ci/run` installs it): two ranks on loopback give the set and the
//! results of one process.
#![cfg(feature = "mpi")]

use std::path::Path;
use std::process::{Command, Output};
use std::time::Duration;

use serde_json::Value;

mod cli_support;
use cli_support::{scenarios, transport_model};

/// `mpirun -np RANKS kernstep ARGS` on this machine (root allowed, as in CI containers; no
/// core binding, since the ranks may outnumber the cores).
fn mpirun(ranks: usize, args: &[&str]) -> Command {
    let mut cmd = Command::new("mpirun");
    cmd.args([
        "--allow-run-as-root",
        "--oversubscribe",
        "--bind-to",
        "none",
    ])
    .args(["-np", &ranks.to_string(), env!("CARGO_BIN_EXE_kernstep")])
    .args(args);
    cmd
}

fn alone(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .args(args)
        .output()
        .unwrap()
}

fn text(bytes: &[u8]) -> String {
    String::from_utf8_lossy(bytes).into_owned()
}

/// The stored set of `key` as `cache export` prints it, without the build's clock readings.
fn exported(cache: &Path, key: &str) -> Value {
    let out = alone(&[
        "cache",
        "export",
        key,
        "--cache-dir",
        cache.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", text(&out.stderr));
    let mut doc: Value = serde_json::from_slice(&out.stdout).unwrap();
    let metadata = doc["metadata"].as_object_mut().unwrap();
    metadata.remove("build_seconds");
    metadata.remove("created_unix");
    doc
}

fn build_key(output: &Output) -> String {
    assert!(
        output.status.success(),
        "{}{}",
        text(&output.stdout),
        text(&output.stderr)
    );
    let summary: Value = serde_json::from_slice(&output.stdout).expect("one JSON summary");
    summary["models"][0]["key"].as_str().unwrap().to_string()
}

#[test]
fn two_ranks_build_the_set_of_one_process() {
    let dir = tempfile::tempdir().unwrap();
    // The 5 x 6 transport matrix: 15,390 Graver elements (as one process computes them).
    let model = transport_model(dir.path(), 5, 6);
    let model = model.to_str().unwrap();
    let (one, two) = (dir.path().join("one"), dir.path().join("two"));
    let args = |cache: &Path| {
        [
            "build",
            model,
            "--engine",
            "moves",
            "--json",
            "--cache-dir",
            cache.to_str().unwrap(),
        ]
        .map(String::from)
    };
    let single = alone(&args(&one).each_ref().map(String::as_str));
    let key = build_key(&single);
    let shared = mpirun(2, &args(&two).each_ref().map(String::as_str))
        .output()
        .unwrap();
    assert_eq!(
        build_key(&shared),
        key,
        "one summary, from rank 0, for the same entry"
    );
    let (a, b) = (exported(&one, &key), exported(&two, &key));
    assert_eq!(a["elements"].as_array().unwrap().len(), 15_390);
    assert_eq!(a, b, "the stored sets differ");
}

#[test]
fn two_ranks_give_the_batch_output_of_one_process() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().join("cache");
    let cache = cache.to_str().unwrap();
    for (scenario, days) in [
        ("vell_valley.toml", "vell_valley_days.jsonl"),
        ("hollin_trucks.toml", "hollin_trucks_days.jsonl"),
    ] {
        let (s, d) = (scenarios().join(scenario), scenarios().join(days));
        let args = [
            "batch",
            s.to_str().unwrap(),
            d.to_str().unwrap(),
            "--build",
            "--cache-dir",
            cache,
        ];
        let single = alone(&args);
        let shared = mpirun(2, &args).output().unwrap();
        // mpirun passes on the ranks' exit code, which every rank computes over all days.
        assert_eq!(
            shared.status.code(),
            single.status.code(),
            "{}",
            text(&shared.stderr)
        );
        let strip = |out: &Output| -> Vec<Value> {
            text(&out.stdout)
                .lines()
                .map(|l| {
                    let mut v: Value = serde_json::from_str(l).unwrap();
                    v.as_object_mut().unwrap().remove("seconds");
                    v
                })
                .collect()
        };
        let (a, b) = (strip(&single), strip(&shared));
        assert!(a.len() >= 6, "{scenario}");
        assert_eq!(a, b, "{scenario}: results differ");
        // One summary (rank 0's), counting every rank's days.
        let summary = text(&shared.stderr);
        let counts: Vec<&str> = summary
            .lines()
            .filter(|l| l.starts_with("days "))
            .filter_map(|l| l.split_whitespace().last())
            .collect();
        assert_eq!(counts, [a.len().to_string()], "{summary}");
    }
}

#[test]
fn a_rank_that_dies_stores_nothing_and_the_build_completes_later() {
    let dir = tempfile::tempdir().unwrap();
    // 5 x 7 transport: 45,150 elements, a few seconds on one thread per rank.
    let model = transport_model(dir.path(), 5, 7);
    let model = model.to_str().unwrap();
    let cache = dir.path().join("cache");
    let cache = cache.to_str().unwrap();
    let args = [
        "build",
        model,
        "--engine",
        "moves",
        "--threads",
        "1",
        "--cache-dir",
        cache,
    ];
    let mut job = mpirun(2, &args).spawn().unwrap();
    // Wait until the build is under way: both ranks run and one holds the key's lock.
    let pattern = format!("kernstep build {model}");
    let started = std::time::Instant::now();
    loop {
        let ranks = Command::new("pgrep")
            .args(["-c", "-f", &pattern])
            .output()
            .unwrap();
        let running: usize = String::from_utf8_lossy(&ranks.stdout)
            .trim()
            .parse()
            .unwrap_or(0);
        let locked = std::fs::read_dir(cache).is_ok_and(|d| {
            d.filter_map(|e| e.ok())
                .any(|e| e.path().extension().is_some_and(|x| x == "lock"))
        });
        if running >= 2 && locked {
            break;
        }
        assert!(
            started.elapsed() < Duration::from_secs(60) && job.try_wait().unwrap().is_none(),
            "the build never got under way (or ended before the kill)"
        );
        std::thread::sleep(Duration::from_millis(20));
    }
    // Kill one rank outright (not through MPI): the job must end, with an error status.
    let killed = Command::new("pkill")
        .args(["-9", "-n", "-f", &pattern])
        .status()
        .unwrap();
    assert!(
        killed.success(),
        "no rank was killed: the test proves nothing"
    );
    let status = job.wait().unwrap();
    assert!(!status.success(), "a job that lost a rank must not succeed");
    let entries = std::fs::read_dir(cache)
        .map(|d| {
            d.filter_map(|e| e.ok())
                .filter(|e| e.path().extension().is_some_and(|x| x == "kset"))
                .count()
        })
        .unwrap_or(0);
    assert_eq!(entries, 0, "no entry stored by a broken job");
    let again = alone(&[
        "build",
        model,
        "--engine",
        "moves",
        "--json",
        "--cache-dir",
        cache,
    ]);
    let summary: Value = serde_json::from_slice(&again.stdout).unwrap();
    let rows = &summary["models"];
    assert!(
        rows[0]["status"].as_str().unwrap().starts_with("built"),
        "{rows}"
    );
    assert_eq!(rows[0]["elements"], 45_150);
}
