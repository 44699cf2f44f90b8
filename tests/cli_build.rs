//! `kernstep build` through the binary: summaries (table and JSON), a bad model among good
//! ones, `--rebuild`, limits that stop a build, `--out`, two builders of one model at once,
//! and a build killed mid-way then resumed from its checkpoint.
//!
//! The resume test builds the Graver basis of the 5 x 5 transportation matrix without a norm
//! limit (3940 elements) three times (fresh, killed, resumed); it is the slowest test here,
//! about 2 s with the test profile's optimisation and 15 s fully unoptimised.

use std::path::{Path, PathBuf};
use std::process::Stdio;
use std::time::{Duration, Instant};

use serde_json::Value;

mod cli_support;
use cli_support::{command, examples, expect, kernstep, run_concurrently, text, transport_model};

fn json(cache: &Path, args: &[&str], code: i32) -> Value {
    cli_support::json_rows(&expect(cache, args, code))
}

fn files_with_suffix(dir: &Path, suffix: &str) -> Vec<PathBuf> {
    let mut found: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().and_then(|e| e.to_str()) == Some(suffix))
        .collect();
    found.sort();
    found
}

fn entries(dir: &Path) -> Vec<PathBuf> {
    files_with_suffix(dir, cache::ENTRY_SUFFIX)
}

fn path_str(p: &Path) -> &str {
    p.to_str().unwrap()
}

#[test]
fn a_directory_of_models_gives_one_summary_row_each() {
    let cache_dir = tempfile::tempdir().unwrap();
    let ex = examples();
    let table = expect(
        cache_dir.path(),
        &["build", "--engine", "moves", path_str(&ex)],
        0,
    );
    let lines: Vec<&str> = table.lines().collect();
    assert!(lines[0].starts_with("model") && lines[0].contains("status"));
    let models = ["json", "toml"]
        .iter()
        .map(|suffix| files_with_suffix(&ex, suffix).len())
        .sum::<usize>();
    assert_eq!(lines.len(), models + 1, "{table}");
    assert!(lines[1..].iter().all(|l| l.ends_with("built")), "{table}");
    assert_eq!(entries(cache_dir.path()).len(), models);

    let again = json(
        cache_dir.path(),
        &["build", "--engine", "moves", path_str(&ex), "--json"],
        0,
    );
    let rows = again.as_array().unwrap();
    assert_eq!(rows.len(), models);
    for row in rows {
        assert_eq!(row["status"], "present", "{row}");
        assert_eq!(row["kind"], "graver");
        assert_eq!(row["key"].as_str().unwrap().len(), cache::DIGEST_HEX_LEN);
        assert!(row["elements"].as_u64().unwrap() >= 1);
    }
    let transport = rows
        .iter()
        .find(|r| r["model"].as_str().unwrap().ends_with("transport_3x3.json"))
        .unwrap();
    // The 15 cycles of K_{3,3} (standard count: 9 four-cycles + 6 six-cycles).
    assert_eq!(transport["elements"], 15);
}

/// A log of `--progress json` ends with the build's last state, whose `peak_moves` is the
/// largest working set of any record (the first record is shown at once and the others at
/// most every 30 s, so this short build logs its first and its last).
#[test]
fn a_json_progress_log_ends_with_the_peak() {
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 4, 4);
    let cache = tempfile::tempdir().unwrap();
    let args = [
        "build",
        path_str(&model),
        "--engine",
        "moves",
        "--progress",
        "json",
    ];
    let (_, stderr) = cli_support::expect_both(cache.path(), &args, 0);
    let records: Vec<Value> = stderr
        .lines()
        .filter(|l| l.starts_with('{'))
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(records.len(), 2, "{stderr}");
    let most = records.iter().map(|r| r["moves"].as_u64().unwrap()).max();
    let last = records.last().unwrap();
    assert_eq!(last["schema"], "kernstep.progress/2");
    assert!(last["peak_moves"].as_u64() >= most, "{stderr}");
    assert!(
        last["stage"] == last["stages"] || last["stage"].as_u64() > records[0]["stage"].as_u64()
    );
}

