//! Independent re-checks of a solve's claim, from the final point and the plain move rows.
//!
//! Nothing here reuses the solver's scans: each claim is tested on the instance's own numbers.
//! Every claim about a point first checks the point itself: `A x = b` exactly, over the
//! matrix, and (for a plan) the bounds, so a point off the fibre (a tampered warm start, say)
//! is never certified.
//! - Optimal: [`augment::Checker::certify`] tries every move in both signs with a unit step (enough
//!   by convexity).
//! - No lattice point in the box: no move in either sign lowers the total violation at the
//!   final point ([`augment::Checker::violation_decrease`]); with a complete Graver basis, a test set
//!   for that separable convex function (Murota, Saito, Weismantel 2004), the minimum is
//!   positive.
//! - No integer solution: `y^T A` is integral and `y^T b` is not.
//! - Unbounded: `A d = 0`, the cost falls along `d` at a negative asymptotic rate, the start
//!   of the ray lies in the box and every variable that `d` changes is unbounded in that
//!   direction.

use augment::{Certificate, Checker, Problem, Solution, Status};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::decimal::Decimal;
use super::outcome::sign_number;
use num_bigint::BigInt;
use num_traits::Zero;

use crate::bound::DualBound;
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;
use crate::network::{certificate, FlowOutcome, Infeasibility};
use crate::solve::{Numbers, Verdict};

/// Which claim was re-checked.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum Claim {
    /// No move, in either sign, is feasible and improving at the final plan.
    NoImprovingMove,
    /// No move, in either sign, lowers the total bound violation at the final point.
    NoViolationDecrease,
    /// The lattice certificate `y` proves that `A x = b` has no integer solution.
    LatticeCertificate,
    /// The reported ray is a feasible direction of unbounded improvement.
    Ray,
    /// Row potentials `y` give every variable a reduced cost `c_j - (y^T A)_j` of the sign
    /// its bounds allow at the plan, so no point of the box is cheaper (LP duality; network
    /// solves).
    DualPotentials,
    /// The weighted sum of a cut's rows asks for a value the bounds cannot give (network
    /// solves).
    Cut,
    /// The dual bound `L(y)`, re-evaluated exactly from its multipliers, rounds up to the
    /// plan's cost: no plan is cheaper, whatever set found this one.
    BoundMet,
    /// The dual bound, re-evaluated exactly from its multipliers, is at most the plan's cost
    /// (a valid bound with a gap).
    BoundBelowCost,
}

impl Claim {
    /// The claim in a few words, for messages.
    pub fn words(self) -> &'static str {
        match self {
            Claim::NoImprovingMove => "no move improves the plan",
            Claim::NoViolationDecrease => "no move lowers the bound violation",
            Claim::LatticeCertificate => "A x = b has no integer solution",
            Claim::Ray => "the cost falls without limit along the ray",
            Claim::DualPotentials => "the row potentials prove the plan optimal",
            Claim::Cut => "the cut's rows cannot be balanced within the bounds",
            Claim::BoundMet => "the dual bound meets the plan's cost",
            Claim::BoundBelowCost => "the dual bound is at most the plan's cost",
        }
    }
}

/// A move applied in one sign.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct SignedMove {
    /// Index of the move in the set.
    pub move_index: usize,
    /// `1` or `-1`.
    pub sign: i8,
    /// What the signed move changes: the objective gain or the violation decrease.
    pub gain: Decimal,
}

/// What is wrong with the point a claim is about.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(tag = "tag", rename_all = "snake_case")]
pub enum Defect {
    /// Row `row` of `A x` is `value`, not the right-hand side `rhs`.
    OffFibre {
        /// Index of the row.
        row: usize,
        /// `(A x)_row`.
        value: Decimal,
        /// `b_row`.
        rhs: i64,
    },
    /// The plan lies outside the bounds of this variable.
    OutsideBox {
        /// Index of the variable.
        variable: usize,
    },
    /// A network certificate (potentials, cut or cycle) fails its check, for this reason.
    Certificate {
        /// What the check found.
        why: String,
    },
}

