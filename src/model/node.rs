//! A format-neutral tree of parsed values, so that JSON and TOML files share one validation.
//!
//! Integers are kept as `i128` so that every JSON integer (signed or unsigned 64-bit) is held
//! exactly; the validation decides which range is acceptable.

use crate::error::{Error, Result};

/// One parsed value.
#[derive(Clone, Debug, PartialEq)]
pub(crate) enum Node {
    /// JSON `null`.
    Null,
    /// A boolean.
    Bool(bool),
    /// An integer literal.
    Int(i128),
    /// A number written with a fraction or an exponent (or too large for an integer).
    Float(f64),
    /// A string.
    Str(String),
    /// An array.
    Array(Vec<Node>),
    /// A table / object, keys in file order (JSON) or sorted (TOML).
    Table(Vec<(String, Node)>),
    /// A TOML date or time.
    Datetime,
}

impl Node {
    /// A short name of the value's type, for messages.
    pub(crate) fn type_name(&self) -> &'static str {
        match self {
            Node::Null => "null",
            Node::Bool(_) => "a boolean",
            Node::Int(_) => "an integer",
            Node::Float(_) => "a number with a fraction",
            Node::Str(_) => "a string",
            Node::Array(_) => "an array",
            Node::Table(_) => "a table",
            Node::Datetime => "a date",
        }
    }
}

/// Parses JSON text; syntax errors name the line and column.
pub(crate) fn parse_json(text: &str, origin: &str) -> Result<Node> {
    let value = crate::input::parse_json(text).map_err(|e| Error::Input {
        file: origin.to_string(),
        field: format!("line {}, column {}", e.line(), e.column()),
        message: format!("invalid JSON: {}", json_message(&e)),
    })?;
    Ok(from_json(value))
}

/// serde_json appends " at line L column C" to its messages; the field already says where.
fn json_message(e: &serde_json::Error) -> String {
    let full = e.to_string();
    match full.rfind(" at line ") {
        Some(cut) => full[..cut].to_string(),
        None => full,
    }
}

fn from_json(value: serde_json::Value) -> Node {
    use serde_json::Value;
    match value {
        Value::Null => Node::Null,
        Value::Bool(b) => Node::Bool(b),
        Value::Number(n) => {
            if let Some(i) = n.as_i64() {
                Node::Int(i128::from(i))
            } else if let Some(u) = n.as_u64() {
                Node::Int(i128::from(u))
            } else {
                Node::Float(n.as_f64().unwrap_or(f64::NAN))
            }
        }
        Value::String(s) => Node::Str(s),
        Value::Array(items) => Node::Array(items.into_iter().map(from_json).collect()),
        Value::Object(map) => {
            Node::Table(map.into_iter().map(|(k, v)| (k, from_json(v))).collect())
        }
    }
}

/// Parses TOML text; syntax errors name the line and column.
pub(crate) fn parse_toml(text: &str, origin: &str) -> Result<Node> {
    let table: toml::Table = toml::from_str(text).map_err(|e| {
        let (line, column) = e.span().map_or((1, 1), |s| line_column(text, s.start));
        Error::Input {
            file: origin.to_string(),
            field: format!("line {line}, column {column}"),
            message: format!("invalid TOML: {}", e.message().trim_end()),
        }
    })?;
    Ok(from_toml(toml::Value::Table(table)))
}

/// One-based line and column (in characters) of a byte offset.
fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let before = &text[..offset.min(text.len())];
    let line = before.matches('\n').count() + 1;
    let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
    (line, column)
}

fn from_toml(value: toml::Value) -> Node {
    use toml::Value;
    match value {
        Value::String(s) => Node::Str(s),
        Value::Integer(i) => Node::Int(i128::from(i)),
        Value::Float(f) => Node::Float(f),
        Value::Boolean(b) => Node::Bool(b),
        Value::Datetime(_) => Node::Datetime,
        Value::Array(items) => Node::Array(items.into_iter().map(from_toml).collect()),
        Value::Table(map) => Node::Table(map.into_iter().map(|(k, v)| (k, from_toml(v))).collect()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn json_integers_keep_their_full_range() {
        let node = parse_json("[18446744073709551615, -3, 1.5]", "t.json").unwrap();
        assert_eq!(
            node,
            Node::Array(vec![
                Node::Int(i128::from(u64::MAX)),
                Node::Int(-3),
                Node::Float(1.5)
            ])
        );
    }

    #[test]
    fn syntax_errors_name_line_and_column() {
        let err = parse_json("{\n  \"matrix\": [1,,2]\n}", "t.json").unwrap_err();
        let text = err.to_string();
        assert!(text.starts_with("t.json: line 2, column "), "{text}");
        let err = parse_toml("matrix = [[1, 2]\nrhs = [", "t.toml").unwrap_err();
        assert!(err.to_string().starts_with("t.toml: line "), "{err}");
    }

    #[test]
    fn line_column_counts_from_one() {
        assert_eq!(line_column("ab\ncd", 4), (2, 2));
        assert_eq!(line_column("ab", 0), (1, 1));
    }
}
