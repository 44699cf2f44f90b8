//! Crash-safe file replacement: readers see the old file or the new one, never a mix.
//!
//! The bytes go to a hidden temporary file in the same directory (so the rename stays on one
//! file system), which is flushed and fsynced, then renamed over the target; finally the
//! directory itself is fsynced so the rename survives a power cut. A writer killed half-way
//! leaves only a temporary file, which listings ignore and [`Store::prune`](crate::Store::prune)
//! removes once no builder holds the key's lock.

use std::fs::{self, OpenOptions};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use crate::error::CacheError;

/// Suffix of temporary files; their names also start with a dot.
pub(crate) const TEMP_SUFFIX: &str = ".tmp";

static COUNTER: AtomicU64 = AtomicU64::new(0);

/// Writes `bytes` to `target` atomically (see the module doc): the one writer of every file
/// kernstep writes, cache files and the command line's output files alike.
pub fn write_atomic(target: &Path, bytes: &[u8]) -> Result<(), CacheError> {
    write_atomic_with(target, |out| out.write_all(bytes))
}

/// [`write_atomic`] of what `fill` writes, streamed to the temporary file through a buffer
/// (a large document need not be held in memory whole).
pub fn write_atomic_with(
    target: &Path,
    fill: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<(), CacheError> {
    // A bare file name has the empty path as its parent: the current directory.
    let dir = match target.parent() {
        Some(parent) if !parent.as_os_str().is_empty() => parent,
        _ => Path::new("."),
    };
    let temp = temp_path(target);
    let result = write_synced(&temp, fill)
        .and_then(|()| {
            fs::rename(&temp, target).map_err(|e| CacheError::io("rename into", target, e))
        })
        .and_then(|()| sync_dir(dir));
    if result.is_err() {
        // Best effort: the temporary file is invisible to readers either way.
        let _ = fs::remove_file(&temp);
    }
    result
}

/// A fresh temporary name beside `target`: `.<target name>.<pid>-<n>.tmp`, so that the file
/// is attributable to the key (and lock) of its target.
pub(crate) fn temp_path(target: &Path) -> PathBuf {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let n = COUNTER.fetch_add(1, Ordering::Relaxed);
    target.with_file_name(format!(".{name}.{}-{n}{TEMP_SUFFIX}", std::process::id()))
}

fn write_synced(
    path: &Path,
    fill: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<(), CacheError> {
    let file = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(path)
        .map_err(|e| CacheError::io("create", path, e))?;
    let mut out = BufWriter::new(file);
    fill(&mut out)
        .and_then(|()| out.into_inner().map_err(|e| e.into_error()))
        .and_then(|file| file.sync_all())
        .map_err(|e| CacheError::io("write", path, e))
}

/// Fsyncs a directory so that a rename or removal inside it is durable.
#[cfg(unix)]
pub(crate) fn sync_dir(dir: &Path) -> Result<(), CacheError> {
    fs::File::open(dir)
        .and_then(|d| d.sync_all())
        .map_err(|e| CacheError::io("sync directory", dir, e))
}

/// Directories cannot be opened for syncing on this platform; renames are durable enough.
#[cfg(not(unix))]
pub(crate) fn sync_dir(_dir: &Path) -> Result<(), CacheError> {
    Ok(())
}