/// The result of re-checking one claim.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct Recheck {
    /// What was checked.
    pub claim: Claim,
    /// Whether the claim holds.
    pub holds: bool,
    /// How many moves were tried, each in both signs (0 for certificate and ray checks).
    pub moves_checked: usize,
    /// A signed move that refutes the claim, if one was found.
    pub counterexample: Option<SignedMove>,
    /// What is wrong with the point itself, if anything.
    pub defect: Option<Defect>,
}

impl Recheck {
    /// `Ok` when the claim holds, else [`Error::Refuted`] saying what refutes it.
    pub fn confirm(&self) -> Result<()> {
        if self.holds {
            return Ok(());
        }
        let why = match (&self.defect, &self.counterexample) {
            (Some(Defect::OffFibre { row, value, rhs }), _) => {
                format!("row {row} of A x is {value}, the right-hand side {rhs}")
            }
            (Some(Defect::OutsideBox { variable }), _) => {
                format!("variable {variable} lies outside its bounds")
            }
            (Some(Defect::Certificate { why }), _) => why.clone(),
            (None, Some(c)) => format!(
                "move {} in sign {:+} changes the value by {}",
                c.move_index, c.sign, c.gain
            ),
            (None, None) => "the certificate does not hold".to_string(),
        };
        Err(Error::Refuted {
            claim: self.claim.words(),
            why,
        })
    }

    fn of_point(claim: Claim, moves_checked: usize, defect: Defect) -> Self {
        Recheck {
            claim,
            holds: false,
            moves_checked,
            counterexample: None,
            defect: Some(defect),
        }
    }
}

/// Re-checks what `verdict` claims for the instance `numbers` of `matrix` with the checker's
/// copy of the set (see [`crate::solve::Prepared::checker`]; network verdicts carry their
/// own certificates and need none); `None` when the verdict claims nothing checkable (empty
/// range, step limit, cancelled).
pub fn recheck(
    matrix: &IntMatrix,
    numbers: Numbers<'_>,
    moves: Option<&Checker>,
    verdict: &Verdict,
) -> Result<Option<Recheck>> {
    let solution = match verdict {
        Verdict::Flow(f) => return flow_recheck(matrix, numbers, &f.solution.outcome),
        Verdict::NoIntegerSolution(certificate) => {
            return Ok(Some(Recheck {
                claim: Claim::LatticeCertificate,
                holds: certificate.check(matrix, numbers.rhs),
                moves_checked: 0,
                counterexample: None,
                defect: None,
            }))
        }
        Verdict::Solved(solution) => solution,
    };
    let claim = match &solution.status {
        Status::Optimal | Status::OptimalForMovesUpTo(_) => Claim::NoImprovingMove,
        Status::Infeasible(augment::InfeasibleReason::EmptyRange { .. }) => return Ok(None),
        Status::Infeasible(_) => Claim::NoViolationDecrease,
        Status::Unbounded(_) => Claim::Ray,
        Status::StepLimit | Status::Cancelled => return Ok(None),
    };
    if solution.x.len() != matrix.cols() {
        return Err(Error::Dimension(format!(
            "the solve returned {} values for {} variables",
            solution.x.len(),
            matrix.cols()
        )));
    }
    if let Some((row, value)) = matrix.first_unmet_row(&solution.x, numbers.rhs) {
        let defect = Defect::OffFibre {
            row,
            value: Decimal::from(value),
            rhs: numbers.rhs[row],
        };
        return Ok(Some(Recheck::of_point(claim, 0, defect)));
    }
    let problem = numbers.problem()?;
    let moves = moves.ok_or_else(|| {
        Error::Dimension("the re-check of a test-set solve needs the set's moves".into())
    })?;
    let checked = match &solution.status {
        Status::Unbounded(ray) => ray_check(matrix, &problem, solution, &ray.direction)?,
        _ if claim == Claim::NoImprovingMove => optimality(&problem, moves, &solution.x)?,
        _ => violation(&problem, moves, &solution.x)?,
    };
    Ok(Some(checked))
}

