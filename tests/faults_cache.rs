//! Every cache fault, one family per test, on real test sets, through the library and the
//! binary: truncated and padded entries, bit-flipped entries, a foreign format version and an
//! entry renamed to another key's name, damaged and foreign checkpoints, concurrent builders
//! (threads, and processes), a writer SIGKILLed mid-write, and an unusable cache directory.
//!
//! Each case counts as detected only if every layer handles it: the library refuses the file
//! with a damage error naming it and never hands it back, `kernstep cache verify` exits 2
//! naming it, and `kernstep build` replaces it with a sound entry. Each test prints the count
//! of its cases tried and detected and requires all of them.
//!
//! The SIGKILL test re-runs this test binary as a child writer (`--exact` with an environment
//! variable naming its role), as the cache crate's own concurrency tests do.
//!
//! Focused tests follow (issue 21): forged and copied-in entries, a foreign directory, prune
//! racing a build, checkpoints with a valid checksum and invalid content, `cache list` of
//! checkpoints and locks, and FIFOs and `/dev/zero` as model and entry (each run of the
//! binary there is bounded in time, so a hang fails instead of hanging the suite).

use std::env;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::sync::{Arc, Barrier};
use std::time::{Duration, Instant};

use cache::{Completeness, EntryKey, SetKind, SetMetadata, Sign, Store, TestSetData, Truncation};
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::Control;
use kernstep::model::Model;
use kernstep::testset::{
    build, entry_key, BuildOutcome, BuildSpec, Obtained, ResolvedSpec, SetLibrary,
};

mod cli_support;
use cli_support::{examples, kernstep, run_concurrently, text, transport_model};

/// The rows (`models`) of a `build --json` summary; `null` when the output is not one.
fn build_rows(stdout: &[u8]) -> serde_json::Value {
    serde_json::from_slice::<serde_json::Value>(stdout)
        .map(|doc| doc["models"].clone())
        .unwrap_or_default()
}

const WRITER_ENV: &str = "KERNSTEP_FAULTS_WRITER_DIR";
const WRITER_TEST: &str = "a_writer_killed_mid_write_leaves_a_whole_entry";

/// Cases tried, and the names of those not handled.
struct Tally {
    tried: usize,
    missed: Vec<String>,
}

impl Tally {
    fn new() -> Self {
        Tally {
            tried: 0,
            missed: Vec::new(),
        }
    }

    /// Prints the count and requires at least `at_least` cases, every one handled.
    fn require(self, family: &str, at_least: usize) {
        let detected = self.tried - self.missed.len();
        eprintln!(
            "{family}: {detected} of {} cases detected and handled",
            self.tried
        );
        assert!(
            self.tried >= at_least,
            "{family}: only {} cases",
            self.tried
        );
        assert!(self.missed.is_empty(), "{family}: {:#?}", self.missed);
    }

    fn record(&mut self, name: &str, handled: Result<(), String>) {
        self.tried += 1;
        if let Err(why) = handled {
            self.missed.push(format!("{name}: {why}"));
        }
    }
}

/// Turns a failed expectation into the reason a case is not handled.
fn ensure(ok: bool, why: impl FnOnce() -> String) -> Result<(), String> {
    if ok {
        Ok(())
    } else {
        Err(why())
    }
}

fn path_str(p: &Path) -> &str {
    p.to_str().unwrap()
}

/// A model, its resolved default spec and key.
struct Target {
    model: PathBuf,
    parsed: Model,
    spec: ResolvedSpec,
    key: EntryKey,
}

impl Target {
    fn new(model: PathBuf) -> Self {
        let parsed = Model::load(&model).unwrap();
        let analysis = MatrixAnalysis::of(&parsed.matrix, &AnalysisOptions::new());
        let spec = BuildSpec::default().resolve(&parsed, &analysis).unwrap();
        let key = entry_key(&parsed.matrix, &spec);
        Target {
            model,
            parsed,
            spec,
            key,
        }
    }

    fn hex(&self) -> String {
        self.key.digest().to_hex()
    }

    fn obtain(&self, library: &SetLibrary) -> Obtained {
        let analysis = MatrixAnalysis::of(&self.parsed.matrix, &AnalysisOptions::new());
        library
            .obtain(
                &self.parsed.matrix,
                &analysis,
                &self.spec,
                &Control::new(),
                false,
            )
            .unwrap()
    }

    /// Builds the set without any cache.
    fn uncached(&self) -> Vec<Vec<i64>> {
        let analysis = MatrixAnalysis::of(&self.parsed.matrix, &AnalysisOptions::new());
        match build(
            &self.parsed.matrix,
            &analysis,
            &self.spec,
            &Control::new(),
            None,
        )
        .unwrap()
        {
            BuildOutcome::Built(b) => b.set.to_rows(),
            BuildOutcome::Stopped(r) => panic!("stopped: {r:?}"),
        }
    }

    /// `kernstep build` of this model; returns exit code and the status of its row.
    fn build_status(&self, cache: &Path) -> (Option<i32>, String) {
        let out = kernstep(
            cache,
            &[
                "build",
                "--engine",
                "moves",
                path_str(&self.model),
                "--json",
            ],
        );
        let rows = build_rows(&out.stdout);
        let status = rows[0]["status"].as_str().unwrap_or("").to_string();
        (out.status.code(), status)
    }
}

