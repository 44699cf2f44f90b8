//! Model files: `min cost.x, matrix x = rhs, lower <= x <= upper, x integer`, read from JSON or
//! TOML with one schema.
//!
//! Keys: `matrix` (rows of integers, required), `rhs` (one integer per row, required), `cost`
//! (one integer per column; omitted means all zero), `lower` and `upper` (one bound per
//! column; an omitted array means every variable is unbounded on that side; an entry that is
//! `null` (JSON only), `"-inf"` in `lower` or `"inf"` in `upper` is unbounded), and optional
//! `names = { variables = [...], rows = [...] }` (generated as `x1..`, `r1..` when absent),
//! and optional `convex_cost = { <variable name> = { breaks = [...], slopes = [...] } }`:
//! piecewise-linear convex costs added to the linear cost (see [`Pieces`]).
//! Matrix entries are limited to `|a| <= 2^31 - 1` ([`MATRIX_ENTRY_LIMIT`]), the 32-bit
//! entries the completion stores, so that the lattice work starts from moderate numbers; every other value to `|v| <= 2^62` ([`VALUE_LIMIT`]).
//! Integers must be written as integer literals (`2`, not `2.0`).
//!
//! Every error is an [`Error::Input`] that names the file and the exact field, with row and
//! column (for example `matrix[1][2]: 1.5 is not an integer`).

mod convex;
pub mod mps;
mod node;
mod units;
mod validate;

use std::path::Path;

use crate::error::{Error, Result};
use crate::matrix::IntMatrix;

pub use convex::{ConvexCosts, Pieces, PiecesFault};
pub use units::Units;

/// Largest absolute value accepted for a matrix entry: `2^31 - 1`, the largest entry of the
/// completion's vectors (`i32`, without `-2^31` so that every entry can be negated). A unit
/// column next to an entry `a` puts `a` itself into a kernel vector (`[a 1]` has the move
/// `(1, -a)`), so a larger entry could never be built.
pub const MATRIX_ENTRY_LIMIT: i128 = (1 << 31) - 1;
/// Largest absolute value accepted for a right-hand side, cost or bound: `2^62`.
pub const VALUE_LIMIT: i128 = 1 << 62;

/// The syntax a model file is written in.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ModelKind {
    /// JSON (`.json`).
    Json,
    /// TOML (`.toml`).
    Toml,
    /// Free-format MPS (`.mps`), see [`mps`].
    Mps,
}

impl ModelKind {
    /// The text at `path` (see [`crate::input::read_text`]) and its syntax: from the
    /// extension (under a `.gz`), or for standard input from the text ([`ModelKind::sniff`]);
    /// `unknown` says what to do about an extension that names none.
    pub fn read(path: &Path, unknown: &str) -> Result<(String, ModelKind)> {
        if crate::input::is_stdin(path) {
            let text = crate::input::read_text(path)?;
            let kind = ModelKind::sniff(&text);
            return Ok((text, kind));
        }
        let kind =
            ModelKind::from_path(crate::input::syntax_path(path)).ok_or_else(|| Error::Input {
                file: path.display().to_string(),
                field: "file name".to_string(),
                message: unknown.to_string(),
            })?;
        Ok((crate::input::read_text(path)?, kind))
    }

    /// The syntax of a model text with no file name: JSON when it opens with `{`, MPS when a
    /// line starts with the `ROWS` section, else TOML.
    pub fn sniff(text: &str) -> ModelKind {
        let text = text.trim_start_matches('\u{feff}').trim_start();
        if text.starts_with('{') {
            ModelKind::Json
        } else if text
            .lines()
            .any(|l| l.trim_end().eq_ignore_ascii_case("ROWS"))
        {
            ModelKind::Mps
        } else {
            ModelKind::Toml
        }
    }

    /// The kind named by a file's extension (case-insensitive), if it is a known one.
    pub fn from_path(path: &Path) -> Option<Self> {
        let ext = path.extension()?.to_str()?.to_ascii_lowercase();
        match ext.as_str() {
            "json" => Some(Self::Json),
            "toml" => Some(Self::Toml),
            "mps" => Some(Self::Mps),
            _ => None,
        }
    }
}

/// A validated integer model with a linear cost plus, optionally, piecewise-linear convex costs
/// of single variables.
///
/// Invariant: `rhs.len() == matrix.rows()`, the per-variable vectors have `matrix.cols()`
/// entries, `lower[j] <= upper[j]` where both are finite, names are unique and non-empty.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Model {
    /// The constraint matrix `A`.
    pub matrix: IntMatrix,
    /// The right-hand side `b`, one entry per row.
    pub rhs: Vec<i64>,
    /// The linear cost `c`, one entry per variable.
    pub cost: Vec<i64>,
    /// Piecewise-linear convex costs added to the linear cost of some variables.
    pub convex: ConvexCosts,
    /// The file's own prices per unit changed against a previous plan, `(variable, weight)`
    /// with increasing variables and weights `>= 0`; they apply when a change price is asked
    /// for (see [`crate::solve::ChangePrice::of_model`]).
    pub change_cost: Vec<(usize, i64)>,
    /// Lower bounds; `None` is unbounded below.
    pub lower: Vec<Option<i64>>,
    /// Upper bounds; `None` is unbounded above.
    pub upper: Vec<Option<i64>>,
    /// One name per variable (column).
    pub variable_names: Vec<String>,
    /// One name per constraint (row).
    pub row_names: Vec<String>,
    /// How the numbers relate to the model file's own (identity for JSON, TOML and
    /// scenarios; see [`Units`]).
    pub units: Units,
}

impl Model {
    /// The model of `matrix` alone: zero right-hand side and cost, every variable free, names
    /// generated (`x1`.., `r1`..). A test set depends on the matrix only, so this is what
    /// building one needs when no model file is at hand (a cache entry's matrix).
    pub fn of_matrix(matrix: IntMatrix) -> Model {
        let (m, n) = (matrix.rows(), matrix.cols());
        Model {
            rhs: vec![0; m],
            cost: vec![0; n],
            convex: ConvexCosts::default(),
            change_cost: Vec::new(),
            lower: vec![None; n],
            upper: vec![None; n],
            variable_names: (1..=n).map(|i| format!("x{i}")).collect(),
            row_names: (1..=m).map(|i| format!("r{i}")).collect(),
            units: Units::default(),
            matrix,
        }
    }

    /// Reads and validates a model file; its extension (`.json`, `.toml` or `.mps`) decides
    /// the syntax.
    pub fn load(path: &Path) -> Result<Model> {
        let origin = path.display().to_string();
        let (text, kind) = ModelKind::read(
            path,
            "unknown model file type; use a .json, .toml or .mps extension (.gz compressed too)",
        )?;
        Model::from_str(&text, kind, &origin)
    }

    /// Parses and validates model text; `origin` names the source in error messages.
    pub fn from_str(text: &str, kind: ModelKind, origin: &str) -> Result<Model> {
        let root = match kind {
            ModelKind::Json => node::parse_json(text, origin)?,
            ModelKind::Toml => node::parse_toml(text, origin)?,
            ModelKind::Mps => return mps::read(text, origin).map(|m| m.model),
        };
        validate::build(&root, origin)
    }

    /// Number of variables (matrix columns).
    pub fn variables(&self) -> usize {
        self.matrix.cols()
    }

    /// Number of constraints (matrix rows).
    pub fn constraints(&self) -> usize {
        self.matrix.rows()
    }
}
