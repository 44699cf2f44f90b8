//! Property tests against brute force on tiny boxed instances: the Graver basis comes from
//! kernel enumeration, the optimum from enumerating the box.

mod common;
#[path = "../../tests/proptest_cases/mod.rs"]
mod proptest_cases;

use proptest_cases::Class;

use std::sync::Arc;

use augment::{
    certify, solve, solve_fitted, Certificate, Coverage, Fitting, InfeasibleReason, MoveSet,
    Objective, Options, Problem, Rule, Solution, Status, Term,
};
use common::{brute_force, graver, times};
use proptest::prelude::*;

/// A tiny instance: matrix, l1 bound on its Graver elements, box, start point.
#[derive(Debug, Clone)]
struct Instance {
    a: Vec<Vec<i64>>,
    bound: i64,
    lower: Vec<i64>,
    upper: Vec<i64>,
    x0: Vec<i64>,
}

/// Matrices whose Graver elements have l1 norm below `(n - r)(r + 1) Δ` (circuit bound, as in
/// De Loera, Hemmecke, Köppe 2013, ch. 3): 1x3 and 1x4 rows with entries in -2..=2
/// (r = 1, Δ <= 2: bounds 8 and 12) and 2x4 matrices with entries in -1..=1 (Δ <= 2 at rank 2,
/// Δ = 1 at rank 1: bound 12).
fn matrix() -> impl Strategy<Value = (Vec<Vec<i64>>, i64)> {
    prop_oneof![
        prop::collection::vec(-2i64..=2, 3).prop_map(|row| (vec![row], 8)),
        prop::collection::vec(-2i64..=2, 4).prop_map(|row| (vec![row], 12)),
        prop::collection::vec(prop::collection::vec(-1i64..=1, 4), 2).prop_map(|a| (a, 12)),
    ]
    .prop_filter("nonzero matrix", |(a, _)| {
        a.iter().flatten().any(|&e| e != 0)
    })
}

fn instance() -> impl Strategy<Value = Instance> {
    matrix().prop_flat_map(|(a, bound)| {
        let n = a[0].len();
        (
            prop::collection::vec((-2i64..=1, 0i64..=3), n),
            prop::collection::vec(-4i64..=4, n),
        )
            .prop_map(move |(ranges, x0)| Instance {
                a: a.clone(),
                bound,
                lower: ranges.iter().map(|r| r.0).collect(),
                upper: ranges.iter().map(|r| r.0 + r.1).collect(),
                x0,
            })
    })
}

/// A convex piecewise-linear term: increasing abscissae, nondecreasing integer slopes.
fn piecewise() -> impl Strategy<Value = Term> {
    (
        -3i64..=3,
        -5i64..=5,
        prop::collection::vec((1i64..=3, -4i64..=4), 1..=3),
    )
        .prop_map(|(x, y, segments)| {
            let mut slopes: Vec<i64> = segments.iter().map(|s| s.1).collect();
            slopes.sort_unstable();
            let mut points = vec![(x, y)];
            for (gap, slope) in segments.iter().map(|s| s.0).zip(slopes) {
                let &(px, py) = points.last().expect("starts nonempty");
                points.push((px + gap, py + slope * gap));
            }
            Term::PiecewiseLinear(points)
        })
}

fn term() -> impl Strategy<Value = Term> {
    prop_oneof![
        (-5i64..=5).prop_map(Term::Linear),
        (0i64..=3, -6i64..=6).prop_map(|(a, c)| Term::Quadratic { a, c }),
        piecewise(),
    ]
}

fn objective(n: usize) -> impl Strategy<Value = Objective> {
    prop_oneof![
        prop::collection::vec(-5i64..=5, n).prop_map(Objective::linear),
        prop::collection::vec(term(), n)
            .prop_map(|terms| Objective::separable(terms).expect("convex by construction")),
    ]
}

fn case() -> impl Strategy<Value = (Instance, Objective)> {
    instance().prop_flat_map(|inst| {
        let n = inst.x0.len();
        (Just(inst), objective(n))
    })
}

fn problem(inst: &Instance, objective: Objective) -> Problem {
    Problem::new(
        objective,
        inst.lower.iter().copied().map(Some).collect(),
        inst.upper.iter().copied().map(Some).collect(),
    )
    .expect("matching lengths")
}

/// A case with a code per variable for [`opened`].
fn case_with_free() -> impl Strategy<Value = ((Instance, Objective), Vec<u8>)> {
    case().prop_flat_map(|c| {
        let n = c.0.x0.len();
        (Just(c), prop::collection::vec(0u8..6, n))
    })
}

