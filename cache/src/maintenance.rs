//! Operations behind the command line's cache verbs: list, verify, remove, prune, export.

use std::collections::BTreeMap;
use std::fs::{self, File, TryLockError};
use std::io::ErrorKind;
use std::path::{Path, PathBuf};
use std::time::{Duration, SystemTime, UNIX_EPOCH};

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::atomic::sync_dir;
use crate::digest::Digest;
use crate::encoding::ElementEncoding;
use crate::error::CacheError;
use crate::format::read_head;
use crate::key::EntryKey;
use crate::lock::LOCKS_REMOVABLE;
use crate::metadata::SetMetadata;
use crate::owned::{classify, FileKind};
use crate::store::{EntrySummary, Store};

/// An entry as plain serde data, for rendering (e.g. as JSON) by the caller.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
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
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct PruneReport {
    /// Entries removed for their age.
    pub removed: Vec<Digest>,
    /// Checkpoints (of builds that stopped and were not resumed) removed for their age.
    pub checkpoints_removed: Vec<Digest>,
    /// Checkpoints set aside as unusable, removed for their age.
    pub set_aside_removed: usize,
    /// Unused lock files removed.
    pub locks_removed: usize,
    /// Leftover temporary files (from interrupted writers) removed.
    pub temp_files_removed: usize,
    /// Keys whose old files were left alone because a builder held their lock.
    pub busy: Vec<Digest>,
    /// Entries whose age could not be read (damaged); left for `verify` and `remove`.
    pub unreadable: Vec<String>,
}

/// A checkpoint or lock file, as listed.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct FileSummary {
    /// Digest of the key the file belongs to.
    pub digest: Digest,
    /// File size in bytes.
    pub size_bytes: u64,
    /// Last modification, seconds since the Unix epoch.
    pub modified_unix: u64,
    /// Whether a build holds the key's lock right now.
    pub held: bool,
}

