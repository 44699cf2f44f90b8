//! The one copy of a move set's moves: the nonzero entries of every move, move after move, in
//! the narrowest of three forms, and the views the solver reads them through.
//!
//! An entry `v` of variable `i` is packed as `(2 i + [v < 0]) << 8 | |v|` when `|v| <= 255`:
//! in a 16-bit word when the set has at most 64 variables, else in a 32-bit one (slots up to
//! 2^24). Graver elements of Δ-modular matrices have entries of at most Δ, so sets are
//! nearly always packed; the rare set with a larger entry keeps variables and values apart.

use rayon::prelude::*;

use crate::error::{overflow, AugmentError, Result};

/// The nonzero entries of every move of a set.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Entries {
    /// Packed in 16 bits: at most 64 variables.
    Short(Vec<u16>),
    /// Packed in 32 bits: fewer than 2^23 variables.
    Packed(Vec<u32>),
    /// Variable and value apart, for any entries.
    Wide {
        indices: Vec<usize>,
        values: Vec<i64>,
    },
}

impl Entries {
    /// The entries `range` (one move's).
    #[inline]
    pub(crate) fn support(&self, range: std::ops::Range<usize>) -> Support<'_> {
        Support(match self {
            Entries::Short(words) => View::Short(&words[range]),
            Entries::Packed(words) => View::Packed(&words[range]),
            Entries::Wide { indices, values } => {
                View::Wide(&indices[range.clone()], &values[range])
            }
        })
    }

    /// The packed words of the entries `range`, when the entries are packed.
    #[inline]
    pub(crate) fn steps(&self, range: std::ops::Range<usize>) -> Option<Steps<'_>> {
        match self {
            Entries::Short(words) => Some(Steps::Short(&words[range])),
            Entries::Packed(words) => Some(Steps::Packed(&words[range])),
            Entries::Wide { .. } => None,
        }
    }
}

/// The nonzero entries of one move, in increasing variable order: `(variable, value)` pairs.
#[derive(Debug, Clone, Copy)]
pub struct Support<'a>(View<'a>);

#[derive(Debug, Clone, Copy)]
enum View<'a> {
    Short(&'a [u16]),
    Packed(&'a [u32]),
    Wide(&'a [usize], &'a [i64]),
}

impl<'a> Support<'a> {
    /// Number of nonzero entries.
    #[inline]
    pub fn len(&self) -> usize {
        match self.0 {
            View::Short(words) => words.len(),
            View::Packed(words) => words.len(),
            View::Wide(indices, _) => indices.len(),
        }
    }

    /// True for an empty support (never the case for a move of a set).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Entry `k`: its variable and value.
    #[inline]
    pub fn get(&self, k: usize) -> (usize, i64) {
        match self.0 {
            View::Short(words) => unpack(words[k].into()),
            View::Packed(words) => unpack(words[k]),
            View::Wide(indices, values) => (indices[k], values[k]),
        }
    }

    /// Calls `f` with every entry's variable and value, in increasing variable order (one
    /// dispatch on the form for the whole move, where [`Support::iter`] takes one per entry).
    #[inline]
    pub fn for_each(&self, mut f: impl FnMut(usize, i64)) {
        match self.0 {
            View::Short(words) => words.iter().for_each(|&w| {
                let (i, v) = unpack(w.into());
                f(i, v)
            }),
            View::Packed(words) => words.iter().for_each(|&w| {
                let (i, v) = unpack(w);
                f(i, v)
            }),
            View::Wide(indices, values) => {
                indices.iter().zip(values).for_each(|(&i, &v)| f(i, v));
            }
        }
    }

    /// The entries in increasing variable order.
    #[inline]
    pub fn iter(&self) -> impl ExactSizeIterator<Item = (usize, i64)> + 'a {
        let this = *self;
        (0..this.len()).map(move |k| this.get(k))
    }
}

