//! Reading input files (models, scenarios, variants, days, warm-start plans) without trusting
//! what is at their path.
//!
//! A FIFO, a device (a symlink to `/dev/zero`), a socket or a directory given as an input
//! would hang the reader or feed it without end. [`read_text`] checks, after following
//! symlinks, that the path is a regular file, checks again on the opened handle, and reads at
//! most [`MAX_INPUT_BYTES`]. A file whose name ends in `.gz` is decompressed (`flate2`), also
//! at most [`MAX_INPUT_BYTES`]; the path [`STDIN`] (`-`) reads standard input.

use std::fs::{self, File};
use std::io::Read;
use std::path::Path;

use flate2::read::MultiGzDecoder;

use crate::error::{Error, Result};

/// The largest input file read (1 GiB): far above any model or year of days, and a bound on
/// the memory a mistaken path can take.
pub const MAX_INPUT_BYTES: u64 = 1 << 30;

/// The path that names standard input.
pub const STDIN: &str = "-";

/// True when `path` names standard input.
pub fn is_stdin(path: &Path) -> bool {
    path.as_os_str() == STDIN
}

/// The path whose extension says the syntax: `path` without a trailing `.gz`.
pub fn syntax_path(path: &Path) -> &Path {
    match path.extension().and_then(|e| e.to_str()) {
        Some(ext) if ext.eq_ignore_ascii_case("gz") => path.file_stem().map_or(path, Path::new),
        _ => path,
    }
}

/// The text at `path` (standard input for [`STDIN`]; decompressed for a `.gz` name), at most
/// [`MAX_INPUT_BYTES`] long and UTF-8.
pub fn read_text(path: &Path) -> Result<String> {
    let bytes = if is_stdin(path) {
        bounded(std::io::stdin().lock(), path)?
    } else {
        let file = open_regular(path)?;
        if syntax_path(path) != path {
            bounded(MultiGzDecoder::new(file), path)?
        } else {
            bounded(file, path)?
        }
    };
    String::from_utf8(bytes).map_err(|e| {
        refusal(
            path,
            format!(
                "is not UTF-8 text (byte {} is invalid)",
                e.utf8_error().valid_up_to()
            ),
        )
    })
}

/// An input error about the file at `path`.
fn refusal(path: &Path, message: String) -> Error {
    Error::Input {
        file: path.display().to_string(),
        field: "file".to_string(),
        message,
    }
}

/// At most [`MAX_INPUT_BYTES`] bytes of `reader`; more is an error.
fn bounded(reader: impl Read, path: &Path) -> Result<Vec<u8>> {
    let mut bytes = Vec::new();
    reader
        .take(MAX_INPUT_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(|source| Error::Io {
            path: path.to_path_buf(),
            source,
        })?;
    if bytes.len() as u64 > MAX_INPUT_BYTES {
        return Err(refusal(
            path,
            format!("holds more than the {MAX_INPUT_BYTES} bytes read"),
        ));
    }
    Ok(bytes)
}

/// The regular file at `path`, opened, no larger than [`MAX_INPUT_BYTES`].
fn open_regular(path: &Path) -> Result<File> {
    let refuse = |message: String| refusal(path, message);
    let io = |source| Error::Io {
        path: path.to_path_buf(),
        source,
    };
    let found = fs::metadata(path).map_err(io)?;
    if !found.is_file() {
        return Err(refuse(format!(
            "is {}, not a regular file",
            cache::file_type_name(found.file_type())
        )));
    }
    let file = File::open(path).map_err(io)?;
    let opened = file.metadata().map_err(io)?;
    if !opened.is_file() {
        return Err(refuse(format!(
            "is {}, not a regular file",
            cache::file_type_name(opened.file_type())
        )));
    }
    if opened.len() > MAX_INPUT_BYTES {
        return Err(refuse(format!(
            "has {} bytes, more than the {MAX_INPUT_BYTES} read",
            opened.len()
        )));
    }
    Ok(file)
}
