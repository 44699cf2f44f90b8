//! MPS input: the reference round trip against HiGHS, hand-worked translations and the error
//! messages (file, line and field).

use std::path::{Path, PathBuf};

use augment::{Coverage, Options, Status};
use kernstep::completion::{complete_kernel, Completion, Control, Request};
use kernstep::model::mps::{self, MpsImport};
use kernstep::model::{Model, ModelKind};
use kernstep::solve::{Prepared, Verdict};
use serde::Deserialize;

#[derive(Deserialize)]
struct Reference {
    source: String,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    file: String,
    status: String,
    objective: Option<f64>,
}

fn fixture_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/mps")
}

/// Solves a model with its full Graver basis: the file's objective value, or `None` when no
/// feasible integer point exists.
fn optimum(import: &MpsImport) -> Option<f64> {
    let model = &import.model;
    let request = Request::graver(model.variables());
    let set = match complete_kernel(&model.matrix, &request, &Control::new(), None).unwrap() {
        Completion::Finished(set, _) => set,
        Completion::Stopped(reason) => panic!("completion stopped: {reason:?}"),
    };
    let prepared = Prepared::new(&model.matrix, &set, Coverage::Complete).unwrap();
    match prepared
        .solve(model, &Options::default(), None, &|| false)
        .unwrap()
    {
        Verdict::NoIntegerSolution(_) => None,
        Verdict::Solved(solution) => match solution.status {
            Status::Optimal => Some(import.file_objective(solution.objective.unwrap())),
            Status::Infeasible(_) => None,
            other => panic!("unexpected status {other:?}"),
        },
        Verdict::Flow(_) => panic!("a set of moves was prepared, not a network"),
    }
}

#[test]
fn every_fixture_matches_the_highs_optimum() {
    let text = std::fs::read_to_string(fixture_dir().join("reference.json")).unwrap();
    let reference: Reference = serde_json::from_str(&text).unwrap();
    // Reference: HiGHS 1.16 via highspy (scripts/mps_reference.py), named in the file.
    assert!(
        reference.source.starts_with("HiGHS 1.16"),
        "{}",
        reference.source
    );
    assert_eq!(reference.cases.len(), 6);
    for case in &reference.cases {
        let path = fixture_dir().join(&case.file);
        let text = std::fs::read_to_string(&path).unwrap();
        let import = mps::read(&text, &case.file).unwrap();
        assert!(
            import.model.variables() <= 12,
            "{}: keep fixtures small",
            case.file
        );
        let loaded = Model::load(&path).unwrap();
        assert_eq!(loaded, import.model, "{}: load and read agree", case.file);
        let found = optimum(&import);
        match (case.status.as_str(), case.objective) {
            ("Optimal", Some(expected)) => {
                let got = found.unwrap_or_else(|| panic!("{}: no optimum", case.file));
                assert!(
                    (got - expected).abs() < 1e-9,
                    "{}: {got} vs {expected}",
                    case.file
                );
            }
            ("Infeasible", None) => assert_eq!(found, None, "{}", case.file),
            (status, _) => panic!("{}: unexpected reference status {status}", case.file),
        }
    }
}

#[test]
fn fixtures_exercise_scaling_maximisation_and_ranges() {
    let read = |name: &str| {
        let text = std::fs::read_to_string(fixture_dir().join(name)).unwrap();
        mps::read(&text, name).unwrap()
    };
    let orchard = read("orchard_crates.mps");
    assert!(orchard.maximize);
    assert_eq!(orchard.row_scales, vec![1, 0]);
    let ferry = read("ferry_loading.mps");
    assert_eq!(ferry.cost_scale, 1);
    let kiln = read("kiln_schedule.mps");
    assert_eq!(kiln.file_columns, 3);
    assert_eq!(kiln.model.variables(), 6);
}

const SMALL: &str = "\
* invented: two depots, one truck type
NAME depots
ROWS
 N  cost
 L  dock
 G  demand
 E  pair
COLUMNS
    MARKER 'MARKER' 'INTORG'
    north cost 3 dock 0.5
    north demand 1 pair 1
    south cost 2.5 dock 1.25
    south pair -1
    MARKER 'MARKER' 'INTEND'
    spare cost 1 demand 1
RHS
    RHS dock 3.75 demand 2
RANGES
    RNG demand 4
BOUNDS
 UP BND north 9
 LI BND spare -2
ENDATA
";

