//! `kernstep solve` through the binary: optima against the HiGHS values recorded in
//! `tests/fixtures/solve/` (solver and version named in each fixture), exit codes for every
//! outcome, variants inline and from JSON Lines files, warm starts, and the cache; scenario
//! days (`--variant DAYS --day DAY`) answered as `batch` answers them.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

mod cli_support;
mod highs_fixtures;
use cli_support::convex::ConvexObjective;
use cli_support::{batch_answers, document_answer, expect_both, scenarios};
use highs_fixtures::{fixture, Case, Fixture};
use serde_json::{json, Value};

fn kernstep(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .args(args)
        .output()
        .expect("run kernstep")
}

fn stdout(out: &Output) -> String {
    String::from_utf8(out.stdout.clone()).unwrap()
}

fn stderr(out: &Output) -> String {
    String::from_utf8(out.stderr.clone()).unwrap()
}

fn example(name: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples")
        .join(name)
        .display()
        .to_string()
}

/// `solve --json` with extra arguments; returns the exit code and the document.
fn solve_json(model: &str, cache: &Path, extra: &[&str]) -> (i32, Value) {
    let cache = cache.display().to_string();
    let mut args = vec!["solve", model, "--json", "--build", "--cache-dir", &cache];
    args.extend_from_slice(extra);
    let out = kernstep(&args);
    let code = out.status.code().unwrap();
    assert!(code < 2, "exit {code}: {}", stderr(&out));
    (code, serde_json::from_str(&stdout(&out)).unwrap())
}

/// A model file holding one fixture variant.
fn write_model(dir: &Path, f: &Fixture, case: &Case) -> PathBuf {
    let path = dir.join(format!("{}.json", case.id.replace('/', "_")));
    let model = json!({
        "matrix": f.matrix, "rhs": case.rhs, "cost": case.cost,
        "lower": case.lower, "upper": case.upper,
        "names": { "variables": f.variables },
    });
    std::fs::write(&path, model.to_string()).unwrap();
    path
}

/// The status tag and exit code kernstep must give for a fixture's expectation; the network
/// solver proves every kind of infeasibility by a cut.
fn expected_tag(case: &Case, network: bool) -> (&'static str, i32) {
    match (case.expect.status.as_str(), case.kind.as_str()) {
        ("infeasible", _) if network => ("infeasible_cut", 1),
        ("optimal", _) => ("optimal", 0),
        ("unbounded", _) => ("unbounded", 1),
        ("infeasible", "parity" | "balance") => ("no_integer_solution", 1),
        ("infeasible", "box-infeasible") => ("no_lattice_point_in_box", 1),
        other => panic!("{}: unexpected expectation {other:?}", case.id),
    }
}

/// Every variant of the fixture `name` with both engines; `network`: whether its matrix is a
/// network matrix (after scaling rows by -1 each column has at most one +1 and one -1).
fn check_fixture(name: &str, network_matrix: bool) {
    let f = fixture(name);
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().join("cache");
    // Both engines: the enumerated Graver basis, and `auto`, which solves a network matrix
    // along its cycles.
    for (case, engine) in f.variants.iter().flat_map(|c| [(c, "moves"), (c, "auto")]) {
        let model = write_model(dir.path(), &f, case);
        let (code, doc) = solve_json(model.to_str().unwrap(), &cache, &["--engine", engine]);
        let network = doc["set"]["source"] == "network";
        assert_eq!(
            network,
            engine == "auto" && network_matrix,
            "{}: {doc}",
            case.id
        );
        let (tag, want_code) = expected_tag(case, network);
        assert_eq!(doc["status"]["tag"], tag, "{} ({engine}): {doc}", case.id);
        assert_eq!(code, want_code, "{} ({engine})", case.id);
        if let Some(objective) = case.expect.objective {
            // Optimum recorded by HiGHS 1.16 (fixture file).
            assert_eq!(
                doc["objective"],
                objective.to_string(),
                "{} ({engine})",
                case.id
            );
        }
        if doc["recheck"] != Value::Null {
            assert_eq!(doc["recheck"]["holds"], true, "{} ({engine})", case.id);
        }
    }
}

#[test]
fn lanes_3x3_match_highs() {
    check_fixture("lanes_3x3.json", true);
}

