//! The canonical key of a matrix's kernel lattice, for caching test sets.
//!
//! `ker_Z(A)` depends only on the rational row space of `A`. That space has a unique reduced
//! row echelon form over `Q`; scaling each of its rows to a primitive integer vector with a
//! positive leading entry keeps it unique and integral. Invariant of [`RowSpaceKey`]: `rows`
//! is exactly that form (no zero rows, pivots strictly moving right, every pivot column zero
//! outside its own row, each row primitive with positive leading entry), each of length `cols`.
//! Two matrices with the same column count get equal keys exactly when their row spaces are
//! equal, hence when their kernel lattices are equal.

use std::str::FromStr;

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};
use serde::{Deserialize, Serialize};

use crate::error::Error;
use crate::matrix::IntMatrix;

/// Canonical form of the rational row space of an integer matrix; see the module docs.
#[derive(Clone, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(try_from = "KeyRecord", into = "KeyRecord")]
pub struct RowSpaceKey {
    cols: usize,
    rows: Vec<Vec<BigInt>>,
}

/// The serialised form: entries as decimal strings, readable in any text format.
#[derive(Serialize, Deserialize)]
struct KeyRecord {
    cols: usize,
    rows: Vec<Vec<String>>,
}

/// Divides `v` by the gcd of its entries and makes its first nonzero entry positive.
fn normalise(v: &mut [BigInt]) {
    let g = v.iter().fold(BigInt::zero(), |g, x| g.gcd(x));
    if g.is_zero() {
        return;
    }
    let negative = v
        .iter()
        .find(|x| !x.is_zero())
        .is_some_and(Signed::is_negative);
    let g = if negative { -g } else { g };
    v.iter_mut().for_each(|x| *x = &*x / &g);
}

/// Fraction-free Gauss-Jordan elimination that keeps every row primitive: returns the
/// canonical rows spanning the same rational space as `w`.
fn canonical_rows(mut w: Vec<Vec<BigInt>>, cols: usize) -> Vec<Vec<BigInt>> {
    let mut r = 0;
    for c in 0..cols {
        let Some(p) = (r..w.len()).find(|&i| !w[i][c].is_zero()) else {
            continue;
        };
        w.swap(r, p);
        normalise(&mut w[r]);
        let pivot = w[r].clone();
        for (i, row) in w.iter_mut().enumerate() {
            if i == r || row[c].is_zero() {
                continue;
            }
            let g = pivot[c].gcd(&row[c]);
            let (keep, take) = (&pivot[c] / &g, &row[c] / &g);
            for (x, p) in row.iter_mut().zip(&pivot) {
                *x = &keep * &*x - &take * p;
            }
            normalise(row);
        }
        r += 1;
    }
    w.truncate(r);
    w
}

impl RowSpaceKey {
    /// The key of `a`.
    pub fn of(a: &IntMatrix) -> Self {
        let rows = a
            .to_rows()
            .into_iter()
            .map(|r| r.into_iter().map(BigInt::from).collect())
            .collect();
        Self {
            cols: a.cols(),
            rows: canonical_rows(rows, a.cols()),
        }
    }

    /// Number of columns (variables) of the matrix.
    pub fn cols(&self) -> usize {
        self.cols
    }

    /// Rank of the matrix (the number of canonical rows).
    pub fn rank(&self) -> usize {
        self.rows.len()
    }

    /// The canonical rows (see the module docs).
    pub fn rows(&self) -> &[Vec<BigInt>] {
        &self.rows
    }

    /// A stable one-line text of the key for hashing, such as `cols=4;1,0,-1,-2;0,1,2,3`:
    /// the column count, then each canonical row as decimal entries.
    pub fn canonical_text(&self) -> String {
        let mut out = format!("cols={}", self.cols);
        for row in &self.rows {
            out.push(';');
            let entries: Vec<String> = row.iter().map(ToString::to_string).collect();
            out.push_str(&entries.join(","));
        }
        out
    }
}

