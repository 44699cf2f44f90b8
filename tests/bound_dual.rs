//! Dual bounds for plans from partial sets (`kernstep::bound`): never above the optimum, by
//! brute force over small random models and against the optima HiGHS recorded for the solve
//! fixtures; valid for any multipliers; and a forged bound is refused by the re-check.

mod proptest_cases;
use proptest_cases::Class;

use augment::{Coverage, Options, Status};
use kernstep::bound::{prove, BoundInstance, DualBound, Multipliers};
use kernstep::certify::{judge, Answer};
use kernstep::completion::{ElementSet, Request};
use kernstep::model::{ConvexCosts, Model, ModelKind, Pieces};
use kernstep::solve::{Numbers, Prepared, Verdict};
use kernstep::trace::{recheck_with_bound, Claim, Outcome};
use kernstep::{Error, IntMatrix};
use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;

mod completion_support;
mod highs_fixtures;
use highs_fixtures::fixtures;

/// A small instance with its optimum found by enumerating the box.
#[derive(Debug, Clone)]
struct Small {
    rows: Vec<Vec<i64>>,
    rhs: Vec<i64>,
    cost: Vec<i64>,
    upper: Vec<i64>,
    /// A convex cost on variable 0: breaks and slopes.
    convex: Option<(Vec<i64>, Vec<i64>)>,
}

impl Small {
    fn matrix(&self) -> IntMatrix {
        IntMatrix::from_rows(&self.rows).unwrap()
    }

    fn convex(&self) -> ConvexCosts {
        match &self.convex {
            Some((b, s)) => ConvexCosts::new(vec![(0, Pieces::new(b.clone(), s.clone()).unwrap())]),
            None => ConvexCosts::default(),
        }
    }

    fn box_sides(&self) -> (Vec<Option<i64>>, Vec<Option<i64>>) {
        (
            vec![Some(0); self.upper.len()],
            self.upper.iter().map(|&u| Some(u)).collect(),
        )
    }

    /// Every integer point of the box meeting the rows, with its cost (brute force).
    fn points(&self) -> Vec<(Vec<i64>, i128)> {
        let a = self.matrix();
        let convex = self.convex();
        let mut out = Vec::new();
        let mut x = vec![0i64; self.upper.len()];
        loop {
            if a.mul_vec(&x).unwrap() == self.rhs {
                out.push((x.clone(), convex.value(&self.cost, &x).unwrap()));
            }
            let Some(i) = (0..x.len()).find(|&i| x[i] < self.upper[i]) else {
                return out;
            };
            x[i] += 1;
            x[..i].iter_mut().for_each(|v| *v = 0);
        }
    }
}

fn small() -> impl Strategy<Value = Small> {
    (2usize..=3, 3usize..=5)
        .prop_flat_map(|(m, n)| {
            (
                prop::collection::vec(prop::collection::vec(-2i64..=2, n), m),
                prop::collection::vec(-6i64..=6, n),
                prop::collection::vec(1i64..=3, n),
                prop::collection::vec(0i64..=3, n),
                prop::option::of((0i64..=2, -3i64..=0, 0i64..=4)),
            )
        })
        .prop_map(|(rows, cost, upper, x0, convex)| {
            let x0: Vec<i64> = x0.iter().zip(&upper).map(|(&v, &u)| v.min(u)).collect();
            let rhs = IntMatrix::from_rows(&rows).unwrap().mul_vec(&x0).unwrap();
            let convex = convex.map(|(b, s0, rise)| (vec![b], vec![s0, s0 + rise]));
            Small {
                rows,
                rhs,
                cost,
                upper,
                convex,
            }
        })
}

fn rational(value: &BigRational) -> f64 {
    value.numer().to_string().parse::<f64>().unwrap()
        / value.denom().to_string().parse::<f64>().unwrap()
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::SmallExact))]

    /// Weak duality: any multipliers bound the brute-force optimum from below, and so does the
    /// best bound found from the LP relaxation; a perturbed multiplier stays valid and is no
    /// better than the best bound (up to its rounding).
    #[test]
    fn bounds_never_exceed_the_brute_force_optimum(
        s in small(),
        perturb in prop::collection::vec(-8i64..=8, 3),
        denominator in 1i64..=6,
    ) {
        let a = s.matrix();
        let convex = s.convex();
        let (lower, upper) = s.box_sides();
        let points = s.points();
        let optimum = points.iter().map(|(_, c)| *c).min().expect("the rhs comes from a point");
        let instance = BoundInstance::new(&a, &s.rhs, (&s.cost, &convex), &lower, &upper);
        let best = prove(&instance, optimum, None).unwrap().expect("a box gives a finite bound");
        prop_assert!(best.ceiling() <= BigInt::from(optimum), "{} > {optimum}", best.value);
        let perturbed = Multipliers {
            numerators: best
                .multipliers
                .numerators
                .iter()
                .zip(&perturb)
                .map(|(p, &d)| p * denominator + &best.multipliers.denominator * d)
                .collect(),
            denominator: &best.multipliers.denominator * denominator,
        };
        let value = instance.evaluate(&perturbed).unwrap().expect("finite on a box");
        prop_assert!(value <= BigRational::from(BigInt::from(optimum)));
        prop_assert!(rational(&value) <= rational(&best.value) + 1e-3);
    }
}

