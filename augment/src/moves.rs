//! Move sets: the nonzero entries of every move, in the narrowest form that holds them.
//!
//! A [`MoveSet`] holds one vector of each `±` pair; the solver tries both signs. Each move is
//! stored once, by its support (variables and values, so that evaluating a move touches only
//! its nonzeros): one 32-bit word per entry when every value is at most 255 in size (the usual
//! case: Graver elements of Δ-modular matrices have entries of at most Δ), else a variable and
//! a value apart. Dense rows are written out on request ([`MoveSet::row`]). Beside the moves,
//! the set keeps each sign pattern as two bit masks (coordinates the move raises and lowers),
//! so a scan can discard a move blocked by a bound with a few word operations, and, when every
//! entry fits in an `i8`, a column-major copy that lets the rates `c.g` of all moves be
//! computed in one vectorisable pass per cost vector. The set also records its [`Coverage`],
//! which decides how honest "optimal" is.

use std::ops::ControlFlow;

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::error::{AugmentError, Result};
use crate::support::{Entries, Packing, Steps, Support};

/// What the caller knows about the completeness of its move set (serialised as the reports
/// show it: `{"tag": "norm_truncated", "norm": 6}`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(tag = "tag", rename_all = "snake_case")]
pub enum Coverage {
    /// The full Graver basis (or a superset of it within the lattice): a test set for every
    /// right-hand side, bound and separable convex objective.
    Complete,
    /// Every Graver element `g` with `|g_i| <= u_i - l_i` for the problem's box is present: a
    /// test set for feasible points inside that box. Not enough to prove a box empty.
    BoxValid,
    /// Every Graver element of l1 norm at most `N` is present: a point without an improving
    /// move is only optimal among moves up to that norm.
    NormTruncated {
        /// The ℓ1 norm limit.
        norm: u64,
    },
}

/// Which way a stored move is applied: as stored (`Plus`, tried first) or negated (`Minus`).
/// (A variable's sign restriction is `cache::Sign`, a different thing.)
#[derive(
    Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize, JsonSchema,
)]
pub enum Orientation {
    /// The move as stored.
    Plus,
    /// The negated move.
    Minus,
}

impl Orientation {
    /// Both signs in tie-breaking order.
    pub const BOTH: [Orientation; 2] = [Orientation::Plus, Orientation::Minus];

    /// `+1` or `-1`.
    pub const fn factor(self) -> i64 {
        match self {
            Orientation::Plus => 1,
            Orientation::Minus => -1,
        }
    }
}

/// A validated set of nonzero integer moves of a common width, with its coverage.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MoveSet {
    width: usize,
    /// Where each move's entries start in `entries` (one more than the number of moves).
    starts: Vec<usize>,
    /// The nonzero entries of every move, move after move: the one copy of the moves.
    entries: Entries,
    norms: Vec<i64>,
    /// Per move `words` masks of its positive entries.
    positive: Vec<u64>,
    /// Per move `words` masks of its negative entries.
    negative: Vec<u64>,
    /// With at most 32 variables, per move one word: the positive entries in the low half,
    /// the negative ones in the high half; otherwise empty.
    packed: Vec<u64>,
    words: usize,
    /// Column-major copy (`count` entries per variable) when every entry fits in an `i8`,
    /// otherwise empty.
    columns: Vec<i8>,
    /// Per variable the largest `|g_i|` over all moves.
    extents: Vec<u64>,
    max_norm: i64,
    coverage: Coverage,
}

impl MoveSet {
    /// Builds a set from row-major data (`width` entries per move), keeping only the nonzero
    /// entries (the rows are not kept).
    ///
    /// Rejects ragged data and zero moves; the l1 norm of every move must fit in `i64`. The
    /// entries may come in any integer type that widens to `i64` (a stored set of small
    /// entries is read as it is kept, one byte per entry).
    pub fn new<T: Copy + Into<i64> + Sync>(
        width: usize,
        dense: &[T],
        coverage: Coverage,
    ) -> Result<Self> {
        let count = dense.len().checked_div(width).unwrap_or(0);
        if count * width != dense.len() {
            return Err(AugmentError::RaggedMoves {
                len: dense.len(),
                width,
            });
        }
        if width == 0 {
            return Ok(MoveSet::empty(0, coverage));
        }
        let packing = Packing::of(dense, width)?;
        let words = width.div_ceil(64);
        let packed = if width <= 32 {
            let masks = packing.positive.iter().zip(&packing.negative);
            masks.map(|(&p, &n)| p | n << 32).collect()
        } else {
            Vec::new()
        };
        Ok(MoveSet {
            width,
            max_norm: packing.norms.iter().copied().max().unwrap_or(0),
            starts: packing.starts,
            entries: packing.entries,
            norms: packing.norms,
            positive: packing.positive,
            negative: packing.negative,
            packed,
            words,
            columns: packing.columns,
            extents: packing.extents,
            coverage,
        })
    }

