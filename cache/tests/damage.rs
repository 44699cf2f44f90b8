//! Damaged, truncated, foreign-version and renamed files are detected with typed errors,
//! every time, and never handed back.

mod fixtures;

use std::fs;
use std::path::Path;

use cache::{BuildGuard, CacheError, CheckpointState, EntryKey, Store, TestSetData, Truncation};
use fixtures::{key, metadata, transport_like, uniform};

struct Tally {
    tried: usize,
    detected: usize,
}

impl Tally {
    fn new() -> Self {
        Tally {
            tried: 0,
            detected: 0,
        }
    }

    /// Writes `bytes` as the entry of `k` and records whether loading it is refused with a
    /// damage error that names the file.
    fn check(&mut self, store: &Store, k: &EntryKey, bytes: &[u8]) {
        let path = store.entry_path(k.digest());
        fs::write(&path, bytes).unwrap();
        self.tried += 1;
        match store.load(k) {
            Err(e) if e.is_damage() && e.to_string().contains(&*path.to_string_lossy()) => {
                self.detected += 1;
            }
            other => eprintln!("undetected damage: {other:?}"),
        }
    }

    fn assert_all(&self, what: &str) {
        eprintln!("{what}: {} of {} cases detected", self.detected, self.tried);
        assert!(self.tried > 0);
        assert_eq!(self.detected, self.tried, "{what}");
    }
}

fn stored(store: &Store, k: &EntryKey, data: &TestSetData) -> Vec<u8> {
    store.replace(k, data, &metadata(1_700_000_000)).unwrap();
    fs::read(store.entry_path(k.digest())).unwrap()
}

fn new_store() -> (tempfile::TempDir, Store) {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    (dir, store)
}

#[test]
fn truncation_at_every_offset_is_detected() {
    let (_dir, store) = new_store();
    let k = key("small grid", 6, Truncation::default());
    let good = stored(&store, &k, &transport_like(9, 2, 3, 4));
    let mut tally = Tally::new();
    for len in 0..good.len() {
        tally.check(&store, &k, &good[..len]);
    }
    let mut padded = good.clone();
    padded.push(0);
    tally.check(&store, &k, &padded);
    tally.assert_all("truncation, small file");
}

#[test]
fn truncation_of_a_larger_file_is_detected() {
    let (_dir, store) = new_store();
    let k = key("wide grid", 25, Truncation::default());
    let good = stored(&store, &k, &uniform(400, 25, 300, 8));
    let mut tally = Tally::new();
    for len in (0..good.len())
        .step_by(97)
        .chain(good.len() - 9..good.len())
    {
        tally.check(&store, &k, &good[..len]);
    }
    tally.assert_all("truncation, large file");
}

#[test]
fn single_byte_flips_at_every_position_are_detected() {
    let (_dir, store) = new_store();
    let k = key("small grid", 6, Truncation::default());
    let good = stored(&store, &k, &transport_like(9, 2, 3, 5));
    let mut tally = Tally::new();
    for pos in 0..good.len() {
        for mask in [0x01u8, 0x80, 0xff] {
            let mut bad = good.clone();
            bad[pos] ^= mask;
            tally.check(&store, &k, &bad);
        }
    }
    tally.assert_all("byte flips");
    fs::write(store.entry_path(k.digest()), &good).unwrap();
    assert!(
        store.load(&k).unwrap().is_some(),
        "the undamaged file loads"
    );
}

#[test]
fn every_encoding_detects_payload_flips() {
    let (_dir, store) = new_store();
    let mut tally = Tally::new();
    for (i, magnitude) in [1, 100, 30_000, 2_000_000_000, i64::MAX]
        .into_iter()
        .enumerate()
    {
        let k = key(&format!("class {i}"), 5, Truncation::default());
        let good = stored(&store, &k, &uniform(30, 5, magnitude, i as u64));
        for pos in (0..good.len()).step_by(3) {
            let mut bad = good.clone();
            bad[pos] = bad[pos].wrapping_add(1);
            tally.check(&store, &k, &bad);
        }
    }
    tally.assert_all("payload flips, every encoding");
}

#[test]
fn other_version_is_reported_as_such() {
    let (_dir, store) = new_store();
    let k = key("versioned", 4, Truncation::default());
    let good = stored(&store, &k, &transport_like(3, 2, 2, 1));
    // 1 is the unsealed layout before version 2; 2 and 3 are read.
    for version in [0u16, 1, 4, 0x0100, u16::MAX] {
        let mut bad = good.clone();
        bad[8..10].copy_from_slice(&version.to_le_bytes());
        fs::write(store.entry_path(k.digest()), &bad).unwrap();
        match store.load(&k) {
            Err(CacheError::UnsupportedVersion {
                found,
                supported: 3,
                ..
            }) => {
                assert_eq!(found, version)
            }
            other => panic!("version {version}: {other:?}"),
        }
    }
}

