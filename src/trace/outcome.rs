//! How a solve ended, in the stable, tagged form of the `--json` documents.
//!
//! Each variant serialises as an object whose `"tag"` names it (snake case) and whose other
//! fields are its details; large values are decimal strings ([`Decimal`]). Variables are
//! named, so a reader needs no second file to understand a verdict.

use augment::{Coverage, InfeasibleReason, Sign, Status};
use serde::{Deserialize, Serialize};

use super::decimal::Decimal;
use crate::bound::DualBound;
use crate::network::{FlowOutcome, Infeasibility};
use crate::solve::Verdict;

/// The outcome of one solve.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(tag = "tag", rename_all = "snake_case")]
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
    /// The outcome of `verdict`; `names` names the variables and `rows` the rows.
    pub fn of(verdict: &Verdict, names: &[String], rows: &[String]) -> Outcome {
        let solution = match verdict {
            Verdict::NoIntegerSolution(c) => {
                return Outcome::NoIntegerSolution {
                    multipliers: c.y.iter().map(ToString::to_string).collect(),
                }
            }
            Verdict::Flow(f) => return Outcome::of_flow(&f.solution.outcome, names, rows),
            Verdict::Solved(solution) => solution,
        };
        match &solution.status {
            Status::Optimal => Outcome::Optimal,
            Status::OptimalForMovesUpTo(norm) => Outcome::OptimalForMovesUpTo { norm: *norm },
            Status::Infeasible(InfeasibleReason::EmptyRange { variable }) => Outcome::EmptyRange {
                variable: names[*variable].clone(),
            },
            Status::Infeasible(InfeasibleReason::NoLatticePointInBox { min_violation }) => {
                Outcome::NoLatticePointInBox {
                    min_violation: Decimal(*min_violation),
                }
            }
            Status::Infeasible(InfeasibleReason::Unproven { violation }) => {
                Outcome::InfeasibleUnproven {
                    violation: Decimal(*violation),
                }
            }
            Status::Unbounded(ray) => Outcome::Unbounded {
                move_index: Some(ray.move_index),
                sign: sign_number(ray.sign),
                direction: ray.direction.clone(),
            },
            Status::StepLimit => Outcome::StepLimit,
            Status::Cancelled => Outcome::Cancelled,
        }
    }

    /// The outcome of `verdict` once `bound` is known: a plan optimal among the moves of a
    /// truncated set is optimal outright when the bound meets its cost.
    pub fn of_bounded(
        verdict: &Verdict,
        bound: Option<&DualBound>,
        names: &[String],
        rows: &[String],
    ) -> Outcome {
        let outcome = Outcome::of(verdict, names, rows);
        match (&outcome, bound, verdict.optimum()) {
            (Outcome::OptimalForMovesUpTo { .. }, Some(b), Some((cost, _))) if b.meets(cost) => {
                Outcome::Optimal
            }
            _ => outcome,
        }
    }

    fn of_flow(outcome: &FlowOutcome, names: &[String], rows: &[String]) -> Outcome {
        match outcome {
            FlowOutcome::Optimal { .. } => Outcome::Optimal,
            FlowOutcome::Infeasible(Infeasibility::EmptyRange { arc }) => Outcome::EmptyRange {
                variable: names[*arc].clone(),
            },
            FlowOutcome::Infeasible(Infeasibility::Cut(cut)) => {
                let members = cut.rows();
                Outcome::InfeasibleCut {
                    rows: members.iter().map(|&r| rows[r].clone()).collect(),
                    weights: members.iter().map(|&r| cut.weights[r]).collect(),
                }
            }
            FlowOutcome::Unbounded { cycle, .. } => Outcome::Unbounded {
                move_index: None,
                sign: 1,
                direction: cycle.vector(names.len()),
            },
            FlowOutcome::StepLimit { .. } => Outcome::StepLimit,
            FlowOutcome::Cancelled { .. } => Outcome::Cancelled,
        }
    }

    /// True when the solve produced an optimal plan (possibly only among moves up to a norm).
    pub fn is_optimal(&self) -> bool {
        matches!(self, Outcome::Optimal | Outcome::OptimalForMovesUpTo { .. })
    }
}

/// `1` for [`Sign::Plus`], `-1` for [`Sign::Minus`].
pub fn sign_number(sign: Sign) -> i8 {
    match sign {
        Sign::Plus => 1,
        Sign::Minus => -1,
    }
}

/// What a move set guarantees, in the tagged form of the `--json` documents.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(tag = "tag", rename_all = "snake_case")]
pub enum CoverageDoc {
    /// The whole Graver basis: a test set for every instance.
    Complete,
    /// Every Graver element that fits the build's box: a test set inside that box.
    BoxValid,
    /// Every Graver element of ℓ1 norm up to `norm`.
    NormTruncated {
        /// The ℓ1 norm limit.
        norm: u64,
    },
}

impl From<Coverage> for CoverageDoc {
    fn from(coverage: Coverage) -> Self {
        match coverage {
            Coverage::Complete => CoverageDoc::Complete,
            Coverage::BoxValid => CoverageDoc::BoxValid,
            Coverage::NormTruncated(norm) => CoverageDoc::NormTruncated { norm },
        }
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
            min_violation: Decimal(3),
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
