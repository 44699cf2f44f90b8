//! Serde helpers that write big integers as decimal strings, so that JSON readers with
//! 64-bit or floating-point numbers never lose digits.

use num_bigint::BigInt;
use serde::Serializer;

/// Serialises a [`BigInt`] as its decimal string.
pub(crate) fn serialize<S: Serializer>(value: &BigInt, s: S) -> Result<S::Ok, S::Error> {
    s.collect_str(value)
}

/// Serialises an optional [`BigInt`] as a decimal string or `null`.
pub(crate) fn serialize_option<S: Serializer>(
    value: &Option<BigInt>,
    s: S,
) -> Result<S::Ok, S::Error> {
    match value {
        Some(v) => s.collect_str(v),
        None => s.serialize_none(),
    }
}