    /// A set without moves of `width` variables.
    pub fn empty(width: usize, coverage: Coverage) -> Self {
        MoveSet {
            width,
            starts: vec![0],
            entries: Entries::Short(Vec::new()),
            norms: Vec::new(),
            positive: Vec::new(),
            negative: Vec::new(),
            packed: Vec::new(),
            words: width.div_ceil(64),
            columns: Vec::new(),
            extents: vec![0; width],
            max_norm: 0,
            coverage,
        }
    }

    /// Builds a set from one vector per move; every vector must have length `width`.
    pub fn from_rows(width: usize, rows: &[Vec<i64>], coverage: Coverage) -> Result<Self> {
        let mut dense = Vec::with_capacity(rows.len() * width);
        for row in rows {
            if row.len() != width {
                return Err(AugmentError::Dimension {
                    what: "move",
                    expected: width,
                    found: row.len(),
                });
            }
            dense.extend_from_slice(row);
        }
        MoveSet::new(width, &dense, coverage)
    }

    /// The moves `keep` (indices into this set, in the order given) as a set of their own.
    pub fn subset(&self, keep: &[usize]) -> Result<Self> {
        let dense: Vec<i64> = keep.iter().flat_map(|&index| self.row(index)).collect();
        MoveSet::new(self.width, &dense, self.coverage)
    }

    /// Number of variables per move.
    pub fn width(&self) -> usize {
        self.width
    }

    /// Number of stored moves (one per `±` pair).
    pub fn len(&self) -> usize {
        self.norms.len()
    }

    /// True when the set holds no move.
    pub fn is_empty(&self) -> bool {
        self.norms.is_empty()
    }

    /// What the caller declared about the completeness of the set.
    pub fn coverage(&self) -> Coverage {
        self.coverage
    }

    /// Move `index` as a dense vector (written out from its support).
    pub fn row(&self, index: usize) -> Vec<i64> {
        let mut row = vec![0; self.width];
        for (i, v) in self.support(index).iter() {
            row[i] = v;
        }
        row
    }