#[test]
fn dense_3x6_with_parity_and_rays_match_highs() {
    check_fixture("dense_3x6_b.json", false);
}

#[test]
fn truckloads_match_highs() {
    check_fixture("truckloads_2x3_c2.json", false);
}

/// `examples/depot_stores.toml` (convex costs on two lanes and both stores) under every
/// variant of `tests/fixtures/convex/depot_stores.json`: status and optimum as HiGHS found
/// them for the linearised model, the plan's cost recomputed here by the closed form, and an
/// unbounded answer's ray checked to lower the cost for ever.
#[test]
fn convex_costs_match_highs() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(root.join("tests/fixtures/convex/depot_stores.json"));
    let fixture: Value = serde_json::from_str(&text.unwrap()).unwrap();
    assert_eq!(fixture["reference"]["solver"], "HiGHS");
    let path = root.join(fixture["model"].as_str().unwrap());
    let model = path.to_str().unwrap();
    let objective = ConvexObjective::read(&path);
    let dir = tempfile::tempdir().unwrap();
    let mut seen = BTreeSet::new();
    for case in fixture["variants"].as_array().unwrap() {
        let id = case["id"].as_str().unwrap();
        let mut variant = case.clone();
        let fields = variant.as_object_mut().unwrap();
        fields.retain(|k, _| ["id", "rhs", "cost", "lower", "upper"].contains(&k.as_str()));
        let (code, doc) = solve_json(model, dir.path(), &["--variant", &variant.to_string()]);
        let tag = doc["status"]["tag"].as_str().unwrap();
        let cost = match case["cost"].as_array() {
            Some(_) => objective.with_cost(&integers(&case["cost"])),
            None => objective.with_cost(&objective.cost),
        };
        let want = case["expect"]["status"].as_str().unwrap();
        match want {
            "optimal" => {
                // Optimum of the linearised model by HiGHS 1.16 (scripts/convex_reference.py).
                let optimum = case["expect"]["objective"].as_i64().unwrap();
                assert_eq!((tag, code), ("optimal", 0), "{id}: {doc}");
                assert_eq!(doc["objective"], optimum.to_string(), "{id}");
                assert_eq!(
                    cost.value(&integers(&doc["x"])),
                    i128::from(optimum),
                    "{id}"
                );
                assert_eq!(doc["recheck"]["holds"], true, "{id}");
            }
            // HiGHS 1.16: no plan in the box (scripts/convex_reference.py).
            "infeasible" => {
                assert_eq!(code, 1, "{id}");
                assert!(
                    [
                        "no_lattice_point_in_box",
                        "no_integer_solution",
                        "empty_range"
                    ]
                    .contains(&tag),
                    "{id}: {doc}"
                );
            }
            // HiGHS 1.16: unbounded (scripts/convex_reference.py); the ray is checked here.
            "unbounded" => {
                assert_eq!((tag, code), ("unbounded", 1), "{id}: {doc}");
                let (x, d) = (integers(&doc["x"]), integers(&doc["status"]["direction"]));
                // Far beyond every break the cost falls by the same amount per unit step.
                let at =
                    |t: i64| -> Vec<i64> { x.iter().zip(&d).map(|(a, b)| a + t * b).collect() };
                let fall = cost.value(&at(1000)) - cost.value(&at(1001));
                assert!(fall > 0, "{id}: the ray does not lower the cost");
                assert_eq!(cost.value(&at(2000)) - cost.value(&at(2001)), fall, "{id}");
            }
            other => panic!("{id}: unexpected expectation {other}"),
        }
        seen.insert(want);
    }
    assert_eq!(
        seen.len(),
        3,
        "optimal, infeasible and unbounded variants: {seen:?}"
    );
}

/// A list of integers: JSON numbers (the model's own) or decimal strings (plan values).
fn integers(v: &Value) -> Vec<i64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|e| e.as_i64().or_else(|| cli_support::int64(e)).unwrap())
        .collect()
}

