//! The one error type of the `kernstep` library.
//!
//! Outcomes such as "infeasible" or "unbounded" are statuses, never errors; an [`Error`] means
//! bad input, an arithmetic limit, I/O or a damaged store.

use std::path::PathBuf;

/// Result alias used throughout the library.
pub type Result<T> = std::result::Result<T, Error>;

/// Everything that can go wrong in the library, with the context needed to act on it.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// An input value is invalid; `field` names where (for example `matrix[2][5]`).
    #[error("{file}: {field}: {message}")]
    Input {
        /// The file (or `<argument>`) the value came from.
        file: String,
        /// The field, row and column, or line that holds the bad value.
        field: String,
        /// What was expected.
        message: String,
    },
    /// Two inputs that must agree in size do not.
    #[error("dimension mismatch: {0}")]
    Dimension(String),
    /// An integer result does not fit the machine integer width used at this step.
    #[error("integer overflow in {0}; the entries are too large for this computation")]
    Overflow(String),
    /// A vector met in a completion has an entry wider than the compact store of its stage
    /// keeps. The completion catches this and starts again with wider stores, so no caller
    /// of the library sees it.
    #[error("a completion's compact store met a wider entry")]
    EntryWidth,
    /// Reading or writing a file failed.
    #[error("{path}: {source}")]
    Io {
        /// The file concerned.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
    /// The instance's box is wider than the box the test set was truncated to, so the set is
    /// no test set for it (`variable` is the column index).
    #[error(
        "variable {variable}: its range ({}) is wider than the box the test set was truncated to (width {limit}), so the set is no test set here; build the complete set (one without a box)",
        range_text(*width)
    )]
    BeyondSetBox {
        /// The first variable whose range is too wide.
        variable: usize,
        /// `u - l` of the instance (`u64::MAX` when unbounded).
        width: u64,
        /// The width the set was truncated to.
        limit: u64,
    },
    /// The chosen solver cannot serve this instance (the network solver and convex costs).
    #[error("{0}")]
    Unsupported(String),
    /// The independent re-check of a solve's claim failed: the answer is withheld, never
    /// reported as certified.
    #[error("the independent re-check refuted the claim that {claim}: {why}")]
    Refuted {
        /// The claim in words.
        claim: &'static str,
        /// What refutes it.
        why: String,
    },
    /// No stored test set serves the model, and building one was not asked for.
    #[error("no test set for this matrix in the cache {}", dir.display())]
    NotCached {
        /// The cache directory searched.
        dir: PathBuf,
    },
    /// A build that a solve needed stopped before it finished (a limit or a cancellation).
    #[error("building the test set stopped: {}", stop_text(*reason))]
    BuildStopped {
        /// Why it stopped.
        reason: crate::completion::StopReason,
        /// The state saved last, from which the build resumes.
        kept: Option<crate::testset::SavedState>,
        /// A checkpoint found unusable and set aside on the way.
        set_aside: Option<Box<crate::testset::SetAside>>,
    },
    /// The test-set cache refused an operation or found a damaged entry.
    #[error(transparent)]
    Cache(#[from] cache::CacheError),
    /// The augmentation solver rejected its input or hit an arithmetic limit.
    #[error(transparent)]
    Augment(#[from] augment::AugmentError),
    /// A day (or variant) of a days file that cannot be used, with the name its line gave
    /// it, so that its record names the day that failed ([`Error::for_day`]).
    #[error("{source}")]
    Day {
        /// The day's name (printable, not blank).
        day: String,
        /// What spoiled the day.
        source: Box<Error>,
    },
}

impl Error {
    /// This error as the error of the day named `day`; unchanged when the name is blank or
    /// holds control characters (it is never carried into output then).
    pub fn for_day(self, day: &str) -> Error {
        if day.trim().is_empty() || crate::input::printable(day).is_err() {
            return self;
        }
        Error::Day {
            day: day.to_string(),
            source: Box::new(self),
        }
    }

    /// The name of the day this error spoiled, when its line gave one.
    pub fn day(&self) -> Option<&str> {
        match self {
            Error::Day { day, .. } => Some(day),
            _ => None,
        }
    }
}

/// A stop reason in words for [`Error::BuildStopped`].
fn stop_text(reason: crate::completion::StopReason) -> &'static str {
    match reason {
        crate::completion::StopReason::ElementLimit => "the element or memory limit was reached",
        crate::completion::StopReason::TimeLimit => "the time limit was reached",
        crate::completion::StopReason::Cancelled => "interrupted",
    }
}

/// `u - l` in words for [`Error::BeyondSetBox`].
fn range_text(width: u64) -> String {
    if width == u64::MAX {
        "unbounded".to_string()
    } else {
        format!("width {width}")
    }
}
