//! Set-building benchmark: project-and-lift against plain Pottier completion, side by side.
//!
//! Run with `cargo bench --bench completion` (add case names to run only those). Each case runs
//! in a child process so that its peak memory (VmHWM) is its own. Three runs per case:
//! project-and-lift with the norm limit `build` uses by default (the smallest proven bound from
//! the matrix analysis, which loses nothing), project-and-lift with no limit, and plain Pottier
//! completion (no limit). The last two stop at a time limit (`KERNSTEP_BENCH_LIMIT` seconds,
//! default 60) and are then shown as `> limit`. The ratio is Pottier / lift (default limit).

use std::process::Command;
use std::time::{Duration, Instant};

use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::{complete_kernel, Completion, Control, Method, Request};
use kernstep::IntMatrix;

struct Case {
    name: &'static str,
    matrix: fn() -> IntMatrix,
}

fn transport(r: usize, s: usize) -> IntMatrix {
    IntMatrix::transportation(r, s)
}

fn three_way(p: usize, q: usize, s: usize) -> IntMatrix {
    let var = |i: usize, j: usize, k: usize| (i * q + j) * s + k;
    let mut rows = Vec::new();
    let mut line = |cells: Vec<usize>| {
        let mut row = vec![0i64; p * q * s];
        cells.into_iter().for_each(|v| row[v] = 1);
        rows.push(row);
    };
    (0..p).for_each(|i| (0..q).for_each(|j| line((0..s).map(|k| var(i, j, k)).collect())));
    (0..p).for_each(|i| (0..s).for_each(|k| line((0..q).map(|j| var(i, j, k)).collect())));
    (0..q).for_each(|j| (0..s).for_each(|k| line((0..p).map(|i| var(i, j, k)).collect())));
    IntMatrix::from_rows(&rows).unwrap()
}

fn partition(n: i64) -> IntMatrix {
    IntMatrix::from_rows(&[(1..=n).collect()]).unwrap()
}

fn twisted_cubic_graver() -> IntMatrix {
    IntMatrix::from_rows(&[
        vec![1, 0, 1, 2, 1],
        vec![-2, 1, -1, -3, 0],
        vec![1, -2, -1, 0, -3],
        vec![0, 1, 1, 1, 2],
    ])
    .unwrap()
}

const CASES: &[Case] = &[
    Case {
        name: "K4,4",
        matrix: || transport(4, 4),
    },
    Case {
        name: "K5,5",
        matrix: || transport(5, 5),
    },
    Case {
        name: "K6,6",
        matrix: || transport(6, 6),
    },
    Case {
        name: "3x3x3",
        matrix: || three_way(3, 3, 3),
    },
    Case {
        name: "3x3x4",
        matrix: || three_way(3, 3, 4),
    },
    Case {
        name: "(1..6)",
        matrix: || partition(6),
    },
    Case {
        name: "(1..7)",
        matrix: || partition(7),
    },
    Case {
        name: "(1..8)",
        matrix: || partition(8),
    },
    Case {
        name: "(1..9)",
        matrix: || partition(9),
    },
    Case {
        name: "G(twisted cubic)",
        matrix: twisted_cubic_graver,
    },
];

/// Runs one method on one case in this process and prints `elements seconds peak_kib`.
fn child(name: &str, method: &str, limit: u64) {
    let case = CASES.iter().find(|c| c.name == name).expect("known case");
    let a = (case.matrix)();
    let mut request = Request::graver(a.cols());
    request.method = if method == "pottier" {
        Method::Pottier
    } else {
        Method::ProjectAndLift
    };
    if method == "lift" {
        let analysis = MatrixAnalysis::of(&a, &AnalysisOptions::new());
        request.truncation.norm_limit = Some(analysis.norm_limit());
    }
    let control = Control::new().time_limit(Duration::from_secs(limit));
    let start = Instant::now();
    let outcome = complete_kernel(&a, &request, &control, None).expect("completion runs");
    let seconds = start.elapsed().as_secs_f64();
    let elements = match outcome {
        Completion::Finished(set, _) => set.len().to_string(),
        Completion::Stopped(_) => "-".to_string(),
    };
    println!("{elements} {seconds:.3} {}", peak_kib());
}

fn peak_kib() -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("VmHWM:"))
                .and_then(|l| l.split_whitespace().nth(1)?.parse().ok())
        })
        .unwrap_or(0)
}

fn measure(name: &str, method: &str, limit: u64) -> (String, f64, u64) {
    let exe = std::env::current_exe().expect("own path");
    let out = Command::new(exe)
        .args(["--child", name, method, &limit.to_string()])
        .output()
        .expect("child runs");
    let text = String::from_utf8_lossy(&out.stdout);
    let mut f = text.split_whitespace();
    let elements = f.next().unwrap_or("?").to_string();
    let seconds = f.next().and_then(|s| s.parse().ok()).unwrap_or(f64::NAN);
    let peak = f.next().and_then(|s| s.parse().ok()).unwrap_or(0);
    (elements, seconds, peak)
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| a != "--bench")
        .collect();
    if args.first().map(String::as_str) == Some("--child") {
        child(&args[1], &args[2], args[3].parse().unwrap_or(60));
        return;
    }
    let limit: u64 = std::env::var("KERNSTEP_BENCH_LIMIT")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(60);
    println!(
        "{:<17} {:>8} {:>9} {:>8} {:>11} {:>11} {:>8} {:>9}",
        "matrix", "elements", "lift s", "lift MiB", "no-limit s", "pottier s", "pot. MiB", "ratio"
    );
    for case in CASES
        .iter()
        .filter(|c| args.is_empty() || args.iter().any(|a| a == c.name))
    {
        let (elements, lift_s, lift_kib) = measure(case.name, "lift", 3600);
        let (free_elements, free_s, _) = measure(case.name, "lift-unlimited", limit);
        let (pot_elements, pot_s, pot_kib) = measure(case.name, "pottier", limit);
        let timed = |found: &str, seconds: f64| {
            if found == "-" {
                format!("> {limit}")
            } else {
                assert_eq!(found, elements, "{}: methods disagree", case.name);
                format!("{seconds:.3}")
            }
        };
        let ratio = if pot_elements == "-" {
            format!("> {:.0}x", limit as f64 / lift_s)
        } else {
            format!("{:.1}x", pot_s / lift_s)
        };
        println!(
            "{:<17} {:>8} {:>9.3} {:>8.1} {:>11} {:>11} {:>8.1} {:>9}",
            case.name,
            elements,
            lift_s,
            lift_kib as f64 / 1024.0,
            timed(&free_elements, free_s),
            timed(&pot_elements, pot_s),
            pot_kib as f64 / 1024.0,
            ratio
        );
    }
}
