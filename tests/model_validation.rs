//! Model files: what is accepted, and the exact `file: field: message` of each rejection.

use kernstep::model::{Model, ModelKind};

fn json(text: &str) -> Result<Model, String> {
    Model::from_str(text, ModelKind::Json, "m.json").map_err(|e| e.to_string())
}

fn toml(text: &str) -> Result<Model, String> {
    Model::from_str(text, ModelKind::Toml, "m.toml").map_err(|e| e.to_string())
}

#[test]
fn json_with_nulls_and_defaults() {
    let m = json(r#"{"matrix": [[1, 2, 3]], "rhs": [4], "upper": [null, 5, null]}"#).unwrap();
    assert_eq!((m.constraints(), m.variables()), (1, 3));
    assert_eq!(m.cost, vec![0, 0, 0]);
    assert_eq!(m.lower, vec![None, None, None]);
    assert_eq!(m.upper, vec![None, Some(5), None]);
    assert_eq!(m.variable_names, vec!["x1", "x2", "x3"]);
    assert_eq!(m.row_names, vec!["r1"]);
}

#[test]
fn toml_with_infinite_strings_and_names() {
    let text = r#"
        matrix = [[1, -1], [0, 2]]
        rhs = [0, 4]
        cost = [3, -2]
        lower = ["-inf", 0]
        upper = [10, "inf"]
        [names]
        variables = ["inflow", "outflow"]
    "#;
    let m = toml(text).unwrap();
    assert_eq!(m.matrix.to_rows(), vec![vec![1, -1], vec![0, 2]]);
    assert_eq!(m.lower, vec![None, Some(0)]);
    assert_eq!(m.upper, vec![Some(10), None]);
    assert_eq!(m.variable_names, vec!["inflow", "outflow"]);
    assert_eq!(m.row_names, vec!["r1", "r2"]);
}

#[test]
fn json_and_toml_of_one_model_agree() {
    let j = json(r#"{"matrix": [[2, 1]], "rhs": [3], "cost": [1, 1], "lower": [0, 0]}"#);
    let t = toml("matrix = [[2, 1]]\nrhs = [3]\ncost = [1, 1]\nlower = [0, 0]\n");
    assert_eq!(j.unwrap(), t.unwrap());
}

#[test]
fn every_rejection_names_file_and_field() {
    let base = r#""rhs": [1, 2], "matrix": [[1, 2], [3, 4]]"#;
    let cases: [(String, &str); 16] = [
        (
            r#"{"matrix": [[1, 2, 3], [1, 2]], "rhs": [0, 0]}"#.into(),
            "m.json: matrix[1]: has 2 entries, expected 3",
        ),
        (
            r#"{"matrix": [[1, 2], [3, 1.5]], "rhs": [0, 0]}"#.into(),
            "m.json: matrix[1][1]: 1.5 is not an integer",
        ),
        (
            r#"{"matrix": [[2.0]], "rhs": [0]}"#.into(),
            "m.json: matrix[0][0]: 2.0 is not an integer literal",
        ),
        (
            r#"{"matrix": [[1, 2147483648]], "rhs": [0]}"#.into(),
            "m.json: matrix[0][1]: 2147483648 exceeds the limit of 2147483647",
        ),
        (
            r#"{"matrix": [[1]], "rhs": [18446744073709551615]}"#.into(),
            "m.json: rhs[0]: 18446744073709551615 exceeds the limit of 4611686018427387904",
        ),
        (
            r#"{"matrix": [], "rhs": []}"#.into(),
            "m.json: matrix: is empty",
        ),
        (
            r#"{"matrix": [[]], "rhs": [0]}"#.into(),
            "m.json: matrix[0]: is empty",
        ),
        (r#"{"rhs": [0]}"#.into(), "m.json: matrix: is missing"),
        (
            format!(r#"{{{base}, "cots": [1, 1]}}"#),
            "m.json: cots: unknown field",
        ),
        (
            r#"{"matrix": [[1, 2]], "rhs": [0, 1]}"#.into(),
            "m.json: rhs: has 2 entries, expected 1 (one per matrix row)",
        ),
        (
            format!(r#"{{{base}, "cost": [1]}}"#),
            "m.json: cost: has 1 entries, expected 2 (one per matrix column)",
        ),
        (
            format!(r#"{{{base}, "lower": [5, 0], "upper": [3, 1]}}"#),
            "m.json: upper[0]: 3 is below lower[0] = 5",
        ),
        (
            format!(r#"{{{base}, "lower": ["inf", 0]}}"#),
            r#"m.json: lower[0]: "inf" is not a lower bound"#,
        ),
        (
            format!(r#"{{{base}, "names": {{"variables": ["a", "a"]}}}}"#),
            r#"m.json: names.variables[1]: "a" repeats names.variables[0]"#,
        ),
        (
            format!(r#"{{{base}, "names": {{"rows": ["a"]}}}}"#),
            "m.json: names.rows: has 1 entries, expected 2",
        ),
        (
            format!(r#"{{{base}, "names": {{"cols": ["a", "b"]}}}}"#),
            "m.json: names.cols: unknown field",
        ),
    ];
    for (text, expected) in cases {
        let err = json(&text).expect_err(&text);
        assert!(
            err.starts_with(expected),
            "{text}\n  got: {err}\n want: {expected}"
        );
    }
}

#[test]
fn toml_rejections_name_the_field_too() {
    let err = toml("matrix = [[1, \"two\"]]\nrhs = [0]\n").unwrap_err();
    assert_eq!(
        err,
        "m.toml: matrix[0][1]: expected an integer, found a string"
    );
    let err = toml("matrix = [[1]]\nrhs = [0]\ncost = { kind = \"convex\" }\n").unwrap_err();
    assert!(
        err.starts_with(
            "m.toml: cost: is a linear cost (an array of integers); write \
                         piecewise-linear convex costs under convex_cost"
        ),
        "{err}"
    );
    let err = toml("matrix = [[1]]\nrhs = [0]\nupper = [\"-inf\"]\n").unwrap_err();
    assert!(
        err.starts_with("m.toml: upper[0]: \"-inf\" is not an upper bound"),
        "{err}"
    );
    let err = toml("matrix = [[1]\nrhs = [0]\n").unwrap_err();
    assert!(err.starts_with("m.toml: line "), "{err}");
}

#[test]
fn unknown_extension_and_missing_file() {
    let err = Model::load(std::path::Path::new("plan.csv")).unwrap_err();
    assert_eq!(
        err.to_string(),
        "plan.csv: file name: unknown model file type; use a .json, .toml or .mps extension (.gz compressed too)"
    );
    let err = Model::load(std::path::Path::new("surely/not/here.toml")).unwrap_err();
    assert!(
        err.to_string().starts_with("surely/not/here.toml: "),
        "{err}"
    );
}
