//! Separable convex (piecewise-linear) costs from model files, solved with the complete Graver
//! basis, against brute force over the box: the Graver basis is a test set for separable
//! convex objectives (Murota, Saito, Weismantel 2004), so the augmentation's optimum must be
//! the enumerated one, and every answer must pass the independent re-check.

mod completion_support;
mod proptest_cases;

use proptest_cases::Class;

use augment::{Coverage, Options, Status};
use completion_support::graver;
use kernstep::completion::Method;
use kernstep::model::{Model, ModelKind};
use kernstep::solve::{Numbers, Prepared, Verdict};
use kernstep::trace::recheck;
use proptest::prelude::*;
use serde_json::json;

/// A small model: a 1 x 3 or 2 x 4 matrix with entries in -2..=2, a box of width <= 4, linear
/// costs, and convex costs on some variables.
#[derive(Debug, Clone)]
struct Case {
    matrix: Vec<Vec<i64>>,
    lower: Vec<i64>,
    width: Vec<i64>,
    x: Vec<i64>,
    cost: Vec<i64>,
    convex: Vec<Option<(Vec<i64>, Vec<i64>)>>,
}

/// Breaks increasing in -3..=4 and nondecreasing slopes in -4..=6.
fn pieces() -> impl Strategy<Value = (Vec<i64>, Vec<i64>)> {
    (
        prop::collection::btree_set(-3i64..=4, 0..3),
        prop::collection::vec(0i64..=3, 3),
        -4i64..=2,
    )
        .prop_map(|(breaks, rises, first)| {
            let breaks: Vec<i64> = breaks.into_iter().collect();
            let mut slopes = vec![first];
            for rise in rises.iter().take(breaks.len()) {
                slopes.push(slopes.last().unwrap() + rise);
            }
            (breaks, slopes)
        })
}

fn case() -> impl Strategy<Value = Case> {
    let shape = prop_oneof![Just((1usize, 3usize)), Just((2, 4))];
    shape
        .prop_flat_map(|(m, n)| {
            (
                prop::collection::vec(prop::collection::vec(-2i64..=2, n), m),
                prop::collection::vec(-2i64..=1, n),
                prop::collection::vec(0i64..=4, n),
                prop::collection::vec(0i64..=4, n),
                prop::collection::vec(-3i64..=3, n),
                prop::collection::vec(prop::option::weighted(0.6, pieces()), n),
            )
                .prop_map(|(matrix, lower, width, x, cost, convex)| Case {
                    matrix,
                    lower,
                    width,
                    x,
                    cost,
                    convex,
                })
        })
        .prop_filter("a matrix of full row rank-ish: no zero row", |c| {
            c.matrix.iter().all(|r| r.iter().any(|&v| v != 0))
        })
}

impl Case {
    fn upper(&self) -> Vec<i64> {
        self.lower
            .iter()
            .zip(&self.width)
            .map(|(l, w)| l + w)
            .collect()
    }

    /// The right-hand side of a point of the box (so that most cases are feasible).
    fn rhs(&self) -> Vec<i64> {
        let x: Vec<i64> = self
            .lower
            .iter()
            .zip(&self.x)
            .map(|(l, v)| l + v.min(&4))
            .collect();
        self.matrix
            .iter()
            .map(|r| r.iter().zip(&x).map(|(a, v)| a * v).sum())
            .collect()
    }

    fn model(&self) -> Model {
        let names: Vec<String> = (1..=self.cost.len()).map(|i| format!("x{i}")).collect();
        let convex: serde_json::Map<String, serde_json::Value> = self
            .convex
            .iter()
            .zip(&names)
            .filter_map(|(p, name)| {
                p.as_ref()
                    .map(|(b, s)| (name.clone(), json!({"breaks": b, "slopes": s})))
            })
            .collect();
        let text = json!({
            "matrix": self.matrix, "rhs": self.rhs(), "cost": self.cost,
            "lower": self.lower, "upper": self.upper(), "convex_cost": convex,
        });
        Model::from_str(&text.to_string(), ModelKind::Json, "case.json").unwrap()
    }

    /// The cost of `x`, from the module documentation's closed form written out again:
    /// `p(x) = sum over segments of slope x (signed length of the segment inside [0, x])`.
    fn cost_of(&self, x: &[i64]) -> i64 {
        let mut total = 0;
        for (i, &v) in x.iter().enumerate() {
            total += self.cost[i] * v;
            if let Some((breaks, slopes)) = &self.convex[i] {
                // Walk unit by unit from 0 to v: the marginal cost of the unit (t, t + 1] is
                // the slope of the segment holding it.
                let slope_at = |t: i64| slopes[breaks.iter().filter(|&&b| b <= t).count()];
                let (from, to, sign) = if v >= 0 { (0, v, 1) } else { (v, 0, -1) };
                total += sign * (from..to).map(slope_at).sum::<i64>();
            }
        }
        total
    }

