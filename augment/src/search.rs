//! The step length along one signed move: exact integer line search on a convex function.
//!
//! Along a direction `d` the objective restricts to `phi(t) = sum_i f_i(x_i + t d_i)`, a convex
//! function of the integer `t`. Its minimiser over `1..=m` is the smallest `t` whose forward
//! difference `phi(t + 1) - phi(t)` is nonnegative (or `m` when there is none); the forward
//! differences never decrease, so galloping followed by bisection finds it with
//! `O(log t)` evaluations, each touching only the support of the move.

use crate::error::{overflow, Result};
use crate::moves::{MoveSet, Orientation};
use crate::objective::{Recession, Separable};
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
        let base = self.phi(dir, 0)?;
        let first = self.phi(dir, 1)?;
        if first >= base {
            return Ok(Step::Useless);
        }
        let limit = room.unwrap_or(i64::MAX);
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
