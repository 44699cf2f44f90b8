//! Sets kept as files: `solve`, `trace` and `batch --set FILE` use a set document written by
//! `build --out` (or `cache export`) after checking it in full against the model, and
//! `cache import FILE` stores one; a tampered document or a set of another matrix is refused
//! with the file and the field, and nothing is stored.

use std::path::Path;

use serde_json::Value;

mod cli_support;
use cli_support::{examples, expect, kernstep, solve_answer, text, transport_model};

/// The 3 x 3 transport model's Graver basis (its 15 circuits: 9 of length 4 and 6 of length 6,
/// the cycles of K_{3,3}; Sturmfels 1996, chapter 5) written by `build --out`.
fn written_set(dir: &Path) -> String {
    let file = dir.join("t33.set.json");
    let model = examples().join("transport_3x3.json");
    expect(
        dir,
        &[
            "build",
            model.to_str().unwrap(),
            "--out",
            file.to_str().unwrap(),
        ],
        0,
    );
    let doc: Value = serde_json::from_slice(&std::fs::read(&file).unwrap()).unwrap();
    assert_eq!(doc["elements"].as_array().unwrap().len(), 15);
    file.display().to_string()
}

#[test]
fn a_set_file_serves_solve_trace_and_batch_as_the_cache_does() {
    let cache = tempfile::tempdir().unwrap();
    let set = written_set(cache.path());
    let model = examples().join("transport_3x3.json");
    let model = model.to_str().unwrap();
    let cached = expect(
        cache.path(),
        &["solve", model, "--build", "--engine", "moves", "--json"],
        0,
    );
    let from_file = expect(cache.path(), &["solve", model, "--set", &set, "--json"], 0);
    assert_eq!(solve_answer(&from_file), solve_answer(&cached));
    let doc: Value = serde_json::from_str(&from_file).unwrap();
    assert_eq!(doc["set"]["source"], "file");
    assert_eq!(doc["set"]["file"], set.as_str());
    let trace = expect(cache.path(), &["trace", model, "--set", &set, "--json"], 0);
    let trace: Value = serde_json::from_str(&trace).unwrap();
    assert_eq!(trace["x"], doc["x"]);
    let variants = cache.path().join("v.jsonl");
    std::fs::write(&variants, "{\"id\":\"a\"}\n").unwrap();
    let batch = expect(
        cache.path(),
        &["batch", model, variants.to_str().unwrap(), "--set", &set],
        0,
    );
    let record: Value = serde_json::from_str(batch.lines().next().unwrap()).unwrap();
    // Batch records and solve documents both give the objective as a decimal string.
    assert_eq!(
        record["objective"].as_str().unwrap(),
        doc["objective"].as_str().unwrap()
    );
    let refused = kernstep(cache.path(), &["solve", model, "--set", &set, "--build"]);
    assert_eq!(
        refused.status.code(),
        Some(2),
        "--set and --build exclude each other"
    );
}

#[test]
fn a_tampered_set_or_another_matrix_is_refused() {
    let cache = tempfile::tempdir().unwrap();
    let set = written_set(cache.path());
    let mut doc: Value = serde_json::from_slice(&std::fs::read(&set).unwrap()).unwrap();
    // A vector outside the kernel: the first circuit with one entry changed.
    doc["elements"][0][0] = Value::from(2);
    let forged = cache.path().join("forged.json");
    std::fs::write(&forged, doc.to_string()).unwrap();
    let model = examples().join("transport_3x3.json");
    let out = kernstep(
        cache.path(),
        &[
            "solve",
            model.to_str().unwrap(),
            "--set",
            forged.to_str().unwrap(),
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert!(stderr.contains("forged.json: elements[0]"), "{stderr}");
    let models = tempfile::tempdir().unwrap();
    let other = transport_model(models.path(), 2, 3);
    let out = kernstep(
        cache.path(),
        &["solve", other.to_str().unwrap(), "--set", &set],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(
        text(&out.stderr).contains("key.row_space"),
        "{}",
        text(&out.stderr)
    );
    let out = kernstep(cache.path(), &["cache", "import", forged.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let listing: Value =
        serde_json::from_str(&expect(cache.path(), &["cache", "list", "--json"], 0)).unwrap();
    assert!(
        listing["entries"].as_array().unwrap().is_empty(),
        "{listing}"
    );
}

#[test]
fn an_imported_set_serves_from_the_cache() {
    let cache = tempfile::tempdir().unwrap();
    let files = tempfile::tempdir().unwrap();
    let set = written_set(files.path());
    let imported: Value = serde_json::from_str(&expect(
        cache.path(),
        &["cache", "import", &set, "--json"],
        0,
    ))
    .unwrap();
    assert_eq!(imported["elements"], 15);
    let model = examples().join("transport_3x3.json");
    let solved = expect(
        cache.path(),
        &[
            "solve",
            model.to_str().unwrap(),
            "--engine",
            "moves",
            "--json",
        ],
        0,
    );
    let doc: Value = serde_json::from_str(&solved).unwrap();
    assert_eq!(doc["set"]["source"], "cache");
    assert_eq!(doc["set"]["digest"], imported["imported"]);
    expect(cache.path(), &["cache", "verify"], 0);
}
