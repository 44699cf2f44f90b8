//! Turns a parsed [`Node`] tree into a [`Model`], naming the file and the exact field (with row
//! and column) in every error.

use std::collections::HashMap;

use super::node::Node;
use super::{ConvexCosts, Model, Pieces, PiecesFault, MATRIX_ENTRY_LIMIT, VALUE_LIMIT};
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;

/// The top-level keys a model file may hold.
const MODEL_KEYS: [&str; 8] = [
    "matrix",
    "rhs",
    "cost",
    "lower",
    "upper",
    "names",
    "convex_cost",
    "change_cost",
];
/// The keys of one variable's convex cost.
const PIECE_KEYS: [&str; 2] = ["breaks", "slopes"];
/// The keys of the `names` table.
const NAME_KEYS: [&str; 2] = ["variables", "rows"];

/// `2^63` as a float: integral floats at least this large came from integer literals too long
/// for 64 bits, which the JSON reader holds as floats.
const TWO_POW_63: f64 = 9_223_372_036_854_775_808.0;

/// Which side of the box a bound array describes.
#[derive(Clone, Copy)]
enum Side {
    Lower,
    Upper,
}

/// Validation context: the file every error is attributed to.
struct Checker<'a> {
    file: &'a str,
}

impl Checker<'_> {
    fn error(&self, field: impl Into<String>, message: impl Into<String>) -> Error {
        Error::Input {
            file: self.file.to_string(),
            field: field.into(),
            message: message.into(),
        }
    }

    fn expected(&self, field: &str, what: &str, found: &Node) -> Error {
        self.error(
            field,
            format!("expected {what}, found {}", found.type_name()),
        )
    }

    /// The top-level table, after rejecting unknown keys.
    fn table<'n>(
        &self,
        node: &'n Node,
        field: &str,
        keys: &[&str],
    ) -> Result<&'n [(String, Node)]> {
        let Node::Table(entries) = node else {
            return Err(self.expected(field, "a table", node));
        };
        let mut unknown: Vec<&str> = entries
            .iter()
            .map(|(k, _)| k.as_str())
            .filter(|k| !keys.contains(k))
            .collect();
        unknown.sort_unstable();
        if let Some(key) = unknown.first() {
            let path = if field.is_empty() {
                key.to_string()
            } else {
                format!("{field}.{key}")
            };
            return Err(self.error(
                path,
                format!("unknown field; expected one of: {}", keys.join(", ")),
            ));
        }
        Ok(entries)
    }

    fn array<'n>(&self, node: &'n Node, field: &str, what: &str) -> Result<&'n [Node]> {
        match node {
            Node::Array(items) => Ok(items),
            other => Err(self.expected(field, what, other)),
        }
    }

    fn integer(&self, node: &Node, field: &str, limit: i128) -> Result<i64> {
        let too_large = |shown: String| {
            self.error(
                field,
                format!("{shown} exceeds the limit of {limit} in absolute value"),
            )
        };
        match node {
            Node::Int(v) if v.abs() <= limit => {
                Ok(i64::try_from(*v).map_err(|_| too_large(v.to_string()))?)
            }
            Node::Int(v) => Err(too_large(v.to_string())),
            Node::Float(f) if !f.is_finite() || f.fract() != 0.0 => {
                Err(self.error(field, format!("{f:?} is not an integer")))
            }
            Node::Float(f) if f.abs() >= TWO_POW_63 => Err(too_large(format!("{f}"))),
            Node::Float(f) => Err(self.error(
                field,
                format!(
                    "{f:?} is not an integer literal; write it without a decimal point or exponent"
                ),
            )),
            other => Err(self.expected(field, "an integer", other)),
        }
    }

    fn integers(&self, node: &Node, field: &str, len: usize, why: &str) -> Result<Vec<i64>> {
        let items = self.array(node, field, "an array of integers")?;
        self.check_len(items, field, len, why)?;
        items
            .iter()
            .enumerate()
            .map(|(i, v)| self.integer(v, &format!("{field}[{i}]"), VALUE_LIMIT))
            .collect()
    }

    fn check_len(&self, items: &[Node], field: &str, len: usize, why: &str) -> Result<()> {
        if items.len() == len {
            return Ok(());
        }
        Err(self.error(
            field,
            format!("has {} entries, expected {len} ({why})", items.len()),
        ))
    }

    fn matrix(&self, node: &Node) -> Result<IntMatrix> {
        let rows = self.array(node, "matrix", "an array of rows")?;
        if rows.is_empty() {
            return Err(self.error(
                "matrix",
                "is empty; a model needs at least one row and one column",
            ));
        }
        let mut out = Vec::with_capacity(rows.len());
        let mut width = 0;
        for (i, row) in rows.iter().enumerate() {
            let field = format!("matrix[{i}]");
            let entries = self.array(row, &field, "an array of integers")?;
            if i == 0 {
                width = entries.len();
                if width == 0 {
                    return Err(self.error(field, "is empty; a model needs at least one column"));
                }
            } else if entries.len() != width {
                return Err(self.error(
                    field,
                    format!("has {} entries, expected {width}", entries.len()),
                ));
            }
            let values = entries
                .iter()
                .enumerate()
                .map(|(j, v)| self.integer(v, &format!("matrix[{i}][{j}]"), MATRIX_ENTRY_LIMIT))
                .collect::<Result<Vec<i64>>>()?;
            out.push(values);
        }
        IntMatrix::from_rows(&out)
    }

    fn bound(&self, node: &Node, field: &str, side: Side) -> Result<Option<i64>> {
        match (node, side) {
            (Node::Null, _) => Ok(None),
            (Node::Str(s), Side::Lower) if s == "-inf" => Ok(None),
            (Node::Str(s), Side::Upper) if s == "inf" || s == "+inf" => Ok(None),
            (Node::Str(s), Side::Lower) => Err(self.error(
                field,
                format!("{s:?} is not a lower bound; use an integer, null or \"-inf\""),
            )),
            (Node::Str(s), Side::Upper) => Err(self.error(
                field,
                format!("{s:?} is not an upper bound; use an integer, null or \"inf\""),
            )),
            (other, _) => self.integer(other, field, VALUE_LIMIT).map(Some),
        }
    }

    fn bounds(
        &self,
        node: Option<&Node>,
        field: &str,
        n: usize,
        side: Side,
    ) -> Result<Vec<Option<i64>>> {
        let Some(node) = node else {
            return Ok(vec![None; n]);
        };
        let items = self.array(node, field, "an array of bounds")?;
        self.check_len(items, field, n, "one per matrix column")?;
        items
            .iter()
            .enumerate()
            .map(|(j, v)| self.bound(v, &format!("{field}[{j}]"), side))
            .collect()
    }

    fn cost(&self, node: Option<&Node>, n: usize) -> Result<Vec<i64>> {
        match node {
            None => Ok(vec![0; n]),
            Some(Node::Table(_)) => Err(self.error(
                "cost",
                "is a linear cost (an array of integers); write piecewise-linear convex costs under convex_cost",
            )),
            Some(node) => self.integers(node, "cost", n, "one per matrix column"),
        }
    }

    /// The entries of the table `key` from variable names to values (`what` says what the
    /// table is in errors): each value with its variable's index and its field.
    fn by_variable<'n>(
        &self,
        node: &'n Node,
        (key, what): (&str, &str),
        names: &[String],
    ) -> Result<Vec<(usize, String, &'n Node)>> {
        let Node::Table(entries) = node else {
            return Err(self.expected(key, what, node));
        };
        entries
            .iter()
            .map(|(name, value)| {
                let field = format!("{key}.{name}");
                match names.iter().position(|n| n == name) {
                    Some(variable) => Ok((variable, field, value)),
                    None => Err(self.error(&field, format!("no variable named {name:?}"))),
                }
            })
            .collect()
    }

    /// `convex_cost`: a table from variable names to `{ breaks, slopes }`.
    fn convex(&self, node: &Node, names: &[String]) -> Result<ConvexCosts> {
        let what = "a table from variable names to { breaks, slopes }";
        let entries = self.by_variable(node, ("convex_cost", what), names)?;
        let mut out = Vec::with_capacity(entries.len());
        for (variable, field, spec) in entries {
            let parts = self.table(spec, &field, &PIECE_KEYS)?;
            let list = |key: &str| -> Result<Vec<i64>> {
                let here = format!("{field}.{key}");
                let node = get(parts, key).ok_or_else(|| self.error(&here, "is missing"))?;
                let items = self.array(node, &here, "an array of integers")?;
                items
                    .iter()
                    .enumerate()
                    .map(|(k, v)| self.integer(v, &format!("{here}[{k}]"), VALUE_LIMIT))
                    .collect()
            };
            let pieces = Pieces::new(list("breaks")?, list("slopes")?).map_err(|fault| {
                let key = match fault {
                    PiecesFault::Unsorted { .. } => "breaks",
                    _ => "slopes",
                };
                let name = &names[variable];
                self.error(format!("{field}.{key}"), format!("{name}: {fault}"))
            })?;
            out.push((variable, pieces));
        }
        Ok(ConvexCosts::new(out))
    }

    /// `change_cost`: a table from variable names to prices per unit changed (`>= 0`).
    fn change_cost(&self, node: &Node, names: &[String]) -> Result<Vec<(usize, i64)>> {
        let what = "a table from variable names to prices per unit changed";
        let mut out = Vec::new();
        for (variable, field, value) in self.by_variable(node, ("change_cost", what), names)? {
            let weight = self.integer(value, &field, VALUE_LIMIT)?;
            if weight < 0 {
                return Err(self.error(
                    &field,
                    format!("{weight} is negative; a price per unit changed is 0 or more"),
                ));
            }
            out.push((variable, weight));
        }
        out.sort_unstable();
        Ok(out)
    }

    fn names(&self, node: &Node, field: &str, len: usize, why: &str) -> Result<Vec<String>> {
        let items = self.array(node, field, "an array of strings")?;
        self.check_len(items, field, len, why)?;
        let mut seen: HashMap<&str, usize> = HashMap::new();
        let mut out = Vec::with_capacity(len);
        for (i, item) in items.iter().enumerate() {
            let here = format!("{field}[{i}]");
            let Node::Str(name) = item else {
                return Err(self.expected(&here, "a string", item));
            };
            if name.trim().is_empty() {
                return Err(self.error(here, "is empty; names must contain a visible character"));
            }
            crate::input::printable(name).map_err(|why| self.error(here.clone(), why))?;
            if let Some(first) = seen.insert(name.as_str(), i) {
                return Err(self.error(here, format!("{name:?} repeats {field}[{first}]")));
            }
            out.push(name.clone());
        }
        Ok(out)
    }
}

