//! Help that fits the shell: completion scripts and the manual page name every verb, and the
//! short flags `-j` (threads) and `-o` (out) act as their long forms.

use serde_json::Value;

mod cli_support;
use cli_support::{examples, expect};

const VERBS: [&str; 7] = [
    "analyze", "build", "cache", "solve", "trace", "batch", "demo",
];

/// The standard output of `kernstep ARGS` (these verbs take no cache directory).
fn printed(args: &[&str]) -> String {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .args(args)
        .output()
        .unwrap();
    assert!(out.status.success(), "{args:?}");
    String::from_utf8(out.stdout).unwrap()
}

#[test]
fn completions_and_the_manual_name_every_verb() {
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let script = printed(&["completions", shell]);
        for verb in VERBS {
            assert!(script.contains(verb), "{shell}: {verb}");
        }
        assert!(
            script.contains("threads") && script.contains("max-memory"),
            "{shell}"
        );
    }
    let manual = printed(&["manual"]);
    assert!(
        manual.starts_with(".ie") || manual.starts_with(".TH"),
        "roff"
    );
    for verb in VERBS {
        assert!(manual.contains(&format!(".TH kernstep-{verb} 1")), "{verb}");
    }
}

#[test]
fn short_flags_act_as_their_long_forms() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("set.json");
    let model = examples().join("transport_3x3.json");
    let model = model.to_str().unwrap();
    expect(
        dir.path(),
        &["build", model, "-j", "1", "-o", out.to_str().unwrap()],
        0,
    );
    let doc: Value = serde_json::from_slice(&std::fs::read(&out).unwrap()).unwrap();
    assert_eq!(doc["elements"].as_array().unwrap().len(), 15);
}

/// A directory build takes the MPS files inside too (they were passed over without a word).
#[test]
fn a_directory_build_takes_mps_files() {
    let dir = tempfile::tempdir().unwrap();
    let models = tempfile::tempdir().unwrap();
    let mps = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/mps/orchard_crates.mps");
    std::fs::copy(&mps, models.path().join("orchard_crates.mps")).unwrap();
    let rows = cli_support::json_rows(&expect(
        dir.path(),
        &["build", models.path().to_str().unwrap(), "--json"],
        0,
    ));
    assert_eq!(rows.as_array().unwrap().len(), 1);
    assert!(rows[0]["model"]
        .as_str()
        .unwrap()
        .ends_with("orchard_crates.mps"));
}
