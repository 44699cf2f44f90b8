//! Exact integers written as decimal strings, so that readers whose numbers are doubles
//! (JavaScript, spreadsheets) never round a value above `2^53`: [`Decimal`] for `i128`
//! values, and the serde adapters [`text`], [`text_option`], [`text_vec`] and
//! [`text_vec_option`] for integer fields (which also read the JSON numbers that layouts
//! before the JSON contract wrote).

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

impl schemars::JsonSchema for Decimal {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Decimal".into()
    }

    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({
            "description": "An exact integer written as decimal digits, so that readers whose numbers are doubles never round it.",
            "type": "string",
            "pattern": "^-?[0-9]+$",
        })
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

/// An integer read from a decimal string or a JSON number (for readers of values the
/// adapters below write).
pub struct Lenient<T>(pub T);

impl<'de, T> Deserialize<'de> for Lenient<T>
where
    T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
{
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        struct Visit<T>(std::marker::PhantomData<T>);
        impl<T> serde::de::Visitor<'_> for Visit<T>
        where
            T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
        {
            type Value = T;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("an integer as a decimal string")
            }
            fn visit_str<E: serde::de::Error>(self, v: &str) -> Result<T, E> {
                v.parse()
                    .map_err(|_| E::custom(format!("{v:?} is not a decimal integer in range")))
            }
            fn visit_i64<E: serde::de::Error>(self, v: i64) -> Result<T, E> {
                T::try_from(v).map_err(|_| E::custom(format!("{v} is out of range")))
            }
            fn visit_u64<E: serde::de::Error>(self, v: u64) -> Result<T, E> {
                T::try_from(v).map_err(|_| E::custom(format!("{v} is out of range")))
            }
            fn visit_i128<E: serde::de::Error>(self, v: i128) -> Result<T, E> {
                T::try_from(v).map_err(|_| E::custom(format!("{v} is out of range")))
            }
        }
        deserializer
            .deserialize_any(Visit(std::marker::PhantomData))
            .map(Lenient)
    }
}

/// Writes an integer field as a decimal string; reads a string or a number.
pub mod text {
    use super::*;

    /// Writes `value` as its decimal digits.
    pub fn serialize<T: fmt::Display, S: Serializer>(value: &T, s: S) -> Result<S::Ok, S::Error> {
        s.collect_str(value)
    }

    /// Reads a decimal string or a JSON number.
    pub fn deserialize<'de, T, D>(d: D) -> Result<T, D::Error>
    where
        T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
        D: Deserializer<'de>,
    {
        Lenient::deserialize(d).map(|l| l.0)
    }
}

/// [`text`] for an optional integer (`null` when absent).
pub mod text_option {
    use super::*;

    /// Writes `value` as its decimal digits, or `null`.
    pub fn serialize<T: fmt::Display, S: Serializer>(
        value: &Option<T>,
        s: S,
    ) -> Result<S::Ok, S::Error> {
        match value {
            Some(v) => s.collect_str(v),
            None => s.serialize_none(),
        }
    }

    /// Reads a decimal string, a JSON number or `null`.
    pub fn deserialize<'de, T, D>(d: D) -> Result<Option<T>, D::Error>
    where
        T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
        D: Deserializer<'de>,
    {
        Option::<Lenient<T>>::deserialize(d).map(|o| o.map(|l| l.0))
    }
}

/// [`text`] for each integer of a list.
pub mod text_vec {
    use super::*;

    /// Writes each value as its decimal digits.
    pub fn serialize<T: fmt::Display, S: Serializer>(
        values: &[T],
        s: S,
    ) -> Result<S::Ok, S::Error> {
        s.collect_seq(values.iter().map(|v| v.to_string()))
    }

    /// Reads a list of decimal strings or JSON numbers.
    pub fn deserialize<'de, T, D>(d: D) -> Result<Vec<T>, D::Error>
    where
        T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
        D: Deserializer<'de>,
    {
        Vec::<Lenient<T>>::deserialize(d).map(|v| v.into_iter().map(|l| l.0).collect())
    }
}

/// [`text`] for each entry of a list of optional integers (`null` for an absent one).
pub mod text_vec_option {
    use super::*;

    /// Writes each value as its decimal digits, or `null`.
    pub fn serialize<T: fmt::Display, S: Serializer>(
        values: &[Option<T>],
        s: S,
    ) -> Result<S::Ok, S::Error> {
        s.collect_seq(values.iter().map(|v| v.as_ref().map(|v| v.to_string())))
    }

    /// Reads a list of decimal strings, JSON numbers or `null`s.
    pub fn deserialize<'de, T, D>(d: D) -> Result<Vec<Option<T>>, D::Error>
    where
        T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
        D: Deserializer<'de>,
    {
        Vec::<Option<Lenient<T>>>::deserialize(d)
            .map(|v| v.into_iter().map(|o| o.map(|l| l.0)).collect())
    }
}

/// [`text_vec`] for an optional list (`null` when absent).
pub mod text_option_vec {
    use super::*;

    /// Writes each value as its decimal digits, or `null` for no list.
    pub fn serialize<T: fmt::Display, S: Serializer>(
        values: &Option<Vec<T>>,
        s: S,
    ) -> Result<S::Ok, S::Error> {
        match values {
            Some(v) => s.collect_seq(v.iter().map(|v| v.to_string())),
            None => s.serialize_none(),
        }
    }

    /// Reads a list of decimal strings or JSON numbers, or `null`.
    pub fn deserialize<'de, T, D>(d: D) -> Result<Option<Vec<T>>, D::Error>
    where
        T: std::str::FromStr + TryFrom<i64> + TryFrom<u64> + TryFrom<i128>,
        D: Deserializer<'de>,
    {
        Option::<Vec<Lenient<T>>>::deserialize(d)
            .map(|o| o.map(|v| v.into_iter().map(|l| l.0).collect()))
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

    #[derive(Debug, PartialEq, Serialize, Deserialize)]
    struct Fields {
        #[serde(with = "text")]
        one: i64,
        #[serde(with = "text_option")]
        maybe: Option<i128>,
        #[serde(with = "text_vec")]
        many: Vec<i64>,
        #[serde(with = "text_vec_option")]
        sides: Vec<Option<i64>>,
        #[serde(with = "text_option_vec")]
        plan: Option<Vec<i64>>,
    }

    #[test]
    fn adapters_write_strings_and_read_strings_or_numbers() {
        let fields = Fields {
            one: (1 << 60) + 1,
            maybe: Some(-(1 << 100)),
            many: vec![-3, 9_007_199_254_740_993],
            sides: vec![None, Some(4)],
            plan: Some(vec![2]),
        };
        let text = serde_json::to_string(&fields).unwrap();
        assert_eq!(
            text,
            r#"{"one":"1152921504606846977","maybe":"-1267650600228229401496703205376","many":["-3","9007199254740993"],"sides":[null,"4"],"plan":["2"]}"#
        );
        assert_eq!(serde_json::from_str::<Fields>(&text).unwrap(), fields);
        let numbers = r#"{"one":7,"maybe":null,"many":[1,-2],"sides":[5,null],"plan":null}"#;
        let read: Fields = serde_json::from_str(numbers).unwrap();
        assert_eq!((read.one, read.maybe), (7, None));
        assert_eq!((read.many, read.sides), (vec![1, -2], vec![Some(5), None]));
        let too_big =
            r#"{"one":"9223372036854775808","maybe":null,"many":[],"sides":[],"plan":[]}"#;
        assert!(serde_json::from_str::<Fields>(too_big).is_err());
    }
}
