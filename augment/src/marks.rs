//! A bit-mask filter that discards most moves of a scan before any arithmetic.
//!
//! At a point `x`, two sets of coordinates decide many moves at once:
//! - in phase II, a signed move that raises a coordinate at its upper bound, or lowers one at
//!   its lower bound, has no feasible step (its room is 0);
//! - in phase I, a signed move can lower the violation only if it raises a coordinate below its
//!   lower bound or lowers one above its upper bound: on every other coordinate the distance to
//!   the box cannot fall, so the first step (and by convexity every step) gains nothing.
//!
//! Both tests compare the move's sign pattern ([`MoveSet::pattern`]) with two masks of the
//! point, one machine word per 64 coordinates. The filter only skips moves the full evaluation
//! would reject, so every scan selects exactly what it selected without it.

use crate::moves::{MoveSet, Sign};
use crate::problem::Problem;

/// Which moves a scan may skip at the current point.
pub(crate) struct Filter {
    /// Coordinates a move must not raise (phase II) or should raise (phase I).
    raising: Vec<u64>,
    /// Coordinates a move must not lower (phase II) or should lower (phase I).
    lowering: Vec<u64>,
    /// Phase II: a move meeting the masks is blocked. Phase I: a move must meet them.
    blocking: bool,
}

impl Filter {
    /// Phase II at a feasible `x`: marks the coordinates sitting on a bound.
    pub(crate) fn blocking(problem: &Problem, x: &[i64], words: usize) -> Self {
        let (raising, lowering) = masks(x.len(), words, |i| {
            (
                problem.upper()[i] == Some(x[i]),
                problem.lower()[i] == Some(x[i]),
            )
        });
        Self {
            raising,
            lowering,
            blocking: true,
        }
    }

    /// Phase I at any `x`: marks the coordinates outside the box, on the side to repair.
    pub(crate) fn repairing(problem: &Problem, x: &[i64], words: usize) -> Self {
        let (raising, lowering) = masks(x.len(), words, |i| {
            (
                problem.lower()[i].is_some_and(|l| x[i] < l),
                problem.upper()[i].is_some_and(|u| x[i] > u),
            )
        });
        Self {
            raising,
            lowering,
            blocking: false,
        }
    }

    /// False when move `index` applied with `sign` certainly does not improve.
    #[inline]
    pub(crate) fn admits(&self, moves: &MoveSet, index: usize, sign: Sign) -> bool {
        let (raised, lowered) = moves.pattern(index, sign);
        if let ([r], [l], [mr], [ml]) = (raised, lowered, &self.raising[..], &self.lowering[..]) {
            return ((r & mr) | (l & ml) != 0) != self.blocking;
        }
        let meets = raised
            .iter()
            .zip(&self.raising)
            .zip(lowered.iter().zip(&self.lowering))
            .any(|((r, mr), (l, ml))| (r & mr) | (l & ml) != 0);
        meets != self.blocking
    }
}

impl Filter {
    /// Appends to `out` the moves of `range` that at least one sign of passes [`Filter::admits`].
    ///
    /// With one mask word (up to 64 variables) this is a branch-free pass over the flat sign
    /// patterns, the hot loop of every scan.
    pub(crate) fn candidates(
        &self,
        moves: &MoveSet,
        range: std::ops::Range<usize>,
        out: &mut Vec<usize>,
    ) {
        let ([raise], [lower]) = (&self.raising[..], &self.lowering[..]) else {
            out.extend(range.filter(|&index| {
                self.admits(moves, index, Sign::Plus) || self.admits(moves, index, Sign::Minus)
            }));
            return;
        };
        let patterns = &moves.patterns()[2 * range.start..2 * range.end];
        let start = out.len();
        out.resize(start + range.len(), 0);
        let mut kept = start;
        for (index, pair) in range.zip(patterns.chunks_exact(2)) {
            let (pos, neg) = (pair[0], pair[1]);
            let plus = (pos & raise) | (neg & lower) != 0;
            let minus = (neg & raise) | (pos & lower) != 0;
            // Blocking: keep unless both signs meet a bound; repairing: keep if either meets.
            let keep = if self.blocking {
                !(plus && minus)
            } else {
                plus || minus
            };
            out[kept] = index;
            kept += usize::from(keep);
        }
        out.truncate(kept);
    }
}

/// Two masks over `n` coordinates from a per-coordinate pair of marks.
fn masks(n: usize, words: usize, mark: impl Fn(usize) -> (bool, bool)) -> (Vec<u64>, Vec<u64>) {
    let (mut raising, mut lowering) = (vec![0u64; words], vec![0u64; words]);
    for i in 0..n {
        let (r, l) = mark(i);
        raising[i / 64] |= u64::from(r) << (i % 64);
        lowering[i / 64] |= u64::from(l) << (i % 64);
    }
    (raising, lowering)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::moves::Coverage;
    use crate::objective::Objective;

    fn problem(lower: Vec<Option<i64>>, upper: Vec<Option<i64>>) -> Problem {
        Problem::new(Objective::linear(vec![0; lower.len()]), lower, upper).unwrap()
    }

    #[test]
    fn a_move_into_a_bound_is_blocked_and_its_negation_is_not() {
        let moves = MoveSet::from_rows(3, &[vec![1, -1, 0]], Coverage::Complete).unwrap();
        let p = problem(vec![Some(0); 3], vec![Some(5); 3]);
        let filter = Filter::blocking(&p, &[2, 0, 5], moves.words());
        assert!(!filter.admits(&moves, 0, Sign::Plus), "lowers x_1 = 0");
        assert!(filter.admits(&moves, 0, Sign::Minus));
        let filter = Filter::blocking(&p, &[5, 3, 3], moves.words());
        assert!(!filter.admits(&moves, 0, Sign::Plus), "raises x_0 = 5");
    }

    #[test]
    fn phase_one_keeps_only_moves_that_repair_a_violated_coordinate() {
        let moves =
            MoveSet::from_rows(3, &[vec![1, -1, 0], vec![0, 1, 1]], Coverage::Complete).unwrap();
        let p = problem(vec![Some(0); 3], vec![Some(5); 3]);
        let filter = Filter::repairing(&p, &[-1, 2, 2], moves.words());
        assert!(filter.admits(&moves, 0, Sign::Plus), "raises x_0 = -1");
        assert!(!filter.admits(&moves, 0, Sign::Minus));
        assert!(!filter.admits(&moves, 1, Sign::Plus) && !filter.admits(&moves, 1, Sign::Minus));
    }

    #[test]
    fn masks_span_several_words() {
        let mut row = vec![0i64; 130];
        row[129] = -1;
        row[3] = 1;
        let moves = MoveSet::from_rows(130, &[row], Coverage::Complete).unwrap();
        let mut x = vec![1i64; 130];
        x[129] = 0;
        let p = problem(vec![Some(0); 130], vec![None; 130]);
        let filter = Filter::blocking(&p, &x, moves.words());
        assert!(!filter.admits(&moves, 0, Sign::Plus));
        assert!(filter.admits(&moves, 0, Sign::Minus));
    }
}
