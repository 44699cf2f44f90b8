//! Independent checks of a final point: no move, in either sign, is feasible and improving
//! ([`Checker::certify`]), or none lowers the total bound violation
//! ([`Checker::violation_decrease`]).
//!
//! The checks share nothing with the solver's scans (no sign masks, rates, rooms or line
//! searches of theirs): a [`Checker`] keeps its own copy of every move, read from the plain
//! rows, and compares exact term values on either side of a unit step. A unit step
//! suffices: if `x + t d` is feasible and better for some `t >= 1`, then `x + d` lies in the
//! (convex) box and, by convexity of `f`, `f(x + d) <= (1 - 1/t) f(x) + (1/t) f(x + t d) <
//! f(x)`. The violation is convex as well, so the same holds for it.
//!
//! Speed: a move that raises a coordinate at its upper bound or lowers one at its lower
//! bound is blocked in that sign, whatever its size, so one test of the checker's own bit
//! masks against the point's bound masks sets most moves aside; the others get the exact
//! test. This keeps the check cheap enough to run after every solve of a batch.

use serde::{Deserialize, Serialize};

use crate::error::{overflow, AugmentError, Result};
use crate::moves::{MoveSet, Orientation};
use crate::objective::Separable;
use crate::problem::Problem;

/// The verdict of [`certify`].
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum Certificate {
    /// `x` is feasible and no move improves it: optimal whenever the set is a test set.
    NoImprovingMove,
    /// `x` violates the bound of this variable.
    OutsideBox {
        /// The first variable outside its range.
        variable: usize,
    },
    /// This signed move is feasible at `x` and improves the objective.
    Improving {
        /// Index of the move in the set.
        move_index: usize,
        /// Orientation in which the move improves.
        sign: Orientation,
        /// `f(x) - f(x + sign * g)`, positive.
        gain: i128,
    },
}

/// A signed move that lowers the total violation, found by [`violation_decrease`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct Decrease {
    /// Index of the move in the set.
    pub move_index: usize,
    /// Orientation in which the move is applied.
    pub sign: Orientation,
    /// `v(x) - v(x + sign * g)`, positive.
    pub amount: i128,
}

/// Checks `x` against every move in both signs (see the module documentation); the first
/// improving move in (move, sign) order is returned. Builds a [`Checker`] for the one call;
/// keep a [`Checker`] to check many points against one set.
pub fn certify(problem: &Problem, moves: &MoveSet, x: &[i64]) -> Result<Certificate> {
    Checker::new(moves).certify(problem, x)
}

/// The first signed move (in (move, sign) order) that lowers the total violation at `x`;
/// see [`Checker::violation_decrease`].
pub fn violation_decrease(
    problem: &Problem,
    moves: &MoveSet,
    x: &[i64],
) -> Result<Option<Decrease>> {
    Checker::new(moves).violation_decrease(problem, x)
}

/// The checker's own copy of a move set: per move its support and values, and bit masks of
/// its positive and negative entries (bit `i % 64` of word `i / 64` for coordinate `i`),
/// all read from the dense rows of the set.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Checker {
    width: usize,
    words: usize,
    starts: Vec<usize>,
    indices: Vec<usize>,
    values: Vec<i64>,
    positive: Vec<u64>,
    negative: Vec<u64>,
    /// The largest l1 norm of a move, saturated at `u64::MAX`.
    max_norm: u64,
}

impl Checker {
    /// Copies the moves of `moves` from their dense rows.
    pub fn new(moves: &MoveSet) -> Self {
        let (width, words) = (moves.width(), moves.width().div_ceil(64));
        let mut checker = Checker {
            width,
            words,
            starts: vec![0],
            indices: Vec::new(),
            values: Vec::new(),
            positive: vec![0; moves.len() * words],
            negative: vec![0; moves.len() * words],
            max_norm: 0,
        };
        for k in 0..moves.len() {
            for (i, &v) in moves.row(k).iter().enumerate().filter(|(_, &v)| v != 0) {
                checker.indices.push(i);
                checker.values.push(v);
                let mask = if v > 0 {
                    &mut checker.positive
                } else {
                    &mut checker.negative
                };
                mask[k * words + i / 64] |= 1 << (i % 64);
            }
            let norm = moves
                .row(k)
                .iter()
                .fold(0u64, |n, v| n.saturating_add(v.unsigned_abs()));
            checker.max_norm = checker.max_norm.max(norm);
            checker.starts.push(checker.indices.len());
        }
        checker
    }

