//! An independent optimality check: no move, in either sign, is feasible and improving.
//!
//! The check works on dense vectors and whole-point objective values, sharing nothing with the
//! sparse line search of the solver. A unit step suffices: if `x + t d` is feasible and better
//! for some `t >= 1`, then `x + d` lies in the (convex) box and, by convexity of `f`,
//! `f(x + d) <= (1 - 1/t) f(x) + (1/t) f(x + t d) < f(x)`.

use serde::{Deserialize, Serialize};

use crate::error::{overflow, Result};
use crate::moves::{MoveSet, Sign};
use crate::problem::Problem;

/// The verdict of [`certify`].
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum Certificate {
    /// `x` is feasible and no move improves it: optimal whenever the set is a test set.
    NoImprovingMove,
    /// `x` violates the bound of this variable.
    OutsideBox {
        /// The first variable outside its range.
        variable: usize,
    },
    /// This signed move is feasible at `x` and improves the objective.
    Improving {
        /// Index of the move in the set.
        move_index: usize,
        /// Sign in which the move improves.
        sign: Sign,
        /// `f(x) - f(x + sign * g)`, positive.
        gain: i128,
    },
}

/// Checks `x` against every move in both signs (see the module documentation).
pub fn certify(problem: &Problem, moves: &MoveSet, x: &[i64]) -> Result<Certificate> {
    if let Some(variable) = problem.first_outside(x) {
        return Ok(Certificate::OutsideBox { variable });
    }
    let base = problem.objective().value(x)?;
    let mut y = vec![0i64; x.len()];
    for move_index in 0..moves.len() {
        for sign in Sign::BOTH {
            for ((yi, &xi), &gi) in y.iter_mut().zip(x).zip(moves.row(move_index)) {
                *yi = gi
                    .checked_mul(sign.factor())
                    .and_then(|d| xi.checked_add(d))
                    .ok_or(overflow("adding a move to the point"))?;
            }
            if !problem.in_box(&y) {
                continue;
            }
            let gain = base
                .checked_sub(problem.objective().value(&y)?)
                .ok_or(overflow("comparing objective values"))?;
            if gain > 0 {
                return Ok(Certificate::Improving {
                    move_index,
                    sign,
                    gain,
                });
            }
        }
    }
    Ok(Certificate::NoImprovingMove)
}
