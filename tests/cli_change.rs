//! `--change-cost` through the binary: `batch --chain` and `solve --warm-start` price every
//! unit changed against the previous plan. The optima themselves are checked against HiGHS in
//! `tests/solve_change.rs`; here the records must add up against their own plans, a price of 0
//! must give the optima of the unpriced chain (the network solver's, proven by potentials),
//! and bad input must name the flag.

use std::collections::BTreeMap;

use serde_json::Value;

mod cli_support;
use cli_support::{expect_both as expect, scenarios};

fn records(stdout: &str) -> Vec<Value> {
    stdout
        .lines()
        .map(|l| serde_json::from_str(l).expect("a JSON line"))
        .collect()
}

/// An integer the JSON contract writes as a decimal string (`None` for `null`).
fn n(value: &Value) -> Option<i64> {
    cli_support::int64(value)
}

fn plan(record: &Value) -> BTreeMap<String, i64> {
    record["plan"]
        .as_object()
        .map(|m| m.iter().map(|(k, v)| (k.clone(), n(v).unwrap())).collect())
        .unwrap_or_default()
}

/// Variables changed and units moved from `before` to `after` (absent entries are 0).
fn changes(before: &BTreeMap<String, i64>, after: &BTreeMap<String, i64>) -> (i64, i64) {
    let names: std::collections::BTreeSet<&String> = before.keys().chain(after.keys()).collect();
    let steps: Vec<i64> = names
        .iter()
        .map(|n| (after.get(*n).unwrap_or(&0) - before.get(*n).unwrap_or(&0)).abs())
        .filter(|&s| s > 0)
        .collect();
    (steps.len() as i64, steps.iter().sum())
}

fn lanes() -> (String, String) {
    let s = scenarios().join("brackle_lanes.toml");
    let d = scenarios().join("brackle_lanes_days.jsonl");
    (s.display().to_string(), d.display().to_string())
}

#[test]
fn chained_records_give_plan_cost_and_change_cost_against_the_day_before() {
    let cache = tempfile::tempdir().unwrap();
    let (s, d) = lanes();
    let args = [
        "batch",
        &s,
        &d,
        "--build",
        "--chain",
        "--change-cost",
        "3",
        "--compare",
    ];
    // Two of the Brackle days are infeasible on purpose: exit 1.
    let (stdout, _) = expect(cache.path(), &args, 1);
    let records = records(&stdout);
    assert!(
        records[0].get("change").is_none(),
        "the first day has no day before"
    );
    let mut previous = plan(&records[0]);
    let mut priced_days = 0;
    for r in &records[1..] {
        if r["status"] != "optimal" {
            assert!(r.get("change").is_none());
            continue;
        }
        priced_days += 1;
        let today = plan(r);
        let change = &r["change"]["priced"];
        let (changed, moved) = changes(&previous, &today);
        assert_eq!(change["changed"].as_i64(), Some(changed), "{r}");
        assert_eq!(n(&change["moved"]), Some(moved), "{r}");
        assert_eq!(n(&change["change_cost"]), Some(3 * moved), "{r}");
        let whole = n(&change["plan_cost"]).unwrap() + 3 * moved;
        assert_eq!(n(&r["objective"]), Some(whole), "{r}");
        // The unpriced plan is cheaper (or as cheap) before the price and dearer after it.
        let plain = &r["change"]["unpriced"];
        let plain_cost = n(&plain["plan_cost"]).unwrap();
        assert!(plain_cost <= n(&change["plan_cost"]).unwrap(), "{r}");
        assert!(
            whole <= plain_cost + n(&plain["change_cost"]).unwrap(),
            "{r}"
        );
        previous = today;
    }
    assert_eq!(priced_days, 5);

    // The CSV results carry the same figures in their change columns (empty for the first
    // day and the infeasible ones).
    let csv_args = [&args[..], &["--format", "csv"]].concat();
    let (csv, _) = expect(cache.path(), &csv_args, 1);
    let mut reader = csv::Reader::from_reader(csv.as_bytes());
    let header = reader.headers().unwrap().clone();
    assert_eq!(
        header.iter().skip(9).take(8).collect::<Vec<_>>(),
        [
            "plan_cost",
            "change_cost",
            "changed",
            "moved",
            "unpriced_plan_cost",
            "unpriced_change_cost",
            "unpriced_changed",
            "unpriced_moved"
        ]
    );
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), records.len());
    for (row, r) in rows.iter().zip(&records) {
        let cells: Vec<&str> = row.iter().collect();
        let cell = |figures: &Value, key: &str| match &figures[key] {
            Value::Null => String::new(),
            Value::String(s) => s.clone(),
            other => other.to_string(),
        };
        let (priced, unpriced) = (&r["change"]["priced"], &r["change"]["unpriced"]);
        let want: Vec<String> = ["plan_cost", "change_cost", "changed", "moved"]
            .iter()
            .map(|k| cell(priced, k))
            .chain(
                ["plan_cost", "change_cost", "changed", "moved"]
                    .iter()
                    .map(|k| cell(unpriced, k)),
            )
            .collect();
        assert_eq!(cells[9..17], want, "{row:?}");
    }
}

