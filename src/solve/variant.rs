//! Variants of a model: a new right-hand side, costs or bounds, with everything else as in
//! the model.
//!
//! A variants file is JSON Lines, one `{"id", "rhs", "cost", "lower", "upper"}` object per
//! line; an omitted field means "as in the model", `null` inside `lower`/`upper` is an
//! infinite bound. Blank lines are skipped. Every error names the file, the line and the field.

use serde::Deserialize;

use crate::error::{Error, Result};
use crate::model::Model;

/// The numbers of one variant; `None` keeps the model's.
#[derive(Clone, Debug, Default, PartialEq, Eq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Variant {
    /// The variant's name (a day, a scenario).
    pub id: String,
    /// New right-hand side.
    pub rhs: Option<Vec<i64>>,
    /// New linear cost.
    pub cost: Option<Vec<i64>>,
    /// New lower bounds.
    pub lower: Option<Vec<Option<i64>>>,
    /// New upper bounds.
    pub upper: Option<Vec<Option<i64>>>,
}

/// One line of a variants file: the variant, or why the line is unusable.
pub type ParsedLine = (usize, std::result::Result<Variant, Error>);

/// Parses JSON Lines text; each non-blank line gives its 1-based number and a variant or an
/// error, so that one bad line does not stop the others.
pub fn parse_lines(text: &str, origin: &str) -> Vec<ParsedLine> {
    text.lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty())
        .map(|(i, line)| {
            let parsed = serde_json::from_str::<Variant>(line).map_err(|e| Error::Input {
                file: origin.to_string(),
                field: format!("line {}", i + 1),
                message: e.to_string(),
            });
            (i + 1, parsed)
        })
        .collect()
}

impl Variant {
    /// The model with this variant's numbers, checked for lengths and empty ranges.
    pub fn apply(&self, model: &Model, origin: &str) -> Result<Model> {
        let mut out = model.clone();
        let field = |name: &str| format!("variant {:?}: {name}", self.id);
        let check = |name: &str, len: usize, want: usize| {
            if len == want {
                Ok(())
            } else {
                Err(Error::Input {
                    file: origin.to_string(),
                    field: field(name),
                    message: format!("has {len} entries, the model needs {want}"),
                })
            }
        };
        if let Some(rhs) = &self.rhs {
            check("rhs", rhs.len(), model.constraints())?;
            out.rhs = rhs.clone();
        }
        if let Some(cost) = &self.cost {
            check("cost", cost.len(), model.variables())?;
            out.cost = cost.clone();
        }
        if let Some(lower) = &self.lower {
            check("lower", lower.len(), model.variables())?;
            out.lower = lower.clone();
        }
        if let Some(upper) = &self.upper {
            check("upper", upper.len(), model.variables())?;
            out.upper = upper.clone();
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_lines_are_reported_with_their_number() {
        let text = "{\"id\":\"mon\",\"rhs\":[1]}\n\nnot json\n{\"id\":\"wed\",\"extra\":1}\n";
        let lines = parse_lines(text, "days.jsonl");
        assert_eq!(lines.len(), 3);
        assert!(lines[0].1.is_ok());
        let err = lines[1].1.as_ref().unwrap_err().to_string();
        assert!(err.starts_with("days.jsonl: line 3:"), "{err}");
        assert_eq!(lines[2].0, 4);
        assert!(lines[2].1.is_err());
    }
}