    /// The minimum over the box by enumeration, or `None` when no point meets `A x = b`.
    fn brute_force(&self) -> Option<i64> {
        let (lower, upper, b) = (self.lower.clone(), self.upper(), self.rhs());
        let mut x = lower.clone();
        let mut best: Option<i64> = None;
        loop {
            let meets = self
                .matrix
                .iter()
                .zip(&b)
                .all(|(r, bi)| r.iter().zip(&x).map(|(a, v)| a * v).sum::<i64>() == *bi);
            if meets {
                let c = self.cost_of(&x);
                best = Some(best.map_or(c, |b| b.min(c)));
            }
            let Some(i) = (0..x.len()).find(|&i| x[i] < upper[i]) else {
                return best;
            };
            x[i] += 1;
            x[..i].copy_from_slice(&lower[..i]);
        }
    }
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::RoundTrips))]

    #[test]
    fn convex_optima_equal_brute_force(case in case()) {
        let model = case.model();
        let set = graver(&model.matrix, Method::ProjectAndLift);
        let prepared = Prepared::new(&model.matrix, &set, Coverage::Complete).unwrap();
        let verdict = prepared.solve(&model, &Options::default(), None, &|| false).unwrap();
        let check = recheck(&model.matrix, Numbers::of(&model), prepared.checker(), &verdict);
        if let Some(check) = check.unwrap() {
            prop_assert!(check.holds, "{check:?}");
        }
        let found = match &verdict {
            Verdict::Solved(s) if s.status == Status::Optimal => {
                let objective = s.objective.unwrap();
                prop_assert_eq!(objective, i128::from(case.cost_of(&s.x)));
                Some(objective)
            }
            Verdict::Solved(s) => {
                prop_assert!(matches!(s.status, Status::Infeasible(_)), "{:?}", s.status);
                None
            }
            Verdict::NoIntegerSolution(_) => None,
            Verdict::Flow(_) => panic!("a set of moves was prepared, not a network"),
        };
        prop_assert_eq!(found, case.brute_force().map(i128::from));
    }
}

/// The model file's own words: a decreasing slope is refused naming the variable and the
/// entry, and an unknown variable is named.
#[test]
fn non_convex_costs_are_refused_with_the_variable_named() {
    let read = |convex: serde_json::Value| {
        let text = json!({"matrix": [[1, 1]], "rhs": [3], "names": {"variables": ["dock", "yard"]},
                          "convex_cost": convex});
        Model::from_str(&text.to_string(), ModelKind::Json, "plan.json")
            .unwrap_err()
            .to_string()
    };
    let err = read(json!({"yard": {"breaks": [2, 5], "slopes": [1, 4, 3]}}));
    assert!(
        err.starts_with("plan.json: convex_cost.yard.slopes: yard: slopes[2] is below slopes[1]"),
        "{err}"
    );
    let err = read(json!({"yard": {"breaks": [5, 2], "slopes": [1, 4, 6]}}));
    assert!(
        err.starts_with("plan.json: convex_cost.yard.breaks: yard: breaks[1] is not above"),
        "{err}"
    );
    let err = read(json!({"quay": {"breaks": [], "slopes": [1]}}));
    assert!(
        err.contains("convex_cost.quay: no variable named \"quay\""),
        "{err}"
    );
    let err = read(json!({"dock": {"breaks": [1], "slopes": [1]}}));
    assert!(err.contains("1 slopes for 1 breaks"), "{err}");
}

/// The network solver takes linear costs only: handed a model with a convex cost it refuses
/// instead of answering for the linear part alone (the CLI then uses the enumerated set).
#[test]
fn the_network_solver_refuses_convex_costs() {
    let text = json!({"matrix": [[1, 1, 0], [0, 1, 1]], "rhs": [3, 2], "lower": [0, 0, 0],
                      "convex_cost": {"x2": {"breaks": [1], "slopes": [0, 4]}}});
    let model = Model::from_str(&text.to_string(), ModelKind::Json, "lanes.json").unwrap();
    let network = kernstep::network::Network::detect(&model.matrix).unwrap();
    let prepared = Prepared::network(&model.matrix, network);
    let solved = prepared.solve(&model, &Options::default(), None, &|| false);
    assert!(
        matches!(solved, Err(kernstep::Error::Unsupported(_))),
        "{solved:?}"
    );
}