#[test]
fn lane_plan_optimum_and_certificate_in_words() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let model = example("lane_plan.toml");
    let solve = |engine: &str| {
        let args = [
            "solve",
            &model,
            "--build",
            "--cache-dir",
            &cache,
            "--engine",
            engine,
        ];
        let out = kernstep(&args);
        assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
        let text = stdout(&out);
        // By hand: with brackwater_north = t the plan costs 64 - 4t, t <= 5 (capacity): 44.
        assert!(text.contains("objective  44"), "{text}");
        assert!(text.contains("brackwater_north      5"), "{text}");
        text
    };
    let text = solve("moves");
    assert!(
        text.contains("certified: the only move does not improve in either sign"),
        "{text}"
    );
    // The lane plan is a network matrix: by default it is solved along its cycles, and the
    // certificate is the LP dual (row potentials).
    let text = solve("auto");
    assert!(
        text.contains("certified: row potentials give every variable"),
        "{text}"
    );
    assert!(
        text.contains("the cycles of the network (its Graver basis, implicit"),
        "{text}"
    );
}

#[test]
fn a_norm_truncated_set_is_used_when_no_complete_one_is_stored_and_says_so() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let model = example("transport_3x3.json");
    // K_{3,3}: 9 four-cycles (norm 4) and 6 six-cycles; the Graver basis is its 15 circuits.
    let build = ["build", &model, "--norm-limit", "4", "--cache-dir", &cache];
    assert_eq!(kernstep(&build).status.code(), Some(0));
    // K_{3,3} is a network matrix; `--engine moves` asks for the stored sets.
    let moves = ["--engine", "moves"];
    let out = kernstep(
        &[
            &["solve", &model, "--json", "--cache-dir", &cache][..],
            &moves,
        ]
        .concat(),
    );
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let partial: Value = serde_json::from_str(&stdout(&out)).unwrap();
    // The set says it is truncated; the plan is still proven optimal, by its dual bound
    // (the LP relaxation of a transport problem is integral; Schrijver 1986, chapter 19).
    assert_eq!(partial["coverage"]["tag"], "norm_truncated");
    assert_eq!(partial["coverage"]["norm"], 4);
    assert_eq!(partial["set"]["moves"], 9);
    assert_eq!(partial["status"]["tag"], "optimal");
    assert_eq!(partial["recheck"]["claim"], "bound_met");
    // Once the complete set is stored it is preferred, and the answer is certified.
    let (_, full) = solve_json(&model, dir.path(), &moves);
    assert_eq!(full["status"]["tag"], "optimal");
    assert_eq!(full["set"]["moves"], 15);
}

