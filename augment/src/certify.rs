//! Independent checks of a final point: no move, in either sign, is feasible and improving
//! ([`Checker::certify`]), or none lowers the total bound violation
//! ([`Checker::violation_decrease`]).
//!
//! The checks share nothing with the solver's scans (no sign masks, rates, rooms or line
//! searches of theirs): a [`Checker`] reads every move from the set's one copy of its entries,
//! keeps its own sign masks of them, and compares exact term values on either side of a unit step. A unit step
//! suffices: if `x + t d` is feasible and better for some `t >= 1`, then `x + d` lies in the
//! (convex) box and, by convexity of `f`, `f(x + d) <= (1 - 1/t) f(x) + (1/t) f(x + t d) <
//! f(x)`. The violation is convex as well, so the same holds for it.
//!
//! Speed: a move that raises a coordinate at its upper bound or lowers one at its lower
//! bound is blocked in that sign, whatever its size, so one test of the checker's own bit
//! masks against the point's bound masks sets most moves aside; the others get the exact
//! test. This keeps the check cheap enough to run after every solve of a batch.

use std::sync::Arc;

use rayon::prelude::*;
use serde::{Deserialize, Serialize};

use crate::error::{overflow, AugmentError, Result};
use crate::moves::{MoveSet, Orientation};
use crate::objective::Separable;
use crate::problem::Problem;
use crate::support::Support;

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
/// improving move in (move, sign) order is returned. Reads the set's sign patterns for the
/// one call; keep a [`Checker`] to check many points against one set.
pub fn certify(problem: &Problem, moves: &MoveSet, x: &[i64]) -> Result<Certificate> {
    Check {
        moves,
        masks: &Masks::of(moves),
    }
    .certify(problem, x)
}

/// The first signed move (in (move, sign) order) that lowers the total violation at `x`;
/// see [`Checker::violation_decrease`].
pub fn violation_decrease(
    problem: &Problem,
    moves: &MoveSet,
    x: &[i64],
) -> Result<Option<Decrease>> {
    Check {
        moves,
        masks: &Masks::of(moves),
    }
    .violation_decrease(problem, x)
}

/// A move set with the checker's own sign masks of its moves: the set is shared with the
/// solver (its entries are the one copy of the moves), the masks are not.
#[derive(Debug, Clone)]
pub struct Checker {
    moves: Arc<MoveSet>,
    masks: Masks,
}

impl Checker {
    /// Reads the sign pattern of every move of `moves` from its entries.
    pub fn new(moves: Arc<MoveSet>) -> Self {
        let masks = Masks::of(&moves);
        Checker { moves, masks }
    }

    /// Number of moves.
    pub fn len(&self) -> usize {
        self.moves.len()
    }

    /// True for a set without moves.
    pub fn is_empty(&self) -> bool {
        self.moves.is_empty()
    }

    /// Checks `x` against every move in both signs (see the module documentation); the
    /// first improving move in (move, sign) order is returned.
    pub fn certify(&self, problem: &Problem, x: &[i64]) -> Result<Certificate> {
        self.check().certify(problem, x)
    }

    /// The first signed move (in (move, sign) order) that lowers the total violation
    /// `sum_i dist(x_i, [l_i, u_i])` at `x` with a unit step, or `None` when no move does:
    /// with a complete Graver basis `x` then minimises the violation over its fibre (Murota,
    /// Saito, Weismantel 2004).
    pub fn violation_decrease(&self, problem: &Problem, x: &[i64]) -> Result<Option<Decrease>> {
        self.check().violation_decrease(problem, x)
    }

    fn check(&self) -> Check<'_> {
        Check {
            moves: &self.moves,
            masks: &self.masks,
        }
    }
}

/// Per move bit masks of its positive and negative entries (bit `i % 64` of word `i / 64`
/// for coordinate `i`, `words` per move), with the largest l1 norm.
#[derive(Debug, Clone)]
struct Masks {
    words: usize,
    positive: Vec<u64>,
    negative: Vec<u64>,
    /// The largest l1 norm of a move, saturated at `u64::MAX`.
    max_norm: u64,
}

