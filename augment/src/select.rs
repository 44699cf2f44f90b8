//! The phase-II scan at the current point: which kind of scan evaluates the moves (linear
//! costs in `linear.rs`, any other separable objective in `separable.rs`), run by the one
//! driver in `sweep.rs`, and the one-time search for a ray.

use crate::choice::{Candidate, Rule};
use crate::error::Result;
use crate::gaps::Gaps;
use crate::linear::LinearScan;
use crate::marks::Filter;
use crate::moves::{MoveSet, Orientation};
use crate::objective::Separable;
use crate::problem::Problem;
use crate::search::{Direction, LineSearch, Step};
use crate::separable::{FirstSteps, SeparableScan};
use crate::slopes::Slopes;
use crate::sweep;

/// Everything one scan over the moves needs.
pub(crate) struct Scan<'a, F: ?Sized> {
    /// Line search on the function being minimised at the current point.
    pub search: LineSearch<'a, F>,
    /// The moves.
    pub moves: &'a MoveSet,
    /// The box that steps must respect.
    pub bounds: &'a Problem,
    /// `c.g` per move when the function is linear.
    pub slopes: Option<&'a Slopes>,
    /// The bounds of every move's first step at the current point, when known.
    pub first_steps: Option<&'a FirstSteps>,
    /// The selection rule.
    pub rule: Rule,
    /// Skips moves that cannot improve at the current point.
    pub filter: Filter,
}

impl<F: Separable + ?Sized> Scan<'_, F> {
    /// The step the rule selects, or `None` when no move improves: the linear scan when the
    /// slopes are known, the separable scan otherwise.
    pub(crate) fn select(&self, parallel: bool) -> Result<Option<Candidate>> {
        if let Some(slopes) = self.slopes {
            let scan = LinearScan::new(
                self.moves,
                slopes,
                self.bounds,
                self.search.x,
                (self.search.powers_of_two, self.rule),
                &self.filter,
            );
            return sweep::select(&scan, parallel);
        }
        let scan = SeparableScan {
            search: &self.search,
            moves: self.moves,
            gaps: Gaps::at(self.bounds, self.search.x),
            rule: self.rule,
            filter: &self.filter,
            first_steps: self.first_steps,
        };
        sweep::select(&scan, parallel)
    }

    /// The first signed move (index order, `+` before `-`) along which every step is feasible
    /// and the function falls without bound. Whether a move is such a ray depends only on the
    /// bounds and the function, not on the current point, so one check at the first feasible
    /// point settles unboundedness for every rule.
    pub(crate) fn first_ray(&self, problem: &Problem) -> Result<Option<Candidate>> {
        for index in 0..self.moves.len() {
            for sign in Orientation::BOTH {
                let dir = Direction::of(self.moves, index, sign);
                let mut free = true;
                for k in 0..dir.len() {
                    let (i, d) = dir.entry(k)?;
                    free &= problem.unbounded_towards(i, d);
                }
                let slope = self
                    .slopes
                    .map(|s| s.get(index) * i128::from(sign.factor()));
                if free && self.search.falls_forever(&dir, slope)? {
                    return Ok(Some(Candidate {
                        index,
                        sign,
                        step: Step::Ray,
                    }));
                }
            }
        }
        Ok(None)
    }
}
