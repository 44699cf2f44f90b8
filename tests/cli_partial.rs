//! Partial sets from the command line: `build --budget` (deepening), `analyze --estimate`,
//! and the dual bounds that `solve` and `batch` report for plans of a norm-truncated set,
//! against the HiGHS optima recorded in `tests/fixtures/demo/` and by hand.

use std::path::Path;

use serde_json::Value;

mod cli_support;
use cli_support::{examples, expect, kernstep};

fn json(cache: &Path, args: &[&str], code: i32) -> Value {
    cli_support::json_rows(&expect(cache, args, code))
}

fn transport() -> String {
    examples()
        .join("transport_3x3.json")
        .to_str()
        .unwrap()
        .to_string()
}

#[test]
fn a_budget_that_suffices_stores_the_complete_set_of_a_plain_build() {
    let cache = tempfile::tempdir().unwrap();
    let model = transport();
    let budgeted = json(
        cache.path(),
        &[
            "build", &model, "--engine", "moves", "--budget", "60s", "--json",
        ],
        0,
    );
    let row = &budgeted[0];
    assert!(
        row["status"].as_str().unwrap().contains("complete"),
        "{row}"
    );
    // K_{3,3} has 9 cycles of length 4 and 6 of length 6 (counting formula: C(3,2)^2 and
    // 3! 2! / 2), its Graver basis (Sturmfels 1996, chapter 5).
    assert_eq!(row["elements"], 15);
    let levels = row["budget"]["levels"].as_array().unwrap();
    let last = levels.last().unwrap().clone();
    assert_eq!(last["elements"], 15);
    // Transport tables have only even norms, so the limits are even, up to the circuit
    // bound r + 1 = 6 of a unimodular matrix.
    assert!(
        levels
            .iter()
            .all(|l| l["norm_limit"].as_u64().unwrap() % 2 == 0),
        "{row}"
    );
    let status = row["status"].as_str().unwrap();
    assert!(
        status.ends_with("complete (norm limit 6 reached the proven bound)"),
        "{status}"
    );
    let plain = tempfile::tempdir().unwrap();
    let built = json(
        plain.path(),
        &["build", &model, "--engine", "moves", "--json"],
        0,
    );
    assert_eq!(
        built[0]["key"], row["key"],
        "the same entry as a plain build"
    );
    // A second budgeted build finds it.
    let again = json(
        cache.path(),
        &[
            "build", &model, "--engine", "moves", "--budget", "60s", "--json",
        ],
        0,
    );
    assert!(again[0]["status"].as_str().unwrap().starts_with("present"));
}

#[test]
fn a_capped_budget_keeps_a_partial_set_whose_plan_the_bound_proves() {
    let cache = tempfile::tempdir().unwrap();
    let model = transport();
    let args = [
        "build",
        &model,
        "--engine",
        "moves",
        "--budget",
        "60s",
        "--norm-limit",
        "4",
        "--json",
    ];
    let built = json(cache.path(), &args, 0);
    assert_eq!(built[0]["budget"]["norm_limit"], 4);
    assert_eq!(built[0]["elements"], 9, "the nine 4-cycles");
    assert!(built[0]["status"].as_str().unwrap().contains("partial"));
    let solved = json(
        cache.path(),
        &["solve", &model, "--engine", "moves", "--json"],
        0,
    );
    assert_eq!(solved["coverage"]["tag"], "norm_truncated");
    // HiGHS 1.16.0 (highspy, integer columns, equality rows; run by hand): optimum 691. The
    // LP relaxation of a transport problem is integral (Schrijver 1986, chapter 19), so the
    // bound reaches it.
    assert_eq!(solved["objective"], "691");
    assert_eq!(solved["status"]["tag"], "optimal");
    assert_eq!(solved["recheck"]["claim"], "bound_met");
    assert_eq!(solved["bound"]["value"], "691");
    assert_eq!(solved["bound"]["gap"], "0");
    assert_eq!(solved["bound"]["source"], "lp_dual");
    assert_eq!(solved["bound"]["multipliers"].as_array().unwrap().len(), 6);
    let human = expect(cache.path(), &["solve", &model, "--engine", "moves"], 0);
    assert!(human.contains("dual bound  691, meets the cost"), "{human}");
}

/// Issue 21: the three-way 3x3x3 tables' proven bound is far above their moves; the budget
/// stops at the first level that cut nothing and stores the set of a plain build, complete.
#[test]
fn a_budget_stops_at_the_first_level_that_cut_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let (p, q, r) = (3, 3, 3);
    let var = |i: usize, j: usize, k: usize| (i * q + j) * r + k;
    let mut rows = Vec::new();
    let line = |cells: Vec<usize>| {
        let mut row = vec![0; p * q * r];
        cells.into_iter().for_each(|c| row[c] = 1);
        row
    };
    for a in 0..3 {
        for b in 0..3 {
            rows.push(line((0..3).map(|c| var(a, b, c)).collect()));
            rows.push(line((0..3).map(|c| var(a, c, b)).collect()));
            rows.push(line((0..3).map(|c| var(c, a, b)).collect()));
        }
    }
    let model = dir.path().join("tables.json");
    let doc = serde_json::json!({"matrix": rows, "rhs": vec![0; rows.len()]});
    std::fs::write(&model, doc.to_string()).unwrap();
    let model = model.to_str().unwrap();
    let budgeted = json(
        dir.path(),
        &["build", model, "--budget", "10m", "--json"],
        0,
    );
    let row = &budgeted[0];
    let status = row["status"].as_str().unwrap();
    assert!(status.contains("complete (norm limit "), "{status}");
    assert!(status.ends_with(" cut nothing)"), "{status}");
    let plain = tempfile::tempdir().unwrap();
    let built = json(plain.path(), &["build", model, "--json"], 0);
    assert_eq!(built[0]["key"], row["key"], "the complete entry");
    assert_eq!(built[0]["elements"], row["elements"]);
}

