//! The stored payload: a flat, row-major list of integer vectors of one width, kept one
//! byte per entry when every entry fits (the usual case for test sets).

use crate::error::CacheError;

/// A test set as plain data: `len()` vectors of `width` entries each, stored row after row,
/// in the narrower of two widths: `i8` when every entry fits, else `i64`. A set decoded from
/// a file of small entries stays small, so serving it copies 1 byte per entry, not 8.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TestSetData {
    width: usize,
    stored: Stored,
}

/// The entries in the width chosen for them (always the narrower one that holds them all, so
/// equal data has equal storage).
#[derive(Clone, Debug, PartialEq, Eq)]
enum Stored {
    Small(Vec<i8>),
    Full(Vec<i64>),
}

/// The flat row-major entries of a [`TestSetData`], borrowed in the width they are kept in.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Entries<'a> {
    /// Every entry fits in an `i8`.
    Small(&'a [i8]),
    /// Some entry does not fit in an `i8`.
    Full(&'a [i64]),
}

impl Entries<'_> {
    /// Number of entries.
    pub fn len(&self) -> usize {
        match self {
            Entries::Small(e) => e.len(),
            Entries::Full(e) => e.len(),
        }
    }

    /// True when there is no entry.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
}

impl TestSetData {
    /// Wraps a flat row-major buffer; `width` must be positive and divide its length.
    pub fn new(width: usize, elements: Vec<i64>) -> Result<Self, CacheError> {
        check_shape(width, elements.len())?;
        Ok(TestSetData {
            width,
            stored: narrowed(&elements).map_or(Stored::Full(elements), Stored::Small),
        })
    }

    /// [`TestSetData::new`] of the rows laid end to end, each of `width` entries (an error
    /// names the first that is not), narrowed straight from them while every entry fits one
    /// byte (no flat `i64` copy of the whole set is made then).
    pub fn from_rows(width: usize, rows: &[Vec<i64>]) -> Result<Self, CacheError> {
        let mut data = Self::empty(width)?;
        for row in rows {
            data.push_row(row)?;
        }
        Ok(data)
    }

    /// No vectors yet, of `width` entries each (positive), to be filled by
    /// [`TestSetData::push_row`].
    pub fn empty(width: usize) -> Result<Self, CacheError> {
        check_shape(width, 0)?;
        Ok(TestSetData {
            width,
            stored: Stored::Small(Vec::new()),
        })
    }

    /// Appends `row`, which must have `width` entries; the storage widens to `i64` at the
    /// first entry that does not fit one byte.
    pub fn push_row(&mut self, row: &[i64]) -> Result<(), CacheError> {
        if row.len() != self.width {
            return Err(CacheError::InvalidInput {
                field: "elements",
                problem: format!(
                    "element {} has {} entries, not {}",
                    self.len(),
                    row.len(),
                    self.width
                ),
            });
        }
        if let Stored::Small(small) = &mut self.stored {
            let start = small.len();
            small.extend(row.iter().map_while(|&v| i8::try_from(v).ok()));
            if small.len() == start + row.len() {
                return Ok(());
            }
            small.truncate(start);
            self.stored = Stored::Full(small.iter().map(|&v| i64::from(v)).collect());
        }
        if let Stored::Full(full) = &mut self.stored {
            full.extend_from_slice(row);
        }
        Ok(())
    }

    /// Wraps a flat row-major buffer of one-byte entries; `width` must be positive and
    /// divide its length.
    pub fn from_small(width: usize, elements: Vec<i8>) -> Result<Self, CacheError> {
        check_shape(width, elements.len())?;
        Ok(TestSetData {
            width,
            stored: Stored::Small(elements),
        })
    }

    /// Entries per vector (number of variables).
    pub fn width(&self) -> usize {
        self.width
    }

    /// Number of vectors.
    pub fn len(&self) -> usize {
        self.entries().len() / self.width
    }

    /// Whether the set has no vectors.
    pub fn is_empty(&self) -> bool {
        self.entries().is_empty()
    }

