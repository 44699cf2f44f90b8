//! Reading scenario and day values from a parsed JSON or TOML tree, with the exact field path
//! (`lanes[2].cost.dairy`) in every error.

use serde_json::{Map, Value};

use crate::error::{Error, Result};
use crate::model::{ModelKind, VALUE_LIMIT};

/// Parses JSON or TOML text into one tree; TOML tables become JSON objects.
pub(crate) fn parse_tree(text: &str, kind: ModelKind, origin: &str) -> Result<Value> {
    match kind {
        ModelKind::Json => crate::input::parse_json(text).map_err(|e| Error::Input {
            file: origin.to_string(),
            field: format!("line {}", e.line()),
            message: format!("not valid JSON: {}", strip_position(&e.to_string())),
        }),
        ModelKind::Mps => Err(Error::Input {
            file: origin.to_string(),
            field: "file name".to_string(),
            message: "scenarios and day files are JSON or TOML, not MPS".to_string(),
        }),
        ModelKind::Toml => toml::from_str::<Value>(text).map_err(|e| {
            let line = e.span().map_or(1, |s| {
                text[..s.start.min(text.len())].matches('\n').count() + 1
            });
            Error::Input {
                file: origin.to_string(),
                field: format!("line {line}"),
                message: format!("not valid TOML: {}", e.message()),
            }
        }),
    }
}

/// serde_json ends its messages with " at line L column C"; the field already says where.
pub(crate) fn strip_position(message: &str) -> &str {
    message.split(" at line ").next().unwrap_or(message)
}

/// Reads values, attributing every error to one file and a field path prefix.
pub(crate) struct Reader<'a> {
    /// The file errors name.
    pub(crate) file: &'a str,
    /// Put before every field path (for example `line 4: `).
    pub(crate) prefix: String,
}

impl Reader<'_> {
    /// An input error at `field`.
    pub(crate) fn error(&self, field: &str, message: impl Into<String>) -> Error {
        Error::Input {
            file: self.file.to_string(),
            field: if field.is_empty() {
                self.prefix.trim_end_matches([':', ' ']).to_string()
            } else {
                format!("{}{field}", self.prefix)
            },
            message: message.into(),
        }
    }

    /// `value` as an object whose keys are all in `allowed`.
    pub(crate) fn object<'v>(
        &self,
        value: &'v Value,
        field: &str,
        allowed: &[&str],
    ) -> Result<&'v Map<String, Value>> {
        let map = value
            .as_object()
            .ok_or_else(|| self.error(field, format!("expected a table, found {}", kind(value))))?;
        if let Some(key) = map.keys().find(|k| !allowed.contains(&k.as_str())) {
            let at = join(field, key);
            return Err(self.error(
                &at,
                format!("unknown key; expected one of {}", allowed.join(", ")),
            ));
        }
        Ok(map)
    }

    /// `value` as an integer within `±2^62`.
    pub(crate) fn int(&self, value: &Value, field: &str) -> Result<i64> {
        let n = match value {
            Value::Number(n) => n.as_i64().ok_or_else(|| {
                if n.is_f64() {
                    self.error(field, format!("{n} is not an integer"))
                } else {
                    self.error(field, format!("{n} is out of range (|v| <= 2^62)"))
                }
            })?,
            other => {
                return Err(self.error(field, format!("expected an integer, found {}", kind(other))))
            }
        };
        if i128::from(n).abs() > VALUE_LIMIT {
            return Err(self.error(field, format!("{n} is out of range (|v| <= 2^62)")));
        }
        Ok(n)
    }

    /// `value` as a string.
    pub(crate) fn string<'v>(&self, value: &'v Value, field: &str) -> Result<&'v str> {
        value
            .as_str()
            .ok_or_else(|| self.error(field, format!("expected a string, found {}", kind(value))))
    }

    /// `value` as a non-empty list of unique names (letters, digits, `_`, `-`, `.`).
    pub(crate) fn names(&self, value: &Value, field: &str) -> Result<Vec<String>> {
        let items = value.as_array().ok_or_else(|| {
            self.error(
                field,
                format!("expected a list of names, found {}", kind(value)),
            )
        })?;
        if items.is_empty() {
            return Err(self.error(field, "needs at least one name"));
        }
        let mut out: Vec<String> = Vec::with_capacity(items.len());
        for (i, item) in items.iter().enumerate() {
            let at = format!("{field}[{i}]");
            let name = self.string(item, &at)?;
            check_name(name).map_err(|m| self.error(&at, m))?;
            if out.iter().any(|n| n == name) {
                return Err(self.error(&at, format!("{name:?} is listed twice")));
            }
            out.push(name.to_string());
        }
        Ok(out)
    }
}

/// Scenario names may hold letters, digits, `_`, `-` and `.`, so that compound names such as
/// `north->harbour/dairy` and CSV cells stay unambiguous.
fn check_name(name: &str) -> std::result::Result<(), String> {
    if name.is_empty() {
        return Err("a name cannot be empty".to_string());
    }
    if name.contains("->") {
        return Err(format!("{name:?} contains \"->\", which joins lane names"));
    }
    match name
        .chars()
        .find(|c| !(c.is_alphanumeric() || matches!(c, '_' | '-' | '.')))
    {
        Some(c) => Err(format!(
            "{name:?} contains {c:?}; use letters, digits, '_', '-' and '.'"
        )),
        None => Ok(()),
    }
}

/// `parent.key`, or `key` at the top level.
pub(crate) fn join(parent: &str, key: &str) -> String {
    if parent.is_empty() {
        key.to_string()
    } else {
        format!("{parent}.{key}")
    }
}

/// A short name of a value's type, for messages.
pub(crate) fn kind(value: &Value) -> &'static str {
    match value {
        Value::Null => "null",
        Value::Bool(_) => "a boolean",
        Value::Number(n) if n.is_f64() => "a number with a fraction",
        Value::Number(_) => "an integer",
        Value::String(_) => "a string",
        Value::Array(_) => "a list",
        Value::Object(_) => "a table",
    }
}
