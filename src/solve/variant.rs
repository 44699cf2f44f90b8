//! Variants of a model: a new right-hand side, costs or bounds, with everything else as in
//! the model.
//!
//! A variants file is JSON Lines, one `{"id", "rhs", "cost", "lower", "upper"}` object per
//! line; an omitted field means "as in the model", `null` inside `lower`/`upper` is an
//! infinite bound. Blank lines are skipped. Every error names the file, the line and the field.

use std::collections::HashMap;

use augment::Problem;
use serde::Deserialize;

use crate::bound::BoundInstance;
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;
use crate::model::{ConvexCosts, Model, VALUE_LIMIT};
use crate::network::FlowNumbers;

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
/// error, so that one bad line does not stop the others. An id must be printable and may be
/// given once: a line repeating an earlier id is refused.
pub fn parse_lines(text: &str, origin: &str) -> Vec<ParsedLine> {
    let mut seen: HashMap<String, usize> = HashMap::new();
    text.lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty())
        .map(|(i, line)| {
            let bad = |message: String| Error::Input {
                file: origin.to_string(),
                field: format!("line {}", i + 1),
                message,
            };
            let parsed = serde_json::from_str::<Variant>(line)
                .map_err(|e| named_error(line, bad(e.to_string())))
                .and_then(|v| {
                    crate::input::printable(&v.id).map_err(|why| bad(format!("id: {why}")))?;
                    match seen.get(&v.id) {
                        Some(first) => Err(bad(format!(
                            "id: {:?} is already given on line {first}",
                            v.id
                        ))
                        .for_day(&v.id)),
                        None => {
                            seen.insert(v.id.clone(), i + 1);
                            Ok(v)
                        }
                    }
                });
            (i + 1, parsed)
        })
        .collect()
}

/// `error` of a line that does not read as a variant, carrying the line's id when it names
/// one unambiguously (a JSON object with one string `id`).
fn named_error(line: &str, error: Error) -> Error {
    let id = crate::input::parse_json(line)
        .ok()
        .and_then(|v| v.get("id")?.as_str().map(String::from));
    match id {
        Some(id) => error.for_day(&id),
        None => error,
    }
}

impl Variant {
    /// The model with this variant's numbers, checked for lengths.
    pub fn apply(&self, model: &Model, origin: &str) -> Result<Model> {
        let numbers = self.numbers(model, origin)?;
        Ok(Model {
            rhs: numbers.rhs.to_vec(),
            cost: numbers.cost.to_vec(),
            lower: numbers.lower.to_vec(),
            upper: numbers.upper.to_vec(),
            ..model.clone()
        })
    }

    /// This variant's numbers over `model` (the model's where the variant gives none), checked
    /// for lengths; nothing is copied.
    pub fn numbers<'a>(&'a self, model: &'a Model, origin: &str) -> Result<Numbers<'a>> {
        let check = |name: &str, len: usize, want: usize| {
            if len == want {
                Ok(())
            } else {
                Err(Error::Input {
                    file: origin.to_string(),
                    field: format!("variant {:?}: {name}", self.id),
                    message: format!("has {len} entries, the model needs {want}"),
                })
            }
        };
        let (m, n) = (model.constraints(), model.variables());
        let rhs = self.rhs.as_deref().unwrap_or(&model.rhs);
        let cost = self.cost.as_deref().unwrap_or(&model.cost);
        let lower = self.lower.as_deref().unwrap_or(&model.lower);
        let upper = self.upper.as_deref().unwrap_or(&model.upper);
        check("rhs", rhs.len(), m)?;
        check("cost", cost.len(), n)?;
        check("lower", lower.len(), n)?;
        check("upper", upper.len(), n)?;
        let exact = |v: &'a Option<Vec<i64>>| v.iter().flatten().copied().map(Some);
        let bounds = |v: &'a Option<Vec<Option<i64>>>| v.iter().flatten().copied();
        self.within_range("rhs", exact(&self.rhs), origin)?;
        self.within_range("cost", exact(&self.cost), origin)?;
        self.within_range("lower", bounds(&self.lower), origin)?;
        self.within_range("upper", bounds(&self.upper), origin)?;
        Ok(Numbers {
            rhs,
            cost,
            convex: &model.convex,
            lower,
            upper,
        })
    }
}

