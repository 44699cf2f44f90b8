//! Per-key advisory locks, so that concurrent builders of one key do the work once.
//!
//! The lock is an exclusive `File::lock` on `<digest>.lock` in the store directory. The lock
//! is released when its holder is dropped (or its process dies), so a crashed builder never
//! blocks others. A lock file is deleted only by a holder of its lock (the holder on release,
//! or `prune` for a crashed builder's file); so that a process that opened the file before
//! the deletion cannot then hold a lock nobody else sees, a locker checks after locking that
//! the path still names the file it locked, and starts again if not.

use std::fs::{File, OpenOptions, TryLockError};
use std::path::PathBuf;

use crate::data::TestSetData;
use crate::digest::Digest;
use crate::error::CacheError;
use crate::key::EntryKey;
use crate::metadata::SetMetadata;
use crate::store::{EntrySummary, Store, StoredSet};

/// File-name suffix of per-key lock files.
pub const LOCK_SUFFIX: &str = "lock";

/// An exclusive lock on one key, released on drop. Its file is deleted on drop, while the
/// lock is still held (see the module doc), so that lock files outlive only crashed builders.
#[derive(Debug)]
pub(crate) struct KeyLock {
    /// Held open (and locked) until the lock is dropped.
    _file: File,
    path: PathBuf,
}

impl Drop for KeyLock {
    fn drop(&mut self) {
        if LOCKS_REMOVABLE {
            // Best effort: a lock file left behind is only listed as stale and pruned.
            let _ = std::fs::remove_file(&self.path);
        }
        // `file` closes, and so unlocks, after this.
    }
}

/// What [`Store::lock_for_build`] hands back.
#[derive(Debug)]
pub enum BuildGuard {
    /// No valid entry exists: build the set, then [`BuildLock::commit`] it.
    Build(BuildLock),
    /// A valid entry exists (possibly written by another builder while this one waited).
    Ready(StoredSet),
}

/// The right and duty to build one key; other builders of the key wait until it is dropped.
#[derive(Debug)]
pub struct BuildLock {
    store: Store,
    key: EntryKey,
    damaged: Option<Box<CacheError>>,
    _lock: KeyLock,
}

impl BuildLock {
    /// The key to build.
    pub fn key(&self) -> &EntryKey {
        &self.key
    }

    /// Why the existing entry, if any, was not usable (damaged, foreign or old version).
    pub fn damaged_entry(&self) -> Option<&CacheError> {
        self.damaged.as_deref()
    }

    /// Writes the built set atomically (replacing any damaged entry) and releases the lock.
    pub fn commit(
        self,
        data: &TestSetData,
        metadata: &SetMetadata,
    ) -> Result<EntrySummary, CacheError> {
        self.store.write_entry(&self.key, data, metadata)
    }
}

impl Store {
    /// Where the lock file for `digest` lives.
    pub fn lock_path(&self, digest: Digest) -> PathBuf {
        self.dir().join(format!("{digest}.{LOCK_SUFFIX}"))
    }

    /// Waits for the key's lock, then returns [`BuildGuard::Ready`] if a valid entry exists,
    /// else [`BuildGuard::Build`]. A damaged entry counts as absent (see
    /// [`BuildLock::damaged_entry`]); I/O errors are returned.
    pub fn lock_for_build(&self, key: &EntryKey) -> Result<BuildGuard, CacheError> {
        key.validate()?;
        let lock = self.lock_key(key.digest())?;
        self.guard_with(key, lock)
    }

    /// Like [`Store::lock_for_build`] but does not wait: `Ok(None)` while another builder
    /// holds the key.
    pub fn try_lock_for_build(&self, key: &EntryKey) -> Result<Option<BuildGuard>, CacheError> {
        key.validate()?;
        match self.try_lock_key(key.digest())? {
            Some(lock) => self.guard_with(key, lock).map(Some),
            None => Ok(None),
        }
    }

    /// Waits for the key's lock and grants the build even if a valid entry exists (for a
    /// forced rebuild); the commit replaces the entry atomically.
    pub fn lock_for_rebuild(&self, key: &EntryKey) -> Result<BuildLock, CacheError> {
        key.validate()?;
        let lock = self.lock_key(key.digest())?;
        Ok(self.build_lock(key, lock, None))
    }

    fn guard_with(&self, key: &EntryKey, lock: KeyLock) -> Result<BuildGuard, CacheError> {
        match self.load(key) {
            Ok(Some(set)) => Ok(BuildGuard::Ready(set)),
            Ok(None) => Ok(BuildGuard::Build(self.build_lock(key, lock, None))),
            Err(e) if e.is_damage() => Ok(BuildGuard::Build(self.build_lock(
                key,
                lock,
                Some(Box::new(e)),
            ))),
            Err(e) => Err(e),
        }
    }

    fn build_lock(
        &self,
        key: &EntryKey,
        lock: KeyLock,
        damaged: Option<Box<CacheError>>,
    ) -> BuildLock {
        BuildLock {
            store: self.clone(),
            key: key.clone(),
            damaged,
            _lock: lock,
        }
    }

    /// Waits for and takes the exclusive lock on `digest`.
    pub(crate) fn lock_key(&self, digest: Digest) -> Result<KeyLock, CacheError> {
        let path = self.lock_path(digest);
        loop {
            let file = self.open_lock_file(&path)?;
            file.lock().map_err(|e| CacheError::io("lock", &path, e))?;
            if still_at(&file, &path)? {
                return Ok(KeyLock { _file: file, path });
            }
        }
    }

    /// Takes the lock on `digest` if it is free, `Ok(None)` if someone holds it.
    pub(crate) fn try_lock_key(&self, digest: Digest) -> Result<Option<KeyLock>, CacheError> {
        let path = self.lock_path(digest);
        loop {
            let file = self.open_lock_file(&path)?;
            match file.try_lock() {
                Ok(()) if still_at(&file, &path)? => {
                    return Ok(Some(KeyLock { _file: file, path }))
                }
                Ok(()) => {}
                Err(TryLockError::WouldBlock) => return Ok(None),
                Err(TryLockError::Error(e)) => return Err(CacheError::io("lock", &path, e)),
            }
        }
    }

    fn open_lock_file(&self, path: &std::path::Path) -> Result<File, CacheError> {
        OpenOptions::new()
            .create(true)
            .truncate(false)
            .write(true)
            .open(path)
            .map_err(|e| CacheError::io("open lock file", path, e))
    }
}

/// Whether `path` still names the open `file` (it was not deleted and recreated meanwhile).
#[cfg(unix)]
fn still_at(file: &File, path: &std::path::Path) -> Result<bool, CacheError> {
    use std::os::unix::fs::MetadataExt;
    let opened = file
        .metadata()
        .map_err(|e| CacheError::io("inspect", path, e))?;
    Ok(match std::fs::metadata(path) {
        Ok(now) => now.dev() == opened.dev() && now.ino() == opened.ino(),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => false,
        Err(e) => return Err(CacheError::io("inspect", path, e)),
    })
}

/// Lock files are never deleted on this platform (see [`LOCKS_REMOVABLE`]), so the path
/// always names the file.
#[cfg(not(unix))]
fn still_at(_file: &File, _path: &std::path::Path) -> Result<bool, CacheError> {
    Ok(true)
}

/// Whether `prune` may delete unused lock files: only where [`still_at`] can tell a deleted
/// file from the one at the path.
pub(crate) const LOCKS_REMOVABLE: bool = cfg!(unix);