    /// Every move as a dense vector, in order.
    pub fn rows(&self) -> impl ExactSizeIterator<Item = Vec<i64>> + '_ {
        (0..self.len()).map(|index| self.row(index))
    }

    /// The nonzero entries of move `index`, in increasing variable order.
    #[inline]
    pub fn support(&self, index: usize) -> Support<'_> {
        self.entries
            .support(self.starts[index]..self.starts[index + 1])
    }

    /// Number of 64-bit words in one sign mask.
    pub(crate) fn words(&self) -> usize {
        self.words
    }

    /// Every move's masks of its positive entries (`words` per move), then of its negative
    /// entries.
    pub(crate) fn masks(&self) -> (&[u64], &[u64]) {
        (&self.positive, &self.negative)
    }

    /// With at most 32 variables, per move its positive entries in the low half of one word
    /// and its negative entries in the high half (swapping the halves negates the move).
    pub(crate) fn packed_masks(&self) -> Option<&[u64]> {
        (self.width <= 32).then_some(&self.packed[..])
    }

    /// Bit masks of the coordinates that move `index` raises and lowers when applied with
    /// `sign` (bit `i % 64` of word `i / 64` stands for coordinate `i`).
    pub(crate) fn pattern(&self, index: usize, sign: Orientation) -> (&[u64], &[u64]) {
        let range = index * self.words..(index + 1) * self.words;
        let (pos, neg) = (&self.positive[range.clone()], &self.negative[range]);
        match sign {
            Orientation::Plus => (pos, neg),
            Orientation::Minus => (neg, pos),
        }
    }

    /// The support of move `index` as it meets the bounds, when the set is packed: per entry
    /// `i` with value `v`, `(2 i + [v < 0]) << 8 | |v|`. Applied with `+`, the entry moves
    /// `x_i` towards its upper bound (slot `2 i`) or its lower bound (slot `2 i + 1`) by `|v|`
    /// per step; with `-` the slot's last bit flips. One 16- or 32-bit word instead of two
    /// 64-bit ones keeps a scan's reads of scattered moves to about one cache line each.
    #[inline]
    pub(crate) fn bound_steps(&self, index: usize) -> Option<Steps<'_>> {
        self.entries
            .steps(self.starts[index]..self.starts[index + 1])
    }

    /// Folds `f` over the entries of move `index` applied with `sign` as `(slot, |v|)`: slot
    /// `2 i` when the entry raises `x_i` (towards its upper bound), `2 i + 1` when it lowers it
    /// (see [`MoveSet::bound_steps`]). One dispatch on the set's form per move; the fold stops
    /// at the first `Break` (`fold_steps` below is the same fold without a stop: a fold that
    /// cannot stop keeps its loops free of the test, which measured 6% on a whole batch).
    #[inline]
    pub(crate) fn try_fold_steps<B, R>(
        &self,
        (index, sign): (usize, Orientation),
        init: B,
        mut f: impl FnMut(B, usize, u64) -> ControlFlow<R, B>,
    ) -> ControlFlow<R, B> {
        let slot = Self::slot_of(sign);
        match self.bound_steps(index) {
            Some(Steps::Short(words)) => words.iter().try_fold(init, |acc, &word| {
                let (slot, step) = slot(word.into());
                f(acc, slot, step)
            }),
            Some(Steps::Packed(words)) => words.iter().try_fold(init, |acc, &word| {
                let (slot, step) = slot(word);
                f(acc, slot, step)
            }),
            None => self.support(index).iter().try_fold(init, |acc, (i, v)| {
                let (slot, step) = Self::wide_slot(sign, i, v);
                f(acc, slot, step)
            }),
        }
    }

    /// [`MoveSet::try_fold_steps`] without an early stop.
    #[inline]
    pub(crate) fn fold_steps<B>(
        &self,
        (index, sign): (usize, Orientation),
        init: B,
        mut f: impl FnMut(B, usize, u64) -> B,
    ) -> B {
        let slot = Self::slot_of(sign);
        match self.bound_steps(index) {
            Some(Steps::Short(words)) => words.iter().fold(init, |acc, &word| {
                let (slot, step) = slot(word.into());
                f(acc, slot, step)
            }),
            Some(Steps::Packed(words)) => words.iter().fold(init, |acc, &word| {
                let (slot, step) = slot(word);
                f(acc, slot, step)
            }),
            None => self.support(index).iter().fold(init, |acc, (i, v)| {
                let (slot, step) = Self::wide_slot(sign, i, v);
                f(acc, slot, step)
            }),
        }
    }

    /// The `(slot, |v|)` of a packed entry applied with `sign`: its slot's last bit flips for
    /// `-`.
    #[inline]
    fn slot_of(sign: Orientation) -> impl Fn(u32) -> (usize, u64) {
        let flip = usize::from(sign == Orientation::Minus);
        move |word| ((word >> 8) as usize ^ flip, u64::from(word & 0xff))
    }

    /// The `(slot, |v|)` of entry `v` of variable `i` applied with `sign`, unpacked: moving up
    /// (`v > 0` with `+`, `v < 0` with `-`) meets the upper bound.
    #[inline]
    fn wide_slot(sign: Orientation, i: usize, v: i64) -> (usize, u64) {
        let down = (v < 0) == (sign == Orientation::Plus);
        (2 * i + usize::from(down), v.unsigned_abs())
    }

    /// Entries of variable `variable` over all moves, in move order, when every entry of the
    /// set fits in an `i8`.
    pub(crate) fn column(&self, variable: usize) -> Option<&[i8]> {
        let count = self.len();
        (!self.columns.is_empty()).then(|| &self.columns[variable * count..(variable + 1) * count])
    }

    /// The largest `|g_i|` over all moves: a box at least this wide on variable `i` lets
    /// every move fit there.
    pub fn extent(&self, variable: usize) -> u64 {
        self.extents[variable]
    }

    /// Number of nonzero entries over all moves.
    pub(crate) fn nonzeros(&self) -> usize {
        self.starts[self.len()]
    }

    /// The largest l1 norm of a move (0 for an empty set).
    pub fn max_norm(&self) -> i64 {
        self.max_norm
    }

    /// The l1 norm of move `index`.
    pub fn norm(&self, index: usize) -> i64 {
        self.norms[index]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The same moves kept packed and (beside a move with an entry over 255) wide.
    #[test]
    fn packed_and_wide_entries_read_back_the_same_moves() {
        let rows = [vec![1, 0, -2, 0], vec![0, -255, 0, 3], vec![-1, 1, 1, -1]];
        let packed = MoveSet::from_rows(4, &rows, Coverage::Complete).unwrap();
        let wider = [&rows[..], &[vec![0, 0, 256, 0]]].concat();
        let wide = MoveSet::from_rows(4, &wider, Coverage::Complete).unwrap();
        assert!(packed.bound_steps(0).is_some() && wide.bound_steps(0).is_none());
        for (index, row) in rows.iter().enumerate() {
            assert_eq!(&packed.row(index), row);
            assert_eq!(&wide.row(index), row);
            let entries: Vec<_> = packed.support(index).iter().collect();
            assert_eq!(entries, wide.support(index).iter().collect::<Vec<_>>());
            assert_eq!(packed.norm(index), row.iter().map(|v| v.abs()).sum::<i64>());
        }
        assert_eq!(packed.support(1).get(0), (1, -255));
        assert_eq!(wide.row(3), [0, 0, 256, 0]);
        // -255 does not fit in an i8: no column-major copy; without it, there is one.
        assert!(packed.column(1).is_none());
        let small = MoveSet::from_rows(4, &[rows[0].clone(), rows[2].clone()], Coverage::Complete);
        assert_eq!(small.unwrap().column(2), Some(&[-2, 1][..]));
    }
}