    /// The flat row-major entries in their stored width.
    pub fn entries(&self) -> Entries<'_> {
        match &self.stored {
            Stored::Small(e) => Entries::Small(e),
            Stored::Full(e) => Entries::Full(e),
        }
    }

    /// Vector `index`.
    pub fn row(&self, index: usize) -> Vec<i64> {
        let range = index * self.width..(index + 1) * self.width;
        match &self.stored {
            Stored::Small(e) => e[range].iter().map(|&v| i64::from(v)).collect(),
            Stored::Full(e) => e[range].to_vec(),
        }
    }

    /// The vectors one by one.
    pub fn rows(&self) -> impl ExactSizeIterator<Item = Vec<i64>> + '_ {
        (0..self.len()).map(|index| self.row(index))
    }

    /// Every entry, flat and row-major, as `i64`.
    pub fn to_elements(&self) -> Vec<i64> {
        match &self.stored {
            Stored::Small(e) => e.iter().map(|&v| i64::from(v)).collect(),
            Stored::Full(e) => e.clone(),
        }
    }
}

/// The entries one byte each, if every one fits.
fn narrowed<'a>(entries: impl IntoIterator<Item = &'a i64>) -> Option<Vec<i8>> {
    entries.into_iter().map(|&v| i8::try_from(v).ok()).collect()
}

/// Refuses a zero width or a length it does not divide.
fn check_shape(width: usize, len: usize) -> Result<(), CacheError> {
    if width == 0 || !len.is_multiple_of(width) {
        return Err(CacheError::InvalidInput {
            field: "elements",
            problem: format!("{len} entries cannot be split into vectors of width {width}"),
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shape_is_checked() {
        assert!(TestSetData::new(0, vec![]).is_err());
        assert!(TestSetData::new(3, vec![1, 2]).is_err());
        assert!(TestSetData::from_small(2, vec![1]).is_err());
        let d = TestSetData::new(2, vec![1, 2, 3, 4, 5, 6]).unwrap();
        assert_eq!(d.len(), 3);
        assert_eq!(d.rows().nth(1).unwrap(), [3, 4]);
    }

    #[test]
    fn entries_are_kept_in_the_narrower_width() {
        let small = TestSetData::new(2, vec![-128, 127, 0, 1]).unwrap();
        assert_eq!(small.entries(), Entries::Small(&[-128, 127, 0, 1]));
        assert_eq!(
            small,
            TestSetData::from_small(2, vec![-128, 127, 0, 1]).unwrap()
        );
        let full = TestSetData::new(2, vec![128, 0, 0, -1]).unwrap();
        assert_eq!(full.entries(), Entries::Full(&[128, 0, 0, -1]));
        assert_eq!(full.row(0), [128, 0]);
        assert_eq!(full.to_elements(), [128, 0, 0, -1]);
        // From rows, the same data in the same width as from the flat buffer.
        let rows = |flat: &[i64]| flat.chunks(2).map(<[i64]>::to_vec).collect::<Vec<_>>();
        assert_eq!(
            TestSetData::from_rows(2, &rows(&[-128, 127, 0, 1])).unwrap(),
            small
        );
        assert_eq!(
            TestSetData::from_rows(2, &rows(&[128, 0, 0, -1])).unwrap(),
            full
        );
        assert!(TestSetData::from_rows(0, &[vec![1]]).is_err());
        // Rows of another length are refused even where the total would divide.
        let ragged = TestSetData::from_rows(2, &[vec![1, 2, 3], vec![4]]).unwrap_err();
        assert!(
            ragged
                .to_string()
                .contains("element 0 has 3 entries, not 2"),
            "{ragged}"
        );
        // Row by row, the storage widens at the first entry beyond a byte.
        let mut grown = TestSetData::empty(2).unwrap();
        grown.push_row(&[-128, 127]).unwrap();
        assert!(matches!(grown.entries(), Entries::Small(_)));
        grown.push_row(&[5, 1 << 40]).unwrap();
        assert_eq!(grown.entries(), Entries::Full(&[-128, 127, 5, 1 << 40]));
    }
}
