//! Compact element encodings: the narrowest one that holds every entry is chosen on write.
//!
//! | tag | name   | layout                                                                   |
//! |-----|--------|--------------------------------------------------------------------------|
//! | 0   | `Trit` | 2 bits per entry, 4 entries per byte from the low bits up: `00` = 0,      |
//! |     |        | `01` = +1, `10` = -1 (`11` is invalid); unused bits of the last byte are 0 |
//! | 1   | `I8`   | one byte per entry, two's complement                                     |
//! | 2   | `I16`  | two bytes per entry, little-endian                                       |
//! | 3   | `I32`  | four bytes per entry, little-endian                                      |
//! | 4   | `I64`  | eight bytes per entry, little-endian                                     |
//!
//! Entries are laid out flat, row after row, so decoding is one linear pass.

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::data::Entries;

/// How the element entries are stored.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum ElementEncoding {
    /// Entries in {-1, 0, 1}, two bits each.
    #[serde(alias = "Trit")]
    Trit,
    /// Entries fitting `i8`.
    #[serde(alias = "I8")]
    I8,
    /// Entries fitting `i16`.
    #[serde(alias = "I16")]
    I16,
    /// Entries fitting `i32`.
    #[serde(alias = "I32")]
    I32,
    /// Any `i64` entries.
    #[serde(alias = "I64")]
    I64,
}

impl ElementEncoding {
    /// The narrowest encoding that holds every entry of `entries`.
    pub fn narrowest_for(entries: Entries<'_>) -> Self {
        fn range<T: Copy + Into<i64>>(entries: &[T]) -> (i64, i64) {
            entries.iter().fold((0, 0), |(lo, hi), &v| {
                let v = v.into();
                (lo.min(v), hi.max(v))
            })
        }
        let (lo, hi) = match entries {
            Entries::Small(e) => range(e),
            Entries::Full(e) => range(e),
        };
        let fits = |min: i64, max: i64| lo >= min && hi <= max;
        if fits(-1, 1) {
            ElementEncoding::Trit
        } else if fits(i8::MIN.into(), i8::MAX.into()) {
            ElementEncoding::I8
        } else if fits(i16::MIN.into(), i16::MAX.into()) {
            ElementEncoding::I16
        } else if fits(i32::MIN.into(), i32::MAX.into()) {
            ElementEncoding::I32
        } else {
            ElementEncoding::I64
        }
    }

    /// The one-byte tag written in the file header.
    pub fn tag(self) -> u8 {
        match self {
            ElementEncoding::Trit => 0,
            ElementEncoding::I8 => 1,
            ElementEncoding::I16 => 2,
            ElementEncoding::I32 => 3,
            ElementEncoding::I64 => 4,
        }
    }

    /// The encoding for a header tag, if the tag is known.
    pub fn from_tag(tag: u8) -> Option<Self> {
        Some(match tag {
            0 => ElementEncoding::Trit,
            1 => ElementEncoding::I8,
            2 => ElementEncoding::I16,
            3 => ElementEncoding::I32,
            4 => ElementEncoding::I64,
            _ => return None,
        })
    }

    /// Bytes needed for `entries` entries, `None` on overflow.
    pub fn payload_len(self, entries: usize) -> Option<usize> {
        match self {
            ElementEncoding::Trit => Some(entries.div_ceil(4)),
            ElementEncoding::I8 => Some(entries),
            ElementEncoding::I16 => entries.checked_mul(2),
            ElementEncoding::I32 => entries.checked_mul(4),
            ElementEncoding::I64 => entries.checked_mul(8),
        }
    }
}

/// Appends `entries` to `out` in `encoding`; every entry must fit it (see
/// [`ElementEncoding::narrowest_for`]), so the narrowing casts below are exact.
pub(crate) fn encode(encoding: ElementEncoding, entries: Entries<'_>, out: &mut Vec<u8>) {
    match entries {
        Entries::Small(e) => encode_values(encoding, e, out),
        Entries::Full(e) => encode_values(encoding, e, out),
    }
}

fn encode_values<T: Copy + Into<i64>>(encoding: ElementEncoding, entries: &[T], out: &mut Vec<u8>) {
    let values = entries.iter().map(|&v| v.into());
    match encoding {
        ElementEncoding::Trit => encode_trits(entries, out),
        ElementEncoding::I8 => out.extend(values.map(|v| v as i8 as u8)),
        ElementEncoding::I16 => {
            values.for_each(|v| out.extend_from_slice(&(v as i16).to_le_bytes()))
        }
        ElementEncoding::I32 => {
            values.for_each(|v| out.extend_from_slice(&(v as i32).to_le_bytes()))
        }
        ElementEncoding::I64 => values.for_each(|v| out.extend_from_slice(&v.to_le_bytes())),
    }
}

fn encode_trits<T: Copy + Into<i64>>(entries: &[T], out: &mut Vec<u8>) {
    for group in entries.chunks(4) {
        let byte = group.iter().enumerate().fold(0u8, |acc, (i, &v)| {
            let code = match v.into() {
                1 => 0b01,
                -1 => 0b10,
                _ => 0b00,
            };
            acc | (code << (2 * i))
        });
        out.push(byte);
    }
}