    /// Number of moves.
    pub fn len(&self) -> usize {
        self.starts.len() - 1
    }

    /// True for a set without moves.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Checks `x` against every move in both signs (see the module documentation); the
    /// first improving move in (move, sign) order is returned.
    pub fn certify(&self, problem: &Problem, x: &[i64]) -> Result<Certificate> {
        self.check_width(problem, x)?;
        if let Some(variable) = problem.first_outside(x) {
            return Ok(Certificate::OutsideBox { variable });
        }
        let (at_lower, at_upper) = bound_masks(problem, x, self.words);
        let objective = problem.objective();
        let open = self.unblocked(&at_lower, &at_upper);
        let narrow = objective.linear_costs().is_some_and(|costs| {
            let widest = costs.iter().map(|c| c.unsigned_abs()).max().unwrap_or(0);
            widest
                .checked_mul(self.max_norm)
                .is_some_and(|m| m <= i64::MAX as u64)
        });
        for (move_index, &signs) in open.iter().enumerate().filter(|(_, &s)| s != 0) {
            let (plus, minus) = (signs & 1 != 0, signs & 2 != 0);
            let (indices, values) = self.support(move_index);
            let improving = match objective.linear_costs() {
                Some(costs) => {
                    linear_gain(problem, costs, x, indices, values, (plus, minus), narrow)?
                }
                None => separable_gain(problem, x, indices, values, (plus, minus))?,
            };
            if let Some((sign, gain)) = improving {
                return Ok(Certificate::Improving {
                    move_index,
                    sign,
                    gain,
                });
            }
        }
        Ok(Certificate::NoImprovingMove)
    }

    /// The first signed move (in (move, sign) order) that lowers the total violation
    /// `sum_i dist(x_i, [l_i, u_i])` at `x` with a unit step, or `None` when no move does:
    /// with a complete Graver basis `x` then minimises the violation over its fibre (Murota,
    /// Saito, Weismantel 2004).
    pub fn violation_decrease(&self, problem: &Problem, x: &[i64]) -> Result<Option<Decrease>> {
        self.check_width(problem, x)?;
        for move_index in 0..self.len() {
            let (indices, values) = self.support(move_index);
            for sign in Orientation::BOTH {
                let mut amount = 0i128;
                for (&i, &v) in indices.iter().zip(values) {
                    let after = stepped(x[i], v, sign)?;
                    amount += problem.violation_at(i, x[i]) - problem.violation_at(i, after);
                }
                if amount > 0 {
                    return Ok(Some(Decrease {
                        move_index,
                        sign,
                        amount,
                    }));
                }
            }
        }
        Ok(None)
    }

    /// Per move whether it may stay in the box in sign `+` (bit 0) and in sign `-` (bit 1):
    /// a sign is closed when the move raises a coordinate at its upper bound or lowers one at
    /// its lower bound. One pass over the masks, without branches when they take one word.
    fn unblocked(&self, at_lower: &[u64], at_upper: &[u64]) -> Vec<u8> {
        let signs = |plus: bool, minus: bool| u8::from(plus) | (u8::from(minus) << 1);
        if self.words == 1 {
            let (lo, up) = (at_lower[0], at_upper[0]);
            return self
                .positive
                .iter()
                .zip(&self.negative)
                .map(|(&p, &n)| signs((p & up) | (n & lo) == 0, (n & up) | (p & lo) == 0))
                .collect();
        }
        self.positive
            .chunks_exact(self.words)
            .zip(self.negative.chunks_exact(self.words))
            .map(|(p, n)| {
                signs(
                    !meets(p, at_upper) && !meets(n, at_lower),
                    !meets(n, at_upper) && !meets(p, at_lower),
                )
            })
            .collect()
    }

    fn support(&self, index: usize) -> (&[usize], &[i64]) {
        let range = self.starts[index]..self.starts[index + 1];
        (&self.indices[range.clone()], &self.values[range])
    }

    fn check_width(&self, problem: &Problem, x: &[i64]) -> Result<()> {
        for (what, found) in [("point", x.len()), ("move width", self.width)] {
            if found != problem.len() {
                return Err(AugmentError::Dimension {
                    what,
                    expected: problem.len(),
                    found,
                });
            }
        }
        Ok(())
    }
}