/// The problem of `inst` with some bounds removed, so that rays occur too: per variable, code
/// 0 removes the lower bound, 1 the upper bound, anything else keeps both.
fn opened(inst: &Instance, objective: Objective, free: &[u8]) -> Problem {
    let n = inst.x0.len();
    let lower = (0..n)
        .map(|i| (free[i] != 0).then_some(inst.lower[i]))
        .collect();
    let upper = (0..n)
        .map(|i| (free[i] != 1).then_some(inst.upper[i]))
        .collect();
    Problem::new(objective, lower, upper).unwrap()
}

/// Everything but the wall-clock time.
fn comparable(s: &Solution) -> Solution {
    Solution {
        elapsed: Default::default(),
        ..s.clone()
    }
}

/// A tiny instance with linear costs.
fn linear_case() -> impl Strategy<Value = (Instance, Vec<i64>)> {
    instance().prop_flat_map(|inst| {
        let n = inst.x0.len();
        (Just(inst), prop::collection::vec(-5i64..=5, n))
    })
}

/// The traced solutions of `inst` with linear `costs` over its Graver basis, and of the same
/// instance padded to `width` variables (free, cost 0, start 0) with the `extra` moves added.
fn padded_solutions(
    inst: &Instance,
    costs: &[i64],
    width: usize,
    extra: &[Vec<i64>],
) -> (Solution, Solution) {
    let n = inst.x0.len();
    let pad = |r: &[i64]| [r, &vec![0; width - n]].concat();
    let rows = graver(&inst.a, n, inst.bound);
    let mut padded_rows: Vec<Vec<i64>> = rows.iter().map(|r| pad(r)).collect();
    padded_rows.extend_from_slice(extra);
    let narrow = MoveSet::from_rows(n, &rows, Coverage::Complete).unwrap();
    let padded = MoveSet::from_rows(width, &padded_rows, Coverage::Complete).unwrap();
    let plain = problem(inst, Objective::linear(costs.to_vec()));
    let free = std::iter::repeat_n(None, width - n);
    let padded_problem = Problem::new(
        Objective::linear(pad(costs)),
        plain.lower().iter().copied().chain(free.clone()).collect(),
        plain.upper().iter().copied().chain(free).collect(),
    )
    .unwrap();
    let options = Options::default().trace(true);
    (
        solve(&plain, &narrow, &inst.x0, &options).unwrap(),
        solve(&padded_problem, &padded, &pad(&inst.x0), &options).unwrap(),
    )
}

/// The sequential solve, after checking that the parallel one returns exactly the same.
fn sequential_equals_parallel(
    problem: &Problem,
    moves: &MoveSet,
    x0: &[i64],
    options: &Options,
) -> Result<Solution, TestCaseError> {
    let sequential = solve(problem, moves, x0, options).unwrap();
    let parallel = solve(problem, moves, x0, &options.parallel(true)).unwrap();
    prop_assert_eq!(comparable(&sequential), comparable(&parallel));
    Ok(sequential)
}

/// Moves in the long sets: more than three chunks of the parallel scan (256 moves each).
const LONG: usize = 800;

