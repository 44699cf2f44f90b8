//! Facts about how a stored set was built; stored beside the elements, never part of the key.

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::error::CacheError;

/// How complete the stored set is.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum Completeness {
    /// The whole set (no truncation, or a truncation proven not to cut anything).
    #[serde(alias = "Complete")]
    Complete,
    /// Elements outside the key's box were left out.
    #[serde(alias = "BoxTruncated")]
    BoxTruncated,
    /// Elements with ℓ1 norm above `limit` were left out.
    #[serde(alias = "NormTruncated")]
    NormTruncated {
        /// The ℓ1 norm limit applied.
        limit: u64,
    },
}

/// Build facts recorded with every entry, for display and for honest result statuses.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct SetMetadata {
    /// The matrix the set was built from, row by row.
    pub matrix: Vec<Vec<i64>>,
    /// Rank of the matrix.
    pub rank: u64,
    /// Largest absolute maximal subdeterminant (or an upper bound), as a decimal string.
    pub delta: String,
    /// Whether `delta` is exact (`false`: it is an upper bound).
    pub delta_exact: bool,
    /// Number of distinct nonzero columns up to sign.
    pub column_number: u64,
    /// The ℓ1 norm bound the completion used, when one was used.
    pub norm_bound: Option<u64>,
    /// Name of the method that built the set.
    pub method: String,
    /// How complete the set is.
    pub completeness: Completeness,
    /// Wall-clock seconds the build took.
    pub build_seconds: f64,
    /// Version of kernstep that built the set.
    pub kernstep_version: String,
    /// Creation time in seconds since the Unix epoch.
    pub created_unix: u64,
    /// The model the set was built for, as its builder named it (a model file's name), so
    /// that a listing says which model an entry serves; `None` for entries stored before
    /// format 3 and for sets built from a bare matrix. Printable (no control characters).
    #[serde(default)]
    pub model: Option<String>,
}

impl SetMetadata {
    /// Checks the fields whose form is fixed: `delta` is a non-negative decimal integer,
    /// `build_seconds` is finite and non-negative, and the matrix rows have equal lengths.
    pub fn validate(&self) -> Result<(), CacheError> {
        if let Some(model) = &self.model {
            if model.chars().any(char::is_control) {
                return Err(CacheError::InvalidInput {
                    field: "metadata.model",
                    problem: format!("{model:?} holds a control character"),
                });
            }
        }
        if self.delta.is_empty() || !self.delta.bytes().all(|b| b.is_ascii_digit()) {
            return Err(CacheError::InvalidInput {
                field: "metadata.delta",
                problem: format!("'{}' is not a non-negative decimal integer", self.delta),
            });
        }
        if !(self.build_seconds.is_finite() && self.build_seconds >= 0.0) {
            return Err(CacheError::InvalidInput {
                field: "metadata.build_seconds",
                problem: format!("{} is not a finite non-negative time", self.build_seconds),
            });
        }
        if let Some(first) = self.matrix.first() {
            if let Some(row) = self.matrix.iter().position(|r| r.len() != first.len()) {
                return Err(CacheError::InvalidInput {
                    field: "metadata.matrix",
                    problem: format!("row {row} has a different length than row 0"),
                });
            }
        }
        Ok(())
    }
}
