//! `kernstep solve` through the binary: optima against the HiGHS values recorded in
//! `tests/fixtures/solve/` (solver and version named in each fixture), exit codes for every
//! outcome, variants inline and from JSON Lines files, warm starts, and the cache.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

mod highs_fixtures;
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

/// The status tag and exit code kernstep must give for a fixture's expectation.
fn expected_tag(case: &Case) -> (&'static str, i32) {
    match (case.expect.status.as_str(), case.kind.as_str()) {
        ("optimal", _) => ("optimal", 0),
        ("unbounded", _) => ("unbounded", 1),
        ("infeasible", "parity" | "balance") => ("no_integer_solution", 1),
        ("infeasible", "box-infeasible") => ("no_lattice_point_in_box", 1),
        other => panic!("{}: unexpected expectation {other:?}", case.id),
    }
}

fn check_fixture(name: &str) {
    let f = fixture(name);
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().join("cache");
    for case in &f.variants {
        let model = write_model(dir.path(), &f, case);
        let (code, doc) = solve_json(model.to_str().unwrap(), &cache, &[]);
        let (tag, want_code) = expected_tag(case);
        assert_eq!(doc["status"]["tag"], tag, "{}: {doc}", case.id);
        assert_eq!(code, want_code, "{}", case.id);
        if let Some(objective) = case.expect.objective {
            // Optimum recorded by HiGHS 1.16 (fixture file).
            assert_eq!(doc["objective"], objective.to_string(), "{}", case.id);
            assert_eq!(doc["recheck"]["holds"], true, "{}", case.id);
        }
    }
}

#[test]
fn lanes_3x3_match_highs() {
    check_fixture("lanes_3x3.json");
}

#[test]
fn dense_3x6_with_parity_and_rays_match_highs() {
    check_fixture("dense_3x6_b.json");
}

#[test]
fn truckloads_match_highs() {
    check_fixture("truckloads_2x3_c2.json");
}

#[test]
fn lane_plan_optimum_and_certificate_in_words() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let model = example("lane_plan.toml");
    let out = kernstep(&["solve", &model, "--build", "--cache-dir", &cache]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    // By hand: with brackwater_north = t the plan costs 64 - 4t, t <= 5 (capacity): 44.
    assert!(text.contains("objective  44"), "{text}");
    assert!(text.contains("brackwater_north      5"), "{text}");
    assert!(
        text.contains("certified: the only move does not improve in either sign"),
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
    let out = kernstep(&["solve", &model, "--json", "--cache-dir", &cache]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let partial: Value = serde_json::from_str(&stdout(&out)).unwrap();
    assert_eq!(partial["status"]["tag"], "optimal_for_moves_up_to");
    assert_eq!(partial["status"]["norm"], 4);
    assert_eq!(partial["set"]["moves"], 9);
    // Once the complete set is stored it is preferred, and the answer is certified.
    let (_, full) = solve_json(&model, dir.path(), &[]);
    assert_eq!(full["status"]["tag"], "optimal");
    assert_eq!(full["set"]["moves"], 15);
}

#[test]
fn cache_miss_needs_build_then_the_cache_is_used() {
    let dir = tempfile::tempdir().unwrap();
    let cache = dir.path().display().to_string();
    let model = example("transport_3x3.json");
    let miss = kernstep(&["solve", &model, "--cache-dir", &cache]);
    assert_eq!(miss.status.code(), Some(2));
    let message = stderr(&miss);
    assert!(
        message.starts_with("kernstep: no test set") && message.contains("kernstep build"),
        "{message}"
    );
    let (_, built) = solve_json(&model, dir.path(), &[]);
    assert_eq!(built["set"]["source"], "built");
    let out = kernstep(&["solve", &model, "--json", "--cache-dir", &cache]);
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
        stderr(&out).contains("no variant has id \"sun\""),
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
    let (code, doc) = solve_json(&model, dir.path(), &["--max-steps", "1"]);
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
    let first = edited["x"][0].as_i64().unwrap();
    edited["x"][0] = json!(first + 1);
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
