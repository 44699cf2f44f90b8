//! The numbers of a model or a variant as they arrive from Python (`int64` vectors, infinite
//! bounds as `i64::MIN` / `i64::MAX`), checked against the sizes and the value range the
//! library holds models to, each error naming the argument and the index.

use kernstep::model::VALUE_LIMIT;
use pyo3::prelude::*;

use crate::errors::bad_argument;

/// Which side of the box a bound vector gives.
#[derive(Clone, Copy)]
pub enum Side {
    /// Lower bounds: `i64::MIN` is minus infinity.
    Lower,
    /// Upper bounds: `i64::MAX` is plus infinity.
    Upper,
}

impl Side {
    /// The value standing for an infinite bound on this side.
    fn infinite(self) -> i64 {
        match self {
            Side::Lower => i64::MIN,
            Side::Upper => i64::MAX,
        }
    }
}

/// Refuses `values` unless it has `len` entries (`what` says what they are counted in);
/// `name` is the argument.
pub fn check_len(py: Python<'_>, name: &str, found: usize, len: usize, what: &str) -> PyResult<()> {
    if found == len {
        return Ok(());
    }
    Err(bad_argument(
        py,
        name,
        &format!("has {found} entries, the model has {len} {what}"),
    ))
}

/// Entry `k` of `name` as Python indexes it: `name[k]` for a vector (`cols == 0`), else
/// `name[i, j]` for a row-major matrix of `cols` columns.
fn index_name(name: &str, k: usize, cols: usize) -> String {
    match (k.checked_div(cols), k.checked_rem(cols)) {
        (Some(i), Some(j)) => format!("{name}[{i}, {j}]"),
        _ => format!("{name}[{k}]"),
    }
}

/// The first entry of `values` beyond `limit` in absolute value, as an error naming it (see
/// [`index_name`]); `skip` says which entries are exempt (the infinite bounds).
fn within(
    py: Python<'_>,
    (name, cols): (&str, usize),
    values: &[i64],
    limit: i128,
    skip: impl Fn(i64) -> bool,
) -> PyResult<()> {
    let beyond = values
        .iter()
        .position(|&v| !skip(v) && i128::from(v).abs() > limit);
    match beyond {
        Some(k) => Err(bad_argument(
            py,
            &index_name(name, k, cols),
            &format!("{} is out of range (|v| <= {limit})", values[k]),
        )),
        None => Ok(()),
    }
}

/// An exact vector (right-hand side or cost), or the rows of a matrix of `cols` columns
/// (`cols == 0` for a vector): every entry within [`VALUE_LIMIT`].
pub fn exact(py: Python<'_>, name: (&str, usize), values: &[i64]) -> PyResult<Vec<i64>> {
    within(py, name, values, VALUE_LIMIT, |_| false)?;
    Ok(values.to_vec())
}

/// A bound vector (or the rows of a matrix, named as in [`exact`]): the infinite marker of
/// `side` is `None`, every other entry within [`VALUE_LIMIT`].
pub fn bounds(
    py: Python<'_>,
    name: (&str, usize),
    values: &[i64],
    side: Side,
) -> PyResult<Vec<Option<i64>>> {
    let infinite = side.infinite();
    within(py, name, values, VALUE_LIMIT, |v| v == infinite)?;
    Ok(values
        .iter()
        .map(|&v| (v != infinite).then_some(v))
        .collect())
}

/// Matrix entries of a row-major matrix of `cols` columns, each within `limit`, the first one
/// beyond named `name[i, j]`.
pub fn matrix_entries(
    py: Python<'_>,
    name: &str,
    values: &[i64],
    cols: usize,
    limit: i128,
) -> PyResult<()> {
    within(py, (name, cols.max(1)), values, limit, |_| false)
}
