//! The network core: detection of network matrices, the cycle solver against the test-set
//! solver over the library's own Graver basis and against HiGHS, the independent certificate
//! checks, and warm starts.

mod completion_support;
mod proptest_cases;

use proptest_cases::Class;

use std::path::Path;

use augment::{Coverage, InfeasibleReason, Options, Status};
use kernstep::completion::Request;
use kernstep::model::{Model, ModelKind};
use kernstep::network::{
    certificate, ArcEnds, Cut, FlowNumbers, FlowOptions, FlowOutcome, FlowSolution, Infeasibility,
    Network, NotNetwork, Warm,
};
use kernstep::scenario::Scenario;
use kernstep::solve::{Numbers, Prepared, Verdict};
use kernstep::IntMatrix;
use proptest::prelude::*;
use serde::Deserialize;

fn example(name: &str) -> Model {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/scenarios")
        .join(name);
    Scenario::load(&path).unwrap().compile().unwrap()
}

fn numbers(m: &Model) -> FlowNumbers<'_> {
    FlowNumbers {
        rhs: &m.rhs,
        cost: &m.cost,
        lower: &m.lower,
        upper: &m.upper,
    }
}

fn solve(net: &Network, n: FlowNumbers<'_>, warm: Option<Warm<'_>>) -> FlowSolution {
    net.solve(n, warm, &FlowOptions::default(), &|| false)
        .unwrap()
}

// ---- detection ---------------------------------------------------------------------------

#[test]
fn the_lanes_scenario_is_a_network_with_depots_signed_plus_and_zones_minus() {
    let m = example("brackle_lanes.toml");
    let net = Network::detect(&m.matrix).unwrap();
    let (depots, zones) = (3, 4);
    assert_eq!(net.rows(), depots + zones);
    assert_eq!(&net.row_signs()[..depots], &[1; 3]);
    assert_eq!(&net.row_signs()[depots..], &[-1; 4]);
    // The kept columns come last, one per depot (src/scenario/compile.rs).
    let lanes = m
        .variable_names
        .iter()
        .position(|n| n.ends_with("/kept"))
        .unwrap();
    for (j, arc) in net.arcs().iter().enumerate() {
        if j < lanes {
            assert!(arc.tail < depots && arc.head >= depots, "lane {j}: {arc:?}");
        } else {
            assert_eq!(
                *arc,
                ArcEnds {
                    tail: j - lanes,
                    head: net.root()
                },
                "kept {j}"
            );
        }
    }
}

#[test]
fn truckloads_and_product_lines_are_refused_at_their_first_column() {
    // A truckload units column has +1 in its depot, zone and load rows; a product-line column
    // has +1 in its lane's volume row, its depot's stock row and its zone's demand row.
    for name in ["hollin_trucks.toml", "vell_valley.toml"] {
        let m = example(name);
        match Network::detect(&m.matrix) {
            Err(NotNetwork::TooManyNonzeros { column: 0, rows }) => assert_eq!(rows.len(), 3),
            other => panic!("{name}: {other:?}"),
        }
    }
}

#[test]
fn near_misses_are_refused_with_the_reason() {
    let matrix = |rows: &[&[i64]]| {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    };
    // Columns 0 and 1 force rows 0, 1 and rows 1, 2 to equal signs; column 2 has +1 in rows 0
    // and 2, which would need opposite ones.
    let a = matrix(&[&[1, 0, 1], &[-1, 1, 0], &[0, -1, 1]]);
    let err = Network::detect(&a).unwrap_err();
    assert_eq!(
        err,
        NotNetwork::BothWays {
            row: 2,
            columns: vec![0, 1, 2]
        }
    );
    assert!(
        err.to_string()
            .starts_with("columns 0, 1 and 2 need row 2 both ways"),
        "{err}"
    );
    // Two columns over the same two rows, one with equal and one with opposite entries.
    let a = matrix(&[&[1, 1], &[1, -1]]);
    assert!(Network::detect(&a)
        .unwrap_err()
        .to_string()
        .starts_with("columns 0 and 1 need row 1 both ways"));
    let a = matrix(&[&[1, 0, 0], &[0, 1, 2], &[0, -1, 0]]);
    assert_eq!(
        Network::detect(&a).unwrap_err().to_string(),
        "column 2 has an entry 2 (row 1); a network matrix has entries -1, 0 and 1 only"
    );
    let a = matrix(&[&[1, 1], &[-1, 1], &[0, 1]]);
    assert_eq!(
        Network::detect(&a).unwrap_err(),
        NotNetwork::TooManyNonzeros {
            column: 1,
            rows: vec![0, 1, 2]
        }
    );
}