/// `count` moves cycling through `rows`, each round scaled by the next of 1, 2, 3: the same
/// steps and their multiples at indices far apart (empty when `rows` is).
fn repeated(rows: &[Vec<i64>], count: usize) -> Vec<Vec<i64>> {
    if rows.is_empty() {
        return Vec::new();
    }
    (0..count)
        .map(|k| {
            let factor = 1 + (k / rows.len()) as i64 % 3;
            rows[k % rows.len()].iter().map(|v| v * factor).collect()
        })
        .collect()
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Augmentation))]

    /// Graver-best with the complete basis matches the enumerated optimum, or proves the box
    /// empty exactly when enumeration finds no point; an optimum is certified and in the fibre.
    #[test]
    fn complete_set_matches_brute_force((inst, objective) in case()) {
        let n = inst.x0.len();
        let moves = MoveSet::from_rows(n, &graver(&inst.a, n, inst.bound), Coverage::Complete).unwrap();
        let b = times(&inst.a, &inst.x0);
        let expected = brute_force(&inst.a, &b, &inst.lower, &inst.upper, &objective);
        let problem = problem(&inst, objective);
        let solution = solve(&problem, &moves, &inst.x0, &Options::default()).unwrap();
        match expected {
            None => {
                let proven = matches!(
                    solution.status,
                    Status::Infeasible(InfeasibleReason::NoLatticePointInBox { min_violation }) if min_violation > 0
                );
                prop_assert!(proven, "expected a proof of infeasibility, got {:?}", solution.status);
            }
            Some(best) => {
                prop_assert_eq!(&solution.status, &Status::Optimal);
                prop_assert_eq!(solution.objective, Some(best));
                prop_assert_eq!(times(&inst.a, &solution.x), b);
                prop_assert_eq!(solution.violation, 0);
                prop_assert_eq!(certify(&problem, &moves, &solution.x).unwrap(), Certificate::NoImprovingMove);
            }
        }
    }

    /// Every rule, with and without power-of-two steps, reaches the same optimal value, and the
    /// parallel scan returns exactly the sequential solution, trace included, for linear and
    /// separable objectives: over the basis, and over a long set (the basis repeated with
    /// multiples, so that equal and rival moves fall into different parallel chunks) in the box
    /// and with some bounds removed (rays).
    #[test]
    fn rules_agree_and_parallel_equals_sequential(((inst, objective), free) in case_with_free()) {
        let n = inst.x0.len();
        let rows = graver(&inst.a, n, inst.bound);
        let moves = MoveSet::from_rows(n, &rows, Coverage::Complete).unwrap();
        let long = MoveSet::from_rows(n, &repeated(&rows, LONG), Coverage::Complete).unwrap();
        let open = opened(&inst, objective.clone(), &free);
        let problem = problem(&inst, objective);
        let reference = solve(&problem, &moves, &inst.x0, &Options::default()).unwrap();
        for rule in [Rule::GraverBest, Rule::FirstImproving, Rule::Steepest] {
            for powers in [false, true] {
                let options = Options::default().rule(rule).powers_of_two(powers).trace(true);
                for (problem, set) in [(&problem, &long), (&open, &long), (&open, &moves)] {
                    sequential_equals_parallel(problem, set, &inst.x0, &options)?;
                }
                let sequential = sequential_equals_parallel(&problem, &moves, &inst.x0, &options)?;
                prop_assert_eq!(sequential.objective.is_some(), reference.objective.is_some());
                if reference.status == Status::Optimal {
                    prop_assert_eq!(sequential.objective, reference.objective);
                }
                let trace = sequential.trace.unwrap();
                prop_assert_eq!(trace.len() as u64, sequential.feasibility_steps + sequential.optimality_steps);
                prop_assert!(trace.iter().all(|s| s.gain > 0 && s.before - s.after == s.gain && s.length >= 1));
                prop_assert!(!powers || trace.iter().all(|s| s.length.count_ones() == 1));
            }
        }
    }

    /// A set whose entries do not fit the scan's compact forms (here one extra move with an
    /// entry of 300 on an extra free variable of cost 0, which can never improve) takes the
    /// general paths for rates and rooms and returns exactly the same solution, trace included.
    #[test]
    fn wide_entries_take_the_general_path_with_the_same_result((inst, costs) in linear_case()) {
        let n = inst.x0.len();
        let (narrow, wide) = padded_solutions(&inst, &costs, n + 1, &[[vec![0; n], vec![300]].concat()]);
        prop_assert_eq!(&wide.status, &narrow.status);
        prop_assert_eq!(&wide.x[..n], &narrow.x[..]);
        prop_assert_eq!(wide.trace, narrow.trace);
    }

    /// Phase II over only the moves that fit the box selects exactly what the whole set
    /// selects, for every rule and objective (trace and ray indices refer to the whole set),
    /// with some bounds removed so that rays occur too.
    #[test]
    fn the_moves_that_fit_the_box_give_the_same_solution(
        ((inst, objective), free) in case_with_free()
    ) {
        let n = inst.x0.len();
        let set = Arc::new(MoveSet::from_rows(n, &graver(&inst.a, n, inst.bound), Coverage::Complete).unwrap());
        let problem = opened(&inst, objective, &free);
        let fitting = Fitting::new(set.clone(), &problem).unwrap();
        for rule in [Rule::GraverBest, Rule::FirstImproving, Rule::Steepest] {
            let options = Options::default().rule(rule).trace(true);
            let whole = solve(&problem, &set, &inst.x0, &options).unwrap();
            let fitted = solve_fitted(&problem, &fitting, &inst.x0, &options, &|| false).unwrap();
            prop_assert_eq!(comparable(&whole), comparable(&fitted));
        }
    }

    /// The packed masks of small sets (with their room bounds before a support is read) and
    /// the split masks of wide sets select the same steps: the same instance padded to 40
    /// variables (free, cost 0, in no move) gives the same trace.
    #[test]
    fn packed_and_split_masks_select_the_same_steps((inst, costs) in linear_case()) {
        let n = inst.x0.len();
        let (packed, split) = padded_solutions(&inst, &costs, 40, &[]);
        prop_assert_eq!(&split.status, &packed.status);
        prop_assert_eq!(&split.x[..n], &packed.x[..]);
        prop_assert_eq!(split.trace, packed.trace);
    }

    /// A set truncated to the box (|g_i| <= u_i - l_i) still solves every start inside the box.
    #[test]
    fn box_truncated_set_is_enough_inside_the_box((inst, objective) in case()) {
        let n = inst.x0.len();
        let widths: Vec<i64> = inst.lower.iter().zip(&inst.upper).map(|(l, u)| u - l).collect();
        let truncated: Vec<Vec<i64>> = graver(&inst.a, n, inst.bound)
            .into_iter()
            .filter(|g| g.iter().zip(&widths).all(|(e, w)| e.abs() <= *w))
            .collect();
        let start: Vec<i64> = inst.x0.iter().zip(inst.lower.iter().zip(&inst.upper))
            .map(|(&v, (&l, &u))| v.clamp(l, u)).collect();
        let b = times(&inst.a, &start);
        let expected = brute_force(&inst.a, &b, &inst.lower, &inst.upper, &objective);
        let problem = problem(&inst, objective);
        if truncated.is_empty() {
            return Ok(());
        }
        let moves = MoveSet::from_rows(n, &truncated, Coverage::BoxValid).unwrap();
        let solution = solve(&problem, &moves, &start, &Options::default()).unwrap();
        prop_assert_eq!(solution.status, Status::Optimal);
        prop_assert_eq!(solution.objective, expected);
    }
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::WideAugmentation))]

    /// With some bounds removed, every rule agrees on whether the problem is unbounded, and a
    /// reported ray is a kernel vector along which the point stays feasible and the linear
    /// objective falls; otherwise the result is certified.
    #[test]
    fn rays_are_genuine_and_found_by_every_rule(
        (inst, costs, free) in instance().prop_flat_map(|inst| {
            let n = inst.x0.len();
            (Just(inst), prop::collection::vec(-5i64..=5, n), prop::collection::vec(0u8..4, n))
        })
    ) {
        let n = inst.x0.len();
        let moves = MoveSet::from_rows(n, &graver(&inst.a, n, inst.bound), Coverage::Complete).unwrap();
        // 0: lower removed, 1: upper removed, 2: both removed, 3: kept.
        let lower = (0..n).map(|i| (free[i] % 2 == 1 || free[i] == 3).then_some(inst.lower[i])).collect();
        let upper = (0..n).map(|i| (free[i] == 0 || free[i] == 3).then_some(inst.upper[i])).collect();
        let problem = Problem::new(Objective::linear(costs.clone()), lower, upper).unwrap();
        let mut unbounded = Vec::new();
        for rule in [Rule::GraverBest, Rule::FirstImproving, Rule::Steepest] {
            let solution = solve(&problem, &moves, &inst.x0, &Options::default().rule(rule)).unwrap();
            prop_assert!(solution.status != Status::StepLimit);
            unbounded.push(matches!(solution.status, Status::Unbounded(_)));
            match &solution.status {
                Status::Unbounded(ray) => {
                    prop_assert!(times(&inst.a, &ray.direction).iter().all(|&e| e == 0));
                    let rate: i64 = costs.iter().zip(&ray.direction).map(|(c, d)| c * d).sum();
                    prop_assert!(rate < 0);
                    let far: Vec<i64> = solution.x.iter().zip(&ray.direction).map(|(x, d)| x + 1000 * d).collect();
                    prop_assert!(problem.in_box(&solution.x) && problem.in_box(&far));
                }
                Status::Optimal => prop_assert_eq!(
                    certify(&problem, &moves, &solution.x).unwrap(),
                    Certificate::NoImprovingMove
                ),
                other => {
                    let infeasible = matches!(other, Status::Infeasible(_));
                    prop_assert!(infeasible, "unexpected {:?}", other);
                }
            }
        }
        prop_assert!(unbounded.iter().all(|&u| u == unbounded[0]));
    }
}
