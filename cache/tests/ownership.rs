//! A cache keeps its own: the marker, maintenance only of kernstep's files in marked
//! directories, never the files of a build holding its lock, listings of checkpoints and
//! locks, seals that tell foreign entries, and reads that refuse what is not a regular file.

mod fixtures;

use std::fs;
use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant, SystemTime};

use cache::{
    BuildGuard, CacheError, CheckpointState, Provenance, Store, Truncation, MARKER_NAME,
    SECRET_NAME,
};
use fixtures::{key, metadata, transport_like};

fn names(dir: &Path) -> Vec<String> {
    let mut names: Vec<String> = fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    names
}

/// Sets a file's modification time an hour and a day back.
fn age(path: &Path) {
    let old = SystemTime::now() - Duration::from_secs(90_000);
    fs::File::options()
        .write(true)
        .open(path)
        .unwrap()
        .set_modified(old)
        .unwrap();
}

#[test]
fn a_foreign_directory_is_never_pruned_or_removed_from() {
    let dir = tempfile::tempdir().unwrap();
    let notes = dir.path().join("notes.txt");
    fs::write(&notes, "mine").unwrap();
    let stray = dir.path().join(".draft.tmp");
    fs::write(&stray, "mine too").unwrap();
    age(&stray);
    let store = Store::open(dir.path()).unwrap();
    assert!(store.is_foreign());
    let k = key("field", 4, Truncation::default());
    store
        .insert(&k, &transport_like(3, 2, 2, 1), &metadata(1))
        .unwrap();
    let before = names(dir.path());
    let err = store.prune(Duration::ZERO).unwrap_err();
    assert!(matches!(err, CacheError::ForeignDir { .. }), "{err}");
    assert!(err.to_string().contains("notes.txt"), "{err}");
    let err = store.remove(&k.digest().to_hex()).unwrap_err();
    assert!(matches!(err, CacheError::ForeignDir { .. }), "{err}");
    assert_eq!(names(dir.path()), before, "nothing removed");
    assert!(!before.contains(&MARKER_NAME.to_string()));
}

#[test]
fn a_cache_of_kernstep_files_only_gets_the_marker_on_open() {
    let dir = tempfile::tempdir().unwrap();
    let k = key("orchard", 4, Truncation::default());
    Store::open(dir.path())
        .unwrap()
        .insert(&k, &transport_like(3, 2, 2, 1), &metadata(1))
        .unwrap();
    // A cache as the version before the marker left it.
    fs::remove_file(dir.path().join(MARKER_NAME)).unwrap();
    let store = Store::open(dir.path()).unwrap();
    assert!(!store.is_foreign());
    assert!(dir.path().join(MARKER_NAME).is_file());
    assert_eq!(store.remove(&k.digest().to_hex()).unwrap(), k.digest());
}

#[test]
fn prune_leaves_every_file_of_a_build_holding_its_lock() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let k = key("busy", 4, Truncation::default());
    let BuildGuard::Build(lock) = store.lock_for_build(&k).unwrap() else {
        panic!("empty store");
    };
    store.save_checkpoint(&k, b"state").unwrap();
    let temp = dir
        .path()
        .join(format!(".{}.kset.{}-7.tmp", k.digest(), std::process::id()));
    fs::write(&temp, b"half").unwrap();
    for path in [&temp, &store.checkpoint_path(k.digest())] {
        age(path);
    }
    let before = names(dir.path());
    let report = store.prune(Duration::ZERO).unwrap();
    assert_eq!(report.busy, [k.digest()]);
    assert_eq!(names(dir.path()), before, "nothing of the build removed");
    let checkpoints = store.list_checkpoints().unwrap();
    assert_eq!(checkpoints.len(), 1);
    assert!(checkpoints[0].0.held && !checkpoints[0].1);
    let locks = store.list_locks().unwrap();
    assert!(locks.len() == 1 && locks[0].held);

    let now = SystemTime::now()
        .duration_since(SystemTime::UNIX_EPOCH)
        .unwrap()
        .as_secs();
    lock.commit(&transport_like(3, 2, 2, 1), &metadata(now))
        .unwrap();
    assert!(
        store.list_locks().unwrap().is_empty(),
        "released: its file went"
    );
    let report = store.prune(Duration::from_secs(3_600)).unwrap();
    assert_eq!(report.checkpoints_removed, [k.digest()]);
    assert_eq!(report.temp_files_removed, 1);
    assert!(report.removed.is_empty(), "the entry is new");
    assert!(store.load(&k).unwrap().is_some());
    // The lock file of a crashed builder: listed as stale, pruned once old.
    fs::write(store.lock_path(k.digest()), b"").unwrap();
    let locks = store.list_locks().unwrap();
    assert!(locks.len() == 1 && !locks[0].held);
    assert_eq!(
        store
            .prune(Duration::from_secs(3_600))
            .unwrap()
            .locks_removed,
        0
    );
    age(&store.lock_path(k.digest()));
    let report = store.prune(Duration::from_secs(3_600)).unwrap();
    assert_eq!(report.locks_removed, 1);
    assert!(store.list_locks().unwrap().is_empty());
    // The key can be locked again after its lock file went.
    assert!(matches!(
        store.lock_for_build(&k).unwrap(),
        BuildGuard::Ready(_)
    ));
}

