//! The stored payload: a flat, row-major list of integer vectors of one width.

use serde::{Deserialize, Serialize};

use crate::error::CacheError;

/// A test set as plain data: `elements.len() / width` vectors of `width` entries each,
/// stored row after row.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct TestSetData {
    width: usize,
    elements: Vec<i64>,
}

impl TestSetData {
    /// Wraps a flat row-major buffer; `width` must be positive and divide its length.
    pub fn new(width: usize, elements: Vec<i64>) -> Result<Self, CacheError> {
        if width == 0 || !elements.len().is_multiple_of(width) {
            return Err(CacheError::InvalidInput {
                field: "elements",
                problem: format!(
                    "{} entries cannot be split into vectors of width {width}",
                    elements.len()
                ),
            });
        }
        Ok(TestSetData { width, elements })
    }

    /// Entries per vector (number of variables).
    pub fn width(&self) -> usize {
        self.width
    }

    /// Number of vectors.
    pub fn len(&self) -> usize {
        self.elements.len() / self.width
    }

    /// Whether the set has no vectors.
    pub fn is_empty(&self) -> bool {
        self.elements.is_empty()
    }

    /// The flat row-major entries.
    pub fn elements(&self) -> &[i64] {
        &self.elements
    }

    /// The vectors one by one.
    pub fn rows(&self) -> std::slice::ChunksExact<'_, i64> {
        self.elements.chunks_exact(self.width)
    }

    /// Gives back the flat row-major buffer.
    pub fn into_elements(self) -> Vec<i64> {
        self.elements
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shape_is_checked() {
        assert!(TestSetData::new(0, vec![]).is_err());
        assert!(TestSetData::new(3, vec![1, 2]).is_err());
        let d = TestSetData::new(2, vec![1, 2, 3, 4, 5, 6]).unwrap();
        assert_eq!(d.len(), 3);
        assert_eq!(d.rows().nth(1).unwrap(), &[3, 4]);
    }
}
