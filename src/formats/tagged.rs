//! The JSON contract: every document and record kernstep prints for other programs is an
//! object whose `schema` field names its layout and version (`kernstep.<name>/<version>`),
//! and each layout has a published JSON Schema generated from its type
//! ([`super::published::published`]).
//!
//! Layouts that carry their own `schema` field (solve, trace and progress documents) are
//! [`Document`]s as they are; the others are printed inside a [`Tagged`] envelope, which
//! puts the field first beside the layout's own fields.

use schemars::{JsonSchema, Schema, SchemaGenerator};
use serde::{Deserialize, Serialize};
use serde_json::Value;

/// A layout other programs read, with its `schema` name.
pub trait Document: JsonSchema {
    /// The `schema` value, `kernstep.<name>/<version>`.
    const SCHEMA: &'static str;
    /// Whether the type writes its `schema` field itself (otherwise [`Tagged`] adds it).
    const SELF_TAGGED: bool = false;
}

/// `body` printed with its `schema` field first.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Tagged<T> {
    /// The layout's name and version, `kernstep.<name>/<version>`.
    pub schema: String,
    /// The layout's own fields.
    #[serde(flatten)]
    pub body: T,
}

impl<T: Document> JsonSchema for Tagged<T> {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        T::schema_name()
    }

    fn json_schema(generator: &mut SchemaGenerator) -> Schema {
        let mut schema = T::json_schema(generator);
        if let Some(Value::Object(properties)) = schema.get_mut("properties") {
            properties.insert("schema".into(), schema_property::<T>());
        }
        match schema.get_mut("required") {
            Some(Value::Array(required)) => required.insert(0, "schema".into()),
            _ => {
                schema.insert("required".into(), serde_json::json!(["schema"]));
            }
        }
        schema
    }
}

/// The `schema` property of `T`'s JSON Schema: the one value it may hold.
fn schema_property<T: Document>() -> Value {
    serde_json::json!({
        "description": "The layout's name and version.",
        "const": T::SCHEMA,
    })
}

/// What is printed for a layout: the body itself when it writes its `schema` field, else the
/// body in its envelope.
#[derive(Serialize)]
#[serde(untagged)]
enum Printed<'a, T> {
    Own(&'a T),
    Enveloped(Tagged<&'a T>),
}

impl<'a, T: Document> Printed<'a, T> {
    fn of(body: &'a T) -> Self {
        match T::SELF_TAGGED {
            true => Printed::Own(body),
            false => Printed::Enveloped(Tagged {
                schema: T::SCHEMA.to_string(),
                body,
            }),
        }
    }
}

/// `body` as indented JSON with its `schema` field, as `--json` prints it.
pub fn pretty<T: Document + Serialize>(body: &T) -> serde_json::Result<String> {
    serde_json::to_string_pretty(&Printed::of(body))
}

/// `body` as one line of JSON with its `schema` field, as JSON Lines records are written.
pub fn line<T: Document + Serialize>(body: &T) -> serde_json::Result<String> {
    serde_json::to_string(&Printed::of(body))
}

/// Writes [`line()`] of `body` to `out`, without its line break (no text in between).
pub fn write_line<T: Document + Serialize>(
    out: impl std::io::Write,
    body: &T,
) -> serde_json::Result<()> {
    serde_json::to_writer(out, &Printed::of(body))
}

/// The JSON Schema of `T`'s printed form: every field the layout prints, its `schema` field
/// held to [`Document::SCHEMA`].
pub fn json_schema<T: Document>() -> Value {
    let mut schema = if T::SELF_TAGGED {
        schemars::schema_for!(T)
    } else {
        schemars::schema_for!(Tagged<T>)
    };
    if let Some(Value::Object(properties)) = schema.get_mut("properties") {
        properties.insert("schema".into(), schema_property::<T>());
    }
    schema.to_value()
}
