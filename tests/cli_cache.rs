//! `kernstep cache ...` through the binary: list, show, verify, remove, prune and export on a
//! cache filled by `kernstep build`, in table and JSON form, with exit codes.

use std::path::{Path, PathBuf};

use serde_json::Value;

mod cli_support;
use cli_support::{examples, expect, kernstep, text};

fn json(cache: &Path, args: &[&str]) -> Value {
    cli_support::json_rows(&expect(cache, args, 0))
}

/// A cache holding the sets of every example model; returns it and the digests.
fn filled() -> (tempfile::TempDir, Vec<String>) {
    let dir = tempfile::tempdir().unwrap();
    let ex = examples();
    let summary = json(
        dir.path(),
        &["build", "--engine", "moves", ex.to_str().unwrap(), "--json"],
    );
    let mut keys: Vec<String> = summary
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["key"].as_str().unwrap().to_string())
        .collect();
    keys.sort();
    (dir, keys)
}

fn entry_file(cache: &Path, digest: &str) -> PathBuf {
    cache.join(format!("{digest}.{}", cache::ENTRY_SUFFIX))
}

#[test]
fn list_shows_one_row_per_entry_with_counts() {
    let (dir, keys) = filled();
    let listing = json(dir.path(), &["cache", "list", "--json"]);
    let entries = listing["entries"].as_array().unwrap();
    let listed: Vec<&str> = entries
        .iter()
        .map(|e| e["digest"].as_str().unwrap())
        .collect();
    assert_eq!(listed, keys);
    assert!(listing["unreadable"].as_array().unwrap().is_empty());
    let transport = entries.iter().find(|e| e["width"] == 9).unwrap();
    // The 15 cycles of K_{3,3} (standard count: 9 four-cycles + 6 six-cycles).
    assert_eq!(transport["elements"], 15);
    assert_eq!(transport["encoding"], "trit");
    // Each entry names the model file whose build stored it.
    assert_eq!(transport["model"], "transport_3x3.json");

    let table = expect(dir.path(), &["cache", "list"], 0);
    let lines: Vec<&str> = table.lines().collect();
    assert_eq!(lines.len(), keys.len() + 1, "{table}");
    // The columns the README's cache table lists.
    assert_eq!(
        lines[0].split_whitespace().collect::<Vec<_>>(),
        [
            "key",
            "model",
            "kind",
            "width",
            "elements",
            "encoding",
            "bytes",
            "truncation",
            "complete",
            "age"
        ],
        "{table}"
    );
    for (line, key) in lines[1..].iter().zip(&keys) {
        assert!(line.starts_with(&key[..12]), "{line}");
    }
}

#[test]
fn an_empty_cache_lists_only_the_header() {
    let dir = tempfile::tempdir().unwrap();
    let table = expect(dir.path(), &["cache", "list"], 0);
    assert_eq!(table.lines().count(), 1);
    let listing = json(dir.path(), &["cache", "list", "--json"]);
    assert!(listing["entries"].as_array().unwrap().is_empty());
}

#[test]
fn show_prints_key_metadata_counts_encoding_and_size() {
    let (dir, _) = filled();
    let ex = examples().join("transport_3x3.json");
    let built = json(
        dir.path(),
        &["build", "--engine", "moves", ex.to_str().unwrap(), "--json"],
    );
    let key = built[0]["key"].as_str().unwrap().to_string();
    assert_eq!(built[0]["status"], "present");
    let shown = expect(dir.path(), &["cache", "show", &key[..8]], 0);
    for expected in [
        format!("key                {key}"),
        "kind               graver".to_string(),
        "matrix             6 x 9".to_string(),
        "rank               5".to_string(),
        "elements           15".to_string(),
        "encoding           trit".to_string(),
    ] {
        assert!(shown.contains(&expected), "{expected:?} in\n{shown}");
    }
    // The fields the README's cache table lists, in that order.
    let labels: Vec<&str> = shown
        .lines()
        .map(|l| l.split("  ").next().unwrap())
        .collect();
    assert_eq!(
        labels,
        [
            "key",
            "file",
            "model",
            "kind",
            "signs",
            "truncation",
            "complete",
            "matrix",
            "rank",
            "Δ",
            "column number",
            "norm bound",
            "method",
            "build seconds",
            "built by",
            "age",
            "elements",
            "width",
            "encoding",
            "bytes",
            "bytes per element"
        ],
        "{shown}"
    );
    let size = std::fs::metadata(entry_file(dir.path(), &key))
        .unwrap()
        .len();
    assert!(
        shown.contains(&format!("bytes              {size}\n")),
        "{shown}"
    );

    let doc = json(dir.path(), &["cache", "show", &key, "--json"]);
    assert_eq!(doc["digest"], key.as_str());
    assert_eq!(doc["elements"], 15);
    assert_eq!(doc["width"], 9);
    assert_eq!(doc["size_bytes"], size);
    assert_eq!(doc["metadata"]["rank"], 5);
    assert_eq!(doc["key"]["kind"], "graver");
}