fn get<'n>(entries: &'n [(String, Node)], key: &str) -> Option<&'n Node> {
    entries.iter().find(|(k, _)| k == key).map(|(_, v)| v)
}

fn generated(prefix: &str, len: usize) -> Vec<String> {
    (1..=len).map(|i| format!("{prefix}{i}")).collect()
}

/// Builds a [`Model`] from a parsed file, checking every field.
pub(crate) fn build(root: &Node, file: &str) -> Result<Model> {
    let c = Checker { file };
    let entries = c.table(root, "", &MODEL_KEYS)?;
    let matrix_node = get(entries, "matrix").ok_or_else(|| c.error("matrix", "is missing"))?;
    let matrix = c.matrix(matrix_node)?;
    let (m, n) = (matrix.rows(), matrix.cols());
    let rhs_node = get(entries, "rhs").ok_or_else(|| c.error("rhs", "is missing"))?;
    let rhs = c.integers(rhs_node, "rhs", m, "one per matrix row")?;
    let cost = c.cost(get(entries, "cost"), n)?;
    let lower = c.bounds(get(entries, "lower"), "lower", n, Side::Lower)?;
    let upper = c.bounds(get(entries, "upper"), "upper", n, Side::Upper)?;
    for (j, (l, u)) in lower.iter().zip(&upper).enumerate() {
        if let (Some(l), Some(u)) = (l, u) {
            if l > u {
                return Err(c.error(
                    format!("upper[{j}]"),
                    format!("{u} is below lower[{j}] = {l}"),
                ));
            }
        }
    }
    let (mut variable_names, mut row_names) = (generated("x", n), generated("r", m));
    if let Some(names) = get(entries, "names") {
        let parts = c.table(names, "names", &NAME_KEYS)?;
        if let Some(v) = get(parts, "variables") {
            variable_names = c.names(v, "names.variables", n, "one per matrix column")?;
        }
        if let Some(r) = get(parts, "rows") {
            row_names = c.names(r, "names.rows", m, "one per matrix row")?;
        }
    }
    let convex = match get(entries, "convex_cost") {
        Some(node) => c.convex(node, &variable_names)?,
        None => ConvexCosts::default(),
    };
    convex
        .objective(&cost, Some(&variable_names))
        .map_err(|e| c.error("convex_cost", e.to_string()))?;
    let change_cost = match get(entries, "change_cost") {
        Some(node) => c.change_cost(node, &variable_names)?,
        None => Vec::new(),
    };
    Ok(Model {
        matrix,
        rhs,
        cost,
        convex,
        change_cost,
        lower,
        upper,
        variable_names,
        row_names,
        units: super::Units::default(),
    })
}