/// Like [`recheck`], for a verdict reported with the dual bound `bound`: a bound that meets
/// the plan's cost is the claim checked ([`Claim::BoundMet`]); a bound with a gap must hold as
/// well ([`Claim::BoundBelowCost`], else [`Error::Refuted`]) before the verdict's own claim
/// is checked.
pub fn recheck_with_bound(
    matrix: &IntMatrix,
    numbers: Numbers<'_>,
    moves: Option<&Checker>,
    verdict: &Verdict,
    bound: Option<&DualBound>,
) -> Result<Option<Recheck>> {
    let Some(bound) = bound else {
        return recheck(matrix, numbers, moves, verdict);
    };
    let checked = bound_check(matrix, numbers, verdict, bound)?;
    if checked.claim == Claim::BoundMet {
        return Ok(Some(checked));
    }
    checked.confirm()?;
    recheck(matrix, numbers, moves, verdict)
}

/// Checks `bound` against the plan of `verdict` from the numbers alone: the plan meets the
/// rows and the box, its cost is recomputed, `L(y)` is re-evaluated exactly from the
/// multipliers and must equal the reported value, and `ceil(L(y))` may not exceed the cost.
fn bound_check(
    matrix: &IntMatrix,
    numbers: Numbers<'_>,
    verdict: &Verdict,
    bound: &DualBound,
) -> Result<Recheck> {
    let (claimed, x) = verdict.optimum().ok_or_else(|| {
        Error::Dimension("a dual bound was reported for a solve without a plan".into())
    })?;
    let claim = if bound.meets(claimed) {
        Claim::BoundMet
    } else {
        Claim::BoundBelowCost
    };
    let refuted = |why: String| Ok(Recheck::of_point(claim, 0, Defect::Certificate { why }));
    if x.len() != matrix.cols() {
        return refuted(format!(
            "the plan has {} values for {} variables",
            x.len(),
            matrix.cols()
        ));
    }
    if let Some((row, value)) = matrix.first_unmet_row(x, numbers.rhs) {
        let defect = Defect::OffFibre {
            row,
            value: Decimal::from(value),
            rhs: numbers.rhs[row],
        };
        return Ok(Recheck::of_point(claim, 0, defect));
    }
    let problem = numbers.problem()?;
    if let Some(variable) = problem.first_outside(x) {
        return Ok(Recheck::of_point(claim, 0, Defect::OutsideBox { variable }));
    }
    let cost = problem.objective().value(x)?;
    if cost != claimed {
        return refuted(format!("the plan costs {cost}, not the reported {claimed}"));
    }
    let value = numbers
        .bound_instance(matrix)
        .evaluate(&bound.multipliers)?;
    if value.as_ref() != Some(&bound.value) {
        let found = value.map_or("minus infinity".to_string(), |v| v.to_string());
        return refuted(format!(
            "the multipliers give the bound {found}, not the reported {}",
            bound.value
        ));
    }
    if bound.gap(cost) < BigInt::zero() {
        return refuted(format!(
            "the bound {} exceeds the plan's cost {cost}: the bound or the plan is wrong",
            bound.value
        ));
    }
    Ok(Recheck {
        claim,
        holds: true,
        moves_checked: 0,
        counterexample: None,
        defect: None,
    })
}

/// The claim of a network solve, checked by [`certificate::check`] from the matrix and the
/// numbers alone (LP duality for potentials and cuts, `A d = 0` and the bounds for a ray).
fn flow_recheck(
    matrix: &IntMatrix,
    numbers: Numbers<'_>,
    outcome: &FlowOutcome,
) -> Result<Option<Recheck>> {
    let claim = match outcome {
        FlowOutcome::Optimal { .. } => Claim::DualPotentials,
        FlowOutcome::Infeasible(Infeasibility::Cut(_)) => Claim::Cut,
        FlowOutcome::Unbounded { .. } => Claim::Ray,
        FlowOutcome::Infeasible(Infeasibility::EmptyRange { .. })
        | FlowOutcome::StepLimit { .. }
        | FlowOutcome::Cancelled { .. } => return Ok(None),
    };
    let defect = match certificate::check(matrix, numbers.linear_flow(), outcome) {
        Ok(()) => None,
        Err(Error::Refuted { why, .. }) => Some(Defect::Certificate { why }),
        Err(other) => return Err(other),
    };
    Ok(Some(Recheck {
        claim,
        holds: defect.is_none(),
        moves_checked: 0,
        counterexample: None,
        defect,
    }))
}

