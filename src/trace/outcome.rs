//! How a solve ended, in the stable, tagged form of the `--json` documents.
//!
//! Each variant serialises as an object whose `"tag"` names it (snake case) and whose other
//! fields are its details; large values are decimal strings ([`Decimal`]). Variables are
//! named, so a reader needs no second file to understand a verdict.

use augment::Orientation;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::decimal::Decimal;
use crate::bound::DualBound;
use crate::certify::{judge, Answer, Limit, Proof};
use crate::solve::Verdict;

/// The outcome of one solve.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(tag = "tag", rename_all = "snake_case")]
#[non_exhaustive]
pub enum Outcome {
    /// No move improves and the set is a test set for the instance: the plan is optimal.
    Optimal,
    /// No move of ℓ1 norm up to `norm` improves; the set was truncated at that norm, so the
    /// plan is optimal among those moves only.
    OptimalForMovesUpTo {
        /// The ℓ1 norm limit of the set.
        norm: u64,
    },
    /// `A x = b` has no integer solution: `y^T A` is integral and `y^T b` is not.
    NoIntegerSolution {
        /// The multipliers `y`, one per row, as reduced fractions (`"1/2"`, `"0"`).
        multipliers: Vec<String>,
    },
    /// A variable's lower bound lies above its upper bound.
    EmptyRange {
        /// The variable's name.
        variable: String,
    },
    /// Phase I reached its minimum total violation with a complete set, and it is positive:
    /// no lattice point of the fibre lies in the box.
    NoLatticePointInBox {
        /// The minimum of `sum_i dist(x_i, [l_i, u_i])`.
        min_violation: Decimal,
    },
    /// No flow of the network meets the rows within the bounds: the rows of the cut, summed
    /// with their weights, ask for a balance the bounds of the arcs cannot give.
    InfeasibleCut {
        /// The names of the cut's rows.
        rows: Vec<String>,
        /// Each row's weight (`1` or `-1`), in the order of `rows`.
        weights: Vec<i64>,
    },
    /// Phase I found no feasible point, but the set is incomplete, so this proves nothing.
    InfeasibleUnproven {
        /// The violation where no move helped any more.
        violation: Decimal,
    },
    /// The cost falls without limit along `direction`, from the returned plan.
    Unbounded {
        /// Index of the move in the set; `null` for a cycle of a network, whose set is
        /// implicit.
        move_index: Option<usize>,
        /// `1` or `-1`: the sign in which the move is applied.
        sign: i8,
        /// The signed move.
        direction: Vec<i64>,
    },
    /// The step limit stopped the solve.
    StepLimit,
    /// The solve was interrupted.
    Cancelled,
}

impl Outcome {
    /// The outcome of `verdict` without a dual bound; `names` names the variables and `rows`
    /// the rows.
    pub fn of(verdict: &Verdict, names: &[String], rows: &[String]) -> Outcome {
        Outcome::of_answer(&judge(verdict, None), names, rows)
    }

    /// The outcome of `verdict` once `bound` is known: a plan optimal among the moves of a
    /// truncated set is optimal outright when the bound meets its cost (see [`judge`]).
    pub fn of_bounded(
        verdict: &Verdict,
        bound: Option<&DualBound>,
        names: &[String],
        rows: &[String],
    ) -> Outcome {
        Outcome::of_answer(&judge(verdict, bound), names, rows)
    }

    /// The document form of `answer`, with variables and rows named.
    pub fn of_answer(answer: &Answer, names: &[String], rows: &[String]) -> Outcome {
        match answer {
            Answer::Optimal { .. } => Outcome::Optimal,
            Answer::Feasible { norm, .. } => Outcome::OptimalForMovesUpTo { norm: *norm },
            Answer::Infeasible(Proof::NoIntegerSolution { multipliers }) => {
                Outcome::NoIntegerSolution {
                    multipliers: multipliers.iter().map(ToString::to_string).collect(),
                }
            }
            Answer::Infeasible(Proof::EmptyRange { variable }) => Outcome::EmptyRange {
                variable: names[*variable].clone(),
            },
            Answer::Infeasible(Proof::NoLatticePointInBox { min_violation }) => {
                Outcome::NoLatticePointInBox {
                    min_violation: Decimal::from(*min_violation),
                }
            }
            Answer::Infeasible(Proof::Cut { weights }) => {
                let members: Vec<usize> = (0..weights.len()).filter(|&r| weights[r] != 0).collect();
                Outcome::InfeasibleCut {
                    rows: members.iter().map(|&r| rows[r].clone()).collect(),
                    weights: members.iter().map(|&r| weights[r]).collect(),
                }
            }
            Answer::Unknown { violation } => Outcome::InfeasibleUnproven {
                violation: Decimal::from(*violation),
            },
            Answer::Unbounded(ray) => Outcome::Unbounded {
                move_index: ray.move_index,
                sign: sign_number(ray.sign),
                direction: ray.direction.clone(),
            },
            Answer::Stopped(Limit::Steps) => Outcome::StepLimit,
            Answer::Stopped(Limit::Cancelled) => Outcome::Cancelled,
        }
    }

    /// True when the solve produced an optimal plan (possibly only among moves up to a norm).
    pub fn is_optimal(&self) -> bool {
        matches!(self, Outcome::Optimal | Outcome::OptimalForMovesUpTo { .. })
    }
}

/// `1` for [`Orientation::Plus`], `-1` for [`Orientation::Minus`].
pub fn sign_number(sign: Orientation) -> i8 {
    match sign {
        Orientation::Plus => 1,
        Orientation::Minus => -1,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tags_are_snake_case_with_details_beside_them() {
        let text = serde_json::to_string(&Outcome::OptimalForMovesUpTo { norm: 12 }).unwrap();
        assert_eq!(text, r#"{"tag":"optimal_for_moves_up_to","norm":12}"#);
        let text = serde_json::to_string(&Outcome::NoLatticePointInBox {
            min_violation: Decimal::from(3),
        })
        .unwrap();
        assert_eq!(
            text,
            r#"{"tag":"no_lattice_point_in_box","min_violation":"3"}"#
        );
        let back: Outcome = serde_json::from_str(&text).unwrap();
        assert!(!back.is_optimal());
    }
}
