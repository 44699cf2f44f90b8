//! Solving one instance `(b, c, l, u)` of a model with a given set of moves, and the types
//! every solve shares: warm starts and verdicts (a network's verdict included, see
//! `network.rs`).
//!
//! The start point comes from the lattice core: an integer solution of `A x = b` (or, for a
//! warm start, yesterday's plan plus a particular solution of `A z = b - b_prev`); the
//! augmentation crate then does phase I and phase II. No integer solution at all is reported
//! with the lattice certificate. The start is then moved by kernel vectors (see `rounding.rs`)
//! towards the middle of the box or, for a warm start, towards yesterday's plan clamped into
//! today's box, whichever lands nearer the box; this leaves `A x = b` exact and saves phase I
//! most of its work.
//! Particular solutions come from a machine-integer copy of the Hermite form when it can
//! answer ([`QuickSolver`]), and from the exact big-integer solver otherwise. A box that
//! recurs gets its own cut of the set for phase II (see `fittings.rs`).

use std::sync::Arc;
use std::time::Duration;

use augment::{Coverage, Options, Solution, Status};
use cache::Completeness;

use super::fittings::Fittings;
use super::rounding::Rounding;
use super::variant::Numbers;
use crate::error::{Error, Result};
use crate::lattice::{to_i64_vec, Certificate, HermiteForm, IntegerSolution, QuickSolver};
use crate::matrix::IntMatrix;
use crate::network::{FlowOutcome, FlowSolution};

/// Largest entry of a quick particular solution that the floating-point rounding handles
/// precisely; larger ones are recomputed (and size-reduced) by the exact solver.
const QUICK_LIMIT: u64 = 1 << 40;

/// What a test set of moves needs per matrix: the Hermite form and roundings for start
/// points, the moves, the re-check's masks of them and the cuts for recurring boxes.
#[derive(Clone, Debug)]
pub(super) struct MoveEngine {
    matrix: IntMatrix,
    hermite: HermiteForm,
    quick: Option<QuickSolver>,
    rounding: Rounding,
    moves: Arc<augment::MoveSet>,
    /// The re-check, with its own sign masks of the same moves.
    checker: Arc<augment::Checker>,
    box_limit: Option<Vec<u64>>,
    /// Cuts of `moves` to the boxes that recur, for phase II.
    fittings: Arc<Fittings>,
}

/// How one instance is to be solved, whichever engine answers it: the solver's options, the
/// plan to start from if any, and the check for a cancellation. [`super::Prepared::solve_numbers`]
/// hands the same to either engine.
#[derive(Clone, Copy)]
pub(super) struct Attempt<'a> {
    /// The solver's options (step limit, trace; the selection rule for moves).
    pub options: &'a Options,
    /// A previous plan to start from.
    pub warm: Option<&'a WarmStart>,
    /// Whether to stop now.
    pub cancel: &'a dyn Fn() -> bool,
}

/// A previous plan to start from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct WarmStart {
    /// The right-hand side the plan was made for.
    pub rhs: Vec<i64>,
    /// The plan; `A x = rhs`.
    pub x: Vec<i64>,
    /// Row potentials that proved the plan optimal (network solves), which let the network
    /// solver start from yesterday's prices as well; `None` otherwise.
    pub potentials: Option<Vec<i64>>,
}

impl WarmStart {
    /// Checks that the plan belongs to `matrix` and meets its own right-hand side exactly
    /// (`A x = rhs`), so that a tampered or foreign plan is refused before it is used; errors
    /// name `origin` and the field.
    pub fn check(&self, matrix: &IntMatrix, origin: &str) -> Result<()> {
        let error = |field: &str, message: String| Error::Input {
            file: origin.to_string(),
            field: field.to_string(),
            message,
        };
        if self.x.len() != matrix.cols() {
            return Err(error(
                "x",
                format!(
                    "has {} values, the model has {} variables (a plan of another model?)",
                    self.x.len(),
                    matrix.cols()
                ),
            ));
        }
        if self.rhs.len() != matrix.rows() {
            return Err(error(
                "rhs",
                format!(
                    "has {} entries, the model has {} rows (a plan of another model?)",
                    self.rhs.len(),
                    matrix.rows()
                ),
            ));
        }
        match matrix.first_unmet_row(&self.x, &self.rhs) {
            None => Ok(()),
            Some((row, value)) => Err(error(
                "x",
                format!(
                    "the plan does not meet its right-hand side: row {row} of A x is {value}, rhs[{row}] is {} (an edited plan, or one of another model?)",
                    self.rhs[row]
                ),
            )),
        }
    }
}

