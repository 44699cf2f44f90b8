//! Sets kept as files: a set document (written by a build to a file, or by a cache export)
//! read back, checked in full as a foreign cache entry is ([`super::verify::verify_parts`]),
//! and then used to serve a model's solves or stored in a cache.

use std::path::Path;

use cache::{Digest, SetKind, Sign};

use super::build::BuiltSet;
use super::document::read_set_document;
use super::library::SetLibrary;
use super::serve::{Served, Source};
use super::verify::verify_parts;
use crate::completion::ElementSet;
use crate::error::{Error, Result};
use crate::input::read_text;
use crate::lattice::RowSpaceKey;
use crate::model::Model;
use crate::solve::coverage_of;

/// Reads the set document at `path` and checks it in full: the format, the key's digest and
/// every element's length ([`read_set_document`]), then the content (kernel membership,
/// signs, truncation, no duplicates, and for a complete Graver set that it generates the
/// lattice).
pub fn read_set_file(path: &Path) -> Result<BuiltSet> {
    let origin = path.display().to_string();
    let doc = read_set_document(&read_text(path)?, &origin)?;
    let set = ElementSet::from_rows(doc.width, &doc.elements)?;
    verify_parts(&doc.key, &doc.metadata, set.data(), path)?;
    Ok(BuiltSet {
        key: doc.key,
        metadata: doc.metadata,
        set,
    })
}

/// The set in the file at `path`, checked ([`read_set_file`]), serving `model`'s solves: it
/// must be a Graver set (every sign free) of the lattice of `model`'s matrix.
pub fn serve_file(model: &Model, path: &Path) -> Result<Served> {
    let built = read_set_file(path)?;
    let refuse = |field: &str, message: &str| Error::Input {
        file: path.display().to_string(),
        field: field.to_string(),
        message: message.to_string(),
    };
    if built.key.row_space != RowSpaceKey::of(&model.matrix).canonical_text() {
        return Err(refuse(
            "key.row_space",
            "the set belongs to another matrix: its lattice is not the kernel of the model's",
        ));
    }
    if built.key.kind != SetKind::Graver || built.key.signs.iter().any(|&s| s != Sign::Free) {
        return Err(refuse(
            "key.kind",
            "only a Graver set with every sign free serves solves",
        ));
    }
    let coverage = coverage_of(&built.metadata.completeness);
    let moves = built.set.moves(coverage)?;
    Ok(Served {
        coverage,
        box_limit: built.key.truncation.bounds.clone(),
        moves: std::sync::Arc::new(moves),
        source: Source::File(path.display().to_string()),
        network: None,
        set_aside: None,
    })
}

/// What [`SetLibrary::import`] stored.
#[derive(Clone, Debug, PartialEq)]
pub struct Imported {
    /// The entry's key digest.
    pub digest: Digest,
    /// Its elements.
    pub elements: usize,
    /// The damage found in an entry it replaced, if any.
    pub replaced: Option<String>,
}

impl SetLibrary {
    /// Stores the set in the file at `path` after checking it in full ([`read_set_file`]),
    /// replacing any entry under its key; the file's set is then served like one built here.
    pub fn import(&self, path: &Path) -> Result<Imported> {
        let built = read_set_file(path)?;
        let replaced = self.keep(&built)?;
        Ok(Imported {
            digest: built.key.digest(),
            elements: built.set.len(),
            replaced,
        })
    }
}
