//! The `analyze` verb through the binary: every example prints its figures, and every bad
//! input gives one clear `kernstep: file: field: message` line on stderr with exit code 2.

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

fn kernstep(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .expect("the binary runs")
}

fn examples() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .expect("examples/ exists")
        .map(|e| e.expect("readable entry").path())
        .filter(|p| {
            matches!(
                p.extension().and_then(|e| e.to_str()),
                Some("json" | "toml")
            )
        })
        .collect();
    files.sort();
    assert!(files.len() >= 3, "examples/ holds the demo models");
    files
}

fn json_report(file: &str) -> serde_json::Value {
    let out = kernstep(&["analyze", file, "--json"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("--json prints one JSON document")
}

#[test]
fn every_example_prints_its_figures() {
    for file in examples() {
        let path = file.to_str().unwrap();
        let out = kernstep(&["analyze", path]);
        let stdout = String::from_utf8(out.stdout).unwrap();
        assert_eq!(
            out.status.code(),
            Some(0),
            "{path}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        assert!(out.stderr.is_empty(), "{path}: nothing on stderr");
        for label in [
            "rank r",
            "Δ (largest r x r minor)",
            "totally unimodular",
            "norm limit",
        ] {
            assert!(
                stdout.contains(label),
                "{path}: {label} missing in\n{stdout}"
            );
        }
        let report = json_report(path);
        assert!(
            report["norm_limit"].as_u64().is_some(),
            "{path}: norm_limit"
        );
        assert!(
            report["analysis"]["bounds"]["steinitz"].is_string(),
            "{path}: decimal strings"
        );
    }
}

#[test]
fn twisted_cubic_figures() {
    // [[1,1,1,1],[0,1,2,3]]: 2 x 2 minors j - i, so Δ = 3 (by hand); bounds
    // (4-2)(2+1)3 = 18 and (2*2*3+1)^2 = 169; proximity 4*3 = 12.
    let r = json_report("examples/twisted_cubic.json");
    let a = &r["analysis"];
    assert_eq!(a["rank"], 2);
    assert_eq!(
        a["delta"],
        serde_json::json!({"kind": "exact", "value": "3"})
    );
    assert_eq!(a["unimodular"], "no");
    assert_eq!(a["bounds"]["steinitz"], "169");
    assert_eq!(a["bounds"]["proximity"], "12");
    assert_eq!(r["norm_limit"], 18);
}

#[test]
fn transport_figures() {
    // A 3 x 3 transport matrix is the incidence matrix of the bipartite graph K_{3,3}:
    // rank 3 + 3 - 1 = 5 and totally unimodular (Schrijver 1986, §19.3); (9-5)(5+1)1 = 24.
    // Unimodular, so its Graver basis is its circuits (Sturmfels 1996, Prop. 8.11): the norm
    // limit is r + 1 = 6, the length of the longest cycle of K_{3,3}.
    let a = json_report("examples/transport_3x3.json");
    assert_eq!(a["analysis"]["rank"], 5);
    assert_eq!(a["analysis"]["totally_unimodular"], "yes");
    assert_eq!(a["analysis"]["bounds"]["by_variables"], "24");
    assert_eq!(a["norm_limit"], 6);
}

#[test]
fn a_small_subdet_limit_gives_a_labelled_bound() {
    let out = kernstep(&[
        "analyze",
        "examples/twisted_cubic.json",
        "--subdet-limit",
        "2",
    ]);
    let stdout = String::from_utf8(out.stdout).unwrap();
    assert_eq!(out.status.code(), Some(0));
    assert!(stdout.contains("(Hadamard bound"), "{stdout}");
    assert!(stdout.contains("undecided"), "{stdout}");
}

#[test]
fn a_closed_stdout_is_not_an_error() {
    // The reader goes away at once, so the binary's first write meets a closed pipe (or, if
    // it was faster, lands in the pipe buffer); either way it must end quietly with 0.
    let mut child = Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .args(["analyze", "examples/transport_3x3.json", "--json"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the binary starts");
    drop(child.stdout.take());
    let out = child.wait_with_output().expect("the binary ends");
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        out.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

fn expect_error(file: &Path, expected: &str) {
    let out = kernstep(&["analyze", file.to_str().unwrap()]);
    let stderr = String::from_utf8(out.stderr).unwrap();
    assert_eq!(out.status.code(), Some(2), "{}: {stderr}", file.display());
    assert!(
        out.stdout.is_empty(),
        "{}: nothing on stdout",
        file.display()
    );
    assert_eq!(stderr.lines().count(), 1, "one line: {stderr}");
    let want = format!("kernstep: {}: {expected}", file.display());
    assert!(stderr.starts_with(&want), "got:  {stderr}want: {want}");
}

#[test]
fn bad_inputs_exit_2_naming_file_and_field() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        (
            "ragged.json",
            r#"{"matrix": [[1, 2], [1, 2, 3]], "rhs": [0, 0]}"#,
            "matrix[1]: has 3 entries, expected 2",
        ),
        (
            "half.json",
            r#"{"matrix": [[1, 0.5]], "rhs": [0]}"#,
            "matrix[0][1]: 0.5 is not an integer",
        ),
        (
            "syntax.json",
            "{\"matrix\": [[1, 2]],\n \"rhs\": [0,]}",
            "line 2, column ",
        ),
        ("syntax.toml", "matrix = [[1, 2]\nrhs = [0]\n", "line "),
        (
            "box.toml",
            "matrix = [[1, 1]]\nrhs = [1]\nlower = [0, 4]\nupper = [1, 2]\n",
            "upper[1]: 2 is below lower[1] = 4",
        ),
        (
            "twice.toml",
            "matrix = [[1, 1]]\nrhs = [1]\n[names]\nvariables = [\"a\", \"a\"]\n",
            "names.variables[1]: \"a\" repeats",
        ),
        (
            "huge.json",
            r#"{"matrix": [[4294967296]], "rhs": [0]}"#,
            "matrix[0][0]: 4294967296 exceeds the limit",
        ),
        ("model.csv", "1,2,3\n", "file name: unknown model file type"),
    ];
    for (name, text, expected) in cases {
        let path = dir.path().join(name);
        std::fs::write(&path, text).unwrap();
        expect_error(&path, expected);
    }
    expect_error(&dir.path().join("absent.json"), "No such file");
}

#[test]
fn usage_errors_exit_2() {
    assert_eq!(kernstep(&["analyze"]).status.code(), Some(2));
    assert_eq!(kernstep(&["no-such-verb"]).status.code(), Some(2));
    let out = kernstep(&[
        "analyze",
        "examples/twisted_cubic.json",
        "--subdet-limit",
        "many",
    ]);
    assert_eq!(out.status.code(), Some(2));
}

/// Issue 14: the lanes kind compiles to a network matrix (README, Transport scenarios: supply
/// rows +1 per depot, demand rows +1 per zone, so the zone rows take the sign -1), the
/// truckloads kind does not (column 0, the units of the first lane, also sits in its load row).
#[test]
fn network_matrices_are_reported() {
    let lanes = json_report("examples/scenarios/brackle_lanes.toml");
    assert_eq!(lanes["network"]["network"], true, "{lanes}");
    // brackle_lanes: 3 depots, 4 zones.
    let detail = lanes["network"]["detail"].as_str().unwrap();
    assert!(detail.starts_with("rows +1: 3, -1: 4"), "{detail}");
    let trucks = json_report("examples/scenarios/hollin_trucks.toml");
    assert_eq!(trucks["network"]["network"], false);
    let detail = trucks["network"]["detail"].as_str().unwrap();
    assert!(detail.starts_with("column 0 has 3 nonzeros"), "{detail}");
    let out = kernstep(&["analyze", "examples/twisted_cubic.json"]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("network matrix             no: column 2 has an entry 2"),
        "{text}"
    );
}

/// `analyze --json` is the library's report: for every example model the printed document
/// equals `formats::analysis::analyze` serialised (the same code path seen from outside).
#[test]
fn the_printed_report_is_the_library_report() {
    use kernstep::analysis::AnalysisOptions;
    use kernstep::formats::analysis::analyze;
    use kernstep::scenario::PlanInput;
    for path in examples() {
        let file = path.to_str().unwrap();
        let out = kernstep(&["analyze", file, "--json"]);
        let mut printed: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        let schema = printed.as_object_mut().unwrap().remove("schema");
        assert_eq!(schema.unwrap(), "kernstep.analysis/1");
        let model = PlanInput::load(&path).unwrap().into_model();
        let report = analyze(&model, file, &AnalysisOptions::new(), None).unwrap();
        assert_eq!(printed, serde_json::to_value(&report).unwrap(), "{file}");
    }
}