/// A random digraph over `rows` nodes and the root (node `rows`) as a matrix: `+1` at the
/// tail's row, `-1` at the head's, nothing for the root; `(rows, rows)` is a zero column.
fn incidence(rows: usize, arcs: &[(usize, usize)]) -> IntMatrix {
    let mut a = IntMatrix::zeros(rows, arcs.len());
    for (j, &(t, h)) in arcs.iter().enumerate() {
        if t < rows && t != h {
            a.set(t, j, 1);
        }
        if h < rows && t != h {
            a.set(h, j, -1);
        }
    }
    a
}

fn digraph(
    rows: std::ops::Range<usize>,
    arcs: std::ops::Range<usize>,
) -> impl Strategy<Value = IntMatrix> {
    rows.prop_flat_map(move |r| {
        let arc =
            (0..=r, 0..=r).prop_filter("a loop only at the root", move |&(t, h)| t != h || t == r);
        (Just(r), proptest::collection::vec(arc, arcs.clone()))
    })
    .prop_map(|(r, arcs)| incidence(r, &arcs))
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::SmallExact))]

    /// Scaling rows by -1 and negating columns keeps a network matrix a network matrix, and
    /// the detected signs and arcs reproduce the scaled matrix.
    #[test]
    fn scaled_and_negated_networks_are_found(
        (a, row_flips, col_flips) in digraph(1..8, 1..14).prop_flat_map(|a| {
            let (m, n) = (a.rows(), a.cols());
            (Just(a), proptest::collection::vec(any::<bool>(), m), proptest::collection::vec(any::<bool>(), n))
        })
    ) {
        let mut b = a.clone();
        for (i, &flip_row) in row_flips.iter().enumerate() {
            for (j, &flip_col) in col_flips.iter().enumerate() {
                let v = a.get(i, j);
                b.set(i, j, if flip_row != flip_col { -v } else { v });
            }
        }
        let net = Network::detect(&b).unwrap();
        for (j, arc) in net.arcs().iter().enumerate() {
            for i in 0..b.rows() {
                let want = i64::from(i == arc.tail && !arc.is_loop()) - i64::from(i == arc.head && !arc.is_loop());
                prop_assert_eq!(b.get(i, j) * net.row_signs()[i], want, "row {} column {}", i, j);
            }
        }
    }
}

// ---- against the test-set solver -----------------------------------------------------------

fn model_json(
    a: &IntMatrix,
    rhs: &[i64],
    cost: &[i64],
    lower: &[Option<i64>],
    upper: &[Option<i64>],
) -> Model {
    let text = serde_json::json!({
        "matrix": a.to_rows(), "rhs": rhs, "cost": cost, "lower": lower, "upper": upper,
    });
    Model::from_str(&text.to_string(), ModelKind::Json, "network case").unwrap()
}

/// Status and optimum of the test-set solver's verdict.
fn graver_answer(v: &Verdict) -> (&'static str, Option<i128>) {
    match v {
        Verdict::NoIntegerSolution(_) => ("infeasible", None),
        Verdict::Solved(s) => match &s.status {
            Status::Optimal => ("optimal", s.objective),
            Status::Infeasible(InfeasibleReason::EmptyRange { .. })
            | Status::Infeasible(InfeasibleReason::NoLatticePointInBox { .. }) => {
                ("infeasible", None)
            }
            Status::Unbounded(_) => ("unbounded", None),
            other => panic!("the test-set solver stopped: {other:?}"),
        },
        Verdict::Flow(_) => panic!("a set of moves was prepared, not a network"),
    }
}

fn flow_answer(o: &FlowOutcome) -> (&'static str, Option<i128>) {
    match o {
        FlowOutcome::Optimal { objective, .. } => ("optimal", Some(*objective)),
        FlowOutcome::Infeasible(_) => ("infeasible", None),
        FlowOutcome::Unbounded { .. } => ("unbounded", None),
        other => panic!("the network solver stopped: {other:?}"),
    }
}

/// One instance's numbers.
type Instance = (Vec<i64>, Vec<i64>, Vec<Option<i64>>, Vec<Option<i64>>);

