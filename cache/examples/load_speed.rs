//! Writes and loads synthetic transport-like test sets and prints load speed and size.
//!
//! Run with `cargo run --release -p cache --example load_speed`.

#[path = "../tests/fixtures/mod.rs"]
mod fixtures;

use std::time::{Duration, Instant};

use cache::{Store, TestSetData, Truncation};
use fixtures::{key, metadata, transport_like, uniform};

const LOADS: usize = 7;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = tempfile::tempdir()?;
    let store = Store::open(dir.path())?;
    let cases = [
        (
            "6x6 grid, entries in {-1,0,1}",
            transport_like(113_865, 6, 6, 1),
        ),
        (
            "5x5 grid, entries in {-1,0,1}",
            transport_like(3_940, 5, 5, 2),
        ),
        ("5x5, entries in -1000..=1000", uniform(20_000, 25, 1000, 3)),
    ];
    println!(
        "{:<30} {:>9} {:>6} {:>8} {:>10} {:>10} {:>14} {:>11}",
        "set", "elements", "width", "encoding", "bytes", "write ms", "elements/s", "bytes/entry"
    );
    for (i, (name, data)) in cases.iter().enumerate() {
        let k = key(&format!("bench {i}"), data.width(), Truncation::default());
        let started = Instant::now();
        let summary = store.replace(&k, data, &metadata(0))?;
        let write = started.elapsed();
        let best = best_load(&store, &k, data)?;
        let entries = (data.len() * data.width()) as f64;
        println!(
            "{:<30} {:>9} {:>6} {:>8} {:>10} {:>10.1} {:>14.0} {:>11.3}",
            name,
            data.len(),
            data.width(),
            format!("{:?}", summary.encoding),
            summary.size_bytes,
            write.as_secs_f64() * 1e3,
            data.len() as f64 / best.as_secs_f64(),
            summary.size_bytes as f64 / entries,
        );
    }
    Ok(())
}

/// The fastest of several full loads (read, checksum, decode), checked against `data`.
fn best_load(
    store: &Store,
    k: &cache::EntryKey,
    data: &TestSetData,
) -> Result<Duration, Box<dyn std::error::Error>> {
    let mut best = Duration::MAX;
    for _ in 0..LOADS {
        let started = Instant::now();
        let loaded = store.load(k)?.ok_or("entry vanished")?;
        best = best.min(started.elapsed());
        if &loaded.data != data {
            return Err("loaded set differs from the stored one".into());
        }
    }
    Ok(best)
}
