//! The step length along one signed move: exact integer line search on a convex function.
//!
//! Along a direction `d` the objective restricts to `phi(t) = sum_i f_i(x_i + t d_i)`, a convex
//! function of the integer `t`. Its minimiser over `1..=m` is the smallest `t` whose forward
//! difference `phi(t + 1) - phi(t)` is nonnegative (or `m` when there is none); the forward
//! differences never decrease, so galloping followed by bisection finds it with
//! `O(log t)` evaluations, each touching only the support of the move.
//!
//! When every term on the support is piecewise linear, `phi` is piecewise linear in the real
//! `t` too, with its kinks where a coordinate meets a kink of its term; the slope of `phi`
//! only rises there. So the kinks are read instead: the first at which the slope stops being
//! negative is the real minimiser, and the integer answer is its floor or its ceiling, found
//! with two evaluations whatever the step length ([`LineSearch::by_kinks`]).

use crate::error::{overflow, Result};
use crate::moves::{MoveSet, Orientation};
use crate::objective::{Pieces, Recession, Separable};
use crate::support::Support;

/// A signed move in sparse form.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Direction<'a> {
    /// The stored move's nonzero entries.
    pub support: Support<'a>,
    /// `+1` or `-1`.
    pub sign: i64,
}

impl<'a> Direction<'a> {
    /// Move `index` of `moves` applied with `sign`.
    #[inline]
    pub(crate) fn of(moves: &'a MoveSet, index: usize, sign: Orientation) -> Self {
        Direction {
            support: moves.support(index),
            sign: sign.factor(),
        }
    }

    /// Number of nonzero entries.
    #[inline]
    pub(crate) fn len(&self) -> usize {
        self.support.len()
    }

    /// Entry `k` of the signed move, with its variable.
    #[inline]
    pub(crate) fn entry(&self, k: usize) -> Result<(usize, i64)> {
        let (i, v) = self.support.get(k);
        let d = v
            .checked_mul(self.sign)
            .ok_or(overflow("negating a move"))?;
        Ok((i, d))
    }
}

/// The outcome of a line search along one signed move.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Step {
    /// No step length improves the objective.
    Useless,
    /// Step `length` times the move, improving the objective by `gain > 0`.
    Finite {
        /// Number of times the move is applied.
        length: i64,
        /// Decrease of the objective.
        gain: i128,
    },
    /// Every step length is feasible and the objective falls without bound.
    Ray,
}

/// The most kinks of `phi` read before a search falls back to [`LineSearch::exact`].
const MAX_KINKS: usize = 24;

/// What the kinks of a piecewise-linear `phi` say about a move.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum AlongKinks {
    /// `phi` does not fall to the right of 0: no step improves.
    Rising,
    /// The step length [`LineSearch::exact`] would choose, with `phi` there.
    Lowest(i64, i128),
}

/// The line-search settings shared by every move in one scan.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LineSearch<'a, F: ?Sized> {
    /// The function minimised.
    pub f: &'a F,
    /// The current point.
    pub x: &'a [i64],
    /// Restrict step lengths to powers of two.
    pub powers_of_two: bool,
}