/// Numbers for `a`: cost, bounds (some infinite) and a right-hand side that is, three times
/// in four, `A x0` for a point `x0` of the box (so that most instances are feasible).
fn instance(a: IntMatrix) -> impl Strategy<Value = Instance> {
    let (rows, cols) = (a.rows(), a.cols());
    let bound = prop_oneof![1 => Just(None), 4 => (-3i64..4).prop_map(Some)];
    (
        proptest::collection::vec(-4i64..5, rows),
        proptest::collection::vec(-5i64..6, cols),
        proptest::collection::vec((bound.clone(), bound, 0i64..4, -3i64..4), cols),
        prop_oneof![1 => Just(false), 3 => Just(true)],
    )
        .prop_map(move |(rhs, cost, boxes, balanced)| {
            let lower: Vec<Option<i64>> = boxes.iter().map(|&(l, _, _, _)| l).collect();
            // The upper bound lies at or above the lower one (`l + width`) when both are finite.
            let upper: Vec<Option<i64>> = boxes
                .iter()
                .map(|&(l, u, w, _)| match (l, u) {
                    (Some(l), Some(_)) => Some(l + w),
                    (_, u) => u,
                })
                .collect();
            let x0: Vec<i64> = boxes
                .iter()
                .zip(lower.iter().zip(&upper))
                .map(|(&(_, _, _, v), (l, u))| {
                    let v = l.map_or(v, |l| v.max(l));
                    u.map_or(v, |u| v.min(u))
                })
                .collect();
            let rhs = if balanced {
                a.mul_vec(&x0).unwrap()
            } else {
                rhs
            };
            (rhs, cost, lower, upper)
        })
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Completion))]

    /// On small network matrices the cycle solver and the test-set solver over the library's
    /// own Graver basis agree on the status and the optimum of every instance, and every
    /// answer of the cycle solver passes the independent check, cold and from a warm start.
    #[test]
    fn the_cycle_solver_agrees_with_graver_augmentation(
        (a, cases) in digraph(1..6, 2..10).prop_flat_map(|a| {
            (Just(a.clone()), proptest::collection::vec(instance(a), 6))
        })
    ) {
        let net = Network::detect(&a).unwrap();
        let set = completion_support::run(&a, &Request::graver(a.cols()));
        let prepared = Prepared::new(&a, &set, Coverage::Complete).unwrap();
        let mut previous: Option<(Vec<i64>, Vec<i64>)> = None;
        for (rhs, cost, lower, upper) in &cases {
            let m = model_json(&a, rhs, cost, lower, upper);
            let verdict = prepared
                .solve_numbers(Numbers::of(&m), &Options::default(), None, &|| false)
                .unwrap();
            let n = numbers(&m);
            let cold = solve(&net, n, None);
            prop_assert_eq!(flow_answer(&cold.outcome), graver_answer(&verdict), "{:?} {:?}", a, n);
            certificate::check(&a, n, &cold.outcome).unwrap();
            if let Some((flow, potentials)) = &previous {
                let warm = Warm { flow, potentials: Some(potentials) };
                let chained = solve(&net, n, Some(warm));
                prop_assert_eq!(flow_answer(&chained.outcome), flow_answer(&cold.outcome));
                certificate::check(&a, n, &chained.outcome).unwrap();
            }
            if let FlowOutcome::Optimal { flow, potentials, .. } = cold.outcome {
                previous = Some((flow, potentials));
            }
        }
    }
}

// ---- against HiGHS -------------------------------------------------------------------------

#[derive(Deserialize)]
struct Fixture {
    source: String,
    matrix: Vec<Vec<i64>>,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
    days: Vec<Day>,
}

#[derive(Deserialize)]
struct Day {
    id: String,
    change: String,
    rhs: Vec<i64>,
    cost: Vec<i64>,
    expect: Expect,
}

#[derive(Deserialize)]
struct Expect {
    status: String,
    objective: Option<i128>,
}

/// `tests/fixtures/network/lanes_6x30.json`, written by `scripts/network_reference.py`.
fn lanes_fixture() -> (Fixture, IntMatrix, Network) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/network/lanes_6x30.json");
    let fixture: Fixture = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    assert_eq!(
        fixture.source,
        "HiGHS 1.16.0 via highspy, scripts/network_reference.py"
    );
    let a = IntMatrix::from_rows(&fixture.matrix).unwrap();
    let net = Network::detect(&a).unwrap();
    (fixture, a, net)
}

