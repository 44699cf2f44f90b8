//! Choosing the next augmenting step among all moves and both signs.
//!
//! Every rule breaks ties the same way: lowest move index first, then `+` before `-`. The
//! parallel scan evaluates moves concurrently but combines the results in index order, so it
//! returns exactly what the sequential scan returns.

use std::cmp::Ordering;

use rayon::prelude::*;
use serde::{Deserialize, Serialize};

use crate::error::Result;
use crate::linear::LinearScan;
use crate::marks::Filter;
use crate::moves::{MoveSet, Sign};
use crate::objective::Separable;
use crate::problem::Problem;
use crate::search::{Direction, LineSearch, Step};
use crate::slopes::Slopes;
use crate::sweep;

/// How the next augmenting step is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize, Deserialize)]
pub enum Rule {
    /// The step (move, sign and length) with the largest improvement: Graver-best
    /// augmentation, with a polynomial number of steps (Hemmecke, Onn, Weismantel 2011).
    #[default]
    GraverBest,
    /// The first improving move in index order (`+` before `-`), with its best length.
    FirstImproving,
    /// The step with the largest improvement per unit l1 norm of the move, i.e. the best gain
    /// divided by `||g||_1`.
    Steepest,
}

/// A chosen step: which move, which sign, and how far.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Candidate {
    /// Index of the move in the set.
    pub index: usize,
    /// Sign in which the move is applied.
    pub sign: Sign,
    /// `Step::Finite` or `Step::Ray`, never `Step::Useless`.
    pub step: Step,
}

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
    /// The selection rule.
    pub rule: Rule,
    /// Skips moves that cannot improve at the current point.
    pub filter: Filter,
}

impl<F: Separable + ?Sized> Scan<'_, F> {
    /// The step the rule selects, or `None` when no move improves.
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
        let count = self.moves.len();
        match (self.rule, parallel) {
            (Rule::FirstImproving, false) => {
                for index in 0..count {
                    if let Some(found) = self.first_of_move(index)? {
                        return Ok(Some(found));
                    }
                }
                Ok(None)
            }
            (Rule::FirstImproving, true) => (0..count)
                .into_par_iter()
                .map(|index| self.first_of_move(index))
                .find_first(|result| !matches!(result, Ok(None)))
                .unwrap_or(Ok(None)),
            (_, false) => {
                let mut best = None;
                for index in 0..count {
                    best = self.keep_better(best, self.best_of_move(index)?);
                }
                Ok(best)
            }
            (_, true) => {
                let per_move: Vec<Result<Option<Candidate>>> = (0..count)
                    .into_par_iter()
                    .map(|index| self.best_of_move(index))
                    .collect();
                per_move
                    .into_iter()
                    .try_fold(None, |best, found| Ok(self.keep_better(best, found?)))
            }
        }
    }

    /// The first signed move (index order, `+` before `-`) along which every step is feasible
    /// and the function falls without bound. Whether a move is such a ray depends only on the
    /// bounds and the function, not on the current point, so one check at the first feasible
    /// point settles unboundedness for every rule.
    pub(crate) fn first_ray(&self, problem: &Problem) -> Result<Option<Candidate>> {
        for index in 0..self.moves.len() {
            for sign in Sign::BOTH {
                let (indices, values) = self.moves.support(index);
                let dir = Direction {
                    indices,
                    values,
                    sign: sign.factor(),
                };
                let mut free = true;
                for k in 0..indices.len() {
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

    /// The first improving sign of move `index`.
    fn first_of_move(&self, index: usize) -> Result<Option<Candidate>> {
        for sign in Sign::BOTH {
            if let Some(found) = self.evaluate(index, sign)? {
                return Ok(Some(found));
            }
        }
        Ok(None)
    }

    /// The better of the two signs of move `index` (`+` on ties).
    fn best_of_move(&self, index: usize) -> Result<Option<Candidate>> {
        let plus = self.evaluate(index, Sign::Plus)?;
        Ok(self.keep_better(plus, self.evaluate(index, Sign::Minus)?))
    }

    /// `current` unless `challenger` is strictly better under the rule.
    fn keep_better(
        &self,
        current: Option<Candidate>,
        challenger: Option<Candidate>,
    ) -> Option<Candidate> {
        match (current, challenger) {
            (Some(a), Some(b)) if self.compare(&b, &a) == Ordering::Greater => Some(b),
            (None, b) => b,
            (a, _) => a,
        }
    }

    /// Orders two candidates by the rule's key only (a ray beats every finite step).
    fn compare(&self, a: &Candidate, b: &Candidate) -> Ordering {
        match (a.step, b.step) {
            (Step::Finite { gain: ga, .. }, Step::Finite { gain: gb, .. }) => match self.rule {
                Rule::Steepest => {
                    ratio_cmp(ga, self.moves.norm(a.index), gb, self.moves.norm(b.index))
                }
                Rule::GraverBest | Rule::FirstImproving => ga.cmp(&gb),
            },
            (Step::Ray, Step::Ray) => Ordering::Equal,
            (Step::Ray, _) => Ordering::Greater,
            (_, Step::Ray) => Ordering::Less,
            _ => Ordering::Equal,
        }
    }

    /// The best step along move `index` in direction `sign`, if it improves.
    fn evaluate(&self, index: usize, sign: Sign) -> Result<Option<Candidate>> {
        if !self.filter.admits(self.moves, index, sign) {
            return Ok(None);
        }
        let (indices, values) = self.moves.support(index);
        let dir = Direction {
            indices,
            values,
            sign: sign.factor(),
        };
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
    for k in 0..dir.indices.len() {
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

/// Compares `a / b` with `c / d` exactly for `a, c >= 0` and `b, d > 0`, without overflow.
pub(crate) fn ratio_cmp(a: i128, b: i64, c: i128, d: i64) -> Ordering {
    let (b, d) = (i128::from(b), i128::from(d));
    (a / b).cmp(&(c / d)).then_with(|| {
        // Both remainders are below 2^63, so the cross products stay below 2^126.
        ((a % b) * d).cmp(&((c % d) * b))
    })
}
