//! The room of a signed move at a feasible point: how many times it can be applied before a
//! coordinate leaves its range, read from a table of the point's gaps to the bounds.
//!
//! Each scan of phase II builds the table once (two entries per variable) and reads a move's
//! room from its packed entries (`support.rs`): the entry's slot `2 i + [v < 0]`, with its last
//! bit flipped for `-`, is the gap it moves towards (`2 i` the upper one, `2 i + 1` the lower
//! one), and `|v|` the step. A caller that knows the gain per step can leave a move early: the
//! room only shrinks as entries are read.

use std::ops::ControlFlow;

use crate::moves::{MoveSet, Orientation};
use crate::problem::Problem;

/// The gap recorded for a missing bound. A real gap of `u64::MAX` (from `i64::MIN` to
/// `i64::MAX`) is stored one less, which changes no step: lengths are capped at `i64::MAX`.
pub(crate) const UNBOUNDED: u64 = u64::MAX;

/// Per variable `i`, the distance from the current point to its upper bound (entry `2 i`) and
/// to its lower bound (entry `2 i + 1`); [`UNBOUNDED`] when there is no such bound.
pub(crate) struct Gaps(Vec<u64>);

impl Gaps {
    /// The gaps of the feasible point `x` of `problem`.
    pub(crate) fn at(problem: &Problem, x: &[i64]) -> Self {
        let gap = |bound: Option<i64>, high: bool, v: i64| {
            bound.map_or(UNBOUNDED, |b| {
                let (top, bottom) = if high { (b, v) } else { (v, b) };
                top.abs_diff(bottom).min(UNBOUNDED - 1)
            })
        };
        Gaps(
            x.iter()
                .enumerate()
                .flat_map(|(i, &v)| {
                    [
                        gap(problem.upper()[i], true, v),
                        gap(problem.lower()[i], false, v),
                    ]
                })
                .collect(),
        )
    }

    /// The gaps, two per variable.
    pub(crate) fn as_slice(&self) -> &[u64] {
        &self.0
    }

    /// The longest feasible step along move `index` applied with `sign` ([`UNBOUNDED`] for a
    /// ray), or `None` when it is 0 or, given a `floor`, when `rate` (the gain per step, or a
    /// bound on it) times the room cannot beat the floor.
    #[inline]
    pub(crate) fn room(
        &self,
        moves: &MoveSet,
        signed: (usize, Orientation),
        rate: u128,
        floor: Option<u128>,
    ) -> Option<u64> {
        let room = moves.try_fold_steps(signed, UNBOUNDED, |room, slot, step| {
            let gap = self.0[slot];
            if gap == UNBOUNDED {
                return ControlFlow::Continue(room);
            }
            // `gap / step < room` exactly when `gap < room * step`: divide only then.
            let r = if step == 1 {
                gap
            } else if gap < room.saturating_mul(step) {
                gap / step
            } else {
                return ControlFlow::Continue(room);
            };
            if r == 0
                || (r < room && floor.is_some_and(|f| rate.saturating_mul(u128::from(r)) <= f))
            {
                return ControlFlow::Break(());
            }
            ControlFlow::Continue(room.min(r))
        });
        match room {
            ControlFlow::Continue(room) => Some(room),
            ControlFlow::Break(()) => None,
        }
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::moves::Coverage;
    use crate::objective::Objective;

    /// The largest `t` (up to `cap`) with `x + t * sign * g` in the box, by trying them all;
    /// `None` at `cap` (no bound met).
    fn brute_room(problem: &Problem, x: &[i64], g: &[i64], sign: i64, cap: i64) -> Option<i64> {
        let inside = |t: i64| {
            x.iter().zip(g).enumerate().all(|(i, (&v, &d))| {
                let y = v + t * sign * d;
                problem.lower()[i].is_none_or(|l| l <= y)
                    && problem.upper()[i].is_none_or(|u| y <= u)
            })
        };
        (0..=cap)
            .take_while(|&t| inside(t))
            .last()
            .filter(|&t| t < cap)
    }

    proptest! {
        /// The room read from the gaps is the largest feasible step, for packed entries and
        /// for wide ones (an entry of 300 does not pack), with and without a floor (given one,
        /// a move whose `rate * room` does not beat it is `None`).
        #[test]
        fn room_is_the_longest_feasible_step(
            box_of in prop::collection::vec((prop::option::of(-9i64..=0), prop::option::of(0i64..=9)), 3),
            shift in prop::collection::vec(0i64..=9, 3),
            g in prop::collection::vec(-3i64..=3, 3),
            wide in any::<bool>(),
            floor in prop::option::of(0u128..=20),
        ) {
            prop_assume!(g.iter().any(|&v| v != 0));
            let (lower, upper): (Vec<_>, Vec<_>) = box_of.into_iter().unzip();
            let x: Vec<i64> = lower.iter().zip(&upper).zip(&shift).map(|((l, u), &s)| {
                let (l, u) = (l.unwrap_or(-9), u.unwrap_or(9));
                l + s % (u - l + 1)
            }).collect();
            let problem = Problem::new(Objective::linear(vec![0; 3]), lower, upper).unwrap();
            let mut rows = vec![g.clone()];
            if wide {
                rows.push(vec![300, 0, 0]);
            }
            let moves = MoveSet::from_rows(3, &rows, Coverage::Complete).unwrap();
            prop_assert_eq!(moves.bound_steps(0).is_none(), wide);
            let gaps = Gaps::at(&problem, &x);
            for sign in Orientation::BOTH {
                let expected = brute_room(&problem, &x, &g, sign.factor(), 40);
                let room = gaps.room(&moves, (0, sign), 2, None);
                let expected_room = match expected {
                    Some(0) => None,
                    Some(t) => Some(u64::try_from(t).unwrap()),
                    None => Some(UNBOUNDED),
                };
                prop_assert_eq!(room, expected_room);
                let cut = gaps.room(&moves, (0, sign), 2, floor);
                let beaten = |r: u64| floor.is_none_or(|f| r == UNBOUNDED || 2 * u128::from(r) > f);
                prop_assert_eq!(cut, expected_room.filter(|&r| beaten(r)));
            }
        }
    }
}