/// One move's packed words (see the module documentation).
#[derive(Debug, Clone, Copy)]
pub(crate) enum Steps<'a> {
    /// 16-bit words.
    Short(&'a [u16]),
    /// 32-bit words.
    Packed(&'a [u32]),
}

/// Variable and value of a packed entry.
#[inline]
fn unpack(word: u32) -> (usize, i64) {
    let slot = word >> 8;
    let size = i64::from(word & 0xff);
    let value = if slot & 1 == 1 { -size } else { size };
    ((slot >> 1) as usize, value)
}

/// A word that holds a packed entry.
trait Word: Copy + Default {
    /// `slot << 8 | size`; the caller has checked that it fits.
    fn pack(slot: u32, size: u32) -> Self;
    /// The word widened.
    fn widen(self) -> u32;
}

impl Word for u16 {
    fn pack(slot: u32, size: u32) -> Self {
        (slot << 8 | size) as u16
    }

    fn widen(self) -> u32 {
        self.into()
    }
}

impl Word for u32 {
    fn pack(slot: u32, size: u32) -> Self {
        slot << 8 | size
    }

    fn widen(self) -> u32 {
        self
    }
}

/// Most variables whose slots fit a 16-bit word.
const SHORT_WIDTH: usize = 64;
/// Most variables whose slots fit a 32-bit word.
const PACKED_WIDTH: usize = 1 << 23;

/// Rows per block of the parallel build.
const BLOCK_ROWS: usize = 4096;

/// How many entries of a slice are nonzero, and their range.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
struct Census {
    nonzeros: usize,
    least: i64,
    largest: i64,
}

impl Census {
    fn of<T: Copy + Into<i64>>(entries: &[T]) -> Self {
        entries.iter().fold(Census::default(), |c, &v| {
            let v: i64 = v.into();
            Census {
                nonzeros: c.nonzeros + usize::from(v != 0),
                least: c.least.min(v),
                largest: c.largest.max(v),
            }
        })
    }

    fn add(self, other: Census) -> Census {
        Census {
            nonzeros: self.nonzeros + other.nonzeros,
            least: self.least.min(other.least),
            largest: self.largest.max(other.largest),
        }
    }
}

/// A set's moves in the solver's form: entries, starts, norms, sign masks, extents and, when
/// every entry fits in an `i8`, the column-major copy.
pub(crate) struct Packing {
    pub entries: Entries,
    pub starts: Vec<usize>,
    pub norms: Vec<i64>,
    /// Per move `width.div_ceil(64)` masks of its positive entries.
    pub positive: Vec<u64>,
    /// The same of its negative entries.
    pub negative: Vec<u64>,
    /// Per variable the largest `|g_i|`.
    pub extents: Vec<u64>,
    /// Column-major copy (`count` entries per variable), or empty.
    pub columns: Vec<i8>,
}

impl Packing {
    /// The moves of `dense` (rows of `width > 0` entries, which the caller has checked)
    /// packed when every entry is at most 255 in size (in blocks of rows on the pool's
    /// threads, each writing its own part of every array), else with variables and values
    /// apart. No move may be zero; the l1 norm of every move must fit in `i64`.
    pub(crate) fn of<T: Copy + Into<i64> + Sync>(dense: &[T], width: usize) -> Result<Self> {
        let census: Vec<Census> = dense
            .par_chunks(BLOCK_ROWS * width)
            .map(Census::of)
            .collect();
        let total = census.iter().fold(Census::default(), |a, &b| a.add(b));
        let narrow = total.least >= i8::MIN.into() && total.largest <= i8::MAX.into();
        let widest = total.least.unsigned_abs().max(total.largest.unsigned_abs());
        if widest > 0xff || width >= PACKED_WIDTH {
            let mut packing = Packing::wide(dense, width, total.nonzeros)?;
            if narrow {
                packing.columns = transpose(dense, width);
            }
            return Ok(packing);
        }
        let built = if width <= SHORT_WIDTH {
            packed::<T, u16>(dense, width, &census, narrow).map(|(p, w)| p.with(Entries::Short(w)))
        } else {
            packed::<T, u32>(dense, width, &census, narrow).map(|(p, w)| p.with(Entries::Packed(w)))
        };
        built.map_err(|index| AugmentError::ZeroMove { index })
    }

    /// The moves of `dense` with variables and values apart, for any entries: the l1 norm of
    /// every move must fit in `i64`, and no move may be zero.
    fn wide<T: Copy + Into<i64>>(dense: &[T], width: usize, nonzeros: usize) -> Result<Self> {
        let (count, words) = (dense.len() / width, width.div_ceil(64));
        let (mut indices, mut values) =
            (Vec::with_capacity(nonzeros), Vec::with_capacity(nonzeros));
        let mut packing = Packing::zeroed(count, width, 0);
        for (index, row) in dense.chunks_exact(width).enumerate() {
            let mut norm: i64 = 0;
            for (i, v) in row
                .iter()
                .map(|&v| v.into())
                .enumerate()
                .filter(|&(_, v)| v != 0)
            {
                let masks = if v > 0 {
                    &mut packing.positive
                } else {
                    &mut packing.negative
                };
                masks[index * words + i / 64] |= 1 << (i % 64);
                packing.extents[i] = packing.extents[i].max(v.unsigned_abs());
                indices.push(i);
                values.push(v);
                norm = norm
                    .checked_add(v.checked_abs().ok_or(overflow("taking a move's l1 norm"))?)
                    .ok_or(overflow("taking a move's l1 norm"))?;
            }
            if norm == 0 {
                return Err(AugmentError::ZeroMove { index });
            }
            packing.norms[index] = norm;
            packing.starts[index + 1] = indices.len();
        }
        Ok(packing.with(Entries::Wide { indices, values }))
    }

    /// `count` moves of `width` variables, every array filled with zeros (the column copy
    /// with `columns` entries).
    fn zeroed(count: usize, width: usize, columns: usize) -> Self {
        let words = width.div_ceil(64);
        Packing {
            entries: Entries::Short(Vec::new()),
            starts: vec![0; count + 1],
            norms: vec![0; count],
            positive: vec![0; count * words],
            negative: vec![0; count * words],
            extents: vec![0; width],
            columns: vec![0; columns],
        }
    }

    fn with(mut self, entries: Entries) -> Self {
        self.entries = entries;
        self
    }
}

/// One block's share of every array of a [`Packing`] being filled.
struct Block<'a, T, W> {
    /// The block's rows.
    dense: &'a [T],
    /// Index of its first row in the set.
    first: usize,
    /// Index of its first entry in the set's packed words.
    offset: usize,
    packed: &'a mut [W],
    /// The starts of its moves' successors (the set's `starts[first + 1..]`).
    ends: &'a mut [usize],
    norms: &'a mut [i64],
    positive: &'a mut [u64],
    negative: &'a mut [u64],
    /// Per variable the block's piece of its column (empty without the column copy).
    columns: Vec<&'a mut [i8]>,
}

