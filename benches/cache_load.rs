//! Cache load benchmark on real test sets: the Graver bases of the 5 x 5 and 6 x 6
//! transportation matrices and of the 3 x 3 x 3 tables with fixed line sums (with
//! `KERNSTEP_BENCH_LARGE=1` also the 3 x 3 x 4 and 3 x 3 x 5 tables), built as `kernstep build`
//! builds them by default (the smallest proven norm bound, e.g. 12 for the unimodular 6 x 6
//! matrix) and kept in a bench cache directory between runs.
//!
//! Run with `cargo bench --bench cache_load`. The cache directory is
//! `$KERNSTEP_BENCH_CACHE`, else `<target>/tmp/cache_load`; the first run builds the sets
//! (the 6 x 6 one takes minutes, the 3 x 3 x 5 one about five), later runs only load them.
//! Per set the table shows the file size, bytes per element (vector) and per entry
//! (coordinate), the build time when built in this run, the best of several full checked
//! loads (read, checksum, key, decode) as elements per second, and the best time of what a
//! solve does before its first step: serve the set from the cache and prepare it for the
//! matrix (the moves in the solver's form, the re-check's masks, the lattice data).

use std::path::PathBuf;
use std::time::{Duration, Instant};

use cache::StoredSet;
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::Control;
use kernstep::model::{Model, ModelKind};
use kernstep::testset::{entry_key, serve, BuildSpec, Engine, Obtained, SetLibrary};

/// Loads per measurement; the fastest one is reported.
const LOADS: usize = 9;

struct Case {
    name: &'static str,
    rows: Vec<Vec<i64>>,
}

/// Supplies then demands of the `p x q` transportation problem.
fn transport(p: usize, q: usize) -> Vec<Vec<i64>> {
    kernstep::IntMatrix::transportation(p, q).to_rows()
}

/// Line sums of `p x q x s` tables: one row per line of cells with two indices fixed.
fn three_way(p: usize, q: usize, s: usize) -> Vec<Vec<i64>> {
    let var = |i: usize, j: usize, k: usize| (i * q + j) * s + k;
    let line = |cells: Vec<usize>| {
        let mut row = vec![0; p * q * s];
        cells.into_iter().for_each(|c| row[c] = 1);
        row
    };
    let mut rows = Vec::new();
    for i in 0..p {
        for j in 0..q {
            rows.push(line((0..s).map(|k| var(i, j, k)).collect()));
        }
    }
    for i in 0..p {
        for k in 0..s {
            rows.push(line((0..q).map(|j| var(i, j, k)).collect()));
        }
    }
    for j in 0..q {
        for k in 0..s {
            rows.push(line((0..p).map(|i| var(i, j, k)).collect()));
        }
    }
    rows
}

fn model(rows: &[Vec<i64>]) -> Model {
    let text = serde_json::json!({ "matrix": rows, "rhs": vec![0; rows.len()] }).to_string();
    Model::from_str(&text, ModelKind::Json, "bench model").expect("a valid bench model")
}

fn bench_dir() -> PathBuf {
    std::env::var_os("KERNSTEP_BENCH_CACHE")
        .map(PathBuf::from)
        .unwrap_or_else(|| PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("cache_load"))
}

/// The stored set of `m` (built and stored first if missing) and the build time if built.
fn stored(library: &SetLibrary, m: &Model) -> (StoredSet, Option<Duration>) {
    let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
    let spec = BuildSpec::default()
        .resolve(m, &analysis)
        .expect("default spec");
    let key = entry_key(&m.matrix, &spec);
    let started = Instant::now();
    let obtained = library
        .obtain(&m.matrix, &analysis, &spec, &Control::new(), false)
        .expect("build or load");
    let built = match obtained {
        Obtained::Reused(_) => None,
        Obtained::Built { .. } => Some(started.elapsed()),
        Obtained::Stopped { reason, .. } => panic!("build stopped: {reason:?}"),
    };
    let set = library
        .store()
        .load(&key)
        .expect("a sound entry")
        .expect("just stored");
    (set, built)
}

/// The fastest of [`LOADS`] runs of `load`.
fn best_of(mut load: impl FnMut() -> usize, expected: usize) -> Duration {
    (0..LOADS)
        .map(|_| {
            let started = Instant::now();
            let n = load();
            let took = started.elapsed();
            assert_eq!(n, expected, "a load returned another set");
            took
        })
        .min()
        .expect("at least one load")
}

/// The benchmarked matrices (the large ones when `KERNSTEP_BENCH_LARGE` is set).
fn cases() -> Vec<Case> {
    let mut cases = vec![
        Case {
            name: "transport 5x5",
            rows: transport(5, 5),
        },
        Case {
            name: "transport 6x6",
            rows: transport(6, 6),
        },
        Case {
            name: "3x3x3 line sums",
            rows: three_way(3, 3, 3),
        },
    ];
    if std::env::var_os("KERNSTEP_BENCH_LARGE").is_some() {
        cases.push(Case {
            name: "3x3x4 line sums",
            rows: three_way(3, 3, 4),
        });
        cases.push(Case {
            name: "3x3x5 line sums",
            rows: three_way(3, 3, 5),
        });
    }
    cases
}

fn main() {
    let library = SetLibrary::open(Some(&bench_dir())).expect("bench cache directory");
    let cases = cases();
    println!("cache: {}", library.store().dir().display());
    println!(
        "{:<16} {:>8} {:>5} {:>8} {:>10} {:>9} {:>9} {:>9} {:>13} {:>16}",
        "set",
        "elements",
        "width",
        "encoding",
        "bytes",
        "B/element",
        "B/entry",
        "build s",
        "load el/s",
        "serve+prepare ms"
    );
    for case in &cases {
        let m = model(&case.rows);
        let (set, built) = stored(&library, &m);
        let key = set.key.clone();
        let store = library.store();
        let n = set.data.len();
        let load = best_of(|| store.load(&key).unwrap().unwrap().data.len(), n);
        let ready = best_of(
            || {
                let served = serve(&m, Some(&library), Engine::Moves, None).unwrap();
                let prepared = served.prepare(&m.matrix).unwrap();
                prepared.moves().map_or(0, |moves| moves.len())
            },
            n,
        );
        let entries = (n * set.data.width()) as f64;
        println!(
            "{:<16} {:>8} {:>5} {:>8} {:>10} {:>9.2} {:>9.3} {:>9} {:>13.0} {:>16.1}",
            case.name,
            n,
            set.data.width(),
            format!("{:?}", set.encoding).to_lowercase(),
            set.size_bytes,
            set.size_bytes as f64 / n as f64,
            set.size_bytes as f64 / entries,
            built.map_or("cached".to_string(), |d| format!("{:.1}", d.as_secs_f64())),
            n as f64 / load.as_secs_f64(),
            ready.as_secs_f64() * 1e3,
        );
    }
}
