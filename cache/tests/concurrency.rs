//! Concurrent builders, and writers killed mid-write.
//!
//! The multi-process tests re-run this test binary as a child (`--exact <test name>`) with an
//! environment variable naming its role; the same test function then plays the child.

mod fixtures;

use std::env;
use std::process::{Command, Stdio};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, Barrier};
use std::thread;
use std::time::{Duration, Instant};

use cache::{BuildGuard, EntryKey, Store, TestSetData, Truncation};
use fixtures::{key, metadata, transport_like, uniform};

const BUILDER_ENV: &str = "KERNSTEP_CACHE_TEST_BUILDER_DIR";
const WRITER_ENV: &str = "KERNSTEP_CACHE_TEST_WRITER_DIR";
const RESULT_MARK: &str = "builder-outcome:";

fn shared_key() -> EntryKey {
    key("shared depot grid", 12, Truncation::default())
}

fn built_set() -> TestSetData {
    transport_like(500, 3, 4, 77)
}

#[test]
fn threads_building_one_key_build_it_once() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let builds = Arc::new(AtomicUsize::new(0));
    let barrier = Arc::new(Barrier::new(4));
    let handles: Vec<_> = (0..4)
        .map(|_| {
            let (store, builds, barrier) = (store.clone(), builds.clone(), barrier.clone());
            thread::spawn(move || {
                barrier.wait();
                match store.lock_for_build(&shared_key()).unwrap() {
                    BuildGuard::Build(lock) => {
                        builds.fetch_add(1, Ordering::SeqCst);
                        // While this builder works, a non-waiting attempt sees it busy.
                        assert!(store.try_lock_for_build(&shared_key()).unwrap().is_none());
                        thread::sleep(Duration::from_millis(150));
                        lock.commit(&built_set(), &metadata(1)).unwrap();
                        None
                    }
                    BuildGuard::Ready(set) => Some(set.data),
                }
            })
        })
        .collect();
    let results: Vec<_> = handles.into_iter().map(|h| h.join().unwrap()).collect();
    assert_eq!(builds.load(Ordering::SeqCst), 1);
    assert_eq!(results.iter().filter(|r| r.is_none()).count(), 1);
    for data in results.into_iter().flatten() {
        assert_eq!(data, built_set());
    }
    assert_eq!(
        store.load(&shared_key()).unwrap().unwrap().data,
        built_set()
    );
    assert!(matches!(
        store.try_lock_for_build(&shared_key()).unwrap(),
        Some(BuildGuard::Ready(_))
    ));
}

fn child(test: &str, env_name: &str, dir: &std::path::Path) -> Command {
    let mut cmd = Command::new(env::current_exe().unwrap());
    cmd.args(["--exact", test, "--nocapture", "--test-threads=1"])
        .env(env_name, dir)
        .stdin(Stdio::null());
    cmd
}

fn run_builder(dir: &str) {
    let store = Store::open(dir).unwrap();
    let outcome = match store.lock_for_build(&shared_key()).unwrap() {
        BuildGuard::Build(lock) => {
            thread::sleep(Duration::from_millis(300));
            lock.commit(&built_set(), &metadata(1)).unwrap();
            "built"
        }
        BuildGuard::Ready(set) => {
            assert_eq!(set.data, built_set());
            "ready"
        }
    };
    println!("{RESULT_MARK}{outcome}");
}

