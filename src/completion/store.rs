//! Flat storage of lattice vectors during a completion.
//!
//! Invariant: every stored vector has `width` entries, all in the kernel lattice, kept in one
//! contiguous `Vec` of the store's entry type ([`Stored`]: `i8`, `i16` or `i32`, the
//! narrowest a stage's vectors fit; one byte per entry is the usual case, since Graver
//! elements of small-Δ matrices have small entries). Arithmetic runs on [`Entry`] (`i32`)
//! buffers and is checked: a sum that leaves `i32` is an [`Error::Overflow`], never a wrapped
//! value; a vector that does not fit the store's type is refused with [`Error::EntryWidth`],
//! and the completion starts again with wider stores.

use crate::error::{Error, Result};

/// Entry type of the vectors the completion computes with.
pub(crate) type Entry = i32;

/// An entry type a store may keep: narrowed from an [`Entry`] when it fits, widened back
/// without loss.
pub(crate) trait Stored:
    Copy + Default + Send + Sync + Into<Entry> + TryFrom<Entry> + std::fmt::Debug + 'static
{
}

impl Stored for i8 {}
impl Stored for i16 {}
impl Stored for i32 {}

/// A growing arena of equal-width integer vectors addressed by `u32` ids, kept as `E`.
#[derive(Clone, Debug)]
pub(crate) struct VecStore<E = Entry> {
    width: usize,
    data: Vec<E>,
}

impl<E: Stored> VecStore<E> {
    /// An empty store for vectors of `width` entries.
    pub(crate) fn new(width: usize) -> Self {
        Self {
            width,
            data: Vec::new(),
        }
    }

    /// Entries per vector.
    pub(crate) fn width(&self) -> usize {
        self.width
    }

    /// Number of stored vectors.
    pub(crate) fn len(&self) -> usize {
        self.data.len().checked_div(self.width).unwrap_or(0)
    }

    /// Makes room for `vectors` more vectors (exactly, not by doubling).
    pub(crate) fn reserve(&mut self, vectors: usize) {
        self.data.reserve_exact(vectors * self.width);
    }

    /// The vector with id `id`.
    pub(crate) fn get(&self, id: u32) -> &[E] {
        let start = id as usize * self.width;
        &self.data[start..start + self.width]
    }

    /// Entry `i` of the vector with id `id`, widened.
    pub(crate) fn entry(&self, id: u32, i: usize) -> Entry {
        self.data[id as usize * self.width + i].into()
    }

    /// Writes the vector with id `id`, widened, into `out` (`width` entries long).
    pub(crate) fn widen_into(&self, id: u32, out: &mut [Entry]) {
        for (o, &x) in out.iter_mut().zip(self.get(id)) {
            *o = x.into();
        }
    }

    /// The vector with id `id`, widened.
    pub(crate) fn widened(&self, id: u32) -> Vec<Entry> {
        self.get(id).iter().map(|&x| x.into()).collect()
    }

    /// Appends a vector and returns its id; [`Error::EntryWidth`] (and nothing stored) when
    /// an entry does not fit `E`.
    pub(crate) fn push(&mut self, v: &[Entry]) -> Result<u32> {
        debug_assert_eq!(v.len(), self.width);
        let narrow: Option<Vec<E>> = v.iter().map(|&x| E::try_from(x).ok()).collect();
        let narrow = narrow.ok_or(Error::EntryWidth)?;
        let id = self.len() as u32;
        self.data.extend_from_slice(&narrow);
        Ok(id)
    }

    /// Iterates over all vectors in id order.
    #[cfg(test)]
    pub(crate) fn iter(&self) -> impl Iterator<Item = &[E]> {
        self.data.chunks_exact(self.width.max(1))
    }
}

/// `a + b`, checked.
pub(crate) fn add<E: Stored>(a: &[E], b: &[E]) -> Result<Vec<Entry>> {
    a.iter()
        .zip(b)
        .map(|(&x, &y)| in_range(x.into().checked_add(y.into())))
        .collect()
}

/// `w = a + b` into an existing buffer, checked.
pub(crate) fn add_into<E: Stored>(w: &mut [Entry], a: &[E], b: &[E]) -> Result<()> {
    for ((x, &y), &z) in w.iter_mut().zip(a).zip(b) {
        *x = in_range(y.into().checked_add(z.into()))?;
    }
    Ok(())
}

/// `w -= k * h` in place, checked.
pub(crate) fn sub_scaled<E: Stored>(w: &mut [Entry], h: &[E], k: Entry) -> Result<()> {
    for (x, &y) in w.iter_mut().zip(h) {
        *x = in_range(y.into().checked_mul(k).and_then(|p| x.checked_sub(p)))?;
    }
    Ok(())
}

/// The negation of `v` (cannot overflow: stored entries never equal `Entry::MIN`).
pub(crate) fn negate(v: &[Entry]) -> Vec<Entry> {
    v.iter().map(|&x| -x).collect()
}

/// Converts an `i64` vector into entries, refusing values outside `±(2^31 - 1)`.
pub(crate) fn to_entries(v: &[i64]) -> Result<Vec<Entry>> {
    v.iter()
        .map(|&x| in_range(Entry::try_from(x).ok()))
        .collect()
}

/// Accepts a checked result only if it is a valid entry (not `Entry::MIN`, so negation is safe).
fn in_range(v: Option<Entry>) -> Result<Entry> {
    v.filter(|&e| e != Entry::MIN).ok_or_else(overflow)
}

fn overflow() -> Error {
    Error::Overflow("test-set completion (vector entries beyond 32 bits)".into())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn checked_arithmetic_reports_overflow() {
        assert!(add(&[Entry::MAX], &[1]).is_err());
        let mut w = vec![Entry::MIN + 1];
        assert!(sub_scaled(&mut w, &[1], 1).is_err());
        assert!(to_entries(&[i64::from(Entry::MAX) + 1]).is_err());
    }

    #[test]
    fn store_round_trip() {
        let mut s = VecStore::<i8>::new(3);
        let a = s.push(&[1, -2, 0]).unwrap();
        let b = s.push(&[0, 0, 127]).unwrap();
        assert_eq!((a, b, s.len()), (0, 1, 2));
        assert_eq!(s.get(1), &[0, 0, 127]);
        assert_eq!(s.widened(0), [1, -2, 0]);
        // An entry beyond the store's type is refused, and nothing is stored.
        assert!(matches!(s.push(&[0, 128, 0]), Err(Error::EntryWidth)));
        assert_eq!(s.len(), 2);
        assert!(VecStore::<i16>::new(1).push(&[128]).is_ok());
    }
}
