//! Store/load round trips, width classes, listing, prefixes, export, covering, pruning.

mod fixtures;
#[path = "../../tests/proptest_cases/mod.rs"]
mod proptest_cases;

use proptest_cases::Class;

use std::time::Duration;

use cache::{
    BuildGuard, CacheError, CheckpointState, ElementEncoding, EntryKey, Store, TestSetData,
    Truncation,
};
use fixtures::{key, metadata, transport_like, uniform};
use proptest::prelude::*;

fn store() -> (tempfile::TempDir, Store) {
    let dir = tempfile::tempdir().expect("temporary directory");
    let store = Store::open(dir.path().join("cache")).expect("open store");
    (dir, store)
}

#[test]
fn every_width_class_round_trips_exactly() {
    let (_dir, store) = store();
    let cases = [
        (1, ElementEncoding::Trit),
        (100, ElementEncoding::I8),
        (30_000, ElementEncoding::I16),
        (2_000_000_000, ElementEncoding::I32),
        (i64::MAX, ElementEncoding::I64),
    ];
    for (i, (magnitude, encoding)) in cases.into_iter().enumerate() {
        let k = key(&format!("class {i}"), 7, Truncation::default());
        let data = uniform(41, 7, magnitude, i as u64);
        let meta = metadata(1_700_000_000 + i as u64);
        let summary = store.insert(&k, &data, &meta).unwrap();
        assert_eq!(summary.encoding, encoding);
        let loaded = store.load(&k).unwrap().expect("stored");
        assert_eq!(loaded.data, data);
        assert_eq!(loaded.metadata, meta);
        assert_eq!(loaded.key, k);
        assert_eq!(loaded.encoding, encoding);
        assert_eq!(loaded.summary(), summary);
    }
}

#[test]
fn extremes_of_i64_survive() {
    let (_dir, store) = store();
    let k = key("extremes", 3, Truncation::default());
    let data = TestSetData::new(3, vec![i64::MIN, i64::MAX, 0, -1, 1, 0]).unwrap();
    store.insert(&k, &data, &metadata(0)).unwrap();
    assert_eq!(store.load(&k).unwrap().unwrap().data, data);
}

#[test]
fn empty_set_round_trips() {
    let (_dir, store) = store();
    let k = key("empty", 4, Truncation::default());
    let data = TestSetData::new(4, vec![]).unwrap();
    store.insert(&k, &data, &metadata(0)).unwrap();
    let loaded = store.load(&k).unwrap().unwrap();
    assert!(loaded.data.is_empty());
    assert_eq!(loaded.data.width(), 4);
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Completion))]
    #[test]
    fn random_sets_round_trip(
        width in 1usize..9,
        rows in 0usize..20,
        magnitude in prop_oneof![Just(1i64), Just(127), Just(40_000), Just(i64::MAX)],
        seed in any::<u64>(),
    ) {
        let (_dir, store) = store();
        let k = key("prop", width, Truncation::default());
        let data = uniform(rows, width, magnitude, seed);
        store.replace(&k, &data, &metadata(seed)).unwrap();
        prop_assert_eq!(store.load(&k).unwrap().unwrap().data, data);
    }
}

#[test]
fn insert_refuses_an_existing_entry_and_replace_overwrites() {
    let (_dir, store) = store();
    let k = key("twice", 4, Truncation::default());
    let first = transport_like(10, 2, 2, 1);
    let second = uniform(3, 4, 5, 2);
    store.insert(&k, &first, &metadata(1)).unwrap();
    assert!(matches!(
        store.insert(&k, &second, &metadata(2)),
        Err(CacheError::AlreadyExists { .. })
    ));
    assert_eq!(store.load(&k).unwrap().unwrap().data, first);
    store.replace(&k, &second, &metadata(2)).unwrap();
    assert_eq!(store.load(&k).unwrap().unwrap().data, second);
}

#[test]
fn inconsistent_input_is_refused() {
    let (_dir, store) = store();
    let boxed = key(
        "boxed",
        2,
        Truncation {
            norm_limit: Some(2),
            bounds: Some(vec![1, 2]),
        },
    );
    let too_wide = TestSetData::new(3, vec![0, 0, 0]).unwrap();
    let outside_box = TestSetData::new(2, vec![2, 0]).unwrap();
    let over_norm = TestSetData::new(2, vec![1, 1, 1, -2]).unwrap();
    let mut bad_delta = metadata(0);
    bad_delta.delta = "1.5".into();
    let fine = TestSetData::new(2, vec![1, 1]).unwrap();
    for (data, meta) in [
        (&too_wide, metadata(0)),
        (&outside_box, metadata(0)),
        (&over_norm, metadata(0)),
        (&fine, bad_delta),
    ] {
        let err = store.insert(&boxed, data, &meta).unwrap_err();
        assert!(matches!(err, CacheError::InvalidInput { .. }), "{err}");
    }
    assert!(store.load(&boxed).unwrap().is_none());
    store.insert(&boxed, &fine, &metadata(0)).unwrap();
}

