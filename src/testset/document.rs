//! The JSON document of one test set, written and read back here: `build --out` writes it
//! and `cache export` prints it through [`set_document`], so the two are one document for
//! one set; [`read_set_document`] reads it with every field checked.

use std::io::Write;

use cache::{EntryKey, SetMetadata, TestSetData};
use serde::{Deserialize, Serialize};

use crate::completion::Rows;
use crate::error::{Error, Result};

/// The `format` field, naming what the document holds.
pub const SET_FORMAT: &str = "kernstep move set";

/// The layout version. Version 2 gave the `build --out` file the `digest` and `width` that
/// `cache export` printed, and left the on-disk `encoding` (which `cache show` prints) out of
/// `cache export`, so that both write this one layout. Version 3 spells the key's kind and
/// signs and the metadata's completeness in lower snake case (`"graver"`, `"free"`,
/// `"complete"`), as every JSON document of kernstep does; version 2 documents, which spelled
/// them `"Graver"`, `"Free"`, `"Complete"`, are still read.
pub const SET_VERSION: u32 = 3;

/// The oldest layout version still read.
const OLDEST_READ: u32 = 2;

/// One test set as its document holds it.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SetDocument {
    /// [`SET_FORMAT`].
    pub format: String,
    /// [`SET_VERSION`].
    pub version: u32,
    /// The key's digest in hex.
    pub digest: String,
    /// What the set is the set of.
    pub key: EntryKey,
    /// Its build facts.
    pub metadata: SetMetadata,
    /// Entries per element (the key's width).
    pub width: usize,
    /// The elements, one per `±` pair.
    pub elements: Vec<Vec<i64>>,
}

/// The document's fields as written, in order, borrowing the set.
#[derive(Serialize)]
struct Written<'a> {
    format: &'static str,
    version: u32,
    digest: String,
    key: &'a EntryKey,
    metadata: &'a SetMetadata,
    width: usize,
    elements: Rows<'a>,
}

/// The set with its key and build facts as one line of JSON, ending in a newline.
pub fn set_document(key: &EntryKey, metadata: &SetMetadata, elements: &TestSetData) -> String {
    let mut text = Vec::new();
    // Keys, metadata and integer rows always serialise, and a Vec takes every byte.
    let _ = write_set_document(&mut text, key, metadata, elements);
    String::from_utf8(text).unwrap_or_default()
}

/// [`set_document`] written to `out` as it is serialised (a set of a few hundred thousand
/// elements is tens of megabytes of text, not held whole).
pub fn write_set_document(
    out: &mut dyn Write,
    key: &EntryKey,
    metadata: &SetMetadata,
    elements: &TestSetData,
) -> std::io::Result<()> {
    let doc = Written {
        format: SET_FORMAT,
        version: SET_VERSION,
        digest: key.digest().to_hex(),
        key,
        metadata,
        width: key.width(),
        elements: Rows(elements),
    };
    serde_json::to_writer(&mut *out, &doc)?;
    out.write_all(b"\n")
}

/// Reads a set document from `text` (from the file `origin`): the format and version, the
/// digest against the key, the width against the key and every element's length. The
/// content itself (kernel membership, signs) is [`super::verify_content`]'s to check.
pub fn read_set_document(text: &str, origin: &str) -> Result<SetDocument> {
    let error = |field: &str, message: String| Error::Input {
        file: origin.to_string(),
        field: field.to_string(),
        message,
    };
    let doc: SetDocument = serde_json::from_str(text)
        .map_err(|e| error("document", format!("not a set document: {e}")))?;
    if doc.format != SET_FORMAT {
        return Err(error(
            "format",
            format!("{:?}, expected {SET_FORMAT:?}", doc.format),
        ));
    }
    if !(OLDEST_READ..=SET_VERSION).contains(&doc.version) {
        return Err(error(
            "version",
            format!(
                "{}, this build reads versions {OLDEST_READ} to {SET_VERSION}",
                doc.version
            ),
        ));
    }
    doc.key
        .validate()
        .map_err(|e| error("key", e.to_string()))?;
    if doc.digest != doc.key.digest().to_hex() {
        return Err(error("digest", "does not match the key".to_string()));
    }
    if doc.width != doc.key.width() {
        return Err(error(
            "width",
            format!("{}, the key has {} variables", doc.width, doc.key.width()),
        ));
    }
    if let Some(i) = doc.elements.iter().position(|g| g.len() != doc.width) {
        return Err(error(
            &format!("elements[{i}]"),
            format!("has {} entries, not {}", doc.elements[i].len(), doc.width),
        ));
    }
    Ok(doc)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::IntMatrix;
    use crate::network::Network;
    use crate::testset::cycles_entry;

    /// The 2 x 2 transportation matrix's entry and its one cycle `(1, -1, -1, 1)` (by hand).
    fn k22() -> (EntryKey, SetMetadata, TestSetData) {
        let a = IntMatrix::transportation(2, 2);
        let entry = cycles_entry(&a, &Network::detect(&a).unwrap()).unwrap();
        let cycle = TestSetData::from_rows(4, &[vec![1, -1, -1, 1]]).unwrap();
        (entry.key, entry.metadata, cycle)
    }

    #[test]
    fn a_written_document_reads_back_equal() {
        let (key, metadata, elements) = k22();
        let text = set_document(&key, &metadata, &elements);
        assert!(text.ends_with('\n') && text.lines().count() == 1);
        let doc = read_set_document(&text, "k22.json").unwrap();
        assert_eq!(doc.key, key);
        assert_eq!(doc.metadata, metadata);
        assert_eq!(doc.elements, elements.rows().collect::<Vec<_>>());
        assert_eq!(
            (doc.format.as_str(), doc.version, doc.width),
            (SET_FORMAT, SET_VERSION, 4)
        );
    }

    #[test]
    fn a_version_2_document_with_its_capitalised_names_reads_back_equal() {
        let (key, metadata, elements) = k22();
        let text = set_document(&key, &metadata, &elements)
            .replace("\"version\":3", "\"version\":2")
            .replace("\"cycles\"", "\"Cycles\"")
            .replace("\"free\"", "\"Free\"")
            .replace("\"complete\"", "\"Complete\"");
        assert!(
            text.contains("\"Cycles\"") && text.contains("\"Free\""),
            "{text}"
        );
        let doc = read_set_document(&text, "k22.json").unwrap();
        assert_eq!((doc.key, doc.metadata, doc.version), (key, metadata, 2));
    }

    #[test]
    fn a_tampered_document_is_refused_naming_the_field() {
        let (key, metadata, elements) = k22();
        let text = set_document(&key, &metadata, &elements);
        let digest = key.digest().to_hex();
        let cases = [
            (text.replace(&digest, &"0".repeat(digest.len())), "digest"),
            (text.replace("[1,-1,-1,1]", "[1,-1,-1]"), "elements[0]"),
            (text.replace("\"version\":3", "\"version\":1"), "version"),
            (text.replacen('{', "{\"extra\":1,", 1), "document"),
        ];
        for (bad, field) in cases {
            let err = read_set_document(&bad, "k22.json").unwrap_err().to_string();
            assert!(err.starts_with(&format!("k22.json: {field}")), "{err}");
        }
    }
}
