//! The store: a directory of entry files named by key digest.

use std::fs;
use std::path::{Path, PathBuf};
use std::sync::{Arc, OnceLock};

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::atomic::{self, write_atomic};
use crate::data::TestSetData;
use crate::digest::{is_hex, Digest, DIGEST_HEX_LEN};
use crate::encoding::ElementEncoding;
use crate::error::CacheError;
use crate::format::{self, key_mismatch};
use crate::key::{EntryKey, SetKind, Truncation};
use crate::location::default_dir;
use crate::metadata::{Completeness, SetMetadata};
use crate::owned::{claim, MARKER_NAME};
use crate::seal::{Provenance, Secret};
use crate::validate::check_entry;

/// File-name suffix of entries: `<digest-hex>.kset`.
pub const ENTRY_SUFFIX: &str = "kset";

/// A cache directory. Cheap to clone; every operation goes to the file system.
#[derive(Clone, Debug)]
pub struct Store {
    dir: PathBuf,
    /// `None` when the directory is kernstep's (it has the marker); else one file in it that
    /// kernstep did not write, and maintenance is refused.
    stranger: Option<String>,
    /// The secret that seals entries, read (or created) on first use.
    secret: Arc<OnceLock<Secret>>,
}

/// A checked entry as loaded from disk.
#[derive(Clone, Debug, PartialEq)]
pub struct StoredSet {
    /// Digest of the key (the file stem).
    pub digest: Digest,
    /// The key the set was stored under.
    pub key: EntryKey,
    /// Build facts.
    pub metadata: SetMetadata,
    /// The elements.
    pub data: TestSetData,
    /// How the elements were encoded on disk.
    pub encoding: ElementEncoding,
    /// File size in bytes.
    pub size_bytes: u64,
    /// Whether this cache sealed the entry; a [`Provenance::Foreign`] entry passed every
    /// check of the file but must have its content checked in full before it is used.
    pub provenance: Provenance,
}

/// One line of a listing.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct EntrySummary {
    /// Digest of the key.
    pub digest: Digest,
    /// Graver or Hilbert.
    pub kind: SetKind,
    /// Truncation of the key.
    pub truncation: Truncation,
    /// Number of stored vectors.
    pub elements: u64,
    /// Entries per vector.
    pub width: u64,
    /// Element encoding on disk.
    pub encoding: ElementEncoding,
    /// Completeness recorded at build time.
    pub completeness: Completeness,
    /// File size in bytes.
    pub size_bytes: u64,
    /// Creation time, seconds since the Unix epoch.
    pub created_unix: u64,
    /// The model the set was built for, when its builder named it.
    #[serde(default)]
    pub model: Option<String>,
}

impl StoredSet {
    /// The listing line for this entry.
    pub fn summary(&self) -> EntrySummary {
        EntrySummary {
            digest: self.digest,
            kind: self.key.kind,
            truncation: self.key.truncation.clone(),
            elements: self.data.len() as u64,
            width: self.data.width() as u64,
            encoding: self.encoding,
            completeness: self.metadata.completeness.clone(),
            size_bytes: self.size_bytes,
            created_unix: self.metadata.created_unix,
            model: self.metadata.model.clone(),
        }
    }
}

/// What [`Store::write_locked`] does with an entry already stored under the key.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Existing {
    /// Refuse with [`CacheError::AlreadyExists`].
    Refuse,
    /// Replace it atomically.
    Replace,
}

impl Store {
    /// Opens (creating if needed) the store in `dir` and checks that it is writable by
    /// creating and removing a probe file; otherwise [`CacheError::DirUnusable`]. Writes the
    /// cache marker when the directory is new, empty or holds only kernstep's files (see
    /// [`crate::FileKind`]); any other directory opens as foreign ([`Store::is_foreign`]).
    pub fn open(dir: impl Into<PathBuf>) -> Result<Store, CacheError> {
        let dir = dir.into();
        let unusable = |source| CacheError::DirUnusable {
            dir: dir.clone(),
            source,
        };
        fs::create_dir_all(&dir).map_err(unusable)?;
        // Unique per call, so threads of one process opening the store at once do not remove
        // each other's probe.
        static PROBES: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(0);
        let serial = PROBES.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        let probe = dir.join(format!(
            ".probe-{}-{serial}{}",
            std::process::id(),
            atomic::TEMP_SUFFIX
        ));
        fs::write(&probe, b"").map_err(unusable)?;
        fs::remove_file(&probe).map_err(unusable)?;
        let stranger = claim(&dir)?;
        Ok(Store {
            dir,
            stranger,
            secret: Arc::default(),
        })
    }

