//! The two-phase augmentation loop.
//!
//! Phase I minimises the violation `sum_i dist(x_i, [l_i, u_i])` from the start point, with
//! any point allowed along the way; phase II then minimises the objective, keeping the bounds.
//! Both phases use the same moves and the same selection rule. Every step changes `x` by a
//! multiple of a move, so `A x` stays what it was at the start point.

use std::time::Instant;

use crate::choice::{Candidate, Rule};
use crate::error::{overflow, AugmentError, Result};
use crate::fitting::Fitting;
use crate::marks::Filter;
use crate::moves::{Coverage, MoveSet};
use crate::objective::Separable;
use crate::options::Options;
use crate::problem::Problem;
use crate::recurrence::{Recurrence, WATCH_AFTER};
use crate::repair::{self, RepairScan};
use crate::search::{LineSearch, Step};
use crate::select::Scan;
use crate::separable::FirstSteps;
use crate::slopes::Slopes;
use crate::solution::{InfeasibleReason, Phase, Ray, Solution, Status, TraceStep};
use crate::sweep;

/// Solves `problem` by augmentation from `x0` with the given moves.
///
/// `x0` must satisfy `A x0 = b` for the caller's matrix (the moves must lie in its kernel); it
/// may violate the bounds. Any such point works, so a warm start is simply yesterday's optimum
/// plus a particular solution of `A z = b - b_prev`.
pub fn solve(
    problem: &Problem,
    moves: &MoveSet,
    x0: &[i64],
    options: &Options,
) -> Result<Solution> {
    solve_with_cancel(problem, moves, x0, options, &|| false)
}

/// Like [`solve`], consulting `cancel` before every step; `true` stops with
/// [`Status::Cancelled`] and the point reached so far.
pub fn solve_with_cancel(
    problem: &Problem,
    moves: &MoveSet,
    x0: &[i64],
    options: &Options,
    cancel: &dyn Fn() -> bool,
) -> Result<Solution> {
    solve_in(problem, (moves, moves, None), x0, options, cancel)
}

/// Like [`solve_with_cancel`] with the whole set of `fitting` in phase I and only its moves
/// that fit the box in phase II, which selects exactly the same steps; move indices in the
/// trace and in a ray refer to the whole set. Fails when `fitting` was cut for another box.
pub fn solve_fitted(
    problem: &Problem,
    fitting: &Fitting,
    x0: &[i64],
    options: &Options,
    cancel: &dyn Fn() -> bool,
) -> Result<Solution> {
    if !fitting.fits(problem)? {
        return Err(AugmentError::OtherBox);
    }
    let sets = (fitting.source(), fitting.moves(), Some(fitting.origin()));
    solve_in(problem, sets, x0, options, cancel)
}

/// The solve with `moves` in phase I and `optimality` in phase II, whose move `k` is move
/// `origin[k]` of `moves` (the same move when `origin` is `None`).
fn solve_in(
    problem: &Problem,
    (moves, optimality, origin): (&MoveSet, &MoveSet, Option<&[usize]>),
    x0: &[i64],
    options: &Options,
    cancel: &dyn Fn() -> bool,
) -> Result<Solution> {
    for (what, found) in [("x0", x0.len()), ("move width", moves.width())] {
        if found != problem.len() {
            return Err(AugmentError::Dimension {
                what,
                expected: problem.len(),
                found,
            });
        }
    }
    let started = Instant::now();
    let mut run = Run {
        problem,
        moves,
        optimality,
        origin,
        options,
        cancel,
        x: x0.to_vec(),
        objective: None,
        first_steps: None,
        steps: [0, 0],
        trace: options.records_trace().then(Vec::new),
    };
    let status = run.execute()?;
    Ok(Solution {
        status,
        violation: problem.violation(&run.x)?,
        x: run.x,
        objective: run.objective,
        feasibility_steps: run.steps[0],
        optimality_steps: run.steps[1],
        elapsed: started.elapsed(),
        trace: run.trace,
    })
}

