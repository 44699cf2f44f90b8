//! Move sets: flat row-major storage plus a sparse form for fast evaluation.
//!
//! A [`MoveSet`] holds one vector of each `±` pair; the solver tries both signs. Each move is
//! stored twice: densely (row-major, `width` entries per move, for callers and certificates)
//! and sparsely (support indices and values, so that evaluating a move touches only its
//! nonzeros), and its sign pattern is kept as two bit masks (coordinates the move raises and
//! lowers), so a scan can discard a move blocked by a bound with a few word operations. When
//! every entry fits in an `i8` (the usual case: Graver elements of Δ-modular matrices have
//! entries of at most Δ) a column-major copy lets the rates `c.g` of all moves be computed in
//! one vectorisable pass per cost vector. The set also records its [`Coverage`], which decides
//! how honest "optimal" is.

use serde::{Deserialize, Serialize};

use crate::error::{overflow, AugmentError, Result};

/// What the caller knows about the completeness of its move set (serialised as the reports
/// show it: `{"tag": "norm_truncated", "norm": 6}`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
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
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
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
    dense: Vec<i64>,
    starts: Vec<usize>,
    indices: Vec<usize>,
    values: Vec<i64>,
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
    /// The support in one word per entry (see [`MoveSet::bound_steps`]), parallel to
    /// `indices`, when every entry fits; otherwise empty.
    steps: Vec<u32>,
    max_norm: i64,
    coverage: Coverage,
}

impl MoveSet {
    /// Builds a set from row-major data (`width` entries per move).
    ///
    /// Rejects ragged data and zero moves; the l1 norm of every move must fit in `i64`.
    pub fn new(width: usize, dense: Vec<i64>, coverage: Coverage) -> Result<Self> {
        let count = dense.len().checked_div(width).unwrap_or(0);
        if count * width != dense.len() {
            return Err(AugmentError::RaggedMoves {
                len: dense.len(),
                width,
            });
        }
        let nonzeros = dense.iter().filter(|&&v| v != 0).count();
        let mut set = MoveSet {
            width,
            starts: Vec::with_capacity(count + 1),
            indices: Vec::with_capacity(nonzeros),
            values: Vec::with_capacity(nonzeros),
            norms: Vec::with_capacity(count),
            positive: Vec::with_capacity(count * width.div_ceil(64)),
            negative: Vec::with_capacity(count * width.div_ceil(64)),
            packed: Vec::new(),
            words: width.div_ceil(64),
            columns: Vec::new(),
            extents: vec![0; width],
            steps: Vec::new(),
            max_norm: 0,
            dense,
            coverage,
        };
        set.starts.push(0);
        for index in 0..count {
            set.index_row(index)?;
        }
        if width <= 32 {
            set.packed = set
                .positive
                .iter()
                .zip(&set.negative)
                .map(|(&p, &n)| p | n << 32)
                .collect();
        }
        set.columns = narrow_columns(&set.dense, width, count).unwrap_or_default();
        set.steps = bound_steps(&set.indices, &set.values).unwrap_or_default();
        Ok(set)
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
        MoveSet::new(width, dense, coverage)
    }

    /// Appends the sparse form and the norm of row `index`.
    fn index_row(&mut self, index: usize) -> Result<()> {
        let row = &self.dense[index * self.width..(index + 1) * self.width];
        let mut norm: i64 = 0;
        let at = self.positive.len();
        self.positive.extend(std::iter::repeat_n(0, self.words));
        self.negative.extend(std::iter::repeat_n(0, self.words));
        for (i, &v) in row.iter().enumerate() {
            if v != 0 {
                let masks = if v > 0 {
                    &mut self.positive
                } else {
                    &mut self.negative
                };
                masks[at + i / 64] |= 1 << (i % 64);
                self.extents[i] = self.extents[i].max(v.unsigned_abs());
                self.indices.push(i);
                self.values.push(v);
                norm = norm
                    .checked_add(v.checked_abs().ok_or(overflow("taking a move's l1 norm"))?)
                    .ok_or(overflow("taking a move's l1 norm"))?;
            }
        }
        if norm == 0 {
            return Err(AugmentError::ZeroMove { index });
        }
        self.norms.push(norm);
        self.max_norm = self.max_norm.max(norm);
        self.starts.push(self.indices.len());
        Ok(())
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

    /// Move `index` as a dense vector.
    pub fn row(&self, index: usize) -> &[i64] {
        &self.dense[index * self.width..(index + 1) * self.width]
    }

    /// Support (indices of nonzero entries, increasing) and the matching values of move `index`.
    pub fn support(&self, index: usize) -> (&[usize], &[i64]) {
        let range = self.starts[index]..self.starts[index + 1];
        (&self.indices[range.clone()], &self.values[range])
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

    /// The support of move `index` as it meets the bounds, when the set is small enough: per
    /// entry `i` with value `v`, `(2 i + [v < 0]) << 8 | |v|`. Applied with `+`, the entry moves
    /// `x_i` towards its upper bound (slot `2 i`) or its lower bound (slot `2 i + 1`) by `|v|`
    /// per step; with `-` the slot's last bit flips. One 32-bit word instead of two 64-bit
    /// ones keeps a scan's reads of scattered moves to about one cache line each.
    #[inline]
    pub(crate) fn bound_steps(&self, index: usize) -> Option<&[u32]> {
        (!self.steps.is_empty()).then(|| &self.steps[self.starts[index]..self.starts[index + 1]])
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

    /// The largest l1 norm of a move (0 for an empty set).
    pub fn max_norm(&self) -> i64 {
        self.max_norm
    }

    /// The l1 norm of move `index`.
    pub fn norm(&self, index: usize) -> i64 {
        self.norms[index]
    }
}

/// The column-major copy of row-major `dense` (`count` rows of `width`), or `None` when an entry
/// does not fit in an `i8`.
fn narrow_columns(dense: &[i64], width: usize, count: usize) -> Option<Vec<i8>> {
    let mut columns = vec![0i8; dense.len()];
    for (index, row) in dense.chunks_exact(width.max(1)).enumerate().take(count) {
        for (variable, &v) in row.iter().enumerate() {
            columns[variable * count + index] = i8::try_from(v).ok()?;
        }
    }
    Some(columns)
}

/// The packed support entries of [`MoveSet::bound_steps`], or `None` when a value exceeds 255
/// in size or a slot `2 i + 1` does not fit in 24 bits.
fn bound_steps(indices: &[usize], values: &[i64]) -> Option<Vec<u32>> {
    indices
        .iter()
        .zip(values)
        .map(|(&i, &v)| {
            let slot = u32::try_from(2 * i + usize::from(v < 0))
                .ok()
                .filter(|&s| s < 1 << 24)?;
            let step = u8::try_from(v.unsigned_abs()).ok()?;
            Some(slot << 8 | u32::from(step))
        })
        .collect()
}
