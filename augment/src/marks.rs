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

use crate::moves::{MoveSet, Orientation};
use crate::problem::Problem;
use crate::slopes::improving_mask;

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
    pub(crate) fn admits(&self, moves: &MoveSet, index: usize, sign: Orientation) -> bool {
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
    /// Phase II with at most 32 variables: the coordinates a move must not raise in the low
    /// half of one word and those it must not lower in the high half, the layout of
    /// [`MoveSet::packed_masks`]; a packed signed move is blocked when it meets this word.
    pub(crate) fn packed_bounds(&self) -> u64 {
        self.raising[0] | self.lowering[0] << 32
    }

    /// Phase I: bit `j` set when move `start + j` (`j < len <= 64`) has a sign that passes
    /// [`Filter::admits`], that is when its support meets a coordinate outside the box.
    pub(crate) fn repairing_candidates(&self, moves: &MoveSet, start: usize, len: usize) -> u64 {
        let words = moves.words();
        let range = words * start..words * (start + len);
        let (positive, negative) = moves.masks();
        let (positive, negative) = (&positive[range.clone()], &negative[range]);
        let mut mask = 0;
        for (j, (pos, neg)) in positive
            .chunks_exact(words)
            .zip(negative.chunks_exact(words))
            .enumerate()
        {
            let meets = pos
                .iter()
                .zip(neg)
                .zip(self.raising.iter().zip(&self.lowering))
                .any(|((p, n), (r, l))| (p | n) & (r | l) != 0);
            mask |= u64::from(meets) << j;
        }
        mask
    }

    /// Phase II: bit `j` set when move `start + j` (`j < len <= 64`) applied with its
    /// improving sign passes [`Filter::admits`], the sign given by the rate's sign in `signs`
    /// (a move of rate 0 gets full masks, see [`improving_mask`]): a branch-free test of every
    /// move, the hot loop of phase II, reading the set's masks of the sign picked.
    pub(crate) fn free_entries(
        &self,
        moves: &MoveSet,
        signs: &[i8],
        start: usize,
        len: usize,
    ) -> u64 {
        let mut free = [0u8; 64];
        let signs = &signs[start..start + len];
        if let Some(packed) = moves.packed_masks() {
            packed_free(
                &mut free,
                &packed[start..start + len],
                signs,
                self.packed_bounds(),
            );
            return gather_bits(&free);
        }
        let words = moves.words();
        let range = words * start..words * (start + len);
        let (positive, negative) = moves.masks();
        let masks = (&positive[range.clone()], &negative[range]);
        if let (&[raise], &[lower]) = (&self.raising[..], &self.lowering[..]) {
            split_free(&mut free, masks, signs, (raise, lower));
            return gather_bits(&free);
        }
        wide_free(&mut free, masks, signs, (&self.raising, &self.lowering));
        gather_bits(&free)
    }
}

// The three loops of `Filter::free_entries`, one per layout of the masks, are the hot loops
// of phase II: each is compiled for the wider vector units too and picked at run time (the
// baseline x86-64 build has 128-bit units without 64-bit compares). On the 3x3x4 tables'
// variants a build for this machine's own units was 1.5x faster on the whole batch.

/// Flag `j` set when packed move `j` (its `+` mask in the low half, `-` in the high half)
/// with its improving sign `signs[j]` meets none of `bounds`.
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn packed_free(free: &mut [u8; 64], packed: &[u64], signs: &[i8], bounds: u64) {
    for ((flag, &p), &sign) in free.iter_mut().zip(packed).zip(signs) {
        // Swapping the halves of a packed word negates the move.
        let entry = improving_mask(sign, p, p.rotate_left(32));
        *flag = u8::from(entry & bounds == 0);
    }
}

/// Flag `j` set when move `j` of one-word masks `(positive, negative)` with its improving
/// sign raises no coordinate of `raise` and lowers none of `lower`.
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn split_free(
    free: &mut [u8; 64],
    (positive, negative): (&[u64], &[u64]),
    signs: &[i8],
    (raise, lower): (u64, u64),
) {
    let masks = positive.iter().zip(negative).zip(signs);
    for (flag, ((&p, &n), &sign)) in free.iter_mut().zip(masks) {
        let (r, l) = (improving_mask(sign, p, n), improving_mask(sign, n, p));
        *flag = u8::from((r & raise) | (l & lower) == 0);
    }
}

/// [`split_free`] for masks of several words per move (`raise.len()` of them).
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn wide_free(
    free: &mut [u8; 64],
    (positive, negative): (&[u64], &[u64]),
    signs: &[i8],
    (raise, lower): (&[u64], &[u64]),
) {
    let words = raise.len();
    let masks = positive
        .chunks_exact(words)
        .zip(negative.chunks_exact(words));
    for (flag, ((p, n), &sign)) in free.iter_mut().zip(masks.zip(signs)) {
        let clear =
            (p.iter().zip(n))
                .zip(raise.iter().zip(lower))
                .all(|((&p, &n), (&raise, &lower))| {
                    let (r, l) = (improving_mask(sign, p, n), improving_mask(sign, n, p));
                    (r & raise) | (l & lower) == 0
                });
        *flag = u8::from(clear);
    }
}