#[test]
fn a_file_renamed_to_another_keys_name_is_refused() {
    let (_dir, store) = new_store();
    let a = key("plant A", 4, Truncation::default());
    let b = key("plant B", 4, Truncation::default());
    let bytes_a = stored(&store, &a, &transport_like(3, 2, 2, 1));
    stored(&store, &b, &transport_like(3, 2, 2, 2));
    fs::rename(store.entry_path(a.digest()), store.entry_path(b.digest())).unwrap();
    let err = store.load(&b).unwrap_err();
    assert!(matches!(err, CacheError::KeyMismatch { .. }), "{err}");
    let err = store.load_digest(&b.digest().to_hex()).unwrap_err();
    assert!(matches!(err, CacheError::KeyMismatch { .. }), "{err}");
    assert!(store.load(&a).unwrap().is_none());
    // A copy under a name that is no key's digest at all is refused the same way.
    let stray = store.dir().join(format!("{}.kset", "0".repeat(32)));
    fs::write(&stray, &bytes_a).unwrap();
    let err = store.verify("0000").unwrap_err();
    assert!(matches!(err, CacheError::KeyMismatch { .. }), "{err}");
}

#[test]
fn foreign_files_are_refused() {
    let (_dir, store) = new_store();
    let k = key("foreign", 4, Truncation::default());
    for bytes in [
        &b"not a cache file at all, just text"[..],
        &[0x89, b'P', b'N', b'G'],
    ] {
        fs::write(store.entry_path(k.digest()), bytes).unwrap();
        assert!(matches!(store.load(&k), Err(CacheError::BadMagic { .. })));
    }
}

#[test]
fn verify_all_and_list_report_damage_and_builders_rebuild() {
    let (_dir, store) = new_store();
    let good = key("kept", 4, Truncation::default());
    let bad = key("broken", 4, Truncation::default());
    stored(&store, &good, &transport_like(3, 2, 2, 1));
    let mut bytes = stored(&store, &bad, &transport_like(3, 2, 2, 2));
    let last = bytes.len() - 20;
    bytes[last] ^= 0x10;
    fs::write(store.entry_path(bad.digest()), &bytes).unwrap();
    let checked = store.verify_all().unwrap();
    let outcome = |k: &EntryKey| {
        &checked
            .iter()
            .find(|v| v.digest == k.digest())
            .unwrap()
            .outcome
    };
    assert!(outcome(&good).is_ok());
    assert!(matches!(
        outcome(&bad),
        Err(CacheError::ChecksumMismatch { .. })
    ));
    match store.lock_for_build(&bad).unwrap() {
        BuildGuard::Build(lock) => {
            assert!(lock.damaged_entry().is_some_and(CacheError::is_damage));
            lock.commit(&transport_like(3, 2, 2, 2), &metadata(5))
                .unwrap();
        }
        BuildGuard::Ready(_) => panic!("a damaged entry must never be handed back"),
    }
    assert!(store
        .verify_all()
        .unwrap()
        .iter()
        .all(|v| v.outcome.is_ok()));
    fs::write(store.entry_path(bad.digest()), &bytes[..40]).unwrap();
    let listed = store.list().unwrap();
    assert_eq!(listed.iter().filter(|r| r.is_err()).count(), 1);
}

#[test]
fn covering_lookup_skips_damaged_candidates() {
    let (_dir, store) = new_store();
    let trunc = |b: u64| Truncation {
        norm_limit: None,
        bounds: Some(vec![b; 4]),
    };
    let small = key("lanes", 4, trunc(2));
    let large = key("lanes", 4, trunc(5));
    let mut bytes = stored(&store, &small, &transport_like(2, 2, 2, 1));
    stored(&store, &large, &transport_like(6, 2, 2, 2));
    let at = bytes.len() - 9;
    bytes[at] ^= 1;
    fs::write(store.entry_path(small.digest()), &bytes).unwrap();
    let hit = store.find_covering(&key("lanes", 4, trunc(1))).unwrap();
    assert_eq!(hit.found.unwrap().key, large);
    assert_eq!(hit.damaged.len(), 1);
}

fn checkpoint_bytes(store: &Store, k: &EntryKey) -> Vec<u8> {
    fs::read(store.checkpoint_path(k.digest())).unwrap()
}

fn checkpoint_damage_detected(store: &Store, k: &EntryKey, bytes: &[u8], path: &Path) -> bool {
    fs::write(path, bytes).unwrap();
    matches!(store.load_checkpoint(k).unwrap(), CheckpointState::Damaged(e) if e.is_damage())
}

#[test]
fn damaged_checkpoints_are_reported_and_ignored() {
    let (_dir, store) = new_store();
    let k = key("resumable", 4, Truncation::default());
    store
        .save_checkpoint(&k, b"level 7 of 12; 4411 pairs left")
        .unwrap();
    let good = checkpoint_bytes(&store, &k);
    let path = store.checkpoint_path(k.digest());
    let (mut tried, mut detected) = (0, 0);
    for len in 0..good.len() {
        tried += 1;
        detected += usize::from(checkpoint_damage_detected(&store, &k, &good[..len], &path));
    }
    for pos in 0..good.len() {
        let mut bad = good.clone();
        bad[pos] ^= 0x04;
        tried += 1;
        detected += usize::from(checkpoint_damage_detected(&store, &k, &bad, &path));
    }
    let other = key("other", 4, Truncation::default());
    tried += 1;
    detected += usize::from(checkpoint_damage_detected(
        &store,
        &other,
        &good,
        &store.checkpoint_path(other.digest()),
    ));
    eprintln!("checkpoint damage: {detected} of {tried} cases detected");
    assert_eq!(detected, tried);
}
