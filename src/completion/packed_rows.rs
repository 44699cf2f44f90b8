//! Equal-length integer rows kept in one flat buffer, one byte per entry while every entry
//! fits (the usual case for lattice vectors of small-Δ matrices), written and read as a
//! sequence of rows: a checkpoint's working set read back costs a byte per entry, not a heap
//! vector of `i64` per element.

use std::fmt;

use cache::{CacheError, TestSetData};
use serde::de::{Deserialize, Deserializer, Error as _, SeqAccess, Visitor};
use serde::ser::{Serialize, Serializer};

use super::element_set::Rows;

/// Rows of one length, in order, kept as the cache keeps a set ([`TestSetData`]: `i8` while
/// every entry fits, `i64` from the first that does not); `None` until the first row, which
/// sets the length.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct PackedRows(Option<TestSetData>);

impl PackedRows {
    /// The rows of `rows`, which must all have one length.
    pub fn from_rows(rows: &[Vec<i64>]) -> Result<Self, CacheError> {
        let mut packed = PackedRows::default();
        for row in rows {
            packed.push(row)?;
        }
        Ok(packed)
    }

    /// Appends `row`; refused when its length is not the rows' before it.
    pub fn push(&mut self, row: &[i64]) -> Result<(), CacheError> {
        match &mut self.0 {
            Some(data) => data.push_row(row),
            None => {
                let mut data = TestSetData::empty(row.len())?;
                data.push_row(row)?;
                self.0 = Some(data);
                Ok(())
            }
        }
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.0.as_ref().map_or(0, TestSetData::len)
    }

    /// Whether there is no row.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Entries per row (0 when there is no row).
    pub fn width(&self) -> usize {
        self.0.as_ref().map_or(0, TestSetData::width)
    }

    /// The rows in order.
    pub fn rows(&self) -> impl Iterator<Item = Vec<i64>> + '_ {
        self.0.iter().flat_map(TestSetData::rows)
    }

    /// Every row as its own vector.
    pub fn to_rows(&self) -> Vec<Vec<i64>> {
        self.rows().collect()
    }
}

/// Written as a sequence of rows, each a sequence of integers: the layout of `Vec<Vec<i64>>`,
/// so that states saved before and after this type read the same.
impl Serialize for PackedRows {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        // A sequence's length goes first (bincode needs it), so the rows come from the data.
        match &self.0 {
            Some(data) => Rows(data).serialize(serializer),
            None => serializer.collect_seq(std::iter::empty::<Vec<i64>>()),
        }
    }
}

impl<'de> Deserialize<'de> for PackedRows {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        deserializer.deserialize_seq(RowsVisitor)
    }
}

/// Reads the rows one at a time into the flat buffer.
struct RowsVisitor;

impl<'de> Visitor<'de> for RowsVisitor {
    type Value = PackedRows;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("a sequence of integer rows of one length")
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<PackedRows, A::Error> {
        let mut packed = PackedRows::default();
        while let Some(row) = seq.next_element::<Vec<i64>>()? {
            packed.push(&row).map_err(A::Error::custom)?;
        }
        Ok(packed)
    }
}

#[cfg(test)]
mod tests {
    use cache::Entries;

    use super::*;

    fn bincode_of<T: Serialize>(value: &T) -> Vec<u8> {
        bincode::serde::encode_to_vec(value, bincode::config::standard()).unwrap()
    }

    #[test]
    fn rows_read_back_as_written_and_as_plain_rows() {
        for rows in [
            vec![],
            vec![vec![1, -1, 0], vec![0, 2, -3]],
            vec![vec![1, -1, 0], vec![0, 300, -3], vec![-128, 127, 5]],
        ] {
            let packed = PackedRows::from_rows(&rows).unwrap();
            assert_eq!((packed.len(), packed.to_rows()), (rows.len(), rows.clone()));
            // The layout of `Vec<Vec<i64>>`, both ways, in bincode and in JSON.
            assert_eq!(bincode_of(&packed), bincode_of(&rows));
            let (back, _): (PackedRows, usize) =
                bincode::serde::decode_from_slice(&bincode_of(&rows), bincode::config::standard())
                    .unwrap();
            assert_eq!(back, packed);
            let json = serde_json::to_string(&rows).unwrap();
            assert_eq!(serde_json::to_string(&packed).unwrap(), json);
            assert_eq!(serde_json::from_str::<PackedRows>(&json).unwrap(), packed);
        }
    }

    #[test]
    fn a_wide_entry_widens_the_rows_before_it() {
        let mut packed = PackedRows::default();
        packed.push(&[1, -2]).unwrap();
        assert!(matches!(
            packed.0.as_ref().unwrap().entries(),
            Entries::Small(_)
        ));
        packed.push(&[5, 1 << 40]).unwrap();
        assert!(matches!(
            packed.0.as_ref().unwrap().entries(),
            Entries::Full(_)
        ));
        assert_eq!(packed.to_rows(), [[1, -2], [5, 1 << 40]]);
    }

    #[test]
    fn a_row_of_another_length_is_refused() {
        let err = PackedRows::from_rows(&[vec![1, 2], vec![3]]).unwrap_err();
        assert!(
            err.to_string().contains("element 1 has 1 entries, not 2"),
            "{err}"
        );
        assert!(serde_json::from_str::<PackedRows>("[[1,2],[3]]").is_err());
    }
}
