//! What a solve returns: a status, the final point and its numbers, and an optional trace.

use std::fmt;
use std::time::Duration;

use serde::{Deserialize, Serialize};

use crate::moves::Orientation;

/// Why a problem has no feasible point (or none was found).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum InfeasibleReason {
    /// Variable `variable` has `l > u`.
    EmptyRange {
        /// The variable with the empty range.
        variable: usize,
    },
    /// With a complete set, phase I reached its minimum violation and it is positive: no
    /// lattice point of the start point's fibre lies in the box (the Graver basis is a test set
    /// for separable convex minimisation; Murota, Saito, Weismantel 2004).
    NoLatticePointInBox {
        /// The minimum total violation `sum_i dist(x_i, [l_i, u_i])`.
        min_violation: i128,
    },
    /// Phase I stopped with a positive violation, but the set is not complete, so this is no
    /// proof that the box is empty.
    Unproven {
        /// The violation at the point where no move helped any more.
        violation: i128,
    },
}

impl fmt::Display for InfeasibleReason {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            InfeasibleReason::EmptyRange { variable } => {
                write!(f, "variable {variable} has a lower bound above its upper bound")
            }
            InfeasibleReason::NoLatticePointInBox { min_violation } => write!(
                f,
                "no lattice point of this fibre lies in the box (minimum violation {min_violation})"
            ),
            InfeasibleReason::Unproven { violation } => write!(
                f,
                "no feasible point found (violation {violation}); the move set is incomplete, so this is not a proof"
            ),
        }
    }
}

/// A direction of unbounded improvement: adding it any number of times stays feasible.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Ray {
    /// Index of the move in the set; `None` for a ray that no single move gives, found as the
    /// difference of two points of the descent (see `recurrence.rs`).
    pub move_index: Option<usize>,
    /// Orientation in which the move is applied.
    pub sign: Orientation,
    /// The signed move itself.
    pub direction: Vec<i64>,
}

/// How a solve ended.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum Status {
    /// No move improves and the set is a test set for this problem: the point is optimal.
    Optimal,
    /// No move of l1 norm up to `N` improves; the set was truncated at that norm.
    OptimalForMovesUpTo(u64),
    /// No feasible point exists (or, with an incomplete set, none was found).
    Infeasible(InfeasibleReason),
    /// The objective is unbounded below along the ray, starting from the returned point.
    Unbounded(Ray),
    /// The step limit was reached before the solve finished.
    StepLimit,
    /// The cancellation hook asked to stop.
    Cancelled,
}

/// The two phases of a solve.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum Phase {
    /// Minimising the bound violation, from the start point.
    Feasibility,
    /// Minimising the objective, keeping the bounds.
    Optimality,
}

/// One augmenting step, as recorded in a trace.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct TraceStep {
    /// The phase the step belongs to.
    pub phase: Phase,
    /// Index of the move in the set.
    pub move_index: usize,
    /// Orientation in which the move was applied.
    pub sign: Orientation,
    /// Number of times the move was applied.
    pub length: i64,
    /// Violation (phase I) or objective (phase II) before the step.
    pub before: i128,
    /// The same quantity after the step.
    pub after: i128,
    /// `before - after`, always positive.
    pub gain: i128,
}

/// The result of a solve.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Solution {
    /// How the solve ended.
    pub status: Status,
    /// The final point (for `Unbounded`, where the ray starts).
    pub x: Vec<i64>,
    /// `f(x)`, once phase II has been reached; `None` while `x` is outside the box.
    pub objective: Option<i128>,
    /// The total bound violation at `x`.
    pub violation: i128,
    /// Steps taken in phase I.
    pub feasibility_steps: u64,
    /// Steps taken in phase II.
    pub optimality_steps: u64,
    /// Wall-clock time of the solve.
    pub elapsed: Duration,
    /// Every step, when the options asked for a trace.
    pub trace: Option<Vec<TraceStep>>,
}

impl Solution {
    /// Total number of steps in both phases.
    pub fn steps(&self) -> u64 {
        self.feasibility_steps + self.optimality_steps
    }
}
