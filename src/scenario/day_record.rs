//! A quick reading of one JSON day line, without building a document tree.
//!
//! A batch reads thousands of day lines, and a `serde_json::Value` per line costs an
//! allocation per key and per number. [`DayRecord`] borrows the day's name and every key
//! from the line and keeps the values as plain integers, in input order. It reads only lines
//! of the simplest shape: a JSON object whose keys and names need no unescaping, each key (and
//! each name in a table) at most once, `day` a string and every other key a table of names to
//! integers or `null`.
//! Anything else fails, and the caller reads the line again the careful way, which also gives
//! the messages; so this reading never decides what is valid, only how fast a valid line goes.

use std::fmt;

use serde::de::{Deserialize, Deserializer, Error, MapAccess, Visitor};

/// A table's entries: names and new values (`None` for `null`), in input order.
pub(super) type Entries<'a> = Vec<(&'a str, Option<i64>)>;

/// One day line: its name and, per key, the changed entries.
#[derive(Debug, Default, PartialEq)]
pub(super) struct DayRecord<'a> {
    /// The value of `day`, if given.
    pub day: Option<&'a str>,
    /// Every other key with its entries, in input order.
    pub tables: Vec<(&'a str, Entries<'a>)>,
}

impl<'a> DayRecord<'a> {
    /// The record of `line`, or `None` when it is not of the simple shape.
    pub fn read(line: &'a str) -> Option<Self> {
        serde_json::from_str(line).ok()
    }
}

impl<'de> Deserialize<'de> for DayRecord<'de> {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        deserializer.deserialize_map(RecordVisitor)
    }
}

struct RecordVisitor;

impl<'de> Visitor<'de> for RecordVisitor {
    type Value = DayRecord<'de>;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("an object of a day and tables")
    }

    fn visit_map<M: MapAccess<'de>>(self, mut map: M) -> Result<Self::Value, M::Error> {
        let mut record = DayRecord::default();
        while let Some(key) = map.next_key::<&'de str>()? {
            if key == "day" {
                if record.day.replace(map.next_value()?).is_some() {
                    return Err(M::Error::custom("day given twice"));
                }
            } else if record.tables.iter().any(|(k, _)| *k == key) {
                return Err(M::Error::custom("key given twice"));
            } else {
                record.tables.push((key, map.next_value::<Table>()?.0));
            }
        }
        Ok(record)
    }
}

/// A table from names to integers or `null`, in input order.
struct Table<'a>(Entries<'a>);

impl<'de> Deserialize<'de> for Table<'de> {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        deserializer.deserialize_map(EntriesVisitor)
    }
}

struct EntriesVisitor;

impl<'de> Visitor<'de> for EntriesVisitor {
    type Value = Table<'de>;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a table from names to integers")
    }

    fn visit_map<M: MapAccess<'de>>(self, mut map: M) -> Result<Self::Value, M::Error> {
        let mut entries = Vec::with_capacity(map.size_hint().unwrap_or(4));
        while let Some(name) = map.next_key::<&'de str>()? {
            if entries.iter().any(|(n, _)| *n == name) {
                return Err(M::Error::custom("name given twice"));
            }
            entries.push((name, map.next_value()?));
        }
        Ok(Table(entries))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_a_simple_line_in_input_order() {
        let line = r#"{"day": "d1", "demand": {"b": 3, "a": null}, "cost": {"x->y": -2}}"#;
        let record = DayRecord::read(line).unwrap();
        assert_eq!(record.day, Some("d1"));
        assert_eq!(
            record.tables,
            vec![
                ("demand", vec![("b", Some(3)), ("a", None)]),
                ("cost", vec![("x->y", Some(-2))]),
            ]
        );
    }

    #[test]
    fn leaves_every_other_shape_to_the_careful_reading() {
        for line in [
            r#"{"day": "d1", "day": "d2"}"#,
            r#"{"day": "d1", "cost": {"a": 1}, "cost": {"a": 2}}"#,
            r#"{"day": "d1", "cost": {"a": 1, "a": 2}}"#,
            r#"{"day": 7}"#,
            r#"{"day": "d1", "cost": {"a": 1.5}}"#,
            r#"{"day": "d1", "cost": {"a": "1"}}"#,
            r#"{"day": "d1", "cost": {"a": 18446744073709551615}}"#,
            r#"{"day": "d1", "cost": [1]}"#,
            r#"{"day": "d\u0031"}"#,
            r#"{"day": "d1", "cost": {"a\"b": 1}}"#,
            r#"["day"]"#,
            r#"{"day": "d1""#,
        ] {
            assert_eq!(DayRecord::read(line), None, "{line}");
        }
    }
}