#[test]
fn a_small_model_translates_row_by_row() {
    let import = mps::read(SMALL, "depots.mps").unwrap();
    let m = &import.model;
    // Hand-worked: dock 0.5 n + 1.25 s <= 3.75 becomes 50 n + 125 s + slack = 375 (scale 10^2);
    // demand n + spare in [2, 6] becomes n + spare - slack = 2 with 0 <= slack <= 4.
    let rows: Vec<Vec<i64>> = (0..m.constraints())
        .map(|i| (0..m.variables()).map(|j| m.matrix.get(i, j)).collect())
        .collect();
    assert_eq!(
        rows,
        vec![
            vec![50, 125, 0, 1, 0],
            vec![1, 0, 1, 0, -1],
            vec![1, -1, 0, 0, 0]
        ]
    );
    assert_eq!(m.rhs, vec![375, 2, 0]);
    assert_eq!(import.row_scales, vec![2, 0, 0]);
    assert_eq!(
        (import.cost_scale, m.cost.clone()),
        (1, vec![30, 25, 10, 0, 0])
    );
    assert_eq!(m.lower, vec![Some(0), Some(0), Some(-2), Some(0), Some(0)]);
    assert_eq!(m.upper, vec![Some(9), None, None, None, Some(4)]);
    assert_eq!(
        m.variable_names,
        ["north", "south", "spare", "slack:dock", "slack:demand"]
    );
    assert_eq!(m.row_names, ["dock", "demand", "pair"]);
    assert_eq!(import.file_objective(55), 5.5);
}

#[test]
fn from_str_dispatches_on_the_mps_kind() {
    let model = Model::from_str(SMALL, ModelKind::Mps, "depots.mps").unwrap();
    assert_eq!(model, mps::read(SMALL, "depots.mps").unwrap().model);
    assert_eq!(
        ModelKind::from_path(Path::new("a/plan.MPS")),
        Some(ModelKind::Mps)
    );
}

#[test]
fn bounds_round_inwards_and_infinities_are_recognised() {
    let text = SMALL.replace(
        " LI BND spare -2\n",
        " LI BND spare -2.5\n UP BND south 1e30\n FR BND spare\n UP BND spare 3.7\n",
    );
    let m = mps::read(&text, "b.mps").unwrap().model;
    assert_eq!(m.lower[2], None);
    assert_eq!(m.upper[2], Some(3));
    assert_eq!(m.upper[1], None);
}

#[test]
fn objective_sense_can_stand_on_the_header_line() {
    let text = SMALL.replace("NAME depots\n", "OBJSENSE MAX\nNAME depots\n");
    let import = mps::read(&text, "max.mps").unwrap();
    assert!(import.maximize);
    assert_eq!(import.model.cost, vec![-30, -25, -10, 0, 0]);
    assert_eq!(import.file_objective(-55), 5.5);
}

#[test]
fn objname_picks_a_later_free_row_and_set_names_may_be_left_out() {
    let text = SMALL
        .replace(" N  cost\n", " N  cost\n N  weight\n")
        .replace(
            "north cost 3 dock 0.5",
            "north cost 3 dock 0.5\n    north weight 7",
        )
        .replace("NAME depots\n", "NAME depots\nOBJNAME weight\n")
        .replace("    RHS dock", "    dock")
        .replace("    RNG demand", "    demand")
        .replace(" BND ", " ");
    let named = mps::read(&text, "named.mps").unwrap();
    assert_eq!(named.model.cost, vec![7, 0, 0, 0, 0]);
    let plain = mps::read(SMALL, "depots.mps").unwrap();
    assert_eq!(named.model.matrix, plain.model.matrix);
    assert_eq!(
        (named.model.rhs, named.model.lower, named.model.upper),
        (plain.model.rhs, plain.model.lower, plain.model.upper)
    );
}

fn error(text: &str) -> String {
    mps::read(text, "bad.mps").unwrap_err().to_string()
}