#[test]
fn cache_miss_needs_build_then_the_cache_is_used() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let model = example("transport_3x3.json");
    // K_{3,3} is a network matrix; `--engine moves` asks for its stored Graver basis.
    let miss = kernstep(&["solve", &model, "--cache-dir", &cache, "--engine", "moves"]);
    assert_eq!(miss.status.code(), Some(2));
    let message = stderr(&miss);
    assert!(
        message.starts_with("kernstep: no test set") && message.contains("kernstep build"),
        "{message}"
    );
    let (_, built) = solve_json(&model, dir.path(), &["--engine", "moves"]);
    assert_eq!(built["set"]["source"], "built");
    let out = kernstep(&[
        "solve",
        &model,
        "--json",
        "--cache-dir",
        &cache,
        "--engine",
        "moves",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let cached: Value = serde_json::from_str(&stdout(&out)).unwrap();
    assert_eq!(cached["set"]["source"], "cache");
    assert_eq!(cached["set"]["moves"], built["set"]["moves"]);
    assert_eq!(cached["objective"], built["objective"]);
}

#[test]
fn warm_start_equals_cold_start() {
    let f = fixture("lanes_3x3.json");
    let dir = tempfile::tempdir().unwrap();
    let optimal: Vec<&Case> = f
        .variants
        .iter()
        .filter(|c| c.expect.status == "optimal")
        .collect();
    let base = write_model(dir.path(), &f, optimal[0]);
    let base = base.to_str().unwrap();
    let (_, yesterday) = solve_json(base, dir.path(), &[]);
    let previous = dir.path().join("yesterday.json");
    std::fs::write(&previous, yesterday.to_string()).unwrap();
    for case in &optimal[1..6] {
        let variant = json!({
            "id": case.id, "rhs": case.rhs, "cost": case.cost,
            "lower": case.lower, "upper": case.upper,
        })
        .to_string();
        let (_, cold) = solve_json(base, dir.path(), &["--variant", &variant]);
        let warm_args = [
            "--variant",
            &variant,
            "--warm-start",
            previous.to_str().unwrap(),
        ];
        let (_, warm) = solve_json(base, dir.path(), &warm_args);
        assert_eq!(warm["warm_start"], true);
        assert_eq!(warm["objective"], cold["objective"], "{}", case.id);
        // HiGHS 1.16 optimum from the fixture.
        let want = case.expect.objective.unwrap().to_string();
        assert_eq!(warm["objective"], want, "{}", case.id);
    }
}

#[test]
fn variants_file_picks_by_id_and_reports_missing_ids() {
    let dir = tempfile::tempdir().unwrap();
    let days = dir.path().join("days.jsonl");
    let text = concat!(
        "{\"id\":\"mon\",\"rhs\":[7,5,6]}\n",
        "\n",
        "{\"id\":\"tue\",\"rhs\":[8,5,6]}\n",
    );
    std::fs::write(&days, text).unwrap();
    let model = example("lane_plan.toml");
    let days = days.to_str().unwrap();
    let (code, first) = solve_json(&model, dir.path(), &["--variant", days]);
    assert_eq!((code, first["variant"].as_str()), (0, Some("mon")));
    let (_, tue) = solve_json(
        &model,
        dir.path(),
        &["--variant", days, "--variant-id", "tue"],
    );
    assert_eq!(tue["variant"], "tue");
    assert_eq!(tue["rhs"], json!([8, 5, 6]));
    let cache = dir.path().display().to_string();
    let out = kernstep(&[
        "solve",
        &model,
        "--build",
        "--cache-dir",
        &cache,
        "--variant",
        days,
        "--variant-id",
        "sun",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("id \"sun\": no variant has it"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn bad_variant_json_names_the_field() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let model = example("lane_plan.toml");
    let cases = [
        (r#"{"id":"mon","rsh":[7,5,6]}"#, "unknown field `rsh`"),
        (
            r#"{"id":"mon","rhs":[7,5]}"#,
            "rhs: has 2 entries, the model needs 3",
        ),
        (
            r#"{"id":"mon","cost":[1,"x",3,4]}"#,
            "--variant: inline JSON:",
        ),
    ];
    for (variant, needle) in cases {
        let out = kernstep(&[
            "solve",
            &model,
            "--build",
            "--cache-dir",
            &cache,
            "--variant",
            variant,
        ]);
        assert_eq!(out.status.code(), Some(2), "{variant}");
        let message = stderr(&out);
        assert!(message.starts_with("kernstep: --variant: "), "{message}");
        assert!(message.contains(needle), "{message}");
    }
}

#[test]
fn step_limit_exits_one_and_is_not_certified() {
    let dir = tempfile::tempdir().unwrap();
    let model = example("transport_3x3.json");
    let extra = ["--max-steps", "1", "--engine", "moves"];
    let (code, doc) = solve_json(&model, dir.path(), &extra);
    assert_eq!(code, 1);
    assert_eq!(doc["status"]["tag"], "step_limit");
    assert_eq!(doc["recheck"], Value::Null);
    assert_eq!(doc["steps"]["cost"], 1);
}

#[test]
fn every_strategy_reaches_the_same_optimum() {
    let dir = tempfile::tempdir().unwrap();
    let model = example("transport_3x3.json");
    let objectives: Vec<Value> = ["graver-best", "first", "steepest"]
        .iter()
        .flat_map(|s| {
            [
                vec!["--strategy", s],
                vec!["--strategy", s, "--powers-of-two"],
            ]
        })
        .map(|extra| solve_json(&model, dir.path(), &extra).1["objective"].clone())
        .collect();
    assert!(
        objectives.iter().all(|o| *o == objectives[0]),
        "{objectives:?}"
    );
}

#[test]
fn human_certificates_for_parity_and_rays() {
    let f = fixture("dense_3x6_b.json");
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().join("cache").display().to_string();
    let wanted = [
        ("parity", "certified: the row multipliers y = ("),
        ("unbounded", "certified: the ray "),
        (
            "box-infeasible",
            "certified: no lattice point of this fibre lies in the box",
        ),
    ];
    for (kind, needle) in wanted {
        let case = f.variants.iter().find(|c| c.kind == kind).unwrap();
        let model = write_model(dir.path(), &f, case);
        let out = kernstep(&[
            "solve",
            model.to_str().unwrap(),
            "--build",
            "--cache-dir",
            &cache,
        ]);
        assert_eq!(out.status.code(), Some(1), "{}", case.id);
        let text = stdout(&out);
        assert!(text.contains(needle), "{}: {text}", case.id);
        assert!(text.lines().all(|l| l.chars().count() <= 100), "{text}");
    }
}

/// Issue 13: a `solve --json` document whose plan was edited by one unit, or a plan of another
/// model, must be refused as a warm start (exit 2, the file and the field named) instead of
/// yielding a plan off `A x = b` that is printed as certified.
#[test]
fn tampered_warm_starts_are_refused_naming_the_file() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let lanes = example("lane_plan.toml");
    let (_, yesterday) = solve_json(&lanes, dir.path(), &[]);
    let mut edited = yesterday.clone();
    let first = cli_support::int64(&edited["x"][0]).unwrap();
    edited["x"][0] = json!((first + 1).to_string());
    let mut short = yesterday.clone();
    short["x"].as_array_mut().unwrap().pop();
    // A plan of the 3 x 3 transport example: 9 variables against the lane plan's 4.
    let (_, foreign) = solve_json(&example("transport_3x3.json"), dir.path(), &[]);
    let cases = [
        (
            "edited.json",
            edited,
            "x: the plan does not meet its right-hand side",
        ),
        (
            "short.json",
            short,
            "x: has 3 values, the model has 4 variables",
        ),
        (
            "foreign.json",
            foreign,
            "x: has 9 values, the model has 4 variables",
        ),
    ];
    for (name, doc, needle) in cases {
        let path = dir.path().join(name);
        std::fs::write(&path, doc.to_string()).unwrap();
        let path = path.display().to_string();
        let variant = r#"{"id":"tue","rhs":[8,5,6]}"#;
        let out = kernstep(&[
            "solve",
            &lanes,
            "--variant",
            variant,
            "--warm-start",
            &path,
            "--cache-dir",
            &cache,
        ]);
        assert_eq!(out.status.code(), Some(2), "{name}: {}", stdout(&out));
        let err = stderr(&out);
        assert!(
            err.starts_with(&format!("kernstep: {path}: ")),
            "{name}: {err}"
        );
        assert!(err.contains(needle), "{name}: {err}");
        assert!(stdout(&out).is_empty(), "{name}: nothing certified");
    }
    // The untouched document still works as a warm start.
    let path = dir.path().join("yesterday.json");
    std::fs::write(&path, yesterday.to_string()).unwrap();
    let extra = ["--warm-start", path.to_str().unwrap()];
    let (code, warm) = solve_json(&lanes, dir.path(), &extra);
    assert_eq!((code, &warm["status"]["tag"]), (0, &json!("optimal")));
    assert_eq!(warm["objective"], yesterday["objective"]);
}

/// `solve SCENARIO --variant DAYS [--day DAY] --json --build EXTRA` with the cache `cache`;
/// returns the exit code (0 or 1) and the document.
fn solve_day(
    cache: &Path,
    scenario: &Path,
    days: &Path,
    day: Option<&str>,
    extra: &[&str],
) -> (i32, Value) {
    let (s, d) = (scenario.to_str().unwrap(), days.to_str().unwrap());
    let mut args = vec!["solve", s, "--variant", d, "--json", "--build"];
    if let Some(day) = day {
        args.extend(["--day", day]);
    }
    args.extend_from_slice(extra);
    let out = cli_support::kernstep(cache, &args);
    let code = out.status.code().unwrap();
    assert!(code < 2, "{args:?}: {}", stderr(&out));
    (code, serde_json::from_str(&stdout(&out)).unwrap())
}

#[test]
fn a_scenario_day_solves_as_batch_solves_it() {
    let cache = tempfile::tempdir().unwrap();
    // 2026-03-04 and 2026-03-07 of the lane days leave no plan inside the bounds, and
    // 2026-03-18 of the valley days has no integer solution: infeasible on purpose.
    let cases = [
        (
            "brackle_lanes.toml",
            "brackle_lanes_days.jsonl",
            &["2026-03-02", "2026-03-04", "2026-03-09"][..],
        ),
        (
            "brackle_lanes.toml",
            "brackle_lanes_days.csv",
            &["2026-03-03", "2026-03-07", "2026-03-08"],
        ),
        (
            "vell_valley.toml",
            "vell_valley_days.jsonl",
            &["2026-03-05", "2026-03-18", "2026-03-31"],
        ),
        (
            "hollin_trucks.toml",
            "hollin_trucks_days.jsonl",
            &["2026-03-02", "2026-03-06"],
        ),
    ];
    let mut statuses = BTreeSet::new();
    for (scenario, days, picked) in cases {
        let (scenario, days) = (scenarios().join(scenario), scenarios().join(days));
        let want = batch_answers(cache.path(), &scenario, &days, &[]);
        for &day in picked {
            let (code, doc) = solve_day(cache.path(), &scenario, &days, Some(day), &[]);
            let context = format!("{} {day}", days.display());
            assert_eq!(doc["variant"], day, "{context}");
            assert_eq!(doc["model"], scenario.to_str().unwrap(), "{context}");
            let got = document_answer(&doc);
            assert_eq!(got, want[day], "{context}");
            assert_eq!(code, i32::from(got.0 != "optimal"), "{context}");
            statuses.insert(got.0);
        }
    }
    assert_eq!(
        statuses.into_iter().collect::<Vec<_>>(),
        ["infeasible", "optimal"]
    );
}

#[test]
fn a_scenario_without_day_takes_the_first_and_without_variant_its_own_numbers() {
    let dir = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("brackle_lanes.toml");
    let days = scenarios().join("brackle_lanes_days.csv");
    let want = batch_answers(dir.path(), &scenario, &days, &[]);
    let (_, first) = solve_day(dir.path(), &scenario, &days, None, &[]);
    assert_eq!(first["variant"], "2026-03-02");
    assert_eq!(document_answer(&first), want["2026-03-02"]);
    // A day that changes nothing is the scenario as written.
    let unchanged = dir.path().join("unchanged.jsonl");
    std::fs::write(&unchanged, "{\"day\": \"as written\"}\n").unwrap();
    let want = batch_answers(dir.path(), &scenario, &unchanged, &[]);
    let s = scenario.to_str().unwrap();
    let args = ["solve", s, "--json", "--build"];
    let (out, _) = expect_both(dir.path(), &args, 0);
    let doc: Value = serde_json::from_str(&out).unwrap();
    assert_eq!(doc["variant"], Value::Null);
    // Same status, optimum and plan; the step count differs on a network, where batch starts
    // every day from the optimum of the scenario's own numbers (here: the day itself).
    let (got, want) = (document_answer(&doc), &want["as written"]);
    assert_eq!((&got.0, got.1, &got.3), (&want.0, want.1, &want.3));
}

#[test]
fn a_warm_started_scenario_day_equals_the_chained_batch() {
    let dir = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("vell_valley.toml");
    let days = scenarios().join("vell_valley_days.jsonl");
    let cold = batch_answers(dir.path(), &scenario, &days, &[]);
    let chained = batch_answers(dir.path(), &scenario, &days, &["--chain"]);
    // Started from the day before's plan, this day takes a step fewer than from a cold start.
    let (yesterday, today) = ("2026-03-11", "2026-03-12");
    assert_ne!(cold[today], chained[today]);
    let (_, previous) = solve_day(dir.path(), &scenario, &days, Some(yesterday), &[]);
    assert_eq!(document_answer(&previous), chained[yesterday]);
    let previous_file = dir.path().join("yesterday.json");
    std::fs::write(&previous_file, previous.to_string()).unwrap();
    let warm = ["--warm-start", previous_file.to_str().unwrap()];
    let (_, doc) = solve_day(dir.path(), &scenario, &days, Some(today), &warm);
    assert_eq!(doc["warm_start"], true);
    assert_eq!(document_answer(&doc), chained[today]);
}

#[test]
fn scenario_day_errors_name_the_file_the_line_and_the_day() {
    let dir = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("brackle_lanes.toml");
    let s = scenario.to_str().unwrap();
    let expect_error = |args: &[&str], needles: &[&str]| {
        let (_, message) = expect_both(dir.path(), args, 2);
        for needle in needles {
            assert!(message.contains(needle), "{args:?}: {message}");
        }
    };
    let csv = scenarios().join("brackle_lanes_days.csv");
    let csv = csv.to_str().unwrap();
    let unknown = [
        "solve",
        s,
        "--variant",
        csv,
        "--day",
        "2026-04-01",
        "--build",
    ];
    expect_error(
        &unknown,
        &[&format!(
            "{csv}: day \"2026-04-01\": not in the file (days: 2026-03-02, "
        )],
    );
    let jsonl = dir.path().join("days.jsonl");
    std::fs::write(
        &jsonl,
        "{\"day\": \"d1\", \"demand\": {\"old_docks\": 10}}\n\
         {\"day\": \"d2\", \"demand\": {\"old_dock\": 10}}\n\
         {\"day\": \"d3\", \"supply\": {\"windmill\": 40}}\n",
    )
    .unwrap();
    let bad_csv = dir.path().join("days.csv");
    std::fs::write(
        &bad_csv,
        "day,field,name,value\nd1,demand,old_docks,10\nd2,demand,old_docks,x\n",
    )
    .unwrap();
    let (jsonl, bad_csv) = (jsonl.to_str().unwrap(), bad_csv.to_str().unwrap());
    let bad_line = ["solve", s, "--variant", jsonl, "--day", "d2", "--build"];
    expect_error(
        &bad_line,
        &["days.jsonl: line 2: demand.old_dock: no zone named \"old_dock\""],
    );
    let bad_row = ["solve", s, "--variant", bad_csv, "--day", "d2", "--build"];
    expect_error(
        &bad_row,
        &["days.csv: line 3: demand.old_docks: \"x\" is not an integer"],
    );
    // The other days of those files still solve.
    for days in [jsonl, bad_csv] {
        let (_, doc) = solve_day(dir.path(), &scenario, Path::new(days), Some("d1"), &[]);
        assert_eq!(doc["status"]["tag"], "optimal", "{days}");
    }
    let id_for_scenario = ["solve", s, "--variant", csv, "--variant-id", "2026-03-02"];
    expect_error(&id_for_scenario, &["is a scenario", "--day"]);
    let model = example("lane_plan.toml");
    let variants = dir.path().join("v.jsonl");
    std::fs::write(&variants, "{\"id\":\"mon\",\"rhs\":[7,5,6]}\n").unwrap();
    let v = variants.to_str().unwrap();
    let day_for_model = ["solve", &model, "--variant", v, "--day", "mon", "--build"];
    expect_error(&day_for_model, &["is a model file", "--variant-id"]);
}

/// Issue 14: an MPS file of network shape qualifies too (its `G` rows get slack columns with
/// one nonzero, arcs to the root). Two depots ship exactly 7 and 8, two zones need at least 5
/// and 6, lanes cost 4, 6 (depot 1) and 5, 3 (depot 2), the first lane carries at most 5. By
/// hand: depot 2 sends its 8 to zone 2 (3 each), depot 1 sends 5 to zone 1 and the other 2 to
/// zone 2: 20 + 12 + 24 = 56. Both engines give it.
#[test]
fn an_mps_network_is_solved_along_its_cycles() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("lanes.mps");
    let text = "NAME          lanes
ROWS
 N  cost
 E  d1
 E  d2
 G  z1
 G  z2
COLUMNS
    MARK      'MARKER'                 'INTORG'
    x11       cost       4   d1   1
    x11       z1         1
    x12       cost       6   d1   1
    x12       z2         1
    x21       cost       5   d2   1
    x21       z1         1
    x22       cost       3   d2   1
    x22       z2         1
    MARK      'MARKER'                 'INTEND'
RHS
    RHS       d1         7   d2   8
    RHS       z1         5   z2   6
BOUNDS
 UP BND       x11        5
ENDATA
";
    std::fs::write(&path, text).unwrap();
    let model = path.to_str().unwrap();
    let (code, doc) = solve_json(model, dir.path(), &[]);
    assert_eq!(
        (code, &doc["set"]["source"]),
        (0, &json!("network")),
        "{doc}"
    );
    assert_eq!(doc["objective"], "56");
    assert_eq!(doc["recheck"]["claim"], "dual_potentials");
    let (_, moves) = solve_json(model, dir.path(), &["--engine", "moves"]);
    assert_eq!(moves["objective"], "56");
}

/// Issue 23: a partial set on an unbounded instance reports the ray instead of running to
/// the step limit. `x1 - 2 x2 + 3 x3 = 0`, cost `-x1`, `x1 >= 0`, `x2` in `[0, 1]`, `x3`
/// free (a worked example from memory): the moves up to norm 3 are `(2, 1, 0)` and
/// `(1, -1, -1)`, each blocked by `x2` within a step, whose sum `(3, 0, -1)` is the ray. The
/// direction is checked here by hand: in the kernel, within every bound's recession cone,
/// and the cost falls along it.
#[test]
fn a_partial_set_reports_a_ray_that_no_single_move_gives() {
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("ray.json");
    std::fs::write(
        &model,
        r#"{"matrix": [[1, -2, 3]], "rhs": [0], "cost": [-1, 0, 0],
            "lower": [0, 0, null], "upper": [null, 1, null]}"#,
    )
    .unwrap();
    let m = model.to_str().unwrap();
    let cache = dir.path().join("cache");
    let build = ["build", m, "--engine", "moves", "--norm-limit", "3"];
    expect_both(&cache, &build, 0);
    let solve = ["solve", m, "--engine", "moves", "--json"];
    let doc: Value = serde_json::from_str(&expect_both(&cache, &solve, 1).0).unwrap();
    assert_eq!(doc["status"]["tag"], "unbounded", "{doc}");
    assert_eq!(doc["status"]["move_index"], Value::Null, "{doc}");
    let d: Vec<i64> = serde_json::from_value(doc["status"]["direction"].clone()).unwrap();
    assert_eq!(d[0] - 2 * d[1] + 3 * d[2], 0, "in the kernel: {d:?}");
    assert!(
        d[0] >= 0 && d[1] == 0,
        "within the bounds' recession cone: {d:?}"
    );
    assert!(-d[0] < 0, "the cost falls: {d:?}");
    assert_eq!(doc["recheck"]["holds"], true, "{doc}");
    let steps = doc["steps"]["cost"].as_u64().unwrap();
    assert!(
        steps < 2_000,
        "found after {steps} steps, not at the step limit"
    );
}

/// `solve --json` is the library's solve document: the binary's output reads back as
/// `trace::SolveDocument` and equals what `trace::solve_document` gives with the set
/// `testset::serve` picks from the same cache (times aside), on the invented depot plan
/// with convex store costs (a cross-check of two code paths; the optimum's own references
/// are the HiGHS fixtures above).
#[test]
fn the_solve_document_is_the_library_call() {
    use kernstep::model::{Model, ModelKind};
    use kernstep::testset::{serve, Engine, SetLibrary};
    use kernstep::trace::{solve_document, SolveContext, SolveDocument};
    let cache = tempfile::tempdir().unwrap();
    let path = example("depot_stores.toml");
    let dir = cache.path().to_str().unwrap();
    kernstep(&["build", &path, "--cache-dir", dir]);
    let out = kernstep(&["solve", &path, "--json", "--cache-dir", dir]);
    let mut printed: SolveDocument = serde_json::from_slice(&out.stdout).unwrap();
    let text = std::fs::read_to_string(&path).unwrap();
    let model = Model::from_str(&text, ModelKind::Toml, &path).unwrap();
    let library = SetLibrary::open(Some(cache.path())).unwrap();
    let served = serve(&model, Some(&library), Engine::Auto, None).unwrap();
    let prepared = served.prepare(&model.matrix).unwrap();
    let context = SolveContext {
        model: &path,
        variant: None,
        warm: None,
        base: None,
        set: &served,
        change: None,
    };
    let options = augment::Options::default();
    let mut called = solve_document(&prepared, &model, &options, context, &|| false).unwrap();
    printed.seconds = 0.0;
    called.seconds = 0.0;
    assert_eq!(printed, called);
    assert_eq!(printed.set.source, "cache");
}
