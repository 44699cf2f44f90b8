//! A price per unit changed against a previous plan p: `min c.x + sum p_i(x_i) +
//! sum w_i |x_i - p_i|` over the same Graver basis. `|x_i - p_i|` is separable convex, and a
//! Graver basis is a test set for separable convex objectives (Murota, Saito and Weismantel
//! 2004), so every priced optimum must be the reference's, through both library paths: one
//! solve warm-started from p (`trace::Instance::priced`) and a chain of days
//! (`scenario::replan` with a change price).
//!
//! References: HiGHS on the linearised model (`tests/fixtures/change/random_models.json`,
//! written by `scripts/change_reference.py`), and brute force over the box for the random
//! cases of the property test.

mod completion_support;
mod proptest_cases;

use std::path::Path;

use augment::{Coverage, Options};
use completion_support::graver;
use kernstep::completion::{Control, Method};
use kernstep::formats::batch::{DayRecord, DayStatus};
use kernstep::model::{Model, ModelKind};
use kernstep::scenario::{replan, CurvePiece, ReplanSettings, StabilityCurve};
use kernstep::solve::{ChangePrice, Numbers, Prepared, Variant, WarmStart};
use kernstep::testset::{serve, Engine, Served};
use kernstep::trace::{Instance, Outcome};
use num_rational::BigRational;
use num_traits::{ToPrimitive, Zero};
use proptest::prelude::*;
use proptest_cases::Class;
use serde::Deserialize;
use serde_json::json;

/// One case of the HiGHS fixture.
#[derive(Debug, Deserialize)]
struct Case {
    id: String,
    matrix: Vec<Vec<i64>>,
    rhs: Vec<i64>,
    previous_rhs: Vec<i64>,
    previous: Vec<i64>,
    previous_feasible: bool,
    cost: Vec<i64>,
    lower: Vec<i64>,
    upper: Vec<i64>,
    convex: serde_json::Map<String, serde_json::Value>,
    prices: String,
    change_cost: Vec<i64>,
    expect: Expect,
}

#[derive(Debug, Deserialize)]
struct Expect {
    status: String,
    objective: Option<i128>,
}

#[derive(Debug, Deserialize)]
struct Fixture {
    cases: Vec<Case>,
}

/// The model file of a case (variables `x1`, `x2`, ...), with today's numbers.
fn model_of(
    matrix: &[Vec<i64>],
    (rhs, cost): (&[i64], &[i64]),
    (lower, upper): (&[i64], &[i64]),
    convex: &serde_json::Map<String, serde_json::Value>,
) -> Model {
    let convex: serde_json::Map<String, serde_json::Value> = convex
        .iter()
        .map(|(i, pieces)| {
            let i: usize = i.parse().unwrap();
            (format!("x{}", i + 1), pieces.clone())
        })
        .collect();
    let text = json!({
        "matrix": matrix, "rhs": rhs, "cost": cost,
        "lower": lower, "upper": upper, "convex_cost": convex,
    });
    Model::from_str(&text.to_string(), ModelKind::Json, "case.json").unwrap()
}

impl Case {
    fn model(&self) -> Model {
        model_of(
            &self.matrix,
            (&self.rhs, &self.cost),
            (&self.lower, &self.upper),
            &self.convex,
        )
    }

    fn previous_plan(&self) -> WarmStart {
        WarmStart {
            rhs: self.previous_rhs.clone(),
            x: self.previous.clone(),
            potentials: None,
        }
    }
}

/// The set that serves priced solves of `model` (built, no cache): the engine choice sees
/// the price, so a network matrix gets its enumerated Graver basis.
fn served(model: &Model, price: &ChangePrice) -> Served {
    let priced = price.model_to_serve(model).unwrap();
    serve(&priced, None, Engine::Auto, Some(&Control::new())).unwrap()
}

