//! Which files of a cache directory kernstep wrote, and the marker that says the directory is
//! a kernstep cache at all.
//!
//! Maintenance (`prune`, `remove`) deletes only files whose names follow kernstep's own
//! patterns ([`FileKind`]), and only in a directory holding the marker, so a cache path given
//! by mistake (a home or project directory) never loses a file.
//!
//! The marker is `CACHEDIR.TAG` in the form of the Cache Directory Tagging Specification
//! (its signature line, which backup tools recognise), with a second line naming kernstep.
//! [`Store::open`](crate::Store::open) writes it when the directory is new or empty.
//! Migration from caches made before the marker existed: a directory holding only
//! kernstep-named files gets the marker on open as well; any other directory without it is
//! foreign, and stays usable for loading and storing but not for maintenance.

use std::fs;
use std::path::Path;

use crate::atomic::{write_atomic, TEMP_SUFFIX};
use crate::checkpoint::CHECKPOINT_SUFFIX;
use crate::digest::{Digest, DIGEST_HEX_LEN};
use crate::error::CacheError;
use crate::lock::LOCK_SUFFIX;
use crate::safe_read::read_small;
use crate::seal::SECRET_NAME;
use crate::store::ENTRY_SUFFIX;

/// File name of the marker at the root of every kernstep cache directory.
pub const MARKER_NAME: &str = "CACHEDIR.TAG";
/// Suffix added to a checkpoint's name when it is set aside as unusable.
pub const SET_ASIDE_SUFFIX: &str = "bad";
/// The marker's text: the tagging specification's signature line, then kernstep's own line.
const MARKER_TEXT: &str = "Signature: 8a477f597d28d172789f06886806bc55\n\
# This directory is a kernstep test-set cache: `kernstep cache prune` and `remove` act only\n\
# in directories with this file. See https://bford.info/cachedir/ for the tag's format.\n";
/// The line that tells kernstep's marker from another program's tag.
const MARKER_LINE: &str = "# This directory is a kernstep test-set cache";

/// A file name kernstep writes in a cache directory.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FileKind {
    /// `<digest>.kset`: a stored set.
    Entry(Digest),
    /// `<digest>.kckpt`: the saved state of an interrupted build.
    Checkpoint(Digest),
    /// `<digest>.kckpt.bad`: a checkpoint set aside as unusable.
    SetAside(Digest),
    /// `<digest>.lock`: the per-key build lock.
    Lock(Digest),
    /// `.<name>.<pid>-<n>.tmp`: a file being written; `Some` when it belongs to a key (whose
    /// lock its writer holds).
    Temp(Option<Digest>),
    /// The marker itself.
    Marker,
    /// The cache's secret key for sealing entries.
    Secret,
}

/// What a file name is, if kernstep wrote it.
pub fn classify(name: &str) -> Option<FileKind> {
    if let Some(kind) = classify_target(name) {
        return Some(kind);
    }
    let inner = name.strip_prefix('.')?.strip_suffix(TEMP_SUFFIX)?;
    let (target, serial) = inner.rsplit_once('.').unwrap_or(("", inner));
    let (pid, n) = serial
        .strip_prefix("probe-")
        .unwrap_or(serial)
        .split_once('-')?;
    if !is_decimal(pid) || !is_decimal(n) {
        return None;
    }
    let owner = match (target, classify_target(target)) {
        // Writability probes of `Store::open`, named `.probe-<pid>-<n>.tmp`.
        ("", None) if serial.starts_with("probe-") => None,
        (_, Some(FileKind::Entry(d) | FileKind::Checkpoint(d))) => Some(d),
        (_, Some(FileKind::Marker | FileKind::Secret)) => None,
        _ => return None,
    };
    Some(FileKind::Temp(owner))
}

fn classify_target(name: &str) -> Option<FileKind> {
    match name {
        MARKER_NAME => return Some(FileKind::Marker),
        SECRET_NAME => return Some(FileKind::Secret),
        _ => {}
    }
    let (stem, suffix) = name.split_once('.')?;
    if stem.len() != DIGEST_HEX_LEN || stem.bytes().any(|b| b.is_ascii_uppercase()) {
        return None;
    }
    let digest = Digest::from_hex(stem).ok()?;
    let checkpoint_aside = format!("{CHECKPOINT_SUFFIX}.{SET_ASIDE_SUFFIX}");
    Some(match suffix {
        s if s == ENTRY_SUFFIX => FileKind::Entry(digest),
        s if s == CHECKPOINT_SUFFIX => FileKind::Checkpoint(digest),
        s if s == LOCK_SUFFIX => FileKind::Lock(digest),
        s if s == checkpoint_aside => FileKind::SetAside(digest),
        _ => return None,
    })
}

fn is_decimal(text: &str) -> bool {
    !text.is_empty() && text.bytes().all(|b| b.is_ascii_digit())
}

/// Claims `dir` for kernstep: `Ok(None)` if it carries kernstep's marker, or holds nothing
/// but kernstep-named files (a new, empty or pre-marker cache; the marker is then written).
/// Otherwise the directory is foreign and the name of one file kernstep did not write is
/// returned.
pub(crate) fn claim(dir: &Path) -> Result<Option<String>, CacheError> {
    let marker = dir.join(MARKER_NAME);
    if let Some(text) = read_small(&marker, "cache marker", 4096)? {
        return Ok(if String::from_utf8_lossy(&text).contains(MARKER_LINE) {
            None
        } else {
            Some(format!("{MARKER_NAME} (another program's tag)"))
        });
    }
    let read = fs::read_dir(dir).map_err(|e| CacheError::io("list", dir, e))?;
    for item in read {
        let item = item.map_err(|e| CacheError::io("list", dir, e))?;
        let name = item.file_name();
        if name.to_str().and_then(classify).is_none() {
            return Ok(Some(name.to_string_lossy().into_owned()));
        }
    }
    write_atomic(&marker, MARKER_TEXT.as_bytes())?;
    Ok(None)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_classified() {
        let hex = "0123456789abcdef0123456789abcdef";
        let d = Digest::from_hex(hex).unwrap();
        let cases = [
            (format!("{hex}.kset"), Some(FileKind::Entry(d))),
            (format!("{hex}.kckpt"), Some(FileKind::Checkpoint(d))),
            (format!("{hex}.kckpt.bad"), Some(FileKind::SetAside(d))),
            (format!("{hex}.lock"), Some(FileKind::Lock(d))),
            (
                format!(".{hex}.kset.12-3.tmp"),
                Some(FileKind::Temp(Some(d))),
            ),
            (
                format!(".{hex}.kckpt.12-3.tmp"),
                Some(FileKind::Temp(Some(d))),
            ),
            (".probe-12-3.tmp".into(), Some(FileKind::Temp(None))),
            (".CACHEDIR.TAG.12-3.tmp".into(), Some(FileKind::Temp(None))),
            (MARKER_NAME.into(), Some(FileKind::Marker)),
            (SECRET_NAME.into(), Some(FileKind::Secret)),
            (format!("{}.kset", hex.to_uppercase()), None),
            (format!(".{hex}.lock.12-3.tmp"), None),
            (".notes.12-3.tmp".into(), None),
            (".x.tmp".into(), None),
            (format!("{hex}.kset.bak"), None),
            ("README".into(), None),
        ];
        for (name, want) in cases {
            assert_eq!(classify(&name), want, "{name}");
        }
    }
}
