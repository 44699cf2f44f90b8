//! Exact 128-bit values written as decimal strings, so that readers whose numbers are
//! doubles (JavaScript, spreadsheets) never round an objective above `2^53`.

use std::fmt;

use serde::{Deserialize, Deserializer, Serialize, Serializer};

/// An `i128` that serialises as a decimal string such as `"-1250"`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Decimal(pub i128);

impl fmt::Display for Decimal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.0.fmt(f)
    }
}

impl Serialize for Decimal {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_str(&self.0)
    }
}

impl<'de> Deserialize<'de> for Decimal {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let text = String::deserialize(deserializer)?;
        text.parse::<i128>().map(Decimal).map_err(|e| {
            serde::de::Error::custom(format!("{text:?} is not a decimal integer: {e}"))
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_trips_beyond_double_precision() {
        let value = Decimal((1i128 << 80) + 1);
        let text = serde_json::to_string(&value).unwrap();
        assert_eq!(text, "\"1208925819614629174706177\"");
        assert_eq!(serde_json::from_str::<Decimal>(&text).unwrap(), value);
        assert!(serde_json::from_str::<Decimal>("\"1.5\"").is_err());
    }
}
