//! Arbitrary bytes as a stored test-set file or checkpoint in a temporary store: loading
//! gives a set or a typed error naming the file, never a panic.
#![no_main]

use std::sync::OnceLock;

use cache::{EntryKey, SetKind, Sign, Store, Truncation};
use libfuzzer_sys::fuzz_target;

struct Fixture {
    _dir: tempfile::TempDir,
    store: Store,
    key: EntryKey,
}

fn fixture() -> &'static Fixture {
    static FIXTURE: OnceLock<Fixture> = OnceLock::new();
    FIXTURE.get_or_init(|| {
        let dir = tempfile::tempdir().expect("temporary directory");
        let store = Store::open(dir.path()).expect("store");
        let key = EntryKey {
            row_space: "1 1 1".into(),
            kind: SetKind::Graver,
            signs: vec![Sign::Free; 3],
            truncation: Truncation::default(),
        };
        Fixture {
            _dir: dir,
            store,
            key,
        }
    })
}

fuzz_target!(|data: &[u8]| {
    let f = fixture();
    let digest = f.key.digest();
    let entry = f.store.entry_path(digest);
    let checkpoint = f.store.checkpoint_path(digest);
    std::fs::write(&entry, data).expect("write entry");
    std::fs::write(&checkpoint, data).expect("write checkpoint");
    let name = entry.display().to_string();
    if let Err(e) = f.store.load(&f.key) {
        assert!(e.to_string().contains(&name), "{e}");
    }
    if let Err(e) = f.store.load_digest(&digest.to_hex()) {
        assert!(e.to_string().contains(&name), "{e}");
    }
    let _ = f.store.load_checkpoint(&f.key);
    let _ = f.store.verify_all();
});
