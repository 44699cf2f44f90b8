//! The scan of phase II for a general separable objective (quadratic or piecewise-linear
//! terms, or linear terms given one by one): every signed move the bound filter admits gets
//! the exact line search inside the box.
//!
//! It only evaluates single moves; the driver in `sweep.rs` chooses among them, with the same
//! rules and tie-breaking as every other scan.
//!
//! Most signed moves do not improve, and a line search spends two evaluations of the objective
//! on its support to find that out. So the scan first bounds the first step's change from
//! below by the objective's one-unit differences at the current point: a convex term rises at
//! least `d` times its right difference when its variable rises by `d`, and falls at most
//! `|d|` times its left difference when it falls by `|d|`. When that bound is not negative the
//! first step does not improve, and since the function is convex along the move no longer step
//! does: the move is passed over, exactly as the line search would have decided (the same
//! steps, in the same order).
//!
//! The bounds of every move in both signs are kept for the whole phase ([`FirstSteps`]): a step
//! changes the differences of the variables on its support only, so only their columns are
//! added to the bounds (a vectorised pass per changed variable over the set's narrow
//! column-major copy), and a scan reads the moves worth a line search 64 at a time from the
//! signs of the bounds without visiting the others.
//!
//! The same bound caps a step's gain: `t` steps change the objective by at least `t` times the
//! bound, so a move with room for `m` steps gains at most `m` times its absolute value. Under
//! Graver-best a move whose cap does not exceed the best gain found so far is passed over
//! without its line search (it could not replace that step).

use crate::choice::{choose_sign, Candidate, Rule};
use crate::error::Result;
use crate::gaps::{Gaps, UNBOUNDED};
use crate::marks::{gather_bits, Filter};
use crate::moves::{MoveSet, Orientation};
use crate::objective::{Pieces, Separable};
use crate::search::{Direction, LineSearch, Step};
use crate::sweep::Evaluate;

/// What a separable scan needs.
pub(crate) struct SeparableScan<'a, F: ?Sized> {
    /// Line search on the function being minimised at the current point.
    pub search: &'a LineSearch<'a, F>,
    /// The moves.
    pub moves: &'a MoveSet,
    /// The current point's gaps to the bounds.
    pub gaps: Gaps,
    /// The selection rule.
    pub rule: Rule,
    /// Skips signed moves blocked by a bound at the current point.
    pub filter: &'a Filter,
    /// The bounds of every move's first step at the current point, when known.
    pub first_steps: Option<&'a FirstSteps>,
}

/// The objective's one-unit differences at the current point `x` and, per move, the lower
/// bounds they give on the change of one step in either sign (see the module documentation),
/// kept up to date step by step.
///
/// Per variable `i` the left and right differences are `f_i(x_i) - f_i(x_i - 1)` and
/// `f_i(x_i + 1) - f_i(x_i)`. Every difference is at most [`FirstSteps::limit`] in absolute
/// value, so every bound, every partial sum of one and every change of one fits in `i64`; a
/// point beyond that leaves the scan without bounds (it then runs every line search).
#[cfg_attr(test, derive(Clone))]
pub(crate) struct FirstSteps {
    differences: Vec<[i64; 2]>,
    /// Per move the bound of its step with `+`.
    plus: Vec<i64>,
    /// Per move the bound of its step with `-`.
    minus: Vec<i64>,
    /// The largest absolute difference kept.
    limit: i64,
}

impl FirstSteps {
    /// The differences of `f` at `x` and the bounds of every move of `moves`; `None` when a
    /// difference exceeds the limit.
    pub(crate) fn at<F: Separable + ?Sized>(f: &F, x: &[i64], moves: &MoveSet) -> Option<Self> {
        let limit = i64::MAX / 4 / moves.max_norm().max(1);
        let differences = x
            .iter()
            .enumerate()
            .map(|(i, &xi)| of_term(f, i, xi, limit))
            .collect::<Option<Vec<_>>>()?;
        let mut steps = FirstSteps {
            differences,
            plus: vec![0; moves.len()],
            minus: vec![0; moves.len()],
            limit,
        };
        steps.refresh(moves);
        Some(steps)
    }