impl Fixture {
    fn numbers<'a>(&'a self, day: &'a Day) -> FlowNumbers<'a> {
        FlowNumbers {
            rhs: &day.rhs,
            cost: &day.cost,
            lower: &self.lower,
            upper: &self.upper,
        }
    }
}

/// Every day of the fixture, cold and chained from the day before (with and without its
/// potentials), has the status and the optimum that HiGHS 1.16.0 (through highspy, `scripts/network_reference.py`) recorded, and
/// every answer passes the independent check.
#[test]
fn lane_days_match_the_highs_reference() {
    let (fixture, a, net) = lanes_fixture();
    assert_eq!(fixture.days.len(), 40);
    let mut yesterday: Option<(Vec<i64>, Vec<i64>)> = None;
    let mut infeasible = 0;
    for day in &fixture.days {
        let n = fixture.numbers(day);
        let want = (day.expect.status.as_str(), day.expect.objective);
        let cold = solve(&net, n, None);
        // Reference: HiGHS 1.16.0 via highspy (the fixture's `source`).
        assert_eq!(flow_answer(&cold.outcome), want, "{} cold vs HiGHS", day.id);
        certificate::check(&a, n, &cold.outcome).unwrap();
        let warm = yesterday.as_ref().map(|(flow, potentials)| Warm {
            flow,
            potentials: Some(potentials),
        });
        let chained = solve(&net, n, warm);
        assert_eq!(
            flow_answer(&chained.outcome),
            want,
            "{} chained vs HiGHS",
            day.id
        );
        certificate::check(&a, n, &chained.outcome).unwrap();
        // Yesterday's flow alone, without its potentials, is a valid start too.
        let flow_only = yesterday.as_ref().map(|(flow, _)| Warm {
            flow,
            potentials: None,
        });
        let from_flow = solve(&net, n, flow_only);
        assert_eq!(
            flow_answer(&from_flow.outcome),
            want,
            "{} from the flow",
            day.id
        );
        certificate::check(&a, n, &from_flow.outcome).unwrap();
        match chained.outcome {
            FlowOutcome::Optimal {
                flow, potentials, ..
            } => yesterday = Some((flow, potentials)),
            FlowOutcome::Infeasible(Infeasibility::Cut(_)) => infeasible += 1,
            other => panic!("{}: {other:?}", day.id),
        }
    }
    assert_eq!(infeasible, 3);
}

/// A warm start from yesterday's optimum reaches today's optimum with fewer augmentations
/// than a cold start on a day that changes only a few demands: day-03 changes the demands of
/// two or three zones of day-02 (see the fixture's `change` field).
#[test]
fn a_few_changed_demands_cost_a_few_augmentations_from_yesterday() {
    let (fixture, _, net) = lanes_fixture();
    let day = |id: &str| fixture.days.iter().find(|d| d.id == id).unwrap();
    let (monday, tuesday) = (day("day-02"), day("day-03"));
    assert_eq!(tuesday.change, "demand");
    let FlowOutcome::Optimal {
        flow, potentials, ..
    } = solve(&net, fixture.numbers(monday), None).outcome
    else {
        panic!("day-02 is feasible");
    };
    let cold = solve(&net, fixture.numbers(tuesday), None);
    let warm = solve(
        &net,
        fixture.numbers(tuesday),
        Some(Warm {
            flow: &flow,
            potentials: Some(&potentials),
        }),
    );
    assert_eq!(flow_answer(&warm.outcome), flow_answer(&cold.outcome));
    assert!(
        warm.steps() <= 3 && warm.steps() * 4 < cold.steps(),
        "warm {} vs cold {} augmentations",
        warm.steps(),
        cold.steps()
    );
}

// ---- damaged certificates ------------------------------------------------------------------

#[test]
fn a_damaged_potential_is_rejected() {
    let (fixture, a, net) = lanes_fixture();
    let day = &fixture.days[0];
    let n = fixture.numbers(day);
    let FlowOutcome::Optimal {
        flow, potentials, ..
    } = solve(&net, n, None).outcome
    else {
        panic!("day-00 is feasible");
    };
    certificate::check_optimal(&a, n, &flow, &potentials).unwrap();
    // A lane at its lower bound 0 below its capacity: its reduced cost d_j >= 0. Moving the
    // potential of its zone row by d_j + 1 (the entry is +1) makes d_j = -1.
    let j = (0..flow.len())
        .find(|&j| flow[j] == 0 && fixture.upper[j].is_some_and(|u| u > 0))
        .unwrap();
    let zone = (0..a.rows()).rev().find(|&i| a.get(i, j) != 0).unwrap();
    let price: i128 = (0..a.rows())
        .map(|i| i128::from(potentials[i]) * i128::from(a.get(i, j)))
        .sum();
    let reduced = i64::try_from(i128::from(n.cost[j]) - price).unwrap();
    let mut damaged = potentials.clone();
    damaged[zone] += (reduced + 1) * a.get(zone, j);
    let err = certificate::check_optimal(&a, n, &flow, &damaged).unwrap_err();
    assert!(
        err.to_string()
            .contains(&format!("column {j} has reduced cost -1")),
        "{err}"
    );
}

