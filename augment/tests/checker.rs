//! The checker's sparse, mask-filtered tests against a dense oracle that tries every move in
//! both signs on whole vectors (the definition of the test-set property, Murota, Saito,
//! Weismantel 2004): both find the same first improving (or violation-lowering) signed move.

#[path = "../../tests/proptest_cases/mod.rs"]
mod proptest_cases;
use proptest_cases::Class;

use augment::{
    Certificate, Checker, Coverage, Decrease, MoveSet, Objective, Orientation, Problem, Term,
};
use proptest::prelude::*;

/// Random moves (any integer vectors: the checks do not need a kernel), a box with some
/// infinite sides, a point and an objective over 3 to 70 variables (one and two mask words).
#[derive(Debug, Clone)]
struct Case {
    moves: Vec<Vec<i64>>,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
    x: Vec<i64>,
    costs: Vec<i64>,
    convex: bool,
}

fn bound() -> impl Strategy<Value = Option<i64>> {
    prop_oneof![3 => (-3i64..=3).prop_map(Some), 1 => Just(None)]
}

fn case() -> impl Strategy<Value = Case> {
    prop_oneof![3..=6usize, 62..=70usize].prop_flat_map(|n| {
        let sparse = prop_oneof![4 => Just(0i64), 1 => -2i64..=2];
        (
            prop::collection::vec(prop::collection::vec(sparse, n), 1..12),
            prop::collection::vec((bound(), bound()), n),
            prop::collection::vec(-4i64..=4, n),
            prop::collection::vec(-5i64..=5, n),
            any::<bool>(),
            any::<bool>(),
        )
            .prop_map(move |(moves, bounds, x, costs, convex, wide)| Case {
                // A move with an entry over 255 makes the set keep its entries in the wide
                // form instead of the packed one.
                moves: moves
                    .into_iter()
                    .chain(wide.then(|| [vec![300], vec![-1; n - 1]].concat()))
                    .filter(|m| m.iter().any(|&v| v != 0))
                    .collect(),
                lower: bounds
                    .iter()
                    .map(|b| match b {
                        (Some(l), Some(u)) => Some(*l.min(u)),
                        (l, _) => *l,
                    })
                    .collect(),
                upper: bounds
                    .iter()
                    .map(|b| match b {
                        (Some(l), Some(u)) => Some(*l.max(u)),
                        (_, u) => *u,
                    })
                    .collect(),
                x,
                costs,
                convex,
            })
    })
}

impl Case {
    fn problem(&self) -> Problem {
        let objective = if self.convex {
            // A convex term per variable: c x + |x - 1| (slopes c - 1, c + 1 around 1).
            let terms = self
                .costs
                .iter()
                .map(|&c| Term::PiecewiseLinear(vec![(0, 1), (1, c), (2, 2 * c + 1)]))
                .collect();
            Objective::separable(terms).unwrap()
        } else {
            Objective::linear(self.costs.clone())
        };
        Problem::new(objective, self.lower.clone(), self.upper.clone()).unwrap()
    }

    fn set(&self) -> MoveSet {
        MoveSet::from_rows(self.x.len(), &self.moves, Coverage::Complete).unwrap()
    }
}

fn shifted(x: &[i64], g: &[i64], sign: Orientation) -> Vec<i64> {
    x.iter()
        .zip(g)
        .map(|(a, b)| a + sign.factor() * b)
        .collect()
}

/// Dense oracle of [`Checker::certify`].
fn certify_oracle(problem: &Problem, moves: &[Vec<i64>], x: &[i64]) -> Certificate {
    if let Some(variable) = problem.first_outside(x) {
        return Certificate::OutsideBox { variable };
    }
    let base = problem.objective().value(x).unwrap();
    for (move_index, g) in moves.iter().enumerate() {
        for sign in Orientation::BOTH {
            let y = shifted(x, g, sign);
            let gain = base - problem.objective().value(&y).unwrap();
            if problem.in_box(&y) && gain > 0 {
                return Certificate::Improving {
                    move_index,
                    sign,
                    gain,
                };
            }
        }
    }
    Certificate::NoImprovingMove
}

/// Dense oracle of [`Checker::violation_decrease`].
fn decrease_oracle(problem: &Problem, moves: &[Vec<i64>], x: &[i64]) -> Option<Decrease> {
    let base = problem.violation(x).unwrap();
    for (move_index, g) in moves.iter().enumerate() {
        for sign in Orientation::BOTH {
            let amount = base - problem.violation(&shifted(x, g, sign)).unwrap();
            if amount > 0 {
                return Some(Decrease {
                    move_index,
                    sign,
                    amount,
                });
            }
        }
    }
    None
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Checks))]

    #[test]
    fn checker_agrees_with_the_dense_oracle(case in case()) {
        let problem = case.problem();
        let checker = Checker::new(std::sync::Arc::new(case.set()));
        prop_assert_eq!(checker.len(), case.moves.len());
        // Inside the box as well as outside: clamp the point for the optimality check.
        let clamped: Vec<i64> = case
            .x
            .iter()
            .enumerate()
            .map(|(i, &v)| {
                let v = case.lower[i].map_or(v, |l| v.max(l));
                case.upper[i].map_or(v, |u| v.min(u))
            })
            .collect();
        for x in [&case.x, &clamped] {
            prop_assert_eq!(
                checker.certify(&problem, x).unwrap(),
                certify_oracle(&problem, &case.moves, x)
            );
            prop_assert_eq!(
                checker.violation_decrease(&problem, x).unwrap(),
                decrease_oracle(&problem, &case.moves, x)
            );
        }
    }
}