    /// Whether the directory lacks kernstep's marker and holds files kernstep did not write:
    /// entries load and store there, but `prune` and `remove` refuse to delete anything.
    pub fn is_foreign(&self) -> bool {
        self.stranger.is_some()
    }

    /// [`CacheError::ForeignDir`] unless the directory is kernstep's own.
    pub(crate) fn check_owned(&self) -> Result<(), CacheError> {
        match &self.stranger {
            None => Ok(()),
            Some(name) => Err(CacheError::ForeignDir {
                dir: self.dir.clone(),
                marker: MARKER_NAME,
                stranger: name.clone(),
            }),
        }
    }

    /// The cache's secret, read or created on first use.
    pub(crate) fn secret(&self) -> Result<&Secret, CacheError> {
        if let Some(secret) = self.secret.get() {
            return Ok(secret);
        }
        let secret = Secret::load_or_create(&self.dir)?;
        Ok(self.secret.get_or_init(|| secret))
    }

    /// Opens the store at [`default_dir`]`(explicit)`.
    pub fn open_default(explicit: Option<&Path>) -> Result<Store, CacheError> {
        Store::open(default_dir(explicit)?)
    }

    /// The store's directory.
    pub fn dir(&self) -> &Path {
        &self.dir
    }

    /// Where the entry with `digest` lives.
    pub fn entry_path(&self, digest: Digest) -> PathBuf {
        self.dir.join(format!("{digest}.{ENTRY_SUFFIX}"))
    }

    /// Loads the entry for exactly `key`: `Ok(None)` if there is none, an error if the file
    /// is damaged (it is never handed back). A foreign entry is handed back marked as such
    /// ([`StoredSet::provenance`]).
    pub fn load(&self, key: &EntryKey) -> Result<Option<StoredSet>, CacheError> {
        let digest = key.digest();
        let Some(set) = self.load_if_present(digest)? else {
            return Ok(None);
        };
        if &set.key != key {
            let path = self.entry_path(digest);
            return Err(key_mismatch(
                &path,
                digest,
                digest,
                "the requested key (collision)",
            ));
        }
        Ok(Some(set))
    }

    /// Loads the entry whose digest starts with `prefix` (see [`Store::resolve`]).
    pub fn load_digest(&self, prefix: &str) -> Result<StoredSet, CacheError> {
        let digest = self.resolve(prefix)?;
        self.load_if_present(digest)?
            .ok_or_else(|| CacheError::NotFound {
                prefix: prefix.to_owned(),
            })
    }

    /// Stores a new entry; [`CacheError::AlreadyExists`] if the key already has one. Waits
    /// for a builder holding the key's lock.
    pub fn insert(
        &self,
        key: &EntryKey,
        data: &TestSetData,
        metadata: &SetMetadata,
    ) -> Result<EntrySummary, CacheError> {
        self.write_locked(key, data, metadata, Existing::Refuse)
    }

    /// Stores an entry, atomically replacing any existing one (valid or damaged). Waits for a
    /// builder holding the key's lock.
    pub fn replace(
        &self,
        key: &EntryKey,
        data: &TestSetData,
        metadata: &SetMetadata,
    ) -> Result<EntrySummary, CacheError> {
        self.write_locked(key, data, metadata, Existing::Replace)
    }

    /// [`Store::insert`] and [`Store::replace`]: under the key's lock (waiting for a builder
    /// that holds it), refuses or replaces an existing entry, then writes the new one.
    fn write_locked(
        &self,
        key: &EntryKey,
        data: &TestSetData,
        metadata: &SetMetadata,
        existing: Existing,
    ) -> Result<EntrySummary, CacheError> {
        let _lock = self.lock_key(key.digest())?;
        let path = self.entry_path(key.digest());
        if existing == Existing::Refuse && path.exists() {
            return Err(CacheError::AlreadyExists { path });
        }
        self.write_entry(key, data, metadata)
    }