#[test]
fn a_bad_model_among_good_ones_exits_2_and_the_others_are_stored() {
    let models = tempfile::tempdir().unwrap();
    for name in ["transport_3x3.json", "feed_blend.toml"] {
        std::fs::copy(examples().join(name), models.path().join(name)).unwrap();
    }
    let bad = models.path().join("broken_depot.json");
    std::fs::write(&bad, r#"{"matrix": [[1, 2], [3]], "rhs": [1, 2]}"#).unwrap();
    let cache_dir = tempfile::tempdir().unwrap();
    let out = kernstep(
        cache_dir.path(),
        &[
            "build",
            "--engine",
            "moves",
            path_str(models.path()),
            "--json",
        ],
    );
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stderr));
    let rows = cli_support::json_rows(&text(&out.stdout));
    let statuses: Vec<&str> = rows
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["status"].as_str().unwrap())
        .collect();
    assert_eq!(statuses.len(), 3);
    let failed = statuses.iter().find(|s| s.starts_with("failed")).unwrap();
    assert!(failed.contains("broken_depot.json"), "{failed}");
    assert_eq!(statuses.iter().filter(|s| **s == "built").count(), 2);
    assert_eq!(entries(cache_dir.path()).len(), 2);
}

#[test]
fn a_missing_model_fails_with_the_os_error_said_once() {
    let cache_dir = tempfile::tempdir().unwrap();
    let missing = cache_dir.path().join("absent.json");
    let rows = json(
        cache_dir.path(),
        &["build", "--engine", "moves", path_str(&missing), "--json"],
        2,
    );
    let status = rows[0]["status"].as_str().unwrap();
    assert!(
        status.starts_with("failed: ") && status.contains("absent.json"),
        "{status}"
    );
    assert_eq!(status.matches("(os error 2)").count(), 1, "{status}");
}

#[test]
fn rebuild_replaces_a_valid_entry_with_an_equal_one() {
    let cache_dir = tempfile::tempdir().unwrap();
    let model = examples().join("transport_3x3.json");
    let first = json(
        cache_dir.path(),
        &["build", "--engine", "moves", path_str(&model), "--json"],
        0,
    );
    let again = json(
        cache_dir.path(),
        &[
            "build",
            "--engine",
            "moves",
            path_str(&model),
            "--rebuild",
            "--json",
        ],
        0,
    );
    assert_eq!(first[0]["status"], "built");
    assert_eq!(again[0]["status"], "built");
    assert_eq!(first[0]["key"], again[0]["key"]);
    let store = cache::Store::open(cache_dir.path()).unwrap();
    let stored = store.export(again[0]["key"].as_str().unwrap()).unwrap();
    assert_eq!(stored.elements.len(), 15);
    assert_eq!(entries(cache_dir.path()).len(), 1);
}

#[test]
fn limits_stop_a_build_with_exit_1_and_leave_no_entry() {
    let model = examples().join("transport_3x3.json");
    for limit in [
        &["--max-elements", "1"][..],
        &["--time-limit", "0.000001"][..],
    ] {
        let cache_dir = tempfile::tempdir().unwrap();
        let mut args = vec!["build", "--engine", "moves", path_str(&model), "--json"];
        args.extend_from_slice(limit);
        let rows = json(cache_dir.path(), &args, 1);
        let status = rows[0]["status"].as_str().unwrap();
        assert!(status.starts_with("stopped"), "{limit:?}: {status}");
        assert!(rows[0]["elements"].is_null());
        assert!(entries(cache_dir.path()).is_empty(), "{limit:?}");
        // A stopped build may leave a checkpoint the next run resumes from.
        let rows = json(
            cache_dir.path(),
            &["build", "--engine", "moves", path_str(&model), "--json"],
            0,
        );
        let status = rows[0]["status"].as_str().unwrap();
        assert!(status.starts_with("built"), "{limit:?}: {status}");
        assert_eq!(rows[0]["elements"], 15);
    }
}

