//! On-disk store of test sets, keyed by what a set depends on.
//!
//! Test sets are expensive to build and cheap to reuse, so they are built once (often at
//! night) and kept here. The crate knows keys and bytes, not algorithms:
//!
//! - an [`EntryKey`] (row space text, [`SetKind`], [`Sign`] pattern, [`Truncation`]) has a
//!   stable [`Digest`] that names the file `<digest-hex>.kset`;
//! - each file holds a versioned header, the key, [`SetMetadata`] and the elements in the
//!   narrowest [`ElementEncoding`], sealed with a keyed hash under the cache's own secret and
//!   checksummed (layout in [`mod@format`]); an entry that another cache sealed, or that was
//!   edited, comes back marked [`Provenance::Foreign`] for the caller to check in full;
//! - the directory carries a marker, and maintenance touches only kernstep's own files there,
//!   never those of a build holding its key's lock ([`FileKind`], [`Store::prune`]);
//! - writes are atomic (temporary file, fsync, rename, directory fsync), builders of one key
//!   are serialised by a per-key lock ([`Store::lock_for_build`]), and every load checks the
//!   whole file (only if it is a regular file): a damaged, truncated, other-version or renamed
//!   file gives a typed [`CacheError`] naming it and is never handed back;
//! - [`Store::find_covering`] reuses a box- or norm-truncated set for instances inside its
//!   truncation;
//! - checkpoints of resumable builds are opaque checksummed bytes ([`Store::save_checkpoint`]).
//!
//! ```
//! use cache::{BuildGuard, Completeness, EntryKey, SetKind, SetMetadata, Sign, Store,
//!             TestSetData, Truncation};
//!
//! # fn main() -> Result<(), cache::CacheError> {
//! let dir = tempfile::tempdir().expect("temporary directory");
//! let store = Store::open(dir.path())?;
//! let key = EntryKey {
//!     row_space: "1 1 1".into(),
//!     kind: SetKind::Graver,
//!     signs: vec![Sign::Free; 3],
//!     truncation: Truncation::default(),
//! };
//! let metadata = SetMetadata {
//!     matrix: vec![vec![1, 1, 1]],
//!     rank: 1,
//!     delta: "1".into(),
//!     delta_exact: true,
//!     column_number: 1,
//!     norm_bound: Some(2),
//!     method: "example".into(),
//!     completeness: Completeness::Complete,
//!     build_seconds: 0.0,
//!     kernstep_version: "0.1.0".into(),
//!     created_unix: 0,
//!     model: None,
//! };
//! let set = TestSetData::new(3, vec![1, -1, 0, 1, 0, -1, 0, 1, -1])?;
//! match store.lock_for_build(&key)? {
//!     BuildGuard::Build(lock) => {
//!         lock.commit(&set, &metadata)?;
//!     }
//!     BuildGuard::Ready(_) => unreachable!("the store is new"),
//! }
//! let loaded = store.load(&key)?.expect("just stored");
//! assert_eq!(loaded.data, set);
//! # Ok(())
//! # }
//! ```
#![deny(missing_docs)]

mod atomic;
mod checkpoint;
mod covering;
mod data;
mod digest;
mod encoding;
mod error;
pub mod format;
mod key;
mod location;
mod lock;
mod maintenance;
mod metadata;
mod owned;
mod safe_read;
mod seal;
mod store;
mod validate;

pub use atomic::{write_atomic, write_atomic_with};
pub use checkpoint::{CheckpointState, CHECKPOINT_MAGIC, CHECKPOINT_SUFFIX};
pub use covering::CoverSearch;
pub use data::{Entries, TestSetData};
pub use digest::{Digest, DIGEST_HEX_LEN};
pub use encoding::ElementEncoding;
pub use error::CacheError;
pub use key::{EntryKey, SetKind, Sign, Truncation};
pub use location::{default_dir, resolve_dir, DIR_ENV};
pub use lock::{BuildGuard, BuildLock, LockHolder, LockWait, LOCK_SUFFIX};
pub use maintenance::{ExportedEntry, FileSummary, PruneReport, Verified};
pub use metadata::{Completeness, SetMetadata};
pub use owned::{classify, FileKind, MARKER_NAME, SET_ASIDE_SUFFIX};
pub use safe_read::file_type_name;
pub use seal::{Provenance, SECRET_NAME};
pub use store::{EntrySummary, Store, StoredSet, ENTRY_SUFFIX};
