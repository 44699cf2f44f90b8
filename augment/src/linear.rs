//! The scan of phase II for a linear objective, specialised for speed.
//!
//! With `f(x) = c.x` a signed move improves only in the sign where `c.g < 0`, its best step is
//! the longest feasible one, and the gain is `|c.g|` times that length; so one pass over the
//! sparse moves with the slopes decides the step, without a line search. The result
//! is exactly what the general scan returns (same rules, same tie-breaking: lowest move index,
//! a ray before any finite step).
//!
//! Under Graver-best most evaluated moves cannot beat the best gain found so far. With packed
//! masks a scan first bounds a move's room by bit tests: if its improving sign moves a
//! coordinate whose gap in that direction is at most `k` (for `k` = 1, 2, 4, 8), its room is at
//! most `k`, and `|c.g| * k` at most the best gain rules it out before its support is read.

use crate::choice::{Candidate, Rule};
use crate::error::{overflow, Result};
use crate::gaps::{Gaps, UNBOUNDED};
use crate::marks::Filter;
use crate::moves::{MoveSet, Orientation};
use crate::problem::Problem;
use crate::search::Step;
use crate::slopes::{improving_mask, Slopes};
use crate::sweep::Evaluate;

/// What a linear scan needs.
pub(crate) struct LinearScan<'a> {
    /// The moves.
    moves: &'a MoveSet,
    /// `c.g` per move.
    slopes: &'a Slopes,
    /// The current point's gaps to the bounds.
    gaps: Gaps,
    /// Restrict lengths to powers of two.
    powers_of_two: bool,
    /// The selection rule.
    rule: Rule,
    /// Skips moves blocked by a bound at the current point.
    filter: &'a Filter,
    /// With packed masks, per level `k` of [`TIGHT_LEVELS`] the coordinates whose gap is at
    /// most `k`: upper gaps in the low half, lower gaps in the high half.
    tight: Option<[u64; 4]>,
}

/// The room bounds tried before a move's support is read.
const TIGHT_LEVELS: [u64; 4] = [1, 2, 4, 8];

impl<'a> LinearScan<'a> {
    /// The scan at the feasible point `x` of `problem`.
    pub(crate) fn new(
        moves: &'a MoveSet,
        slopes: &'a Slopes,
        problem: &Problem,
        x: &[i64],
        (powers_of_two, rule): (bool, Rule),
        filter: &'a Filter,
    ) -> Self {
        let gaps = Gaps::at(problem, x);
        let tight = moves.packed_masks().map(|_| tight_masks(gaps.as_slice()));
        Self {
            moves,
            slopes,
            gaps,
            powers_of_two,
            rule,
            filter,
            tight,
        }
    }

    /// A bound on the room of move `index` in its improving sign from the tight masks: the
    /// smallest level `k` at which it moves a coordinate with a gap of at most `k`.
    #[inline]
    fn room_bound(&self, index: usize) -> Option<u64> {
        let (Some(tight), Some(packed)) = (&self.tight, self.moves.packed_masks()) else {
            return None;
        };
        let p = packed[index];
        let entry = improving_mask(self.slopes.signs()[index], p, p.rotate_left(32));
        TIGHT_LEVELS
            .iter()
            .zip(tight)
            .find(|(_, &mask)| entry & mask != 0)
            .map(|(&k, _)| k)
    }
}

/// Per level `k` of [`TIGHT_LEVELS`] the packed mask of the coordinates whose upper gap (low
/// half) or lower gap (high half) is at most `k`; `gaps` as in [`LinearScan`], at most 32
/// variables.
fn tight_masks(gaps: &[u64]) -> [u64; 4] {
    TIGHT_LEVELS.map(|k| {
        gaps.chunks_exact(2)
            .enumerate()
            .fold(0u64, |mask, (i, pair)| {
                mask | u64::from(pair[0] <= k) << i | u64::from(pair[1] <= k) << (32 + i)
            })
    })
}

impl Evaluate for LinearScan<'_> {
    fn moves(&self) -> &MoveSet {
        self.moves
    }

    fn rule(&self) -> Rule {
        self.rule
    }

    /// The improving sign of move `index` and its longest feasible step, if it improves and,
    /// given a `floor`, can gain strictly more than it (the room only shrinks as the support
    /// is read, so a move whose bound `|c.g| * room` falls to the floor is left early).
    #[inline]
    fn evaluate(&self, index: usize, floor: Option<i128>) -> Result<Option<Candidate>> {
        // The candidate pass kept only moves whose improving sign no bound blocks (most moves
        // are blocked at the sparse points augmentation visits), and moves of rate 0 only at
        // points on no bound.
        let slope = self.slopes.get(index);
        let sign = match slope {
            0 => return Ok(None),
            s if s < 0 => Orientation::Plus,
            _ => Orientation::Minus,
        };
        let rate = slope.unsigned_abs();
        let floor = floor.map(i128::unsigned_abs);
        if let (Some(f), Some(k)) = (floor, self.room_bound(index)) {
            if rate.saturating_mul(u128::from(k)) <= f {
                return Ok(None);
            }
        }
        let room = self.gaps.room(self.moves, (index, sign), rate, floor);
        let Some(room) = room else {
            return Ok(None);
        };
        if room == UNBOUNDED {
            return Ok(Some(Candidate {
                index,
                sign,
                step: Step::Ray,
            }));
        }
        let room = i64::try_from(room).unwrap_or(i64::MAX);
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

    fn candidates(&self, start: usize, len: usize) -> u64 {
        self.filter
            .free_entries(self.moves, self.slopes.signs(), start, len)
    }

    fn ceiling(&self) -> Option<i128> {
        None
    }
}
