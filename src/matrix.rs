//! Dense integer matrices as given by the user.
//!
//! Invariant: `data.len() == rows * cols`, row-major, every entry fits `i64`. The type is the
//! common currency between model files, the lattice core and the completion.

use serde::{Deserialize, Serialize};

use crate::error::{Error, Result};

/// A dense row-major integer matrix.
#[derive(Clone, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub struct IntMatrix {
    rows: usize,
    cols: usize,
    data: Vec<i64>,
}

impl IntMatrix {
    /// Builds a matrix from rows; all rows must have the same length.
    pub fn from_rows(rows: &[Vec<i64>]) -> Result<Self> {
        let cols = rows.first().map_or(0, Vec::len);
        if let Some((i, r)) = rows.iter().enumerate().find(|(_, r)| r.len() != cols) {
            return Err(Error::Dimension(format!(
                "row {i} has {} entries, row 0 has {cols}",
                r.len()
            )));
        }
        Ok(Self {
            rows: rows.len(),
            cols,
            data: rows.concat(),
        })
    }

    /// The `rows x cols` zero matrix.
    pub fn zeros(rows: usize, cols: usize) -> Self {
        Self {
            rows,
            cols,
            data: vec![0; rows * cols],
        }
    }

    /// Number of rows.
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Number of columns (variables).
    pub fn cols(&self) -> usize {
        self.cols
    }

    /// Entry `(i, j)`.
    pub fn get(&self, i: usize, j: usize) -> i64 {
        self.data[i * self.cols + j]
    }

    /// Sets entry `(i, j)`.
    pub fn set(&mut self, i: usize, j: usize, value: i64) {
        self.data[i * self.cols + j] = value;
    }

    /// Row `i` as a slice.
    pub fn row(&self, i: usize) -> &[i64] {
        &self.data[i * self.cols..(i + 1) * self.cols]
    }

    /// Column `j`, copied.
    pub fn col(&self, j: usize) -> Vec<i64> {
        (0..self.rows).map(|i| self.get(i, j)).collect()
    }

    /// All rows, copied.
    pub fn to_rows(&self) -> Vec<Vec<i64>> {
        (0..self.rows).map(|i| self.row(i).to_vec()).collect()
    }

    /// Largest absolute entry (0 for an empty matrix).
    pub fn max_abs(&self) -> u64 {
        self.data
            .iter()
            .map(|v| v.unsigned_abs())
            .max()
            .unwrap_or(0)
    }

    /// `A x` with checked arithmetic; `None` on overflow.
    pub fn mul_vec(&self, x: &[i64]) -> Option<Vec<i64>> {
        assert_eq!(
            x.len(),
            self.cols,
            "vector length must equal the column count"
        );
        (0..self.rows)
            .map(|i| {
                self.row(i).iter().zip(x).try_fold(0i64, |acc, (&a, &v)| {
                    a.checked_mul(v).and_then(|p| acc.checked_add(p))
                })
            })
            .collect()
    }

    /// The first row `i` where `(A x)_i != b_i`, with the exact value of `(A x)_i`; `None`
    /// when `A x = b`. Computed in `i128`, which cannot overflow for `|a| <= 2^31` and fewer
    /// than `2^32` columns, so a wrong point is always caught.
    pub fn first_unmet_row(&self, x: &[i64], b: &[i64]) -> Option<(usize, i128)> {
        assert_eq!(
            x.len(),
            self.cols,
            "point length must equal the column count"
        );
        assert_eq!(
            b.len(),
            self.rows,
            "right-hand side length must equal the row count"
        );
        (0..self.rows).find_map(|i| {
            let value = self
                .row(i)
                .iter()
                .zip(x)
                .map(|(&a, &v)| i128::from(a) * i128::from(v))
                .sum::<i128>();
            (value != i128::from(b[i])).then_some((i, value))
        })
    }

    /// The matrix formed by the given columns, in the given order.
    pub fn select_cols(&self, cols: &[usize]) -> Self {
        let mut out = Self::zeros(self.rows, cols.len());
        for i in 0..self.rows {
            for (k, &j) in cols.iter().enumerate() {
                out.set(i, k, self.get(i, j));
            }
        }
        out
    }

    /// The matrix formed by the given rows, in the given order.
    pub fn select_rows(&self, rows: &[usize]) -> Self {
        let data = rows.iter().flat_map(|&i| self.row(i).to_vec()).collect();
        Self {
            rows: rows.len(),
            cols: self.cols,
            data,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ragged_rows_are_rejected() {
        assert!(IntMatrix::from_rows(&[vec![1, 2], vec![3]]).is_err());
    }

    #[test]
    fn mul_vec_detects_overflow() {
        let a = IntMatrix::from_rows(&[vec![i64::MAX, 1]]).unwrap();
        assert_eq!(a.mul_vec(&[1, 0]), Some(vec![i64::MAX]));
        assert_eq!(a.mul_vec(&[1, 1]), None);
    }
}
