//! Unusable directories give a clear typed error, so the caller can solve without caching.
#![cfg(unix)]

use std::fs;
use std::os::unix::fs::PermissionsExt;

use cache::{CacheError, Store};

#[test]
fn a_path_below_a_regular_file_is_unusable() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("plain-file");
    fs::write(&file, b"x").unwrap();
    let wanted = file.join("cache");
    let err = Store::open(&wanted).unwrap_err();
    assert!(
        matches!(&err, CacheError::DirUnusable { dir, .. } if *dir == wanted),
        "{err}"
    );
    assert!(err.to_string().contains("plain-file/cache"), "{err}");
    let err = Store::open(&file).unwrap_err();
    assert!(matches!(err, CacheError::DirUnusable { .. }), "{err}");
}

#[test]
fn missing_directories_are_created() {
    let dir = tempfile::tempdir().unwrap();
    let nested = dir.path().join("a/b/c");
    let store = Store::open(&nested).unwrap();
    assert!(store.dir().is_dir());
    let names: Vec<_> = fs::read_dir(&nested)
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(
        names,
        [cache::MARKER_NAME],
        "the probe file is removed, the marker written"
    );
}

#[test]
fn a_read_only_directory_is_unusable_where_permissions_apply() {
    let dir = tempfile::tempdir().unwrap();
    let ro = dir.path().join("ro");
    fs::create_dir(&ro).unwrap();
    fs::set_permissions(&ro, fs::Permissions::from_mode(0o555)).unwrap();
    // Root (as in CI containers) ignores permission bits; the test above covers that case.
    let bits_enforced = fs::write(ro.join("probe"), b"").is_err();
    let result = Store::open(&ro);
    fs::set_permissions(&ro, fs::Permissions::from_mode(0o755)).unwrap();
    if bits_enforced {
        assert!(matches!(result, Err(CacheError::DirUnusable { .. })));
    } else {
        assert!(result.is_ok());
    }
}