/// A cache directory holding the stored sets of two example models.
struct Fixture {
    dir: tempfile::TempDir,
    store: Store,
    targets: [Target; 2],
    good: [Vec<u8>; 2],
    data: [TestSetData; 2],
}

impl Fixture {
    fn new() -> Self {
        let dir = tempfile::tempdir().unwrap();
        let targets = [
            Target::new(examples().join("transport_3x3.json")),
            Target::new(examples().join("twisted_cubic.json")),
        ];
        for t in &targets {
            let (code, status) = t.build_status(dir.path());
            assert_eq!((code, status.as_str()), (Some(0), "built"));
        }
        let store = Store::open(dir.path()).unwrap();
        let read = |t: &Target| std::fs::read(store.entry_path(t.key.digest())).unwrap();
        let load = |t: &Target| store.load(&t.key).unwrap().unwrap().data;
        Fixture {
            good: [read(&targets[0]), read(&targets[1])],
            data: [load(&targets[0]), load(&targets[1])],
            dir,
            store,
            targets,
        }
    }

    fn entry(&self, which: usize) -> PathBuf {
        self.store.entry_path(self.targets[which].key.digest())
    }

    /// Puts `bytes` in place of entry `which` and checks every layer refuses and repairs it.
    fn damage(&self, which: usize, bytes: &[u8]) -> Result<(), String> {
        let target = &self.targets[which];
        let path = self.entry(which);
        let name = path.display().to_string();
        std::fs::write(&path, bytes).unwrap();
        match self.store.load(&target.key) {
            Err(e) if e.is_damage() && e.to_string().contains(&name) => {}
            other => return Err(format!("library load gave {other:?}")),
        }
        let library = SetLibrary::open(Some(self.dir.path())).unwrap();
        match library.find(&target.key) {
            Ok(None) => {}
            other => return Err(format!("library find gave {other:?}")),
        }
        let out = kernstep(self.dir.path(), &["cache", "verify", &target.hex()]);
        ensure(
            out.status.code() == Some(2) && text(&out.stderr).contains(&name),
            || format!("verify gave {:?}: {}", out.status, text(&out.stderr)),
        )?;
        let (code, status) = target.build_status(self.dir.path());
        ensure(
            code == Some(0) && status.starts_with("built (replaced a damaged entry: "),
            || format!("build gave {code:?}: {status}"),
        )?;
        let repaired = self.store.load(&target.key).map_err(|e| e.to_string())?;
        ensure(repaired.is_some_and(|s| s.data == self.data[which]), || {
            "the rebuilt entry differs".into()
        })
    }
}

fn truncations_and_padding(f: &Fixture, tally: &mut Tally) {
    let good = &f.good[0];
    let len = good.len();
    for cut in [
        0,
        1,
        7,
        8,
        11,
        12,
        67,
        68,
        69,
        len / 2,
        len - 9,
        len - 8,
        len - 1,
    ] {
        tally.record(
            &format!("truncated to {cut} bytes"),
            f.damage(0, &good[..cut]),
        );
    }
    let mut padded = good.clone();
    padded.push(0);
    tally.record("padded by one byte", f.damage(0, &padded));
}

fn byte_flips(f: &Fixture, tally: &mut Tally) {
    let good = &f.good[1];
    let len = good.len();
    // Magic, version, tag, flags, digest, family, count, width, section lengths, the key,
    // metadata and element sections, and the checksum trailer (layout in cache::format).
    let positions = [
        0,
        5,
        8,
        10,
        11,
        12,
        27,
        30,
        36,
        44,
        52,
        56,
        60,
        68,
        80,
        len / 2,
    ];
    let tail = [len - 12, len - 9, len - 8, len - 1];
    for pos in positions.into_iter().chain(tail) {
        for mask in [0x01u8, 0x80] {
            let mut bad = good.clone();
            bad[pos] ^= mask;
            tally.record(&format!("byte {pos} ^ {mask:#04x}"), f.damage(1, &bad));
        }
    }
}

fn foreign_version_and_renamed(f: &Fixture, tally: &mut Tally) {
    for version in [1u16, 4] {
        let mut other = f.good[0].clone();
        other[8..10].copy_from_slice(&version.to_le_bytes());
        tally.record(&format!("format version {version}"), f.damage(0, &other));
    }
    tally.record(
        "entry 1 stored under entry 0's name",
        f.damage(0, &f.good[1]),
    );
    tally.record(
        "entry 0 stored under entry 1's name",
        f.damage(1, &f.good[0]),
    );

    // A copy under a digest no key has: `verify --all` names it, the sound ones pass.
    let stray = f
        .dir
        .path()
        .join(format!("{}.{}", "ab".repeat(16), cache::ENTRY_SUFFIX));
    std::fs::copy(f.entry(0), &stray).unwrap();
    let out = kernstep(f.dir.path(), &["cache", "verify", "--all"]);
    let stderr = text(&out.stderr);
    tally.record(
        "entry copied under an unknown digest",
        ensure(
            out.status.code() == Some(2)
                && stderr.lines().count() == 1
                && stderr.contains(path_str(&stray)),
            || format!("verify --all gave {:?}: {stderr}", out.status),
        ),
    );
    std::fs::remove_file(stray).unwrap();
}

