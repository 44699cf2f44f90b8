//! Reading input files (models, scenarios, variants, days, warm-start plans) without trusting
//! what is at their path.
//!
//! A FIFO, a device (a symlink to `/dev/zero`), a socket or a directory given as an input
//! would hang the reader or feed it without end. [`read_text`] checks, after following
//! symlinks, that the path is a regular file, checks again on the opened handle, and reads at
//! most [`MAX_INPUT_BYTES`].

use std::fs::{self, File};
use std::io::Read;
use std::path::Path;

use crate::error::{Error, Result};

/// The largest input file read (1 GiB): far above any model or year of days, and a bound on
/// the memory a mistaken path can take.
pub const MAX_INPUT_BYTES: u64 = 1 << 30;

/// The text of the regular file at `path`, at most [`MAX_INPUT_BYTES`] long and UTF-8.
pub fn read_text(path: &Path) -> Result<String> {
    let refuse = |message: String| Error::Input {
        file: path.display().to_string(),
        field: "file".to_string(),
        message,
    };
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
    let mut bytes = Vec::with_capacity(usize::try_from(opened.len()).unwrap_or(0));
    file.take(MAX_INPUT_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(io)?;
    if bytes.len() as u64 > MAX_INPUT_BYTES {
        return Err(refuse(format!(
            "grew past {MAX_INPUT_BYTES} bytes while read"
        )));
    }
    String::from_utf8(bytes).map_err(|e| {
        refuse(format!(
            "is not UTF-8 text (byte {} is invalid)",
            e.utf8_error().valid_up_to()
        ))
    })
}