/// The plan of a norm-truncated set, its bound and the model.
struct Partial {
    model: Model,
    prepared: Prepared,
    verdict: Verdict,
    bound: Option<DualBound>,
}

fn partial(
    matrix: &[Vec<i64>],
    rhs: &[i64],
    cost: &[i64],
    lower: &[Option<i64>],
    upper: &[Option<i64>],
    norm: u64,
) -> Partial {
    let text = serde_json::json!({
        "matrix": matrix, "rhs": rhs, "cost": cost, "lower": lower, "upper": upper,
    });
    let model = Model::from_str(&text.to_string(), ModelKind::Json, "partial").unwrap();
    let full = completion_support::run(&model.matrix, &Request::graver(model.variables()));
    let mut rows = full.to_rows();
    rows.retain(|g| g.iter().map(|v| v.unsigned_abs()).sum::<u64>() <= norm);
    let set = ElementSet::from_rows(full.width(), &rows).unwrap();
    let prepared = Prepared::new(&model.matrix, &set, Coverage::NormTruncated { norm }).unwrap();
    let verdict = prepared
        .solve(&model, &Options::default(), None, &|| false)
        .unwrap();
    let bound = prepared.bound(Numbers::of(&model), &verdict, None).unwrap();
    Partial {
        model,
        prepared,
        verdict,
        bound,
    }
}

#[test]
fn bounds_never_exceed_the_highs_optimum_of_the_fixtures() {
    let (mut bounded, mut met) = (0, 0);
    for fixture in fixtures() {
        for case in fixture
            .variants
            .iter()
            .filter(|c| c.expect.status == "optimal")
        {
            // Reference: HiGHS 1.16.0 through highspy (named in each fixture file).
            let optimum = case.expect.objective.unwrap();
            let p = partial(
                &fixture.matrix,
                &case.rhs,
                &case.cost,
                &case.lower,
                &case.upper,
                4,
            );
            let Verdict::Solved(s) = &p.verdict else {
                panic!("{}: {:?}", case.id, p.verdict);
            };
            if s.status != Status::OptimalForMovesUpTo(4) {
                continue;
            }
            let objective = s.objective.unwrap();
            assert!(
                objective >= optimum,
                "{}: a plan below the optimum",
                case.id
            );
            let Some(bound) = &p.bound else { continue };
            bounded += 1;
            assert!(
                bound.ceiling() <= BigInt::from(optimum),
                "{}: bound {} above the HiGHS optimum {optimum}",
                case.id,
                bound.value
            );
            let check = recheck_with_bound(
                &p.model.matrix,
                Numbers::of(&p.model),
                p.prepared.checker(),
                &p.verdict,
                Some(bound),
            )
            .unwrap()
            .unwrap();
            assert!(check.holds, "{}: {check:?}", case.id);
            if bound.meets(objective) {
                met += 1;
                assert_eq!(
                    objective, optimum,
                    "{}: proven optimal, so the HiGHS optimum",
                    case.id
                );
                assert_eq!(check.claim, Claim::BoundMet);
                let outcome = Outcome::of_bounded(&p.verdict, Some(bound), &[], &[]);
                assert_eq!(outcome, Outcome::Optimal);
            }
        }
    }
    assert!(bounded >= 50, "only {bounded} bounded plans");
    assert!(
        met > 0 && met < bounded,
        "{met} of {bounded} met: the fixtures should give both"
    );
}