#[test]
fn processes_building_one_key_build_it_once() {
    if let Ok(dir) = env::var(BUILDER_ENV) {
        run_builder(&dir);
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    let children: Vec<_> = (0..3)
        .map(|_| {
            child(
                "processes_building_one_key_build_it_once",
                BUILDER_ENV,
                dir.path(),
            )
            .stdout(Stdio::piped())
            .spawn()
            .unwrap()
        })
        .collect();
    let mut outcomes = Vec::new();
    for c in children {
        let out = c.wait_with_output().unwrap();
        assert!(out.status.success());
        let text = String::from_utf8(out.stdout).unwrap();
        outcomes.extend(
            text.lines()
                .filter_map(|l| l.split_once(RESULT_MARK))
                .map(|(_, outcome)| outcome.trim().to_owned()),
        );
    }
    outcomes.sort();
    assert_eq!(outcomes, ["built", "ready", "ready"]);
    let store = Store::open(dir.path()).unwrap();
    assert_eq!(
        store.load(&shared_key()).unwrap().unwrap().data,
        built_set()
    );
}

/// Two large versions of one entry, written alternately by the child writer.
fn versions() -> [TestSetData; 2] {
    [uniform(60_000, 12, 30_000, 1), uniform(50_000, 12, 120, 2)]
}

fn run_writer(dir: &str) {
    let store = Store::open(dir).unwrap();
    let k = shared_key();
    let sets = versions();
    let started = Instant::now();
    // Bounded so an orphaned child ends by itself.
    for round in 0.. {
        if started.elapsed() > Duration::from_secs(60) {
            break;
        }
        store
            .replace(&k, &sets[round % 2], &metadata(round as u64))
            .unwrap();
    }
}

/// Whether a temporary file of an entry is present (the secret's, written once on the first
/// store, is not what this test interrupts: prune leaves those for an hour).
fn temp_file_present(store: &Store) -> bool {
    std::fs::read_dir(store.dir())
        .unwrap()
        .filter_map(Result::ok)
        .any(|e| {
            let name = e.file_name().to_string_lossy().into_owned();
            name.ends_with(".tmp") && name.contains(".kset.")
        })
}

#[test]
fn a_writer_killed_mid_write_leaves_the_old_entry_or_none() {
    if let Ok(dir) = env::var(WRITER_ENV) {
        run_writer(&dir);
        return;
    }
    let sets = versions();
    let mut kills_during_write = 0;
    for attempt in 0..4 {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::open(dir.path()).unwrap();
        let mut writer = child(
            "a_writer_killed_mid_write_leaves_the_old_entry_or_none",
            WRITER_ENV,
            dir.path(),
        )
        .stdout(Stdio::null())
        .spawn()
        .unwrap();
        let deadline = Instant::now() + Duration::from_secs(30);
        // Let later attempts get past the first write, so an old entry exists.
        let want_entry = attempt > 0;
        while Instant::now() < deadline
            && !(temp_file_present(&store)
                && (!want_entry || store.entry_path(shared_key().digest()).exists()))
        {
            thread::sleep(Duration::from_micros(200));
        }
        writer.kill().unwrap();
        writer.wait().unwrap();
        kills_during_write += usize::from(temp_file_present(&store));
        match store.load(&shared_key()).unwrap() {
            None => assert!(!want_entry, "attempt {attempt}: the old entry vanished"),
            Some(set) => assert!(sets.contains(&set.data), "attempt {attempt}"),
        }
        let listed = store.list().unwrap();
        assert!(listed.len() <= 1 && listed.iter().all(Result::is_ok));
        store.prune(Duration::ZERO).unwrap();
        assert!(!temp_file_present(&store), "prune removes leftovers");
    }
    eprintln!("writer killed with a write in progress in {kills_during_write} of 4 attempts");
    // The kill must really have interrupted writes, or the test proves nothing.
    assert!(kills_during_write >= 1);
}

#[test]
fn a_stray_partial_temp_file_is_ignored() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let k = shared_key();
    store.insert(&k, &built_set(), &metadata(1)).unwrap();
    let whole = std::fs::read(store.entry_path(k.digest())).unwrap();
    let stray = dir.path().join(format!(".{}.kset.999-0.tmp", k.digest()));
    std::fs::write(&stray, &whole[..whole.len() / 2]).unwrap();
    assert_eq!(store.load(&k).unwrap().unwrap().data, built_set());
    assert_eq!(store.list().unwrap().len(), 1);
    assert!(store
        .verify_all()
        .unwrap()
        .iter()
        .all(|v| v.outcome.is_ok()));
}