fn checkpoints(f: &Fixture, tally: &mut Tally) {
    let target = &f.targets[0];
    let checkpoint = f.store.checkpoint_path(target.key.digest());
    let other = f.store.checkpoint_path(f.targets[1].key.digest());
    let foreign_key = &f.targets[1].key;
    f.store
        .save_checkpoint(foreign_key, b"state of another build")
        .unwrap();
    let foreign = std::fs::read(&other).unwrap();
    std::fs::remove_file(&other).unwrap();
    let cases: [(&str, Vec<u8>); 3] = [
        ("garbage checkpoint", b"not a checkpoint at all".to_vec()),
        (
            "truncated checkpoint",
            foreign[..foreign.len() - 3].to_vec(),
        ),
        ("another key's checkpoint", foreign),
    ];
    for (name, bytes) in cases {
        std::fs::remove_file(f.entry(0)).unwrap();
        std::fs::write(&checkpoint, bytes).unwrap();
        let (code, status) = target.build_status(f.dir.path());
        let sound = f.store.load(&target.key).ok().flatten();
        tally.record(
            name,
            ensure(
                code == Some(0)
                    && status == "built"
                    && !checkpoint.exists()
                    && sound.is_some_and(|s| s.data == f.data[0]),
                || format!("build gave {code:?}: {status}"),
            ),
        );
    }
}

fn concurrent_threads(target: &Arc<Target>, tally: &mut Tally) {
    let dir = tempfile::tempdir().unwrap();
    let barrier = Arc::new(Barrier::new(3));
    let handles: Vec<_> = (0..3)
        .map(|_| {
            let (target, barrier) = (Arc::clone(target), Arc::clone(&barrier));
            let dir = dir.path().to_path_buf();
            std::thread::spawn(move || {
                let library = SetLibrary::open(Some(&dir)).unwrap();
                barrier.wait();
                match target.obtain(&library) {
                    Obtained::Built { built, .. } => (true, built.set.len()),
                    Obtained::Reused(s) => (false, s.data.len()),
                    Obtained::Stopped { reason, .. } => panic!("stopped: {reason:?}"),
                }
            })
        })
        .collect();
    let results: Vec<(bool, usize)> = handles.into_iter().map(|h| h.join().unwrap()).collect();
    let built = results.iter().filter(|r| r.0).count();
    let store = Store::open(dir.path()).unwrap();
    let entries = store.list().unwrap();
    tally.record(
        "three threads building one key",
        ensure(
            built == 1 && entries.len() == 1 && results.iter().all(|r| r.1 == results[0].1),
            || format!("results {results:?}, {} entries", entries.len()),
        ),
    );
}

fn concurrent_processes(target: &Target, tally: &mut Tally) {
    let dir = tempfile::tempdir().unwrap();
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&target.model),
        "--json",
    ];
    let mut statuses: Vec<String> = run_concurrently(dir.path(), &args, 3)
        .into_iter()
        .map(|out| {
            let rows = build_rows(&out.stdout);
            rows[0]["status"].as_str().unwrap_or("").to_string()
        })
        .collect();
    statuses.sort();
    let verify = kernstep(dir.path(), &["cache", "verify"]);
    tally.record(
        "three build processes of one model",
        ensure(
            statuses == ["built", "present", "present"] && verify.status.code() == Some(0),
            || format!("statuses {statuses:?}, verify {:?}", verify.status),
        ),
    );
}

fn synthetic_key() -> EntryKey {
    EntryKey {
        row_space: "faults suite: synthetic wide entry".into(),
        kind: SetKind::Graver,
        signs: vec![Sign::Free; 12],
        truncation: Truncation::default(),
    }
}

fn synthetic_metadata(created: u64) -> SetMetadata {
    SetMetadata {
        matrix: vec![vec![1; 12]],
        rank: 1,
        delta: "1".into(),
        delta_exact: true,
        column_number: 1,
        norm_bound: None,
        method: "synthetic".into(),
        completeness: Completeness::Complete,
        build_seconds: 0.0,
        kernstep_version: "0.1.0".into(),
        created_unix: created,
        model: None,
    }
}

/// Two large versions of one entry (about a megabyte each, so writes take a while).
fn synthetic_versions() -> [TestSetData; 2] {
    let make = |rows: usize, spread: i64, seed: i64| {
        let entries = (0..rows as i64 * 12)
            .map(|i| (i * 7919 + seed * 104_729) % (2 * spread + 1) - spread)
            .collect();
        TestSetData::new(12, entries).unwrap()
    };
    [make(50_000, 30_000, 1), make(40_000, 120, 2)]
}

/// The child's role: rewrite the entry until killed (bounded, so an orphan ends by itself).
fn run_writer(dir: &str) {
    let store = Store::open(dir).unwrap();
    let sets = synthetic_versions();
    let started = Instant::now();
    let mut round = 0usize;
    while started.elapsed() < Duration::from_secs(60) {
        store
            .replace(&synthetic_key(), &sets[round % 2], &synthetic_metadata(1))
            .unwrap();
        round += 1;
    }
}