#[test]
fn out_writes_the_set_the_cache_holds() {
    let cache_dir = tempfile::tempdir().unwrap();
    let out_dir = tempfile::tempdir().unwrap();
    let out = out_dir.path().join("twisted.json");
    let model = examples().join("twisted_cubic.json");
    let written = json(
        cache_dir.path(),
        &[
            "build",
            "--engine",
            "moves",
            path_str(&model),
            "--out",
            path_str(&out),
            "--json",
        ],
        0,
    );
    assert!(written[0]["status"]
        .as_str()
        .unwrap()
        .starts_with("written to"));
    assert!(
        entries(cache_dir.path()).is_empty(),
        "--out bypasses the cache"
    );
    let stored = json(
        cache_dir.path(),
        &["build", "--engine", "moves", path_str(&model), "--json"],
        0,
    );
    assert_eq!(written[0]["key"], stored[0]["key"]);

    let file: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    let store = cache::Store::open(cache_dir.path()).unwrap();
    let entry = store.export(stored[0]["key"].as_str().unwrap()).unwrap();
    assert_eq!(
        file["elements"],
        serde_json::to_value(&entry.elements).unwrap()
    );
    assert_eq!(file["key"], serde_json::to_value(&entry.key).unwrap());
    // The library reads the file back, every field checked, to the stored set.
    let document = std::fs::read_to_string(&out).unwrap();
    let read = kernstep::testset::read_set_document(&document, path_str(&out)).unwrap();
    assert_eq!(
        (read.key, read.elements),
        (entry.key.clone(), entry.elements.clone())
    );
    assert_eq!(file["metadata"]["rank"], entry.metadata.rank);

    let two = kernstep(
        cache_dir.path(),
        &[
            "build",
            "--engine",
            "moves",
            path_str(&examples()),
            "--out",
            path_str(&out),
        ],
    );
    assert_eq!(two.status.code(), Some(2));
    assert!(text(&two.stderr).contains("exactly one model"));
}

#[test]
fn two_builders_of_one_model_store_one_entry() {
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 4, 6);
    let cache_dir = tempfile::tempdir().unwrap();
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&model),
        "--norm-limit",
        "none",
        "--json",
    ];
    let mut statuses: Vec<String> = run_concurrently(cache_dir.path(), &args, 2)
        .into_iter()
        .map(|out| {
            assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
            let rows = cli_support::json_rows(&text(&out.stdout));
            rows[0]["status"].as_str().unwrap().to_string()
        })
        .collect();
    statuses.sort();
    assert_eq!(statuses, ["built", "present"]);
    assert_eq!(entries(cache_dir.path()).len(), 1);
    expect(cache_dir.path(), &["cache", "verify"], 0);
}

/// Starts a build and kills it once it has run `after` and saved a checkpoint.
fn kill_after_checkpoint(cache_dir: &Path, args: &[&str], after: Duration) -> usize {
    let mut child = command(cache_dir, args)
        .stdout(Stdio::null())
        .spawn()
        .unwrap();
    let started = Instant::now();
    let mut seen = Vec::new();
    while child.try_wait().unwrap().is_none() {
        let checkpoints = files_with_suffix(cache_dir, cache::CHECKPOINT_SUFFIX);
        if let Some(size) = checkpoints
            .first()
            .and_then(|p| std::fs::metadata(p).ok())
            .map(|m| m.len())
        {
            if seen.last() != Some(&size) {
                seen.push(size);
            }
            if started.elapsed() >= after {
                child.kill().unwrap();
                break;
            }
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    child.wait().unwrap();
    assert!(
        entries(cache_dir).is_empty(),
        "the build finished before it could be killed; use a larger model"
    );
    seen.len()
}

/// The shortest of `runs` runs of `args` into fresh cache directories.
fn fastest_fresh_build(args: &[&str], runs: usize) -> Duration {
    (0..runs)
        .map(|_| {
            let dir = tempfile::tempdir().unwrap();
            let started = Instant::now();
            expect(dir.path(), args, 0);
            started.elapsed()
        })
        .min()
        .unwrap()
}

/// Runs a build that resumes from the checkpoint `saved`; returns its summary row and time.
fn resumed_build(
    cache_dir: &Path,
    args: &[&str],
    checkpoint: &Path,
    saved: &[u8],
) -> (Value, Duration) {
    for entry in entries(cache_dir) {
        std::fs::remove_file(entry).unwrap();
    }
    std::fs::write(checkpoint, saved).unwrap();
    let started = Instant::now();
    let rows = json(cache_dir, args, 0);
    (rows[0].clone(), started.elapsed())
}

#[test]
fn a_killed_build_resumes_from_its_checkpoint_and_gives_the_same_set() {
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 5, 5);
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&model),
        "--norm-limit",
        "none",
        "--json",
    ];
    // Shortest of two runs each, so that a burst of load on a shared machine does not decide.
    let fresh = fastest_fresh_build(&args, 2);

    // Most of the time goes into the last lifting stage: kill well inside it.
    let cache_dir = tempfile::tempdir().unwrap();
    let checkpoints = kill_after_checkpoint(cache_dir.path(), &args, fresh.mul_f64(0.6));
    assert!(checkpoints >= 1);
    let checkpoint = files_with_suffix(cache_dir.path(), cache::CHECKPOINT_SUFFIX).remove(0);
    let saved = std::fs::read(&checkpoint).unwrap();

    let (row, first) = resumed_build(cache_dir.path(), &args, &checkpoint, &saved);
    let status = row["status"].as_str().unwrap().to_string();
    assert!(status.starts_with("built (resumed from stage "), "{status}");
    assert!(row["resumed"]["stage"].as_u64().is_some(), "{row}");
    assert!(
        !checkpoint.exists(),
        "the checkpoint is removed once the entry is stored"
    );
    let entry = cache::Store::open(cache_dir.path())
        .unwrap()
        .export(row["key"].as_str().unwrap())
        .unwrap();
    let (again, second) = resumed_build(cache_dir.path(), &args, &checkpoint, &saved);
    assert_eq!(again["status"].as_str(), Some(status.as_str()));
    let resumed = first.min(second);
    eprintln!("fresh {fresh:?}, resumed {resumed:?} ({status}; {checkpoints} checkpoints seen)");
    // The work is what resuming saves (times are for benchmarks, not tests): the resumed run
    // starts past the first stage with work already done.
    assert!(row["resumed"]["stage"].as_u64() >= Some(1), "{row}");
    assert!(row["resumed"]["work_seconds"].as_f64() > Some(0.0), "{row}");

    let out_dir = tempfile::tempdir().unwrap();
    let reference = out_dir.path().join("fresh.json");
    let mut out_args = args.to_vec();
    out_args.extend(["--out", path_str(&reference)]);
    expect(out_dir.path(), &out_args, 0);
    let file: Value = serde_json::from_slice(&std::fs::read(&reference).unwrap()).unwrap();
    // 3940 circuits of K_{5,5}: sum over k of C(5,k)^2 k!(k-1)!/2 (standard cycle count).
    assert_eq!(entry.elements.len(), 3940);
    assert_eq!(
        file["elements"],
        serde_json::to_value(&entry.elements).unwrap()
    );
    assert_eq!(file["key"], serde_json::to_value(&entry.key).unwrap());
}

