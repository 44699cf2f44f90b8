//! Every answer of a batch passes the independent re-check, and a set that is no test set of
//! the matrix (here: a "move" outside the kernel) never yields a certified day.

use augment::Coverage;
use kernstep::completion::ElementSet;
use kernstep::model::{Model, ModelKind};
use kernstep::scenario::{replan, DayOutcome, ReplanSettings};
use kernstep::solve::{parse_lines, Prepared, Verdict};
use kernstep::Error;

/// The lane plan of `examples/lane_plan.toml` (two depots, two zones); its kernel is spanned
/// by `(1, -1, -1, 1)`.
fn lane_plan() -> Model {
    let text = r#"{"matrix": [[1,1,0,0],[1,0,1,0],[0,1,0,1]], "rhs": [7,5,6],
                   "cost": [4,6,5,3], "lower": [0,0,0,0], "upper": [5,null,4,null]}"#;
    Model::from_str(text, ModelKind::Json, "lanes").unwrap()
}

fn days() -> Vec<kernstep::solve::ParsedLine> {
    let text = concat!(
        r#"{"id":"mon"}"#,
        "\n",
        r#"{"id":"tue","rhs":[8,5,6],"cost":[1,6,5,3]}"#,
        "\n",
        r#"{"id":"wed","rhs":[8,6,5],"upper":[9,null,9,null]}"#,
        "\n"
    );
    parse_lines(text, "days.jsonl")
}

fn run(set: Vec<Vec<i64>>, chain: bool) -> Vec<kernstep::scenario::DayResult> {
    let model = lane_plan();
    let set = ElementSet::from_rows(4, &set).unwrap();
    let prepared = Prepared::new(&model.matrix, &set, Coverage::Complete).unwrap();
    let settings = ReplanSettings {
        chain,
        ..ReplanSettings::default()
    };
    replan(&prepared, &model, days(), &settings, "days.jsonl", &|| {
        false
    })
}

#[test]
fn the_true_graver_basis_gives_certified_optima() {
    for chain in [false, true] {
        let results = run(vec![vec![1, -1, -1, 1]], chain);
        // By hand (one kernel direction t): mon 64 - 4t, t <= 5 -> 44 at (5, 2, 0, 4).
        let objectives: Vec<Option<i128>> = results
            .iter()
            .map(|r| match &r.outcome {
                DayOutcome::Solved(Verdict::Solved(s)) => s.objective,
                other => panic!("{other:?}"),
            })
            .collect();
        assert_eq!(objectives[0], Some(44), "chain {chain}");
        assert!(objectives.iter().all(Option::is_some), "chain {chain}");
    }
}

#[test]
fn a_move_outside_the_kernel_never_yields_a_certified_day() {
    // (0, 0, 0, -1) lowers x_4 at a gain of 3 per unit but changes row 3 of A x, so a solve
    // that uses it leaves the fibre; the re-check must turn every such day into an error.
    let rhs = [[7, 5, 6], [8, 5, 6], [8, 6, 5]];
    let model = lane_plan();
    for chain in [false, true] {
        let results = run(vec![vec![1, -1, -1, 1], vec![0, 0, 0, -1]], chain);
        let mut refuted = 0;
        for (r, b) in results.iter().zip(&rhs) {
            match &r.outcome {
                DayOutcome::Failed(Error::Refuted { why, .. }) => {
                    assert!(why.contains("row 2 of A x is"), "{why}");
                    refuted += 1;
                }
                DayOutcome::Solved(Verdict::Solved(s)) => {
                    assert_eq!(model.matrix.first_unmet_row(&s.x, b), None, "{r:?}")
                }
                other => panic!("{other:?}"),
            }
        }
        assert_eq!(
            refuted, 3,
            "chain {chain}: every optimum has x_4 > 0: {results:?}"
        );
    }
}