    /// The differences and bounds after a step changed `x` (now `x`) on the variables
    /// `changed` only; `None` when a difference exceeds the limit.
    pub(crate) fn moved<F: Separable + ?Sized>(
        mut self,
        f: &F,
        x: &[i64],
        changed: impl Iterator<Item = usize>,
        moves: &MoveSet,
    ) -> Option<Self> {
        let mut stale = false;
        for i in changed {
            let [left, right] = of_term(f, i, x[i], self.limit)?;
            let [old_left, old_right] = std::mem::replace(&mut self.differences[i], [left, right]);
            let (left, right) = (left - old_left, right - old_right);
            if left == 0 && right == 0 {
                continue;
            }
            stale |= !self.add_column(moves, i, left, right);
        }
        if stale {
            self.refresh(moves);
        }
        Some(self)
    }

    /// Adds to every bound the contribution of variable `i` with left and right differences
    /// `left` and `right` (or their changes), one vectorised pass over its column; `false`
    /// when the set has no narrow column-major copy.
    fn add_column(&mut self, moves: &MoveSet, i: usize, left: i64, right: i64) -> bool {
        let Some(column) = moves.column(i) else {
            return false;
        };
        add_column_to(&mut self.plus, &mut self.minus, column, left, right);
        true
    }

    /// Recomputes every bound: once per phase, and after a step of a set without a narrow
    /// column-major copy. A set with that copy whose moves are dense (at least a quarter of
    /// their entries nonzero) is read column by column with vector passes; otherwise each move's
    /// nonzero entries are read, which skips the zeros. Both give the same bounds.
    fn refresh(&mut self, moves: &MoveSet) {
        let dense = 4 * moves.nonzeros() >= moves.width() * moves.len();
        if !(dense && self.refresh_by_columns(moves)) {
            self.refresh_by_rows(moves);
        }
    }

    /// [`FirstSteps::refresh`] by one column pass per variable with a difference; `false`
    /// (nothing done) when the set has no narrow column-major copy.
    fn refresh_by_columns(&mut self, moves: &MoveSet) -> bool {
        if moves.column(0).is_none() {
            return false;
        }
        self.plus.fill(0);
        self.minus.fill(0);
        for (i, &[left, right]) in self.differences.iter().enumerate() {
            // A variable no move changes, or without differences, adds nothing.
            if (left, right) == (0, 0) || moves.extent(i) == 0 {
                continue;
            }
            if let Some(column) = moves.column(i) {
                add_column_to(&mut self.plus, &mut self.minus, column, left, right);
            }
        }
        true
    }

    /// [`FirstSteps::refresh`] from every move's packed nonzero entries.
    fn refresh_by_rows(&mut self, moves: &MoveSet) {
        // Per packed slot `2 i + [v < 0]` (see `support.rs`) the rates of `+` and of `-` per
        // unit of `|v|`: a positive entry raises `x_i` with `+` (right difference) and lowers
        // it with `-` (minus the left one), a negative entry the other way round.
        let slots: Vec<[i64; 2]> = (self.differences.iter())
            .flat_map(|&[left, right]| [[right, -left], [-left, right]])
            .collect();
        let bounds = self.plus.iter_mut().zip(self.minus.iter_mut());
        for (index, (plus, minus)) in bounds.enumerate() {
            // The slots of `+`; `|v|` is at most the largest norm, so it fits in `i64`.
            let signed = (index, Orientation::Plus);
            [*plus, *minus] = moves.fold_steps(signed, [0i64; 2], |[p, m], slot, size| {
                let [rate_plus, rate_minus] = slots[slot];
                [p + size as i64 * rate_plus, m + size as i64 * rate_minus]
            });
        }
    }

    /// The lower bound of the change of one step along move `index` with `sign`.
    #[inline]
    fn bound(&self, index: usize, sign: Orientation) -> i64 {
        match sign {
            Orientation::Plus => self.plus[index],
            Orientation::Minus => self.minus[index],
        }
    }

    /// Bit `j` set when move `start + j` (`j < len <= 64`) has a sign whose first step may
    /// improve (a negative bound) and, given the set's packed masks and the point's packed
    /// bounds ([`Filter::packed_bounds`]), is not blocked by a bound.
    fn falling(&self, start: usize, len: usize, blocked: Option<(&[u64], u64)>) -> u64 {
        let plus = &self.plus[start..start + len];
        let minus = &self.minus[start..start + len];
        // One flag per move without branches, gathered into bits at the end.
        let mut flags = [0u8; 64];
        match blocked {
            Some((packed, bounds)) => {
                falling_free(
                    &mut flags,
                    (plus, minus),
                    &packed[start..start + len],
                    bounds,
                );
            }
            None => {
                for (flag, (&p, &m)) in flags.iter_mut().zip(plus.iter().zip(minus)) {
                    *flag = u8::from((p | m) < 0);
                }
            }
        }
        gather_bits(&flags)
    }
}