fn optimality(problem: &Problem, moves: &Checker, x: &[i64]) -> Result<Recheck> {
    let claim = Claim::NoImprovingMove;
    let counterexample = match moves.certify(problem, x)? {
        Certificate::NoImprovingMove => None,
        Certificate::OutsideBox { variable } => {
            let defect = Defect::OutsideBox { variable };
            return Ok(Recheck::of_point(claim, 0, defect));
        }
        Certificate::Improving {
            move_index,
            sign,
            gain,
        } => Some(SignedMove {
            move_index,
            sign: sign_number(sign),
            gain: Decimal::from(gain),
        }),
    };
    Ok(Recheck {
        claim,
        holds: counterexample.is_none(),
        moves_checked: moves.len(),
        counterexample,
        defect: None,
    })
}

fn violation(problem: &Problem, moves: &Checker, x: &[i64]) -> Result<Recheck> {
    let counterexample = moves.violation_decrease(problem, x)?.map(|d| SignedMove {
        move_index: d.move_index,
        sign: sign_number(d.sign),
        gain: Decimal::from(d.amount),
    });
    Ok(Recheck {
        claim: Claim::NoViolationDecrease,
        holds: counterexample.is_none() && problem.violation(x)? > 0,
        moves_checked: moves.len(),
        counterexample,
        defect: None,
    })
}

fn ray_check(
    matrix: &IntMatrix,
    problem: &Problem,
    solution: &Solution,
    d: &[i64],
) -> Result<Recheck> {
    let claim = Claim::Ray;
    if let Some(variable) = problem.first_outside(&solution.x) {
        return Ok(Recheck::of_point(claim, 0, Defect::OutsideBox { variable }));
    }
    let zero = vec![0; matrix.rows()];
    let in_kernel = d.len() == matrix.cols() && matrix.first_unmet_row(d, &zero).is_none();
    let descends = in_kernel
        && problem
            .objective()
            .recession_rate(d)?
            .is_some_and(|rate| rate < 0);
    let free = d.iter().enumerate().all(|(i, &v)| {
        v == 0 || (v > 0 && problem.upper()[i].is_none()) || (v < 0 && problem.lower()[i].is_none())
    });
    Ok(Recheck {
        claim,
        holds: descends && free,
        moves_checked: 0,
        counterexample: None,
        defect: None,
    })
}

#[cfg(test)]
mod tests {
    use std::time::Duration;

    use augment::{Coverage, InfeasibleReason, Ray};

    use super::*;
    use crate::model::{Model, ModelKind};

