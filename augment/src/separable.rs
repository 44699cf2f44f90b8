//! The scan of phase II for a general separable objective (quadratic or piecewise-linear
//! terms, or linear terms given one by one): every signed move the bound filter admits gets
//! the exact line search inside the box.
//!
//! It only evaluates single moves; the driver in `sweep.rs` chooses among them, with the same
//! rules and tie-breaking as every other scan.

use crate::choice::{choose_sign, Candidate, Rule};
use crate::error::Result;
use crate::marks::Filter;
use crate::moves::{MoveSet, Orientation};
use crate::objective::Separable;
use crate::problem::Problem;
use crate::search::{Direction, LineSearch, Step};
use crate::sweep::Evaluate;

/// What a separable scan needs.
pub(crate) struct SeparableScan<'a, F: ?Sized> {
    /// Line search on the function being minimised at the current point.
    pub search: &'a LineSearch<'a, F>,
    /// The moves.
    pub moves: &'a MoveSet,
    /// The box that steps must respect.
    pub bounds: &'a Problem,
    /// The selection rule.
    pub rule: Rule,
    /// Skips signed moves blocked by a bound at the current point.
    pub filter: &'a Filter,
}

impl<F: Separable + ?Sized> Evaluate for SeparableScan<'_, F> {
    fn moves(&self) -> &MoveSet {
        self.moves
    }

    fn rule(&self) -> Rule {
        self.rule
    }

    /// Every move: the filter's test needs the sign, so [`Evaluate::evaluate`] applies it.
    fn candidates(&self, _start: usize, len: usize) -> u64 {
        u64::MAX >> (64 - len)
    }

    /// The rule's choice among the two signs of move `index` (the floor is not used: a line
    /// search has no cheap bound on its gain).
    fn evaluate(&self, index: usize, _floor: Option<i128>) -> Result<Option<Candidate>> {
        choose_sign(self.rule, self.moves, |sign, _| {
            self.evaluate_sign(index, sign)
        })
    }

    fn ceiling(&self) -> Option<i128> {
        None
    }
}

impl<F: Separable + ?Sized> SeparableScan<'_, F> {
    /// The best step along move `index` in direction `sign`, if it improves.
    fn evaluate_sign(&self, index: usize, sign: Orientation) -> Result<Option<Candidate>> {
        if !self.filter.admits(self.moves, index, sign) {
            return Ok(None);
        }
        let dir = Direction::of(self.moves, index, sign);
        let room = room(self.bounds, self.search.x, &dir)?;
        Ok(match self.search.best(&dir, room, None)? {
            Step::Useless => None,
            step => Some(Candidate { index, sign, step }),
        })
    }
}

/// The largest number of times `dir` can be applied to `x` inside the box (`None`: no limit).
fn room(problem: &Problem, x: &[i64], dir: &Direction) -> Result<Option<i64>> {
    let mut room: Option<i64> = None;
    for k in 0..dir.len() {
        let (i, d) = dir.entry(k)?;
        if let Some(r) = problem.room(i, x[i], d) {
            let r = room.map_or(r, |current| current.min(r));
            if r == 0 {
                return Ok(Some(0));
            }
            room = Some(r);
        }
    }
    Ok(room)
}