/// Sends `signal` (`INT` or `TERM`) to the process `pid`.
fn send(signal: &str, pid: u32) {
    let status = std::process::Command::new("kill")
        .args([&format!("-{signal}"), &pid.to_string()])
        .status()
        .unwrap();
    assert!(status.success());
}

/// Waits until `dir` holds a checkpoint (the build is under way and has saved once) or `child`
/// has ended; true when a checkpoint appeared first.
fn first_checkpoint(dir: &Path, child: &mut std::process::Child) -> bool {
    loop {
        if !files_with_suffix(dir, cache::CHECKPOINT_SUFFIX).is_empty() {
            return true;
        }
        if child.try_wait().unwrap().is_some() {
            return false;
        }
        std::thread::sleep(Duration::from_millis(2));
    }
}

/// Issue 21: SIGINT and SIGTERM at points spread over a build (mid-stage included) save the
/// state, exit 130 and 143 (128 + the signal number, the shell's convention) with what was
/// kept and the command that resumes; running that command again, as often as needed, ends
/// with the set of an uninterrupted build. Signals are timed from the first checkpoint, so a
/// loaded machine that slows the build slows the trigger with it.
#[test]
fn signals_save_the_state_and_the_build_resumes_to_the_same_set() {
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 5, 6);
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&model),
        "--norm-limit",
        "none",
        "--checkpoint-every",
        "0.05s",
        "--json",
    ];
    let fresh = fastest_fresh_build(&args, 1);
    let reference = {
        let dir = tempfile::tempdir().unwrap();
        let out = dir.path().join("fresh.json");
        let mut out_args = args.to_vec();
        out_args.extend(["--out", path_str(&out)]);
        expect(dir.path(), &out_args, 0);
        let file: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
        file["elements"].clone()
    };
    let mut interrupted = 0;
    for (i, (signal, code)) in [("INT", 130), ("TERM", 143)]
        .into_iter()
        .cycle()
        .take(6)
        .enumerate()
    {
        let cache_dir = tempfile::tempdir().unwrap();
        let mut child = command(cache_dir.path(), &args)
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .unwrap();
        if first_checkpoint(cache_dir.path(), &mut child) {
            // Spread over the build: from the first checkpoint to half a fresh build later.
            std::thread::sleep(fresh.mul_f64(0.1 * i as f64));
            send(signal, child.id());
        }
        let out = child.wait_with_output().unwrap();
        if out.status.code() == Some(0) {
            continue; // finished before the signal arrived: nothing to resume
        }
        interrupted += 1;
        assert_eq!(out.status.code(), Some(code), "SIG{signal}");
        let rows = cli_support::json_rows(&text(&out.stdout));
        let status = rows[0]["status"].as_str().unwrap();
        assert!(
            status.starts_with("stopped: interrupted; kept stage "),
            "{status}"
        );
        let kept = &rows[0]["kept"];
        assert!(kept["moves"].as_str().is_some(), "{kept}");
        let command_line = rows[0]["resume_command"].as_str().unwrap();
        assert!(command_line.contains(" build "), "{command_line}");
        let rows = json(cache_dir.path(), &args, 0);
        assert_eq!(rows[0]["resumed"]["stage"], kept["stage"], "{rows}");
        assert_eq!(rows[0]["resumed"]["moves"], kept["moves"], "{rows}");
        let work = rows[0]["resumed"]["work_seconds"].as_f64().unwrap();
        assert!(work > 0.0 && work < 600.0, "{work}");
        let entry = cache::Store::open(cache_dir.path())
            .unwrap()
            .export(rows[0]["key"].as_str().unwrap())
            .unwrap();
        assert_eq!(serde_json::to_value(&entry.elements).unwrap(), reference);
    }
    assert!(
        interrupted >= 2,
        "only {interrupted} of 6 signals arrived mid-build"
    );
}