impl Variant {
    /// Refuses a value beyond `±2^62` ([`VALUE_LIMIT`], the range model files are held to,
    /// within which the solver's checked arithmetic is exact), naming the entry.
    fn within_range(
        &self,
        name: &str,
        values: impl Iterator<Item = Option<i64>>,
        origin: &str,
    ) -> Result<()> {
        let beyond = values.enumerate().find_map(|(i, v)| {
            v.filter(|&v| i128::from(v).abs() > VALUE_LIMIT)
                .map(|v| (i, v))
        });
        match beyond {
            Some((i, v)) => Err(Error::Input {
                file: origin.to_string(),
                field: format!("variant {:?}: {name}[{i}]", self.id),
                message: format!("{v} is out of range (|v| <= 2^62)"),
            }),
            None => Ok(()),
        }
    }
}

/// The numbers of one instance of a model's matrix: what changes from day to day.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Numbers<'a> {
    /// Right-hand side `b`.
    pub rhs: &'a [i64],
    /// Linear cost `c`.
    pub cost: &'a [i64],
    /// Convex costs added to the linear cost (the model's; variants do not change them).
    pub convex: &'a ConvexCosts,
    /// Lower bounds, `None` for none.
    pub lower: &'a [Option<i64>],
    /// Upper bounds, `None` for none.
    pub upper: &'a [Option<i64>],
}

impl<'a> Numbers<'a> {
    /// The augmentation problem of these numbers: the objective and the box.
    pub fn problem(&self) -> Result<Problem> {
        Ok(Problem::new(
            self.convex.objective(self.cost, None)?,
            self.lower.to_vec(),
            self.upper.to_vec(),
        )?)
    }

    /// The linear part of these numbers as the network solver and its certificates take
    /// them (convex costs are not carried over).
    pub fn linear_flow(&self) -> FlowNumbers<'a> {
        FlowNumbers {
            rhs: self.rhs,
            cost: self.cost,
            lower: self.lower,
            upper: self.upper,
        }
    }

    /// These numbers of `matrix` as the dual bound sees them (see [`crate::bound`]).
    pub fn bound_instance<'m>(&self, matrix: &'m IntMatrix) -> BoundInstance<'m>
    where
        'a: 'm,
    {
        BoundInstance::new(
            matrix,
            self.rhs,
            (self.cost, self.convex),
            self.lower,
            self.upper,
        )
    }

    /// The model's own numbers.
    pub fn of(model: &'a Model) -> Self {
        Self {
            rhs: &model.rhs,
            cost: &model.cost,
            convex: &model.convex,
            lower: &model.lower,
            upper: &model.upper,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_beyond_two_to_the_62_are_refused_by_entry() {
        let model = Model::of_matrix(IntMatrix::from_rows(&[vec![1, 1]]).unwrap());
        let text = format!(
            "{{\"id\":\"mon\",\"rhs\":[{}]}}\n{{\"id\":\"tue\",\"upper\":[null,{}]}}\n",
            1i64 << 62,
            (1i64 << 62) + 1
        );
        let lines = parse_lines(&text, "days.jsonl");
        let at_limit = lines[0].1.as_ref().unwrap();
        assert!(at_limit.numbers(&model, "days.jsonl").is_ok());
        let beyond = lines[1].1.as_ref().unwrap();
        let err = beyond
            .numbers(&model, "days.jsonl")
            .unwrap_err()
            .to_string();
        assert!(err.contains("variant \"tue\": upper[1]"), "{err}");
        assert!(err.contains("out of range"), "{err}");
    }

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
