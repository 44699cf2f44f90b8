//! One certified answer per solve, whatever the engine: the single place where a solve's
//! status is decided from what was proven.
//!
//! A status claims only what a certificate backs. A plan is `optimal` when a test set for
//! the instance finds no improving move (the Graver basis, or its box-truncation inside the
//! box; Graver 1975, Murota, Saito and Weismantel 2004), when a dual bound meets its cost,
//! or when network potentials prove it (reduced costs; Ahuja, Magnanti and Orlin 1993,
//! §9.3). An instance is `infeasible` only with a proof: a lattice certificate (`y^T A`
//! integral, `y^T b` not), an empty variable range, a complete set whose phase I stalls
//! above zero, or a network cut. A partial set that finds no feasible start proves nothing:
//! that is `unknown`, never `infeasible`.

use augment::{InfeasibleReason, Orientation, Status};
use num_bigint::BigInt;
use num_rational::BigRational;

use crate::bound::DualBound;
use crate::network::{FlowOutcome, Infeasibility};
use crate::solve::Verdict;

/// What proves a plan optimal.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Claim {
    /// A test set for the instance (complete, or box-truncated inside its box) has no
    /// improving move at the plan.
    TestSet,
    /// A dual bound of the relaxation meets the plan's cost.
    BoundMet,
    /// Row potentials whose reduced costs prove the network flow optimal.
    Potentials,
}

/// What proves that an instance has no plan.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Proof {
    /// `A x = b` has no integer solution: `y^T A` is integral and `y^T b` is not.
    NoIntegerSolution {
        /// The multipliers `y`, one per row.
        multipliers: Vec<BigRational>,
    },
    /// A variable's lower bound lies above its upper bound.
    EmptyRange {
        /// The variable's index.
        variable: usize,
    },
    /// Phase I reached its minimum total violation with a test set, and it is positive: no
    /// lattice point of the fibre lies in the box.
    NoLatticePointInBox {
        /// The minimum of `sum_i dist(x_i, [l_i, u_i])`.
        min_violation: i128,
    },
    /// The rows of a network cut, summed with their weights, ask for a balance the arcs'
    /// bounds cannot give.
    Cut {
        /// Per row, `-1`, `0` or `1`.
        weights: Vec<i64>,
    },
}

/// A direction along which the cost falls without limit, from the returned plan.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Ray {
    /// Index of the move in the set; `None` for a cycle of a network (an implicit set) or a
    /// ray that no single move gives (the difference of two points of the descent).
    pub move_index: Option<usize>,
    /// The sign in which the move is applied.
    pub sign: Orientation,
    /// The signed direction.
    pub direction: Vec<i64>,
}

/// The limit that ended a solve before it could prove anything.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Limit {
    /// The step limit.
    Steps,
    /// The cancellation hook (Ctrl-C).
    Cancelled,
}

/// How one solve ended, and what backs it.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Answer {
    /// The plan is optimal; `claim` proves it.
    Optimal {
        /// The plan's cost.
        objective: i128,
        /// What proves it.
        claim: Claim,
    },
    /// A feasible plan that no move of the set (truncated at `norm`) improves, without a
    /// proof of optimality: `bound` (when one was found) is a proven lower bound below its cost.
    Feasible {
        /// The plan's cost.
        objective: i128,
        /// The ℓ1 norm limit of the set.
        norm: u64,
        /// The ceiling of the proven lower bound, when there is one.
        bound: Option<BigInt>,
    },
    /// No plan exists; `proof` shows why.
    Infeasible(Proof),
    /// The cost falls without limit along the ray (a feasible point and a direction that
    /// stays feasible: a proof whatever the set).
    Unbounded(Ray),
    /// A partial set found no feasible plan: nothing is proven either way.
    Unknown {
        /// The total bound violation where no move of the set helped any more.
        violation: i128,
    },
    /// A limit stopped the solve.
    Stopped(Limit),
}

impl Answer {
    /// The status word: `optimal`, `feasible`, `infeasible`, `unbounded`, `unknown` or
    /// `stopped`.
    pub fn word(&self) -> &'static str {
        match self {
            Answer::Optimal { .. } => "optimal",
            Answer::Feasible { .. } => "feasible",
            Answer::Infeasible(_) => "infeasible",
            Answer::Unbounded(_) => "unbounded",
            Answer::Unknown { .. } => "unknown",
            Answer::Stopped(_) => "stopped",
        }
    }

    /// The gap between a feasible plan's cost and its proven bound.
    pub fn gap(&self) -> Option<BigInt> {
        match self {
            Answer::Feasible {
                objective,
                bound: Some(bound),
                ..
            } => Some(BigInt::from(*objective) - bound),
            _ => None,
        }
    }
}

/// The answer a solve's `verdict` certifies, with the dual `bound` found for a plan from a
/// truncated set (if any).
pub fn judge(verdict: &Verdict, bound: Option<&DualBound>) -> Answer {
    match verdict {
        Verdict::NoIntegerSolution(certificate) => Answer::Infeasible(Proof::NoIntegerSolution {
            multipliers: certificate.y.clone(),
        }),
        Verdict::Flow(answer) => of_flow(&answer.solution.outcome),
        Verdict::Solved(solution) => match &solution.status {
            Status::Optimal => Answer::Optimal {
                objective: solution.objective.unwrap_or_default(),
                claim: Claim::TestSet,
            },
            Status::OptimalForMovesUpTo(norm) => {
                let objective = solution.objective.unwrap_or_default();
                match bound {
                    Some(b) if b.meets(objective) => Answer::Optimal {
                        objective,
                        claim: Claim::BoundMet,
                    },
                    _ => Answer::Feasible {
                        objective,
                        norm: *norm,
                        bound: bound.map(DualBound::ceiling),
                    },
                }
            }
            Status::Infeasible(InfeasibleReason::EmptyRange { variable }) => {
                Answer::Infeasible(Proof::EmptyRange {
                    variable: *variable,
                })
            }
            Status::Infeasible(InfeasibleReason::NoLatticePointInBox { min_violation }) => {
                Answer::Infeasible(Proof::NoLatticePointInBox {
                    min_violation: *min_violation,
                })
            }
            Status::Infeasible(InfeasibleReason::Unproven { violation }) => Answer::Unknown {
                violation: *violation,
            },
            Status::Unbounded(ray) => Answer::Unbounded(Ray {
                move_index: ray.move_index,
                sign: ray.sign,
                direction: ray.direction.clone(),
            }),
            Status::StepLimit => Answer::Stopped(Limit::Steps),
            Status::Cancelled => Answer::Stopped(Limit::Cancelled),
        },
    }
}

fn of_flow(outcome: &FlowOutcome) -> Answer {
    match outcome {
        FlowOutcome::Optimal { objective, .. } => Answer::Optimal {
            objective: *objective,
            claim: Claim::Potentials,
        },
        FlowOutcome::Infeasible(Infeasibility::EmptyRange { arc }) => {
            Answer::Infeasible(Proof::EmptyRange { variable: *arc })
        }
        FlowOutcome::Infeasible(Infeasibility::Cut(cut)) => Answer::Infeasible(Proof::Cut {
            weights: cut.weights.clone(),
        }),
        FlowOutcome::Unbounded { cycle, flow } => Answer::Unbounded(Ray {
            move_index: None,
            sign: Orientation::Plus,
            direction: cycle.vector(flow.len()),
        }),
        FlowOutcome::StepLimit { .. } => Answer::Stopped(Limit::Steps),
        FlowOutcome::Cancelled { .. } => Answer::Stopped(Limit::Cancelled),
    }
}