/// The state of one solve.
struct Run<'a> {
    problem: &'a Problem,
    /// The moves of phase I.
    moves: &'a MoveSet,
    /// The moves of phase II, move `k` being move `origin[k]` of `moves` when given.
    optimality: &'a MoveSet,
    origin: Option<&'a [usize]>,
    options: &'a Options,
    cancel: &'a dyn Fn() -> bool,
    x: Vec<i64>,
    objective: Option<i128>,
    /// The bounds of every move's first step at `x` in phase II of a nonlinear objective,
    /// kept up to date step by step (see [`FirstSteps`]).
    first_steps: Option<FirstSteps>,
    steps: [u64; 2],
    trace: Option<Vec<TraceStep>>,
}

/// How one phase's descent ended.
enum Outcome {
    /// No move improves; the final value of the function.
    Stationary(i128),
    /// An improving move can be applied without limit.
    Ray(Candidate),
    /// The descent came back to its position on every doubly bounded variable, further on
    /// along this direction: a ray of a linear objective (see [`Recurrence`]).
    Recurred(Vec<i64>),
    /// The step limit or the cancellation hook stopped the phase.
    Stopped(Status),
}

impl<'a> Run<'a> {
    fn execute(&mut self) -> Result<Status> {
        if let Some(variable) = self.problem.empty_range() {
            return Ok(Status::Infeasible(InfeasibleReason::EmptyRange {
                variable,
            }));
        }
        let violation = self.problem.violation(&self.x)?;
        let repair = |run: &Self, violation| {
            sweep::select(&run.repair_scan(violation), run.options.is_parallel())
        };
        match self.descend(Phase::Feasibility, violation, repair, false)? {
            Outcome::Stopped(status) => return Ok(status),
            Outcome::Stationary(0) => {}
            Outcome::Stationary(left) => return Ok(Status::Infeasible(self.infeasible(left))),
            // The violation is bounded below by 0, so no step along it is unbounded.
            Outcome::Ray(_) | Outcome::Recurred(_) => {
                unreachable!("the violation has no ray of descent")
            }
        }
        let objective = self.problem.objective();
        let value = objective.value(&self.x)?;
        self.objective = Some(value);
        let slopes = objective
            .linear_costs()
            .map(|costs| Slopes::new(costs, self.optimality))
            .transpose()?;
        if slopes.is_none() {
            self.first_steps = FirstSteps::at(objective, &self.x, self.optimality);
        }
        // Graver-best and steepest scans rank a ray above every finite step, so they meet
        // the first ray at their first scan; first-improving would take finite steps first.
        if self.options.selected_rule() == Rule::FirstImproving {
            let ray = self
                .scan(objective, slopes.as_ref())
                .first_ray(self.problem)?;
            if let Some(found) = ray {
                return Ok(Status::Unbounded(self.ray(&found)));
            }
        }
        let improve = |run: &Self, _| {
            run.scan(objective, slopes.as_ref())
                .select(run.options.is_parallel())
        };
        // A linear objective falls along the difference of two points of the descent, so a
        // return to the same position on the doubly bounded variables may prove a ray.
        let watch = slopes.is_some();
        Ok(
            match self.descend(Phase::Optimality, value, improve, watch)? {
                Outcome::Stopped(status) => status,
                Outcome::Stationary(_) => match self.optimality.coverage() {
                    Coverage::Complete | Coverage::BoxValid => Status::Optimal,
                    Coverage::NormTruncated { norm } => Status::OptimalForMovesUpTo(norm),
                },
                Outcome::Ray(found) => Status::Unbounded(self.ray(&found)),
                Outcome::Recurred(direction) => Status::Unbounded(Ray {
                    move_index: None,
                    sign: crate::moves::Orientation::Plus,
                    direction,
                }),
            },
        )
    }

    /// Augments along the steps `select` picks at the current point and value until it finds
    /// none (phase I also stops at violation 0).
    fn descend(
        &mut self,
        phase: Phase,
        mut value: i128,
        select: impl Fn(&Self, i128) -> Result<Option<Candidate>>,
        watch: bool,
    ) -> Result<Outcome> {
        let mut recurrence = None;
        loop {
            if phase == Phase::Feasibility && value == 0 {
                return Ok(Outcome::Stationary(0));
            }
            if (self.cancel)() {
                return Ok(Outcome::Stopped(Status::Cancelled));
            }
            let Some(found) = select(self, value)? else {
                return Ok(Outcome::Stationary(value));
            };
            let Step::Finite { length, gain } = found.step else {
                return Ok(Outcome::Ray(found));
            };
            if self.steps[0] + self.steps[1] >= self.options.step_limit() {
                return Ok(Outcome::Stopped(Status::StepLimit));
            }
            self.apply(phase, &found, length)?;
            let after = value - gain;
            self.record(phase, &found, length, value, after);
            value = after;
            if phase == Phase::Optimality {
                self.objective = Some(value);
                if watch && self.steps[1] >= WATCH_AFTER {
                    let record = recurrence.get_or_insert_with(|| Recurrence::new(self.problem));
                    if let Some(direction) = record.visit(&self.x) {
                        return Ok(Outcome::Recurred(direction));
                    }
                }
            }
        }
    }

