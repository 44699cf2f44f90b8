//! Issue 24, item 2: a model read from MPS is reported in the file's own units through the
//! binary. `solve`, `trace` and `batch` (words and JSON) give the objective in the file's
//! sense (a MAX file its maximum) with the file's decimals, and plans of the file's columns
//! only (the slacks of `L` and `G` rows never appear); a warm start from such a plan gets its
//! slacks back from the rows.
//!
//! The fixtures in `tests/fixtures/units/` are invented scenarios, small enough for a complete
//! Graver basis. Each optimum is HiGHS's (version and value beside each case) and is unique:
//! an enumeration of every integer point in the fixture's bounds found no second plan of the
//! same objective.

use std::path::{Path, PathBuf};

mod cli_support;
use cli_support::expect;
use serde_json::{json, Value};

/// One fixture and what HiGHS reports for it.
struct Case {
    file: &'static str,
    /// The objective as kernstep must print it: the file's sense, as many decimals as the
    /// file's costs have.
    objective: &'static str,
    /// HiGHS's `objective_function_value` on the same file.
    highs: f64,
    /// The file's columns and the optimal plan.
    plan: [(&'static str, i64); 3],
}

const CASES: [Case; 4] = [
    // source: HiGHS 1.16.0 via highspy (readModel on the file, run), objective 52.0, plan
    // loaf 0, bun 5, cake 3. MAX with integer costs, two L rows (two slacks).
    Case {
        file: "bakehouse_profit.mps",
        objective: "52",
        highs: 52.0,
        plan: [("loaf", 0), ("bun", 5), ("cake", 3)],
    },
    // source: HiGHS 1.16.0 via highspy, objective 48.0, plan driver 2, porter 6, trainee 2.
    // MIN with integer costs, a G, an L and an E row (two slacks).
    Case {
        file: "depot_rota.mps",
        objective: "48",
        highs: 48.0,
        plan: [("driver", 2), ("porter", 6), ("trainee", 2)],
    },
    // source: HiGHS 1.16.0 via highspy, objective 13.25, plan small 4, large 3, idle 1.
    // MIN with decimal costs (1.25, 2.5, 0.75), a G and an E row (one slack).
    Case {
        file: "ferry_fuel.mps",
        objective: "13.25",
        highs: 13.25,
        plan: [("small", 4), ("large", 3), ("idle", 1)],
    },
    // source: HiGHS 1.16.0 via highspy, objective 18.4, plan jam 2, honey 6, cheese 1. MAX
    // with decimal costs (2.4, 1.75, 3.1: two places, so 18.40), two L rows and a G row
    // (three slacks).
    Case {
        file: "market_stall.mps",
        objective: "18.40",
        highs: 18.4,
        plan: [("jam", 2), ("honey", 6), ("cheese", 1)],
    },
];

fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/units")
        .join(name)
}

/// The value of the `label` row of a summary table (`objective  52`).
fn row_value<'t>(text: &'t str, label: &str) -> &'t str {
    text.lines()
        .find_map(|l| l.strip_prefix(label).filter(|r| r.starts_with(' ')))
        .unwrap_or_else(|| panic!("no {label} row in\n{text}"))
        .trim()
}

#[test]
fn solve_reports_the_files_objective_and_columns() {
    let cache = tempfile::tempdir().unwrap();
    for case in &CASES {
        let model = fixture(case.file);
        let model = model.to_str().unwrap();
        let doc = expect(cache.path(), &["solve", model, "--build", "--json"], 0);
        let doc: Value = serde_json::from_str(&doc).unwrap();
        assert_eq!(doc["status"]["tag"], "optimal", "{}", case.file);
        assert_eq!(doc["objective"], json!(case.objective), "{}", case.file);
        let reported: f64 = case.objective.parse().unwrap();
        assert!((reported - case.highs).abs() < 1e-9, "{}", case.file);
        let names: Vec<&str> = case.plan.iter().map(|(n, _)| *n).collect();
        // Plan values are decimal strings (the JSON contract).
        let values: Vec<String> = case.plan.iter().map(|(_, v)| v.to_string()).collect();
        assert_eq!(doc["variables"], json!(names), "{}", case.file);
        assert_eq!(doc["x"], json!(values), "{}", case.file);

        let words = expect(cache.path(), &["solve", model], 0);
        assert_eq!(row_value(&words, "objective"), case.objective, "{words}");
        assert!(!words.contains("slack"), "{words}");
        for (name, value) in case.plan.iter().filter(|(_, v)| *v != 0) {
            assert_eq!(row_value(&words, name), value.to_string(), "{words}");
        }
    }
}