fn temp_file_present(dir: &Path) -> bool {
    std::fs::read_dir(dir)
        .unwrap()
        .filter_map(Result::ok)
        .any(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
}

/// Kills a writer while a temporary file is in place (after a first entry exists).
fn writer_killed_mid_write(attempt: usize, tally: &mut Tally) {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let entry = store.entry_path(synthetic_key().digest());
    let mut child = Command::new(env::current_exe().unwrap())
        .args(["--exact", WRITER_TEST, "--nocapture", "--test-threads=1"])
        .env(WRITER_ENV, dir.path())
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .spawn()
        .unwrap();
    let deadline = Instant::now() + Duration::from_secs(30);
    while Instant::now() < deadline && !(entry.exists() && temp_file_present(dir.path())) {
        std::thread::sleep(Duration::from_micros(200));
    }
    child.kill().unwrap();
    child.wait().unwrap();
    let killed_mid_write = temp_file_present(dir.path());
    let sets = synthetic_versions();
    let loaded = store.load(&synthetic_key()).map_err(|e| e.to_string());
    // The synthetic sets are no kernel sets, so `cache verify` (which checks content too)
    // would refuse them whatever the file; the file's integrity is what `load` checks here.
    let list = kernstep(dir.path(), &["cache", "list", "--json"]);
    let listing: serde_json::Value = serde_json::from_slice(&list.stdout).unwrap_or_default();
    let prune = kernstep(
        dir.path(),
        &["cache", "prune", "--older-than", "0s", "--json"],
    );
    let pruned: serde_json::Value = serde_json::from_slice(&prune.stdout).unwrap_or_default();
    tally.record(
        &format!("writer SIGKILLed mid-write, attempt {attempt}"),
        ensure(
            killed_mid_write
                && matches!(&loaded, Ok(Some(s)) if sets.contains(&s.data))
                && listing["entries"].as_array().is_some_and(|e| e.len() == 1)
                && listing["unreadable"].as_array().is_some_and(Vec::is_empty)
                && pruned["temp_files_removed"].as_u64() >= Some(1)
                && !temp_file_present(dir.path()),
            || {
                format!(
                    "mid-write {killed_mid_write}, load {:?}, prune {pruned}",
                    loaded.map(|s| s.is_some()),
                )
            },
        ),
    );
}

fn unusable_directory(target: &Target, tally: &mut Tally) {
    let base = tempfile::tempdir().unwrap();
    let file = base.path().join("plain_file");
    std::fs::write(&file, b"a regular file, not a directory").unwrap();
    let bad = file.join("cache");
    let bad_name = bad.display().to_string();

    let (code, status) = target.build_status(&bad);
    tally.record(
        "build into a path under a regular file",
        ensure(
            code == Some(2) && status.contains("is not usable") && status.contains(&bad_name),
            || format!("build gave {code:?}: {status}"),
        ),
    );
    let out = kernstep(&bad, &["cache", "list"]);
    let stderr = text(&out.stderr);
    tally.record(
        "cache list of a path under a regular file",
        ensure(
            out.status.code() == Some(2)
                && stderr.starts_with("kernstep: cache directory ")
                && stderr.contains("is not usable"),
            || format!("list gave {:?}: {stderr}", out.status),
        ),
    );
    work_without_the_cache(target, base.path(), &bad, tally);
}

/// Work that does not need the cache still runs beside the unusable directory `bad`: the
/// library refuses it with a typed error, the set is built without it, and `solve --build`
/// falls back to that.
fn work_without_the_cache(target: &Target, base: &Path, bad: &Path, tally: &mut Tally) {
    let refused = matches!(
        SetLibrary::open(Some(bad)),
        Err(kernstep::Error::Cache(
            cache::CacheError::DirUnusable { .. }
        ))
    );
    let reference = target.obtain(&SetLibrary::open(Some(base)).unwrap());
    let expected = match reference {
        Obtained::Built { built, .. } => built.set.to_rows(),
        other => panic!("{other:?}"),
    };
    let out_file = base.join("set.json");
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&target.model),
        "--out",
        path_str(&out_file),
    ];
    let written = kernstep(bad, &args);
    // The transport matrix is a network; `--engine moves` makes the solve use the cache.
    let solve = [
        "solve",
        path_str(&target.model),
        "--build",
        "--json",
        "--engine",
        "moves",
    ];
    let cached: serde_json::Value =
        serde_json::from_slice(&kernstep(base, &solve).stdout).unwrap_or_default();
    let fallback = kernstep(bad, &solve);
    let answer: serde_json::Value = serde_json::from_slice(&fallback.stdout).unwrap_or_default();
    tally.record(
        "solve --build with an unusable directory",
        ensure(
            fallback.status.code() == Some(0)
                && answer["status"]["tag"] == "optimal"
                && answer["objective"] == cached["objective"]
                && text(&fallback.stderr).contains("building without the cache"),
            || {
                format!(
                    "solve gave {:?}: {}",
                    fallback.status,
                    text(&fallback.stderr)
                )
            },
        ),
    );
    tally.record(
        "uncached build beside an unusable directory",
        ensure(
            refused && target.uncached() == expected && written.status.code() == Some(0),
            || format!("refused {refused}, --out gave {:?}", written.status),
        ),
    );
}

