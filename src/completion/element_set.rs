//! The elements of a finished test set, kept flat and narrow: one buffer row after row, one
//! byte per entry when every entry fits (the usual case), so that a set of a few hundred
//! thousand elements costs a few bytes per entry instead of a heap vector per element.

use augment::{Coverage, MoveSet};
use cache::{Entries, TestSetData};
use serde::ser::{Serialize, Serializer};

use super::working::Orbit;
use crate::error::Result;

/// The elements of a test set (found by a finished completion, in canonical order and sign,
/// read from the cache or from a set file), in the stored form of the cache
/// ([`TestSetData`]); the solver's validated form is [`augment::MoveSet`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ElementSet {
    data: TestSetData,
}

impl ElementSet {
    /// The set of `rows`, each of `width` entries (an error names the first that is not).
    pub fn from_rows(width: usize, rows: &[Vec<i64>]) -> Result<Self> {
        Ok(Self::from_data(TestSetData::from_rows(width, rows)?))
    }

    /// The set held by `data`.
    pub fn from_data(data: TestSetData) -> Self {
        ElementSet { data }
    }

    /// The orbits' representatives laid end to end in their order, in the narrower width
    /// that holds them all.
    pub(crate) fn from_orbits(width: usize, orbits: &[Orbit]) -> Result<Self> {
        let entries = || orbits.iter().flat_map(|o| o.rep.iter().copied());
        let small: Option<Vec<i8>> = entries().map(|x| i8::try_from(x).ok()).collect();
        let data = match small {
            Some(small) => TestSetData::from_small(width, small)?,
            None => TestSetData::new(width, entries().map(i64::from).collect())?,
        };
        Ok(Self::from_data(data))
    }

    /// Entries per element (number of variables).
    pub fn width(&self) -> usize {
        self.data.width()
    }

    /// Number of elements.
    pub fn len(&self) -> usize {
        self.data.len()
    }

    /// Whether the set has no element.
    pub fn is_empty(&self) -> bool {
        self.data.is_empty()
    }

    /// Element `index`.
    pub fn row(&self, index: usize) -> Vec<i64> {
        self.data.row(index)
    }

    /// The elements one by one.
    pub fn rows(&self) -> impl ExactSizeIterator<Item = Vec<i64>> + '_ {
        self.data.rows()
    }

    /// Every element as its own vector (for callers that want plain rows, such as tests
    /// against oracles).
    pub fn to_rows(&self) -> Vec<Vec<i64>> {
        self.rows().collect()
    }

    /// The stored form, borrowed: what the cache writes.
    pub fn data(&self) -> &TestSetData {
        &self.data
    }

    /// The solver's form of the set, read as it is kept (one byte per entry for small
    /// entries), with the coverage `coverage`.
    pub fn moves(&self, coverage: Coverage) -> Result<MoveSet> {
        moves_of(&self.data, coverage)
    }
}

/// A stored set in the solver's form, read as it is kept, with the coverage `coverage`.
pub fn moves_of(data: &TestSetData, coverage: Coverage) -> Result<MoveSet> {
    Ok(match data.entries() {
        Entries::Small(entries) => MoveSet::new(data.width(), entries, coverage),
        Entries::Full(entries) => MoveSet::new(data.width(), entries, coverage),
    }?)
}

/// The elements of a stored set as a JSON array of rows, serialised one row at a time.
pub struct Rows<'a>(pub &'a TestSetData);

impl Serialize for Rows<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> std::result::Result<S::Ok, S::Error> {
        serializer.collect_seq(self.0.rows())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_go_in_and_come_out_unchanged() {
        let rows = vec![vec![1, -1, 0], vec![0, 200, -3]];
        let set = ElementSet::from_rows(3, &rows).unwrap();
        assert_eq!((set.width(), set.len()), (3, 2));
        assert_eq!(set.to_rows(), rows);
        assert_eq!(set.row(1), [0, 200, -3]);
        assert_eq!(
            serde_json::to_string(&Rows(set.data())).unwrap(),
            "[[1,-1,0],[0,200,-3]]"
        );
    }

    #[test]
    fn a_row_of_the_wrong_length_is_named() {
        let err = ElementSet::from_rows(2, &[vec![1, 2], vec![3]]).unwrap_err();
        assert!(err.to_string().contains("element 1 has 1 entries"), "{err}");
    }

    #[test]
    fn orbits_are_kept_one_byte_per_entry_when_they_fit() {
        let orbit = |rep: Vec<i32>| Orbit {
            rep,
            symmetric: true,
        };
        let small = ElementSet::from_orbits(2, &[orbit(vec![1, -2]), orbit(vec![127, -128])]);
        let small = small.unwrap();
        assert!(matches!(small.data().entries(), Entries::Small(_)));
        assert_eq!(small.to_rows(), [[1, -2], [127, -128]]);
        let wide = ElementSet::from_orbits(2, &[orbit(vec![1, -2]), orbit(vec![300, 0])]);
        let wide = wide.unwrap();
        assert!(matches!(wide.data().entries(), Entries::Full(_)));
        assert_eq!(wide.to_rows(), [[1, -2], [300, 0]]);
    }
}