/// Issue 14: a network matrix asked for its Graver basis gets an implicit entry (kind
/// `cycles`, no elements, Δ = 1 exact), found again as `present`; `--engine moves` still
/// enumerates; `--engine cycles` refuses a matrix that is no network.
#[test]
fn a_network_gets_an_implicit_entry_of_its_own_kind() {
    let cache_dir = tempfile::tempdir().unwrap();
    let lanes = examples().join("scenarios/brackle_lanes.toml");
    let rows = json(cache_dir.path(), &["build", path_str(&lanes), "--json"], 0);
    assert_eq!(rows[0]["kind"], "cycles", "{rows}");
    assert_eq!(rows[0]["elements"], 0);
    let again = json(cache_dir.path(), &["build", path_str(&lanes), "--json"], 0);
    assert_eq!(again[0]["status"], "present");
    let list = expect(cache_dir.path(), &["cache", "list"], 0);
    assert!(list.lines().any(|l| l.contains(" cycles ")), "{list}");
    let key = rows[0]["key"].as_str().unwrap();
    let show = expect(cache_dir.path(), &["cache", "show", &key[..12]], 0);
    assert!(show.contains("Δ                  1"), "{show}");
    assert!(show.contains("network cycles (implicit)"), "{show}");
    // The enumerated set of the same matrix is another entry, with its elements.
    let moves = json(
        cache_dir.path(),
        &["build", "--engine", "moves", path_str(&lanes), "--json"],
        0,
    );
    assert_eq!(moves[0]["kind"], "graver");
    assert!(moves[0]["elements"].as_u64().unwrap() > 0);
    let trucks = examples().join("scenarios/hollin_trucks.toml");
    let refused = json(
        cache_dir.path(),
        &["build", "--engine", "cycles", path_str(&trucks), "--json"],
        2,
    );
    let status = refused[0]["status"].as_str().unwrap();
    assert!(
        status.contains("not a network matrix: column 0 has 3 nonzeros"),
        "{status}"
    );
}

/// Writes the model of a directed graph on `nodes` nodes: its node-arc incidence matrix (+1 at
/// the tail, -1 at the head), zero right-hand sides, no bounds.
fn digraph_model(dir: &Path, name: &str, nodes: usize, arcs: &[(usize, usize)]) -> PathBuf {
    let mut rows = vec![vec![0i64; arcs.len()]; nodes];
    for (j, &(tail, head)) in arcs.iter().enumerate() {
        rows[tail][j] = 1;
        rows[head][j] = -1;
    }
    let doc = serde_json::json!({ "matrix": rows, "rhs": vec![0; nodes] });
    let path = dir.join(format!("{name}.json"));
    std::fs::write(&path, doc.to_string()).unwrap();
    path
}

