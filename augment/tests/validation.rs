//! Bad input is a typed error naming what is wrong; overflow is an error, never a wrong answer.

use augment::{
    certify, solve, AugmentError, Certificate, Coverage, MoveSet, Objective, Options, Problem, Term,
};

#[test]
fn non_convex_terms_are_rejected_naming_the_variable() {
    let err = Objective::separable(vec![
        Term::Linear(1),
        Term::Quadratic { a: 0, c: 2 },
        Term::PiecewiseLinear(vec![(0, 0), (2, 6), (3, 7)]),
    ])
    .unwrap_err();
    assert_eq!(
        err,
        AugmentError::NotConvex {
            variable: 2,
            at: 2,
            left: 3,
            right: 1
        }
    );
    assert!(err
        .to_string()
        .starts_with("variable 2: not convex at x = 2"));

    let cases = [
        (
            Term::Quadratic { a: -1, c: 0 },
            AugmentError::NegativeQuadratic { variable: 0, a: -1 },
        ),
        (
            Term::PiecewiseLinear(vec![(1, 1)]),
            AugmentError::TooFewBreakpoints {
                variable: 0,
                count: 1,
            },
        ),
        (
            Term::PiecewiseLinear(vec![(1, 1), (1, 2)]),
            AugmentError::UnsortedBreakpoints {
                variable: 0,
                previous: 1,
                x: 1,
            },
        ),
        (
            Term::PiecewiseLinear(vec![(0, 0), (2, 1)]),
            AugmentError::FractionalSlope {
                variable: 0,
                from: 0,
                to: 2,
            },
        ),
    ];
    for (term, expected) in cases {
        assert_eq!(Objective::separable(vec![term]).unwrap_err(), expected);
    }
}

#[test]
fn malformed_move_sets_are_rejected() {
    assert_eq!(
        MoveSet::new(3, &[1, -1], Coverage::Complete).unwrap_err(),
        AugmentError::RaggedMoves { len: 2, width: 3 }
    );
    assert_eq!(
        MoveSet::from_rows(2, &[vec![1, -1], vec![0, 0]], Coverage::Complete).unwrap_err(),
        AugmentError::ZeroMove { index: 1 }
    );
    assert_eq!(
        MoveSet::from_rows(2, &[vec![1, -1, 0]], Coverage::Complete).unwrap_err(),
        AugmentError::Dimension {
            what: "move",
            expected: 2,
            found: 3
        }
    );
}

#[test]
fn lengths_must_agree() {
    assert_eq!(
        Problem::new(Objective::linear(vec![1, 2]), vec![None], vec![None; 2]).unwrap_err(),
        AugmentError::Dimension {
            what: "lower",
            expected: 2,
            found: 1
        }
    );
    let problem =
        Problem::new(Objective::linear(vec![1, 2]), vec![None; 2], vec![None; 2]).unwrap();
    let moves = MoveSet::from_rows(2, &[vec![1, -1]], Coverage::Complete).unwrap();
    assert_eq!(
        solve(&problem, &moves, &[1, 2, 3], &Options::default()).unwrap_err(),
        AugmentError::Dimension {
            what: "x0",
            expected: 2,
            found: 3
        }
    );
    let wide = MoveSet::from_rows(3, &[vec![1, -1, 0]], Coverage::Complete).unwrap();
    assert_eq!(
        solve(&problem, &wide, &[1, 2], &Options::default()).unwrap_err(),
        AugmentError::Dimension {
            what: "move width",
            expected: 2,
            found: 3
        }
    );
}

#[test]
fn overflow_is_an_error() {
    // (2^62)^2 * (2^63 - 1) does not fit in i128.
    let objective =
        Objective::separable(vec![Term::Quadratic { a: i64::MAX, c: 0 }, Term::Linear(0)]).unwrap();
    let problem = Problem::new(objective, vec![None; 2], vec![None; 2]).unwrap();
    let moves = MoveSet::from_rows(2, &[vec![1, -1]], Coverage::Complete).unwrap();
    let big = 1i64 << 62;
    assert!(matches!(
        solve(&problem, &moves, &[big, 0], &Options::default()),
        Err(AugmentError::Overflow { .. })
    ));
    assert!(matches!(
        certify(&problem, &moves, &[big, 0]),
        Err(AugmentError::Overflow { .. })
    ));
    // A norm beyond i64 is rejected, and so is a step that pushes a coordinate past i64::MAX.
    assert!(matches!(
        MoveSet::from_rows(2, &[vec![i64::MAX, -1]], Coverage::Complete),
        Err(AugmentError::Overflow { .. })
    ));
    let linear = Problem::new(
        Objective::linear(vec![-1, 0]),
        vec![None, Some(-5)],
        vec![None, Some(0)],
    )
    .unwrap();
    let steep = MoveSet::from_rows(2, &[vec![i64::MAX - 1, -1]], Coverage::Complete).unwrap();
    assert!(matches!(
        solve(&linear, &steep, &[2, 0], &Options::default()),
        Err(AugmentError::Overflow { .. })
    ));
}

#[test]
fn certificate_reports_points_outside_the_box() {
    let problem = Problem::new(
        Objective::linear(vec![1, 2]),
        vec![Some(0); 2],
        vec![None; 2],
    )
    .unwrap();
    let moves = MoveSet::from_rows(2, &[vec![1, -1]], Coverage::Complete).unwrap();
    assert_eq!(
        certify(&problem, &moves, &[3, -1]).unwrap(),
        Certificate::OutsideBox { variable: 1 }
    );
}