/// How a solve ended.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Verdict {
    /// The augmentation ran; its status says optimal, infeasible in the box, unbounded, ...
    Solved(Solution),
    /// `A x = b` has no integer solution at all; the certificate `y` has `y^T A` integral and
    /// `y^T b` not.
    NoIntegerSolution(Certificate),
    /// The network solver ran (a network matrix, whose cycles are its test set); its outcome
    /// carries its own certificate (row potentials, a cut or a ray).
    Flow(FlowAnswer),
}

/// A network solve and its wall-clock time.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FlowAnswer {
    /// What the network solver returned.
    pub solution: FlowSolution,
    /// Wall-clock time of the solve.
    pub elapsed: Duration,
}

impl Verdict {
    /// The final point, when the solve reached one: the plan of an optimal or unbounded
    /// outcome, the point where phase I or a limit stopped; `None` without an integer point
    /// (no integer solution, an empty range, an infeasible network).
    pub fn point(&self) -> Option<&[i64]> {
        match self {
            Verdict::Solved(s) => Some(&s.x),
            Verdict::NoIntegerSolution(_) => None,
            Verdict::Flow(f) => match &f.solution.outcome {
                FlowOutcome::Optimal { flow, .. }
                | FlowOutcome::Unbounded { flow, .. }
                | FlowOutcome::StepLimit { flow }
                | FlowOutcome::Cancelled { flow } => Some(flow),
                FlowOutcome::Infeasible(_) => None,
            },
        }
    }

    /// The optimal plan and its cost, when the solve proved one optimal (possibly only among
    /// the moves of a norm-truncated set).
    pub fn optimum(&self) -> Option<(i128, &[i64])> {
        match self {
            Verdict::Solved(s)
                if matches!(s.status, Status::Optimal | Status::OptimalForMovesUpTo(_)) =>
            {
                s.objective.map(|o| (o, s.x.as_slice()))
            }
            Verdict::Flow(f) => match &f.solution.outcome {
                FlowOutcome::Optimal {
                    flow, objective, ..
                } => Some((*objective, flow.as_slice())),
                _ => None,
            },
            _ => None,
        }
    }

    /// The row potentials that prove a network solve's plan optimal; `None` otherwise.
    pub fn potentials(&self) -> Option<&[i64]> {
        match self {
            Verdict::Flow(f) => match &f.solution.outcome {
                FlowOutcome::Optimal { potentials, .. } => Some(potentials),
                _ => None,
            },
            _ => None,
        }
    }

    /// Augmenting steps in phase I (feasibility) and phase II (cost).
    pub fn steps(&self) -> (u64, u64) {
        match self {
            Verdict::Solved(s) => (s.feasibility_steps, s.optimality_steps),
            Verdict::NoIntegerSolution(_) => (0, 0),
            Verdict::Flow(f) => (f.solution.feasibility_steps, f.solution.optimality_steps),
        }
    }

    /// Wall-clock time of the augmentation.
    pub fn elapsed(&self) -> Duration {
        match self {
            Verdict::Solved(s) => s.elapsed,
            Verdict::NoIntegerSolution(_) => Duration::ZERO,
            Verdict::Flow(f) => f.elapsed,
        }
    }
}

/// The augmentation coverage a stored set gives.
pub fn coverage_of(completeness: &Completeness) -> Coverage {
    match completeness {
        Completeness::Complete => Coverage::Complete,
        Completeness::BoxTruncated => Coverage::BoxValid,
        Completeness::NormTruncated { limit } => Coverage::NormTruncated { norm: *limit },
    }
}

impl MoveEngine {
    /// Prepares `a` with its test set `moves`.
    pub(super) fn new(a: &IntMatrix, moves: Arc<augment::MoveSet>) -> Result<Self> {
        if moves.width() != a.cols() {
            return Err(Error::Dimension(format!(
                "test set has width {}, the matrix {} columns",
                moves.width(),
                a.cols()
            )));
        }
        let hermite = HermiteForm::new(a);
        let basis = hermite
            .reduced_kernel()
            .iter()
            .map(|v| to_i64_vec(v, "kernel basis vector"))
            .collect::<Result<Vec<_>>>()?;
        Ok(Self {
            matrix: a.clone(),
            rounding: Rounding::new(a, hermite.pivot_rows(), basis),
            quick: QuickSolver::new(&hermite),
            hermite,
            checker: Arc::new(augment::Checker::new(Arc::clone(&moves))),
            moves,
            box_limit: None,
            fittings: Arc::default(),
        })
    }

