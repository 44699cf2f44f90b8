//! Dense integer matrices as given by the user.
//!
//! Invariant: `data.len() == rows * cols`, row-major, every entry fits `i64`. The type is the
//! common currency between model files, the lattice core and the completion. Products that the
//! re-checks of every solve need (`A x`, `w^T A`) read a column-wise copy of the nonzeros, made
//! on first use and dropped by [`IntMatrix::set`]; equality, hashing and serialisation see
//! only the dense entries.

use std::hash::{Hash, Hasher};
use std::sync::OnceLock;

use serde::{Deserialize, Serialize};

use crate::error::{Error, Result};

/// A dense row-major integer matrix.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct IntMatrix {
    rows: usize,
    cols: usize,
    data: Vec<i64>,
    #[serde(skip)]
    columns: OnceLock<Columns>,
}

/// The nonzeros column by column: column `j` holds `(rows[k], values[k])` for
/// `k in starts[j]..starts[j + 1]`.
#[derive(Clone, Debug, Default)]
struct Columns {
    starts: Vec<usize>,
    rows: Vec<usize>,
    values: Vec<i64>,
}

impl PartialEq for IntMatrix {
    fn eq(&self, other: &Self) -> bool {
        (self.rows, self.cols, &self.data) == (other.rows, other.cols, &other.data)
    }
}

impl Eq for IntMatrix {}

impl Hash for IntMatrix {
    fn hash<H: Hasher>(&self, state: &mut H) {
        (self.rows, self.cols, &self.data).hash(state);
    }
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
            columns: OnceLock::new(),
        })
    }

    /// The constraint matrix of the `p x q` transportation problem: `p` supply rows, then `q`
    /// demand rows, one column per (source, sink) pair in row-major order (column `i q + k`
    /// has `1` in rows `i` and `p + k`). A network matrix: its Graver basis is the set of
    /// signed cycles of the complete bipartite graph `K_{p,q}`.
    pub fn transportation(p: usize, q: usize) -> Self {
        let mut a = Self::zeros(p + q, p * q);
        for i in 0..p {
            for k in 0..q {
                a.set(i, i * q + k, 1);
                a.set(p + k, i * q + k, 1);
            }
        }
        a
    }

    /// The `rows x cols` zero matrix.
    pub fn zeros(rows: usize, cols: usize) -> Self {
        Self {
            rows,
            cols,
            data: vec![0; rows * cols],
            columns: OnceLock::new(),
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
        self.columns = OnceLock::new();
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
        let columns = self.columns();
        let mut image = vec![0i128; self.rows];
        for (j, &v) in x.iter().enumerate().filter(|(_, &v)| v != 0) {
            let range = columns.starts[j]..columns.starts[j + 1];
            for (&i, &a) in columns.rows[range.clone()]
                .iter()
                .zip(&columns.values[range])
            {
                image[i] += i128::from(a) * i128::from(v);
            }
        }
        image
            .iter()
            .zip(b)
            .position(|(&value, &bi)| value != i128::from(bi))
            .map(|i| (i, image[i]))
    }

    /// `w^T A`, one value per column, exactly: each term is below `2^94` in absolute value
    /// for `|a| <= 2^31`, so fewer than `2^32` rows cannot overflow `i128`.
    pub fn weighted_columns(&self, w: &[i64]) -> Vec<i128> {
        assert_eq!(w.len(), self.rows, "weight length must equal the row count");
        let columns = self.columns();
        (0..self.cols)
            .map(|j| {
                let range = columns.starts[j]..columns.starts[j + 1];
                columns.rows[range.clone()]
                    .iter()
                    .zip(&columns.values[range])
                    .map(|(&i, &a)| i128::from(w[i]) * i128::from(a))
                    .sum()
            })
            .collect()
    }

    /// The column-wise copy of the nonzeros, made on first use.
    fn columns(&self) -> &Columns {
        self.columns.get_or_init(|| {
            let mut columns = Columns {
                starts: vec![0],
                ..Columns::default()
            };
            for j in 0..self.cols {
                for i in 0..self.rows {
                    let a = self.get(i, j);
                    if a != 0 {
                        columns.rows.push(i);
                        columns.values.push(a);
                    }
                }
                columns.starts.push(columns.rows.len());
            }
            columns
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
            columns: OnceLock::new(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_2_x_3_transportation_matrix_by_hand() {
        let rows = IntMatrix::transportation(2, 3).to_rows();
        assert_eq!(
            rows,
            [
                [1, 1, 1, 0, 0, 0],
                [0, 0, 0, 1, 1, 1],
                [1, 0, 0, 1, 0, 0],
                [0, 1, 0, 0, 1, 0],
                [0, 0, 1, 0, 0, 1],
            ]
        );
    }

    #[test]
    fn ragged_rows_are_rejected() {
        assert!(IntMatrix::from_rows(&[vec![1, 2], vec![3]]).is_err());
    }

    #[test]
    fn column_products_equal_the_dense_ones_and_follow_set() {
        let mut a = IntMatrix::from_rows(&[vec![1, 0, -2], vec![0, 3, 1]]).unwrap();
        // By hand: A (2, 1, 1) = (0, 4); (1, -1) A = (1, -3, -3).
        assert_eq!(a.first_unmet_row(&[2, 1, 1], &[0, 4]), None);
        assert_eq!(a.first_unmet_row(&[2, 1, 1], &[0, 5]), Some((1, 4)));
        assert_eq!(a.weighted_columns(&[1, -1]), vec![1, -3, -3]);
        a.set(0, 1, 5);
        assert_eq!(a.first_unmet_row(&[2, 1, 1], &[5, 4]), None);
        assert_eq!(a.weighted_columns(&[1, -1]), vec![1, 2, -3]);
        assert_eq!(
            a,
            IntMatrix::from_rows(&[vec![1, 5, -2], vec![0, 3, 1]]).unwrap()
        );
    }

    #[test]
    fn mul_vec_detects_overflow() {
        let a = IntMatrix::from_rows(&[vec![i64::MAX, 1]]).unwrap();
        assert_eq!(a.mul_vec(&[1, 0]), Some(vec![i64::MAX]));
        assert_eq!(a.mul_vec(&[1, 1]), None);
    }
}
