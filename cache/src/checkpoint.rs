//! Checkpoints of resumable builds: opaque caller bytes, stored with the same safety as
//! entries.
//!
//! File `<digest-hex>.kckpt`, integers little-endian:
//!
//! ```text
//! offset  size  field
//!      0     8  magic: 0x89 'K' 'C' 'K' 'P' 0x0D 0x0A 0x1A
//!      8     2  format version (u16) = 1
//!     10     2  reserved, must be 0
//!     12    16  key digest
//!     28     8  payload length P (u64)
//!     36     P  payload (the caller's state, opaque)
//!   36+P     8  XXH3-64 of every preceding byte
//! ```

use std::fs;
use std::io::ErrorKind;
use std::path::{Path, PathBuf};

use xxhash_rust::xxh3::xxh3_64;

use crate::atomic::{sync_dir, write_atomic};
use crate::digest::Digest;
use crate::error::CacheError;
use crate::format::{check_magic_version, checked_body, key_mismatch, too_short};
use crate::key::EntryKey;
use crate::owned::SET_ASIDE_SUFFIX;
use crate::safe_read::{open_regular, read_exactly, read_up_to};
use crate::store::Store;

/// File-name suffix of checkpoints.
pub const CHECKPOINT_SUFFIX: &str = "kckpt";
/// First eight bytes of every checkpoint file.
pub const CHECKPOINT_MAGIC: [u8; 8] = [0x89, b'K', b'C', b'K', b'P', 0x0D, 0x0A, 0x1A];
const VERSION: u16 = 1;
const HEAD: usize = 36;
const TRAILER: usize = 8;

/// What [`Store::load_checkpoint`] found.
#[derive(Debug)]
pub enum CheckpointState {
    /// No checkpoint for the key.
    Missing,
    /// A checked checkpoint: the caller's bytes.
    Present(Vec<u8>),
    /// A checkpoint exists but is damaged; it must be ignored (and is overwritten by the
    /// next save).
    Damaged(CacheError),
}

impl Store {
    /// Where the checkpoint for `digest` lives.
    pub fn checkpoint_path(&self, digest: Digest) -> PathBuf {
        self.dir().join(format!("{digest}.{CHECKPOINT_SUFFIX}"))
    }

    /// Saves (atomically replacing) the checkpoint for `key`.
    pub fn save_checkpoint(&self, key: &EntryKey, state: &[u8]) -> Result<(), CacheError> {
        self.save_checkpoint_with(key, state.len(), |out| out.extend_from_slice(state))
    }

    /// Saves (atomically replacing) the checkpoint for `key` whose payload `fill` appends to
    /// the file's bytes (`expected` of them, to size the buffer): a large state is written
    /// once, into the buffer the file is made from, not first into a buffer of its own.
    pub fn save_checkpoint_with(
        &self,
        key: &EntryKey,
        expected: usize,
        fill: impl FnOnce(&mut Vec<u8>),
    ) -> Result<(), CacheError> {
        let digest = key.digest();
        let mut bytes = Vec::with_capacity(HEAD + expected + TRAILER);
        bytes.extend_from_slice(&CHECKPOINT_MAGIC);
        bytes.extend_from_slice(&VERSION.to_le_bytes());
        bytes.extend_from_slice(&[0, 0]);
        bytes.extend_from_slice(&digest.0);
        bytes.extend_from_slice(&[0; 8]);
        fill(&mut bytes);
        let len = u64::try_from(bytes.len() - HEAD).map_err(|_| CacheError::Overflow {
            what: "checkpoint length",
        })?;
        bytes[HEAD - 8..HEAD].copy_from_slice(&len.to_le_bytes());
        let checksum = xxh3_64(&bytes);
        bytes.extend_from_slice(&checksum.to_le_bytes());
        write_atomic(&self.checkpoint_path(digest), &bytes)
    }

    /// Loads the checkpoint for `key`; a damaged one is reported as
    /// [`CheckpointState::Damaged`], never returned as data. `Err` only for I/O failures.
    pub fn load_checkpoint(&self, key: &EntryKey) -> Result<CheckpointState, CacheError> {
        self.load_checkpoint_of(key.digest())
    }

