//! Exact decimal values written as decimal strings, so that readers whose numbers are
//! doubles (JavaScript, spreadsheets) never round a value above `2^53`, and a cost the model
//! file wrote with decimals (`1.25`) is reported as the file wrote it: [`Decimal`] for values,
//! and the serde adapters [`text`] and [`text_option_vec`] for integer fields (which also read
//! the JSON numbers that layouts before the JSON contract wrote).

use std::cmp::Ordering;
use std::fmt;
use std::str::FromStr;

use serde::{Deserialize, Deserializer, Serialize, Serializer};

/// An exact decimal `units / 10^places`, serialised as a decimal string such as `"-1250"` or
/// `"-12.50"`.
///
/// `places` is kept as given (a value of a model whose costs have two decimals prints with
/// two decimals, `"12.50"`); equality compares values, so `12.50` equals `12.5`.
#[derive(Clone, Copy, Debug, Default)]
pub struct Decimal {
    units: i128,
    places: u32,
}

/// Most decimal places a [`Decimal`] holds: `10^38` is the largest power of ten an `i128`
/// holds.
pub const MAX_PLACES: u32 = 38;

impl Decimal {
    /// `units / 10^places`; `None` when `places` exceeds 38 (`10^38` is the largest power of
    /// ten an `i128` holds).
    pub fn scaled(units: i128, places: u32) -> Option<Decimal> {
        (places <= MAX_PLACES).then_some(Decimal { units, places })
    }

    /// The value as an integer, when it has no decimal places.
    pub fn integer(self) -> Option<i128> {
        (self.places == 0).then_some(self.units)
    }

    /// The integer `units` with `places` as written: the value is `units / 10^places`.
    pub fn parts(self) -> (i128, u32) {
        (self.units, self.places)
    }

    /// The value with at least `places` decimal places, `None` when it does not fit.
    fn widened(self, places: u32) -> Option<i128> {
        let extra = places.checked_sub(self.places)?;
        10i128.checked_pow(extra)?.checked_mul(self.units)
    }

    /// `self + other` with the larger number of places, saturating at the largest values an
    /// `i128` of units holds at those places.
    pub fn saturating_add(self, other: Decimal) -> Decimal {
        let places = self.places.max(other.places);
        let side = |d: Decimal| {
            d.widened(places).unwrap_or(match d.units >= 0 {
                true => i128::MAX,
                false => i128::MIN,
            })
        };
        Decimal {
            units: side(self).saturating_add(side(other)),
            places,
        }
    }
}

impl From<i128> for Decimal {
    fn from(units: i128) -> Decimal {
        Decimal { units, places: 0 }
    }
}

impl PartialEq for Decimal {
    fn eq(&self, other: &Decimal) -> bool {
        self.cmp(other) == Ordering::Equal
    }
}

impl Eq for Decimal {}

impl PartialOrd for Decimal {
    fn partial_cmp(&self, other: &Decimal) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Decimal {
    /// By value. Values whose units overflow when brought to the same places compare by
    /// sign first, then by their integer parts and fractions apart, which never overflows.
    fn cmp(&self, other: &Decimal) -> Ordering {
        let places = self.places.max(other.places);
        if let (Some(a), Some(b)) = (self.widened(places), other.widened(places)) {
            return a.cmp(&b);
        }
        let split = |d: &Decimal| {
            let scale = 10i128.pow(d.places);
            let whole = d.units.div_euclid(scale);
            // The fraction in [0, 1) as units of 10^-MAX_PLACES; 10^(38 - p) * r < 10^38 fits.
            let fraction = d.units.rem_euclid(scale) * 10i128.pow(MAX_PLACES - d.places);
            (whole, fraction)
        };
        split(self).cmp(&split(other))
    }
}

impl fmt::Display for Decimal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&point_text(&self.units.to_string(), self.places))
    }
}

/// The decimal text of an integer written as `digits` (an optional `-`, then digits) divided
/// by `10^places`, exactly: `("-1250", 2)` is `"-12.50"`, `("5", 2)` is `"0.05"`.
pub fn point_text(digits: &str, places: u32) -> String {
    let (sign, magnitude) = match digits.strip_prefix('-') {
        Some(rest) => ("-", rest),
        None => ("", digits),
    };
    let places = places as usize;
    if places == 0 {
        return format!("{sign}{magnitude}");
    }
    let padded = format!("{magnitude:0>width$}", width = places + 1);
    let (whole, fraction) = padded.split_at(padded.len() - places);
    format!("{sign}{whole}.{fraction}")
}

/// Why a text is not a [`Decimal`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct BadDecimal(String);

impl fmt::Display for BadDecimal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{:?} is not a decimal number", self.0)
    }
}

impl std::error::Error for BadDecimal {}

impl FromStr for Decimal {
    type Err = BadDecimal;

