//! What a cache holds, as documents: the listing of entries, checkpoints and locks, one entry
//! in full, the verification of entries, and an entry exported as the set document (an
//! implicit network entry as its enumerated cycles); a prune reports with
//! [`cache::PruneReport`].

use std::sync::atomic::AtomicBool;
use std::time::Duration;

use cache::{
    Digest, ElementEncoding, EntryKey, EntrySummary, FileSummary, Provenance, PruneReport, SetKind,
    SetMetadata,
};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::build::BuildOutcome;
use super::document::set_document;
use super::library::{CheckpointInfo, SetLibrary};
use super::limits::BuildLimits;
use super::network::enumerate_cycles;
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;

/// The state of a checkpoint file.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum CheckpointState {
    /// Set aside as unusable (`<key>.kckpt.bad`).
    SetAside,
    /// A build holds the key's lock and is writing it.
    Building,
    /// Not readable as a checkpoint.
    Unreadable,
    /// Left by a build that stopped; the same request resumes from it.
    Stopped,
}

/// One checkpoint in a listing.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct CheckpointRecord {
    /// Key digest, size, age and whether a build holds the key's lock.
    #[serde(flatten)]
    pub file: FileSummary,
    /// Whether it was set aside as unusable.
    pub set_aside: bool,
    /// What the file is now.
    pub state: CheckpointState,
    /// Components lifted so far, when readable.
    pub lifted: Option<usize>,
    /// Number of components, when readable.
    pub components: Option<usize>,
    /// Whether it was saved inside a stage, when readable.
    pub mid_stage: Option<bool>,
    /// Moves in the state, when readable.
    pub moves: Option<usize>,
    /// Build work up to the state, in seconds, when readable.
    pub work_seconds: Option<f64>,
}

impl CheckpointRecord {
    /// The record of `info`.
    pub fn of(info: &CheckpointInfo) -> Self {
        let s = info.state.as_ref();
        let state = if info.set_aside {
            CheckpointState::SetAside
        } else if info.file.held {
            CheckpointState::Building
        } else if s.is_none() {
            CheckpointState::Unreadable
        } else {
            CheckpointState::Stopped
        };
        CheckpointRecord {
            file: info.file.clone(),
            set_aside: info.set_aside,
            state,
            lifted: s.map(|s| s.lifted),
            components: s.map(|s| s.width),
            mid_stage: s.map(|s| s.mid_stage),
            moves: s.map(|s| s.moves),
            work_seconds: s.map(|s| s.work.as_secs_f64()),
        }
    }
}

/// Everything a cache directory holds.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Listing {
    /// The readable entries, from their heads (no checksum).
    pub entries: Vec<EntrySummary>,
    /// The checkpoints of stopped or running builds.
    pub checkpoints: Vec<CheckpointRecord>,
    /// The lock files.
    pub locks: Vec<FileSummary>,
    /// Entries whose head could not be read, with why.
    pub unreadable: Vec<String>,
}

/// One entry in full (its file checked).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct EntryRecord {
    /// Digest of the key.
    pub digest: Digest,
    /// The entry file.
    pub path: String,
    /// The key.
    pub key: EntryKey,
    /// The build facts.
    pub metadata: SetMetadata,
    /// Stored elements.
    pub elements: usize,
    /// Entries per element.
    pub width: usize,
    /// Element encoding on disk.
    pub encoding: ElementEncoding,
    /// File size in bytes.
    pub size_bytes: u64,
}

/// One entry's verification.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct VerifyRecord {
    /// Digest of the key.
    pub digest: Digest,
    /// The entry file.
    pub path: String,
    /// Whether every check passed.
    pub ok: bool,
    /// Not sealed by this cache (copied in or edited); with `ok`, its content is valid.
    pub foreign: bool,
    /// Stored elements, when it passed.
    pub elements: Option<u64>,
    /// Why it was refused.
    pub problem: Option<String>,
}

impl SetLibrary {
    /// The entries, checkpoints and locks of the cache.
    pub fn listing(&self) -> Result<Listing> {
        let store = self.store();
        let (mut entries, mut unreadable) = (Vec::new(), Vec::new());
        for item in store.list()? {
            match item {
                Ok(summary) => entries.push(summary),
                Err(e) => unreadable.push(e.to_string()),
            }
        }
        Ok(Listing {
            entries,
            checkpoints: self
                .checkpoints()?
                .iter()
                .map(CheckpointRecord::of)
                .collect(),
            locks: store.list_locks()?,
            unreadable,
        })
    }

    /// The entry whose key digest starts with `prefix`, its file checked in full.
    pub fn entry_record(&self, prefix: &str) -> Result<EntryRecord> {
        let set = self.store().load_digest(prefix)?;
        Ok(EntryRecord {
            digest: set.digest,
            path: self.store().entry_path(set.digest).display().to_string(),
            elements: set.data.len(),
            width: set.data.width(),
            key: set.key,
            metadata: set.metadata,
            encoding: set.encoding,
            size_bytes: set.size_bytes,
        })
    }

    /// Verifies the entry matching `prefix`, or every entry: the file and, for an entry this
    /// cache did not seal, its content in full ([`SetLibrary::verify_entry`]).
    pub fn verify_records(&self, prefix: Option<&str>) -> Result<Vec<VerifyRecord>> {
        let store = self.store();
        let digests = match prefix {
            Some(prefix) => vec![store.resolve(prefix)?],
            None => store.entry_digests()?,
        };
        Ok(digests
            .into_iter()
            .map(|digest| {
                let outcome = self.verify_entry(digest);
                VerifyRecord {
                    digest,
                    path: store.entry_path(digest).display().to_string(),
                    ok: outcome.is_ok(),
                    foreign: outcome
                        .as_ref()
                        .is_ok_and(|(_, p)| *p == Provenance::Foreign),
                    elements: outcome.as_ref().ok().map(|(s, _)| s.elements),
                    problem: outcome.err().map(|e| e.to_string()),
                }
            })
            .collect())
    }

    /// Removes what is older than `age` (see [`cache::Store::prune`]).
    pub fn prune(&self, age: Duration) -> Result<PruneReport> {
        Ok(self.store().prune(age)?)
    }

    /// The set document of the entry matching `prefix`. An implicit network entry holds no
    /// elements, so its cycles are enumerated (under the default memory guard; `cancel`
    /// stops it) and the document holds them, as a build written to a file does.
    pub fn export_document(&self, prefix: &str, cancel: Option<&AtomicBool>) -> Result<String> {
        let entry = self.store().load_digest(prefix)?;
        if entry.key.kind != SetKind::Cycles {
            return Ok(set_document(&entry.key, &entry.metadata, &entry.data));
        }
        let a = IntMatrix::from_rows(&entry.metadata.matrix)?;
        let control = BuildLimits::default().control(a.cols(), cancel);
        match enumerate_cycles(&a, &control)? {
            BuildOutcome::Built(built) => {
                Ok(set_document(&built.key, &built.metadata, built.set.data()))
            }
            BuildOutcome::Stopped(reason) => Err(Error::BuildStopped {
                reason,
                kept: None,
                set_aside: None,
            }),
        }
    }
}
