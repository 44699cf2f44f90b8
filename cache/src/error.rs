//! The crate's one error type.
//!
//! Every variant that concerns a file names it, so that a caller can tell the user which entry
//! is damaged and fall back to solving without the cache.

use std::io;
use std::path::PathBuf;

/// Everything that can go wrong while opening, reading or writing the store.
#[derive(Debug, thiserror::Error)]
pub enum CacheError {
    /// An operating-system call on a path failed.
    #[error("cannot {action} {}: {source}", path.display())]
    Io {
        /// What was being attempted, e.g. "read" or "rename into".
        action: &'static str,
        /// The file or directory concerned.
        path: PathBuf,
        /// The underlying error.
        #[source]
        source: io::Error,
    },
    /// The store directory cannot be created or written (read-only medium, a regular file in
    /// the way, missing permissions).
    #[error("cache directory {} is not usable: {source}", dir.display())]
    DirUnusable {
        /// The directory that was requested.
        dir: PathBuf,
        /// Why it failed.
        #[source]
        source: io::Error,
    },
    /// Neither an explicit directory, nor `KERNSTEP_CACHE_DIR`, nor a home directory is known.
    #[error("no cache directory: give one explicitly or set KERNSTEP_CACHE_DIR")]
    NoDefaultDir,
    /// The file does not start with the magic bytes of this format.
    #[error("{} is not a kernstep {what} file (wrong magic bytes)", path.display())]
    BadMagic {
        /// The file concerned.
        path: PathBuf,
        /// "test-set" or "checkpoint".
        what: &'static str,
    },
    /// The file was written by a format version this build does not read.
    #[error("{} has format version {found}, this build reads version {supported}", path.display())]
    UnsupportedVersion {
        /// The file concerned.
        path: PathBuf,
        /// Version stored in the file.
        found: u16,
        /// Version this build reads and writes.
        supported: u16,
    },
    /// The file is shorter or longer than its header says.
    #[error("{} is truncated or padded: header implies {expected} bytes, file has {actual}", path.display())]
    LengthMismatch {
        /// The file concerned.
        path: PathBuf,
        /// Length implied by the header (0 when the header itself is incomplete).
        expected: u64,
        /// Length found on disk.
        actual: u64,
    },
    /// The checksum over the file contents does not match the stored one.
    #[error("{} is damaged: checksum {computed:016x} differs from stored {stored:016x}", path.display())]
    ChecksumMismatch {
        /// The file concerned.
        path: PathBuf,
        /// Checksum stored in the trailer.
        stored: u64,
        /// Checksum computed over the bytes read.
        computed: u64,
    },
    /// The key digest in the file does not match its name or the key stored inside it.
    #[error("{} holds key {found} but {expected_from} says {expected}", path.display())]
    KeyMismatch {
        /// The file concerned.
        path: PathBuf,
        /// Digest found in the file header.
        found: String,
        /// Digest expected.
        expected: String,
        /// Where the expected digest came from ("its file name", "its stored key", ...).
        expected_from: &'static str,
    },
    /// A section of a file passed its checksum but is not well formed.
    #[error("{} has a malformed {section}: {problem}", path.display())]
    Malformed {
        /// The file concerned.
        path: PathBuf,
        /// Which section ("header", "key", "metadata", "elements").
        section: &'static str,
        /// What is wrong with it.
        problem: &'static str,
    },
    /// A serialised section could not be decoded.
    #[error("{} has an undecodable {section} section: {source}", path.display())]
    Decode {
        /// The file concerned.
        path: PathBuf,
        /// Which section.
        section: &'static str,
        /// The decoder's error.
        #[source]
        source: bincode::error::DecodeError,
    },
    /// A value could not be serialised.
    #[error("cannot encode the {section} section: {source}")]
    Encode {
        /// Which section.
        section: &'static str,
        /// The encoder's error.
        #[source]
        source: bincode::error::EncodeError,
    },
    /// Data handed to the store is inconsistent (wrong lengths, bad decimal, ...).
    #[error("invalid {field}: {problem}")]
    InvalidInput {
        /// The offending field.
        field: &'static str,
        /// What is wrong with it.
        problem: String,
    },
    /// A size computation would overflow.
    #[error("size overflow while computing {what}")]
    Overflow {
        /// The quantity being computed.
        what: &'static str,
    },
    /// `insert` found an entry for the key already in place.
    #[error("an entry already exists at {}", path.display())]
    AlreadyExists {
        /// The existing file.
        path: PathBuf,
    },
    /// No entry matches the digest prefix.
    #[error("no cache entry matches '{prefix}'")]
    NotFound {
        /// The prefix given.
        prefix: String,
    },
    /// Several entries match the digest prefix.
    #[error("'{prefix}' is ambiguous: it matches {}", matches.join(", "))]
    AmbiguousPrefix {
        /// The prefix given.
        prefix: String,
        /// Every digest that matches it.
        matches: Vec<String>,
    },
    /// Something other than a regular file (a FIFO, a device, a socket, a directory) is where
    /// a cache file should be; it is never read.
    #[error("{} is {found}, not a regular file: refusing to read it as a {what}", path.display())]
    NotRegularFile {
        /// The path concerned.
        path: PathBuf,
        /// What the file should have been ("test-set", "checkpoint", ...).
        what: &'static str,
        /// What is there instead ("a FIFO", "a device", ...).
        found: &'static str,
    },
    /// The cache's secret key cannot be read, created or trusted.
    #[error("cache secret {}: {problem}", path.display())]
    Secret {
        /// The secret's file.
        path: PathBuf,
        /// What is wrong.
        problem: String,
    },
    /// Maintenance was asked of a directory without kernstep's marker that holds other files:
    /// nothing is deleted there.
    #[error("{} is not a kernstep cache directory (no {marker}, and it holds {stranger:?}, which kernstep did not write): nothing removed", dir.display())]
    ForeignDir {
        /// The directory.
        dir: PathBuf,
        /// The marker's file name.
        marker: &'static str,
        /// One file that kernstep did not write.
        stranger: String,
    },
    /// The text is not a (prefix of a) hexadecimal digest.
    #[error("'{text}' is not a hexadecimal digest or digest prefix")]
    BadDigestText {
        /// The text given.
        text: String,
    },
}

impl CacheError {
    /// Whether the error says a stored file is damaged, foreign, of another version or not a
    /// regular file at all (as opposed to an I/O failure or bad input): such a file is never
    /// used and may be rebuilt.
    pub fn is_damage(&self) -> bool {
        matches!(
            self,
            CacheError::BadMagic { .. }
                | CacheError::UnsupportedVersion { .. }
                | CacheError::LengthMismatch { .. }
                | CacheError::ChecksumMismatch { .. }
                | CacheError::KeyMismatch { .. }
                | CacheError::Malformed { .. }
                | CacheError::Decode { .. }
                | CacheError::NotRegularFile { .. }
        )
    }

    /// Builds an [`CacheError::Io`] for `path`.
    pub(crate) fn io(action: &'static str, path: impl Into<PathBuf>, source: io::Error) -> Self {
        CacheError::Io {
            action,
            path: path.into(),
            source,
        }
    }
}