#[test]
fn a_price_of_zero_gives_the_optima_of_the_unpriced_chain() {
    let cache = tempfile::tempdir().unwrap();
    let (s, d) = lanes();
    let (priced, _) = expect(
        cache.path(),
        &["batch", &s, &d, "--build", "--chain", "--change-cost", "0"],
        1,
    );
    // Reference: the unpriced chain on the network solver, each optimum proven by potentials.
    let (plain, _) = expect(cache.path(), &["batch", &s, &d, "--chain"], 1);
    let objectives = |text: &str| -> Vec<Option<i64>> {
        records(text).iter().map(|r| n(&r["objective"])).collect()
    };
    assert_eq!(objectives(&priced), objectives(&plain));
}

#[test]
fn solve_prices_changes_against_the_warm_start() {
    let cache = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let (s, d) = lanes();
    let day = |name: &str, more: &[&str]| {
        let mut args = vec!["solve", &s, "--variant", &d, "--day", name, "--build"];
        args.extend_from_slice(more);
        expect(cache.path(), &args, 0).0
    };
    let first = day("2026-03-02", &["--json"]);
    let warm = dir.path().join("monday.json");
    std::fs::write(&warm, &first).unwrap();
    let warm = warm.display().to_string();
    let priced = ["--warm-start", &warm, "--change-cost", "3"];
    let out = day(
        "2026-03-03",
        &[&priced[..], &["--compare", "--json"]].concat(),
    );
    let doc: Value = serde_json::from_str(&out).unwrap();
    let before: Value = serde_json::from_str(&first).unwrap();
    let moved: i64 = (before["x"].as_array().unwrap().iter())
        .zip(doc["x"].as_array().unwrap())
        .map(|(a, b)| (n(a).unwrap() - n(b).unwrap()).abs())
        .sum();
    let change = &doc["change"]["priced"];
    assert_eq!(n(&change["moved"]), Some(moved));
    let whole = n(&change["plan_cost"]).unwrap() + n(&change["change_cost"]).unwrap();
    // The solve document writes the objective as a decimal string.
    assert_eq!(doc["objective"].as_str(), Some(whole.to_string().as_str()));
    assert_eq!(n(&change["change_cost"]), Some(3 * moved));
    assert!(doc["change"]["unpriced"].is_object());
    let summary = day("2026-03-03", &priced);
    assert!(summary.contains("with price  plan cost"), "{summary}");
    // The price of stability: the first piece is the unpriced optimum (the --compare
    // figures above), the plan cost rises and the units moved fall from piece to piece.
    let curve = day(
        "2026-03-03",
        &[&priced[..], &["--price-curve", "20", "--json"]].concat(),
    );
    let curve: Value = serde_json::from_str(&curve).unwrap();
    assert_eq!(curve["schema"], "kernstep.price_curve/1");
    let pieces = curve["pieces"].as_array().unwrap();
    assert_eq!(pieces[0]["from"], "0");
    let unpriced = &doc["change"]["unpriced"];
    assert_eq!(pieces[0]["figures"]["plan_cost"], unpriced["plan_cost"]);
    for pair in pieces.windows(2) {
        let (a, b) = (&pair[0]["figures"], &pair[1]["figures"]);
        assert!(n(&a["plan_cost"]) < n(&b["plan_cost"]), "{curve}");
        assert!(n(&a["moved"]) > n(&b["moved"]), "{curve}");
    }
    // The plot marks each piece with the price where it starts, the table's prices.
    let svg_path = dir.path().join("curve.svg");
    let svg_arg = svg_path.display().to_string();
    day(
        "2026-03-03",
        &[&priced[..], &["--price-curve", "20", "--svg", &svg_arg]].concat(),
    );
    let svg = std::fs::read_to_string(&svg_path).unwrap();
    let tree = roxmltree::Document::parse(&svg).expect("the plot is XML");
    let marks: Vec<String> = tree
        .descendants()
        .filter(|n| n.tag_name().name() == "text")
        .filter_map(|n| n.text())
        .filter_map(|t| t.trim().strip_prefix("from ").map(String::from))
        .collect();
    let prices: Vec<&str> = pieces.iter().map(|p| p["from"].as_str().unwrap()).collect();
    assert_eq!(marks, prices, "{svg}");
}

#[test]
fn bad_change_costs_name_the_flag() {
    let cache = tempfile::tempdir().unwrap();
    let (s, d) = lanes();
    let (_, err) = expect(cache.path(), &["batch", &s, &d, "--change-cost", "3"], 2);
    assert!(err.contains("--chain"), "{err}");
    let (_, err) = expect(
        cache.path(),
        &["batch", &s, &d, "--chain", "--change-cost=-2", "--build"],
        2,
    );
    assert!(
        err.contains("--change-cost") && err.contains("negative"),
        "{err}"
    );
    let (_, err) = expect(cache.path(), &["solve", &s, "--change-cost", "3"], 2);
    assert!(err.contains("--warm-start"), "{err}");
    let cycles = ["--chain", "--change-cost", "2", "--engine", "cycles"];
    let (_, err) = expect(cache.path(), &[&["batch", &s, &d][..], &cycles].concat(), 2);
    assert!(err.contains("a change price is one"), "{err}");
    let (_, err) = expect(cache.path(), &["batch", &s, &d, "--chain", "--compare"], 2);
    assert!(err.contains("--change-cost"), "{err}");
}