/// A store with 20 small entries, and their keys.
fn filled_store() -> (tempfile::TempDir, Store, Vec<EntryKey>) {
    let (dir, store) = store();
    let keys: Vec<_> = (0..20)
        .map(|i| key(&format!("grid {i}"), 6, Truncation::default()))
        .collect();
    for (i, k) in keys.iter().enumerate() {
        store
            .insert(
                k,
                &transport_like(5 + i, 2, 3, i as u64),
                &metadata(i as u64),
            )
            .unwrap();
    }
    (dir, store, keys)
}

#[test]
fn listing_agrees_with_full_loads() {
    let (_dir, store, keys) = filled_store();
    let listed: Vec<_> = store
        .list()
        .unwrap()
        .into_iter()
        .map(Result::unwrap)
        .collect();
    assert_eq!(listed.len(), 20);
    for summary in &listed {
        let k = keys.iter().find(|k| k.digest() == summary.digest).unwrap();
        let loaded = store.load(k).unwrap().unwrap();
        assert_eq!(&loaded.summary(), summary);
    }
    let checked = store.verify_all().unwrap();
    assert_eq!(checked.len(), 20);
    assert!(checked.iter().all(|v| v.outcome.is_ok()));
}

#[test]
fn digest_prefixes_resolve_or_are_reported_ambiguous() {
    let (_dir, store, keys) = filled_store();
    let target = keys[7].digest().to_hex();
    assert_eq!(store.resolve(&target[..12]).unwrap(), keys[7].digest());
    assert_eq!(
        store.resolve(&target.to_uppercase()).unwrap(),
        keys[7].digest()
    );
    // With 20 digests, some one-character prefix is shared by at least two of them
    // (pigeonhole over 16 hex digits).
    let ambiguous = (0..16)
        .map(|d| format!("{d:x}"))
        .find(|p| {
            keys.iter()
                .filter(|k| k.digest().to_hex().starts_with(p))
                .count()
                > 1
        })
        .unwrap();
    assert!(matches!(
        store.resolve(&ambiguous),
        Err(CacheError::AmbiguousPrefix { matches, .. }) if matches.len() > 1
    ));
    assert!(matches!(
        store.resolve("xyz"),
        Err(CacheError::BadDigestText { .. })
    ));
    assert!(matches!(
        store.resolve(""),
        Err(CacheError::BadDigestText { .. })
    ));
}

#[test]
fn export_survives_json_and_remove_deletes() {
    let (_dir, store, keys) = filled_store();
    let target = keys[7].digest().to_hex();
    let exported = store.export(&target).unwrap();
    let json = serde_json::to_string(&exported).unwrap();
    let back: cache::ExportedEntry = serde_json::from_str(&json).unwrap();
    assert_eq!(back, exported);
    assert_eq!(exported.elements.len(), 12);
    assert!(json.contains(&format!("\"{target}\"")));
    assert_eq!(store.remove(&target[..10]).unwrap(), keys[7].digest());
    assert!(store.load(&keys[7]).unwrap().is_none());
    assert!(matches!(
        store.resolve(&target),
        Err(CacheError::NotFound { .. })
    ));
    assert_eq!(store.list().unwrap().len(), 19);
}

#[test]
fn covering_entry_is_found_for_a_smaller_box() {
    let (_dir, store) = store();
    let trunc = |bounds: Vec<u64>| Truncation {
        norm_limit: None,
        bounds: Some(bounds),
    };
    let wide = key("lanes", 4, trunc(vec![3, 3, 3, 3]));
    let wider = key("lanes", 4, trunc(vec![9, 9, 9, 9]));
    let narrow_other = key("lanes", 4, trunc(vec![1, 1, 1, 1]));
    store
        .insert(&wide, &transport_like(5, 2, 2, 1), &metadata(1))
        .unwrap();
    store
        .insert(&wider, &transport_like(9, 2, 2, 2), &metadata(2))
        .unwrap();
    store
        .insert(&narrow_other, &transport_like(2, 2, 2, 3), &metadata(3))
        .unwrap();
    let wanted = key("lanes", 4, trunc(vec![2, 3, 1, 0]));
    let hit = store.find_covering(&wanted).unwrap();
    assert!(hit.damaged.is_empty());
    // Both boxes 3 and 9 cover; the smaller set (5 vectors) is preferred.
    assert_eq!(hit.found.unwrap().key, wide);
    let too_big = key("lanes", 4, trunc(vec![4, 0, 0, 9]));
    assert_eq!(
        store.find_covering(&too_big).unwrap().found.unwrap().key,
        wider
    );
    let untruncated = key("lanes", 4, Truncation::default());
    assert!(store.find_covering(&untruncated).unwrap().found.is_none());
    let other_rows = key("depots", 4, trunc(vec![0, 0, 0, 0]));
    assert!(store.find_covering(&other_rows).unwrap().found.is_none());
}

