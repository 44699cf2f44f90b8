//! Python bindings of kernstep: models from integer arrays or files, test sets built once and
//! kept in the cache, and certified re-optimisation of variants, one at a time or many in
//! parallel without the GIL.
//!
//! This is the extension module `kernstep._kernstep`. The Python package `kernstep` wraps it:
//! it turns arrays of any integer dtype (or integral floats, or scipy.sparse matrices) into the
//! `int64` arrays taken here, and builds its results and exceptions from the plain values
//! returned. Infinite bounds cross this boundary as `i64::MIN` (lower) and `i64::MAX` (upper),
//! values no model can hold (every bound is within `2^62`).

mod errors;
mod interrupt;
mod model;
mod numbers;
mod testset;

use pyo3::prelude::*;

/// The compiled part of the `kernstep` package.
#[pymodule]
fn _kernstep(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<model::PyModel>()?;
    m.add_class::<testset::PyTestSet>()?;
    m.add_function(wrap_pyfunction!(model::analyze, m)?)?;
    m.add("VALUE_LIMIT", kernstep::model::VALUE_LIMIT)?;
    m.add("MATRIX_ENTRY_LIMIT", kernstep::model::MATRIX_ENTRY_LIMIT)?;
    Ok(())
}
