//! The JSON document of one test set. `build --out` writes it and `cache export` prints it,
//! both through [`set_document`], so the two are the same document for the same set.

use cache::{EntryKey, SetMetadata};
use serde::Serialize;

/// The `format` field, naming what the document holds.
const FORMAT: &str = "kernstep move set";

/// The layout version. Version 2 gave the `build --out` file the `digest` and `width` that
/// `cache export` printed, and left the on-disk `encoding` (which `cache show` prints) out of
/// `cache export`, so that both write this one layout.
const VERSION: u32 = 2;

/// The document's fields, in the order they are written.
#[derive(Serialize)]
struct SetDocument<'a> {
    format: &'static str,
    version: u32,
    digest: String,
    key: &'a EntryKey,
    metadata: &'a SetMetadata,
    width: usize,
    elements: &'a [Vec<i64>],
}

/// The set with its key and build facts as one line of JSON, ending in a newline.
pub fn set_document(
    key: &EntryKey,
    metadata: &SetMetadata,
    elements: &[Vec<i64>],
) -> anyhow::Result<String> {
    let doc = SetDocument {
        format: FORMAT,
        version: VERSION,
        digest: key.digest().to_hex(),
        key,
        metadata,
        width: key.width(),
        elements,
    };
    let mut text = serde_json::to_string(&doc)?;
    text.push('\n');
    Ok(text)
}
