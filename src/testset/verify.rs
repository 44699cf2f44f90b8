//! The full check of a stored set's content against its key: what makes an entry this cache
//! did not seal (copied in, or edited) safe to use, and what `cache verify` runs.
//!
//! The `cache` crate checks the file (checksum, seal, key, layout) but knows no algebra. Here:
//!
//! - the stored matrix has the key's width and its row space is the key's (so `ker(A)` is the
//!   lattice the key names);
//! - every element is nonzero, lies in `ker(A)` (exact, in `i128` with checked arithmetic),
//!   satisfies the key's signs and truncation, and no two are equal or opposite (one of each
//!   `±` pair is stored);
//! - a network entry ([`SetKind::Cycles`]) is of a network matrix;
//! - a complete Graver set (every sign free, no truncation, recorded complete) generates
//!   `ker_Z(A)`: a subset of a test set of every instance must at least connect all of the
//!   lattice's points (Sturmfels, "Gröbner Bases and Convex Polytopes", 1996, ch. 4; Graver
//!   1975). Elements are taken in stored order, written in the coordinates of an echelon
//!   basis of the kernel, and added to a Hermite form of the lattice they generate, stopping
//!   as soon as it is all of `Z^d` (usually after a few elements). Once that form has full
//!   rank with determinant `D`, `D Z^d` lies in the generated lattice, so entries are reduced
//!   modulo `D` and stay small (Domich, Kannan, Trotter 1987).
//!
//! An empty or partial Graver set, an element outside the kernel, a duplicate or a sign
//! violation is thus refused, whatever its checksum says.

use std::collections::HashSet;
use std::path::Path;

use cache::{Completeness, EntryKey, SetKind, SetMetadata, Sign, StoredSet, TestSetData};
use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, Zero};

use crate::error::{Error, Result};
use crate::lattice::{HermiteForm, RowSpaceKey};
use crate::matrix::IntMatrix;
use crate::network::Network;

/// What is checked: a key, its build facts and the elements.
struct Content<'a> {
    key: &'a EntryKey,
    metadata: &'a SetMetadata,
    data: &'a TestSetData,
}

/// Checks the content of `set`, read from `path`, in full (see the module doc); the error
/// names the file and the field that fails.
pub fn verify_content(set: &StoredSet, path: &Path) -> Result<()> {
    verify_parts(&set.key, &set.metadata, &set.data, path)
}

/// Checks a set given as its parts (a set document read back), as [`verify_content`] does.
pub fn verify_parts(
    key: &EntryKey,
    metadata: &SetMetadata,
    data: &TestSetData,
    path: &Path,
) -> Result<()> {
    let set = &Content {
        key,
        metadata,
        data,
    };
    let fail = |field: String, message: String| Error::Input {
        file: path.display().to_string(),
        field,
        message,
    };
    let width = set.key.width();
    let a = stored_matrix(&set.metadata.matrix, width)
        .map_err(|m| fail("metadata.matrix".into(), m))?;
    if RowSpaceKey::of(&a).canonical_text() != set.key.row_space {
        return Err(fail(
            "metadata.matrix".into(),
            "its row space is not the one the key names".into(),
        ));
    }
    if set.key.kind == SetKind::Cycles {
        Network::detect(&a).map_err(|why| {
            fail(
                "metadata.matrix".into(),
                format!("a network entry of a matrix that is not a network: {why}"),
            )
        })?;
    }
    let mut seen = HashSet::with_capacity(set.data.len());
    for (i, e) in set.data.rows().enumerate() {
        check_element(&a, set, &e).map_err(|m| fail(format!("elements[{i}]"), m))?;
        if !seen.insert(oriented(&e)) {
            return Err(fail(
                format!("elements[{i}]"),
                "equals an earlier element or its negation".into(),
            ));
        }
    }
    let complete_graver = set.key.kind == SetKind::Graver
        && set.key.signs.iter().all(|&s| s == Sign::Free)
        && set.key.truncation == cache::Truncation::default()
        && set.metadata.completeness == Completeness::Complete;
    if complete_graver && !generates_kernel(&a, set) {
        return Err(fail(
            "elements".into(),
            format!(
                "the {} elements do not generate the kernel lattice, so they are not its complete Graver basis",
                set.data.len()
            ),
        ));
    }
    Ok(())
}