/// A set document with the two facts that differ between two builds of one set (how long
/// the build took, when it ended) taken out.
fn without_build_times(mut doc: Value) -> Value {
    let metadata = doc["metadata"].as_object_mut().expect("a metadata object");
    for timing in ["build_seconds", "created_unix"] {
        assert!(metadata.remove(timing).is_some(), "metadata.{timing}");
    }
    doc
}

#[test]
fn export_equals_the_build_out_file_of_the_same_model() {
    let (dir, _) = filled();
    for model in ["transport_3x3.json", "feed_blend.toml", "lane_plan.toml"] {
        let path = examples().join(model);
        let out_dir = tempfile::tempdir().unwrap();
        let out = out_dir.path().join("set.json");
        let args = [
            "build",
            "--engine",
            "moves",
            path.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--json",
        ];
        let summary = cli_support::json_rows(&expect(dir.path(), &args, 0));
        let key = summary[0]["key"].as_str().unwrap();
        let file: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
        let exported = json(dir.path(), &["cache", "export", key, "--format", "json"]);
        assert_eq!(exported["digest"], key, "{model}");
        assert!(!exported["elements"].as_array().unwrap().is_empty());
        let fields = |doc: &Value| doc.as_object().unwrap().keys().cloned().collect::<Vec<_>>();
        // The README's list for both (build, cache).
        let listed = [
            "digest", "elements", "format", "key", "metadata", "version", "width",
        ];
        assert_eq!(fields(&file), listed, "{model}");
        // The stored entry names the model whose build stored it; a file written by --out
        // names none.
        let mut exported = without_build_times(exported);
        let name = exported["metadata"]
            .as_object_mut()
            .unwrap()
            .remove("model");
        let file_name = Path::new(&model).file_name().unwrap().to_str().unwrap();
        assert_eq!(name, Some(Value::from(file_name)), "{model}");
        let mut file = without_build_times(file);
        let none = file["metadata"].as_object_mut().unwrap().remove("model");
        assert_eq!(none, Some(Value::Null), "{model}");
        assert_eq!(exported, file, "{model}");
    }
}

#[test]
fn verify_passes_a_sound_cache_and_names_each_damaged_file() {
    let (dir, keys) = filled();
    let table = expect(dir.path(), &["cache", "verify"], 0);
    assert_eq!(table.matches(" ok").count(), keys.len(), "{table}");
    expect(dir.path(), &["cache", "verify", "--all"], 0);
    expect(dir.path(), &["cache", "verify", &keys[0][..6]], 0);

    let damaged = [&keys[0], &keys[2]];
    for key in damaged {
        let path = entry_file(dir.path(), key);
        let mut bytes = std::fs::read(&path).unwrap();
        let mid = bytes.len() / 2;
        bytes[mid] ^= 0x10;
        std::fs::write(&path, bytes).unwrap();
    }
    let out = kernstep(dir.path(), &["cache", "verify"]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert_eq!(stderr.lines().count(), damaged.len(), "{stderr}");
    for key in damaged {
        let name = entry_file(dir.path(), key).display().to_string();
        assert!(stderr.contains(&name), "{name} in {stderr}");
    }
    assert_eq!(text(&out.stdout).matches("refused").count(), 2);

    let checked: Value =
        serde_json::from_str(&expect(dir.path(), &["cache", "verify", "--json"], 2)).unwrap();
    let bad: Vec<&str> = checked["entries"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|c| c["ok"] == false)
        .map(|c| c["digest"].as_str().unwrap())
        .collect();
    assert_eq!(bad, [keys[0].as_str(), keys[2].as_str()]);
    expect(dir.path(), &["cache", "verify", &keys[1]], 0);
    expect(dir.path(), &["cache", "verify", &keys[2]], 2);
}

#[test]
fn remove_takes_a_unique_prefix_and_refuses_unknown_or_ambiguous_ones() {
    let (dir, keys) = filled();
    let removed = expect(dir.path(), &["cache", "remove", &keys[1][..10]], 0);
    assert_eq!(removed.trim(), format!("removed {}", keys[1]));
    assert!(!entry_file(dir.path(), &keys[1]).exists());
    let listing = json(dir.path(), &["cache", "list", "--json"]);
    assert_eq!(listing["entries"].as_array().unwrap().len(), keys.len() - 1);

    let out = kernstep(dir.path(), &["cache", "remove", &keys[1]]);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).starts_with("kernstep: no cache entry matches"));
    let out = kernstep(dir.path(), &["cache", "show", "xyz"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("not a hexadecimal digest"));
    let doc = json(dir.path(), &["cache", "remove", &keys[0], "--json"]);
    assert_eq!(doc["removed"], keys[0].as_str());
}

