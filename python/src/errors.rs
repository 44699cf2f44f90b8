//! The library's typed errors as the exceptions of `kernstep.errors`.
//!
//! The exception classes live in Python (so that `ModelError` can also be a `ValueError`, and
//! `FileError` an `OSError`); this module picks the class for each [`kernstep::Error`] and
//! raises it with the library's message, plus the file and field of a bad input.

use pyo3::prelude::*;

/// The class in `kernstep.errors` that carries `error`.
fn class_name(error: &kernstep::Error) -> &'static str {
    use kernstep::Error;
    match error {
        Error::Input { .. } | Error::Dimension(_) => "ModelError",
        Error::BeyondSetBox { .. } => "OutsideSetBoxError",
        Error::Overflow(_) => "ArithmeticOverflowError",
        Error::Io { .. } => "FileError",
        Error::Unsupported(_) => "UnsupportedError",
        Error::Refuted { .. } => "RefutedError",
        Error::NotCached { .. } => "CacheMissError",
        Error::BuildStopped { .. } => "BuildStoppedError",
        Error::Cache(_) => "CacheError",
        Error::Augment(kernstep::augment::AugmentError::Overflow { .. }) => {
            "ArithmeticOverflowError"
        }
        Error::Augment(_) => "ModelError",
        _ => "KernstepError",
    }
}

/// What a caller can do about `error`, added to its message where the library's words are
/// about the command line or say nothing of the next step.
fn advice(error: &kernstep::Error) -> Option<&'static str> {
    use kernstep::Error;
    match error {
        Error::NotCached { .. } => {
            Some("build it first with kernstep.TestSet.build(model, cache_dir=...)")
        }
        Error::BuildStopped { .. } => {
            Some("build again with a larger max_memory, or with a norm_limit or a budget for a partial set; a saved state is resumed")
        }
        _ => None,
    }
}

/// The Python exception of `error` with its message prefixed by `context` (such as the row
/// of a batch of variants).
pub fn to_py_at(py: Python<'_>, error: &kernstep::Error, context: &str) -> PyErr {
    let message = format!("{context}: {}", message_of(error));
    match raise(py, class_name(error), &message, error) {
        Ok(err) | Err(err) => err,
    }
}

/// The library's message of `error` with the advice for it, if any.
fn message_of(error: &kernstep::Error) -> String {
    match advice(error) {
        Some(next) => format!("{error}; {next}"),
        None => error.to_string(),
    }
}

/// The Python exception of `error`, with attributes `file` and `field` for a bad input and
/// `reason` for a stopped build.
pub fn to_py(py: Python<'_>, error: &kernstep::Error) -> PyErr {
    match raise(py, class_name(error), &message_of(error), error) {
        Ok(err) | Err(err) => err,
    }
}

/// The exception `name` of `kernstep.errors` holding `message` (an import failure is
/// returned as the error itself).
fn raise(py: Python<'_>, name: &str, message: &str, error: &kernstep::Error) -> PyResult<PyErr> {
    let class = py.import("kernstep.errors")?.getattr(name)?;
    let value = class.call1((message,))?;
    match error {
        kernstep::Error::Input { file, field, .. } => {
            value.setattr("file", file)?;
            value.setattr("field", field)?;
        }
        kernstep::Error::BuildStopped { reason, .. } => {
            value.setattr("reason", stop_word(*reason))?;
        }
        kernstep::Error::NotCached { dir } => {
            value.setattr("cache_dir", dir)?;
        }
        _ => {}
    }
    Ok(PyErr::from_value(value))
}

/// A stop reason as the Python attribute names it.
pub fn stop_word(reason: kernstep::completion::StopReason) -> &'static str {
    use kernstep::completion::StopReason;
    match reason {
        StopReason::ElementLimit => "element_limit",
        StopReason::TimeLimit => "time_limit",
        StopReason::Cancelled => "cancelled",
    }
}

/// A bad argument of this binding, raised as `kernstep.errors.ModelError`.
pub fn bad_argument(py: Python<'_>, field: &str, message: &str) -> PyErr {
    let error = kernstep::Error::Input {
        file: "<argument>".to_string(),
        field: field.to_string(),
        message: message.to_string(),
    };
    to_py(py, &error)
}
