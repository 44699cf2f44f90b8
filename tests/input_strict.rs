//! Input that cannot forge output: a JSON object naming a key twice is refused with the key
//! and line (in models, scenarios and day lines), names and ids holding control characters are
//! refused, a variant id may be given once, and a days file without a day is an error.

use kernstep::model::{Model, ModelKind};
use kernstep::scenario::{parse_day_lines, Scenario};
use kernstep::solve::parse_lines;

mod cli_support;
use cli_support::{kernstep, scenarios, text};

const SCENARIO: &str = r#"{"kind": "lanes", "depots": ["a"], "zones": ["x"],
  "supply": {"a": 5}, "demand": {"x": 5},
  "lanes": [{"from": "a", "to": "x", "cost": 2}]}"#;

#[test]
fn a_key_named_twice_is_refused_with_the_key_and_line() {
    let model = "{\"matrix\": [[1, 1]],\n \"rhs\": [3],\n \"rhs\": [4]}";
    let e = Model::from_str(model, ModelKind::Json, "m.json")
        .unwrap_err()
        .to_string();
    assert!(e.starts_with("m.json: line 3"), "{e}");
    assert!(e.contains("\"rhs\" appears twice"), "{e}");
    let twice = SCENARIO.replace("\"supply\": {\"a\": 5}", "\"supply\": {\"a\": 5, \"a\": 9}");
    let e = Scenario::from_str(&twice, ModelKind::Json, "s.json")
        .unwrap_err()
        .to_string();
    assert!(e.contains("\"a\" appears twice"), "{e}");
    let scenario = Scenario::from_str(SCENARIO, ModelKind::Json, "s.json").unwrap();
    let days = "{\"day\": \"d1\", \"demand\": {\"x\": 4, \"x\": 6}}\n\
                {\"day\": \"d2\", \"demand\": {\"x\": 4}, \"demand\": {\"x\": 6}}\n\
                {\"day\": \"d3\", \"demand\": {\"x\": 4}}\n";
    let parsed = parse_day_lines(&scenario, days, "d.jsonl");
    for (k, key) in [(0, "\"x\""), (1, "\"demand\"")] {
        let e = parsed[k].1.as_ref().unwrap_err().to_string();
        assert!(e.starts_with(&format!("d.jsonl: line {}", k + 1)), "{e}");
        assert!(e.contains(&format!("{key} appears twice")), "{e}");
    }
    assert!(parsed[2].1.is_ok(), "the other days still read");
}

#[test]
fn names_and_ids_with_control_characters_are_refused() {
    let model = r#"{"matrix": [[1, 1]], "rhs": [3], "names": {"variables": ["a", "b\nc"]}}"#;
    let e = Model::from_str(model, ModelKind::Json, "m.json")
        .unwrap_err()
        .to_string();
    assert!(e.contains("U+000A"), "{e}");
    let scenario = Scenario::from_str(SCENARIO, ModelKind::Json, "s.json").unwrap();
    let parsed = parse_day_lines(&scenario, "{\"day\": \"d1\\u0000\"}\n", "d.jsonl");
    let e = parsed[0].1.as_ref().unwrap_err().to_string();
    assert!(e.contains("U+0000"), "{e}");
    let variants = "{\"id\": \"mon\\r\", \"rhs\": [3]}\n";
    let e = parse_lines(variants, "v.jsonl")[0]
        .1
        .as_ref()
        .unwrap_err()
        .to_string();
    assert!(e.contains("U+000D"), "{e}");
}

#[test]
fn a_variant_id_is_given_once() {
    let text = "{\"id\": \"mon\", \"rhs\": [3]}\n{\"id\": \"tue\", \"rhs\": [4]}\n\
                {\"id\": \"mon\", \"rhs\": [5]}\n";
    let parsed = parse_lines(text, "v.jsonl");
    assert!(parsed[0].1.is_ok() && parsed[1].1.is_ok());
    let e = parsed[2].1.as_ref().unwrap_err().to_string();
    assert_eq!(e, "v.jsonl: line 3: id: \"mon\" is already given on line 1");
}

#[test]
fn a_days_file_without_a_day_is_an_error() {
    let cache = tempfile::tempdir().unwrap();
    let empty = cache.path().join("none.jsonl");
    std::fs::write(&empty, "\n\n").unwrap();
    let scenario = scenarios().join("vell_valley.toml");
    let out = kernstep(
        cache.path(),
        &[
            "batch",
            scenario.to_str().unwrap(),
            empty.to_str().unwrap(),
            "--build",
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(
        text(&out.stderr).contains("none.jsonl: file: holds no day"),
        "{}",
        text(&out.stderr)
    );
}
