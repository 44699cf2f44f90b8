//! Independent re-checks of a solve's claim, from the final point and the plain move rows.
//!
//! Nothing here reuses the solver's line search: each claim is tested on dense vectors.
//! - Optimal: [`augment::certify`] tries every move in both signs with a unit step (enough
//!   by convexity).
//! - No lattice point in the box: no move in either sign lowers the total violation at the
//!   final point; with a complete Graver basis, a test set for that separable convex function
//!   (Murota, Saito, Weismantel 2004), the minimum is positive.
//! - No integer solution: `y^T A` is integral and `y^T b` is not.
//! - Unbounded: `A d = 0`, `c.d < 0`, the start of the ray lies in the box and every variable
//!   that `d` changes is unbounded in that direction.

use augment::{certify, Certificate, Objective, Problem, Sign, Solution, Status};
use serde::{Deserialize, Serialize};

use super::decimal::Decimal;
use super::outcome::sign_number;
use crate::error::{Error, Result};
use crate::model::Model;
use crate::solve::Verdict;

/// Which claim was re-checked.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
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
}

/// A move applied in one sign.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct SignedMove {
    /// Index of the move in the set.
    pub move_index: usize,
    /// `1` or `-1`.
    pub sign: i8,
    /// What the signed move changes: the objective gain or the violation decrease.
    pub gain: Decimal,
}

/// The result of re-checking one claim.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Recheck {
    /// What was checked.
    pub claim: Claim,
    /// Whether the claim holds.
    pub holds: bool,
    /// How many moves were tried, each in both signs (0 for certificate and ray checks).
    pub moves_checked: usize,
    /// A signed move that refutes the claim, if one was found.
    pub counterexample: Option<SignedMove>,
}

/// Re-checks what `verdict` claims for `model` with the set `moves`; `None` when the verdict
/// claims nothing checkable (empty range, step limit, cancelled).
pub fn recheck(
    model: &Model,
    moves: &augment::MoveSet,
    verdict: &Verdict,
) -> Result<Option<Recheck>> {
    let solution = match verdict {
        Verdict::NoIntegerSolution(certificate) => {
            return Ok(Some(Recheck {
                claim: Claim::LatticeCertificate,
                holds: certificate.check(&model.matrix, &model.rhs),
                moves_checked: 0,
                counterexample: None,
            }))
        }
        Verdict::Solved(solution) => solution,
    };
    let problem = Problem::new(
        Objective::linear(model.cost.clone()),
        model.lower.clone(),
        model.upper.clone(),
    )?;
    match &solution.status {
        Status::Optimal | Status::OptimalForMovesUpTo(_) => {
            optimality(&problem, moves, &solution.x).map(Some)
        }
        Status::Infeasible(augment::InfeasibleReason::EmptyRange { .. }) => Ok(None),
        Status::Infeasible(_) => violation(&problem, moves, &solution.x).map(Some),
        Status::Unbounded(ray) => ray_holds(model, solution, &ray.direction).map(|holds| {
            Some(Recheck {
                claim: Claim::Ray,
                holds,
                moves_checked: 0,
                counterexample: None,
            })
        }),
        Status::StepLimit | Status::Cancelled => Ok(None),
    }
}

fn optimality(problem: &Problem, moves: &augment::MoveSet, x: &[i64]) -> Result<Recheck> {
    let (holds, counterexample) = match certify(problem, moves, x)? {
        Certificate::NoImprovingMove => (true, None),
        Certificate::OutsideBox { .. } => (false, None),
        Certificate::Improving {
            move_index,
            sign,
            gain,
        } => (
            false,
            Some(SignedMove {
                move_index,
                sign: sign_number(sign),
                gain: Decimal(gain),
            }),
        ),
    };
    Ok(Recheck {
        claim: Claim::NoImprovingMove,
        holds,
        moves_checked: moves.len(),
        counterexample,
    })
}