#[test]
fn truncated_and_padded_entries_are_refused_and_rebuilt() {
    let mut tally = Tally::new();
    truncations_and_padding(&Fixture::new(), &mut tally);
    tally.require("truncated and padded entries", 14);
}

#[test]
fn bit_flipped_entries_are_refused_and_rebuilt() {
    let mut tally = Tally::new();
    byte_flips(&Fixture::new(), &mut tally);
    tally.require("bit flips", 40);
}

#[test]
fn foreign_versions_and_renamed_entries_are_refused() {
    let mut tally = Tally::new();
    foreign_version_and_renamed(&Fixture::new(), &mut tally);
    tally.require("foreign version and renamed entries", 5);
}

#[test]
fn damaged_and_foreign_checkpoints_are_handled() {
    let mut tally = Tally::new();
    checkpoints(&Fixture::new(), &mut tally);
    tally.require("checkpoints", 3);
}

/// The 4 x 6 transportation model: its Graver basis takes a noticeable moment to build.
fn wide_model(dir: &Path) -> Target {
    Target::new(transport_model(dir, 4, 6))
}

#[test]
fn builders_in_threads_store_one_entry() {
    let models = tempfile::tempdir().unwrap();
    let mut tally = Tally::new();
    concurrent_threads(&Arc::new(wide_model(models.path())), &mut tally);
    tally.require("concurrent threads", 1);
}

#[test]
fn builders_in_processes_store_one_entry() {
    let models = tempfile::tempdir().unwrap();
    let mut tally = Tally::new();
    concurrent_processes(&wide_model(models.path()), &mut tally);
    tally.require("concurrent processes", 1);
}

#[test]
fn a_writer_killed_mid_write_leaves_a_whole_entry() {
    if let Ok(dir) = env::var(WRITER_ENV) {
        run_writer(&dir);
        return;
    }
    let mut tally = Tally::new();
    for attempt in 0..3 {
        writer_killed_mid_write(attempt, &mut tally);
    }
    tally.require("writers killed mid-write", 3);
}

#[test]
fn an_unusable_cache_directory_is_reported() {
    let mut tally = Tally::new();
    unusable_directory(&Fixture::new().targets[0], &mut tally);
    tally.require("unusable directory", 4);
}

// Issue 21: a cache that keeps its own and cannot be fooled. Focused cases, one test each.

/// Runs the binary with a private cache, failing the test (instead of hanging it) if it has
/// not ended in 20 s.
fn bounded(cache: &Path, args: &[&str]) -> std::process::Output {
    bounded_run(cli_support::command(cache, args))
}

/// Runs `command` to its end, failing the test if it has not ended in 20 s.
fn bounded_run(mut command: Command) -> std::process::Output {
    let mut child = command
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let deadline = Instant::now() + Duration::from_secs(20);
    while child.try_wait().unwrap().is_none() {
        if Instant::now() > deadline {
            child.kill().unwrap();
            panic!("{command:?} hung");
        }
        std::thread::sleep(Duration::from_millis(10));
    }
    child.wait_with_output().unwrap()
}

/// A cache holding the complete set of `examples/transport_3x3.json`, and that model.
fn cache_with_transport() -> (tempfile::TempDir, Target) {
    let dir = tempfile::tempdir().unwrap();
    let target = Target::new(examples().join("transport_3x3.json"));
    let (code, status) = target.build_status(dir.path());
    assert_eq!((code, status.as_str()), (Some(0), "built"));
    (dir, target)
}

/// Writes the entry of `key` with `elements` (and the metadata of `like`) in a cache of its
/// own, then copies the file into `cache`: a forged entry, or one copied from another cache.
fn copy_in(cache: &Path, like: &cache::StoredSet, key: &EntryKey, elements: Vec<i64>) -> PathBuf {
    let other = tempfile::tempdir().unwrap();
    let store = Store::open(other.path()).unwrap();
    let data = TestSetData::new(key.width(), elements).unwrap();
    store.replace(key, &data, &like.metadata).unwrap();
    let to = cache.join(store.entry_path(key.digest()).file_name().unwrap());
    std::fs::copy(store.entry_path(key.digest()), &to).unwrap();
    to
}