/// The packed words of `dense` (blocks of [`BLOCK_ROWS`] rows with their `census`) and the
/// rest of its [`Packing`], whose entries the caller sets; a zero row is the error, with
/// its index.
fn packed<T: Copy + Into<i64> + Sync, W: Word + Send + Sync>(
    dense: &[T],
    width: usize,
    census: &[Census],
    narrow: bool,
) -> std::result::Result<(Packing, Vec<W>), usize> {
    let count = dense.len() / width;
    let words = width.div_ceil(64);
    let total: usize = census.iter().map(|c| c.nonzeros).sum();
    let mut packing = Packing::zeroed(count, width, if narrow { dense.len() } else { 0 });
    let mut packed = vec![W::default(); total];
    let mut blocks = Vec::with_capacity(census.len());
    {
        let (mut words_left, mut ends_left) = (&mut packed[..], &mut packing.starts[1..]);
        let (mut norms_left, mut up_left) = (&mut packing.norms[..], &mut packing.positive[..]);
        let mut down_left = &mut packing.negative[..];
        let mut columns: Vec<&mut [i8]> = packing.columns.chunks_exact_mut(count.max(1)).collect();
        let mut offset = 0;
        for (b, (rows, c)) in dense.chunks(BLOCK_ROWS * width).zip(census).enumerate() {
            let n = rows.len() / width;
            let (packed, rest) = std::mem::take(&mut words_left).split_at_mut(c.nonzeros);
            words_left = rest;
            let (ends, rest) = std::mem::take(&mut ends_left).split_at_mut(n);
            ends_left = rest;
            let (norms, rest) = std::mem::take(&mut norms_left).split_at_mut(n);
            norms_left = rest;
            let (positive, rest) = std::mem::take(&mut up_left).split_at_mut(n * words);
            up_left = rest;
            let (negative, rest) = std::mem::take(&mut down_left).split_at_mut(n * words);
            down_left = rest;
            let columns = columns
                .iter_mut()
                .map(|column| {
                    let (piece, rest) = std::mem::take(column).split_at_mut(n);
                    *column = rest;
                    piece
                })
                .collect();
            blocks.push(Block {
                dense: rows,
                first: b * BLOCK_ROWS,
                offset,
                packed,
                ends,
                norms,
                positive,
                negative,
                columns,
            });
            offset += c.nonzeros;
        }
    }
    let extents: Vec<Vec<u64>> = blocks
        .into_par_iter()
        .map(|block| block.fill(width))
        .collect::<std::result::Result<_, usize>>()?;
    for block in extents {
        for (extent, e) in packing.extents.iter_mut().zip(block) {
            *extent = (*extent).max(e);
        }
    }
    Ok((packing, packed))
}