#[test]
fn the_largest_covering_entry_is_the_widest_norm_truncation() {
    let (_dir, store) = store();
    let norm = |limit: u64| Truncation {
        norm_limit: Some(limit),
        bounds: None,
    };
    for (limit, count, seed) in [(4, 5, 1), (8, 9, 2), (6, 2, 3)] {
        store
            .insert(
                &key("lanes", 4, norm(limit)),
                &transport_like(count, 2, 2, seed),
                &metadata(seed),
            )
            .unwrap();
    }
    let any = key("lanes", 4, norm(1));
    assert_eq!(
        store
            .find_largest_covering(&any)
            .unwrap()
            .found
            .unwrap()
            .key,
        key("lanes", 4, norm(8))
    );
    assert_eq!(
        store.find_covering(&any).unwrap().found.unwrap().key,
        key("lanes", 4, norm(6))
    );
    let above = key("lanes", 4, norm(9));
    assert!(store.find_largest_covering(&above).unwrap().found.is_none());
}

#[test]
fn prune_removes_old_entries_only() {
    let (_dir, store) = store();
    let now = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .unwrap()
        .as_secs();
    let old = key("old", 4, Truncation::default());
    let fresh = key("fresh", 4, Truncation::default());
    store
        .insert(
            &old,
            &transport_like(3, 2, 2, 1),
            &metadata(now - 10 * 86_400),
        )
        .unwrap();
    store
        .insert(&fresh, &transport_like(3, 2, 2, 2), &metadata(now))
        .unwrap();
    let report = store.prune(Duration::from_secs(86_400)).unwrap();
    assert_eq!(report.removed, vec![old.digest()]);
    assert!(store.load(&old).unwrap().is_none());
    assert!(store.load(&fresh).unwrap().is_some());
}

#[test]
fn build_guard_hands_back_a_ready_entry_and_rebuild_replaces_it() {
    let (_dir, store) = store();
    let k = key("guarded", 4, Truncation::default());
    let first = transport_like(4, 2, 2, 1);
    let BuildGuard::Build(lock) = store.lock_for_build(&k).unwrap() else {
        panic!("empty store must ask for a build");
    };
    assert!(lock.damaged_entry().is_none());
    lock.commit(&first, &metadata(1)).unwrap();
    let BuildGuard::Ready(set) = store.lock_for_build(&k).unwrap() else {
        panic!("stored entry must be handed back");
    };
    assert_eq!(set.data, first);
    let second = uniform(2, 4, 3, 9);
    store
        .lock_for_rebuild(&k)
        .unwrap()
        .commit(&second, &metadata(2))
        .unwrap();
    assert_eq!(store.load(&k).unwrap().unwrap().data, second);
}

#[test]
fn checkpoints_round_trip_and_are_removed() {
    let (_dir, store) = store();
    let k = key("resumable", 4, Truncation::default());
    assert!(matches!(
        store.load_checkpoint(&k).unwrap(),
        CheckpointState::Missing
    ));
    let state: Vec<u8> = (0..=255u8).cycle().take(5000).collect();
    store.save_checkpoint(&k, &state).unwrap();
    match store.load_checkpoint(&k).unwrap() {
        CheckpointState::Present(bytes) => assert_eq!(bytes, state),
        other => panic!("expected the saved state, got {other:?}"),
    }
    store.save_checkpoint(&k, b"later").unwrap();
    assert!(
        matches!(store.load_checkpoint(&k).unwrap(), CheckpointState::Present(b) if b == b"later")
    );
    // A payload written in place: its length is taken from what was written, not from the
    // size hint.
    for hint in [0, 3, 10_000] {
        store
            .save_checkpoint_with(&k, hint, |out| out.extend_from_slice(&state[..777]))
            .unwrap();
        assert!(matches!(store.load_checkpoint(&k).unwrap(),
            CheckpointState::Present(b) if b == state[..777]));
    }
    assert!(store.remove_checkpoint(&k).unwrap());
    assert!(!store.remove_checkpoint(&k).unwrap());
    assert!(matches!(
        store.load_checkpoint(&k).unwrap(),
        CheckpointState::Missing
    ));
}