/// Temporary files not attributable to a key (probes, the marker's and the secret's) are
/// left this long at least, whatever the prune age: their writers take milliseconds.
const UNOWNED_TEMP_GRACE: Duration = Duration::from_secs(3_600);

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

    /// Checkpoints, including those set aside as unusable (`.kckpt.bad`), sorted by digest:
    /// `(summary, set_aside)`.
    pub fn list_checkpoints(&self) -> Result<Vec<(FileSummary, bool)>, CacheError> {
        let mut found = Vec::new();
        for (name, kind) in self.owned_files()? {
            let (digest, aside) = match kind {
                FileKind::Checkpoint(d) => (d, false),
                FileKind::SetAside(d) => (d, true),
                _ => continue,
            };
            if let Some(summary) = self.file_summary(digest, &self.dir().join(name))? {
                found.push((summary, aside));
            }
        }
        found.sort_by_key(|(s, aside)| (s.digest, *aside));
        Ok(found)
    }

    /// Lock files, sorted by digest, each saying whether a build holds it now.
    pub fn list_locks(&self) -> Result<Vec<FileSummary>, CacheError> {
        let mut found = Vec::new();
        for (name, kind) in self.owned_files()? {
            if let FileKind::Lock(digest) = kind {
                if let Some(summary) = self.file_summary(digest, &self.dir().join(name))? {
                    found.push(summary);
                }
            }
        }
        found.sort_by_key(|s| s.digest);
        Ok(found)
    }

    /// Whether a build holds the lock of `digest` now (never creates the lock file).
    pub fn is_held(&self, digest: Digest) -> Result<bool, CacheError> {
        let path = self.lock_path(digest);
        let file = match File::options().write(true).open(&path) {
            Ok(f) => f,
            Err(e) if e.kind() == ErrorKind::NotFound => return Ok(false),
            Err(e) => return Err(CacheError::io("open lock file", path, e)),
        };
        match file.try_lock() {
            Ok(()) => Ok(false),
            Err(TryLockError::WouldBlock) => Ok(true),
            Err(TryLockError::Error(e)) => Err(CacheError::io("lock", path, e)),
        }
    }

    /// Removes every file of the key matching `prefix` (entry, checkpoint, set-aside
    /// checkpoint, leftover temporary files, lock), waiting for a builder of it; returns its
    /// digest. Refused in a foreign directory.
    pub fn remove(&self, prefix: &str) -> Result<Digest, CacheError> {
        self.check_owned()?;
        let digest = self.resolve_any(prefix)?;
        // Dropping the lock at the end deletes its file.
        let lock = self.lock_key(digest)?;
        for (name, kind) in self.owned_files()? {
            match kind {
                FileKind::Entry(d)
                | FileKind::Checkpoint(d)
                | FileKind::SetAside(d)
                | FileKind::Temp(Some(d))
                    if d == digest =>
                {
                    remove_file(&self.dir().join(name))?;
                }
                _ => {}
            }
        }
        drop(lock);
        sync_dir(self.dir())?;
        Ok(digest)
    }

    /// Removes what is older than `older_than`: entries (by creation time), checkpoints,
    /// set-aside checkpoints, unused lock files and temporary files of interrupted writers
    /// (by modification time). Files of a key whose lock a build holds are left alone
    /// (checked with a non-blocking lock attempt); only kernstep-named files are touched, and
    /// only in a directory with kernstep's marker ([`CacheError::ForeignDir`] otherwise).
    pub fn prune(&self, older_than: Duration) -> Result<PruneReport, CacheError> {
        self.check_owned()?;
        let cutoff = SystemTime::now()
            .checked_sub(older_than)
            .unwrap_or(UNIX_EPOCH);
        let cutoff_unix = cutoff.duration_since(UNIX_EPOCH).map_or(0, |d| d.as_secs());
        let mut report = PruneReport::default();
        let mut by_key: BTreeMap<Digest, Vec<(PathBuf, FileKind)>> = BTreeMap::new();
        for (name, kind) in self.owned_files()? {
            let path = self.dir().join(&name);
            let old = match kind {
                FileKind::Entry(digest) => match read_head(&path, digest) {
                    Ok(head) => head.metadata.created_unix < cutoff_unix,
                    Err(e) => {
                        report.unreadable.push(e.to_string());
                        false
                    }
                },
                FileKind::Temp(None) => {
                    let grace = SystemTime::now()
                        .checked_sub(UNOWNED_TEMP_GRACE)
                        .map_or(UNIX_EPOCH, |t| t.min(cutoff));
                    if modified_before(&path, grace) {
                        report.temp_files_removed += usize::from(remove_file(&path)?);
                    }
                    continue;
                }
                FileKind::Marker | FileKind::Secret => continue,
                _ => modified_before(&path, cutoff),
            };
            if let (true, Some(digest)) = (old, owner(kind)) {
                by_key.entry(digest).or_default().push((path, kind));
            }
        }
        for (digest, files) in by_key {
            let lock_existed = self.lock_path(digest).exists();
            let Some(lock) = self.try_lock_key(digest)? else {
                report.busy.push(digest);
                continue;
            };
            for (path, kind) in files {
                match kind {
                    FileKind::Entry(d) if remove_file(&path)? => report.removed.push(d),
                    FileKind::Checkpoint(d) if remove_file(&path)? => {
                        report.checkpoints_removed.push(d);
                    }
                    FileKind::SetAside(_) => {
                        report.set_aside_removed += usize::from(remove_file(&path)?);
                    }
                    FileKind::Temp(_) => {
                        report.temp_files_removed += usize::from(remove_file(&path)?);
                    }
                    _ => {}
                }
            }
            // Releasing an unused lock deletes its file.
            drop(lock);
            report.locks_removed += usize::from(lock_existed && LOCKS_REMOVABLE);
        }
        sync_dir(self.dir())?;
        Ok(report)
    }

    /// The entry matching `prefix`, fully checked, as plain data.
    pub fn export(&self, prefix: &str) -> Result<ExportedEntry, CacheError> {
        let set = self.load_digest(prefix)?;
        Ok(ExportedEntry {
            digest: set.digest,
            elements: set.data.rows().collect(),
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
            model: head.metadata.model,
        })
    }

    /// The one key among entries and checkpoints whose digest starts with `prefix`.
    fn resolve_any(&self, prefix: &str) -> Result<Digest, CacheError> {
        match self.resolve(prefix) {
            Err(CacheError::NotFound { .. }) => {}
            other => return other,
        }
        let wanted = prefix.to_ascii_lowercase();
        let mut matches: Vec<Digest> = self
            .list_checkpoints()?
            .into_iter()
            .map(|(s, _)| s.digest)
            .filter(|d| d.to_hex().starts_with(&wanted))
            .collect();
        matches.dedup();
        match matches.len() {
            1 => Ok(matches[0]),
            0 => Err(CacheError::NotFound {
                prefix: prefix.to_owned(),
            }),
            _ => Err(CacheError::AmbiguousPrefix {
                prefix: prefix.to_owned(),
                matches: matches.iter().map(Digest::to_hex).collect(),
            }),
        }
    }

    /// The kernstep-named files of the directory with what they are.
    fn owned_files(&self) -> Result<Vec<(String, FileKind)>, CacheError> {
        Ok(self
            .file_names()?
            .into_iter()
            .filter_map(|name| classify(&name).map(|kind| (name, kind)))
            .collect())
    }

    fn file_summary(&self, digest: Digest, path: &Path) -> Result<Option<FileSummary>, CacheError> {
        let meta = match fs::symlink_metadata(path) {
            Ok(m) => m,
            Err(e) if e.kind() == ErrorKind::NotFound => return Ok(None),
            Err(e) => return Err(CacheError::io("inspect", path, e)),
        };
        let modified_unix = meta
            .modified()
            .ok()
            .and_then(|t| t.duration_since(UNIX_EPOCH).ok())
            .map_or(0, |d| d.as_secs());
        Ok(Some(FileSummary {
            digest,
            size_bytes: meta.len(),
            modified_unix,
            held: self.is_held(digest)?,
        }))
    }
}

/// The key a file belongs to, for those that belong to one.
fn owner(kind: FileKind) -> Option<Digest> {
    match kind {
        FileKind::Entry(d)
        | FileKind::Checkpoint(d)
        | FileKind::SetAside(d)
        | FileKind::Lock(d)
        | FileKind::Temp(Some(d)) => Some(d),
        FileKind::Temp(None) | FileKind::Marker | FileKind::Secret => None,
    }
}

/// Whether the file at `path` (not following a symlink) was last modified before `cutoff`;
/// `false` if it is gone or its time is unknown.
fn modified_before(path: &Path, cutoff: SystemTime) -> bool {
    fs::symlink_metadata(path)
        .and_then(|m| m.modified())
        .is_ok_and(|t| t < cutoff)
}

/// Removes a file: `Ok(true)` if removed, `Ok(false)` if it was already gone.
fn remove_file(path: &Path) -> Result<bool, CacheError> {
    match fs::remove_file(path) {
        Ok(()) => Ok(true),
        Err(e) if e.kind() == ErrorKind::NotFound => Ok(false),
        Err(e) => Err(CacheError::io("remove", path, e)),
    }
}
