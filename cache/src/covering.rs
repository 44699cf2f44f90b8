//! Reuse of a box- or norm-truncated set for an instance inside its truncation.
//!
//! A set truncated to a box (or an ℓ1 norm limit) is still a test set for every instance whose
//! own box (limit) lies inside, because only moves inside the box can ever be feasible. So an
//! instance may use any stored entry of the same row space, kind and signs whose truncation is
//! no tighter, componentwise.

use crate::error::CacheError;
use crate::format::read_head;
use crate::key::EntryKey;
use crate::store::{Store, StoredSet};

/// Result of [`Store::find_covering`].
#[derive(Debug, Default)]
pub struct CoverSearch {
    /// The smallest fully checked covering entry, if any.
    pub found: Option<StoredSet>,
    /// Entry files skipped because they are damaged (their key could not be trusted, or a
    /// covering candidate failed its full check).
    pub damaged: Vec<CacheError>,
}

impl Store {
    /// Finds a stored set usable for `wanted` (see the module doc): the exact entry or one
    /// with a weaker truncation, preferring the fewest elements. Candidates are picked from
    /// headers (family digest first) and fully checked before one is returned; damaged ones
    /// are reported in [`CoverSearch::damaged`] and never returned.
    pub fn find_covering(&self, wanted: &EntryKey) -> Result<CoverSearch, CacheError> {
        self.search_covering(wanted, false)
    }

    /// Like [`Store::find_covering`], but preferring the most elements: the widest stored
    /// truncation that still covers `wanted` (used to fall back on the largest norm-truncated
    /// set when no complete one is stored).
    pub fn find_largest_covering(&self, wanted: &EntryKey) -> Result<CoverSearch, CacheError> {
        self.search_covering(wanted, true)
    }

    fn search_covering(&self, wanted: &EntryKey, largest: bool) -> Result<CoverSearch, CacheError> {
        wanted.validate()?;
        let family = wanted.family();
        let mut search = CoverSearch::default();
        let mut candidates = Vec::new();
        for digest in self.entry_digests()? {
            match read_head(&self.entry_path(digest), digest) {
                Ok(head) if head.header.family == family && head.key.covers(wanted) => {
                    candidates.push((head.header.count, digest));
                }
                Ok(_) => {}
                Err(e) if e.is_damage() => search.damaged.push(e),
                Err(e) => return Err(e),
            }
        }
        candidates.sort();
        if largest {
            candidates.reverse();
        }
        for (_, digest) in candidates {
            match self.load_if_present(digest) {
                Ok(Some(set)) if set.key.covers(wanted) => {
                    search.found = Some(set);
                    break;
                }
                // Removed or replaced between the scan and the load.
                Ok(_) => {}
                Err(e) if e.is_damage() => search.damaged.push(e),
                Err(e) => return Err(e),
            }
        }
        Ok(search)
    }
}
