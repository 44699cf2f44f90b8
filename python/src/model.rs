//! `kernstep._kernstep._Model`: a validated integer model, from arrays or from a file the
//! command line reads, and `analyze`, the figures of its matrix.

use std::path::PathBuf;

use kernstep::analysis::AnalysisOptions;
use kernstep::completion::Sign;
use kernstep::formats::analysis::analyze as analysis_report;
use kernstep::model::{Model, MATRIX_ENTRY_LIMIT};
use kernstep::scenario::PlanInput;
use kernstep::IntMatrix;
use numpy::{PyArray1, PyArray2, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;

use crate::errors::{bad_argument, to_py};
use crate::numbers::{bounds, check_len, exact, matrix_entries, Side};

/// A validated model `min c.x, A x = b, lower <= x <= upper, x integer`, with the sign
/// pattern a Hilbert basis is built for.
#[pyclass(name = "_Model", module = "kernstep._kernstep", frozen)]
pub struct PyModel {
    /// The model as the library holds it.
    pub model: Model,
    /// The sign of each variable in the moves of a set built for it (`None`: the default of
    /// the kind of set).
    pub signs: Option<Vec<Sign>>,
    /// Where the model came from: a file, or `<arrays>`.
    pub origin: String,
}

#[pymethods]
impl PyModel {
    /// The model of the `int64` arrays `a` (m x n), `b` (m), `c` (n), `lower` and `upper` (n;
    /// `i64::MIN` and `i64::MAX` stand for infinite bounds) and the sign pattern `signs`
    /// (`+`, `-` or `f` per variable).
    #[new]
    #[pyo3(signature = (a, b, c, lower, upper, signs=None))]
    fn new(
        py: Python<'_>,
        a: PyReadonlyArray2<'_, i64>,
        b: PyReadonlyArray1<'_, i64>,
        c: PyReadonlyArray1<'_, i64>,
        lower: PyReadonlyArray1<'_, i64>,
        upper: PyReadonlyArray1<'_, i64>,
        signs: Option<&str>,
    ) -> PyResult<Self> {
        let a = a.as_array();
        let (m, n) = a.dim();
        if m == 0 || n == 0 {
            return Err(bad_argument(
                py,
                "A",
                &format!("has shape ({m}, {n}); a model needs at least one row and one column"),
            ));
        }
        let entries: Vec<i64> = a.iter().copied().collect();
        matrix_entries(py, "A", &entries, n, MATRIX_ENTRY_LIMIT)?;
        let rows: Vec<Vec<i64>> = entries.chunks(n).map(<[i64]>::to_vec).collect();
        let matrix = IntMatrix::from_rows(&rows).map_err(|e| to_py(py, &e))?;
        let mut model = Model::of_matrix(matrix);
        let b = b.as_array().to_vec();
        let c = c.as_array().to_vec();
        let lower = lower.as_array().to_vec();
        let upper = upper.as_array().to_vec();
        check_len(py, "b", b.len(), m, "rows")?;
        check_len(py, "c", c.len(), n, "variables")?;
        check_len(py, "lower", lower.len(), n, "variables")?;
        check_len(py, "upper", upper.len(), n, "variables")?;
        model.rhs = exact(py, ("b", 0), &b)?;
        model.cost = exact(py, ("c", 0), &c)?;
        model.lower = bounds(py, ("lower", 0), &lower, Side::Lower)?;
        model.upper = bounds(py, ("upper", 0), &upper, Side::Upper)?;
        let crossed = (0..n)
            .find(|&j| matches!((model.lower[j], model.upper[j]), (Some(l), Some(u)) if l > u));
        if let Some(j) = crossed {
            return Err(bad_argument(
                py,
                &format!("lower[{j}]"),
                &format!("{} is above upper[{j}] = {}", lower[j], upper[j]),
            ));
        }
        let signs = signs
            .map(|pattern| parse_signs(py, pattern, n))
            .transpose()?;
        Ok(PyModel {
            model,
            signs,
            origin: "<arrays>".to_string(),
        })
    }

    /// The model in a file the command line reads: a model (.json, .toml, .mps, also .gz
    /// compressed) or a transport scenario, compiled into its model.
    #[staticmethod]
    fn from_file(py: Python<'_>, path: PathBuf) -> PyResult<Self> {
        let input = PlanInput::load(&path).map_err(|e| to_py(py, &e))?;
        Ok(PyModel {
            model: input.into_model(),
            signs: None,
            origin: path.display().to_string(),
        })
    }

    /// The constraint matrix `A`.
    #[getter]
    fn a<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<i64>>> {
        Ok(PyArray2::from_vec2(py, &self.model.matrix.to_rows())?)
    }

    /// The right-hand side `b`.
    #[getter]
    fn b<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        PyArray1::from_slice(py, &self.model.rhs)
    }

    /// The linear cost `c`.
    #[getter]
    fn c<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        PyArray1::from_slice(py, &self.model.cost)
    }

    /// The lower bounds, `None` where a variable is unbounded below.
    #[getter]
    fn lower(&self) -> Vec<Option<i64>> {
        self.model.lower.clone()
    }

    /// The upper bounds, `None` where a variable is unbounded above.
    #[getter]
    fn upper(&self) -> Vec<Option<i64>> {
        self.model.upper.clone()
    }

    /// The variable names (generated as `x1`, `x2`, ... for a model of arrays).
    #[getter]
    fn variable_names(&self) -> Vec<String> {
        self.model.variable_names.clone()
    }

    /// The row names (generated as `r1`, `r2`, ... for a model of arrays).
    #[getter]
    fn row_names(&self) -> Vec<String> {
        self.model.row_names.clone()
    }

    /// The sign pattern (`+`, `-` or `f` per variable), when one was given.
    #[getter]
    fn signs(&self) -> Option<String> {
        self.signs.as_deref().map(Sign::pattern)
    }

    /// Where the model came from: its file, or `<arrays>`.
    #[getter]
    fn origin(&self) -> &str {
        &self.origin
    }

    /// `(rows, variables)`.
    #[getter]
    fn shape(&self) -> (usize, usize) {
        (self.model.constraints(), self.model.variables())
    }

    /// Whether the model has piecewise-linear convex costs besides `c` (from a file).
    #[getter]
    fn has_convex_costs(&self) -> bool {
        !self.model.convex.is_empty()
    }
}