#[test]
fn a_warm_start_from_a_plan_without_slacks_gets_them_back() {
    let cache = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    for case in &CASES {
        let model = fixture(case.file);
        let model = model.to_str().unwrap();
        let previous = dir.path().join(format!("{}.json", case.file));
        let doc = expect(cache.path(), &["solve", model, "--build", "--json"], 0);
        std::fs::write(&previous, &doc).unwrap();
        let warm = ["solve", model, "--json", "--warm-start"];
        let warm: Vec<&str> = warm
            .into_iter()
            .chain([previous.to_str().unwrap()])
            .collect();
        let again: Value = serde_json::from_str(&expect(cache.path(), &warm, 0)).unwrap();
        // The start passed the check `A x = rhs` over every column, slacks included.
        assert_eq!(again["warm_start"], true, "{}", case.file);
        assert_eq!(again["objective"], json!(case.objective), "{}", case.file);
    }
    // The same start as from the whole plan: bakehouse_profit's optimum (0, 5, 3) leaves
    // 14 - (5 + 9) = 0 oven hours and 17 - (10 + 6) = 1 flour sack, by hand.
    let model = fixture("bakehouse_profit.mps");
    let model = model.to_str().unwrap();
    let short = dir.path().join("bakehouse_profit.mps.json");
    let text = std::fs::read_to_string(&short).unwrap();
    let mut whole: Value = serde_json::from_str(&text).unwrap();
    assert_eq!(whole["x"], json!(["0", "5", "3"]));
    whole["x"] = json!(["0", "5", "3", "0", "1"]);
    let whole_path = dir.path().join("whole.json");
    std::fs::write(&whole_path, whole.to_string()).unwrap();
    let start = |previous: &Path| {
        let args = ["trace", model, "--warm-start", previous.to_str().unwrap()];
        let words = expect(cache.path(), &args, 0);
        let line = words.lines().find(|l| l.starts_with("start point:"));
        line.unwrap_or_else(|| panic!("{words}")).to_string()
    };
    assert_eq!(start(&short), start(&whole_path));
    whole["x"] = json!(["0", "5"]);
    std::fs::write(&whole_path, whole.to_string()).unwrap();
    let args = ["solve", model, "--warm-start", whole_path.to_str().unwrap()];
    let (_, stderr) = cli_support::expect_both(cache.path(), &args, 2);
    assert!(stderr.contains("whole.json"), "{stderr}");
}

#[test]
fn trace_words_give_the_files_costs_without_slacks() {
    let cache = tempfile::tempdir().unwrap();
    for case in &CASES {
        let model = fixture(case.file);
        let words = expect(
            cache.path(),
            &["trace", model.to_str().unwrap(), "--build"],
            0,
        );
        assert!(!words.contains("slack"), "{words}");
        let final_point = words
            .lines()
            .find(|l| l.starts_with("final point:"))
            .unwrap_or_else(|| panic!("{words}"));
        let cost = format!("violation 0, cost {}:", case.objective);
        assert!(final_point.contains(&cost), "{words}");
    }
}

/// The trace document stays the model's (it replays exactly) and says how the model relates
/// to the file, with the file's objective beside the model's.
#[test]
fn trace_documents_give_the_units_and_the_files_objective() {
    let cache = tempfile::tempdir().unwrap();
    for case in &CASES {
        let model = fixture(case.file);
        let args = ["trace", model.to_str().unwrap(), "--build", "--json"];
        let doc: Value = serde_json::from_str(&expect(cache.path(), &args, 0)).unwrap();
        assert_eq!(
            doc["file_objective"],
            json!(case.objective),
            "{}",
            case.file
        );
        let units = &doc["units"];
        let scale = units["cost_scale"].as_u64().unwrap();
        let model_objective: i128 = doc["objective"].as_str().unwrap().parse().unwrap();
        // The model's objective is the file's times 10^scale, negated for MAX.
        let sign = if units["maximize"] == true { -1 } else { 1 };
        let file: f64 = case.objective.parse().unwrap();
        let expected = sign as f64 * file * 10f64.powi(scale as i32);
        assert!((model_objective as f64 - expected).abs() < 1e-6, "{doc}");
        let added = units["added_columns"].as_u64().unwrap() as usize;
        let variables = doc["variables"].as_array().unwrap();
        assert_eq!(variables.len() - added, case.plan.len(), "{}", case.file);
    }
}

