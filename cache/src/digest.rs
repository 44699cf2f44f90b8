//! 128-bit key digests and their hexadecimal spelling (the entry's file stem).

use std::fmt;

use serde::{Deserialize, Deserializer, Serialize, Serializer};

use crate::error::CacheError;

/// Number of hexadecimal characters in a spelled-out digest.
pub const DIGEST_HEX_LEN: usize = 32;

/// The digest of an [`EntryKey`](crate::EntryKey): 16 bytes, spelled as 32 lower-case hex digits.
/// Serialised as its hexadecimal text.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Digest(pub [u8; 16]);

impl Digest {
    /// The digest as 32 lower-case hexadecimal characters.
    pub fn to_hex(&self) -> String {
        self.0.iter().map(|b| format!("{b:02x}")).collect()
    }

    /// Parses exactly 32 hexadecimal characters (either case).
    pub fn from_hex(text: &str) -> Result<Self, CacheError> {
        let bad = || CacheError::BadDigestText {
            text: text.to_owned(),
        };
        if text.len() != DIGEST_HEX_LEN || !is_hex(text) {
            return Err(bad());
        }
        let mut bytes = [0u8; 16];
        for (i, byte) in bytes.iter_mut().enumerate() {
            *byte = u8::from_str_radix(&text[2 * i..2 * i + 2], 16).map_err(|_| bad())?;
        }
        Ok(Digest(bytes))
    }
}

impl fmt::Display for Digest {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_hex())
    }
}

impl Serialize for Digest {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.serialize_str(&self.to_hex())
    }
}

impl schemars::JsonSchema for Digest {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Digest".into()
    }

    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({
            "description": "An entry key's digest: 32 lower-case hexadecimal digits.",
            "type": "string",
            "pattern": "^[0-9a-f]{32}$",
        })
    }
}

impl<'de> Deserialize<'de> for Digest {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let text = String::deserialize(deserializer)?;
        Digest::from_hex(&text).map_err(serde::de::Error::custom)
    }
}

/// Whether `text` is non-empty and consists only of hexadecimal digits.
pub(crate) fn is_hex(text: &str) -> bool {
    !text.is_empty() && text.bytes().all(|b| b.is_ascii_hexdigit())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hex_round_trip_and_rejections() {
        let d = Digest([0, 1, 2, 0xab, 0xcd, 0xef, 9, 8, 7, 6, 5, 4, 3, 2, 1, 0xff]);
        let text = d.to_hex();
        assert_eq!(text, "000102abcdef090807060504030201ff");
        assert_eq!(Digest::from_hex(&text).unwrap(), d);
        assert_eq!(Digest::from_hex(&text.to_uppercase()).unwrap(), d);
        assert!(Digest::from_hex(&text[1..]).is_err());
        assert!(Digest::from_hex("zz0102abcdef090807060504030201ff").is_err());
    }
}
