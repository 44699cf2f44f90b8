//! Every status a solve can end in, on instances small enough to check by hand.

use std::cell::Cell;

use augment::{
    solve, solve_with_cancel, Coverage, InfeasibleReason, MoveSet, Objective, Options, Orientation,
    Problem, Ray, Status, Term,
};

/// `x1 - x2 = b`: the Graver basis is the single move (1, 1).
fn difference_moves(coverage: Coverage) -> MoveSet {
    MoveSet::from_rows(2, &[vec![1, 1]], coverage).unwrap()
}

/// `x1 + x2 = b`: the Graver basis is the single move (1, -1).
fn sum_moves(coverage: Coverage) -> MoveSet {
    MoveSet::from_rows(2, &[vec![1, -1]], coverage).unwrap()
}

#[test]
fn free_direction_with_negative_cost_is_an_unbounded_ray() {
    let problem =
        Problem::new(Objective::linear(vec![1, -2]), vec![None; 2], vec![None; 2]).unwrap();
    let solution = solve(
        &problem,
        &difference_moves(Coverage::Complete),
        &[3, 1],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(
        solution.status,
        Status::Unbounded(Ray {
            move_index: Some(0),
            sign: Orientation::Plus,
            direction: vec![1, 1]
        })
    );
    assert_eq!(solution.x, vec![3, 1]);
    assert_eq!(solution.objective, Some(1));
}

#[test]
fn a_bound_in_the_improving_direction_stops_the_ray() {
    // Cost (-1, 2) falls along -(1, 1), which lowers x1 >= 0: from (5, 3) the best step is 5.
    let problem = Problem::new(
        Objective::linear(vec![-1, 2]),
        vec![Some(0), None],
        vec![None; 2],
    )
    .unwrap();
    let solution = solve(
        &problem,
        &difference_moves(Coverage::Complete),
        &[5, 3],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(solution.status, Status::Optimal);
    assert_eq!(solution.x, vec![0, -2]);
    assert_eq!(solution.objective, Some(-4));
}

#[test]
fn convex_terms_with_negative_recession_are_unbounded_and_quadratic_ones_are_not() {
    let falling = Objective::separable(vec![
        Term::Linear(0),
        Term::PiecewiseLinear(vec![(0, 0), (1, -1)]),
    ])
    .unwrap();
    let problem = Problem::new(falling, vec![None; 2], vec![None; 2]).unwrap();
    let solution = solve(
        &problem,
        &difference_moves(Coverage::Complete),
        &[0, 0],
        &Options::default(),
    )
    .unwrap();
    assert!(matches!(
        solution.status,
        Status::Unbounded(Ray {
            sign: Orientation::Plus,
            ..
        })
    ));

    let growing = Objective::separable(vec![
        Term::Quadratic { a: 1, c: 0 },
        Term::PiecewiseLinear(vec![(0, 0), (1, -1)]),
    ])
    .unwrap();
    let problem = Problem::new(growing, vec![None; 2], vec![None; 2]).unwrap();
    let solution = solve(
        &problem,
        &difference_moves(Coverage::Complete),
        &[0, 0],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(solution.status, Status::Optimal);
    // phi(t) = t^2 - t: minimum 0 at t = 0 and t = 1, so no strictly improving step.
    assert_eq!(solution.x, vec![0, 0]);
}

#[test]
fn empty_box_is_proven_with_a_complete_set_only() {
    // x1 + x2 = 6 cannot hold in [0, 2]^2; the closest points have violation 2.
    let problem = Problem::new(
        Objective::linear(vec![1, 1]),
        vec![Some(0); 2],
        vec![Some(2); 2],
    )
    .unwrap();
    let complete = solve(
        &problem,
        &sum_moves(Coverage::Complete),
        &[3, 3],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(
        complete.status,
        Status::Infeasible(InfeasibleReason::NoLatticePointInBox { min_violation: 2 })
    );
    assert_eq!(complete.objective, None);
    let partial = solve(
        &problem,
        &sum_moves(Coverage::BoxValid),
        &[3, 3],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(
        partial.status,
        Status::Infeasible(InfeasibleReason::Unproven { violation: 2 })
    );
    let Status::Infeasible(reason) = complete.status else {
        unreachable!("checked above")
    };
    assert!(reason
        .to_string()
        .starts_with("no lattice point of this fibre lies in the box"));
}

#[test]
fn empty_range_is_infeasible_naming_the_variable() {
    let problem = Problem::new(
        Objective::linear(vec![1, 1]),
        vec![Some(0), Some(3)],
        vec![Some(5), Some(2)],
    )
    .unwrap();
    let solution = solve(
        &problem,
        &sum_moves(Coverage::Complete),
        &[1, 1],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(
        solution.status,
        Status::Infeasible(InfeasibleReason::EmptyRange { variable: 1 })
    );
}

#[test]
fn truncated_set_reports_optimality_up_to_its_norm() {
    let problem = Problem::new(
        Objective::linear(vec![1, 2]),
        vec![Some(0); 2],
        vec![None; 2],
    )
    .unwrap();
    let solution = solve(
        &problem,
        &sum_moves(Coverage::NormTruncated { norm: 2 }),
        &[1, 4],
        &Options::default(),
    )
    .unwrap();
    assert_eq!(solution.status, Status::OptimalForMovesUpTo(2));
    assert_eq!(solution.x, vec![5, 0]);
}

#[test]
fn step_limit_stops_before_the_step_that_exceeds_it() {
    let problem = Problem::new(
        Objective::linear(vec![1, 2]),
        vec![Some(0); 2],
        vec![None; 2],
    )
    .unwrap();
    let moves = sum_moves(Coverage::Complete);
    let stopped = solve(&problem, &moves, &[1, 4], &Options::default().max_steps(0)).unwrap();
    assert_eq!(stopped.status, Status::StepLimit);
    assert_eq!(stopped.x, vec![1, 4]);
    // An optimal start needs no step, so the same limit still proves optimality.
    let done = solve(&problem, &moves, &[5, 0], &Options::default().max_steps(0)).unwrap();
    assert_eq!(done.status, Status::Optimal);
}

#[test]
fn cancellation_hook_is_consulted_before_every_step() {
    let problem = Problem::new(
        Objective::linear(vec![1, 2]),
        vec![Some(0); 2],
        vec![None; 2],
    )
    .unwrap();
    let moves = sum_moves(Coverage::Complete);
    let calls = Cell::new(0u32);
    let never = || {
        calls.set(calls.get() + 1);
        false
    };
    let solution =
        solve_with_cancel(&problem, &moves, &[1, 4], &Options::default(), &never).unwrap();
    assert_eq!(solution.status, Status::Optimal);
    assert_eq!(u64::from(calls.get()), solution.steps() + 1);

    let at_once = || true;
    let cancelled =
        solve_with_cancel(&problem, &moves, &[1, 4], &Options::default(), &at_once).unwrap();
    assert_eq!(cancelled.status, Status::Cancelled);
    assert_eq!((cancelled.steps(), cancelled.x), (0, vec![1, 4]));
}

#[test]
fn warm_start_from_a_previous_optimum_reaches_the_fresh_optimum() {
    // Yesterday x1 + x2 = 5 with optimum (5, 0); today b = 7: add z = (2, 0) with A z = 2.
    let problem = Problem::new(
        Objective::linear(vec![3, 2]),
        vec![Some(0); 2],
        vec![Some(6); 2],
    )
    .unwrap();
    let moves = sum_moves(Coverage::Complete);
    let warm = solve(&problem, &moves, &[7, 0], &Options::default()).unwrap();
    let cold = solve(&problem, &moves, &[-10, 17], &Options::default()).unwrap();
    assert_eq!(warm.status, Status::Optimal);
    assert_eq!(warm.objective, cold.objective);
    assert_eq!(warm.x, vec![1, 6]);
}