fn fixture() -> Fixture {
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/change/random_models.json");
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

/// One priced solve warm-started from the previous plan, compared with the unpriced plan.
#[test]
fn priced_solves_equal_highs_on_the_linearised_model() {
    let fixture = fixture();
    assert_eq!(fixture.cases.len(), 80);
    let (mut zero, mut kept) = (0, 0);
    for case in &fixture.cases {
        let model = case.model();
        let price = ChangePrice::per_variable(case.change_cost.clone(), "case").unwrap();
        let served = served(&model, &price);
        let doc = Instance::new(model, &case.id, served, Options::default())
            .unwrap()
            .warm_start(case.previous_plan())
            .priced(price, true)
            .solve(&|| false)
            .unwrap();
        // Reference: HiGHS 1.16 through highspy on the linearised model (the fixture).
        assert_eq!(case.expect.status, "optimal", "{}", case.id);
        assert_eq!(doc.status, Outcome::Optimal, "{}", case.id);
        assert_eq!(
            doc.objective.and_then(|o| o.integer()),
            case.expect.objective,
            "{}",
            case.id
        );
        let change = doc.change.unwrap();
        let whole = change.priced.plan_cost + change.priced.change_cost;
        assert_eq!(Some(whole), case.expect.objective, "{}", case.id);
        let unpriced = change.unpriced.unwrap();
        // The unpriced optimum costs no more than the priced plan's own cost, and the priced
        // plan pays no more in all than the unpriced plan with its changes priced.
        assert!(unpriced.plan_cost <= change.priced.plan_cost, "{}", case.id);
        assert!(
            whole <= unpriced.plan_cost + unpriced.change_cost,
            "{}",
            case.id
        );
        if case.prices == "zero" {
            zero += 1;
            assert_eq!(change.priced.plan_cost, unpriced.plan_cost, "{}", case.id);
            assert_eq!(change.priced.change_cost, 0, "{}", case.id);
        }
        if case.prices == "large" && case.previous_feasible {
            // A price of 10^6 per unit exceeds what any plan of the box can save (at most 6
            // variables of width <= 6, every marginal cost below 20 in absolute value): the
            // previous plan stays.
            kept += 1;
            assert_eq!(
                doc.x.as_deref(),
                Some(case.previous.as_slice()),
                "{}",
                case.id
            );
            assert_eq!((change.priced.changed, change.priced.moved), (0, 0));
        }
    }
    assert!(
        zero >= 10 && kept >= 5,
        "{zero} zero prices, {kept} kept plans"
    );
}

/// The same cases as the second day of a chain whose first day is held at the previous plan
/// (its bounds fix every variable): the chain prices day two against it.
#[test]
fn a_chain_prices_each_day_against_the_day_before() {
    for case in &fixture().cases {
        let model = case.model();
        let set = graver(&model.matrix, Method::ProjectAndLift);
        let prepared = Prepared::new(&model.matrix, &set, Coverage::Complete).unwrap();
        let fixed: Vec<Option<i64>> = case.previous.iter().copied().map(Some).collect();
        let days = vec![
            (
                1,
                Ok(Variant {
                    id: "yesterday".into(),
                    rhs: Some(case.previous_rhs.clone()),
                    lower: Some(fixed.clone()),
                    upper: Some(fixed),
                    ..Variant::default()
                }),
            ),
            (
                2,
                Ok(Variant {
                    id: "today".into(),
                    ..Variant::default()
                }),
            ),
        ];
        let settings = ReplanSettings {
            chain: true,
            change: Some(ChangePrice::per_variable(case.change_cost.clone(), "case").unwrap()),
            ..ReplanSettings::default()
        };
        let results = replan(&prepared, &model, days, &settings, "days", &|| false);
        assert!(
            results[0].change.is_none(),
            "the first day has no day before"
        );
        let names = &model.variable_names;
        let today = DayRecord::of(&results[1], names, &model.units);
        // Reference: HiGHS 1.16 through highspy on the linearised model (the fixture).
        assert_eq!(today.status, DayStatus::Optimal, "{}", case.id);
        let objective = today.objective.and_then(|o| o.integer());
        assert_eq!(objective, case.expect.objective, "{}", case.id);
        let change = today.change.unwrap();
        assert_eq!(
            Some(change.priced.plan_cost + change.priced.change_cost),
            case.expect.objective
        );
    }
}

/// A small random case for the brute-force property: a 1 x 3 or 2 x 4 matrix, a box of width
/// at most 4, a previous plan in the box and a price per variable.
#[derive(Debug, Clone)]
struct Small {
    matrix: Vec<Vec<i64>>,
    lower: Vec<i64>,
    width: Vec<i64>,
    today: Vec<i64>,
    previous: Vec<i64>,
    cost: Vec<i64>,
    prices: Vec<i64>,
}

fn small() -> impl Strategy<Value = Small> {
    prop_oneof![Just((1usize, 3usize)), Just((2, 4))]
        .prop_flat_map(|(m, n)| {
            let vec = |r: std::ops::RangeInclusive<i64>| prop::collection::vec(r, n);
            (
                prop::collection::vec(vec(-2..=2), m),
                (vec(-2..=1), vec(0..=4)),
                (vec(0..=4), vec(0..=4)),
                (vec(-3..=4), vec(0..=5)),
            )
                .prop_map(
                    |(matrix, (lower, width), (today, previous), (cost, prices))| Small {
                        matrix,
                        lower,
                        width,
                        today,
                        previous,
                        cost,
                        prices,
                    },
                )
        })
        .prop_filter("no zero row", |c| {
            c.matrix.iter().all(|r| r.iter().any(|&v| v != 0))
        })
}

impl Small {
    /// A point of the box from offsets (clipped to the widths).
    fn in_box(&self, offsets: &[i64]) -> Vec<i64> {
        let at = |(i, o): (usize, &i64)| self.lower[i] + o.min(&self.width[i]);
        offsets.iter().enumerate().map(at).collect()
    }

    fn upper(&self) -> Vec<i64> {
        self.lower
            .iter()
            .zip(&self.width)
            .map(|(l, w)| l + w)
            .collect()
    }

    fn times(&self, x: &[i64]) -> Vec<i64> {
        let row = |r: &Vec<i64>| r.iter().zip(x).map(|(a, v)| a * v).sum();
        self.matrix.iter().map(row).collect()
    }

    fn model(&self) -> Model {
        let rhs = self.times(&self.in_box(&self.today));
        let (lower, upper) = (self.lower.clone(), self.upper());
        model_of(
            &self.matrix,
            (&rhs, &self.cost),
            (&lower, &upper),
            &Default::default(),
        )
    }

    /// `min c.x + sum w_i |x_i - p_i|` over the box by enumeration, with the minimisers.
    fn brute_force(&self, prices: &[i64]) -> (i64, Vec<Vec<i64>>) {
        let (lower, upper) = (self.lower.clone(), self.upper());
        let (b, p) = (
            self.times(&self.in_box(&self.today)),
            self.in_box(&self.previous),
        );
        let mut x = lower.clone();
        let mut best: (i64, Vec<Vec<i64>>) = (i64::MAX, Vec::new());
        loop {
            if self.times(&x) == b {
                let cost: i64 = self.cost.iter().zip(&x).map(|(c, v)| c * v).sum::<i64>()
                    + (0..x.len())
                        .map(|i| prices[i] * (x[i] - p[i]).abs())
                        .sum::<i64>();
                if cost < best.0 {
                    best = (cost, vec![x.clone()]);
                } else if cost == best.0 {
                    best.1.push(x.clone());
                }
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
    #![proptest_config(proptest_cases::config(Class::Augmentation))]

    /// Priced optima equal brute force over the box; a price of 0 gives the unpriced
    /// optimum; a price above every saving (here 100: costs and widths are at most 4) keeps
    /// the previous plan whenever today's rows still hold it.
    #[test]
    fn priced_optima_equal_brute_force(case in small(), keep in any::<bool>()) {
        let mut case = case;
        if keep {
            case.today = case.previous.clone();
        }
        let model = case.model();
        let previous = case.in_box(&case.previous);
        let warm = WarmStart { rhs: case.times(&previous), x: previous.clone(), potentials: None };
        let n = case.cost.len();
        for prices in [case.prices.clone(), vec![0; n], vec![100; n]] {
            let (best, minimisers) = case.brute_force(&prices);
            let price = ChangePrice::per_variable(prices.clone(), "case").unwrap();
            let served = served(&model, &price);
            let doc = Instance::new(model.clone(), "case", served, Options::default())
                .unwrap()
                .warm_start(warm.clone())
                .priced(price, false)
                .solve(&|| false)
                .unwrap();
            // Reference: enumeration of every integer point of the box.
            prop_assert_eq!(doc.status, Outcome::Optimal);
            prop_assert_eq!(doc.objective.and_then(|o| o.integer()), Some(i128::from(best)));
            let x = doc.x.unwrap();
            prop_assert!(minimisers.contains(&x));
            if prices[0] == 100 && keep {
                prop_assert_eq!(&x, &previous);
            }
        }
    }
}

/// A model file prices variables by name under `change_cost`; `--change-cost W` (here the
/// default of `ChangePrice::of_model`) prices the others. A negative price names its field.
#[test]
fn a_model_file_prices_its_own_variables() {
    let read = |change: serde_json::Value| {
        let text = json!({"matrix": [[1, 1, 1]], "rhs": [3],
                          "names": {"variables": ["dock", "yard", "quay"]}, "change_cost": change});
        Model::from_str(&text.to_string(), ModelKind::Json, "plan.json")
    };
    let model = read(json!({"yard": 7, "dock": 0})).unwrap();
    let price = ChangePrice::of_model(&model, 2, "--change-cost").unwrap();
    assert_eq!(price.weights(), &[0, 7, 2]);
    let err = read(json!({"quay": -1})).unwrap_err().to_string();
    assert_eq!(
        err,
        "plan.json: change_cost.quay: -1 is negative; a price per unit changed is 0 or more"
    );
    let err = read(json!({"pier": 1})).unwrap_err().to_string();
    assert!(err.contains("change_cost.pier: no variable named"), "{err}");
    let err = ChangePrice::of_model(&model, -3, "--change-cost").unwrap_err();
    assert!(err
        .to_string()
        .starts_with("--change-cost: change cost: -3 is negative"));
}

/// A lane's `change_cost` prices its units column: column `l` of a lanes scenario, `3 l` of
/// a truckloads scenario (units, spare, trucks per lane).
#[test]
fn a_lane_prices_its_units() {
    let scenario = |kind: &str, extra: &str, per_lane: &str| {
        let text = format!(
            r#"kind = "{kind}"
depots = ["a", "b"]
zones = ["x", "y"]
{extra}
supply = {{ a = 7, b = 5 }}
demand = {{ x = 4, y = 6 }}
lanes = [
  {{ from = "a", to = "x", cost = 3, capacity = 4 {per_lane} }},
  {{ from = "b", to = "y", cost = 2, change_cost = 9 {per_lane} }},
]
"#
        );
        kernstep::scenario::Scenario::from_str(&text, ModelKind::Toml, "s.toml")
            .unwrap()
            .compile()
            .unwrap()
    };
    let lanes = scenario("lanes", "", "");
    assert_eq!(lanes.change_cost, vec![(1, 9)]);
    let trucks = scenario("truckloads", "truck_capacity = 3", ", truck_cost = 5");
    assert_eq!(trucks.change_cost, vec![(3, 9)]);
    assert_eq!(trucks.variable_names[3], "b->y");
    let price = ChangePrice::of_model(&trucks, 1, "--change-cost").unwrap();
    assert_eq!(price.weights()[3], 9);
}

/// The stability curve of `model`'s own numbers against `previous` (every variable priced 1
/// per unit), over the multipliers `0..=top`.
fn curve_pieces(model: &Model, previous: Vec<i64>, top: i64) -> Vec<CurvePiece> {
    let unit = ChangePrice::uniform(1, model.variables(), "case").unwrap();
    let prepared = served(model, &unit).prepare(&model.matrix).unwrap();
    let warm = WarmStart {
        rhs: model.matrix.mul_vec(&previous).unwrap(),
        x: previous,
        potentials: None,
    };
    let options = Options::default();
    let curve = StabilityCurve {
        prepared: &prepared,
        matrix: &model.matrix,
        numbers: Numbers::of(model),
        previous: &warm,
        unit: &unit,
        options: &options,
    };
    curve.pieces(top).unwrap()
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Augmentation))]

    /// The price of stability of one day (`F(λ) = min plan + λ moved`) is exact: at the start
    /// of every piece and halfway to the next (or to the top price), the piece's plan is
    /// optimal; plan costs rise and units moved fall from piece to piece.
    #[test]
    fn the_stability_curve_is_exact(case in small()) {
        let n = case.cost.len();
        let top = 20;
        let pieces = curve_pieces(&case.model(), case.in_box(&case.previous), top);
        prop_assert_eq!(pieces[0].from.clone(), BigRational::zero());
        let top = BigRational::from_integer(top.into());
        for (k, piece) in pieces.iter().enumerate() {
            let end = pieces.get(k + 1).map_or(top.clone(), |p| p.from.clone());
            prop_assert!(piece.from < end);
            if k > 0 {
                let before = &pieces[k - 1].figures;
                prop_assert!(piece.figures.plan_cost > before.plan_cost);
                prop_assert!(piece.figures.moved < before.moved);
            }
            for price in [piece.from.clone(), (&piece.from + &end) / BigRational::from_integer(2.into())] {
                // Reference: enumeration of every integer point of the box at the price a / b,
                // as the integer objective b c.x + a |x - p|.
                let (a, b) = (price.numer().to_i64().unwrap(), price.denom().to_i64().unwrap());
                let scaled = Small { cost: case.cost.iter().map(|c| c * b).collect(), ..case.clone() };
                let (best, _) = scaled.brute_force(&vec![a; n]);
                let f = &piece.figures;
                prop_assert_eq!(i128::from(best), f.plan_cost * i128::from(b) + f.change_cost * i128::from(a));
            }
        }
    }
}

/// The curve of a JSON model against `previous` up to the price 20, as (from, plan cost,
/// units moved) per piece.
fn worked_curve(text: serde_json::Value, previous: Vec<i64>) -> Vec<(String, i128, u128)> {
    let model = Model::from_str(&text.to_string(), ModelKind::Json, "case.json").unwrap();
    let pieces = curve_pieces(&model, previous, 20);
    (pieces.iter())
        .map(|p| (p.from.to_string(), p.figures.plan_cost, p.figures.moved))
        .collect()
}

/// Pieces written as (from, plan cost, units moved).
fn expected_curve(pieces: &[(&str, i128, u128)]) -> Vec<(String, i128, u128)> {
    (pieces.iter())
        .map(|&(from, cost, moved)| (from.to_string(), cost, moved))
        .collect()
}

/// A worked example of the curve. One row `x1 + x2 + x3 = 6`, costs 5, 2, 3, each variable in
/// `0..=6`, yesterday `p = (6, 0, 0)`. Keeping `p` costs 30 and moves nothing; the cheapest
/// plan `(0, 6, 0)` costs 12 and moves 12 units (6 off x1, 6 onto x2); every other plan lies
/// above one of these two lines. So `F(λ) = min(12 + 12 λ, 30)`: one breakpoint, at
/// `λ = 18 / 12 = 3/2` (worked by hand).
#[test]
fn the_stability_curve_of_a_worked_example() {
    let text = json!({"matrix": [[1, 1, 1]], "rhs": [6], "cost": [5, 2, 3],
                      "lower": [0, 0, 0], "upper": [6, 6, 6]});
    let figures = worked_curve(text, vec![6, 0, 0]);
    assert_eq!(figures, expected_curve(&[("0", 12, 12), ("3/2", 30, 0)]));
}

/// A worked example where several plans tie at a breakpoint, so a solve there may return a
/// plan whose line only touches the curve. One row `2 x1 + x2 + x3 = 3`, costs 2, 1, 2,
/// `x1` in `0..=2`, `x2, x3` in `0..=3`, yesterday `p = (0, 0, 2)` (no longer feasible). The
/// plans and their (cost, units moved): `(0, 3, 0)` (3, 5), `(1, 1, 0)` (3, 4), `(0, 2, 1)`
/// (4, 3), `(1, 0, 1)` (4, 2), `(0, 1, 2)` (5, 1), `(0, 0, 3)` (6, 1). So
/// `F(λ) = min(3 + 4 λ, 4 + 2 λ, 5 + λ)` with breakpoints `1/2` and `1`; `(0, 3, 0)` is
/// optimal at `λ = 0` only and gets no piece (worked by hand; the case a property run found).
#[test]
fn the_stability_curve_skips_plans_optimal_at_one_price() {
    let text = json!({"matrix": [[2, 1, 1]], "rhs": [3], "cost": [2, 1, 2],
                      "lower": [0, 0, 0], "upper": [2, 3, 3]});
    let figures = worked_curve(text, vec![0, 0, 2]);
    let expected = expected_curve(&[("0", 3, 4), ("1/2", 4, 2), ("1", 5, 1)]);
    assert_eq!(figures, expected);
}