impl Masks {
    /// The masks of every move of `moves`, read from its entries (blocks of moves on the
    /// pool's threads).
    fn of(moves: &MoveSet) -> Self {
        const BLOCK: usize = 4096;
        let words = moves.width().div_ceil(64);
        let mut masks = Masks {
            words,
            positive: vec![0; moves.len() * words],
            negative: vec![0; moves.len() * words],
            max_norm: 0,
        };
        let blocks = masks.positive.par_chunks_mut(BLOCK * words);
        let blocks = blocks.zip(masks.negative.par_chunks_mut(BLOCK * words));
        masks.max_norm = blocks
            .enumerate()
            .map(|(b, (positive, negative))| {
                let mut max_norm = 0u64;
                for (j, k) in (b * BLOCK..moves.len()).take(BLOCK).enumerate() {
                    let mut norm = 0u64;
                    moves.support(k).for_each(|i, v| {
                        let side = if v > 0 {
                            &mut *positive
                        } else {
                            &mut *negative
                        };
                        side[j * words + i / 64] |= 1 << (i % 64);
                        norm = norm.saturating_add(v.unsigned_abs());
                    });
                    max_norm = max_norm.max(norm);
                }
                max_norm
            })
            .max()
            .unwrap_or(0);
        masks
    }
}

/// One set with its masks: the checks themselves.
struct Check<'a> {
    moves: &'a MoveSet,
    masks: &'a Masks,
}