/// Issue 23: a partial set's answer claims only what is proven. Every variant of every fixture,
/// over its Graver basis truncated at norms 2 and 4, judged with its dual bound
/// ([`judge`]): `optimal` only at the HiGHS optimum, `feasible` never below it, `infeasible`
/// and `unbounded` only where HiGHS says so; a partial set that finds no plan is `unknown`,
/// also on instances HiGHS solves (which were reported infeasible before).
#[test]
fn partial_sets_claim_only_what_highs_confirms() {
    let mut unknown_but_feasible = 0;
    let mut judged = 0;
    for fixture in fixtures() {
        for case in &fixture.variants {
            // Reference: HiGHS 1.16.0 through highspy (named in each fixture file).
            let want = case.expect.status.as_str();
            for norm in [2, 4] {
                let p = partial(
                    &fixture.matrix,
                    &case.rhs,
                    &case.cost,
                    &case.lower,
                    &case.upper,
                    norm,
                );
                let answer = judge(&p.verdict, p.bound.as_ref());
                let id = &case.id;
                match &answer {
                    Answer::Optimal { objective, .. } => {
                        assert_eq!(want, "optimal", "{id} norm {norm}: {answer:?}");
                        assert_eq!(Some(*objective), case.expect.objective, "{id}");
                    }
                    Answer::Feasible { bound, .. } if want == "unbounded" => {
                        // A feasible plan, rightly not claimed optimal; no finite bound exists.
                        assert!(bound.is_none(), "{id}: a bound on an unbounded instance");
                    }
                    Answer::Feasible {
                        objective, bound, ..
                    } => {
                        assert_eq!(want, "optimal", "{id} norm {norm}: {answer:?}");
                        let optimum = case.expect.objective.unwrap();
                        assert!(*objective >= optimum, "{id}: a plan below the optimum");
                        if let Some(bound) = bound {
                            assert!(*bound <= BigInt::from(optimum), "{id}: bound too high");
                        }
                    }
                    Answer::Infeasible(_) => {
                        assert_eq!(want, "infeasible", "{id} norm {norm}: {answer:?}")
                    }
                    Answer::Unbounded(_) => {
                        assert_eq!(want, "unbounded", "{id} norm {norm}: {answer:?}")
                    }
                    Answer::Unknown { .. } => {
                        unknown_but_feasible += usize::from(want == "optimal");
                    }
                    other => panic!("{id} norm {norm}: {other:?}"),
                }
                let rows: Vec<String> =
                    (0..fixture.matrix.len()).map(|r| format!("r{r}")).collect();
                let document =
                    Outcome::of_bounded(&p.verdict, p.bound.as_ref(), &fixture.variables, &rows);
                assert_eq!(
                    matches!(document, Outcome::InfeasibleUnproven { .. }),
                    matches!(answer, Answer::Unknown { .. }),
                    "{id}: the document says what the answer says"
                );
                judged += 1;
            }
        }
    }
    assert!(judged >= 400, "only {judged} answers");
    assert!(
        unknown_but_feasible > 0,
        "the fixtures should hold a feasible instance that a partial set cannot start"
    );
}

/// The 3 x 3 transport plan of `examples/transport_3x3.json`; its Graver basis has moves of
/// norm 4 and 6 (the 4- and 6-cycles of K_{3,3}; Sturmfels 1996, chapter 5), so norm 4
/// is a partial set. The LP relaxation of a transport problem is integral (Schrijver 1986,
/// chapter 19), so its bound meets the optimum wherever the partial set reaches it.
fn transport(norm: u64) -> Partial {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/transport_3x3.json"
    ))
    .unwrap();
    let m = Model::from_str(&text, ModelKind::Json, "transport_3x3.json").unwrap();
    partial(
        &m.matrix.to_rows(),
        &m.rhs,
        &m.cost,
        &m.lower,
        &m.upper,
        norm,
    )
}

#[test]
fn a_forged_bound_is_refused() {
    let p = transport(4);
    let bound = p
        .bound
        .clone()
        .expect("a transport plan has a finite bound");
    let (cost, _) = p.verdict.optimum().unwrap();
    let check = |b: &DualBound| {
        recheck_with_bound(
            &p.model.matrix,
            Numbers::of(&p.model),
            p.prepared.checker(),
            &p.verdict,
            Some(b),
        )
    };
    assert!(check(&bound).unwrap().unwrap().holds);
    // A value that its multipliers do not give.
    let mut raised = bound.clone();
    raised.value += BigRational::from(BigInt::from(1)) / BigInt::from(3);
    let refuted = check(&raised).unwrap().unwrap();
    assert!(!refuted.holds);
    assert!(matches!(refuted.confirm(), Err(Error::Refuted { .. })));
    // Multipliers changed under the same value.
    let mut tampered = bound.clone();
    tampered.multipliers.numerators[0] += 1;
    assert!(!check(&tampered).unwrap().unwrap().holds);
    // A value above the plan's cost, claimed with multipliers that give it, cannot exist for a
    // valid plan; claimed anyway, it is refused (an unmet bound is checked too).
    let mut above = bound.clone();
    above.value = BigRational::from(BigInt::from(cost + 5));
    assert!(check(&above).is_err() || !check(&above).unwrap().unwrap().holds);
}

#[test]
fn the_partial_transport_plan_is_proven_optimal_by_its_bound() {
    let p = transport(4);
    let Verdict::Solved(s) = &p.verdict else {
        panic!("{:?}", p.verdict)
    };
    assert_eq!(s.status, Status::OptimalForMovesUpTo(4));
    let bound = p.bound.as_ref().unwrap();
    // The optimum is 691: HiGHS 1.16.0 through highspy, integer columns with these bounds
    // and equality rows (run by hand, as scripts/solve_fixtures.py calls it).
    assert_eq!(s.objective, Some(691));
    assert!(bound.meets(691));
    assert_eq!(bound.ceiling(), BigInt::from(691));
}