#[test]
fn an_ambiguous_prefix_lists_its_matches() {
    let (dir, keys) = filled();
    // A second file whose name shares the first hex digit of an entry's digest.
    let first = &keys[0][..1];
    let filler = if keys[0][1..].starts_with('0') {
        "f"
    } else {
        "0"
    };
    let twin = format!("{first}{}", filler.repeat(31));
    std::fs::copy(
        entry_file(dir.path(), &keys[0]),
        entry_file(dir.path(), &twin),
    )
    .unwrap();
    let out = kernstep(dir.path(), &["cache", "show", first]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out.stderr);
    assert!(stderr.contains("is ambiguous"), "{stderr}");
    assert!(
        stderr.contains(&keys[0]) && stderr.contains(&twin),
        "{stderr}"
    );
}

#[test]
fn prune_removes_old_entries_only() {
    let (dir, keys) = filled();
    let report = json(dir.path(), &["cache", "prune", "--json"]);
    assert!(report["removed"].as_array().unwrap().is_empty());
    let report = json(
        dir.path(),
        &["cache", "prune", "--older-than", "1h", "--json"],
    );
    assert!(report["removed"].as_array().unwrap().is_empty());
    let listing = json(dir.path(), &["cache", "list", "--json"]);
    assert_eq!(listing["entries"].as_array().unwrap().len(), keys.len());

    std::thread::sleep(std::time::Duration::from_millis(1100));
    let table = expect(dir.path(), &["cache", "prune", "--older-than", "0s"], 0);
    assert!(
        table
            .lines()
            .any(|l| l.split_whitespace().collect::<Vec<_>>()
                == ["entries", "removed", &keys.len().to_string()]),
        "{table}"
    );
    let listing = json(dir.path(), &["cache", "list", "--json"]);
    assert!(listing["entries"].as_array().unwrap().is_empty());
}

#[test]
fn bad_ages_and_missing_keys_are_usage_errors() {
    let dir = tempfile::tempdir().unwrap();
    for args in [
        &["cache", "prune", "--older-than", "3q"][..],
        &["cache", "prune", "--older-than", "h"],
        &["cache", "show"],
        &["cache", "verify", "abc", "--all"],
        &["cache", "export", "abc", "--format", "csv"],
    ] {
        let out = kernstep(dir.path(), args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        assert!(!text(&out.stderr).is_empty(), "{args:?}");
    }
}

/// The `cache` documents are the library's: `list`, `show`, `verify` and `prune --json`
/// read back as `testset::Listing`, `EntryRecord`, `VerifyRecord` and `PruneReport` and
/// equal what the library calls give on the same cache; `export` prints the library's
/// set document.
#[test]
fn the_cache_documents_are_the_library_calls() {
    use kernstep::cache::PruneReport;
    use kernstep::testset::{EntryRecord, Listing, SetLibrary, VerifyRecord};
    let (dir, keys) = filled();
    let library = SetLibrary::open(Some(dir.path())).unwrap();
    let listing: Listing =
        serde_json::from_value(json(dir.path(), &["cache", "list", "--json"])).unwrap();
    assert_eq!(listing, library.listing().unwrap());
    assert_eq!(listing.entries.len(), keys.len());
    let shown: EntryRecord =
        serde_json::from_value(json(dir.path(), &["cache", "show", &keys[0], "--json"])).unwrap();
    assert_eq!(shown, library.entry_record(&keys[0]).unwrap());
    let verified: Vec<VerifyRecord> =
        serde_json::from_value(json(dir.path(), &["cache", "verify", "--json"])["entries"].clone())
            .unwrap();
    assert_eq!(verified, library.verify_records(None).unwrap());
    assert!(verified.iter().all(|v| v.ok && !v.foreign));
    let exported = expect(dir.path(), &["cache", "export", &keys[0]], 0);
    assert_eq!(exported, library.export_document(&keys[0], None).unwrap());
    let pruned: PruneReport = serde_json::from_value(json(
        dir.path(),
        &["cache", "prune", "--older-than", "30d", "--json"],
    ))
    .unwrap();
    assert!(pruned.removed.is_empty() && pruned.unreadable.is_empty());
}