impl Check<'_> {
    fn certify(&self, problem: &Problem, x: &[i64]) -> Result<Certificate> {
        self.check_width(problem, x)?;
        if let Some(variable) = problem.first_outside(x) {
            return Ok(Certificate::OutsideBox { variable });
        }
        let (at_lower, at_upper) = bound_masks(problem, x, self.masks.words);
        let objective = problem.objective();
        let open = self.unblocked(&at_lower, &at_upper);
        let narrow = objective.linear_costs().is_some_and(|costs| {
            let widest = costs.iter().map(|c| c.unsigned_abs()).max().unwrap_or(0);
            widest
                .checked_mul(self.masks.max_norm)
                .is_some_and(|m| m <= i64::MAX as u64)
        });
        let gains = match objective.linear_costs() {
            Some(_) => None,
            None => Gains::at(problem, self.moves, x),
        };
        for (move_index, &signs) in open.iter().enumerate().filter(|(_, &s)| s != 0) {
            let (plus, minus) = (signs & 1 != 0, signs & 2 != 0);
            let support = self.moves.support(move_index);
            let improving = match (objective.linear_costs(), &gains) {
                (Some(costs), _) => linear_gain(problem, costs, x, support, (plus, minus), narrow)?,
                (None, Some(gains)) => gains.first_gain(support, (plus, minus)),
                (None, None) => separable_gain(problem, x, support, (plus, minus))?,
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

    fn violation_decrease(&self, problem: &Problem, x: &[i64]) -> Result<Option<Decrease>> {
        self.check_width(problem, x)?;
        for move_index in 0..self.moves.len() {
            let support = self.moves.support(move_index);
            for sign in Orientation::BOTH {
                let mut amount = 0i128;
                for (i, v) in support.iter() {
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
        let Masks {
            words,
            positive,
            negative,
            ..
        } = self.masks;
        if *words == 1 {
            return one_word_unblocked(positive, negative, at_lower[0], at_upper[0]);
        }
        positive
            .chunks_exact(*words)
            .zip(negative.chunks_exact(*words))
            .map(|(p, n)| {
                signs(
                    !meets(p, at_upper) && !meets(n, at_lower),
                    !meets(n, at_upper) && !meets(p, at_lower),
                )
            })
            .collect()
    }

    fn check_width(&self, problem: &Problem, x: &[i64]) -> Result<()> {
        for (what, found) in [("point", x.len()), ("move width", self.moves.width())] {
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

/// The signs of each move (bit 0 `+`, bit 1 `-`) that no bound blocks, for one-word masks:
/// `+` is blocked when it raises a coordinate at its upper bound (`up`) or lowers one at its
/// lower bound (`lo`), `-` the other way round. Compiled for the wider vector units too and
/// picked at run time.
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn one_word_unblocked(positive: &[u64], negative: &[u64], lo: u64, up: u64) -> Vec<u8> {
    positive
        .iter()
        .zip(negative)
        .map(|(&p, &n)| {
            u8::from((p & up) | (n & lo) == 0) | (u8::from((n & up) | (p & lo) == 0) << 1)
        })
        .collect()
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
fn stays_in_box(problem: &Problem, x: &[i64], support: Support<'_>, sign: Orientation) -> bool {
    let (lower, upper) = (problem.lower(), problem.upper());
    support.iter().all(|(i, v)| {
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
    support: Support<'_>,
    (plus, minus): (bool, bool),
    narrow: bool,
) -> Result<Option<(Orientation, i128)>> {
    let rate = if narrow {
        // |c_i| * ||g||_1 fits in i64 for every move, so no partial sum can overflow.
        i128::from(support.iter().map(|(i, v)| costs[i] * v).sum::<i64>())
    } else {
        support
            .iter()
            .try_fold(0i128, |sum, (i, v)| {
                sum.checked_add(i128::from(costs[i]) * i128::from(v))
            })
            .ok_or(overflow("computing the cost rate of a move"))?
    };
    let (sign, gain) = match rate.signum() {
        -1 if plus => (Orientation::Plus, -rate),
        1 if minus => (Orientation::Minus, rate),
        _ => return Ok(None),
    };
    Ok(stays_in_box(problem, x, support, sign).then_some((sign, gain)))
}

/// The first `open` sign in which a move improves a separable objective and stays in the
/// box, with the gain `f(x) - f(x + sign * g)` summed over the support.
fn separable_gain(
    problem: &Problem,
    x: &[i64],
    support: Support<'_>,
    (plus, minus): (bool, bool),
) -> Result<Option<(Orientation, i128)>> {
    let objective = problem.objective();
    for (sign, open) in [(Orientation::Plus, plus), (Orientation::Minus, minus)] {
        if !open || !stays_in_box(problem, x, support, sign) {
            continue;
        }
        let mut gain = 0i128;
        for (i, v) in support.iter() {
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

/// The gains `f_i(x_i) - f_i(x_i + s)` of a separable objective at `x` for every variable `i`
/// and every step `s` a move of the set can make there (`|s|` up to the set's extent on `i`),
/// [`Gains::OUTSIDE`] where `x_i + s` leaves `[l_i, u_i]`. The exact test of a move then adds
/// its entries' gains instead of testing the box and evaluating two terms per entry: the same
/// exact values, each computed once per check.
struct Gains {
    /// Per variable the position of its step 0 in `gains`.
    centres: Vec<usize>,
    gains: Vec<i64>,
}

impl Gains {
    /// The mark of a step that leaves the box (no gain in the table takes this value).
    const OUTSIDE: i64 = i64::MIN;

    /// The table at the point `x` inside the box; `None` when it would hold more than four
    /// entries per nonzero entry of the set, or when a gain does not fit in `i64` or fails to
    /// evaluate (the test then evaluates terms move by move, which reports what matters).
    fn at(problem: &Problem, moves: &MoveSet, x: &[i64]) -> Option<Self> {
        let size = (0..moves.width()).try_fold(0u64, |sum, i| {
            moves
                .extent(i)
                .checked_mul(2)?
                .checked_add(sum)?
                .checked_add(1)
        })?;
        if size > 4 * moves.nonzeros() as u64 {
            return None;
        }
        let (objective, lower, upper) = (problem.objective(), problem.lower(), problem.upper());
        let mut centres = Vec::with_capacity(x.len());
        let mut gains = Vec::with_capacity(size as usize);
        for (i, &xi) in x.iter().enumerate() {
            // At most `size` entries, so the extent fits.
            let extent = moves.extent(i) as i64;
            let here = objective.term(i, xi).ok()?;
            centres.push(gains.len() + extent as usize);
            for s in -extent..=extent {
                let y = xi.checked_add(s)?;
                let inside = lower[i].is_none_or(|l| y >= l) && upper[i].is_none_or(|u| y <= u);
                gains.push(match inside {
                    true => i64::try_from(here.checked_sub(objective.term(i, y).ok()?)?)
                        .ok()
                        .filter(|&g| g != Self::OUTSIDE)?,
                    false => Self::OUTSIDE,
                });
            }
        }
        Some(Gains { centres, gains })
    }

    /// The first `open` sign in which a move keeps the point in the box and improves, with
    /// its gain (as [`separable_gain`]; a sum of `i64` gains cannot overflow `i128`).
    fn first_gain(
        &self,
        support: Support<'_>,
        (plus, minus): (bool, bool),
    ) -> Option<(Orientation, i128)> {
        'signs: for (sign, open) in [(Orientation::Plus, plus), (Orientation::Minus, minus)] {
            if !open {
                continue;
            }
            let mut gain = 0i128;
            for (i, v) in support.iter() {
                // `|v|` is at most the extent on `i`, so the position lies in the table.
                let at = self.centres[i] as i64 + v * sign.factor();
                match self.gains[at as usize] {
                    Self::OUTSIDE => continue 'signs,
                    change => gain += i128::from(change),
                }
            }
            if gain > 0 {
                return Some((sign, gain));
            }
        }
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::moves::Coverage;
    use crate::objective::{Objective, Term};

    /// A gain beyond `i64` leaves the table aside and the move-by-move test reports it exactly
    /// (by hand): `f(x) = -2^62 x_0 + x_1^2` at 0 falls by `2^64` along `+(4, 0)`, the first
    /// signed move the check tries.
    #[test]
    fn gains_beyond_i64_are_checked_move_by_move() {
        let terms = vec![Term::Linear(-(1 << 62)), Term::Quadratic { a: 1, c: 0 }];
        let objective = Objective::separable(terms).unwrap();
        let problem = Problem::new(objective, vec![None; 2], vec![None; 2]).unwrap();
        let moves = MoveSet::from_rows(2, &[vec![4, 0], vec![1, -1]], Coverage::Complete);
        let moves = moves.unwrap();
        assert!(Gains::at(&problem, &moves, &[0, 0]).is_none());
        let expected = Certificate::Improving {
            move_index: 0,
            sign: Orientation::Plus,
            gain: 1 << 64,
        };
        assert_eq!(certify(&problem, &moves, &[0, 0]).unwrap(), expected);
    }

    /// Within `i64` the table holds each step's gain and marks the steps out of the box:
    /// `f(x) = |x - 1|` at 0 in `[-1, 1]` (by hand).
    #[test]
    fn the_table_marks_steps_out_of_the_box() {
        let objective =
            Objective::separable(vec![Term::PiecewiseLinear(vec![(0, 1), (1, 0), (2, 1)])]);
        let problem = Problem::new(objective.unwrap(), vec![Some(-1)], vec![Some(1)]).unwrap();
        let moves = MoveSet::from_rows(1, &[vec![2], vec![1]], Coverage::Complete).unwrap();
        let gains = Gains::at(&problem, &moves, &[0]).unwrap();
        // Steps -2..=2: out, -1 (gain -1), 0, +1 (gain 1), out.
        assert_eq!(gains.gains, [Gains::OUTSIDE, -1, 0, 1, Gains::OUTSIDE]);
        let improving = gains.first_gain(moves.support(1), (true, true));
        assert_eq!(improving, Some((Orientation::Plus, 1)));
        assert_eq!(gains.first_gain(moves.support(0), (true, true)), None);
    }
}