#[test]
fn a_set_aside_checkpoint_is_listed_and_pruned() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let k = key("aside", 4, Truncation::default());
    store.save_checkpoint(&k, b"state").unwrap();
    let to = store.set_aside_checkpoint(&k).unwrap().unwrap();
    assert!(matches!(
        store.load_checkpoint(&k).unwrap(),
        CheckpointState::Missing
    ));
    assert!(
        store.list_checkpoints().unwrap()[0].1,
        "listed as set aside"
    );
    age(&to);
    let report = store.prune(Duration::from_secs(60)).unwrap();
    assert_eq!(report.set_aside_removed, 1);
    assert!(!to.exists());
}

#[test]
fn remove_takes_every_file_of_a_key_and_nothing_else() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let (a, b) = (
        key("plant a", 4, Truncation::default()),
        key("plant b", 4, Truncation::default()),
    );
    store
        .insert(&a, &transport_like(3, 2, 2, 1), &metadata(1))
        .unwrap();
    store
        .insert(&b, &transport_like(3, 2, 2, 2), &metadata(1))
        .unwrap();
    store.save_checkpoint(&a, b"state").unwrap();
    store.remove(&a.digest().to_hex()).unwrap();
    let left = names(dir.path());
    assert!(
        left.iter().all(|n| !n.contains(&a.digest().to_hex())),
        "{left:?}"
    );
    assert!(store.load(&b).unwrap().is_some());
    // A key with only a checkpoint can be removed by its digest too.
    store.save_checkpoint(&a, b"state").unwrap();
    store.remove(&a.digest().to_hex()[..8]).unwrap();
    assert!(store.list_checkpoints().unwrap().is_empty());
}

#[test]
fn an_entry_from_another_cache_is_foreign_until_resealed() {
    let (one, two) = (tempfile::tempdir().unwrap(), tempfile::tempdir().unwrap());
    let (first, second) = (
        Store::open(one.path()).unwrap(),
        Store::open(two.path()).unwrap(),
    );
    let k = key("copied", 4, Truncation::default());
    let data = transport_like(3, 2, 2, 1);
    first.insert(&k, &data, &metadata(1)).unwrap();
    assert_eq!(
        first.load(&k).unwrap().unwrap().provenance,
        Provenance::Sealed
    );
    fs::copy(first.entry_path(k.digest()), second.entry_path(k.digest())).unwrap();
    let copied = second.load(&k).unwrap().unwrap();
    assert_eq!(copied.provenance, Provenance::Foreign);
    assert_eq!(copied.data, data);
    second.reseal(&copied).unwrap();
    assert_eq!(
        second.load(&k).unwrap().unwrap().provenance,
        Provenance::Sealed
    );
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = fs::metadata(two.path().join(SECRET_NAME))
            .unwrap()
            .permissions()
            .mode();
        assert_eq!(mode & 0o777, 0o600);
    }
}

#[cfg(unix)]
#[test]
fn a_fifo_or_a_link_to_dev_zero_is_refused_at_once() {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let fifo_key = key("fifo", 4, Truncation::default());
    let zero_key = key("zero", 4, Truncation::default());
    let status = Command::new("mkfifo")
        .arg(store.entry_path(fifo_key.digest()))
        .arg(store.checkpoint_path(fifo_key.digest()))
        .status()
        .unwrap();
    assert!(status.success());
    for path in [
        store.entry_path(zero_key.digest()),
        store.checkpoint_path(zero_key.digest()),
    ] {
        std::os::unix::fs::symlink("/dev/zero", path).unwrap();
    }
    // A hang would keep this test from finishing; the time is only reported.
    let started = Instant::now();
    for (k, found) in [(&fifo_key, "a FIFO"), (&zero_key, "a device")] {
        let err = store.load(k).unwrap_err();
        assert!(
            matches!(&err, CacheError::NotRegularFile { found: f, .. } if *f == found),
            "{err}"
        );
        assert!(err.is_damage());
        match store.load_checkpoint(k).unwrap() {
            CheckpointState::Damaged(CacheError::NotRegularFile { .. }) => {}
            other => panic!("{other:?}"),
        }
    }
    assert_eq!(
        store.list().unwrap().iter().filter(|r| r.is_err()).count(),
        2
    );
    eprintln!("refused in {:?}", started.elapsed());
}