/// The stored matrix as an [`IntMatrix`] of `width` columns (no rows: the zero matrix).
fn stored_matrix(rows: &[Vec<i64>], width: usize) -> std::result::Result<IntMatrix, String> {
    if rows.is_empty() {
        return Ok(IntMatrix::zeros(0, width));
    }
    let a = IntMatrix::from_rows(rows).map_err(|e| e.to_string())?;
    if a.cols() != width {
        return Err(format!(
            "{} columns, the key has {width} variables",
            a.cols()
        ));
    }
    Ok(a)
}

/// One element against the matrix and the key.
fn check_element(a: &IntMatrix, set: &Content<'_>, e: &[i64]) -> std::result::Result<(), String> {
    if e.iter().all(|&x| x == 0) {
        return Err("is zero".into());
    }
    for r in 0..a.rows() {
        let dot = a
            .row(r)
            .iter()
            .zip(e)
            .try_fold(0i128, |acc, (&x, &y)| {
                acc.checked_add(i128::from(x) * i128::from(y))
            })
            .ok_or("overflows 128 bits in A x")?;
        if dot != 0 {
            return Err(format!(
                "is not in the kernel of the matrix (row {r} gives {dot})"
            ));
        }
    }
    for (j, (&x, &s)) in e.iter().zip(&set.key.signs).enumerate() {
        let violates = match s {
            Sign::Free => false,
            Sign::NonNegative => x < 0,
            Sign::NonPositive => x > 0,
        };
        if violates {
            return Err(format!("entry {j} = {x} violates the key's sign {s:?}"));
        }
    }
    let truncation = &set.key.truncation;
    if let Some(bounds) = &truncation.bounds {
        if let Some(j) = (0..e.len()).find(|&j| e[j].unsigned_abs() > bounds[j]) {
            return Err(format!(
                "|entry {j}| is above the key's box bound {}",
                bounds[j]
            ));
        }
    }
    if let Some(limit) = truncation.norm_limit {
        let norm = e
            .iter()
            .try_fold(0u64, |acc, x| acc.checked_add(x.unsigned_abs()))
            .ok_or("its l1 norm overflows")?;
        if norm > limit {
            return Err(format!("l1 norm {norm} is above the key's limit {limit}"));
        }
    }
    Ok(())
}

/// `e` or `-e`, whichever has its first nonzero entry positive.
fn oriented(e: &[i64]) -> Vec<i128> {
    let flip = e.iter().find(|&&x| x != 0).is_some_and(|&x| x < 0);
    e.iter()
        .map(|&x| if flip { -i128::from(x) } else { i128::from(x) })
        .collect()
}

/// Whether the elements of `set` (each already checked to lie in `ker(a)`) generate
/// `ker_Z(a)`.
fn generates_kernel(a: &IntMatrix, set: &Content<'_>) -> bool {
    let basis = echelon_basis(HermiteForm::new(a).kernel_basis());
    let d = basis.len();
    let mut form = Generated::new(d);
    if form.is_everything() {
        return true;
    }
    for e in set.data.rows() {
        let Some(coordinates) = coordinates(&basis, &e) else {
            return false;
        };
        form.add(coordinates);
        if form.is_everything() {
            return true;
        }
    }
    false
}

/// A row echelon basis `(pivot column, row)` of the lattice with basis `rows`, by unimodular
/// row operations.
fn echelon_basis(mut rows: Vec<Vec<BigInt>>) -> Vec<(usize, Vec<BigInt>)> {
    let n = rows.first().map_or(0, Vec::len);
    let mut done = Vec::new();
    for c in 0..n {
        let Some(p) = rows.iter().position(|r| !r[c].is_zero()) else {
            continue;
        };
        let mut pivot = rows.swap_remove(p);
        for row in &mut rows {
            if !row[c].is_zero() {
                combine(&mut pivot, row, c);
            }
        }
        done.push((c, pivot));
        if rows.is_empty() {
            break;
        }
    }
    done
}