// The per-move loops of the first-step bounds are compiled for the wider vector units too and
// picked at run time (the baseline x86-64 build has 128-bit units without 64-bit compares or
// multiplications).

/// Adds to the bounds of `+` and `-` of every move the contribution of one variable whose
/// entries over the moves are `column`, with left and right differences `left` and `right`:
/// a positive entry raises the variable with `+` (right difference) and lowers it with `-`.
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl+avx512dq", "x86_64+avx2"))]
fn add_column_to(plus: &mut [i64], minus: &mut [i64], column: &[i8], left: i64, right: i64) {
    for ((plus, minus), &g) in plus.iter_mut().zip(minus.iter_mut()).zip(column) {
        let g = i64::from(g);
        let (rising, falling) = if g > 0 { (right, left) } else { (left, right) };
        *plus += g * rising;
        *minus -= g * falling;
    }
}

/// Flag `j` set when move `j` has a sign with a negative bound that `bounds` does not block,
/// given its packed masks (`+` in the low half, `-` in the high half).
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn falling_free(
    flags: &mut [u8; 64],
    (plus, minus): (&[i64], &[i64]),
    packed: &[u64],
    bounds: u64,
) {
    let moves = plus.iter().zip(minus).zip(packed);
    for (flag, ((&p, &m), &word)) in flags.iter_mut().zip(moves) {
        // Swapping the halves of a packed word negates the move.
        let free_plus = word & bounds == 0;
        let free_minus = word.rotate_left(32) & bounds == 0;
        *flag = u8::from((p < 0) & free_plus) | u8::from((m < 0) & free_minus);
    }
}

/// The left and right differences of term `i` at `xi`; `None` beyond `limit` in absolute
/// value. A piecewise-linear term's kinks are integers, so no kink lies strictly inside
/// `[xi - 1, xi]` or `[xi, xi + 1]`: its differences are the slopes of the pieces holding
/// them, read without evaluating the term.
fn of_term<F: Separable + ?Sized>(f: &F, i: usize, xi: i64, limit: i64) -> Option<[i64; 2]> {
    let (below, above) = (xi.checked_sub(1)?, xi.checked_add(1)?);
    let (left, right) = match f.pieces(i) {
        Some(Pieces { kinks, slopes }) => (
            i128::from(slopes[kinks.partition_point(|&k| k < xi)]),
            i128::from(slopes[kinks.partition_point(|&k| k <= xi)]),
        ),
        None => {
            let here = f.term(i, xi).ok()?;
            let left = here.checked_sub(f.term(i, below).ok()?)?;
            (left, f.term(i, above).ok()?.checked_sub(here)?)
        }
    };
    let fits = |d: i128| i64::try_from(d).ok().filter(|d| d.abs() <= limit);
    Some([fits(left)?, fits(right)?])
}

impl<F: Separable + ?Sized> Evaluate for SeparableScan<'_, F> {
    fn moves(&self) -> &MoveSet {
        self.moves
    }

    fn rule(&self) -> Rule {
        self.rule
    }

    /// The moves with a sign whose first step may improve and, with at most 32 variables, that
    /// no bound blocks (every move without bounds; [`Evaluate::evaluate`] tests each sign).
    fn candidates(&self, start: usize, len: usize) -> u64 {
        let Some(steps) = self.first_steps else {
            return u64::MAX >> (64 - len);
        };
        let blocked =
            (self.moves.packed_masks()).map(|packed| (packed, self.filter.packed_bounds()));
        steps.falling(start, len, blocked)
    }

    /// The rule's choice among the two signs of move `index`; under Graver-best a sign that
    /// cannot gain more than `floor`, or than the sign before it, is passed over.
    fn evaluate(&self, index: usize, floor: Option<i128>) -> Result<Option<Candidate>> {
        choose_sign(self.rule, self.moves, |sign, best| {
            let floor = match best.map(|b| b.step) {
                None => floor,
                Some(Step::Finite { gain, .. }) if self.rule == Rule::GraverBest => {
                    Some(floor.map_or(gain, |f| f.max(gain)))
                }
                Some(_) => None,
            };
            self.evaluate_sign(index, sign, floor)
        })
    }

    fn ceiling(&self) -> Option<i128> {
        None
    }
}

