//! Issue 13: every day that `kernstep batch` marks optimal on the example scenarios passes an
//! independent check written here, from the plan as printed and the set as `build --out`
//! exports it: the plan meets `A x = b` exactly and its bounds, and no move of the set, in
//! either sign, stays in the box and lowers the cost (the test-set property, Murota, Saito,
//! Weismantel 2004). The instance of each day comes from the library's scenario reader. Both
//! engines are checked: the enumerated set and, for the lane plan, the network's cycles.

mod cli_support;

use std::path::Path;

use cli_support::{batch_answers, expect, scenarios};
use kernstep::scenario::{parse_day_lines, PlanInput};
use serde_json::Value;

/// The moves of the set `build --out` writes for `scenario`.
fn exported_moves(cache: &Path, scenario: &Path) -> Vec<Vec<i64>> {
    let out = cache.join("set.json");
    let args = [
        "build",
        "--engine",
        "moves",
        scenario.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ];
    expect(cache, &args, 0);
    let doc: Value = serde_json::from_str(&std::fs::read_to_string(out).unwrap()).unwrap();
    doc["elements"]
        .as_array()
        .unwrap()
        .iter()
        .map(|g| {
            g.as_array()
                .unwrap()
                .iter()
                .map(|v| v.as_i64().unwrap())
                .collect()
        })
        .collect()
}

#[test]
fn every_optimal_batch_day_passes_an_outside_check() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        ("brackle_lanes.toml", "brackle_lanes_days.jsonl"),
        ("vell_valley.toml", "vell_valley_days.jsonl"),
        ("hollin_trucks.toml", "hollin_trucks_days.jsonl"),
    ];
    // The lane plan is a network matrix: `auto` solves it along its cycles, `moves` with the
    // enumerated set; both must pass the same check.
    for ((file, days_file), engine) in cases.iter().flat_map(|c| [(c, "auto"), (c, "moves")]) {
        let (scenario, days) = (scenarios().join(file), scenarios().join(days_file));
        let cache = dir.path().join(format!("{file}-{engine}"));
        std::fs::create_dir_all(&cache).unwrap();
        let answers = batch_answers(&cache, &scenario, &days, &["--engine", engine]);
        let moves = exported_moves(&cache, &scenario);
        let PlanInput::Scenario(s, model) = PlanInput::load(&scenario).unwrap() else {
            panic!("{file} is a scenario");
        };
        let text = std::fs::read_to_string(&days).unwrap();
        let mut checked = 0;
        for (_, parsed) in parse_day_lines(&s, &text, days_file) {
            let variant = parsed.unwrap();
            let (status, objective, _, plan) = &answers[&variant.id];
            if status != "optimal" {
                continue;
            }
            let day = variant.apply(&model, days_file).unwrap();
            let x: Vec<i64> = model
                .variable_names
                .iter()
                .map(|n| plan.get(n).copied().unwrap_or(0))
                .collect();
            let cost = |y: &[i64]| -> i128 {
                y.iter()
                    .zip(&day.cost)
                    .map(|(&v, &c)| i128::from(v) * i128::from(c))
                    .sum()
            };
            let in_box = |y: &[i64]| {
                y.iter().enumerate().all(|(i, &v)| {
                    day.lower[i].is_none_or(|l| v >= l) && day.upper[i].is_none_or(|u| v <= u)
                })
            };
            for (r, &b) in day.rhs.iter().enumerate() {
                let row: i128 = (0..x.len())
                    .map(|j| i128::from(day.matrix.get(r, j)) * i128::from(x[j]))
                    .sum();
                assert_eq!(row, i128::from(b), "{file} {}: row {r}", variant.id);
            }
            assert!(in_box(&x), "{file} {}: plan outside its bounds", variant.id);
            assert_eq!(Some(cost(&x)), *objective, "{file} {}", variant.id);
            for g in &moves {
                for sign in [1, -1] {
                    let y: Vec<i64> = x.iter().zip(g).map(|(a, b)| a + sign * b).collect();
                    assert!(
                        !in_box(&y) || cost(&y) >= cost(&x),
                        "{file} {}: move {g:?} in sign {sign} improves the plan",
                        variant.id
                    );
                }
            }
            checked += 1;
        }
        assert!(checked >= 5, "{file}: only {checked} optimal days checked");
    }
}