#[test]
fn the_estimate_measures_a_build_that_finishes_in_the_probe() {
    let transport_path = transport();
    let estimate = |extra: &[&str]| {
        let mut args = vec!["analyze", &transport_path, "--estimate", "10s", "--json"];
        args.extend_from_slice(extra);
        let output = std::process::Command::new(env!("CARGO_BIN_EXE_kernstep"))
            .args(&args)
            .output()
            .unwrap();
        assert_eq!(output.status.code(), Some(0));
        let report: Value = serde_json::from_slice(&output.stdout).unwrap();
        report["build_estimate"].clone()
    };
    // The build finishes within the probe: measured, the 15 moves of K_{3,3}'s incidence
    // matrix (9 four-cycles and 6 six-cycles: sum_k C(3,k)^2 k!(k-1)!/2, standard count).
    let e = estimate(&[]);
    assert_eq!(e["measured"], true, "{e}");
    assert_eq!(e["set"], "complete");
    assert_eq!(e["complete"]["elements"], "15");
    assert_eq!(e["complete"]["low"]["elements"], "15");
    assert_eq!(e["norm_step"], 2, "transport tables have even norms");
    assert!(e["stages"].as_u64() > Some(1));
    // Up to norm 4: the nine 4-cycles.
    let e = estimate(&["--up-to", "4"]);
    assert_eq!(e["set"], "norm<=4", "{e}");
    assert_eq!(e["up_to_norm"]["elements"], "9", "{e}");
}

#[test]
fn bad_budgets_and_sizes_are_named() {
    let cache = tempfile::tempdir().unwrap();
    for (flag, value) in [
        ("--budget", "soon"),
        ("--budget", "5q"),
        ("--max-memory", "lots"),
    ] {
        let out = kernstep(cache.path(), &["build", &transport(), flag, value]);
        assert_eq!(out.status.code(), Some(2));
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(stderr.contains(flag) && stderr.contains(value), "{stderr}");
    }
}

#[test]
fn batch_bounds_of_partial_sets_never_exceed_the_highs_optima() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut proven = 0;
    for name in [
        "vell_valley",
        "brackle_lanes",
        "hollin_trucks",
        "wendle_ferries",
        "corran_quarries",
    ] {
        let cache = tempfile::tempdir().unwrap();
        let text =
            std::fs::read_to_string(root.join(format!("tests/fixtures/demo/{name}.json"))).unwrap();
        let fixture: Value = serde_json::from_str(&text).unwrap();
        // Reference: HiGHS 1.16 through highspy, written by scripts/demo_reference.py.
        assert_eq!(fixture["reference"]["solver"], "HiGHS");
        let scenario = root.join(fixture["scenario"].as_str().unwrap());
        let days = root.join(fixture["days_file"].as_str().unwrap());
        let (scenario, days) = (scenario.to_str().unwrap(), days.to_str().unwrap());
        let build = ["build", scenario, "--engine", "moves", "--norm-limit", "5"];
        let output = kernstep(cache.path(), &build);
        assert_eq!(output.status.code(), Some(0), "{name}");
        let output = kernstep(
            cache.path(),
            &["batch", scenario, days, "--engine", "moves"],
        );
        assert!(matches!(output.status.code(), Some(0 | 1)), "{name}");
        let stdout = String::from_utf8_lossy(&output.stdout);
        let got: Vec<Value> = stdout
            .lines()
            .map(|l| serde_json::from_str(l).unwrap())
            .collect();
        let want = fixture["days"].as_array().unwrap();
        assert_eq!(got.len(), want.len(), "{name}");
        for (g, w) in got.iter().zip(want) {
            let day = &w["day"];
            let Some(optimum) = w["objective"].as_i64() else {
                continue;
            };
            if let Some(bound) = g["bound"].as_str() {
                let bound: i64 = bound.parse().unwrap();
                assert!(
                    bound <= optimum,
                    "{name} {day}: bound {bound} above {optimum}"
                );
                let gap: i64 = g["gap"].as_str().unwrap().parse().unwrap();
                assert_eq!(gap, cli_support::int64(&g["objective"]).unwrap() - bound);
            }
            if g["status"] == "optimal" {
                let objective = cli_support::int64(&g["objective"]);
                assert_eq!(objective, Some(optimum), "{name} {day}");
                proven += g["bound"].is_string() as usize;
            }
        }
    }
    assert!(proven > 0, "no day proven optimal by its bound");
}
