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

/// Refuses a name or id holding a control character (a line break, a tab, NUL, ...): names
/// are written into reports, tables and files line by line, where such a character could
/// pass for the start of another record.
pub fn printable(name: &str) -> std::result::Result<(), String> {
    match name.char_indices().find(|(_, c)| c.is_control()) {
        Some((at, c)) => Err(format!(
            "{name:?} holds the control character U+{:04X} at byte {at}; names must be printable",
            u32::from(c)
        )),
        None => Ok(()),
    }
}

/// Parses JSON `text` as a tree, refusing an object that names a key twice (`serde_json`
/// keeps the last silently); the error carries the line and column like any other.
pub fn parse_json(text: &str) -> serde_json::Result<serde_json::Value> {
    let mut deserializer = serde_json::Deserializer::from_str(text);
    let StrictValue(value) = serde::Deserialize::deserialize(&mut deserializer)?;
    deserializer.end()?;
    Ok(value)
}

/// A JSON tree read with unique keys.
struct StrictValue(serde_json::Value);

impl<'de> serde::Deserialize<'de> for StrictValue {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> std::result::Result<Self, D::Error> {
        d.deserialize_any(StrictVisitor).map(StrictValue)
    }
}

struct StrictVisitor;

impl<'de> serde::de::Visitor<'de> for StrictVisitor {
    type Value = serde_json::Value;

    fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        f.write_str("a JSON value")
    }

    fn visit_map<A: serde::de::MapAccess<'de>>(
        self,
        mut map: A,
    ) -> std::result::Result<Self::Value, A::Error> {
        let mut object = serde_json::Map::new();
        while let Some(key) = map.next_key::<String>()? {
            if object.contains_key(&key) {
                return Err(serde::de::Error::custom(format!(
                    "the key {key:?} appears twice in one object"
                )));
            }
            let StrictValue(value) = map.next_value()?;
            object.insert(key, value);
        }
        Ok(serde_json::Value::Object(object))
    }

    fn visit_seq<A: serde::de::SeqAccess<'de>>(
        self,
        mut seq: A,
    ) -> std::result::Result<Self::Value, A::Error> {
        let mut items = Vec::new();
        while let Some(StrictValue(value)) = seq.next_element()? {
            items.push(value);
        }
        Ok(serde_json::Value::Array(items))
    }

    fn visit_bool<E>(self, v: bool) -> std::result::Result<Self::Value, E> {
        Ok(v.into())
    }

    fn visit_i64<E>(self, v: i64) -> std::result::Result<Self::Value, E> {
        Ok(v.into())
    }

    fn visit_u64<E>(self, v: u64) -> std::result::Result<Self::Value, E> {
        Ok(v.into())
    }

    fn visit_f64<E>(self, v: f64) -> std::result::Result<Self::Value, E> {
        Ok(serde_json::Number::from_f64(v).map_or(serde_json::Value::Null, Into::into))
    }

    fn visit_str<E>(self, v: &str) -> std::result::Result<Self::Value, E> {
        Ok(v.into())
    }

    fn visit_string<E>(self, v: String) -> std::result::Result<Self::Value, E> {
        Ok(v.into())
    }

    fn visit_unit<E>(self) -> std::result::Result<Self::Value, E> {
        Ok(serde_json::Value::Null)
    }

    fn visit_none<E>(self) -> std::result::Result<Self::Value, E> {
        Ok(serde_json::Value::Null)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_with_control_characters_are_refused() {
        assert!(printable("north->harbour/dairy").is_ok());
        assert!(printable("Grüße, 北").is_ok());
        for bad in ["a\nb", "tab\t", "nul\0", "bell\u{7}", "del\u{7f}"] {
            let e = printable(bad).unwrap_err();
            assert!(e.contains("control character"), "{e}");
        }
    }

    #[test]
    fn a_key_named_twice_is_refused_with_its_line() {
        let e = parse_json("{\"a\": 1,\n \"b\": {\"c\": 2, \"c\": 3}}").unwrap_err();
        assert!(e.to_string().contains("\"c\" appears twice"), "{e}");
        assert_eq!(e.line(), 2);
        let v = parse_json("{\"a\": [1, {\"b\": null}], \"c\": -2.5}").unwrap();
        assert_eq!(v, serde_json::json!({"a": [1, {"b": null}], "c": -2.5}));
    }
}