/// Bit masks of the coordinates of `x` at their lower and at their upper bound.
fn bound_masks(problem: &Problem, x: &[i64], words: usize) -> (Vec<u64>, Vec<u64>) {
    let (mut at_lower, mut at_upper) = (vec![0u64; words], vec![0u64; words]);
    for (i, &v) in x.iter().enumerate() {
        if problem.lower()[i] == Some(v) {
            at_lower[i / 64] |= 1 << (i % 64);
        }
        if problem.upper()[i] == Some(v) {
            at_upper[i / 64] |= 1 << (i % 64);
        }
    }
    (at_lower, at_upper)
}

/// True when the two masks share a bit.
fn meets(a: &[u64], b: &[u64]) -> bool {
    a.iter().zip(b).any(|(p, q)| p & q != 0)
}

/// `x_i + sign * v`, with overflow reported.
fn stepped(xi: i64, v: i64, sign: Orientation) -> Result<i64> {
    v.checked_mul(sign.factor())
        .and_then(|d| xi.checked_add(d))
        .ok_or(overflow("adding a move to the point"))
}

/// True when `x + sign * g` stays in the box (only the support of `g` can leave it),
/// computed in `i128`, where no sum of two `i64` overflows.
fn stays_in_box(
    problem: &Problem,
    x: &[i64],
    (indices, values): (&[usize], &[i64]),
    sign: Orientation,
) -> bool {
    let (lower, upper) = (problem.lower(), problem.upper());
    indices.iter().zip(values).all(|(&i, &v)| {
        let y = i128::from(x[i]) + i128::from(sign.factor()) * i128::from(v);
        lower[i].is_none_or(|l| y >= i128::from(l)) && upper[i].is_none_or(|u| y <= i128::from(u))
    })
}

/// The improving sign of a move under the linear cost `c` and its gain `|c.g|`, if that
/// sign is `open` (not blocked by the masks) and keeps the point in the box; `narrow` says
/// that `c.g` can be summed in `i64` for every move of the set.
fn linear_gain(
    problem: &Problem,
    costs: &[i64],
    x: &[i64],
    indices: &[usize],
    values: &[i64],
    (plus, minus): (bool, bool),
    narrow: bool,
) -> Result<Option<(Orientation, i128)>> {
    let rate = if narrow {
        // |c_i| * ||g||_1 fits in i64 for every move, so no partial sum can overflow.
        i128::from(
            indices
                .iter()
                .zip(values)
                .map(|(&i, &v)| costs[i] * v)
                .sum::<i64>(),
        )
    } else {
        indices
            .iter()
            .zip(values)
            .try_fold(0i128, |sum, (&i, &v)| {
                sum.checked_add(i128::from(costs[i]) * i128::from(v))
            })
            .ok_or(overflow("computing the cost rate of a move"))?
    };
    let (sign, gain) = match rate.signum() {
        -1 if plus => (Orientation::Plus, -rate),
        1 if minus => (Orientation::Minus, rate),
        _ => return Ok(None),
    };
    Ok(stays_in_box(problem, x, (indices, values), sign).then_some((sign, gain)))
}

/// The first `open` sign in which a move improves a separable objective and stays in the
/// box, with the gain `f(x) - f(x + sign * g)` summed over the support.
fn separable_gain(
    problem: &Problem,
    x: &[i64],
    indices: &[usize],
    values: &[i64],
    (plus, minus): (bool, bool),
) -> Result<Option<(Orientation, i128)>> {
    let objective = problem.objective();
    for (sign, open) in [(Orientation::Plus, plus), (Orientation::Minus, minus)] {
        if !open || !stays_in_box(problem, x, (indices, values), sign) {
            continue;
        }
        let mut gain = 0i128;
        for (&i, &v) in indices.iter().zip(values) {
            let change = objective
                .term(i, x[i])?
                .checked_sub(objective.term(i, stepped(x[i], v, sign)?)?)
                .ok_or(overflow("comparing objective values"))?;
            gain = gain
                .checked_add(change)
                .ok_or(overflow("comparing objective values"))?;
        }
        if gain > 0 {
            return Ok(Some((sign, gain)));
        }
    }
    Ok(None)
}