    /// [`Store::load_checkpoint`] by the key's digest (for listings).
    pub fn load_checkpoint_of(&self, digest: Digest) -> Result<CheckpointState, CacheError> {
        let path = self.checkpoint_path(digest);
        let bytes = match read_checkpoint_file(&path) {
            Ok(Some(bytes)) => bytes,
            Ok(None) => return Ok(CheckpointState::Missing),
            Err(e) if e.is_damage() => return Ok(CheckpointState::Damaged(e)),
            Err(e) => return Err(e),
        };
        Ok(match decode_checkpoint(&bytes, &path, digest) {
            Ok(state) => CheckpointState::Present(state.to_vec()),
            Err(e) => CheckpointState::Damaged(e),
        })
    }

    /// Where a checkpoint of `digest` set aside as unusable goes.
    pub fn set_aside_path(&self, digest: Digest) -> PathBuf {
        self.dir()
            .join(format!("{digest}.{CHECKPOINT_SUFFIX}.{SET_ASIDE_SUFFIX}"))
    }

    /// Moves the checkpoint for `key` aside (renamed to [`Store::set_aside_path`], replacing
    /// an older one there), so that a build starts over and the file stays for inspection
    /// until `prune` removes it. Returns where it went, `Ok(None)` if there was none. The
    /// caller holds the key's build lock.
    pub fn set_aside_checkpoint(&self, key: &EntryKey) -> Result<Option<PathBuf>, CacheError> {
        let digest = key.digest();
        let (from, to) = (self.checkpoint_path(digest), self.set_aside_path(digest));
        match fs::rename(&from, &to) {
            Ok(()) => sync_dir(self.dir()).map(|()| Some(to)),
            Err(e) if e.kind() == ErrorKind::NotFound => Ok(None),
            Err(e) => Err(CacheError::io("set aside", from, e)),
        }
    }

    /// Removes the checkpoint for `key`; `Ok(false)` if there was none.
    pub fn remove_checkpoint(&self, key: &EntryKey) -> Result<bool, CacheError> {
        let path = self.checkpoint_path(key.digest());
        match fs::remove_file(&path) {
            Ok(()) => sync_dir(self.dir()).map(|()| true),
            Err(e) if e.kind() == ErrorKind::NotFound => Ok(false),
            Err(e) => Err(CacheError::io("remove", path, e)),
        }
    }
}

/// Reads a checkpoint file with the checks of [`crate::format::read_entry_file`]: a regular
/// file, magic and version first, its length against the header's before the rest.
fn read_checkpoint_file(path: &Path) -> Result<Option<Vec<u8>>, CacheError> {
    let Some((mut file, file_len)) = open_regular(path, "checkpoint")? else {
        return Ok(None);
    };
    let mut bytes = vec![0u8; HEAD];
    let got = read_up_to(&mut file, &mut bytes, path)?;
    bytes.truncate(got);
    check_magic_version(
        &bytes,
        path,
        &CHECKPOINT_MAGIC,
        "checkpoint",
        VERSION..=VERSION,
    )?;
    if bytes.len() < HEAD {
        return Err(too_short(path, HEAD + TRAILER, bytes.len()));
    }
    let len = u64::from_le_bytes(bytes[28..36].try_into().expect("8 bytes"));
    let expected = len.checked_add((HEAD + TRAILER) as u64);
    if expected != Some(file_len) {
        return Err(CacheError::LengthMismatch {
            path: path.to_owned(),
            expected: expected.unwrap_or(u64::MAX),
            actual: file_len,
        });
    }
    read_exactly(&mut file, file_len - HEAD as u64, path, &mut bytes)?;
    Ok(Some(bytes))
}

fn decode_checkpoint<'a>(
    bytes: &'a [u8],
    path: &Path,
    named: Digest,
) -> Result<&'a [u8], CacheError> {
    check_magic_version(
        bytes,
        path,
        &CHECKPOINT_MAGIC,
        "checkpoint",
        VERSION..=VERSION,
    )?;
    if bytes.len() < HEAD + TRAILER {
        return Err(too_short(path, HEAD + TRAILER, bytes.len()));
    }
    let len = u64::from_le_bytes(bytes[28..36].try_into().expect("8 bytes"));
    let body = checked_body(bytes, path, len.checked_add((HEAD + TRAILER) as u64))?;
    if bytes[10..12] != [0, 0] {
        return Err(CacheError::Malformed {
            path: path.to_owned(),
            section: "header",
            problem: "reserved bytes are not zero",
        });
    }
    let found = Digest(bytes[12..28].try_into().expect("16 bytes"));
    if found != named {
        return Err(key_mismatch(path, found, named, "its file name"));
    }
    Ok(&body[HEAD..])
}