    /// Reads `-12`, `12.50` or `0.05` (an optional `-`, digits, optionally a point and
    /// digits); the places are those written.
    fn from_str(text: &str) -> Result<Decimal, BadDecimal> {
        let bad = || BadDecimal(text.to_string());
        let magnitude = text.strip_prefix('-').unwrap_or(text);
        let (whole, fraction) = magnitude.split_once('.').unwrap_or((magnitude, ""));
        let digits = |s: &str| !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit());
        if !digits(whole) || (magnitude.contains('.') && !digits(fraction)) {
            return Err(bad());
        }
        let places = u32::try_from(fraction.len()).map_err(|_| bad())?;
        let sign = if magnitude.len() < text.len() {
            "-"
        } else {
            ""
        };
        let units = format!("{sign}{whole}{fraction}")
            .parse::<i128>()
            .map_err(|_| bad())?;
        Decimal::scaled(units, places).ok_or_else(bad)
    }
}

impl Serialize for Decimal {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_str(self)
    }
}

impl schemars::JsonSchema for Decimal {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Decimal".into()
    }

    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({
            "description": "An exact decimal number written as text (an optional minus, digits, optionally a point and digits), so that readers whose numbers are doubles never round it.",
            "type": "string",
            "pattern": "^-?[0-9]+(\\.[0-9]+)?$",
        })
    }
}

impl<'de> Deserialize<'de> for Decimal {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        let text = String::deserialize(deserializer)?;
        text.parse().map_err(serde::de::Error::custom)
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

/// [`text`] for each integer of an optional list (`null` when absent).
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
        let value = Decimal::from((1i128 << 80) + 1);
        let text = serde_json::to_string(&value).unwrap();
        assert_eq!(text, "\"1208925819614629174706177\"");
        assert_eq!(serde_json::from_str::<Decimal>(&text).unwrap(), value);
        assert!(serde_json::from_str::<Decimal>("\"1.5x\"").is_err());
    }

    #[test]
    fn writes_the_places_it_was_given_without_floats() {
        let text = |units, places| Decimal::scaled(units, places).unwrap().to_string();
        assert_eq!(text(-125, 1), "-12.5");
        assert_eq!(text(-1250, 2), "-12.50");
        assert_eq!(text(5, 2), "0.05");
        assert_eq!(text(-5, 3), "-0.005");
        assert_eq!(text(0, 2), "0.00");
        assert_eq!(text(42, 0), "42");
        // 2^100 + 1 hundredths: a double would lose the last digits.
        let big = (1i128 << 100) + 1;
        assert_eq!(text(big, 2), "12676506002282294014967032053.77");
        assert_eq!(point_text("-7", 1), "-0.7");
        assert!(Decimal::scaled(1, MAX_PLACES + 1).is_none());
    }

    #[test]
    fn reads_what_it_writes_and_compares_values() {
        for text in ["-12.50", "0.05", "-0.005", "42", "0.00"] {
            assert_eq!(text.parse::<Decimal>().unwrap().to_string(), text);
        }
        assert_eq!("-0".parse::<Decimal>().unwrap().to_string(), "0");
        for bad in ["", "-", "1.", ".5", "1.2.3", "1e5", "+1", " 1", "1,5"] {
            assert!(bad.parse::<Decimal>().is_err(), "{bad:?}");
        }
        let d = |t: &str| t.parse::<Decimal>().unwrap();
        assert_eq!(d("12.50"), d("12.5"));
        assert_eq!(d("12.5"), Decimal::scaled(125, 1).unwrap());
        assert!(d("-0.01") < d("0"));
        assert!(d("1.999") < d("2"));
        let huge = Decimal::scaled(i128::MAX, 0).unwrap();
        assert!(d("0.5") < huge && Decimal::scaled(i128::MIN, 1).unwrap() < d("0.5"));
        assert_eq!(d("1.25").saturating_add(d("2")), d("3.25"));
        assert_eq!(d("1.25").saturating_add(d("2")).parts(), (325, 2));
    }

    #[derive(Debug, PartialEq, Serialize, Deserialize)]
    struct Fields {
        #[serde(with = "text")]
        one: i64,
        #[serde(with = "text")]
        wide: i128,
        #[serde(with = "text_option_vec")]
        plan: Option<Vec<i64>>,
    }

    #[test]
    fn adapters_write_strings_and_read_strings_or_numbers() {
        let fields = Fields {
            one: (1 << 60) + 1,
            wide: -(1 << 100),
            plan: Some(vec![-3, 9_007_199_254_740_993]),
        };
        let text = serde_json::to_string(&fields).unwrap();
        assert_eq!(
            text,
            r#"{"one":"1152921504606846977","wide":"-1267650600228229401496703205376","plan":["-3","9007199254740993"]}"#
        );
        assert_eq!(serde_json::from_str::<Fields>(&text).unwrap(), fields);
        let numbers = r#"{"one":7,"wide":-2,"plan":[1,-2]}"#;
        let read: Fields = serde_json::from_str(numbers).unwrap();
        assert_eq!((read.one, read.wide, read.plan), (7, -2, Some(vec![1, -2])));
        let read: Fields = serde_json::from_str(r#"{"one":7,"wide":"0","plan":null}"#).unwrap();
        assert_eq!(read.plan, None);
        let too_big = r#"{"one":"9223372036854775808","wide":"0","plan":[]}"#;
        assert!(serde_json::from_str::<Fields>(too_big).is_err());
    }
}
