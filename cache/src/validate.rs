//! Checks run before anything is written: a set that contradicts its own key is refused.

use crate::data::TestSetData;
use crate::error::CacheError;
use crate::key::EntryKey;
use crate::metadata::SetMetadata;

/// Checks key, metadata and data against each other: the data width equals the key's number
/// of variables, and every vector respects the key's box and ℓ1 norm limit.
pub(crate) fn check_entry(
    key: &EntryKey,
    data: &TestSetData,
    metadata: &SetMetadata,
) -> Result<(), CacheError> {
    key.validate()?;
    metadata.validate()?;
    if data.width() != key.width() {
        return Err(CacheError::InvalidInput {
            field: "elements",
            problem: format!(
                "width {} differs from the key's {} variables",
                data.width(),
                key.width()
            ),
        });
    }
    for (row, vector) in data.rows().enumerate() {
        check_vector(key, row, &vector)?;
    }
    Ok(())
}

fn check_vector(key: &EntryKey, row: usize, vector: &[i64]) -> Result<(), CacheError> {
    if let Some(bounds) = &key.truncation.bounds {
        if let Some(i) = (0..vector.len()).find(|&i| vector[i].unsigned_abs() > bounds[i]) {
            return Err(CacheError::InvalidInput {
                field: "elements",
                problem: format!(
                    "vector {row} has |entry {i}| = {} above its box bound {}",
                    vector[i].unsigned_abs(),
                    bounds[i]
                ),
            });
        }
    }
    if let Some(limit) = key.truncation.norm_limit {
        let norm = vector
            .iter()
            .try_fold(0u64, |acc, v| acc.checked_add(v.unsigned_abs()))
            .ok_or(CacheError::Overflow {
                what: "the l1 norm of a vector",
            })?;
        if norm > limit {
            return Err(CacheError::InvalidInput {
                field: "elements",
                problem: format!("vector {row} has l1 norm {norm} above the limit {limit}"),
            });
        }
    }
    Ok(())
}