/// `build MODEL --out FILE` (default engine): the written file's elements, after checking
/// that the file is a complete Graver set.
fn written_set(model: &Path) -> Vec<Vec<i64>> {
    let cache_dir = tempfile::tempdir().unwrap();
    let out_dir = tempfile::tempdir().unwrap();
    let out = out_dir.path().join("set.json");
    let rows = json(
        cache_dir.path(),
        &["build", path_str(model), "--out", path_str(&out), "--json"],
        0,
    );
    assert_eq!(rows[0]["kind"], "graver", "{rows}");
    let file: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    assert_eq!(file["key"]["kind"], "graver");
    assert_eq!(file["metadata"]["completeness"], "complete");
    assert_eq!(
        rows[0]["elements"],
        file["elements"].as_array().unwrap().len()
    );
    serde_json::from_value(file["elements"].clone()).unwrap()
}

fn binomial(n: u64, k: u64) -> u64 {
    (0..k).fold(1, |acc, i| acc * (n - i) / (i + 1))
}

fn factorial(n: u64) -> u64 {
    (1..=n).product()
}

/// Issue 21: `build --out` on a network matrix writes its enumerated Graver basis, the signed
/// circuits (one per cycle up to sign), never the implicit entry's empty list. The cycles of
/// K_{p,q}: a cycle of length 2k picks k nodes on each side, and the k! (k-1)! / 2 ways to
/// alternate them around a cycle give sum_{k>=2} C(p,k) C(q,k) k! (k-1)! / 2 (a standard
/// count; OEIS A070968 for K_{n,n}: 15, 204, ...).
#[test]
fn out_on_a_network_writes_the_cycles_of_complete_bipartite_graphs() {
    let models = tempfile::tempdir().unwrap();
    for (p, q) in [(3, 3), (3, 4), (4, 4), (2, 5)] {
        let arcs: Vec<(usize, usize)> = (0..p)
            .flat_map(|i| (0..q).map(move |k| (i, p + k)))
            .collect();
        let model = digraph_model(models.path(), &format!("k{p}{q}"), p + q, &arcs);
        let circuits: u64 = (2..=p.min(q) as u64)
            .map(|k| {
                binomial(p as u64, k) * binomial(q as u64, k) * factorial(k) * factorial(k - 1) / 2
            })
            .sum();
        let set = written_set(&model);
        assert_eq!(set.len() as u64, circuits, "K_{{{p},{q}}}");
        // Each element is a signed cycle: entries 0 and ±1, in the kernel of the incidence
        // matrix (every node balanced).
        for g in &set {
            assert!(g.iter().all(|x| x.abs() <= 1), "{g:?}");
            let mut balance = vec![0i64; p + q];
            for (j, &(tail, head)) in arcs.iter().enumerate() {
                balance[tail] += g[j];
                balance[head] -= g[j];
            }
            assert!(balance.iter().all(|&b| b == 0), "{g:?}");
        }
    }
}

/// The Petersen graph with an arbitrary orientation: 57 cycles, enumerated by networkx
/// `simple_cycles` (and recounted by brute force) in scripts/graph_cycles_reference.py.
#[test]
fn out_on_the_petersen_graph_writes_the_networkx_cycles() {
    #[derive(serde::Deserialize)]
    struct Fixture {
        generator: String,
        nodes: usize,
        arcs: Vec<(usize, usize)>,
        cycles: Vec<Vec<i64>>,
    }
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/cycles/petersen_s113.json");
    let fixture: Fixture = serde_json::from_slice(&std::fs::read(path).unwrap()).unwrap();
    assert!(fixture.generator.starts_with("networkx "));
    let models = tempfile::tempdir().unwrap();
    let model = digraph_model(models.path(), "petersen", fixture.nodes, &fixture.arcs);
    let mut set: Vec<Vec<i64>> = written_set(&model)
        .into_iter()
        .map(|g| {
            // The fixture's orientation: first nonzero entry +1.
            let first = g.iter().copied().find(|&x| x != 0).unwrap();
            g.iter().map(|&x| x * first.signum()).collect()
        })
        .collect();
    set.sort();
    assert_eq!(set, fixture.cycles);
}