/// The 64 flags (each 0 or 1) as the bits of one word, flag `j` in bit `j`. Each group of 8
/// flags is one multiplication: flag `k` of the group times bit `7 (8 - k)` of the constant
/// lands in bit `56 + k`, and no two products share a bit, so nothing carries.
pub(crate) fn gather_bits(flags: &[u8; 64]) -> u64 {
    let mut mask = 0;
    for (k, group) in flags.chunks_exact(8).enumerate() {
        let bytes = u64::from_le_bytes(group.try_into().expect("groups of 8"));
        mask |= (bytes.wrapping_mul(0x0102_0408_1020_4080) >> 56) << (8 * k);
    }
    mask
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
        assert!(
            !filter.admits(&moves, 0, Orientation::Plus),
            "lowers x_1 = 0"
        );
        assert!(filter.admits(&moves, 0, Orientation::Minus));
        let filter = Filter::blocking(&p, &[5, 3, 3], moves.words());
        assert!(
            !filter.admits(&moves, 0, Orientation::Plus),
            "raises x_0 = 5"
        );
    }

    #[test]
    fn phase_one_keeps_only_moves_that_repair_a_violated_coordinate() {
        let moves =
            MoveSet::from_rows(3, &[vec![1, -1, 0], vec![0, 1, 1]], Coverage::Complete).unwrap();
        let p = problem(vec![Some(0); 3], vec![Some(5); 3]);
        let filter = Filter::repairing(&p, &[-1, 2, 2], moves.words());
        assert!(
            filter.admits(&moves, 0, Orientation::Plus),
            "raises x_0 = -1"
        );
        assert!(!filter.admits(&moves, 0, Orientation::Minus));
        assert!(
            !filter.admits(&moves, 1, Orientation::Plus)
                && !filter.admits(&moves, 1, Orientation::Minus)
        );
    }

    #[test]
    fn the_mask_passes_agree_with_admits_move_by_move() {
        // Every move over {-1, 0, 1}^3 but 0, at every point of the box [0, 2]^3, in every
        // layout of the masks (packed for 3 variables, one split word for 40, two for 67; the
        // extra variables left at 0 and free).
        for width in [3, 40, 67] {
            let rows: Vec<Vec<i64>> = (1..27)
                .map(|code: i64| {
                    let mut row = vec![0; width];
                    for (i, entry) in row.iter_mut().take(3).enumerate() {
                        *entry = code / 3i64.pow(i as u32) % 3 - 1;
                    }
                    row
                })
                .filter(|r| r.iter().any(|&v| v != 0))
                .collect();
            let moves = MoveSet::from_rows(width, &rows, Coverage::Complete).unwrap();
            let mut bounds = (vec![None; width], vec![None; width]);
            for i in 0..3 {
                (bounds.0[i], bounds.1[i]) = (Some(0), Some(2));
            }
            let p = problem(bounds.0, bounds.1);
            for code in 0..125 {
                let mut x = vec![0i64; width];
                for (i, v) in x.iter_mut().take(3).enumerate() {
                    *v = code / 5i64.pow(i as u32) % 5 - 1;
                }
                let repair = Filter::repairing(&p, &x, moves.words());
                let kept = repair.repairing_candidates(&moves, 0, moves.len());
                if x.iter().all(|&v| (0..=2).contains(&v)) {
                    let block = Filter::blocking(&p, &x, moves.words());
                    // Every move with the rate's sign -1 (the masks of `+`), 1 (those of
                    // `-`) or 0 (full masks: free only at a point on no bound).
                    let on_no_bound = x.iter().take(3).all(|&v| v == 1);
                    for (sign, orientation) in [
                        (-1, Some(Orientation::Plus)),
                        (1, Some(Orientation::Minus)),
                        (0, None),
                    ] {
                        let signs = vec![sign; moves.len()];
                        let free = block.free_entries(&moves, &signs, 0, moves.len());
                        for index in 0..moves.len() {
                            let admitted =
                                orientation.map_or(on_no_bound, |o| block.admits(&moves, index, o));
                            assert_eq!(
                                free >> index & 1 == 1,
                                admitted,
                                "{x:?} move {index} sign {sign}"
                            );
                        }
                    }
                }
                for index in 0..moves.len() {
                    let admitted = Orientation::BOTH
                        .iter()
                        .any(|&s| repair.admits(&moves, index, s));
                    assert_eq!(kept >> index & 1 == 1, admitted, "{x:?} move {index}");
                }
            }
        }
    }

    #[test]
    fn flags_gather_into_their_bits() {
        let mut flags = [0u8; 64];
        for j in [0, 1, 7, 8, 30, 56, 62, 63] {
            flags[j] = 1;
        }
        let expected = [0, 1, 7, 8, 30, 56, 62, 63]
            .iter()
            .fold(0u64, |m, j| m | 1 << j);
        assert_eq!(gather_bits(&flags), expected);
        assert_eq!(gather_bits(&[1; 64]), u64::MAX);
        assert_eq!(gather_bits(&[0; 64]), 0);
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
        assert!(!filter.admits(&moves, 0, Orientation::Plus));
        assert!(filter.admits(&moves, 0, Orientation::Minus));
    }
}