#[test]
fn forged_entries_are_refused_with_the_file_named() {
    let (dir, target) = cache_with_transport();
    let store = Store::open(dir.path()).unwrap();
    let real = store.load(&target.key).unwrap().unwrap();
    let elements = real.data.to_elements();
    let width = real.data.width();
    let mut off_kernel = elements.clone();
    off_kernel[0] += 1;
    let mut duplicated = elements.clone();
    duplicated.extend(elements[..width].iter().map(|x| -x));
    // Dropping elements leaves a set that need not generate the kernel (the 3 x 3
    // transportation lattice has dimension 4; its first element alone cannot span it).
    let first_only = elements[..width].to_vec();
    let cases = [
        ("empty element list", Vec::new(), "do not generate"),
        (
            "element outside the kernel",
            off_kernel,
            "not in the kernel",
        ),
        ("element and its negation", duplicated, "negation"),
        ("one element of many", first_only, "do not generate"),
    ];
    let model = path_str(&target.model);
    for (name, forged, why) in cases {
        let path = copy_in(dir.path(), &real, &target.key, forged);
        let file = path.display().to_string();
        let verify = bounded(dir.path(), &["cache", "verify"]);
        let stderr = text(&verify.stderr);
        assert_eq!(verify.status.code(), Some(2), "{name}: {stderr}");
        assert!(
            stderr.contains(&file) && stderr.contains(why),
            "{name}: {stderr}"
        );
        let solve = bounded(dir.path(), &["solve", model, "--engine", "moves", "--json"]);
        let stderr = text(&solve.stderr);
        assert_eq!(solve.status.code(), Some(2), "{name}: {stderr}");
        assert!(stderr.contains(&file), "{name}: {stderr}");
        assert!(solve.stdout.is_empty(), "{name}: nothing is answered");
    }
    // A sign pattern the key forbids: a Hilbert entry (every variable >= 0) with a negative
    // entry.
    let hilbert = EntryKey {
        kind: SetKind::Hilbert,
        signs: vec![Sign::NonNegative; width],
        ..target.key.clone()
    };
    let path = copy_in(dir.path(), &real, &hilbert, elements[..width].to_vec());
    let verify = bounded(dir.path(), &["cache", "verify", &hilbert.digest().to_hex()]);
    let stderr = text(&verify.stderr);
    assert_eq!(verify.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains(&path.display().to_string()) && stderr.contains("violates"),
        "{stderr}"
    );
}

#[test]
fn an_entry_copied_from_another_cache_is_verified_then_served_and_sealed() {
    let (dir, target) = cache_with_transport();
    let store = Store::open(dir.path()).unwrap();
    let real = store.load(&target.key).unwrap().unwrap();
    copy_in(dir.path(), &real, &target.key, real.data.to_elements());
    assert_eq!(
        store.load(&target.key).unwrap().unwrap().provenance,
        cache::Provenance::Foreign
    );
    let verify = bounded(dir.path(), &["cache", "verify", "--json"]);
    assert_eq!(verify.status.code(), Some(0), "{}", text(&verify.stderr));
    let checked: serde_json::Value = serde_json::from_slice(&verify.stdout).unwrap();
    assert_eq!(checked["entries"][0]["foreign"], true, "{checked}");
    let model = path_str(&target.model);
    let solve = bounded(dir.path(), &["solve", model, "--engine", "moves", "--json"]);
    assert_eq!(solve.status.code(), Some(0), "{}", text(&solve.stderr));
    let loaded = store.load(&target.key).unwrap().unwrap();
    assert_eq!(loaded.provenance, cache::Provenance::Sealed);
    assert_eq!(loaded.data, real.data);
}

#[test]
fn a_foreign_directory_is_never_pruned() {
    let dir = tempfile::tempdir().unwrap();
    let notes = dir.path().join("notes.txt");
    std::fs::write(&notes, "field notes").unwrap();
    let draft = dir.path().join(".draft.tmp");
    std::fs::write(&draft, "draft").unwrap();
    let out = bounded(dir.path(), &["cache", "prune", "--older-than", "0s"]);
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("not a kernstep cache directory") && stderr.contains("notes.txt"),
        "{stderr}"
    );
    assert!(notes.exists() && draft.exists());
    assert!(!dir.path().join(cache::MARKER_NAME).exists());
}

#[test]
fn prune_racing_a_build_removes_none_of_its_files() {
    let models = tempfile::tempdir().unwrap();
    let model = transport_model(models.path(), 4, 6);
    let cache = tempfile::tempdir().unwrap();
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&model),
        "--checkpoint-every",
        "0.01s",
        "--json",
    ];
    let mut build = cli_support::command(cache.path(), &args)
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut busy = 0;
    let mut prunes = 0;
    while build.try_wait().unwrap().is_none() {
        let out = kernstep(
            cache.path(),
            &["cache", "prune", "--older-than", "0s", "--json"],
        );
        assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
        let report: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        prunes += 1;
        busy += usize::from(report["busy"].as_array().is_some_and(|b| !b.is_empty()));
    }
    let out = build.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let rows = build_rows(&out.stdout);
    assert_eq!(rows[0]["status"], "built", "{rows}");
    eprintln!("{prunes} prunes ran during the build, {busy} found its files busy");
    // The race really happened: some prune found the build's files and left them alone.
    assert!(busy >= 1, "no prune overlapped the build ({prunes} ran)");
    let verify = kernstep(cache.path(), &["cache", "verify"]);
    assert_eq!(verify.status.code(), Some(0), "{}", text(&verify.stderr));
}

/// The library's saved state of an interrupted build of `target` in `dir`: a build stopped
/// by a time limit right after its first save.
fn stopped_build(dir: &Path, target: &Target) -> kernstep::completion::Checkpoint {
    let library = SetLibrary::open(Some(dir))
        .unwrap()
        .checkpoint_every(Duration::ZERO);
    let analysis = MatrixAnalysis::of(&target.parsed.matrix, &AnalysisOptions::new());
    let control = Control::new().time_limit(Duration::from_nanos(1));
    let outcome = library
        .obtain(
            &target.parsed.matrix,
            &analysis,
            &target.spec,
            &control,
            false,
        )
        .unwrap();
    assert!(
        matches!(outcome, Obtained::Stopped { kept: Some(_), .. }),
        "{outcome:?}"
    );
    library
        .resume_point(&target.parsed.matrix, &target.spec)
        .unwrap()
        .expect("a checkpoint was saved")
}

