//! The start of project-and-lift: components on which the projection of the lattice is
//! injective, chosen so that the projected lattice has small index in `Z^d`.
//!
//! For a basis `K` (d x n) of the lattice and columns `σ` with `det K_σ != 0`, the projection
//! to `σ` is injective and its image has index `|det K_σ|` in `Z^d`. Exchanging a column
//! `i ∈ σ` for `k ∉ σ` multiplies the determinant by the entry `(i, k)` of `K_σ^{-1} K`
//! (Cramer's rule), so repeated exchanges with entries of absolute value below 1 lower the
//! index. With index 1 the rows of `K_σ^{-1} K` are lattice vectors whose projections are the
//! unit vectors: the Graver basis of `Z^d` is `±` those, and no start completion is needed.

use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

use crate::error::{Error, Result};

/// An injective projection of the lattice and what is known about its image.
#[derive(Clone, Debug)]
pub(crate) struct Projection {
    /// The chosen components `σ`, in increasing order.
    pub comps: Vec<usize>,
    /// When the index is 1: lattice vectors whose projections are the unit vectors of `σ`.
    pub unit_lifts: Option<Vec<Vec<i64>>>,
}

/// Chooses `σ` for the lattice with basis `basis` (rows, linearly independent).
pub(crate) fn choose(basis: &[Vec<i64>]) -> Result<Projection> {
    let d = basis.len();
    let n = basis.first().map_or(0, Vec::len);
    let mut rows: Vec<Vec<BigRational>> = basis
        .iter()
        .map(|r| {
            r.iter()
                .map(|&v| BigRational::from_integer(v.into()))
                .collect()
        })
        .collect();
    let mut comps = Vec::with_capacity(d);
    let mut index = BigRational::one();
    for r in 0..d {
        let Some(c) = (0..n).find(|&c| !comps.contains(&c) && !rows[r][c].is_zero()) else {
            return Err(Error::Dimension("lattice basis rows are dependent".into()));
        };
        index *= rows[r][c].abs();
        pivot(&mut rows, r, c);
        comps.push(c);
    }
    while let Some((r, k)) = best_exchange(&rows, &comps) {
        index *= rows[r][k].abs();
        pivot(&mut rows, r, k);
        comps[r] = k;
    }
    let index = index.to_integer();
    let unit_lifts = if index.is_one() {
        Some(integral_rows(&rows)?)
    } else {
        None
    };
    let mut order: Vec<usize> = (0..d).collect();
    order.sort_by_key(|&r| comps[r]);
    let unit_lifts = unit_lifts.map(|l| order.iter().map(|&r| l[r].clone()).collect());
    comps.sort_unstable();
    Ok(Projection { comps, unit_lifts })
}

/// Gauss-Jordan step: scale row `r` so that entry `c` is 1 and clear column `c` elsewhere.
fn pivot(rows: &mut [Vec<BigRational>], r: usize, c: usize) {
    let p = rows[r][c].clone();
    for v in rows[r].iter_mut() {
        *v /= &p;
    }
    let pivot_row = rows[r].clone();
    for (i, row) in rows.iter_mut().enumerate() {
        if i == r || row[c].is_zero() {
            continue;
        }
        let f = row[c].clone();
        for (v, pv) in row.iter_mut().zip(&pivot_row) {
            *v -= &f * pv;
        }
    }
}

/// The exchange `(row, column)` that lowers the index most, if any lowers it.
fn best_exchange(rows: &[Vec<BigRational>], comps: &[usize]) -> Option<(usize, usize)> {
    let mut best: Option<(BigRational, usize, usize)> = None;
    for (r, row) in rows.iter().enumerate() {
        for (k, v) in row.iter().enumerate() {
            if comps.contains(&k) || v.is_zero() || v.abs() >= BigRational::one() {
                continue;
            }
            if best.as_ref().is_none_or(|(b, _, _)| v.abs() < *b) {
                best = Some((v.abs(), r, k));
            }
        }
    }
    best.map(|(_, r, k)| (r, k))
}

fn integral_rows(rows: &[Vec<BigRational>]) -> Result<Vec<Vec<i64>>> {
    rows.iter()
        .map(|row| {
            row.iter()
                .map(|v| {
                    debug_assert!(v.is_integer(), "index 1 makes K_σ^-1 K integral");
                    v.to_integer().to_i64().ok_or_else(|| {
                        Error::Overflow("lifting the unit vectors of the projection".into())
                    })
                })
                .collect()
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn twisted_cubic_kernel_has_a_unimodular_projection() {
        // ker [[1,1,1,1],[0,1,2,3]] is spanned by (1,-2,1,0) and (0,1,-2,1) (Sturmfels 1996).
        let p = choose(&[vec![1, -2, 1, 0], vec![0, 1, -2, 1]]).unwrap();
        let lifts = p.unit_lifts.unwrap();
        for (r, lift) in lifts.iter().enumerate() {
            for (s, &c) in p.comps.iter().enumerate() {
                assert_eq!(lift[c], i64::from(r == s));
            }
        }
    }

    #[test]
    fn index_two_when_no_unimodular_choice_exists() {
        // ker [2 3]... rank one lattice spanned by (3, -2): every projection has index 2 or 3.
        let p = choose(&[vec![3, -2]]).unwrap();
        assert!(p.unit_lifts.is_none());
        assert_eq!(p.comps, vec![1]);
    }
}
