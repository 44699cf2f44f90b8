//! Operations behind the command line's cache verbs: list, verify, remove, prune, export.

use std::fs;
use std::time::{Duration, SystemTime, UNIX_EPOCH};

use serde::{Deserialize, Serialize};

use crate::atomic::{is_temp_name, sync_dir};
use crate::digest::Digest;
use crate::encoding::ElementEncoding;
use crate::error::CacheError;
use crate::format::read_head;
use crate::key::EntryKey;
use crate::metadata::SetMetadata;
use crate::store::{EntrySummary, Store};

/// An entry as plain serde data, for rendering (e.g. as JSON) by the caller.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ExportedEntry {
    /// Digest of the key.
    pub digest: Digest,
    /// The key.
    pub key: EntryKey,
    /// Build facts.
    pub metadata: SetMetadata,
    /// Element encoding on disk.
    pub encoding: ElementEncoding,
    /// Entries per vector.
    pub width: usize,
    /// The vectors.
    pub elements: Vec<Vec<i64>>,
}

/// The full check of one entry file, from [`Store::verify_all`].
#[derive(Debug)]
pub struct Verified {
    /// The digest in the file name.
    pub digest: Digest,
    /// Its summary if every check passed, else why it failed.
    pub outcome: Result<EntrySummary, CacheError>,
}

/// What [`Store::prune`] did.
#[derive(Debug, Default)]
pub struct PruneReport {
    /// Entries removed for their age.
    pub removed: Vec<Digest>,
    /// Leftover temporary files (from interrupted writers) removed.
    pub temp_files_removed: usize,
    /// Entries left alone because a builder held their lock.
    pub busy: Vec<Digest>,
    /// Entries whose age could not be read (damaged); left for `verify` and `remove`.
    pub unreadable: Vec<CacheError>,
}

impl Store {
    /// Summaries of every entry from header and metadata only (fast; no checksum: use
    /// [`Store::verify_all`] for that). A file whose head cannot be read gives an `Err` item.
    pub fn list(&self) -> Result<Vec<Result<EntrySummary, CacheError>>, CacheError> {
        Ok(self
            .entry_digests()?
            .into_iter()
            .map(|d| self.head_summary(d))
            .collect())
    }

    /// Fully checks the entry matching `prefix` (checksum, key, every section).
    pub fn verify(&self, prefix: &str) -> Result<EntrySummary, CacheError> {
        self.load_digest(prefix).map(|set| set.summary())
    }

    /// Fully checks every entry, one result per entry file.
    pub fn verify_all(&self) -> Result<Vec<Verified>, CacheError> {
        Ok(self
            .entry_digests()?
            .into_iter()
            .map(|d| {
                let outcome = match self.load_if_present(d) {
                    Ok(Some(set)) => Ok(set.summary()),
                    Ok(None) => Err(CacheError::NotFound { prefix: d.to_hex() }),
                    Err(e) => Err(e),
                };
                Verified { digest: d, outcome }
            })
            .collect())
    }

    /// Removes the entry matching `prefix` (waiting for a builder of it) and returns its
    /// digest.
    pub fn remove(&self, prefix: &str) -> Result<Digest, CacheError> {
        let digest = self.resolve(prefix)?;
        let _lock = self.lock_key(digest)?;
        let path = self.entry_path(digest);
        fs::remove_file(&path).map_err(|e| CacheError::io("remove", &path, e))?;
        sync_dir(self.dir())?;
        Ok(digest)
    }

    /// Removes entries created more than `older_than` ago, and temporary files of
    /// interrupted writers last modified more than `older_than` ago.
    pub fn prune(&self, older_than: Duration) -> Result<PruneReport, CacheError> {
        let cutoff = SystemTime::now()
            .checked_sub(older_than)
            .unwrap_or(UNIX_EPOCH);
        let cutoff_unix = cutoff.duration_since(UNIX_EPOCH).map_or(0, |d| d.as_secs());
        let mut report = PruneReport::default();
        for digest in self.entry_digests()? {
            let created = match read_head(&self.entry_path(digest), digest) {
                Ok(head) => head.metadata.created_unix,
                Err(e) => {
                    report.unreadable.push(e);
                    continue;
                }
            };
            if created >= cutoff_unix {
                continue;
            }
            let Some(_lock) = self.try_lock_key(digest)? else {
                report.busy.push(digest);
                continue;
            };
            let path = self.entry_path(digest);
            fs::remove_file(&path).map_err(|e| CacheError::io("remove", &path, e))?;
            report.removed.push(digest);
        }
        report.temp_files_removed = self.remove_old_temp_files(cutoff)?;
        sync_dir(self.dir())?;
        Ok(report)
    }

    /// The entry matching `prefix`, fully checked, as plain data.
    pub fn export(&self, prefix: &str) -> Result<ExportedEntry, CacheError> {
        let set = self.load_digest(prefix)?;
        Ok(ExportedEntry {
            digest: set.digest,
            elements: set.data.rows().map(<[i64]>::to_vec).collect(),
            width: set.data.width(),
            key: set.key,
            metadata: set.metadata,
            encoding: set.encoding,
        })
    }

    fn head_summary(&self, digest: Digest) -> Result<EntrySummary, CacheError> {
        let head = read_head(&self.entry_path(digest), digest)?;
        Ok(EntrySummary {
            digest,
            kind: head.key.kind,
            truncation: head.key.truncation,
            elements: head.header.count,
            width: head.header.width,
            encoding: head.header.encoding,
            completeness: head.metadata.completeness,
            size_bytes: head.file_len,
            created_unix: head.metadata.created_unix,
        })
    }

    fn remove_old_temp_files(&self, cutoff: SystemTime) -> Result<usize, CacheError> {
        let mut removed = 0;
        for name in self.file_names()?.into_iter().filter(|n| is_temp_name(n)) {
            let path = self.dir().join(&name);
            let modified = fs::metadata(&path).and_then(|m| m.modified());
            match modified {
                Ok(t) if t < cutoff => {
                    fs::remove_file(&path).map_err(|e| CacheError::io("remove", &path, e))?;
                    removed += 1;
                }
                // Vanished meanwhile (its writer finished) or still fresh: leave it.
                _ => {}
            }
        }
        Ok(removed)
    }
}
