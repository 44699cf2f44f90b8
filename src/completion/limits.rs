//! Truncation of a test set: by an l1 norm limit and by a box `|g_i| <= box_i`.
//!
//! Project-and-lift may prune with these limits at every stage without losing any element of
//! the truncated answer: an element `e` that is needed for a final element `g` satisfies
//! `e ⊑ g` on the components lifted so far, so its norm and entries there are at most those of
//! `g` (Hemmecke 2003, positive sum property; the argument is spelled out in `lift.rs`).

use super::store::Entry;

/// Limits on the elements that a completion must return.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Truncation {
    /// Keep only elements whose l1 norm is at most this (default: none).
    pub norm_limit: Option<u64>,
    /// Keep only elements with `|g_i| <= box[i]` for every `i` (default: none).
    pub bounds: Option<Vec<u64>>,
}

impl Truncation {
    /// True if nothing is truncated.
    pub fn is_none(&self) -> bool {
        self.norm_limit.is_none() && self.bounds.is_none()
    }

    /// Whether `v` stays within the limits on the components `comps`.
    pub(crate) fn admits(&self, v: &[Entry], comps: &[usize]) -> bool {
        let norm: u64 = comps.iter().map(|&c| u64::from(v[c].unsigned_abs())).sum();
        self.norm_limit.is_none_or(|n| norm <= n)
            && self.bounds.as_ref().is_none_or(|b| {
                comps
                    .iter()
                    .all(|&c| u64::from(v[c].unsigned_abs()) <= b[c])
            })
    }
}