#[test]
fn forged_cuts_are_rejected() {
    let (fixture, a, net) = lanes_fixture();
    let spike = fixture.days.iter().find(|d| d.change == "spike").unwrap();
    let n = fixture.numbers(spike);
    let FlowOutcome::Infeasible(Infeasibility::Cut(cut)) = solve(&net, n, None).outcome else {
        panic!("{} is infeasible", spike.id);
    };
    certificate::check_infeasible(&a, n, &Infeasibility::Cut(cut.clone())).unwrap();
    // The same cut for the day before, which is feasible.
    let before = &fixture.days[fixture.days.iter().position(|d| d.id == spike.id).unwrap() - 1];
    let err = certificate::check_infeasible(
        &a,
        fixture.numbers(before),
        &Infeasibility::Cut(cut.clone()),
    )
    .unwrap_err();
    assert!(err.to_string().contains("the cut's rows sum to"), "{err}");
    // A cut of every row: the root's balance, which the kept columns can always meet.
    let everything = Cut {
        weights: net.row_signs().to_vec(),
    };
    assert!(certificate::check_infeasible(&a, n, &Infeasibility::Cut(everything)).is_err());
    // Claiming an empty range where the range is fine.
    assert!(certificate::check_infeasible(&a, n, &Infeasibility::EmptyRange { arc: 0 }).is_err());
}

// ---- traces --------------------------------------------------------------------------------

/// Every recorded step of a cold and a chained solve pushes a circuit of `A` (a kernel
/// vector with entries in {-1, 0, 1}) by a positive amount and lowers its measure; in phase
/// II the objective falls by exactly the amount times the cycle's cost, and the last step
/// ends at the reported optimum.
#[test]
fn traced_steps_are_circuits_that_lower_the_violation_or_the_cost() {
    let (fixture, a, net) = lanes_fixture();
    let options = FlowOptions::default().trace(true);
    let mut yesterday: Option<(Vec<i64>, Vec<i64>)> = None;
    let mut phases = [0usize; 2];
    for day in fixture.days.iter().take(8) {
        let n = fixture.numbers(day);
        let previous = yesterday.take();
        let warm = previous.as_ref().map(|(flow, potentials)| Warm {
            flow,
            potentials: Some(potentials),
        });
        for start in [None, warm] {
            let s = net.solve(n, start, &options, &|| false).unwrap();
            let trace = s.trace.as_ref().unwrap();
            assert_eq!(trace.len() as u64, s.steps(), "{}", day.id);
            for step in trace {
                let g = step.cycle.vector(a.cols());
                assert!(g.iter().all(|v| v.abs() <= 1) && g.iter().any(|&v| v != 0));
                assert!(a.mul_vec(&g).unwrap().iter().all(|&v| v == 0), "{step:?}");
                assert!(step.amount >= 1 && step.after < step.before, "{step:?}");
                if step.phase == augment::Phase::Optimality {
                    let rate: i128 = g.iter().zip(n.cost).map(|(&v, &c)| i128::from(v * c)).sum();
                    assert_eq!(step.after - step.before, rate * i128::from(step.amount));
                }
                phases[usize::from(step.phase == augment::Phase::Optimality)] += 1;
            }
            if let (FlowOutcome::Optimal { objective, .. }, Some(last)) = (&s.outcome, trace.last())
            {
                if last.phase == augment::Phase::Optimality {
                    assert_eq!(last.after, *objective, "{}", day.id);
                }
            }
            if let FlowOutcome::Optimal {
                flow, potentials, ..
            } = &s.outcome
            {
                yesterday = Some((flow.clone(), potentials.clone()));
            }
        }
    }
    assert!(phases[0] > 0 && phases[1] > 0, "{phases:?}");
}