/// Replaces the state inside the checkpoint of `target` by `state`, keeping the rest of the
/// payload (layout tag, request, work time) and writing a container with a valid checksum.
fn rewrite_state(
    store: &Store,
    target: &Target,
    old: &kernstep::completion::Checkpoint,
    state: &kernstep::completion::Checkpoint,
) {
    let encode = |c| bincode::serde::encode_to_vec(c, bincode::config::standard()).unwrap();
    let (old, new) = (encode(old), encode(state));
    let bytes = std::fs::read(store.checkpoint_path(target.key.digest())).unwrap();
    // The container: a 36-byte head and an 8-byte checksum around the payload.
    let payload = &bytes[36..bytes.len() - 8];
    let at = payload
        .windows(old.len())
        .position(|w| w == old.as_slice())
        .expect("the state is in the payload");
    let mut forged = payload[..at].to_vec();
    forged.extend_from_slice(&new);
    forged.extend_from_slice(&payload[at + old.len()..]);
    store.save_checkpoint(&target.key, &forged).unwrap();
}

#[test]
fn a_checkpoint_with_a_valid_checksum_and_invalid_content_is_set_aside() {
    let models = tempfile::tempdir().unwrap();
    let target = Target::new(transport_model(models.path(), 3, 4));
    let expected = target.uncached();
    type Forge = fn(&mut kernstep::completion::Checkpoint);
    let cases: [(&str, Forge); 2] = [
        ("an element outside the kernel", |c| {
            let mut rows = c.elements.to_rows();
            rows[0][0] += 1;
            c.elements = kernstep::completion::PackedRows::from_rows(&rows).unwrap();
        }),
        ("a component lifted twice", |c| c.lifted.push(c.lifted[0])),
    ];
    for (name, forge) in cases {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::open(dir.path()).unwrap();
        let state = stopped_build(dir.path(), &target);
        let mut bad = state.clone();
        forge(&mut bad);
        rewrite_state(&store, &target, &state, &bad);
        let checkpoint = store.checkpoint_path(target.key.digest());
        let (code, status) = {
            let out = bounded(
                dir.path(),
                &[
                    "build",
                    "--engine",
                    "moves",
                    path_str(&target.model),
                    "--json",
                ],
            );
            let stderr = text(&out.stderr);
            assert!(
                stderr.contains(&checkpoint.display().to_string())
                    && stderr.contains("moved it to")
                    && stderr.contains(".kckpt.bad"),
                "{name}: {stderr}"
            );
            let rows = build_rows(&out.stdout);
            (
                out.status.code(),
                rows[0]["status"].as_str().unwrap().to_string(),
            )
        };
        assert_eq!((code, status.as_str()), (Some(0), "built"), "{name}");
        assert!(!checkpoint.exists(), "{name}");
        assert!(store.set_aside_path(target.key.digest()).exists(), "{name}");
        let built = store.load(&target.key).unwrap().unwrap();
        assert_eq!(built.data.rows().collect::<Vec<_>>(), expected);
        // The next build finds the entry; the set-aside file is listed until pruned.
        let listing = bounded(dir.path(), &["cache", "list", "--json"]);
        let doc: serde_json::Value = serde_json::from_slice(&listing.stdout).unwrap();
        assert_eq!(doc["checkpoints"][0]["set_aside"], true, "{doc}");
    }
}

#[test]
fn cache_list_shows_checkpoints_and_held_and_stale_locks() {
    let models = tempfile::tempdir().unwrap();
    let target = Target::new(transport_model(models.path(), 3, 4));
    let dir = tempfile::tempdir().unwrap();
    let state = stopped_build(dir.path(), &target);
    let store = Store::open(dir.path()).unwrap();
    let list = || -> serde_json::Value {
        let out = bounded(dir.path(), &["cache", "list", "--json"]);
        assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
        serde_json::from_slice(&out.stdout).unwrap()
    };
    let held = {
        let _guard = store.lock_for_build(&target.key).unwrap();
        list()
    };
    let hex = target.hex();
    let checkpoint = &held["checkpoints"][0];
    assert_eq!(checkpoint["digest"], hex.as_str(), "{held}");
    assert_eq!(checkpoint["held"], true, "{held}");
    assert_eq!(checkpoint["set_aside"], false, "{held}");
    assert_eq!(checkpoint["moves"], state.elements.len(), "{held}");
    assert_eq!(checkpoint["lifted"], state.lifted.len(), "{held}");
    assert_eq!(checkpoint["components"], 12, "{held}");
    assert_eq!(held["locks"][0]["held"], true, "{held}");
    assert!(
        list()["locks"].as_array().unwrap().is_empty(),
        "released, its file went"
    );
    // What a builder killed with SIGKILL leaves: its lock file, held by nobody.
    std::fs::write(store.lock_path(target.key.digest()), b"").unwrap();
    let stale = list();
    assert_eq!(stale["locks"][0]["digest"], hex.as_str(), "{stale}");
    assert_eq!(stale["locks"][0]["held"], false, "{stale}");
    let table = text(&bounded(dir.path(), &["cache", "list"]).stdout);
    assert!(
        table.contains("checkpoints") && table.contains("stopped"),
        "{table}"
    );
    assert!(
        table.contains("locks") && table.contains("stale"),
        "{table}"
    );
    // Old and unlocked: prune takes the checkpoint and the lock.
    let pruned = bounded(
        dir.path(),
        &["cache", "prune", "--older-than", "0s", "--json"],
    );
    let report: serde_json::Value = serde_json::from_slice(&pruned.stdout).unwrap();
    assert_eq!(report["checkpoints_removed"][0], hex.as_str(), "{report}");
    assert_eq!(report["locks_removed"], 1, "{report}");
    let after = list();
    assert!(
        after["checkpoints"].as_array().unwrap().is_empty(),
        "{after}"
    );
    assert!(after["locks"].as_array().unwrap().is_empty(), "{after}");
}

