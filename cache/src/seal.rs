//! The cache's secret key and the keyed hash (keyed BLAKE3) that seals each entry.
//!
//! A checksum catches damage but not an edit: anyone can recompute it. The seal is a keyed
//! hash under a 32-byte secret that each cache directory creates on first use
//! (`kernstep.secret`, mode 0600, readable by its owner only). An entry whose seal does not
//! verify under this cache's secret was not written by this cache (copied in from another
//! one, or edited): it is reported as [`Provenance::Foreign`], and the caller must check its
//! content in full before using it.

use std::fs::{self, OpenOptions};
use std::io::{ErrorKind, Write};
use std::path::Path;

use crate::atomic::{sync_dir, temp_path};
use crate::error::CacheError;
use crate::safe_read::read_small;

/// File name of the cache's secret key.
pub const SECRET_NAME: &str = "kernstep.secret";
/// Bytes of a seal.
pub(crate) const SEAL_LEN: usize = blake3::OUT_LEN;

/// Whether an entry carries this cache's seal.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Provenance {
    /// Sealed by this cache: written by kernstep here and unchanged since.
    Sealed,
    /// Checksum intact but not sealed by this cache (another cache's entry, or an edited
    /// one): use only after a full check of its content.
    Foreign,
}

/// A cache's secret key.
#[derive(Clone)]
pub(crate) struct Secret([u8; blake3::KEY_LEN]);

impl std::fmt::Debug for Secret {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("Secret(..)")
    }
}

impl Secret {
    /// A fixed secret for unit tests.
    #[cfg(test)]
    pub(crate) fn fixed() -> Secret {
        Secret([7; blake3::KEY_LEN])
    }

    /// The seal of `body`.
    pub(crate) fn seal(&self, body: &[u8]) -> [u8; SEAL_LEN] {
        *blake3::keyed_hash(&self.0, body).as_bytes()
    }

    /// Whether `seal` is the seal of `body` (compared in constant time).
    pub(crate) fn verifies(&self, body: &[u8], seal: &[u8; SEAL_LEN]) -> Provenance {
        if blake3::keyed_hash(&self.0, body) == blake3::Hash::from_bytes(*seal) {
            Provenance::Sealed
        } else {
            Provenance::Foreign
        }
    }

    /// Reads the secret of the cache in `dir`, creating it if there is none yet.
    pub(crate) fn load_or_create(dir: &Path) -> Result<Secret, CacheError> {
        let path = dir.join(SECRET_NAME);
        if let Some(secret) = Secret::read(&path)? {
            return Ok(secret);
        }
        let mut key = [0u8; blake3::KEY_LEN];
        getrandom::fill(&mut key).map_err(|e| CacheError::Secret {
            path: path.clone(),
            problem: format!("no random bytes from the system: {e}"),
        })?;
        let temp = temp_path(&path);
        let created = write_private(&temp, &key).and_then(|()| {
            // A link fails if another process created the secret meanwhile: theirs wins.
            match fs::hard_link(&temp, &path) {
                Ok(()) => sync_dir(dir),
                Err(e) if e.kind() == ErrorKind::AlreadyExists => Ok(()),
                Err(e) => Err(CacheError::io("create", &path, e)),
            }
        });
        let _ = fs::remove_file(&temp);
        created?;
        Secret::read(&path)?.ok_or_else(|| CacheError::Secret {
            path,
            problem: "vanished right after it was created".into(),
        })
    }

    fn read(path: &Path) -> Result<Option<Secret>, CacheError> {
        let bad = |problem: String| CacheError::Secret {
            path: path.to_owned(),
            problem,
        };
        let Some(bytes) = read_small(path, "cache secret", blake3::KEY_LEN as u64)? else {
            return Ok(None);
        };
        let key: [u8; blake3::KEY_LEN] = bytes
            .try_into()
            .map_err(|b: Vec<u8>| bad(format!("{} bytes instead of 32", b.len())))?;
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            let mode = fs::metadata(path)
                .map_err(|e| CacheError::io("inspect", path, e))?
                .permissions()
                .mode();
            if mode & 0o077 != 0 {
                return Err(bad(format!(
                    "mode {:o} lets others read it; run `chmod 600` on it",
                    mode & 0o777
                )));
            }
        }
        Ok(Some(Secret(key)))
    }
}

fn write_private(path: &Path, bytes: &[u8]) -> Result<(), CacheError> {
    let mut options = OpenOptions::new();
    options.write(true).create_new(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        options.mode(0o600);
    }
    let mut file = options
        .open(path)
        .map_err(|e| CacheError::io("create", path, e))?;
    file.write_all(bytes)
        .and_then(|()| file.sync_all())
        .map_err(|e| CacheError::io("write", path, e))
}
