//! The JSON contract (issue 24): every `--json` document and JSON Lines record of every verb
//! is an object with a `schema` field and validates against the JSON Schema published for it
//! in `src/formats/schemas/`, generated from the types. The validator is the `jsonschema`
//! crate (a general-purpose JSON Schema implementation); the schemas' dialect is JSON Schema
//! 2020-12 as `schemars` writes it.

use std::path::{Path, PathBuf};

use kernstep::formats::published::{file_name, published};
use serde_json::Value;

/// Where the published schemas live.
fn schema_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("src/formats/schemas")
}

/// The published schemas are the ones the types generate (set `KERNSTEP_BLESS=1` to rewrite
/// them after a deliberate change of layout, and bump the layout's version).
#[test]
fn published_schemas_match_the_types() {
    let bless = std::env::var_os("KERNSTEP_BLESS").is_some();
    for (name, schema) in published() {
        let path = schema_dir().join(file_name(name));
        let text = serde_json::to_string_pretty(&schema).unwrap() + "\n";
        if bless {
            std::fs::write(&path, &text).unwrap();
        }
        let stored = std::fs::read_to_string(&path)
            .unwrap_or_else(|e| panic!("{}: {e} (run with KERNSTEP_BLESS=1)", path.display()));
        assert_eq!(stored, text, "{} drifted from its type", path.display());
    }
}

/// The values the schemas allow for enumerations and tags are lower snake case.
#[test]
fn enumerated_values_are_lower_snake_case() {
    fn walk(value: &Value, key: Option<&str>, found: &mut Vec<String>) {
        match value {
            Value::Object(map) => {
                for (k, v) in map {
                    match (k.as_str(), v) {
                        ("enum", Value::Array(items)) => {
                            found.extend(items.iter().filter_map(|i| i.as_str()).map(String::from))
                        }
                        ("const", Value::String(s)) if key != Some("schema") => {
                            found.push(s.clone())
                        }
                        _ => walk(v, Some(k), found),
                    }
                }
            }
            Value::Array(items) => items.iter().for_each(|i| walk(i, key, found)),
            _ => {}
        }
    }
    for (name, schema) in published() {
        let mut found = Vec::new();
        walk(&schema, None, &mut found);
        for value in found {
            let snake = value
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_');
            assert!(snake, "{name}: enumerated value {value:?}");
        }
    }
}

#[path = "cli_support/mod.rs"]
mod cli_support;

use std::collections::BTreeSet;
use std::process::Command;

use cli_support::{examples, kernstep, scenarios, text, transport_model};

/// The published schemas by name, read from their files, and the names validated so far.
struct Checker {
    validators: Vec<(String, jsonschema::Validator)>,
    seen: BTreeSet<String>,
}

impl Checker {
    fn new() -> Self {
        let validators = published()
            .into_iter()
            .map(|(name, _)| {
                let path = schema_dir().join(file_name(name));
                let schema: Value =
                    serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap();
                let validator = jsonschema::validator_for(&schema)
                    .unwrap_or_else(|e| panic!("{}: not a JSON Schema: {e}", path.display()));
                (name.to_string(), validator)
            })
            .collect();
        Checker {
            validators,
            seen: BTreeSet::new(),
        }
    }

    /// Checks one document: an object whose `schema` is published, valid against it.
    fn document(&mut self, context: &str, document: &Value) {
        let name = document["schema"]
            .as_str()
            .unwrap_or_else(|| panic!("{context}: no schema field in {document}"));
        let (_, validator) = self
            .validators
            .iter()
            .find(|(n, _)| n == name)
            .unwrap_or_else(|| panic!("{context}: {name} is not published"));
        let errors: Vec<String> = validator
            .iter_errors(document)
            .map(|e| format!("{} at {}", e, e.instance_path()))
            .collect();
        assert!(
            errors.is_empty(),
            "{context}: {name}: {errors:#?}\n{document:#}"
        );
        self.seen.insert(name.to_string());
    }

    /// Checks a whole `--json` output (one document).
    fn output(&mut self, context: &str, stdout: &str) {
        let document: Value = serde_json::from_str(stdout)
            .unwrap_or_else(|e| panic!("{context}: not one JSON document: {e}\n{stdout}"));
        self.document(context, &document);
    }