impl<F: Separable + ?Sized> LineSearch<'_, F> {
    /// The best step along `dir` with at most `room` (`None`: unlimited) applications;
    /// `slope`, when given, is the linear rate `c.d` and selects the closed form.
    pub(crate) fn best(
        &self,
        dir: &Direction,
        room: Option<i64>,
        slope: Option<i128>,
    ) -> Result<Step> {
        if room == Some(0) {
            return Ok(Step::Useless);
        }
        if let Some(slope) = slope {
            return self.linear(slope, room);
        }
        if room.is_none() && self.falls_forever(dir, None)? {
            return Ok(Step::Ray);
        }
        let limit = room.unwrap_or(i64::MAX);
        if !self.powers_of_two {
            match self.by_kinks(dir, limit)? {
                Some(AlongKinks::Rising) => return Ok(Step::Useless),
                Some(AlongKinks::Lowest(length, value)) => {
                    let base = self.phi(dir, 0)?;
                    return Ok(if value < base {
                        Step::Finite {
                            length,
                            gain: base - value,
                        }
                    } else {
                        Step::Useless
                    });
                }
                None => {}
            }
        }
        let base = self.phi(dir, 0)?;
        let first = self.phi(dir, 1)?;
        if first >= base {
            return Ok(Step::Useless);
        }
        let (length, value) = if self.powers_of_two {
            self.doubling(dir, limit, first)?
        } else {
            self.exact(dir, limit)?
        };
        Ok(Step::Finite {
            length,
            gain: base - value,
        })
    }

    /// True when `phi` decreases without bound along `dir` (rate `slope` when linear); with
    /// an unlimited room this makes `dir` a ray. Independent of the current point.
    pub(crate) fn falls_forever(&self, dir: &Direction, slope: Option<i128>) -> Result<bool> {
        Ok(match slope {
            Some(slope) => slope < 0,
            None => matches!(self.recession(dir)?, Recession::Finite(rate) if rate < 0),
        })
    }

    /// Closed form for a linear function: the longest (power-of-two) step when improving.
    fn linear(&self, slope: i128, room: Option<i64>) -> Result<Step> {
        if slope >= 0 {
            return Ok(Step::Useless);
        }
        let Some(room) = room else {
            return Ok(Step::Ray);
        };
        let length = if self.powers_of_two {
            1i64 << (63 - room.leading_zeros())
        } else {
            room
        };
        let gain = slope
            .checked_mul(-i128::from(length))
            .ok_or(overflow("computing the gain of a linear step"))?;
        Ok(Step::Finite { length, gain })
    }

    /// Smallest `t` in `1..=limit` with `phi(t + 1) >= phi(t)`, or `limit`; with `phi(t)`.
    fn exact(&self, dir: &Direction, limit: i64) -> Result<(i64, i128)> {
        let stops = |t: i64| -> Result<bool> {
            Ok(t >= limit || self.phi(dir, t + 1)? >= self.phi(dir, t)?)
        };
        let (mut low, mut high) = (0i64, 1i64);
        while !stops(high)? {
            low = high;
            high = high.saturating_mul(2).min(limit);
        }
        while high - low > 1 {
            let mid = low + (high - low) / 2;
            if stops(mid)? {
                high = mid;
            } else {
                low = mid;
            }
        }
        Ok((high, self.phi(dir, high)?))
    }

    /// The line search read from the kinks, when every term on the support is piecewise
    /// linear (`None` otherwise): [`AlongKinks::Rising`] when `phi` does not fall to the right
    /// of 0, else what [`LineSearch::exact`] would return, which improves exactly when its
    /// value is below `phi(0)`.
    ///
    /// At each kink `t_k` of `phi` its slope rises by `|d_i|` times the term's slope jump.
    /// When the slope is negative at 0, the first kink `t*` at which it is no longer negative
    /// is the smallest real minimiser: `phi` falls strictly before it and never falls after
    /// it. So the smallest `t >= 1` with `phi(t + 1) >= phi(t)` is `floor(t*)` when that is at
    /// least 1 and `phi(floor(t*)) <= phi(ceil(t*))`, else `ceil(t*)`; and it is `limit`
    /// when no such kink lies before `limit`.
    fn by_kinks(&self, dir: &Direction, limit: i64) -> Result<Option<AlongKinks>> {
        let mut slope = 0i128;
        // Per kink ahead: `t = distance / step` as (distance, step), and the slope's rise; on
        // the stack, as moves meet few kinks (more leave the search to `exact`).
        let mut kinks = [(0u128, 1u128, 0i128); MAX_KINKS];
        let mut count = 0;
        for k in 0..dir.len() {
            let (i, d) = dir.entry(k)?;
            let Some(Pieces { kinks: at, slopes }) = self.f.pieces(i) else {
                return Ok(None);
            };
            let x = self.x[i];
            // Kinks at or behind x (in the direction of d) are passed; the slope of the
            // segment beyond them applies.
            let passed = if d > 0 {
                at.partition_point(|&b| b <= x)
            } else {
                at.partition_point(|&b| b < x)
            };
            // Any product or sum beyond i128 leaves the search to `exact`, which reports it.
            let Some(rate) = slope.checked_add(i128::from(d) * i128::from(slopes[passed])) else {
                return Ok(None);
            };
            slope = rate;
            let (step, steps) = (u128::from(d.unsigned_abs()), i128::from(d.unsigned_abs()));
            let ahead = if d > 0 { at.len() - passed } else { passed };
            for n in 0..ahead {
                let j = if d > 0 { passed + n } else { passed - 1 - n };
                let distance = u128::from(at[j].abs_diff(x));
                // Kinks at `t >= limit` do not change the answer.
                if distance >= u128::from(limit.unsigned_abs()) * step {
                    break;
                }
                let jump = i128::from(slopes[j + 1]) - i128::from(slopes[j]);
                let Some(rise) = jump.checked_mul(steps) else {
                    return Ok(None);
                };
                let Some(slot) = kinks.get_mut(count) else {
                    return Ok(None);
                };
                *slot = (distance, step, rise);
                count += 1;
            }
        }
        if slope >= 0 {
            return Ok(Some(AlongKinks::Rising));
        }
        let kinks = &mut kinks[..count];
        kinks.sort_unstable_by(|a, b| (a.0 * b.1).cmp(&(b.0 * a.1)));
        let mut turn = None;
        for &(distance, step, rise) in kinks.iter() {
            let Some(rate) = slope.checked_add(rise) else {
                return Ok(None);
            };
            slope = rate;
            if slope >= 0 {
                turn = Some((distance, step));
                break;
            }
        }
        let Some((distance, step)) = turn else {
            return Ok(Some(AlongKinks::Lowest(limit, self.phi(dir, limit)?)));
        };
        let floor = i64::try_from(distance / step).unwrap_or(i64::MAX);
        let ceil = floor + i64::from(distance % step != 0);
        let high = self.phi(dir, ceil)?;
        if floor >= 1 && floor < ceil {
            let low = self.phi(dir, floor)?;
            if low <= high {
                return Ok(Some(AlongKinks::Lowest(floor, low)));
            }
        }
        Ok(Some(AlongKinks::Lowest(ceil, high)))
    }

    /// Best `t = 2^k <= limit`: `phi` restricted to an increasing sequence is unimodal, so
    /// doubling stops at the first non-improvement.
    fn doubling(&self, dir: &Direction, limit: i64, first: i128) -> Result<(i64, i128)> {
        let (mut length, mut value) = (1i64, first);
        while let Some(next) = length.checked_mul(2).filter(|&n| n <= limit) {
            let next_value = self.phi(dir, next)?;
            if next_value >= value {
                break;
            }
            (length, value) = (next, next_value);
        }
        Ok((length, value))
    }

    /// `sum over the support of f_i(x_i + t d_i)`.
    fn phi(&self, dir: &Direction, t: i64) -> Result<i128> {
        let mut sum = 0i128;
        for k in 0..dir.len() {
            let (i, d) = dir.entry(k)?;
            let moved = d
                .checked_mul(t)
                .and_then(|s| self.x[i].checked_add(s))
                .ok_or(overflow("moving a coordinate along a step"))?;
            sum = sum
                .checked_add(self.f.term(i, moved)?)
                .ok_or(overflow("summing the objective along a move"))?;
        }
        Ok(sum)
    }

    /// Asymptotic rate of `phi` along `dir`.
    fn recession(&self, dir: &Direction) -> Result<Recession> {
        let mut rate = Recession::Finite(0);
        for k in 0..dir.len() {
            let (i, d) = dir.entry(k)?;
            rate = rate.add(self.f.recession(i, d)?)?;
        }
        Ok(rate)
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::moves::Coverage;
    use crate::objective::strategies::piecewise;
    use crate::objective::{Objective, Term};

    /// `f` with its pieces hidden, so that the line search takes the general path.
    struct Opaque<'a>(&'a Objective);

    impl Separable for Opaque<'_> {
        fn term(&self, variable: usize, value: i64) -> Result<i128> {
            self.0.term(variable, value)
        }
        fn recession(&self, variable: usize, direction: i64) -> Result<Recession> {
            self.0.recession(variable, direction)
        }
        fn linear_costs(&self) -> Option<&[i64]> {
            None
        }
    }

    /// A convex piecewise-linear term through `x0` with up to four segments, or a linear one.
    fn term() -> impl Strategy<Value = Term> {
        prop_oneof![
            (-5i64..=5).prop_map(Term::Linear),
            piecewise(-6..=6, (4, 5), 4),
        ]
    }

    proptest! {
        /// Reading the kinks gives the step the general search (galloping and bisection on
        /// `phi`'s differences) gives, for every room, including none.
        #[test]
        fn the_kinks_give_the_general_search_step(
            terms in prop::collection::vec(term(), 4),
            x in prop::collection::vec(-8i64..=8, 4),
            g in prop::collection::vec(-3i64..=3, 4),
            room in prop::option::of(1i64..=40),
        ) {
            prop_assume!(g.iter().any(|&v| v != 0));
            let f = Objective::separable(terms).expect("convex by construction");
            let moves = MoveSet::from_rows(4, std::slice::from_ref(&g), Coverage::Complete).unwrap();
            let opaque = Opaque(&f);
            for sign in Orientation::BOTH {
                let dir = Direction::of(&moves, 0, sign);
                let kinked = LineSearch { f: &f, x: &x, powers_of_two: false };
                let general = LineSearch { f: &opaque, x: &x, powers_of_two: false };
                let limit = room.unwrap_or(50);
                prop_assert!(kinked.by_kinks(&dir, limit).unwrap().is_some());
                prop_assert!(general.by_kinks(&dir, limit).unwrap().is_none());
                prop_assert_eq!(
                    kinked.best(&dir, room, None).unwrap(),
                    general.best(&dir, room, None).unwrap()
                );
            }
        }
    }

    /// By hand: `f(x) = |x - 3|` from `x = 0` along `+2`: `phi(t) = |2t - 3|` is 3, 1, 1, 3,
    /// so the real minimiser is 1.5 and the smallest integer one is 1, with `phi = 1`.
    #[test]
    fn a_kink_between_two_steps_gives_the_smaller_step_on_a_tie() {
        let f = Objective::separable(vec![Term::PiecewiseLinear(vec![(0, 3), (3, 0), (6, 3)])])
            .unwrap();
        let moves = MoveSet::from_rows(1, &[vec![2]], Coverage::Complete).unwrap();
        let dir = Direction::of(&moves, 0, Orientation::Plus);
        let search = LineSearch {
            f: &f,
            x: &[0],
            powers_of_two: false,
        };
        assert_eq!(
            search.by_kinks(&dir, 10).unwrap(),
            Some(AlongKinks::Lowest(1, 1))
        );
        assert_eq!(
            search.best(&dir, Some(10), None).unwrap(),
            Step::Finite { length: 1, gain: 2 }
        );
        let back = Direction::of(&moves, 0, Orientation::Minus);
        assert_eq!(
            search.by_kinks(&back, 10).unwrap(),
            Some(AlongKinks::Rising)
        );
    }
}
