//! Conversions between the exact `BigInt` values of the lattice core and the `i64` values the
//! completion and augmentation work with. A value that does not fit is an
//! [`Error::Overflow`], never a silent wrap.

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use crate::error::{Error, Result};

/// Converts a vector of big integers to `i64`; `context` names the vector in the error
/// (for example `"kernel basis vector 3"`).
pub fn to_i64_vec(v: &[BigInt], context: &str) -> Result<Vec<i64>> {
    v.iter()
        .enumerate()
        .map(|(i, x)| {
            x.to_i64().ok_or_else(|| {
                Error::Overflow(format!("{context}, entry {i} ({x}) does not fit in i64"))
            })
        })
        .collect()
}

/// Converts a vector of `i64` to big integers.
pub fn to_big_vec(v: &[i64]) -> Vec<BigInt> {
    v.iter().map(|&x| BigInt::from(x)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_in_range_convert_back() {
        let v = vec![i64::MIN, -1, 0, 7, i64::MAX];
        assert_eq!(to_i64_vec(&to_big_vec(&v), "test").unwrap(), v);
    }

    #[test]
    fn a_value_past_i64_is_an_overflow_error_naming_the_context() {
        let v = vec![BigInt::from(1), BigInt::from(i64::MAX) + 1];
        let err = to_i64_vec(&v, "kernel basis vector 2").unwrap_err();
        assert!(matches!(err, Error::Overflow(_)));
        let text = err.to_string();
        assert!(text.contains("kernel basis vector 2") && text.contains("entry 1"));
    }
}
