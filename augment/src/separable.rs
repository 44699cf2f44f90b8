//! The scan of phase II for a general separable objective (quadratic or piecewise-linear
//! terms, or linear terms given one by one): every signed move the bound filter admits gets
//! the exact line search inside the box.
//!
//! It only evaluates single moves; the driver in `sweep.rs` chooses among them, with the same
//! rules and tie-breaking as every other scan.
//!
//! Most signed moves do not improve, and a line search spends two evaluations of the objective
//! on its support to find that out. So the scan first bounds the first step's change from
//! below by the objective's one-unit differences at the current point ([`Differences`], which
//! the solve keeps and updates on each step's support): a convex term rises at least `d` times its right difference when its
//! variable rises by `d`, and falls at most `|d|` times its left difference when it falls by
//! `|d|`. When that bound is not negative the first step does not improve, and since the
//! function is convex along the move no longer step does: the move is passed over, exactly as
//! the line search would have decided (the same steps, in the same order).

use crate::choice::{choose_sign, Candidate, Rule};
use crate::error::Result;
use crate::marks::Filter;
use crate::moves::{MoveSet, Orientation};
use crate::objective::Separable;
use crate::problem::Problem;
use crate::search::{Direction, LineSearch, Step};
use crate::sweep::Evaluate;

/// What a separable scan needs.
pub(crate) struct SeparableScan<'a, F: ?Sized> {
    /// Line search on the function being minimised at the current point.
    pub search: &'a LineSearch<'a, F>,
    /// The moves.
    pub moves: &'a MoveSet,
    /// The box that steps must respect.
    pub bounds: &'a Problem,
    /// The selection rule.
    pub rule: Rule,
    /// Skips signed moves blocked by a bound at the current point.
    pub filter: &'a Filter,
    /// The objective's one-unit differences at the current point, when known.
    pub differences: Option<&'a Differences>,
}

/// Per variable `i` the objective's left and right differences at the current point `x`:
/// `f_i(x_i) - f_i(x_i - 1)` and `f_i(x_i + 1) - f_i(x_i)`.
/// They are kept as `i64` so that a bound's products never overflow (`i64 * i64` fits in
/// `i128`); a difference beyond `i64` leaves the scan without them.
pub(crate) struct Differences(Vec<[i64; 2]>);

impl Differences {
    /// The differences of `f` at `x`; `None` when one of them overflows (the scan then runs
    /// every line search).
    pub(crate) fn at<F: Separable + ?Sized>(f: &F, x: &[i64]) -> Option<Self> {
        x.iter()
            .enumerate()
            .map(|(i, &xi)| Self::of_term(f, i, xi))
            .collect::<Option<Vec<_>>>()
            .map(Differences)
    }

    /// The differences after a step changed `x` (now `x`) on the variables `changed` only;
    /// `None` when one of them overflows.
    pub(crate) fn moved<F: Separable + ?Sized>(
        mut self,
        f: &F,
        x: &[i64],
        changed: impl Iterator<Item = usize>,
    ) -> Option<Self> {
        for i in changed {
            self.0[i] = Self::of_term(f, i, x[i])?;
        }
        Some(self)
    }

    /// The left and right differences of term `i` at `xi`.
    fn of_term<F: Separable + ?Sized>(f: &F, i: usize, xi: i64) -> Option<[i64; 2]> {
        let here = f.term(i, xi).ok()?;
        let left = here.checked_sub(f.term(i, xi.checked_sub(1)?).ok()?)?;
        let right = f.term(i, xi.checked_add(1)?).ok()?.checked_sub(here)?;
        Some([i64::try_from(left).ok()?, i64::try_from(right).ok()?])
    }

    /// Whether one step along `dir` cannot lower the objective: the lower bound
    /// `sum d_i * (right difference if d_i > 0, else left difference)` of its change is not
    /// negative (by convexity; see the module documentation). `false` when the bound
    /// overflows.
    fn first_step_useless(&self, dir: &Direction) -> bool {
        let mut bound = Some(0i128);
        dir.support.for_each(|i, v| {
            let d = i128::from(v) * i128::from(dir.sign);
            let [left, right] = self.0[i];
            let rate = if d > 0 { right } else { left };
            bound = bound.and_then(|b| b.checked_add(i128::from(rate) * d));
        });
        bound.is_some_and(|b| b >= 0)
    }
}

impl<F: Separable + ?Sized> Evaluate for SeparableScan<'_, F> {
    fn moves(&self) -> &MoveSet {
        self.moves
    }

    fn rule(&self) -> Rule {
        self.rule
    }

    /// Every move: the filter's test needs the sign, so [`Evaluate::evaluate`] applies it.
    fn candidates(&self, _start: usize, len: usize) -> u64 {
        u64::MAX >> (64 - len)
    }

    /// The rule's choice among the two signs of move `index` (the floor is not used: a line
    /// search has no cheap bound on its gain).
    fn evaluate(&self, index: usize, _floor: Option<i128>) -> Result<Option<Candidate>> {
        choose_sign(self.rule, self.moves, |sign, _| {
            self.evaluate_sign(index, sign)
        })
    }

    fn ceiling(&self) -> Option<i128> {
        None
    }
}

impl<F: Separable + ?Sized> SeparableScan<'_, F> {
    /// The best step along move `index` in direction `sign`, if it improves.
    fn evaluate_sign(&self, index: usize, sign: Orientation) -> Result<Option<Candidate>> {
        if !self.filter.admits(self.moves, index, sign) {
            return Ok(None);
        }
        let dir = Direction::of(self.moves, index, sign);
        if let Some(differences) = self.differences {
            if differences.first_step_useless(&dir) {
                return Ok(None);
            }
        }
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
    for k in 0..dir.len() {
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

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::moves::Coverage;
    use crate::objective::strategies::piecewise;
    use crate::objective::{Objective, Term};

    /// A convex term: a quadratic `a x^2 + c x` with `a >= 0`, or a piecewise-linear one
    /// with nondecreasing slopes.
    fn term() -> impl Strategy<Value = Term> {
        prop_oneof![
            (0i64..=3, -6i64..=6).prop_map(|(a, c)| Term::Quadratic { a, c }),
            piecewise(-3..=3, (3, 4), 3),
        ]
    }

    proptest! {
        /// The bound is sound (a move it passes over does not improve in one step, checked
        /// by evaluating the objective) and exact for moves of entries `±1`, where it is the
        /// first step's change itself (by definition of the one-unit differences).
        #[test]
        fn first_step_bound_is_sound(
            terms in prop::collection::vec(term(), 4),
            x in prop::collection::vec(-6i64..=6, 4),
            g in prop::collection::vec(-3i64..=3, 4),
        ) {
            prop_assume!(g.iter().any(|&v| v != 0));
            let f = Objective::separable(terms).expect("convex by construction");
            let moves = MoveSet::from_rows(4, std::slice::from_ref(&g), Coverage::Complete).unwrap();
            let differences = Differences::at(&f, &x).expect("small values fit");
            for sign in Orientation::BOTH {
                let dir = Direction::of(&moves, 0, sign);
                let y: Vec<i64> = x.iter().zip(&g).map(|(a, b)| a + b * sign.factor()).collect();
                let change = f.value(&y).unwrap() - f.value(&x).unwrap();
                let useless = differences.first_step_useless(&dir);
                prop_assert!(!useless || change >= 0);
                if g.iter().all(|v| v.abs() <= 1) {
                    prop_assert_eq!(useless, change >= 0);
                }
            }
        }
    }
}