/// A sign pattern of `n` variables: one of `+`, `-` or `f` per variable.
fn parse_signs(py: Python<'_>, pattern: &str, n: usize) -> PyResult<Vec<Sign>> {
    let signs = pattern
        .chars()
        .enumerate()
        .map(|(i, symbol)| {
            Sign::from_symbol(symbol).ok_or_else(|| {
                bad_argument(
                    py,
                    &format!("signs[{i}]"),
                    &format!("{symbol:?} is no sign; use '+', '-' or 'f'"),
                )
            })
        })
        .collect::<PyResult<Vec<Sign>>>()?;
    check_len(py, "signs", signs.len(), n, "variables")?;
    Ok(signs)
}

/// The figures of `model`'s matrix as the command line's `analyze --json` prints them (a JSON
/// document with its `schema` field); `subdet_limit` caps the column subsets enumerated for the largest minor.
#[pyfunction]
#[pyo3(signature = (model, subdet_limit=None))]
pub fn analyze(py: Python<'_>, model: &PyModel, subdet_limit: Option<u64>) -> PyResult<String> {
    let mut options = AnalysisOptions::new();
    if let Some(limit) = subdet_limit {
        options = options.subdet_limit(limit);
    }
    let report = py
        .detach(|| analysis_report(&model.model, &model.origin, &options, None))
        .map_err(|e| to_py(py, &e))?;
    kernstep::formats::tagged::line(&report)
        .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))
}