fn key_error(field: String, message: &str) -> Error {
    Error::Input {
        file: "<row-space key>".to_string(),
        field,
        message: message.to_string(),
    }
}

impl TryFrom<KeyRecord> for RowSpaceKey {
    type Error = Error;

    /// Parses the entries and insists that they already are in canonical form, so a damaged or
    /// hand-edited key can never compare equal to a different row space.
    fn try_from(record: KeyRecord) -> Result<Self, Error> {
        let mut rows = Vec::with_capacity(record.rows.len());
        for (i, row) in record.rows.iter().enumerate() {
            if row.len() != record.cols {
                let msg = format!("expected {} entries, found {}", record.cols, row.len());
                return Err(key_error(format!("rows[{i}]"), &msg));
            }
            let parsed = row
                .iter()
                .enumerate()
                .map(|(j, s)| {
                    BigInt::from_str(s)
                        .map_err(|_| key_error(format!("rows[{i}][{j}]"), "expected an integer"))
                })
                .collect::<Result<Vec<_>, _>>()?;
            rows.push(parsed);
        }
        if canonical_rows(rows.clone(), record.cols) != rows {
            return Err(key_error("rows".into(), "not a canonical row echelon form"));
        }
        Ok(Self {
            cols: record.cols,
            rows,
        })
    }
}

impl From<RowSpaceKey> for KeyRecord {
    fn from(key: RowSpaceKey) -> Self {
        Self {
            cols: key.cols,
            rows: key
                .rows
                .iter()
                .map(|r| r.iter().map(ToString::to_string).collect())
                .collect(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    #[test]
    fn canonical_form_of_a_worked_example() {
        // [[2, 4, 6, 8], [1, 3, 5, 7]] has reduced row echelon form [[1, 0, -1, -2],
        // [0, 1, 2, 3]] over Q (by hand; SymPy's Matrix.rref gives the same).
        let key = RowSpaceKey::of(&m(&[&[2, 4, 6, 8], &[1, 3, 5, 7]]));
        assert_eq!(key.canonical_text(), "cols=4;1,0,-1,-2;0,1,2,3");
        assert_eq!(key.rank(), 2);
    }

    #[test]
    fn rows_are_scaled_to_primitive_integers() {
        // [[0, -6, -2], [3, 3, 3]] has rref [[1, 0, 2/3], [0, 1, 1/3]] (by hand), scaled to
        // (3, 0, 2) and (0, 3, 1).
        let key = RowSpaceKey::of(&m(&[&[0, -6, -2], &[3, 3, 3]]));
        assert_eq!(key.canonical_text(), "cols=3;3,0,2;0,3,1");
    }

    #[test]
    fn zero_and_empty_matrices() {
        assert_eq!(
            RowSpaceKey::of(&IntMatrix::zeros(2, 3)).canonical_text(),
            "cols=3"
        );
        assert_eq!(
            RowSpaceKey::of(&IntMatrix::zeros(0, 0)).canonical_text(),
            "cols=0"
        );
    }

    #[test]
    fn json_round_trip_uses_decimal_strings() {
        let key = RowSpaceKey::of(&m(&[&[2, 4, 6, 8], &[1, 3, 5, 7]]));
        let text = serde_json::to_string(&key).unwrap();
        assert_eq!(
            text,
            r#"{"cols":4,"rows":[["1","0","-1","-2"],["0","1","2","3"]]}"#
        );
        let back: RowSpaceKey = serde_json::from_str(&text).unwrap();
        assert_eq!(back, key);
    }

    #[test]
    fn deserialising_rejects_bad_or_non_canonical_rows() {
        for bad in [
            r#"{"cols":2,"rows":[["1","0","0"]]}"#,
            r#"{"cols":2,"rows":[["1","x"]]}"#,
            r#"{"cols":2,"rows":[["2","4"]]}"#,
            r#"{"cols":2,"rows":[["0","1"],["1","0"]]}"#,
        ] {
            assert!(serde_json::from_str::<RowSpaceKey>(bad).is_err(), "{bad}");
        }
    }
}