/// Entries as decoded: one byte each for the two narrow encodings.
#[derive(Debug, PartialEq, Eq)]
pub(crate) enum Decoded {
    /// From `Trit` or `I8`.
    Small(Vec<i8>),
    /// From a wider encoding.
    Full(Vec<i64>),
}

/// Decodes exactly `entries` entries from `bytes` (whose length the caller has checked
/// against [`ElementEncoding::payload_len`]); the error says what is malformed.
pub(crate) fn decode(
    encoding: ElementEncoding,
    bytes: &[u8],
    entries: usize,
) -> Result<Decoded, &'static str> {
    Ok(match encoding {
        ElementEncoding::Trit => Decoded::Small(decode_trits(bytes, entries)?),
        ElementEncoding::I8 => Decoded::Small(bytes.iter().map(|&b| b as i8).collect()),
        ElementEncoding::I16 => Decoded::Full(
            bytes
                .chunks_exact(2)
                .map(|c| i64::from(i16::from_le_bytes([c[0], c[1]])))
                .collect(),
        ),
        ElementEncoding::I32 => Decoded::Full(
            bytes
                .chunks_exact(4)
                .map(|c| i64::from(i32::from_le_bytes([c[0], c[1], c[2], c[3]])))
                .collect(),
        ),
        ElementEncoding::I64 => Decoded::Full(
            bytes
                .chunks_exact(8)
                .map(|c| i64::from_le_bytes([c[0], c[1], c[2], c[3], c[4], c[5], c[6], c[7]]))
                .collect(),
        ),
    })
}

/// The four entries of every packed byte (invalid `11` codes decode to 0 and are rejected
/// separately).
const TRIT_TABLE: [[i8; 4]; 256] = {
    let mut table = [[0i8; 4]; 256];
    let mut byte = 0;
    while byte < 256 {
        let mut i = 0;
        while i < 4 {
            table[byte][i] = match (byte >> (2 * i)) & 0b11 {
                0b01 => 1,
                0b10 => -1,
                _ => 0,
            };
            i += 1;
        }
        byte += 1;
    }
    table
};

fn decode_trits(bytes: &[u8], entries: usize) -> Result<Vec<i8>, &'static str> {
    // A byte holds an invalid `11` code exactly when some bit pair has both bits set.
    if bytes.iter().any(|&b| b & (b >> 1) & 0x55 != 0) {
        return Err("a 2-bit entry has the unused code 11");
    }
    let rest = entries % 4;
    if rest != 0 {
        let last = bytes.last().copied().unwrap_or(0);
        if last >> (2 * rest) != 0 {
            return Err("padding bits after the last entry are not zero");
        }
    }
    let mut out = Vec::with_capacity(bytes.len() * 4);
    for &b in bytes {
        out.extend_from_slice(&TRIT_TABLE[usize::from(b)]);
    }
    out.truncate(entries);
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn round_trip(entries: &[i64]) -> ElementEncoding {
        let enc = ElementEncoding::narrowest_for(Entries::Full(entries));
        let mut bytes = Vec::new();
        encode(enc, Entries::Full(entries), &mut bytes);
        assert_eq!(Some(bytes.len()), enc.payload_len(entries.len()));
        let decoded = match decode(enc, &bytes, entries.len()).unwrap() {
            Decoded::Small(small) => {
                // The same entries kept small encode to the same bytes.
                let mut again = Vec::new();
                encode(enc, Entries::Small(&small), &mut again);
                assert_eq!(again, bytes);
                small.into_iter().map(i64::from).collect()
            }
            Decoded::Full(full) => full,
        };
        assert_eq!(decoded, entries);
        enc
    }

    #[test]
    fn narrowest_class_boundaries() {
        use ElementEncoding::*;
        assert_eq!(round_trip(&[]), Trit);
        assert_eq!(round_trip(&[-1, 0, 1, 1, -1]), Trit);
        assert_eq!(round_trip(&[2, -128, 127]), I8);
        assert_eq!(round_trip(&[-129]), I16);
        assert_eq!(round_trip(&[128, -32768, 32767]), I16);
        assert_eq!(round_trip(&[32768]), I32);
        assert_eq!(round_trip(&[i32::MIN.into(), i32::MAX.into()]), I32);
        assert_eq!(round_trip(&[i64::from(i32::MAX) + 1]), I64);
        assert_eq!(round_trip(&[i64::MIN, i64::MAX, 0]), I64);
    }

    #[test]
    fn trit_rejects_bad_codes_and_padding() {
        assert!(decode(ElementEncoding::Trit, &[0b11], 1).is_err());
        assert!(decode(ElementEncoding::Trit, &[0b0100], 1).is_err());
        assert_eq!(
            decode(ElementEncoding::Trit, &[0b1001], 2).unwrap(),
            Decoded::Small(vec![1, -1])
        );
    }

    #[test]
    fn tags_round_trip() {
        for tag in 0..=255u8 {
            if let Some(enc) = ElementEncoding::from_tag(tag) {
                assert_eq!(enc.tag(), tag);
            }
        }
        assert!(ElementEncoding::from_tag(5).is_none());
    }
}