/// Replaces `(p, r)` by a unimodular combination with `p[c] = gcd(p[c], r[c])` and
/// `r[c] = 0`.
fn combine(p: &mut [BigInt], r: &mut [BigInt], c: usize) {
    let e = p[c].extended_gcd(&r[c]);
    let (pc, rc) = (&p[c] / &e.gcd, &r[c] / &e.gcd);
    for (x, y) in p.iter_mut().zip(r.iter_mut()) {
        let new_p = &e.x * &*x + &e.y * &*y;
        let new_r = &pc * &*y - &rc * &*x;
        *x = new_p;
        *y = new_r;
    }
}

/// The integer coordinates of `e` in the echelon `basis`, `None` if it is not in the lattice.
fn coordinates(basis: &[(usize, Vec<BigInt>)], e: &[i64]) -> Option<Vec<BigInt>> {
    let mut rest: Vec<BigInt> = e.iter().map(|&x| BigInt::from(x)).collect();
    let mut out = Vec::with_capacity(basis.len());
    for (c, row) in basis {
        let (q, r) = rest[*c].div_rem(&row[*c]);
        if !r.is_zero() {
            return None;
        }
        if !q.is_zero() {
            for (x, b) in rest.iter_mut().zip(row) {
                *x -= &q * b;
            }
        }
        out.push(q);
    }
    rest.iter().all(Zero::is_zero).then_some(out)
}

/// The Hermite form of a sublattice of `Z^d`, grown one generator at a time.
struct Generated {
    /// Row `j`, when present, has its pivot in column `j` and zeros before it.
    rows: Vec<Option<Vec<BigInt>>>,
    /// The determinant once every row is present (then entries are kept modulo it).
    modulus: Option<BigInt>,
}

impl Generated {
    fn new(d: usize) -> Self {
        Self {
            rows: vec![None; d],
            modulus: if d == 0 { Some(BigInt::one()) } else { None },
        }
    }

    fn is_everything(&self) -> bool {
        self.modulus.as_ref().is_some_and(One::is_one)
    }

    fn add(&mut self, mut v: Vec<BigInt>) {
        self.reduce(&mut v, None);
        for j in 0..v.len() {
            if v[j].is_zero() {
                continue;
            }
            let Some(mut row) = self.rows[j].take() else {
                self.rows[j] = Some(v);
                break;
            };
            combine(&mut row, &mut v, j);
            self.reduce(&mut row, Some(j));
            self.reduce(&mut v, None);
            self.rows[j] = Some(row);
        }
        if self.rows.iter().all(Option::is_some) {
            let det = self
                .rows
                .iter()
                .enumerate()
                .map(|(j, r)| r.as_ref().expect("present")[j].abs())
                .fold(BigInt::one(), |acc, p| acc * p);
            self.modulus = Some(det);
        }
    }

    /// Once the determinant `D` is known, `D Z^d` lies in the lattice, so adding multiples of
    /// `D e_k` keeps it the same: reduces the entries of `v` modulo `D`, except the pivot of a
    /// row (`pivot`: its column), which divides `D` and must stay.
    fn reduce(&self, v: &mut [BigInt], pivot: Option<usize>) {
        if let Some(m) = &self.modulus {
            for (k, x) in v.iter_mut().enumerate() {
                if Some(k) != pivot {
                    *x = x.mod_floor(m);
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn big(v: &[i64]) -> Vec<BigInt> {
        v.iter().map(|&x| BigInt::from(x)).collect()
    }

    #[test]
    fn generation_stops_at_the_whole_lattice() {
        // 2 Z x Z plus (1, 0) is Z^2; (2, 0) and (0, 3) alone have index 6 (from memory).
        let mut form = Generated::new(2);
        form.add(big(&[2, 0]));
        form.add(big(&[0, 3]));
        assert_eq!(form.modulus, Some(BigInt::from(6)));
        assert!(!form.is_everything());
        form.add(big(&[0, 2]));
        assert_eq!(form.modulus, Some(BigInt::from(2)));
        form.add(big(&[1, 0]));
        assert!(form.is_everything());
    }

    #[test]
    fn coordinates_are_exact_or_absent() {
        let basis = echelon_basis(vec![big(&[2, 0, 2]), big(&[1, 1, 0])]);
        assert_eq!(
            coordinates(&basis, &[3, 1, 2]).map(|c| c.len()),
            Some(2),
            "(3,1,2) = (2,0,2) + (1,1,0)"
        );
        assert_eq!(coordinates(&basis, &[1, 0, 1]), None, "half of (2,0,2)");
    }
}
