//! Column classes of a matrix: zero columns, columns equal up to sign, and parallel classes
//! (columns that are rational multiples of one another).
//!
//! Every nonzero integer column is `t * p` for a unique primitive integer vector `p` whose
//! first nonzero entry is positive and a nonzero integer `t` (the signed gcd of the column).
//! Columns with the same `p` form one parallel class.

use std::collections::{HashMap, HashSet};

use num_integer::Integer;

use crate::matrix::IntMatrix;

/// One parallel class: the members' column indices with their multipliers `t`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct ParallelClass {
    /// `(column index, t)` in increasing column order.
    pub members: Vec<(usize, i128)>,
}

/// The member of a parallel class that attains the largest minors.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct Representative {
    /// Its column index.
    pub col: usize,
    /// `|t_max| / gcd(|t_k|)` over the class: the representative's minors divided by this are
    /// the gcd of the same minors taken over every member.
    pub spread: u128,
}

impl ParallelClass {
    /// The member with the largest `|t|` (the first such one) and the class's spread.
    pub fn representative(&self) -> Representative {
        let mut best = self.members[0];
        let mut g = 0u128;
        for &m in &self.members {
            if m.1.abs() > best.1.abs() {
                best = m;
            }
            g = g.gcd(&m.1.unsigned_abs());
        }
        Representative {
            col: best.0,
            spread: best.1.unsigned_abs() / g,
        }
    }

    /// Whether every member has the same `|t|`, i.e. all members are equal up to sign.
    pub fn uniform(&self) -> bool {
        let first = self.members[0].1.abs();
        self.members.iter().all(|m| m.1.abs() == first)
    }
}

/// How the columns of a matrix group together.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct ColumnClasses {
    /// Number of zero columns.
    pub zero: usize,
    /// The first column of each set of nonzero columns equal up to sign, in increasing
    /// order; its length is the column number (`a` and `-a` counted once).
    pub up_to_sign: Vec<usize>,
    /// The parallel classes, ordered by their first member.
    pub classes: Vec<ParallelClass>,
}

impl ColumnClasses {
    /// Groups the columns of `a`.
    pub fn of(a: &IntMatrix) -> Self {
        let mut zero = 0;
        let mut signed: HashSet<Vec<i128>> = HashSet::new();
        let mut up_to_sign = Vec::new();
        let mut index: HashMap<Vec<i128>, usize> = HashMap::new();
        let mut classes: Vec<ParallelClass> = Vec::new();
        for j in 0..a.cols() {
            let col = a.col(j);
            let Some((direction, t)) = primitive(&col) else {
                zero += 1;
                continue;
            };
            if signed.insert(sign_normalised(&col)) {
                up_to_sign.push(j);
            }
            let k = *index.entry(direction).or_insert_with(|| {
                classes.push(ParallelClass {
                    members: Vec::new(),
                });
                classes.len() - 1
            });
            classes[k].members.push((j, t));
        }
        Self {
            zero,
            up_to_sign,
            classes,
        }
    }

    /// One column per parallel class, the one with the largest multiplier.
    pub fn representatives(&self) -> Vec<Representative> {
        self.classes
            .iter()
            .map(ParallelClass::representative)
            .collect()
    }

    /// Whether inside every parallel class the columns are equal up to sign.
    pub fn uniform(&self) -> bool {
        self.classes.iter().all(ParallelClass::uniform)
    }
}

/// The transpose of `a`.
pub(crate) fn transpose(a: &IntMatrix) -> IntMatrix {
    let mut t = IntMatrix::zeros(a.cols(), a.rows());
    for i in 0..a.rows() {
        for j in 0..a.cols() {
            t.set(j, i, a.get(i, j));
        }
    }
    t
}

/// The column, widened to `i128` (so negation cannot overflow) and negated when needed so
/// that its first nonzero entry is positive.
fn sign_normalised(col: &[i64]) -> Vec<i128> {
    let negative = col.iter().find(|&&v| v != 0).is_some_and(|&v| v < 0);
    let sign = if negative { -1 } else { 1 };
    col.iter().map(|&v| sign * i128::from(v)).collect()
}

/// `(p, t)` with `col = t * p`, `p` primitive with positive first nonzero entry; `None` for a
/// zero column. Works on `i128` so that negating `i64::MIN` cannot overflow.
fn primitive(col: &[i64]) -> Option<(Vec<i128>, i128)> {
    let g = col.iter().fold(0u64, |g, &v| g.gcd(&v.unsigned_abs()));
    if g == 0 {
        return None;
    }
    let first = col.iter().find(|&&v| v != 0).copied().unwrap_or(1);
    let t = if first < 0 {
        -i128::from(g)
    } else {
        i128::from(g)
    };
    let p = col.iter().map(|&v| i128::from(v) / t).collect();
    Some((p, t))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    #[test]
    fn counts_zero_signed_and_parallel_columns() {
        // Columns: (1,2), (-1,-2), (2,4), (0,0), (0,1), (0,-3). By hand: one zero column;
        // up to sign the distinct ones are (1,2), (2,4), (0,1), (0,3); parallel classes are
        // {(1,2), (-1,-2), (2,4)} and {(0,1), (0,-3)}.
        let a = m(&[&[1, -1, 2, 0, 0, 0], &[2, -2, 4, 0, 1, -3]]);
        let c = ColumnClasses::of(&a);
        assert_eq!(c.zero, 1);
        assert_eq!(c.up_to_sign, vec![0, 2, 4, 5]);
        assert_eq!(c.classes.len(), 2);
        assert_eq!(c.classes[0].members, vec![(0, 1), (1, -1), (2, 2)]);
        assert_eq!(c.classes[1].members, vec![(4, 1), (5, -3)]);
        let reps = c.representatives();
        let cols: Vec<(usize, u128)> = reps.iter().map(|r| (r.col, r.spread)).collect();
        assert_eq!(cols, vec![(2, 2), (5, 3)]);
        assert!(!c.uniform());
    }

    #[test]
    fn columns_equal_up_to_sign_are_uniform() {
        let c = ColumnClasses::of(&m(&[&[1, -1, 0], &[1, -1, 1]]));
        assert_eq!((c.zero, c.up_to_sign.len(), c.classes.len()), (0, 2, 2));
        assert!(c.uniform());
    }
}