/// `--engine cycles --out` cannot write the implicit entry: refused, nothing written; and
/// `cache export` of a stored implicit entry enumerates the cycles rather than print an empty
/// set: on K_{3,3} the 15 circuits of the formula sum_k C(3,k)^2 k!(k-1)!/2 (OEIS A070968),
/// the same document `build --out` writes.
#[test]
fn implicit_network_entries_are_never_written_as_empty_sets() {
    let cache_dir = tempfile::tempdir().unwrap();
    let out_dir = tempfile::tempdir().unwrap();
    let out = out_dir.path().join("set.json");
    let lanes = examples().join("scenarios/brackle_lanes.toml");
    let refused = json(
        cache_dir.path(),
        &[
            "build",
            path_str(&lanes),
            "--engine",
            "cycles",
            "--out",
            path_str(&out),
            "--json",
        ],
        2,
    );
    let status = refused[0]["status"].as_str().unwrap();
    assert!(status.contains("--engine moves"), "{status}");
    assert!(!out.exists());

    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 3, 3);
    let rows = json(cache_dir.path(), &["build", path_str(&model), "--json"], 0);
    assert_eq!(rows[0]["kind"], "cycles");
    let key = rows[0]["key"].as_str().unwrap();
    let export = expect(cache_dir.path(), &["cache", "export", key], 0);
    let exported: Value = serde_json::from_str(&export).unwrap();
    assert_eq!(exported["elements"].as_array().unwrap().len(), 15);
    let file = out_dir.path().join("k33.json");
    expect(
        cache_dir.path(),
        &["build", path_str(&model), "--out", path_str(&file)],
        0,
    );
    let written: Value = serde_json::from_slice(&std::fs::read(&file).unwrap()).unwrap();
    assert_eq!(exported["elements"], written["elements"]);
    assert_eq!(exported["key"], written["key"]);
}

/// `--out` with a bare file name writes into the working directory through the one atomic
/// writer (whose directory sync must take the empty parent as `.`), leaving no temporary file.
#[test]
fn out_with_a_bare_file_name_writes_into_the_working_directory() {
    let work = tempfile::tempdir().unwrap();
    let cache_dir = tempfile::tempdir().unwrap();
    let cubic = examples().join("twisted_cubic.json");
    let out = command(
        cache_dir.path(),
        &["build", path_str(&cubic), "--out", "cubic_set.json"],
    )
    .current_dir(work.path())
    .output()
    .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let names: Vec<String> = std::fs::read_dir(work.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names, ["cubic_set.json"]);
}

/// A `build --json` row carries the library's job report: the same model built by the binary
/// into one cache and by `testset::Job` into another gives the same report, once built and
/// once present (times and the paths of the caches aside).
#[test]
fn a_build_row_is_the_library_job_report() {
    use kernstep::completion::Control;
    use kernstep::scenario::PlanInput;
    use kernstep::testset::{BuildSpec, Destination, Engine, Job, JobReport, SetLibrary};
    let models = tempfile::tempdir().unwrap();
    let model_path = transport_model(models.path(), 3, 3);
    let model = PlanInput::load(&model_path).unwrap().into_model();
    let binary = tempfile::tempdir().unwrap();
    let library_dir = tempfile::tempdir().unwrap();
    let library = SetLibrary::open(Some(library_dir.path())).unwrap();
    for round in ["built", "present"] {
        let args = [
            "build",
            path_str(&model_path),
            "--engine",
            "moves",
            "--json",
        ];
        let rows = json(binary.path(), &args, 0);
        let printed: JobReport = serde_json::from_value(rows[0].clone()).unwrap();
        let job = Job {
            spec: BuildSpec::default(),
            engine: Engine::Moves,
            budget: None,
            rebuild: false,
            destination: Destination::Cache(&library),
        };
        let called = job.run(&model, Control::new()).unwrap();
        assert_eq!(printed, called, "{round}");
        assert_eq!(rows[0]["state"], round);
    }
}

/// A `--signs` pattern may start with `-` (a variable `<= 0`): it is read as the flag's value,
/// not as another option, and reaches the pattern's own check.
#[test]
fn a_sign_pattern_may_start_with_a_minus() {
    let cache_dir = tempfile::tempdir().unwrap();
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 2, 2);
    let build = |signs: &str| {
        let args = [
            "build",
            path_str(&model),
            "--kind",
            "hilbert",
            "--signs",
            signs,
            "--json",
        ];
        let out = kernstep(cache_dir.path(), &args);
        cli_support::json_rows(&text(&out.stdout))[0].clone()
    };
    let short = build("-+");
    let status = short["status"].as_str().unwrap();
    assert!(
        status.contains("--signs has 2 characters, the model has 4 variables"),
        "{status}"
    );
    assert_eq!(build("-++-")["state"], "built");
}
