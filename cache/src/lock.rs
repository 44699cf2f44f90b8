//! Per-key advisory locks, so that concurrent builders of one key do the work once.
//!
//! The lock is an exclusive `File::lock` on `<digest>.lock` in the store directory. The lock
//! is released when its holder is dropped (or its process dies), so a crashed builder never
//! blocks others. A lock file is deleted only by a holder of its lock (the holder on release,
//! or `prune` for a crashed builder's file); so that a process that opened the file before
//! the deletion cannot then hold a lock nobody else sees, a locker checks after locking that
//! the path still names the file it locked, and starts again if not.
//!
//! The holder writes its process id and the time it took the lock into the file, so that a
//! builder that has to wait can say for whom ([`Store::lock_for_build_waiting`]).

use std::fs::{File, OpenOptions, TryLockError};
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::time::{Duration, SystemTime, UNIX_EPOCH};

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

impl KeyLock {
    /// Takes `file` (locked, still at `path`) as the held lock and records the holder in it.
    fn held(mut file: File, path: PathBuf) -> Self {
        let since = SystemTime::now()
            .duration_since(UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        // Best effort: a lock without its holder's record still locks; waiters then only say
        // that another build holds it.
        let _ = file
            .set_len(0)
            .and_then(|()| writeln!(file, "{} {since}", std::process::id()));
        Self { _file: file, path }
    }
}

/// Who holds a key's build lock, as the holder recorded it in the lock file.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct LockHolder {
    /// The holder's process id.
    pub pid: u32,
    /// When it took the lock.
    pub since: SystemTime,
}

impl LockHolder {
    /// Reads the record in the lock file at `path`; `None` when it is missing or unreadable
    /// (for example read between the holder's truncation and its write).
    fn read(path: &Path) -> Option<Self> {
        let mut text = String::new();
        File::open(path)
            .ok()?
            .take(64)
            .read_to_string(&mut text)
            .ok()?;
        let (pid, since) = text.trim_end().split_once(' ')?;
        Some(Self {
            pid: pid.parse().ok()?,
            since: UNIX_EPOCH + Duration::from_secs(since.parse().ok()?),
        })
    }
}

/// How a builder waits for a key's lock that another build holds.
pub trait LockWait {
    /// Called once, when the lock is found held, with its holder's record if readable.
    fn waiting(&mut self, holder: Option<LockHolder>);
    /// Polled while waiting; `true` gives the wait up.
    fn give_up(&mut self) -> bool;
}

/// How often a waiting builder tries the lock again.
const WAIT_POLL: Duration = Duration::from_millis(100);

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

    /// Like [`Store::lock_for_build`], but a held lock is reported to `wait` and the wait
    /// ends early, with `Ok(None)`, when `wait` gives up.
    pub fn lock_for_build_waiting(
        &self,
        key: &EntryKey,
        wait: &mut dyn LockWait,
    ) -> Result<Option<BuildGuard>, CacheError> {
        key.validate()?;
        match self.lock_key_waiting(key.digest(), wait)? {
            Some(lock) => self.guard_with(key, lock).map(Some),
            None => Ok(None),
        }
    }

    /// Like [`Store::lock_for_rebuild`], waiting as [`Store::lock_for_build_waiting`] does.
    pub fn lock_for_rebuild_waiting(
        &self,
        key: &EntryKey,
        wait: &mut dyn LockWait,
    ) -> Result<Option<BuildLock>, CacheError> {
        key.validate()?;
        Ok(self
            .lock_key_waiting(key.digest(), wait)?
            .map(|lock| self.build_lock(key, lock, None)))
    }

    /// Who holds the lock of `digest`, as recorded in its file (`None` when there is no
    /// readable record; the lock may be free).
    pub fn lock_holder(&self, digest: Digest) -> Option<LockHolder> {
        LockHolder::read(&self.lock_path(digest))
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
                return Ok(KeyLock::held(file, path));
            }
        }
    }

    /// Takes the lock on `digest`, polling while it is held: tells `wait` once who holds it,
    /// and returns `Ok(None)` when `wait` gives up.
    fn lock_key_waiting(
        &self,
        digest: Digest,
        wait: &mut dyn LockWait,
    ) -> Result<Option<KeyLock>, CacheError> {
        let mut told = false;
        loop {
            if let Some(lock) = self.try_lock_key(digest)? {
                return Ok(Some(lock));
            }
            if !told {
                wait.waiting(self.lock_holder(digest));
                told = true;
            }
            if wait.give_up() {
                return Ok(None);
            }
            std::thread::sleep(WAIT_POLL);
        }
    }

    /// Takes the lock on `digest` if it is free, `Ok(None)` if someone holds it.
    pub(crate) fn try_lock_key(&self, digest: Digest) -> Result<Option<KeyLock>, CacheError> {
        let path = self.lock_path(digest);
        loop {
            let file = self.open_lock_file(&path)?;
            match file.try_lock() {
                Ok(()) if still_at(&file, &path)? => return Ok(Some(KeyLock::held(file, path))),
                Ok(()) => {}
                Err(TryLockError::WouldBlock) => return Ok(None),
                Err(TryLockError::Error(e)) => return Err(CacheError::io("lock", &path, e)),
            }
        }
    }

    fn open_lock_file(&self, path: &Path) -> Result<File, CacheError> {
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
fn still_at(file: &File, path: &Path) -> Result<bool, CacheError> {
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
fn still_at(_file: &File, _path: &Path) -> Result<bool, CacheError> {
    Ok(true)
}

/// Whether `prune` may delete unused lock files: only where [`still_at`] can tell a deleted
/// file from the one at the path.
pub(crate) const LOCKS_REMOVABLE: bool = cfg!(unix);
