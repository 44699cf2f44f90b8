//! Flat storage of lattice vectors during a completion.
//!
//! Invariant: every stored vector has `width` entries, all in the kernel lattice, kept in one
//! contiguous `Vec<i32>` (compact and cache friendly). Arithmetic on entries is checked: a sum
//! that leaves `i32` is an [`Error::Overflow`], never a wrapped value.

use crate::error::{Error, Result};

/// Entry type of vectors inside the completion.
pub(crate) type Entry = i32;

/// A growing arena of equal-width integer vectors addressed by `u32` ids.
#[derive(Clone, Debug)]
pub(crate) struct VecStore {
    width: usize,
    data: Vec<Entry>,
}

impl VecStore {
    /// An empty store for vectors of `width` entries.
    pub(crate) fn new(width: usize) -> Self {
        Self {
            width,
            data: Vec::new(),
        }
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
    pub(crate) fn get(&self, id: u32) -> &[Entry] {
        let start = id as usize * self.width;
        &self.data[start..start + self.width]
    }

    /// Appends a vector and returns its id.
    pub(crate) fn push(&mut self, v: &[Entry]) -> u32 {
        debug_assert_eq!(v.len(), self.width);
        let id = self.len() as u32;
        self.data.extend_from_slice(v);
        id
    }

    /// Iterates over all vectors in id order.
    #[cfg(test)]
    pub(crate) fn iter(&self) -> impl Iterator<Item = &[Entry]> {
        self.data.chunks_exact(self.width.max(1))
    }
}

/// `a + b`, checked.
pub(crate) fn add(a: &[Entry], b: &[Entry]) -> Result<Vec<Entry>> {
    a.iter()
        .zip(b)
        .map(|(&x, &y)| in_range(x.checked_add(y)))
        .collect()
}

/// `w = a + b` into an existing buffer, checked.
pub(crate) fn add_into(w: &mut [Entry], a: &[Entry], b: &[Entry]) -> Result<()> {
    for ((x, &y), &z) in w.iter_mut().zip(a).zip(b) {
        *x = in_range(y.checked_add(z))?;
    }
    Ok(())
}

/// `w -= k * h` in place, checked.
pub(crate) fn sub_scaled(w: &mut [Entry], h: &[Entry], k: Entry) -> Result<()> {
    for (x, &y) in w.iter_mut().zip(h) {
        *x = in_range(y.checked_mul(k).and_then(|p| x.checked_sub(p)))?;
    }
    Ok(())
}

/// The l1 norm of `v` restricted to the components `comps`.
pub(crate) fn norm_on(v: &[Entry], comps: &[usize]) -> u64 {
    comps.iter().map(|&i| u64::from(v[i].unsigned_abs())).sum()
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
        let mut s = VecStore::new(3);
        let a = s.push(&[1, -2, 0]);
        let b = s.push(&[0, 0, 5]);
        assert_eq!((a, b, s.len()), (0, 1, 2));
        assert_eq!(s.get(1), &[0, 0, 5]);
        assert_eq!(norm_on(s.get(0), &[0, 1]), 3);
    }
}
