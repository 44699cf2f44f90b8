//! The test sets of one cache directory: reuse what is stored, build what is missing.

use std::path::Path;

use cache::{BuildGuard, CheckpointState, EntryKey, Store, StoredSet};

use super::build::{build, to_data, BuildOutcome, BuiltSet};
use super::network::cycles_entry;
use super::saved::{self, RequestRecord};
use super::spec::ResolvedSpec;
use crate::analysis::MatrixAnalysis;
use crate::completion::{Checkpoint, Control, Method, StopReason};
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::network::Network;

/// What [`SetLibrary::obtain`] produced.
#[derive(Debug)]
pub enum Obtained {
    /// A valid stored entry that serves the request (exact key or a covering one).
    Reused(Box<StoredSet>),
    /// Built now and stored; `replaced` tells why an existing entry was not used.
    Built {
        /// The new set.
        built: Box<BuiltSet>,
        /// The damage found in the entry this one replaced, if any.
        replaced: Option<String>,
        /// When an interrupted build was resumed: how many components it had lifted.
        resumed_after: Option<usize>,
    },
    /// A limit or a cancellation stopped the build; the store is unchanged.
    Stopped(StopReason),
}

/// A cache directory used by the root crate.
#[derive(Clone, Debug)]
pub struct SetLibrary {
    store: Store,
}

impl SetLibrary {
    /// Opens the directory `dir`, else `$KERNSTEP_CACHE_DIR`, else the platform cache directory.
    pub fn open(dir: Option<&Path>) -> Result<Self> {
        Ok(Self {
            store: Store::open_default(dir)?,
        })
    }

    /// The underlying store (for listing, verifying, pruning).
    pub fn store(&self) -> &Store {
        &self.store
    }

    /// A stored set that serves `key` (the entry itself or one whose truncation covers it).
    pub fn find(&self, key: &EntryKey) -> Result<Option<StoredSet>> {
        Ok(self.store.find_covering(key)?.found)
    }

    /// The stored set with the most elements that covers `key`, skipping damaged entries.
    pub fn find_largest(&self, key: &EntryKey) -> Result<Option<StoredSet>> {
        Ok(self.store.find_largest_covering(key)?.found)
    }

    /// Returns the stored set for `spec`, or builds and stores it. Two processes asking for
    /// the same key build it once: the second waits and then reuses the first one's entry.
    /// With `rebuild` an existing entry is replaced.
    pub fn obtain(
        &self,
        a: &IntMatrix,
        analysis: &MatrixAnalysis,
        spec: &ResolvedSpec,
        control: &Control<'_>,
        rebuild: bool,
    ) -> Result<Obtained> {
        let key = super::build::entry_key(a, spec);
        if !rebuild {
            if let Some(found) = self.find(&key)? {
                return Ok(Obtained::Reused(Box::new(found)));
            }
        }
        let lock = if rebuild {
            self.store.lock_for_rebuild(&key)?
        } else {
            match self.store.lock_for_build(&key)? {
                BuildGuard::Ready(set) => return Ok(Obtained::Reused(Box::new(set))),
                BuildGuard::Build(lock) => lock,
            }
        };
        let replaced = lock.damaged_entry().map(ToString::to_string);
        let request = RequestRecord::of(&key, spec);
        let resume = self.checkpoint(&key, &request, spec)?;
        let save_failed = std::sync::Mutex::new(None);
        let save = |state: &Checkpoint| {
            if let Err(e) = self.save_checkpoint(&key, &request, state) {
                save_failed.lock().map(|mut slot| *slot = Some(e)).ok();
            }
        };
        let control = control.on_stage_done(&save);
        let outcome = build(a, analysis, spec, &control, resume.as_ref())?;
        if let Some(e) = save_failed.into_inner().ok().flatten() {
            return Err(e);
        }
        match outcome {
            BuildOutcome::Stopped(reason) => Ok(Obtained::Stopped(reason)),
            BuildOutcome::Built(built) => {
                lock.commit(&to_data(&built.set)?, &built.metadata)?;
                self.store.remove_checkpoint(&key)?;
                Ok(Obtained::Built {
                    built,
                    replaced,
                    resumed_after: resume.map(|c| c.lifted.len()),
                })
            }
        }
    }

    /// Stores `built` (a set built outside [`SetLibrary::obtain`], such as the kept level of a
    /// budgeted build), replacing any entry under its key; returns the damage found in the
    /// entry it replaced, if any.
    pub fn keep(&self, built: &BuiltSet) -> Result<Option<String>> {
        let lock = self.store.lock_for_rebuild(&built.key)?;
        let replaced = lock.damaged_entry().map(ToString::to_string);
        lock.commit(&to_data(&built.set)?, &built.metadata)?;
        Ok(replaced)
    }

    /// The checkpoint that [`SetLibrary::obtain`] would resume `spec` from, if any: what the
    /// other processes of a shared build (see [`crate::completion::WorkShare`]) start from,
    /// so that all resume together.
    pub fn resume_point(&self, a: &IntMatrix, spec: &ResolvedSpec) -> Result<Option<Checkpoint>> {
        let key = super::build::entry_key(a, spec);
        self.checkpoint(&key, &RequestRecord::of(&key, spec), spec)
    }

    /// Returns the entry of the network matrix `a` (its implicit set of cycles, see
    /// [`super::cycles_entry`]), storing it when missing; with `rebuild` it is replaced.
    pub fn obtain_cycles(
        &self,
        a: &IntMatrix,
        network: &Network,
        rebuild: bool,
    ) -> Result<Obtained> {
        let built = cycles_entry(a, network);
        if !rebuild {
            if let Some(found) = self.find(&built.key)? {
                return Ok(Obtained::Reused(Box::new(found)));
            }
        }
        let lock = if rebuild {
            self.store.lock_for_rebuild(&built.key)?
        } else {
            match self.store.lock_for_build(&built.key)? {
                BuildGuard::Ready(set) => return Ok(Obtained::Reused(Box::new(set))),
                BuildGuard::Build(lock) => lock,
            }
        };
        let replaced = lock.damaged_entry().map(ToString::to_string);
        lock.commit(&to_data(&built.set)?, &built.metadata)?;
        Ok(Obtained::Built {
            built: Box::new(built),
            replaced,
            resumed_after: None,
        })
    }

    /// The saved state of an interrupted build of `key`, if one was saved for exactly
    /// `request`. A damaged checkpoint, one of an older layout and one saved for another
    /// request of the same key are ignored (the build starts over, and its first stage
    /// overwrites the file) rather than trusted.
    fn checkpoint(
        &self,
        key: &EntryKey,
        request: &RequestRecord,
        spec: &ResolvedSpec,
    ) -> Result<Option<Checkpoint>> {
        if spec.method != Method::ProjectAndLift {
            return Ok(None);
        }
        let CheckpointState::Present(bytes) = self.store.load_checkpoint(key)? else {
            return Ok(None);
        };
        Ok(saved::decode(&bytes, request))
    }

    fn save_checkpoint(
        &self,
        key: &EntryKey,
        request: &RequestRecord,
        state: &Checkpoint,
    ) -> Result<()> {
        self.store
            .save_checkpoint(key, &saved::encode(request, state))?;
        Ok(())
    }
}
