//! The scan of phase II for a linear objective, specialised for speed.
//!
//! With `f(x) = c.x` a signed move improves only in the sign where `c.g < 0`, its best step is
//! the longest feasible one, and the gain is `|c.g|` times that length; so one pass over the
//! sparse moves with precomputed slopes decides the step, without a line search. The result
//! is exactly what the general scan returns (same rules, same tie-breaking: lowest move index,
//! a ray before any finite step).

use rayon::prelude::*;

use crate::error::{overflow, Result};
use crate::marks::Filter;
use crate::moves::{MoveSet, Sign};
use crate::problem::Problem;
use crate::search::Step;
use crate::select::{ratio_cmp, Candidate, Rule};

/// Moves per parallel chunk.
const CHUNK: usize = 256;

/// What a linear scan needs.
pub(crate) struct LinearScan<'a> {
    /// The moves.
    pub moves: &'a MoveSet,
    /// `c.g` per move.
    pub slopes: &'a [i128],
    /// The box.
    pub problem: &'a Problem,
    /// The current (feasible) point.
    pub x: &'a [i64],
    /// Restrict lengths to powers of two.
    pub powers_of_two: bool,
    /// The selection rule.
    pub rule: Rule,
    /// Skips moves blocked by a bound at `x`.
    pub filter: &'a Filter,
}

impl LinearScan<'_> {
    /// The step the rule selects, or `None` when no move improves.
    pub(crate) fn select(&self, parallel: bool) -> Result<Option<Candidate>> {
        let count = self.moves.len();
        if !parallel {
            return self.select_in(0..count);
        }
        let chunks: Vec<Result<Option<Candidate>>> = (0..count.div_ceil(CHUNK))
            .into_par_iter()
            .map(|c| self.select_in(c * CHUNK..((c + 1) * CHUNK).min(count)))
            .collect();
        let mut best = None;
        for found in chunks {
            let found = found?;
            if self.rule == Rule::FirstImproving && found.is_some() {
                return Ok(found);
            }
            best = self.keep_better(best, found);
        }
        Ok(best)
    }

    fn select_in(&self, range: std::ops::Range<usize>) -> Result<Option<Candidate>> {
        let mut best: Option<Candidate> = None;
        for index in range {
            let floor = match (self.rule, best.map(|b| b.step)) {
                (Rule::GraverBest, Some(Step::Finite { gain, .. })) => Some(gain),
                _ => None,
            };
            let Some(found) = self.evaluate(index, floor)? else {
                continue;
            };
            if found.step == Step::Ray || self.rule == Rule::FirstImproving {
                return Ok(self.keep_better(best, Some(found)));
            }
            best = self.keep_better(best, Some(found));
        }
        Ok(best)
    }

    /// The improving sign of move `index` and its longest feasible step, if it improves and,
    /// given a `floor`, can gain strictly more than it (the room only shrinks as the support
    /// is read, so a move whose bound `|c.g| * room` falls to the floor is left early).
    fn evaluate(&self, index: usize, floor: Option<i128>) -> Result<Option<Candidate>> {
        let slope = self.slopes[index];
        if slope == 0 {
            return Ok(None);
        }
        let sign = if slope < 0 { Sign::Plus } else { Sign::Minus };
        if !self.filter.admits(self.moves, index, sign) {
            return Ok(None);
        }
        let factor = sign.factor();
        let (indices, values) = self.moves.support(index);
        let (lower, upper) = (self.problem.lower(), self.problem.upper());
        let mut room: Option<i64> = None;
        for (&i, &v) in indices.iter().zip(values) {
            let d = v * factor;
            let gap = if d > 0 {
                upper[i].map(|u| gap_to(u, self.x[i]))
            } else {
                lower[i].map(|l| gap_to(self.x[i], l))
            };
            if let Some(gap) = gap {
                let step = d.unsigned_abs();
                let r = if step == 1 { gap } else { gap / step };
                if r == 0 {
                    return Ok(None);
                }
                let r = i64::try_from(r).unwrap_or(i64::MAX);
                let shrunk = room.map_or(r, |current: i64| current.min(r));
                let bound = slope.abs().checked_mul(i128::from(shrunk));
                if floor.zip(bound).is_some_and(|(f, b)| b <= f) {
                    return Ok(None);
                }
                room = Some(shrunk);
            }
        }
        let Some(room) = room else {
            return Ok(Some(Candidate {
                index,
                sign,
                step: Step::Ray,
            }));
        };
        let length = if self.powers_of_two {
            1i64 << (63 - room.leading_zeros())
        } else {
            room
        };
        let gain = slope
            .abs()
            .checked_mul(i128::from(length))
            .ok_or(overflow("computing the gain of a linear step"))?;
        Ok(Some(Candidate {
            index,
            sign,
            step: Step::Finite { length, gain },
        }))
    }

    /// `current` unless `challenger` is strictly better (a ray beats every finite step).
    fn keep_better(
        &self,
        current: Option<Candidate>,
        challenger: Option<Candidate>,
    ) -> Option<Candidate> {
        let (Some(a), Some(b)) = (current, challenger) else {
            return current.or(challenger);
        };
        let better = match (a.step, b.step) {
            (Step::Ray, _) => false,
            (_, Step::Ray) => true,
            (Step::Finite { gain: ga, .. }, Step::Finite { gain: gb, .. }) => match self.rule {
                Rule::Steepest => {
                    ratio_cmp(gb, self.moves.norm(b.index), ga, self.moves.norm(a.index)).is_gt()
                }
                Rule::GraverBest | Rule::FirstImproving => gb > ga,
            },
            _ => false,
        };
        Some(if better { b } else { a })
    }
}

/// `high - low` for a feasible point (`high >= low`), exact for any `i64` pair.
fn gap_to(high: i64, low: i64) -> u64 {
    high.abs_diff(low)
}
