//! Reading cache files without trusting what is at their path.
//!
//! A FIFO, a device (a symlink to `/dev/zero`), a socket or a directory in place of a cache
//! file would hang a reader or feed it without end. Every read here first checks, after
//! following symlinks, that the path is a regular file, checks again on the opened handle,
//! and reads at most the number of bytes the caller expects.

use std::fs::{self, File};
use std::io::{ErrorKind, Read};
use std::path::Path;

use crate::error::CacheError;

/// What a non-regular file is, in words for an error message (also for the root crate's
/// input files).
pub fn file_type_name(kind: fs::FileType) -> &'static str {
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if kind.is_fifo() {
            return "a FIFO";
        }
        if kind.is_char_device() || kind.is_block_device() {
            return "a device";
        }
        if kind.is_socket() {
            return "a socket";
        }
    }
    if kind.is_dir() {
        "a directory"
    } else {
        "not a regular file"
    }
}

/// Opens `path` for reading if it is a regular file: `Ok(None)` if it does not exist,
/// [`CacheError::NotRegularFile`] for anything else at the path. Returns the file and its
/// length.
pub(crate) fn open_regular(
    path: &Path,
    what: &'static str,
) -> Result<Option<(File, u64)>, CacheError> {
    let refuse = |kind| CacheError::NotRegularFile {
        path: path.to_owned(),
        what,
        found: file_type_name(kind),
    };
    let before = match fs::metadata(path) {
        Ok(m) => m,
        Err(e) if e.kind() == ErrorKind::NotFound => return Ok(None),
        Err(e) => return Err(CacheError::io("inspect", path, e)),
    };
    if !before.is_file() {
        return Err(refuse(before.file_type()));
    }
    let file = match File::open(path) {
        Ok(f) => f,
        Err(e) if e.kind() == ErrorKind::NotFound => return Ok(None),
        Err(e) => return Err(CacheError::io("open", path, e)),
    };
    // The path may have been replaced between the check and the open.
    let opened = file
        .metadata()
        .map_err(|e| CacheError::io("inspect", path, e))?;
    if !opened.is_file() {
        return Err(refuse(opened.file_type()));
    }
    Ok(Some((file, opened.len())))
}

/// Appends exactly `len` bytes from `file` to `bytes` (read in place, without a second
/// buffer); a file that ends sooner or goes on longer (it changed since its length was
/// taken) is a [`CacheError::LengthMismatch`].
pub(crate) fn read_exactly(
    file: &mut File,
    len: u64,
    path: &Path,
    bytes: &mut Vec<u8>,
) -> Result<(), CacheError> {
    let capacity = usize::try_from(len).map_err(|_| CacheError::Overflow {
        what: "file length",
    })?;
    bytes.reserve_exact(capacity);
    let before = bytes.len();
    file.take(len.saturating_add(1))
        .read_to_end(bytes)
        .map_err(|e| CacheError::io("read", path, e))?;
    let read = (bytes.len() - before) as u64;
    if read != len {
        return Err(CacheError::LengthMismatch {
            path: path.to_owned(),
            expected: len,
            actual: read,
        });
    }
    Ok(())
}

/// Reads up to `buf.len()` bytes (fewer only at the end of the file).
pub(crate) fn read_up_to(
    file: &mut File,
    buf: &mut [u8],
    path: &Path,
) -> Result<usize, CacheError> {
    let mut filled = 0;
    while filled < buf.len() {
        match file.read(&mut buf[filled..]) {
            Ok(0) => break,
            Ok(n) => filled += n,
            Err(e) if e.kind() == ErrorKind::Interrupted => {}
            Err(e) => return Err(CacheError::io("read", path, e)),
        }
    }
    Ok(filled)
}

/// The whole of a small regular file of at most `limit` bytes (`Ok(None)` if absent); a
/// longer one is a [`CacheError::LengthMismatch`].
pub(crate) fn read_small(
    path: &Path,
    what: &'static str,
    limit: u64,
) -> Result<Option<Vec<u8>>, CacheError> {
    let Some((mut file, len)) = open_regular(path, what)? else {
        return Ok(None);
    };
    if len > limit {
        return Err(CacheError::LengthMismatch {
            path: path.to_owned(),
            expected: limit,
            actual: len,
        });
    }
    let mut bytes = Vec::new();
    read_exactly(&mut file, len, path, &mut bytes)?;
    Ok(Some(bytes))
}