#[test]
fn batch_records_give_the_files_objective_and_columns() {
    let cache = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let days = dir.path().join("days.jsonl");
    std::fs::write(&days, "{\"id\": \"as_filed\"}\n").unwrap();
    let days = days.to_str().unwrap();
    for case in &CASES {
        let model = fixture(case.file);
        let model = model.to_str().unwrap();
        let lines = expect(cache.path(), &["batch", model, days, "--build"], 0);
        let record: Value = serde_json::from_str(lines.trim()).unwrap();
        // Objectives are decimal strings, with the places of the file's costs.
        assert_eq!(record["objective"], json!(case.objective), "{}", case.file);
        let plan: serde_json::Map<String, Value> = case
            .plan
            .iter()
            .filter(|(_, v)| *v != 0)
            .map(|(n, v)| (n.to_string(), json!(v.to_string())))
            .collect();
        assert_eq!(record["plan"], Value::Object(plan), "{}", case.file);

        let csv = expect(cache.path(), &["batch", model, days, "--format", "csv"], 0);
        let mut rows = csv.lines();
        let header = rows.next().unwrap();
        let names: Vec<&str> = case.plan.iter().map(|(n, _)| *n).collect();
        assert!(
            header.ends_with(&format!("detail,{}", names.join(","))),
            "{csv}"
        );
        let row: Vec<&str> = rows.next().unwrap().split(',').collect();
        assert_eq!(row[3], case.objective, "{csv}");
    }
}

/// Hundredths of a decimal string with two places (`"18.90"` is 1890).
fn cents(text: &str) -> i64 {
    let (whole, fraction) = text.split_once('.').expect("two decimal places");
    assert_eq!(fraction.len(), 2, "{text}");
    whole.parse::<i64>().unwrap() * 100 + fraction.parse::<i64>().unwrap()
}

#[test]
fn a_maximising_files_dual_bound_bounds_its_maximum_from_above() {
    let cache = tempfile::tempdir().unwrap();
    let model = fixture("market_stall.mps");
    let model = model.to_str().unwrap();
    let truncated = ["--engine", "moves", "--norm-limit", "3"];
    let build: Vec<&str> = ["build", model].into_iter().chain(truncated).collect();
    expect(cache.path(), &build, 0);
    let solve = ["solve", model, "--json", "--engine", "moves"];
    let doc: Value = serde_json::from_str(&expect(cache.path(), &solve, 0)).unwrap();
    assert_eq!(doc["status"]["tag"], "optimal_for_moves_up_to", "{doc}");
    let objective = cents(doc["objective"].as_str().unwrap());
    let bound = cents(doc["bound"]["value"].as_str().unwrap());
    // source: HiGHS 1.16.0 via highspy: the file's optimum is 18.4 (above) and its LP
    // relaxation's 18.9 (integrality dropped, run by hand). The bound is the LP dual evaluated
    // exactly and rounded to the file's cents, so it lies in [18.40, 18.90] for the maximum
    // and above the truncated set's plan.
    assert!((1840..=1890).contains(&bound), "{doc}");
    assert!(objective <= 1840, "{doc}");
    assert_eq!(
        cents(doc["bound"]["gap"].as_str().unwrap()),
        bound - objective
    );

    let dir = tempfile::tempdir().unwrap();
    let days = dir.path().join("days.jsonl");
    std::fs::write(&days, "{\"id\": \"as_filed\"}\n").unwrap();
    let batch = ["batch", model, days.to_str().unwrap(), "--engine", "moves"];
    let record = expect(cache.path(), &batch, 0);
    let record: Value = serde_json::from_str(record.trim()).unwrap();
    assert_eq!(record["objective"], doc["objective"], "{record}");
    assert_eq!(record["bound"], doc["bound"]["value"], "{record}");
    assert_eq!(record["gap"], doc["bound"]["gap"], "{record}");
}

#[test]
fn costs_with_more_places_than_a_report_holds_are_refused_by_line() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(fixture("ferry_fuel.mps")).unwrap();
    let tiny = text.replace("fuel         1.25", "fuel         1e-40");
    assert_ne!(tiny, text);
    let path = dir.path().join("tiny.mps");
    std::fs::write(&path, tiny).unwrap();
    let args = ["solve", path.to_str().unwrap(), "--build"];
    let (_, stderr) = cli_support::expect_both(dir.path(), &args, 2);
    assert!(stderr.contains("tiny.mps: line 11, COLUMNS"), "{stderr}");
    assert!(stderr.contains("40 decimal places"), "{stderr}");
}