    /// The lane plan of `examples/lane_plan.toml`; its kernel is spanned by `(1, -1, -1, 1)`.
    fn lanes(upper: &str) -> (Model, augment::MoveSet) {
        let text = format!(
            r#"{{"matrix": [[1,1,0,0],[1,0,1,0],[0,1,0,1]], "rhs": [7,5,6],
                "cost": [4,6,5,3], "lower": [0,0,0,0], "upper": {upper}}}"#
        );
        let model = Model::from_str(&text, ModelKind::Json, "lanes").unwrap();
        let moves = augment::MoveSet::from_rows(4, &[vec![1, -1, -1, 1]], Coverage::Complete);
        (model, moves.unwrap())
    }

    /// The re-check of `verdict` for the lane plan `model` with its `moves`, which gives one.
    fn recheck_lanes(model: &Model, moves: &augment::MoveSet, verdict: &Verdict) -> Recheck {
        recheck(
            &model.matrix,
            Numbers::of(model),
            Some(&Checker::new(std::sync::Arc::new(moves.clone()))),
            verdict,
        )
        .unwrap()
        .unwrap()
    }

    fn claimed(status: Status, x: Vec<i64>) -> Verdict {
        Verdict::Solved(Solution {
            status,
            x,
            objective: None,
            violation: 0,
            feasibility_steps: 0,
            optimality_steps: 0,
            elapsed: Duration::ZERO,
            trace: None,
        })
    }

    #[test]
    fn optimality_holds_at_the_optimum_and_fails_one_move_short() {
        let (model, moves) = lanes("[5, null, 4, null]");
        // By hand: with x_1 = t the cost is 64 - 4t and t <= 5, so (5, 2, 0, 4) is optimal.
        let good = recheck_lanes(&model, &moves, &claimed(Status::Optimal, vec![5, 2, 0, 4]));
        assert!(good.holds && good.claim == Claim::NoImprovingMove && good.moves_checked == 1);
        let bad = recheck_lanes(&model, &moves, &claimed(Status::Optimal, vec![4, 3, 1, 3]));
        assert!(!bad.holds);
        let expected = SignedMove {
            move_index: 0,
            sign: 1,
            gain: Decimal::from(4),
        };
        assert_eq!(bad.counterexample, Some(expected));
    }

    #[test]
    fn a_plan_off_the_fibre_is_never_certified() {
        let (model, moves) = lanes("[5, null, 4, null]");
        // (5, 2, 0, 3) lies in the box and no move improves it, but row 3 sums to 5, not 6.
        let verdict = claimed(Status::Optimal, vec![5, 2, 0, 3]);
        let check = recheck_lanes(&model, &moves, &verdict);
        assert!(!check.holds);
        let defect = Defect::OffFibre {
            row: 2,
            value: Decimal::from(5),
            rhs: 6,
        };
        assert_eq!(check.defect, Some(defect));
        let message = check.confirm().unwrap_err().to_string();
        assert!(message.contains("row 2 of A x is 5"), "{message}");
        // The same point claimed as the start of a ray, or as a minimum violation.
        let ray = Ray {
            move_index: Some(0),
            sign: augment::Orientation::Plus,
            direction: vec![1, -1, -1, 1],
        };
        let reason = InfeasibleReason::NoLatticePointInBox { min_violation: 1 };
        for status in [Status::Unbounded(ray), Status::Infeasible(reason)] {
            let verdict = claimed(status, vec![5, 2, 0, 3]);
            assert!(!recheck_lanes(&model, &moves, &verdict).holds);
        }
    }

    #[test]
    fn a_plan_outside_the_box_is_never_certified() {
        let (model, moves) = lanes("[5, null, 4, null]");
        // (6, 1, -1, 5) meets every row but lies above the upper bound of x_1 (and below x_3's).
        let verdict = claimed(Status::Optimal, vec![6, 1, -1, 5]);
        let check = recheck_lanes(&model, &moves, &verdict);
        assert_eq!(check.defect, Some(Defect::OutsideBox { variable: 0 }));
        assert!(check.confirm().is_err());
    }

    #[test]
    fn an_empty_box_claim_fails_where_a_move_lowers_the_violation() {
        let (model, moves) = lanes("[1, 1, 1, 1]");
        let reason = InfeasibleReason::NoLatticePointInBox { min_violation: 1 };
        // (5, 2, 0, 4) violates by 4 + 1 + 3 = 8; minus the move, (4, 3, 1, 3) by 3 + 2 + 2 = 7.
        let verdict = claimed(Status::Infeasible(reason), vec![5, 2, 0, 4]);
        let check = recheck_lanes(&model, &moves, &verdict);
        assert_eq!(check.claim, Claim::NoViolationDecrease);
        assert!(!check.holds);
        assert_eq!(check.counterexample.map(|c| c.sign), Some(-1));
    }

    #[test]
    fn a_ray_must_avoid_finite_bounds() {
        let ray = Ray {
            move_index: Some(0),
            sign: augment::Orientation::Plus,
            direction: vec![1, -1, -1, 1],
        };
        let unbounded = |upper: &str| {
            let (mut model, moves) = lanes(upper);
            model.lower = vec![None; 4];
            let verdict = claimed(Status::Unbounded(ray.clone()), vec![5, 2, 0, 4]);
            recheck_lanes(&model, &moves, &verdict).holds
        };
        // c.d = 4 - 6 - 5 + 3 = -4 < 0.
        assert!(unbounded("[null, null, null, null]"));
        assert!(!unbounded("[5, null, null, null]"));
    }
}