impl<F: Separable + ?Sized> SeparableScan<'_, F> {
    /// The best step along move `index` in direction `sign`, if it improves and, given a
    /// `floor`, may gain more than it.
    fn evaluate_sign(
        &self,
        index: usize,
        sign: Orientation,
        floor: Option<i128>,
    ) -> Result<Option<Candidate>> {
        let bound = self.first_steps.map(|steps| steps.bound(index, sign));
        if bound.is_some_and(|b| b >= 0) || !self.filter.admits(self.moves, index, sign) {
            return Ok(None);
        }
        // `room` steps gain at most `room * -bound` (the module documentation).
        let (rate, floor) = match bound {
            Some(bound) => (
                u128::from(bound.unsigned_abs()),
                floor.map(i128::unsigned_abs),
            ),
            None => (0, None),
        };
        let Some(room) = self.gaps.room(self.moves, (index, sign), rate, floor) else {
            return Ok(None);
        };
        let room = (room != UNBOUNDED).then(|| i64::try_from(room).unwrap_or(i64::MAX));
        let dir = Direction::of(self.moves, index, sign);
        Ok(match self.search.best(&dir, room, None)? {
            Step::Useless => None,
            step => Some(Candidate { index, sign, step }),
        })
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::moves::Coverage;
    use crate::objective::strategies::piecewise;
    use crate::objective::{Objective, Term};
    use crate::problem::Problem;

    /// A convex term: a quadratic `a x^2 + c x` with `a >= 0`, or a piecewise-linear one
    /// with nondecreasing slopes.
    fn term() -> impl Strategy<Value = Term> {
        prop_oneof![
            (0i64..=3, -6i64..=6).prop_map(|(a, c)| Term::Quadratic { a, c }),
            piecewise(-3..=3, (3, 4), 3),
        ]
    }

    /// `f(x + t * sign * g) - f(x)`.
    fn change(f: &Objective, x: &[i64], g: &[i64], t: i64) -> i128 {
        let y: Vec<i64> = x.iter().zip(g).map(|(a, b)| a + b * t).collect();
        f.value(&y).unwrap() - f.value(x).unwrap()
    }

    proptest! {
        /// A term's differences are its one-unit changes, evaluated (by definition): read
        /// from the slopes of a piecewise-linear term, or evaluated for the others.
        #[test]
        fn differences_are_the_unit_changes(term in term(), x in -8i64..=8) {
            let f = Objective::separable(vec![term]).expect("convex by construction");
            let value = |v: i64| f.term(0, v).unwrap();
            let expected = [value(x) - value(x - 1), value(x + 1) - value(x)];
            let found = of_term(&f, 0, x, i64::MAX).expect("small values fit");
            prop_assert_eq!(found.map(i128::from), expected);
        }

        /// The bound is sound for every step length (`t` steps change the objective by at
        /// least `t` times the bound: the pass-over test and the cap on the gain, checked by
        /// evaluating the objective) and exact for moves of entries `±1`, where it is the
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
            let steps = FirstSteps::at(&f, &x, &moves).expect("small values fit");
            for sign in Orientation::BOTH {
                let bound = i128::from(steps.bound(0, sign));
                for t in 1..=3 {
                    prop_assert!(change(&f, &x, &g, t * sign.factor()) >= i128::from(t) * bound);
                }
                if g.iter().all(|v| v.abs() <= 1) {
                    prop_assert_eq!(bound, change(&f, &x, &g, sign.factor()));
                }
                let falling = steps.falling(0, 1, None) == 1;
                prop_assert_eq!(falling, steps.plus[0] < 0 || steps.minus[0] < 0);
            }
        }

        /// The two ways of computing every bound, column by column and move by move, agree.
        #[test]
        fn refreshes_by_columns_and_by_rows_agree(
            terms in prop::collection::vec(term(), 4),
            x in prop::collection::vec(-6i64..=6, 4),
            rows in prop::collection::vec(prop::collection::vec(-3i64..=3, 4), 1..9),
        ) {
            let rows: Vec<_> = rows.into_iter().filter(|r| r.iter().any(|&v| v != 0)).collect();
            prop_assume!(!rows.is_empty());
            let f = Objective::separable(terms).expect("convex by construction");
            let moves = MoveSet::from_rows(4, &rows, Coverage::Complete).unwrap();
            let steps = FirstSteps::at(&f, &x, &moves).expect("small values fit");
            let (mut by_rows, mut by_columns) = (steps.clone(), steps);
            by_rows.refresh_by_rows(&moves);
            prop_assert!(by_columns.refresh_by_columns(&moves));
            prop_assert_eq!(&by_rows.plus, &by_columns.plus);
            prop_assert_eq!(&by_rows.minus, &by_columns.minus);
        }

        /// The bounds kept along a walk of steps equal the bounds computed afresh at its end,
        /// for a set with a narrow column-major copy (column updates) and for one without (an
        /// entry of 200 leaves it out: recomputed from the supports).
        #[test]
        fn kept_bounds_equal_fresh_ones(
            terms in prop::collection::vec(term(), 4),
            x in prop::collection::vec(-6i64..=6, 4),
            rows in prop::collection::vec(prop::collection::vec(-3i64..=3, 4), 1..6),
            walk in prop::collection::vec((0usize..6, -2i64..=2), 0..6),
            wide in any::<bool>(),
        ) {
            let mut rows: Vec<_> = rows.into_iter().filter(|r| r.iter().any(|&v| v != 0)).collect();
            if wide {
                rows.push(vec![200, -200, 0, 0]);
            }
            prop_assume!(!rows.is_empty());
            let f = Objective::separable(terms).expect("convex by construction");
            let moves = MoveSet::from_rows(4, &rows, Coverage::Complete).unwrap();
            prop_assert_eq!(moves.column(0).is_some(), !wide);
            let mut x = x;
            let mut steps = FirstSteps::at(&f, &x, &moves).expect("small values fit");
            for (index, t) in walk {
                let index = index % moves.len();
                for (i, v) in moves.support(index).iter() {
                    x[i] += v * t;
                }
                let changed = moves.support(index).iter().map(|e| e.0);
                steps = steps.moved(&f, &x, changed, &moves).expect("small values fit");
            }
            let fresh = FirstSteps::at(&f, &x, &moves).expect("small values fit");
            prop_assert_eq!(&steps.differences, &fresh.differences);
            prop_assert_eq!(&steps.plus, &fresh.plus);
            prop_assert_eq!(&steps.minus, &fresh.minus);
        }
    }

    proptest! {
        /// The packed pass keeps exactly the moves with a sign whose bound is negative and
        /// that [`Filter::admits`] (one move at a time, from the set's sign patterns).
        #[test]
        fn falling_moves_are_the_unblocked_ones_with_a_negative_bound(
            terms in prop::collection::vec(term(), 4),
            x in prop::collection::vec(-2i64..=2, 4),
            rows in prop::collection::vec(prop::collection::vec(-2i64..=2, 4), 1..70),
        ) {
            let rows: Vec<_> = rows.into_iter().filter(|r| r.iter().any(|&v| v != 0)).collect();
            prop_assume!(!rows.is_empty());
            let f = Objective::separable(terms).expect("convex by construction");
            let moves = MoveSet::from_rows(4, &rows, Coverage::Complete).unwrap();
            let box_of = |v: i64| (v.abs() == 2).then_some(v);
            let lower = x.iter().map(|&v| box_of(v).filter(|&b| b < 0)).collect();
            let upper = x.iter().map(|&v| box_of(v).filter(|&b| b > 0)).collect();
            let problem = Problem::new(Objective::linear(vec![0; 4]), lower, upper).unwrap();
            let filter = Filter::blocking(&problem, &x, moves.words());
            let steps = FirstSteps::at(&f, &x, &moves).expect("small values fit");
            let packed = (moves.packed_masks().unwrap(), filter.packed_bounds());
            for start in (0..moves.len()).step_by(64) {
                let len = (moves.len() - start).min(64);
                let mask = steps.falling(start, len, Some(packed));
                for j in 0..len {
                    let index = start + j;
                    let expected = Orientation::BOTH.iter().any(|&sign| {
                        steps.bound(index, sign) < 0 && filter.admits(&moves, index, sign)
                    });
                    prop_assert_eq!(mask >> j & 1 == 1, expected, "move {}", index);
                }
            }
        }
    }

    /// A difference beyond the limit leaves the scan without bounds: `x^2` at `2^31` has
    /// differences near `2^32`, over `2^63 / 4 / 2^31` for a move of norm `2^31`.
    #[test]
    fn differences_beyond_the_limit_give_no_bounds() {
        let f = Objective::separable(vec![Term::Quadratic { a: 1, c: 0 }; 2]).unwrap();
        let moves = MoveSet::from_rows(2, &[vec![1 << 30, -(1 << 30)]], Coverage::Complete);
        let moves = moves.unwrap();
        assert!(FirstSteps::at(&f, &[1 << 31, 0], &moves).is_none());
        assert!(FirstSteps::at(&f, &[1 << 10, 0], &moves).is_some());
    }
}
