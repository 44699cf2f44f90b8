//! Regression: threads of one process opening the same store at once must all succeed (the
//! writability probe once had a per-process name, so one thread removed another's probe).

use std::sync::{Arc, Barrier};

#[test]
fn many_threads_open_one_store_at_once() {
    let dir = tempfile::tempdir().unwrap();
    let barrier = Arc::new(Barrier::new(8));
    let handles: Vec<_> = (0..8)
        .map(|_| {
            let (dir, barrier) = (dir.path().to_path_buf(), Arc::clone(&barrier));
            std::thread::spawn(move || {
                barrier.wait();
                (0..50).all(|_| cache::Store::open(&dir).is_ok())
            })
        })
        .collect();
    assert!(handles.into_iter().all(|h| h.join().unwrap()));
}