/// Edits of [`SMALL`] (the first `.0` replaced by `.1`) and the start of the error each gives.
const EDITS: [(&str, &str, &str); 12] = [
    (
        "    spare cost 1 demand 1\n",
        "    spare cost 1 demand 1\n    north dock 2\n",
        "line 16, COLUMNS field 1: column \"north\" was declared at line 10 and continued",
    ),
    (
        " LI BND spare -2\n",
        "",
        "line 15, COLUMNS field 1: variable \"spare\" is continuous",
    ),
    (
        "dock 0.5",
        "dock 0.3333333333333",
        "line 10, COLUMNS: the coefficient of \"north\" in row \"dock\", multiplied by 10^13",
    ),
    ("ENDATA\n", "", "line 22, end of file: missing ENDATA"),
    (
        "south pair -1",
        "south pier -1",
        "line 13, COLUMNS field 2: row \"pier\" is not declared in ROWS",
    ),
    (
        "demand 2\n",
        "demand 2\n    RHS cost 4\n",
        "line 18, RHS field 3: a right-hand side on the objective row",
    ),
    (
        "north demand 1",
        "north demand 1,5",
        "line 11, COLUMNS field 3: \"1,5\" is not a number",
    ),
    (
        " UP BND north 9",
        " UP BND north -1",
        "line 21, BOUNDS: the upper bound -1 of \"north\" is below its default lower bound 0",
    ),
    (
        " G  demand",
        " X  demand",
        "line 6, ROWS field 1: \"X\" is not a row type",
    ),
    (
        "    MARKER 'MARKER' 'INTEND'\n",
        "",
        "line 15, COLUMNS: the 'INTORG' marker at line 9 has no matching 'INTEND'",
    ),
    (
        "RANGES\n",
        "QUADOBJ\n",
        "line 18, section: section QUADOBJ is not supported",
    ),
    (
        "    RNG demand 4",
        "    RNG cost 4",
        "line 19, RANGES field 2: row \"cost\" is an N row",
    ),
];

#[test]
fn errors_name_the_file_the_line_and_the_field() {
    for (from, to, expected) in EDITS {
        assert!(SMALL.contains(from), "{from}");
        let err = error(&SMALL.replacen(from, to, 1));
        assert!(err.starts_with(&format!("bad.mps: {expected}")), "{err}");
    }
}

#[test]
fn structural_errors_are_refused() {
    let cases = [
        (
            "ROWS\n E r\nCOLUMNS\nENDATA\n",
            "line 3, COLUMNS: declares no column",
        ),
        (
            "ROWS\n N c\nCOLUMNS\n x 'MARKER' 'INTEND'\n",
            "line 4, COLUMNS field 3: 'INTEND' without an open 'INTORG'",
        ),
        ("COLUMNS\nENDATA\n", "line 1, COLUMNS: comes before ROWS"),
        ("ROWS\nROWS\n", "line 2, ROWS: this section appears twice"),
        ("  E r\n", "line 1, data: comes before any section header"),
        (
            "ROWS\n N c\nCOLUMNS\nENDATA\n",
            "line 1, ROWS: declares no constraint row",
        ),
        (
            "ROWS\n E r\n E r\n",
            "line 3, ROWS field 2: row \"r\" repeats line 2",
        ),
        (
            "OBJSENSE\n UP\n",
            "line 2, OBJSENSE field 1: \"UP\" is not a sense",
        ),
        ("", "line 1, end of file: missing ENDATA"),
        ("ROWS\nNAME x\n", "line 2, NAME: must come before ROWS"),
    ];
    for (text, expected) in cases {
        let err = error(text);
        assert!(
            err.starts_with(&format!("bad.mps: {expected}")),
            "{text:?}: {err}"
        );
    }
}

#[test]
fn bounds_lines_are_checked() {
    let cases = [
        (
            " UP BND nowhere 3",
            "line 22, BOUNDS field 3: column \"nowhere\" is not declared",
        ),
        (
            " XX BND north 3",
            "line 22, BOUNDS field 1: \"XX\" is not a bound type",
        ),
        (
            " FX BND north inf",
            "line 22, BOUNDS field 4: a variable cannot be fixed",
        ),
        (
            " LO BND north +inf",
            "line 22, BOUNDS field 4: a lower bound of +infinity",
        ),
        (
            " UP OTHER north 3",
            "line 22, BOUNDS field 2: a second BOUNDS set \"OTHER\"",
        ),
        (" BV BND north 1", "line 22, BOUNDS: expected 2 or 3 fields"),
        (
            " LO BND north 1e19",
            "line 22, BOUNDS: the lower bound of \"north\" exceeds",
        ),
        (
            " LO BND north 9.5",
            "line 22, BOUNDS: \"north\" has no integer value between its bounds 10 and 9",
        ),
    ];
    for (line, expected) in cases {
        let text = SMALL.replace(" UP BND north 9\n", &format!(" UP BND north 9\n{line}\n"));
        let err = error(&text);
        assert!(
            err.starts_with(&format!("bad.mps: {expected}")),
            "{line}: {err}"
        );
    }
}

#[test]
fn slack_names_may_not_collide_with_columns() {
    let text = SMALL.replace("spare", "slack:demand");
    let err = error(&text);
    assert!(
        err.contains("has the name kernstep gives the slack of row"),
        "{err}"
    );
}