#[cfg(unix)]
#[test]
fn a_fifo_or_a_link_to_dev_zero_is_refused_as_model_and_as_entry() {
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("plan.json");
    let status = Command::new("mkfifo").arg(&fifo).status().unwrap();
    assert!(status.success());
    let zero = dir.path().join("zero.json");
    std::os::unix::fs::symlink("/dev/zero", &zero).unwrap();
    let cache = tempfile::tempdir().unwrap();
    for (path, found) in [(&fifo, "a FIFO"), (&zero, "a device")] {
        let mut analyze = Command::new(env!("CARGO_BIN_EXE_kernstep"));
        analyze.args(["analyze", path_str(path)]);
        let out = bounded_run(analyze);
        let stderr = text(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{stderr}");
        assert!(
            stderr.contains(&path.display().to_string()) && stderr.contains(found),
            "{stderr}"
        );
    }
    // As the cache entry of the model a solve looks up.
    let target = Target::new(examples().join("transport_3x3.json"));
    let model = path_str(&target.model);
    for make in ["fifo", "zero"] {
        let store = Store::open(cache.path()).unwrap();
        let entry = store.entry_path(target.key.digest());
        let _ = std::fs::remove_file(&entry);
        if make == "fifo" {
            assert!(Command::new("mkfifo")
                .arg(&entry)
                .status()
                .unwrap()
                .success());
        } else {
            std::os::unix::fs::symlink("/dev/zero", &entry).unwrap();
        }
        let verify = bounded(cache.path(), &["cache", "verify"]);
        let stderr = text(&verify.stderr);
        assert_eq!(verify.status.code(), Some(2), "{make}: {stderr}");
        assert!(stderr.contains("not a regular file"), "{make}: {stderr}");
        let solve = bounded(cache.path(), &["solve", model, "--engine", "moves"]);
        assert_eq!(
            solve.status.code(),
            Some(2),
            "{make}: {}",
            text(&solve.stderr)
        );
        let list = bounded(cache.path(), &["cache", "list"]);
        assert_eq!(list.status.code(), Some(0), "{make}");
    }
}

/// Issue 21: a build that has to wait for another build of its set says so on stderr, naming
/// that build's process and start time; it goes on when the lock is released (and then
/// builds, the holder having stored nothing), and Ctrl-C ends the wait with exit 130, nothing
/// kept and no entry written.
#[test]
fn a_build_waiting_for_a_lock_names_its_holder() {
    use std::io::BufRead;
    let models = tempfile::tempdir().unwrap();
    let target = Target::new(transport_model(models.path(), 3, 4));
    let args = [
        "build",
        "--engine",
        "moves",
        path_str(&target.model),
        "--progress",
        "none",
        "--json",
    ];
    for signal in [None, Some("-INT")] {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::open(dir.path()).unwrap();
        let guard = store.lock_for_build(&target.key).unwrap();
        let mut child = cli_support::command(dir.path(), &args)
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        let mut stderr = std::io::BufReader::new(child.stderr.take().unwrap());
        let mut line = String::new();
        stderr.read_line(&mut line).unwrap();
        let holder = format!(
            "kernstep: waiting for another build of this set (process {}, started ",
            std::process::id()
        );
        assert!(line.starts_with(&holder), "{line}");
        match signal {
            None => drop(guard),
            Some(signal) => {
                let sent = Command::new("kill")
                    .args([signal, &child.id().to_string()])
                    .status()
                    .unwrap();
                assert!(sent.success());
            }
        }
        let out = child.wait_with_output().unwrap();
        let rows = build_rows(&out.stdout);
        if signal.is_none() {
            assert_eq!(out.status.code(), Some(0), "{rows}");
            assert_eq!(rows[0]["status"], "built", "{rows}");
        } else {
            assert_eq!(out.status.code(), Some(130), "{rows}");
            assert_eq!(
                rows[0]["status"], "stopped: interrupted; nothing kept",
                "{rows}"
            );
            assert!(store.list().unwrap().is_empty(), "no entry written");
        }
    }
}