    /// Checks JSON Lines output (one record per line); returns the records.
    fn lines(&mut self, context: &str, stdout: &str) -> Vec<Value> {
        let mut records = Vec::new();
        for line in stdout.lines() {
            let record: Value = serde_json::from_str(line)
                .unwrap_or_else(|e| panic!("{context}: not a JSON line: {e}\n{line}"));
            self.document(context, &record);
            records.push(record);
        }
        records
    }
}

/// Runs kernstep (with a private cache for the verbs that use one), requiring one of
/// `codes`; returns stdout and stderr.
fn run(cache: &Path, args: &[&str], codes: &[i32]) -> (String, String) {
    let out = match args[0] {
        "analyze" => Command::new(env!("CARGO_BIN_EXE_kernstep"))
            .args(args)
            .output()
            .unwrap(),
        _ => kernstep(cache, args),
    };
    let (stdout, stderr) = (text(&out.stdout), text(&out.stderr));
    let code = out.status.code().unwrap_or(-1);
    assert!(
        codes.contains(&code),
        "{args:?} exited {code}\nstdout: {stdout}\nstderr: {stderr}"
    );
    (stdout, stderr)
}

/// Every verb's `--json` output, in its successful, stopped, partial and failing forms, and
/// the JSON Lines of `batch` and `build --progress json`, validate against their schemas; every
/// published schema is met at least once.
#[test]
fn every_verb_output_validates_against_its_schema() {
    let cache = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let c = cache.path();
    let mut check = Checker::new();
    let transport = examples().join("transport_3x3.json").display().to_string();
    let cubic = examples().join("twisted_cubic.json").display().to_string();
    let lanes = scenarios().join("brackle_lanes.toml").display().to_string();
    let days = scenarios()
        .join("brackle_lanes_days.jsonl")
        .display()
        .to_string();
    let k44 = transport_model(dir.path(), 4, 4).display().to_string();

    // analyze: a network matrix, another, and a build estimate.
    for args in [
        vec!["analyze", &transport, "--json"],
        vec!["analyze", &cubic, "--json"],
        vec!["analyze", &cubic, "--estimate", "1s", "--json"],
    ] {
        check.output(&args.join(" "), &run(c, &args, &[0]).0);
    }

    // build: the implicit cycles, an enumerated set, a budgeted partial set, a stopped build
    // with its progress lines, and a failure.
    let stopped = [
        "build",
        &k44,
        "--engine",
        "moves",
        "--max-elements",
        "5",
        "--progress",
        "json",
        "--json",
    ];
    let (stdout, stderr) = run(c, &stopped, &[1]);
    check.output("build stopped", &stdout);
    let progress: String = stderr.lines().filter(|l| l.starts_with('{')).collect();
    assert!(!progress.is_empty(), "{stderr}");
    check.lines("build --progress json", &progress);
    let missing = dir.path().join("missing.json").display().to_string();
    for args in [
        vec!["build", &transport, "--json"],
        vec!["build", &transport, "--engine", "moves", "--json"],
        vec![
            "build",
            &cubic,
            "--budget",
            "60s",
            "--norm-limit",
            "4",
            "--json",
        ],
        vec!["build", &missing, "--json"],
    ] {
        let code = if args[1] == missing { 2 } else { 0 };
        check.output(&args.join(" "), &run(c, &args, &[code]).0);
    }

    // solve and trace: optimal, from a partial set with its bound, infeasible, priced
    // against a warm start with the unpriced plan compared, and the price curve.
    let solved = run(
        c,
        &["solve", &transport, "--engine", "moves", "--json"],
        &[0],
    )
    .0;
    check.output("solve", &solved);
    check.output(
        "solve partial",
        &run(c, &["solve", &cubic, "--json"], &[0, 1]).0,
    );
    let infeasible = r#"{"id": "short", "rhs": [1000, 0, 0, 0, 0, 0]}"#;
    let (stdout, _) = run(
        c,
        &["solve", &transport, "--variant", infeasible, "--json"],
        &[0, 1],
    );
    check.output("solve infeasible", &stdout);
    let warm = dir.path().join("warm.json");
    std::fs::write(&warm, &solved).unwrap();
    let warm = warm.display().to_string();
    let warm_args = [
        "solve",
        &transport,
        "--engine",
        "moves",
        "--warm-start",
        &warm,
    ];
    let priced = [
        &warm_args[..],
        &["--change-cost", "2", "--compare", "--json"],
    ]
    .concat();
    check.output("solve priced", &run(c, &priced, &[0]).0);
    let curve = [
        &warm_args[..],
        &["--change-cost", "1", "--price-curve", "10", "--json"],
    ]
    .concat();
    check.output("solve --price-curve", &run(c, &curve, &[0]).0);
    check.output("trace", &run(c, &["trace", &transport, "--json"], &[0]).0);
    // An MPS file that maximises with decimal costs: the file's units beside the model's.
    let stall = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/units/market_stall.mps");
    let stall = stall.display().to_string();
    for verb in ["solve", "trace"] {
        let args = [verb, &stall, "--build", "--json"];
        check.output(&format!("{verb} mps"), &run(c, &args, &[0]).0);
    }

    // batch: records and summary, a chain priced against the day before, and a day that fails.
    let (stdout, _) = run(c, &["batch", &lanes, &days, "--build"], &[0, 1]);
    check.lines("batch", &stdout);
    let (_, stderr) = run(c, &["batch", &lanes, &days, "--json"], &[0, 1]);
    check.output("batch summary", &stderr);
    let chain = [
        "batch",
        &lanes,
        &days,
        "--build",
        "--chain",
        "--change-cost",
        "1",
        "--compare",
    ];
    check.lines("batch --chain", &run(c, &chain, &[0, 1]).0);
    let bad = dir.path().join("bad.jsonl");
    std::fs::write(
        &bad,
        "{\"day\": \"d1\", \"demand\": {\"old_docks\": 10}}\n\
         {\"day\": \"d2\", \"demand\": {\"old_dock\": 10}}\n\
         {\"day\": \"d\\u0007\", \"demand\": {\"old_dock\": 10}}\n",
    )
    .unwrap();
    let bad = bad.display().to_string();
    let records = check.lines("batch error", &run(c, &["batch", &lanes, &bad], &[2]).0);
    // A failing day's record names the day its line gave, unless the name could forge
    // output (a control character).
    assert_eq!(records[1]["status"], "error");
    assert_eq!(
        (&records[1]["day"], &records[2]["day"]),
        (&"d2".into(), &Value::Null)
    );

    // cache: list (with the stopped build's checkpoint), show, verify, export and import,
    // prune, remove.
    let (stdout, _) = run(c, &["cache", "list", "--json"], &[0]);
    check.output("cache list", &stdout);
    let listing: Value = serde_json::from_str(&stdout).unwrap();
    assert!(
        !listing["checkpoints"].as_array().unwrap().is_empty(),
        "{listing}"
    );
    let digest = listing["entries"][0]["digest"]
        .as_str()
        .unwrap()
        .to_string();
    check.output(
        "cache show",
        &run(c, &["cache", "show", &digest, "--json"], &[0]).0,
    );
    check.output(
        "cache verify",
        &run(c, &["cache", "verify", "--json"], &[0]).0,
    );
    let exported = dir.path().join("set.json");
    std::fs::write(&exported, run(c, &["cache", "export", &digest], &[0]).0).unwrap();
    let exported = exported.display().to_string();
    check.output(
        "cache import",
        &run(c, &["cache", "import", &exported, "--json"], &[0]).0,
    );
    check.output(
        "cache prune",
        &run(
            c,
            &["cache", "prune", "--older-than", "1000d", "--json"],
            &[0],
        )
        .0,
    );
    check.output(
        "cache remove",
        &run(c, &["cache", "remove", &digest, "--json"], &[0]).0,
    );

    // demo: a few days, with its trace file (a trace document).
    let traces = dir.path().join("demo");
    let trace_dir = traces.display().to_string();
    let demo = ["demo", "--days", "3", "--trace-dir", &trace_dir, "--json"];
    let (stdout, _) = run(c, &demo, &[0]);
    check.output("demo", &stdout);
    let report: Value = serde_json::from_str(&stdout).unwrap();
    let trace_file = report["trace"]["json"].as_str().unwrap();
    check.output("demo trace", &std::fs::read_to_string(trace_file).unwrap());

    let all: BTreeSet<String> = published().iter().map(|(n, _)| n.to_string()).collect();
    let unseen: Vec<&String> = all.difference(&check.seen).collect();
    assert!(unseen.is_empty(), "never met: {unseen:?}");
}