    /// The one digest among stored entries starting with `prefix` (hex, any case).
    pub fn resolve(&self, prefix: &str) -> Result<Digest, CacheError> {
        let wanted = prefix.to_ascii_lowercase();
        if !is_hex(&wanted) || wanted.len() > DIGEST_HEX_LEN {
            return Err(CacheError::BadDigestText {
                text: prefix.to_owned(),
            });
        }
        let mut matches: Vec<Digest> = self
            .entry_digests()?
            .into_iter()
            .filter(|d| d.to_hex().starts_with(&wanted))
            .collect();
        match matches.len() {
            0 => Err(CacheError::NotFound {
                prefix: prefix.to_owned(),
            }),
            1 => Ok(matches.remove(0)),
            _ => Err(CacheError::AmbiguousPrefix {
                prefix: prefix.to_owned(),
                matches: matches.iter().map(Digest::to_hex).collect(),
            }),
        }
    }

    /// Seals a foreign entry with this cache's key, once the caller has checked its content
    /// in full: rewrites it (waiting for a builder of the key) with the same key, metadata
    /// and elements.
    pub fn reseal(&self, set: &StoredSet) -> Result<EntrySummary, CacheError> {
        let _lock = self.lock_key(set.digest)?;
        self.write_entry(&set.key, &set.data, &set.metadata)
    }

    /// Validates and writes an entry; the caller holds the key's lock.
    pub(crate) fn write_entry(
        &self,
        key: &EntryKey,
        data: &TestSetData,
        metadata: &SetMetadata,
    ) -> Result<EntrySummary, CacheError> {
        check_entry(key, data, metadata)?;
        let bytes = format::encode_entry(key, data, metadata, self.secret()?)?;
        let digest = key.digest();
        write_atomic(&self.entry_path(digest), &bytes)?;
        Ok(EntrySummary {
            digest,
            kind: key.kind,
            truncation: key.truncation.clone(),
            elements: data.len() as u64,
            width: data.width() as u64,
            encoding: ElementEncoding::narrowest_for(data.entries()),
            completeness: metadata.completeness.clone(),
            size_bytes: bytes.len() as u64,
            created_unix: metadata.created_unix,
            model: metadata.model.clone(),
        })
    }

    /// Reads and fully checks the entry named `digest`, `Ok(None)` if the file is absent.
    pub(crate) fn load_if_present(&self, digest: Digest) -> Result<Option<StoredSet>, CacheError> {
        let path = self.entry_path(digest);
        let Some(bytes) = format::read_entry_file(&path)? else {
            return Ok(None);
        };
        let entry = format::decode_entry(&bytes, &path, digest, self.secret()?)?;
        Ok(Some(StoredSet {
            digest,
            key: entry.key,
            metadata: entry.metadata,
            data: entry.data,
            encoding: entry.encoding,
            size_bytes: bytes.len() as u64,
            provenance: entry.provenance,
        }))
    }

    /// Digests of every file named like an entry, sorted.
    pub fn entry_digests(&self) -> Result<Vec<Digest>, CacheError> {
        let mut digests = Vec::new();
        for name in self.file_names()? {
            let Some(stem) = name.strip_suffix(&format!(".{ENTRY_SUFFIX}")) else {
                continue;
            };
            if stem
                .bytes()
                .all(|b| b.is_ascii_digit() || (b'a'..=b'f').contains(&b))
            {
                if let Ok(d) = Digest::from_hex(stem) {
                    digests.push(d);
                }
            }
        }
        digests.sort();
        Ok(digests)
    }

    /// Names of the regular files in the directory.
    pub(crate) fn file_names(&self) -> Result<Vec<String>, CacheError> {
        let read = fs::read_dir(&self.dir).map_err(|e| CacheError::io("list", &self.dir, e))?;
        let mut names = Vec::new();
        for item in read {
            let item = item.map_err(|e| CacheError::io("list", &self.dir, e))?;
            if let Ok(name) = item.file_name().into_string() {
                names.push(name);
            }
        }
        Ok(names)
    }
}