fn violation(problem: &Problem, moves: &augment::MoveSet, x: &[i64]) -> Result<Recheck> {
    let base = problem.violation(x)?;
    for move_index in 0..moves.len() {
        for sign in Sign::BOTH {
            let y = shifted(x, moves.row(move_index), sign.factor())?;
            let decrease = base - problem.violation(&y)?;
            if decrease > 0 {
                return Ok(Recheck {
                    claim: Claim::NoViolationDecrease,
                    holds: false,
                    moves_checked: moves.len(),
                    counterexample: Some(SignedMove {
                        move_index,
                        sign: sign_number(sign),
                        gain: Decimal(decrease),
                    }),
                });
            }
        }
    }
    Ok(Recheck {
        claim: Claim::NoViolationDecrease,
        holds: base > 0,
        moves_checked: moves.len(),
        counterexample: None,
    })
}

fn ray_holds(model: &Model, solution: &Solution, d: &[i64]) -> Result<bool> {
    let image = model
        .matrix
        .mul_vec(d)
        .ok_or_else(|| Error::Overflow("multiplying the ray by the matrix".into()))?;
    let slope = model
        .cost
        .iter()
        .zip(d)
        .try_fold(0i128, |sum, (&c, &v)| {
            sum.checked_add(i128::from(c) * i128::from(v))
        })
        .ok_or_else(|| Error::Overflow("the cost slope of the ray".into()))?;
    let x = &solution.x;
    let in_box = (0..x.len()).all(|i| {
        model.lower[i].is_none_or(|l| x[i] >= l) && model.upper[i].is_none_or(|u| x[i] <= u)
    });
    let free = d.iter().enumerate().all(|(i, &v)| {
        v == 0 || (v > 0 && model.upper[i].is_none()) || (v < 0 && model.lower[i].is_none())
    });
    Ok(image.iter().all(|&v| v == 0) && slope < 0 && in_box && free)
}

/// `x + factor * g`, with overflow reported.
fn shifted(x: &[i64], g: &[i64], factor: i64) -> Result<Vec<i64>> {
    x.iter()
        .zip(g)
        .map(|(&a, &b)| b.checked_mul(factor).and_then(|d| a.checked_add(d)))
        .collect::<Option<Vec<i64>>>()
        .ok_or_else(|| Error::Overflow("adding a move to a point".into()))
}

#[cfg(test)]
mod tests {
    use std::time::Duration;

    use augment::{Coverage, InfeasibleReason, Ray};

    use super::*;
    use crate::model::ModelKind;

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
        let good = recheck(&model, &moves, &claimed(Status::Optimal, vec![5, 2, 0, 4]));
        let good = good.unwrap().unwrap();
        assert!(good.holds && good.claim == Claim::NoImprovingMove && good.moves_checked == 1);
        let bad = recheck(&model, &moves, &claimed(Status::Optimal, vec![4, 3, 1, 3]));
        let bad = bad.unwrap().unwrap();
        assert!(!bad.holds);
        let expected = SignedMove {
            move_index: 0,
            sign: 1,
            gain: Decimal(4),
        };
        assert_eq!(bad.counterexample, Some(expected));
    }

    #[test]
    fn an_empty_box_claim_fails_where_a_move_lowers_the_violation() {
        let (model, moves) = lanes("[1, 1, 1, 1]");
        let reason = InfeasibleReason::NoLatticePointInBox { min_violation: 1 };
        // (5, 2, 0, 4) violates by 4 + 1 + 3 = 8; minus the move, (4, 3, 1, 3) by 3 + 2 + 2 = 7.
        let verdict = claimed(Status::Infeasible(reason), vec![5, 2, 0, 4]);
        let check = recheck(&model, &moves, &verdict).unwrap().unwrap();
        assert_eq!(check.claim, Claim::NoViolationDecrease);
        assert!(!check.holds);
        assert_eq!(check.counterexample.map(|c| c.sign), Some(-1));
    }

    #[test]
    fn a_ray_must_avoid_finite_bounds() {
        let ray = Ray {
            move_index: 0,
            sign: augment::Sign::Plus,
            direction: vec![1, -1, -1, 1],
        };
        let unbounded = |upper: &str| {
            let (mut model, moves) = lanes(upper);
            model.lower = vec![None; 4];
            let verdict = claimed(Status::Unbounded(ray.clone()), vec![5, 2, 0, 4]);
            recheck(&model, &moves, &verdict).unwrap().unwrap().holds
        };
        // c.d = 4 - 6 - 5 + 3 = -4 < 0.
        assert!(unbounded("[null, null, null, null]"));
        assert!(!unbounded("[5, null, null, null]"));
    }
}
