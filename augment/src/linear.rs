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
    /// With at most 64 variables, per level `k` of [`TIGHT_LEVELS`] the coordinates whose gap
    /// is at most `k`.
    tight: Option<Tight>,
}

/// Per level `k` of [`TIGHT_LEVELS`] the coordinates whose gap is at most `k`, in the layout of
/// the set's sign masks.
enum Tight {
    /// At most 32 variables: upper gaps in the low half, lower gaps in the high half (the
    /// layout of [`MoveSet::packed_masks`]).
    Packed([u64; 4]),
    /// 33 to 64 variables: the upper gaps and the lower gaps, one word each.
    Split([u64; 4], [u64; 4]),
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
        let tight = tight_masks(moves, gaps.as_slice());
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
        let sign = self.slopes.signs()[index];
        let meets: [bool; 4] = match self.tight.as_ref()? {
            Tight::Packed(tight) => {
                let p = self.moves.packed_masks()?[index];
                let entry = improving_mask(sign, p, p.rotate_left(32));
                tight.map(|mask| entry & mask != 0)
            }
            Tight::Split(upper, lower) => {
                let (positive, negative) = self.moves.masks();
                let (p, n) = (positive[index], negative[index]);
                let (raised, lowered) = (improving_mask(sign, p, n), improving_mask(sign, n, p));
                [0, 1, 2, 3].map(|k| (raised & upper[k]) | (lowered & lower[k]) != 0)
            }
        };
        TIGHT_LEVELS
            .iter()
            .zip(meets)
            .find(|&(_, meets)| meets)
            .map(|(&k, _)| k)
    }
}

/// The tight masks of the gaps `gaps` (as in [`Gaps`]) in the layout of the sign masks of
/// `moves`; `None` beyond 64 variables.
fn tight_masks(moves: &MoveSet, gaps: &[u64]) -> Option<Tight> {
    // Bit `i` set when the gap in slot `2 i + side` is at most `k`.
    let within = |k: u64, side: usize| {
        gaps.chunks_exact(2)
            .enumerate()
            .fold(0u64, |mask, (i, pair)| {
                mask | u64::from(pair[side] <= k) << i
            })
    };
    let upper = TIGHT_LEVELS.map(|k| within(k, 0));
    let lower = TIGHT_LEVELS.map(|k| within(k, 1));
    if moves.packed_masks().is_some() {
        return Some(Tight::Packed(
            [0, 1, 2, 3].map(|k| upper[k] | lower[k] << 32),
        ));
    }
    (moves.words() == 1).then_some(Tight::Split(upper, lower))
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

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::moves::Coverage;
    use crate::objective::Objective;

    proptest! {
        /// The tight masks bound the room from above (the true room, read from the gaps, is at
        /// most the level found) and find a level exactly when the improving sign moves a
        /// coordinate with a gap of at most 8; with packed masks (3 variables) and split ones
        /// (40 variables, the others unbounded).
        #[test]
        fn the_room_bound_is_sound(
            width in prop_oneof![Just(3usize), Just(40usize)],
            upper in prop::collection::vec(0i64..=12, 3),
            x in prop::collection::vec(0i64..=12, 3),
            rows in prop::collection::vec(prop::collection::vec(-2i64..=2, 3), 1..8),
            costs in prop::collection::vec(-3i64..=3, 3),
        ) {
            let widen = |r: &[i64]| [r, &vec![0; width - 3][..]].concat();
            let rows: Vec<Vec<i64>> = rows.iter().filter(|r| r.iter().any(|&v| v != 0)).map(|r| widen(r)).collect();
            prop_assume!(!rows.is_empty());
            let x: Vec<i64> = widen(&x.iter().zip(&upper).map(|(&v, &u)| v.min(u)).collect::<Vec<_>>());
            let upper: Vec<Option<i64>> = (0..width).map(|i| (i < 3).then(|| upper[i])).collect();
            let lower: Vec<Option<i64>> = (0..width).map(|i| (i < 3).then_some(0)).collect();
            let costs = widen(&costs);
            let problem = Problem::new(Objective::linear(costs.clone()), lower, upper).unwrap();
            let moves = MoveSet::from_rows(width, &rows, Coverage::Complete).unwrap();
            let slopes = Slopes::new(&costs, &moves).unwrap();
            let filter = Filter::blocking(&problem, &x, moves.words());
            let scan = LinearScan::new(&moves, &slopes, &problem, &x, (false, Rule::GraverBest), &filter);
            for (index, row) in rows.iter().enumerate() {
                let sign = match slopes.signs()[index] {
                    0 => continue,
                    s if s < 0 => Orientation::Plus,
                    _ => Orientation::Minus,
                };
                let room = scan.gaps.room(&moves, (index, sign), 0, None).unwrap_or(0);
                let bound = scan.room_bound(index);
                if let Some(k) = bound {
                    prop_assert!(room <= k, "move {} room {} bound {}", index, room, k);
                }
                let gaps = scan.gaps.as_slice();
                let near = (0..3).filter(|&i| row[i] != 0).any(|i| {
                    let up = (row[i] > 0) == (sign == Orientation::Plus);
                    gaps[2 * i + usize::from(!up)] <= 8
                });
                prop_assert_eq!(bound.is_some(), near, "move {}", index);
            }
        }
    }
}
