//! Truncation of a test set ([`cache::Truncation`], the one recorded in cache keys): by an l1
//! norm limit and by a box `|g_i| <= box_i`.
//!
//! Project-and-lift may prune with these limits at every stage without losing any element of
//! the truncated answer: an element `e` that is needed for a final element `g` satisfies
//! `e ⊑ g` on the components lifted so far, so its norm and entries there are at most those of
//! `g` (Hemmecke 2003, positive sum property; the argument is spelled out in `lift.rs`).

use super::store::Entry;

pub use cache::Truncation;

/// Whether `v` stays within the limits of `t` on the components `comps`.
pub(crate) fn admits(t: &Truncation, v: &[Entry], comps: &[usize]) -> bool {
    let norm: u64 = comps.iter().map(|&c| u64::from(v[c].unsigned_abs())).sum();
    t.norm_limit.is_none_or(|n| norm <= n)
        && t.bounds.as_ref().is_none_or(|b| {
            comps
                .iter()
                .all(|&c| u64::from(v[c].unsigned_abs()) <= b[c])
        })
}