    /// The phase-I scan at the current point, whose violation is `violation`.
    fn repair_scan(&self, violation: i128) -> RepairScan<'_> {
        RepairScan {
            function: self.problem.violation_function(),
            x: &self.x,
            powers_of_two: self.options.uses_powers_of_two(),
            moves: self.moves,
            problem: self.problem,
            violation,
            rule: self.options.selected_rule(),
            filter: Filter::repairing(self.problem, &self.x, self.moves.words()),
            reaches: repair::reaches(self.problem, &self.x),
        }
    }

    /// The phase-II scan of the moves at the current point.
    fn scan<'s, F: Separable>(&'s self, f: &'s F, slopes: Option<&'s Slopes>) -> Scan<'s, F> {
        Scan {
            search: LineSearch {
                f,
                x: &self.x,
                powers_of_two: self.options.uses_powers_of_two(),
            },
            moves: self.optimality,
            bounds: self.problem,
            slopes,
            first_steps: self.first_steps.as_ref(),
            rule: self.options.selected_rule(),
            filter: Filter::blocking(self.problem, &self.x, self.optimality.words()),
        }
    }

    /// The moves of `phase`.
    fn set(&self, phase: Phase) -> &'a MoveSet {
        match phase {
            Phase::Feasibility => self.moves,
            Phase::Optimality => self.optimality,
        }
    }

    /// Move `index` of the set of `phase` as an index into the whole set.
    fn whole_index(&self, phase: Phase, index: usize) -> usize {
        match (phase, self.origin) {
            (Phase::Optimality, Some(origin)) => origin[index],
            _ => index,
        }
    }

    /// `x += length * sign * g` for the move `found` of the set of `phase`.
    fn apply(&mut self, phase: Phase, found: &Candidate, length: i64) -> Result<()> {
        let factor = length
            .checked_mul(found.sign.factor())
            .ok_or(overflow("scaling a move by its step length"))?;
        let support = self.set(phase).support(found.index);
        for (i, v) in support.iter() {
            self.x[i] = v
                .checked_mul(factor)
                .and_then(|d| self.x[i].checked_add(d))
                .ok_or(overflow("applying a step"))?;
        }
        if let Some(steps) = self.first_steps.take() {
            let objective = self.problem.objective();
            let changed = support.iter().map(|e| e.0);
            self.first_steps = steps.moved(objective, &self.x, changed, self.optimality);
        }
        Ok(())
    }

    fn record(&mut self, phase: Phase, found: &Candidate, length: i64, before: i128, after: i128) {
        self.steps[usize::from(phase == Phase::Optimality)] += 1;
        let move_index = self.whole_index(phase, found.index);
        if let Some(trace) = &mut self.trace {
            trace.push(TraceStep {
                phase,
                move_index,
                sign: found.sign,
                length,
                before,
                after,
                gain: before - after,
            });
        }
    }

    /// Why phase I could not reach violation 0, honest about the coverage of the set.
    fn infeasible(&self, violation: i128) -> InfeasibleReason {
        match self.moves.coverage() {
            Coverage::Complete => InfeasibleReason::NoLatticePointInBox {
                min_violation: violation,
            },
            Coverage::BoxValid | Coverage::NormTruncated { .. } => {
                InfeasibleReason::Unproven { violation }
            }
        }
    }

    /// The ray of phase II along `found`.
    fn ray(&self, found: &Candidate) -> Ray {
        // The scan negated every entry of this move with checked arithmetic, so this cannot
        // overflow.
        let factor = found.sign.factor();
        Ray {
            move_index: Some(self.whole_index(Phase::Optimality, found.index)),
            sign: found.sign,
            direction: self
                .optimality
                .row(found.index)
                .into_iter()
                .map(|v| v * factor)
                .collect(),
        }
    }
}