    /// Records that the set was truncated to the box `widths` (`|g_i| <= widths[i]`): it is a
    /// test set only for instances whose ranges `u_i - l_i` fit inside, and any other instance
    /// is refused with [`Error::BeyondSetBox`] instead of being given an unfounded "optimal".
    pub(super) fn set_box_limit(&mut self, widths: Option<Vec<u64>>) {
        self.box_limit = widths;
    }

    /// The matrix the engine was prepared for.
    pub(super) fn matrix(&self) -> &IntMatrix {
        &self.matrix
    }

    /// The moves as the solver sees them.
    pub(super) fn moves(&self) -> &augment::MoveSet {
        &self.moves
    }

    /// The independent re-check of the moves (see [`crate::trace::recheck`]).
    pub(super) fn checker(&self) -> &augment::Checker {
        &self.checker
    }

    /// Solves the instance with these numbers of the prepared matrix, from `warm` if given.
    pub(super) fn solve_numbers(
        &self,
        numbers: Numbers<'_>,
        attempt: Attempt<'_>,
    ) -> Result<Verdict> {
        self.check_box(&numbers)?;
        let start = match self.start_point(numbers.rhs, attempt.warm)? {
            Ok(x) => x,
            Err(certificate) => return Ok(Verdict::NoIntegerSolution(certificate)),
        };
        let (lower, upper) = (numbers.lower, numbers.upper);
        let problem = numbers.problem()?;
        let mut cold = start;
        self.rounding
            .towards_box(&mut cold, numbers.rhs, lower, upper)?;
        let start = match attempt.warm {
            None => cold,
            // Yesterday's plan sits on many bounds, and the point of today's numbers nearest
            // to it often lies just outside some of them; the cold start is kept when it is
            // nearer the box, so that a warm start never begins farther from it.
            Some(w) => {
                let mut near_plan = cold.clone();
                self.rounding
                    .towards_plan(&mut near_plan, &w.x, lower, upper)?;
                if problem.violation(&cold)? < problem.violation(&near_plan)? {
                    cold
                } else {
                    near_plan
                }
            }
        };
        let solution = match self.fittings.for_box(&self.moves, &problem)? {
            Some(fitting) => {
                augment::solve_fitted(&problem, &fitting, &start, attempt.options, attempt.cancel)?
            }
            None => augment::solve_with_cancel(
                &problem,
                &self.moves,
                &start,
                attempt.options,
                attempt.cancel,
            )?,
        };
        Ok(Verdict::Solved(solution))
    }

    /// Refuses an instance wider than the box the set was truncated to.
    fn check_box(&self, numbers: &Numbers<'_>) -> Result<()> {
        let Some(limit) = &self.box_limit else {
            return Ok(());
        };
        for (variable, ((l, u), &limit)) in numbers
            .lower
            .iter()
            .zip(numbers.upper)
            .zip(limit)
            .enumerate()
        {
            let width = match (l, u) {
                (Some(l), Some(u)) => u.abs_diff(*l),
                _ => u64::MAX,
            };
            if width > limit {
                return Err(Error::BeyondSetBox {
                    variable,
                    width,
                    limit,
                });
            }
        }
        Ok(())
    }

    /// An integer point of the fibre `A x = rhs` (from `warm` when given), or the certificate
    /// that there is none; [`Prepared::solve`] rounds a cold one towards the box first.
    fn start_point(
        &self,
        rhs: &[i64],
        warm: Option<&WarmStart>,
    ) -> Result<std::result::Result<Vec<i64>, Certificate>> {
        let (target, base) = match warm {
            Some(w) => {
                w.check(&self.matrix, "warm start")?;
                let diff = rhs
                    .iter()
                    .zip(&w.rhs)
                    .map(|(b, p)| b.checked_sub(*p))
                    .collect::<Option<Vec<i64>>>()
                    .ok_or_else(|| Error::Overflow("right-hand side difference".into()))?;
                (diff, Some(&w.x))
            }
            None => (rhs.to_vec(), None),
        };
        let quick = self.quick.as_ref().and_then(|q| q.solve(&target));
        // The caller moves the point towards the box (cold) or yesterday's plan (warm).
        let z = match quick.filter(|z| z.iter().all(|v| v.unsigned_abs() < QUICK_LIMIT)) {
            Some(z) => z,
            None => match self.hermite.solve(&target) {
                IntegerSolution::Solution(z) => to_i64_vec(&z, "particular solution")?,
                IntegerSolution::NoSolution(c) => return Ok(Err(c)),
            },
        };
        let Some(base) = base else {
            return Ok(Ok(z));
        };
        base.iter()
            .zip(&z)
            .map(|(a, b)| a.checked_add(*b))
            .collect::<Option<Vec<i64>>>()
            .map(Ok)
            .ok_or_else(|| Error::Overflow("warm start point".into()))
    }
}
