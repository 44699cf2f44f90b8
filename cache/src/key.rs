//! What a stored test set depends on, and the stable digest that names its file.
//!
//! Canonical byte encoding (version 1, all integers little-endian), fed to XXH3-128 for the
//! entry digest:
//!
//! ```text
//! "kernstep.entry-key.1\0"
//! u64 byte length of row_space, then its UTF-8 bytes
//! u8  kind            0 = Graver, 1 = Hilbert, 2 = Cycles
//! u64 n, then n bytes  0 = Free, 1 = NonNegative, 2 = NonPositive
//! --- the "family" (row space, kind, signs) ends here; XXH3-64 of these bytes is the family
//!     digest used to find covering entries quickly ---
//! u8  0 | 1 (+ u64)   norm limit absent | present
//! u8  0 | 1 (+ u64 len, len x u64)   box absent | present
//! ```
//!
//! Changing this encoding orphans every existing cache entry; `tests::digest_is_stable`
//! guards it.

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use xxhash_rust::xxh3::{xxh3_128, xxh3_64};

use crate::digest::Digest;
use crate::error::CacheError;

const DOMAIN: &[u8] = b"kernstep.entry-key.1\0";

/// Which kind of minimal set is stored.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum SetKind {
    /// Conformally minimal nonzero kernel vectors (every variable free).
    #[serde(alias = "Graver")]
    Graver,
    /// Conformally minimal nonzero kernel vectors inside a sign pattern.
    #[serde(alias = "Hilbert")]
    Hilbert,
    /// The Graver basis of a network matrix, kept implicit: its elements are the signed cycles
    /// of the network, which the caller finds from the matrix, so the entry stores none.
    #[serde(alias = "Cycles")]
    Cycles,
}

/// Sign restriction on one variable.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum Sign {
    /// No restriction.
    #[serde(alias = "Free")]
    Free,
    /// The variable is `>= 0`.
    #[serde(alias = "NonNegative")]
    NonNegative,
    /// The variable is `<= 0`.
    #[serde(alias = "NonPositive")]
    NonPositive,
}

impl Sign {
    /// The character that stands for the sign in a pattern: `f` free, `+` (`>= 0`), `-`
    /// (`<= 0`).
    pub fn symbol(self) -> char {
        match self {
            Sign::Free => 'f',
            Sign::NonNegative => '+',
            Sign::NonPositive => '-',
        }
    }

    /// The sign a pattern character stands for (`F` too), or `None`.
    pub fn from_symbol(c: char) -> Option<Sign> {
        match c {
            '+' => Some(Sign::NonNegative),
            '-' => Some(Sign::NonPositive),
            'f' | 'F' => Some(Sign::Free),
            _ => None,
        }
    }

    /// The signs as a pattern of [`Sign::symbol`] characters, such as `++f-`.
    pub fn pattern(signs: &[Sign]) -> String {
        signs.iter().map(|s| s.symbol()).collect()
    }
}

/// Limits the set was truncated to when it was built.
#[derive(Clone, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
pub struct Truncation {
    /// Only elements with ℓ1 norm at most this were kept (`None`: no norm limit).
    pub norm_limit: Option<u64>,
    /// Only elements with `|g_i| <= box[i]` were kept (`None`: no box).
    pub bounds: Option<Vec<u64>>,
}

impl Truncation {
    /// True if nothing is truncated.
    pub fn is_none(&self) -> bool {
        self.norm_limit.is_none() && self.bounds.is_none()
    }
}

/// Everything a test set depends on; equal keys mean interchangeable sets.
#[derive(Clone, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
pub struct EntryKey {
    /// Canonical text of the matrix row space, produced by the caller.
    pub row_space: String,
    /// Graver or Hilbert set.
    pub kind: SetKind,
    /// Sign restriction per variable; its length is the number of variables.
    pub signs: Vec<Sign>,
    /// Truncation applied while building.
    pub truncation: Truncation,
}

impl EntryKey {
    /// The number of variables (columns) the key describes.
    pub fn width(&self) -> usize {
        self.signs.len()
    }

    /// Checks that the box, when present, has one bound per variable.
    pub fn validate(&self) -> Result<(), CacheError> {
        match &self.truncation.bounds {
            Some(b) if b.len() != self.signs.len() => Err(CacheError::InvalidInput {
                field: "truncation.bounds",
                problem: format!("{} bounds for {} variables", b.len(), self.signs.len()),
            }),
            _ => Ok(()),
        }
    }

    /// The stable 128-bit digest of the canonical encoding; it names the entry's file.
    pub fn digest(&self) -> Digest {
        let mut bytes = self.family_bytes();
        push_option(&mut bytes, self.truncation.norm_limit.as_ref(), |b, v| {
            b.extend_from_slice(&v.to_le_bytes())
        });
        push_option(&mut bytes, self.truncation.bounds.as_ref(), |b, v| {
            push_len(b, v.len());
            for x in v {
                b.extend_from_slice(&x.to_le_bytes());
            }
        });
        Digest(xxh3_128(&bytes).to_le_bytes())
    }