impl<T: Copy + Into<i64>, W: Word> Block<'_, T, W> {
    /// Fills the block's share and gives its extents; a zero row is the error, with its
    /// index in the set. Each row's support is compacted without branches on the entries
    /// (every entry's word is written to a scratch row, whose end advances only past nonzero
    /// ones), then copied to its place.
    fn fill(mut self, width: usize) -> std::result::Result<Vec<u64>, usize> {
        let words = width.div_ceil(64);
        let mut scratch = vec![W::default(); width + 1];
        let mut end = 0;
        let rows = self.dense.chunks_exact(width).enumerate();
        let masks = self.positive.chunks_exact_mut(words);
        let masks = masks.zip(self.negative.chunks_exact_mut(words));
        for ((r, row), (positive, negative)) in rows.zip(masks) {
            let (mut norm, mut len) = (0u64, 0usize);
            for (word, chunk) in row.chunks(64).enumerate() {
                let (mut up, mut down) = (0u64, 0u64);
                for (bit, &v) in chunk.iter().enumerate() {
                    let (i, v): (usize, i64) = (word * 64 + bit, v.into());
                    let size = v.unsigned_abs();
                    scratch[len] = W::pack((2 * i as u32) | u32::from(v < 0), size as u32);
                    len += usize::from(v != 0);
                    norm += size;
                    up |= u64::from(v > 0) << bit;
                    down |= u64::from(v < 0) << bit;
                }
                positive[word] = up;
                negative[word] = down;
            }
            if norm == 0 {
                return Err(self.first + r);
            }
            self.packed[end..end + len].copy_from_slice(&scratch[..len]);
            end += len;
            // At most 255 per entry and fewer than 2^23 entries: the norm fits.
            self.norms[r] = norm as i64;
            self.ends[r] = self.offset + end;
        }
        if self.columns.is_empty() {
            let mut extents = vec![0u64; width];
            for (i, v) in self.packed.iter().map(|&word| unpack(word.widen())) {
                extents[i] = extents[i].max(v.unsigned_abs());
            }
            return Ok(extents);
        }
        for (r, row) in self.dense.chunks_exact(width).enumerate() {
            for (column, &v) in self.columns.iter_mut().zip(row) {
                let v: i64 = v.into();
                column[r] = v as i8;
            }
        }
        let extent = |column: &[i8]| column.iter().map(|v| v.unsigned_abs()).max().unwrap_or(0);
        Ok(self.columns.iter().map(|c| u64::from(extent(c))).collect())
    }
}

/// The column-major copy of the row-major `dense` (rows of `width` entries, each of which
/// fits in an `i8`).
fn transpose<T: Copy + Into<i64>>(dense: &[T], width: usize) -> Vec<i8> {
    let count = dense.len() / width;
    let mut columns = vec![0i8; dense.len()];
    for (index, row) in dense.chunks_exact(width).enumerate() {
        for (variable, &v) in row.iter().enumerate() {
            let v: i64 = v.into();
            columns[variable * count + index] = v as i8;
        }
    }
    columns
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_unpack_to_their_entries() {
        for (i, v) in [(0usize, 1i64), (0, -1), (63, 255), (63, -255), (7, -3)] {
            let slot = (2 * i as u32) | u32::from(v < 0);
            let size = v.unsigned_abs() as u32;
            assert_eq!(unpack(u16::pack(slot, size).into()), (i, v));
            assert_eq!(unpack(u32::pack(slot, size)), (i, v));
        }
        assert_eq!(unpack(u32::pack(2 * 70_000 + 1, 9)), (70_000, -9));
    }
}
