//! Examples solved by hand, step by step.

mod common;

use augment::{
    certify, solve, Certificate, Coverage, MoveSet, Objective, Options, Orientation, Phase,
    Problem, Status, Term, TraceStep,
};

/// Node-arc incidence of two depots (supplies) and three shops (demands); variable `x_ij`
/// (row-major) ships from depot `i` to shop `j`.
fn transport_2x3() -> Vec<Vec<i64>> {
    vec![
        vec![1, 1, 1, 0, 0, 0],
        vec![0, 0, 0, 1, 1, 1],
        vec![1, 0, 0, 1, 0, 0],
        vec![0, 1, 0, 0, 1, 0],
        vec![0, 0, 1, 0, 0, 1],
    ]
}

/// The three 4-cycles of K_{2,3}, the Graver basis of the 2x3 transport matrix (a totally
/// unimodular incidence matrix: its Graver basis is the set of cycles of the graph; Sturmfels,
/// "Gröbner Bases and Convex Polytopes", 1996, ch. 14).
fn cycles() -> Vec<Vec<i64>> {
    vec![
        vec![1, -1, 0, -1, 1, 0],
        vec![1, 0, -1, -1, 0, 1],
        vec![0, 1, -1, 0, -1, 1],
    ]
}

const COSTS: [i64; 6] = [4, 1, 3, 2, 5, 1];

fn transport_problem() -> Problem {
    Problem::new(
        Objective::linear(COSTS.to_vec()),
        vec![Some(0); 6],
        vec![None; 6],
    )
    .unwrap()
}

#[test]
fn the_2x3_graver_basis_is_its_three_cycles() {
    // l1 bound (n - r)(r + 1) Δ = (6 - 4) * 5 * 1 = 10 for this totally unimodular matrix.
    let mut found = common::graver(&transport_2x3(), 6, 10);
    found.sort();
    let mut expected = cycles();
    expected.sort();
    assert_eq!(found, expected);
}

/// From the feasible plan (0,1,2 | 1,1,0) of cost 14, cycle 2 in its + sign has cost rate
/// 1 - 3 - 5 + 1 = -6 and room min(x13, x22) = 1: one step of gain 6 reaches cost 8, where
/// every improving signed cycle must lower a zero flow. Hand computation.
#[test]
fn transport_plan_improves_in_one_graver_best_step() {
    let moves = MoveSet::from_rows(6, &cycles(), Coverage::Complete).unwrap();
    let problem = transport_problem();
    let start = [0, 1, 2, 1, 1, 0];
    assert_eq!(
        certify(&problem, &moves, &start).unwrap(),
        Certificate::Improving {
            move_index: 2,
            sign: Orientation::Plus,
            gain: 6
        }
    );
    let solution = solve(&problem, &moves, &start, &Options::default().trace(true)).unwrap();
    assert_eq!(solution.status, Status::Optimal);
    assert_eq!(solution.x, vec![0, 2, 1, 1, 0, 1]);
    assert_eq!(solution.objective, Some(8));
    assert_eq!(
        solution.trace.unwrap(),
        vec![TraceStep {
            phase: Phase::Optimality,
            move_index: 2,
            sign: Orientation::Plus,
            length: 1,
            before: 14,
            after: 8,
            gain: 6
        }]
    );
    assert_eq!(
        certify(&problem, &moves, &solution.x).unwrap(),
        Certificate::NoImprovingMove
    );
}

/// The start (3,0,0 | -2,2,2) meets the supplies and demands but ships -2 on lane (2,1).
/// Phase I: cycle 0 in its - sign raises x21 and reaches violation 0 at length 2; cycle 1 in
/// its - sign does too, and the lower index wins the tie. The result (1,2,0 | 0,0,2) costs 8,
/// which is optimal (previous test), so phase II takes no step. Hand computation.
#[test]
fn infeasible_start_is_repaired_in_phase_one() {
    let moves = MoveSet::from_rows(6, &cycles(), Coverage::Complete).unwrap();
    let solution = solve(
        &transport_problem(),
        &moves,
        &[3, 0, 0, -2, 2, 2],
        &Options::default().trace(true),
    )
    .unwrap();
    assert_eq!(solution.status, Status::Optimal);
    assert_eq!(solution.x, vec![1, 2, 0, 0, 0, 2]);
    assert_eq!(solution.objective, Some(8));
    assert_eq!(
        (solution.feasibility_steps, solution.optimality_steps),
        (1, 0)
    );
    let trace = solution.trace.unwrap();
    assert_eq!(
        (
            trace[0].phase,
            trace[0].move_index,
            trace[0].sign,
            trace[0].length
        ),
        (Phase::Feasibility, 0, Orientation::Minus, 2)
    );
    assert_eq!((trace[0].before, trace[0].after), (2, 0));
}

/// `x1 - x2 = b` with both variables free, `f = x1^2 - 3 x2`; the only Graver element is
/// (1, 1). Along it from (0, 0), `phi(t) = t^2 - 3t` takes its minimum -2 at t = 1 and t = 2;
/// the line search returns the smaller. At (1, 1), `phi(t) = t^2 - t` (+) and `t^2 + t` (-)
/// do not improve. Hand computation.
#[test]
fn quadratic_line_search_takes_the_smallest_minimiser() {
    let moves = MoveSet::from_rows(2, &[vec![1, 1]], Coverage::Complete).unwrap();
    let objective =
        Objective::separable(vec![Term::Quadratic { a: 1, c: 0 }, Term::Linear(-3)]).unwrap();
    let problem = Problem::new(objective, vec![None; 2], vec![None; 2]).unwrap();
    let solution = solve(&problem, &moves, &[0, 0], &Options::default()).unwrap();
    assert_eq!(solution.status, Status::Optimal);
    assert_eq!(solution.x, vec![1, 1]);
    assert_eq!(solution.objective, Some(-2));
    assert_eq!(solution.optimality_steps, 1);
}

/// Piecewise-linear congestion cost on one lane: `x1 + x2 = 10`, `f1` with breakpoints
/// (0,0), (4,4), (6,10) (slopes 1 then 3), `f2 = 2 x2`. Moving a unit from x2 to x1 gains
/// 2 - 1 = 1 up to x1 = 4, then loses 3 - 2 = 1: the optimum is x = (4, 6), cost 4 + 12 = 16.
/// The exact search does it in one step from (1, 9). Hand computation.
#[test]
fn piecewise_linear_optimum_sits_on_a_breakpoint() {
    let moves = MoveSet::from_rows(2, &[vec![1, -1]], Coverage::Complete).unwrap();
    let objective = Objective::separable(vec![
        Term::PiecewiseLinear(vec![(0, 0), (4, 4), (6, 10)]),
        Term::Linear(2),
    ])
    .unwrap();
    let problem = Problem::new(objective, vec![Some(0); 2], vec![None; 2]).unwrap();
    let solution = solve(&problem, &moves, &[1, 9], &Options::default()).unwrap();
    assert_eq!(solution.x, vec![4, 6]);
    assert_eq!(solution.objective, Some(16));
    assert_eq!(solution.optimality_steps, 1);
    // Powers of two: phi(1), phi(2), phi(4) = 18, 17, 17 from 19, so length 2 (ties keep the
    // shorter step) to (3, 7), then length 1 to (4, 6).
    let options = Options::default().powers_of_two(true).trace(true);
    let doubling = solve(&problem, &moves, &[1, 9], &options).unwrap();
    assert_eq!(doubling.x, vec![4, 6]);
    let lengths: Vec<i64> = doubling.trace.unwrap().iter().map(|s| s.length).collect();
    assert_eq!(lengths, vec![2, 1]);
}