    /// A 64-bit digest of row space, kind and signs only: entries that could cover each other
    /// share it.
    pub fn family(&self) -> u64 {
        xxh3_64(&self.family_bytes())
    }

    /// Whether a set stored under `self` is a valid test set for an instance with key
    /// `wanted`: same row space, kind and signs, and every truncation of `self` is no tighter
    /// than that of `wanted` (no limit, or a limit at least as large, componentwise for boxes).
    pub fn covers(&self, wanted: &EntryKey) -> bool {
        let norm_ok = match (self.truncation.norm_limit, wanted.truncation.norm_limit) {
            (None, _) => true,
            (Some(_), None) => false,
            (Some(have), Some(want)) => have >= want,
        };
        let box_ok = match (&self.truncation.bounds, &wanted.truncation.bounds) {
            (None, _) => true,
            (Some(_), None) => false,
            (Some(have), Some(want)) => {
                have.len() == want.len() && have.iter().zip(want).all(|(h, w)| h >= w)
            }
        };
        self.row_space == wanted.row_space
            && self.kind == wanted.kind
            && self.signs == wanted.signs
            && norm_ok
            && box_ok
    }

    fn family_bytes(&self) -> Vec<u8> {
        let mut bytes = Vec::with_capacity(DOMAIN.len() + self.row_space.len() + 32);
        bytes.extend_from_slice(DOMAIN);
        push_len(&mut bytes, self.row_space.len());
        bytes.extend_from_slice(self.row_space.as_bytes());
        bytes.push(match self.kind {
            SetKind::Graver => 0,
            SetKind::Hilbert => 1,
            SetKind::Cycles => 2,
        });
        push_len(&mut bytes, self.signs.len());
        bytes.extend(self.signs.iter().map(|s| match s {
            Sign::Free => 0u8,
            Sign::NonNegative => 1,
            Sign::NonPositive => 2,
        }));
        bytes
    }
}

fn push_len(bytes: &mut Vec<u8>, len: usize) {
    // usize is at most 64 bits on every supported target, so this widening is lossless.
    bytes.extend_from_slice(&(len as u64).to_le_bytes());
}

fn push_option<T>(bytes: &mut Vec<u8>, value: Option<&T>, put: impl FnOnce(&mut Vec<u8>, &T)) {
    match value {
        None => bytes.push(0),
        Some(v) => {
            bytes.push(1);
            put(bytes, v);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn key(bounds: Option<Vec<u64>>, norm: Option<u64>) -> EntryKey {
        EntryKey {
            row_space: "1 1 0; 0 1 1".into(),
            kind: SetKind::Graver,
            signs: vec![Sign::Free; 3],
            truncation: Truncation {
                norm_limit: norm,
                bounds,
            },
        }
    }

    #[test]
    fn digest_is_stable() {
        // Reference: the canonical encoding in the module doc, rebuilt byte by byte in Python
        // and hashed with the `xxhash` package (4.1, `xxh3_128_intdigest`, little-endian
        // bytes). A change here means existing cache entries would become unreachable.
        assert_eq!(
            key(None, None).digest().to_hex(),
            "8bc9771e76131b63d157f29d92d219ae"
        );
        assert_eq!(
            key(Some(vec![2, 3, 4]), Some(9)).digest().to_hex(),
            "24949bb860a924ad3b438e19bbadbda5"
        );
    }

    #[test]
    fn every_field_changes_the_digest() {
        let base = key(Some(vec![2, 3, 4]), Some(9));
        let mut variants = vec![
            key(None, Some(9)),
            key(Some(vec![2, 3, 5]), Some(9)),
            key(Some(vec![2, 3, 4]), None),
            key(Some(vec![2, 3, 4]), Some(8)),
        ];
        let mut other = base.clone();
        other.kind = SetKind::Hilbert;
        variants.push(other);
        let mut other = base.clone();
        other.signs[1] = Sign::NonNegative;
        variants.push(other);
        let mut other = base.clone();
        other.row_space.push(' ');
        variants.push(other);
        for v in &variants {
            assert_ne!(v.digest(), base.digest(), "{v:?}");
        }
        assert_eq!(variants[0].family(), base.family());
    }

    #[test]
    fn covering_rules() {
        let wanted = key(Some(vec![2, 3, 4]), Some(9));
        assert!(key(None, None).covers(&wanted));
        assert!(key(Some(vec![2, 3, 4]), Some(9)).covers(&wanted));
        assert!(key(Some(vec![5, 3, 4]), None).covers(&wanted));
        assert!(!key(Some(vec![2, 2, 4]), None).covers(&wanted));
        assert!(!key(None, Some(8)).covers(&wanted));
        assert!(!key(Some(vec![9, 9, 9]), None).covers(&key(None, None)));
    }

    #[test]
    fn box_length_is_validated() {
        assert!(key(Some(vec![1, 2]), None).validate().is_err());
        assert!(key(Some(vec![1, 2, 3]), None).validate().is_ok());
    }
}
