//! Free-format MPS input for pure integer models.
//!
//! Sections read, in this order: `NAME` (optional), `OBJSENSE` (`MIN` or `MAX`, on the header
//! line or the next one) and `OBJNAME` (both optional, also accepted before `NAME`), `ROWS`
//! (`N`, `E`, `L`, `G`), `COLUMNS`
//! with `'MARKER' 'INTORG'` / `'INTEND'` integer markers, then `RHS`, `RANGES` and `BOUNDS`
//! (each optional, each with one set; the set name may be left out) and `ENDATA`, which is
//! required (a file without it is taken as truncated). Lines starting with `*` are comments.
//! Fields are separated by blanks, so names cannot contain blanks; section keywords start in
//! the first column, data lines are indented.
//!
//! What the model becomes (`A x = b, l <= x <= u`, minimise `c.x`):
//!
//! - The objective is the `OBJNAME` row, else the first `N` row; other `N` rows are ignored.
//!   `OBJSENSE MAX` negates the cost ([`MpsImport::maximize`]). A nonzero right-hand side on
//!   the objective row (an objective constant) is refused.
//! - Every column must be integer: declared between integer markers, or bounded `BV`, `LI` or
//!   `UI`. A continuous column is refused, naming it: kernstep handles pure integer models.
//! - Bounds follow the common MPS convention, as most MPS readers do: an integer variable
//!   without bounds lies in `[0, +inf)` (some older readers make marker-declared integers binary
//!   instead; kernstep does not), `UP`/`LO`/`FX`/`LI`/`UI` set values, `MI`/`PL`/`FR` remove
//!   sides, `BV` is `[0, 1]`. Values of magnitude `1e20` or more and the words `inf` and
//!   `infinity` are infinite (the default infinity of the HiGHS reader). Fractional bounds are
//!   rounded inwards, which is exact for integer variables. An `UP` bound below the default
//!   lower bound 0 is refused rather than guessed, since readers treat it differently.
//! - Each `L`, `G` or ranged row gets one integer slack `slack:<row>` (appended after the
//!   file's columns, cost 0, `0 <= s`, bounded above by the range), so `E` rows stay as they
//!   are and every row keeps its right-hand side.
//! - Numbers are read as exact decimals. A row whose coefficients or right-hand side have
//!   decimals is multiplied by the smallest power of ten that makes it integral
//!   ([`MpsImport::row_scales`]); the cost vector likewise as a whole
//!   ([`MpsImport::cost_scale`]), so the objective kernstep solves for is `10^cost_scale` times
//!   the file's (and negated for `MAX`). The model's [`crate::model::Units`] record this and
//!   the slacks, so that reports give the file's objective (its sense, exact decimals) and
//!   plans of the file's columns only. A scaled value beyond the model limits (`2^31 - 1` for
//!   matrix entries, `2^62` otherwise) is refused, naming the row and the value, and so is a
//!   cost with more than 38 decimal places (reports could not give the objective exactly).
//!
//! Every error is an [`Error::Input`] whose field names the line and the MPS field, for
//! example `plan.mps: line 12, COLUMNS field 3: "1,5" is not a number`.

mod assemble;
mod lines;
mod number;
mod reader;

use crate::error::{Error, Result};

use super::Model;

/// Most matrix entries (rows times variables, slacks included) a file may describe: the
/// matrix is held densely.
pub const MAX_DENSE_ENTRIES: usize = 1 << 24;

/// A model read from MPS, with what is needed to relate its numbers to the file's.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct MpsImport {
    /// The model; its first [`MpsImport::file_columns`] variables are the file's columns, the
    /// rest are slacks.
    pub model: Model,
    /// The file asked to maximise; the model's cost is the negated file cost.
    pub maximize: bool,
    /// The model's cost is the file's cost times `10^cost_scale` (negated for `maximize`).
    pub cost_scale: u32,
    /// Row `i` of the model is row `i` of the file (constraint rows only, in file order)
    /// times `10^row_scales[i]`.
    pub row_scales: Vec<u32>,
    /// Number of columns the file declares.
    pub file_columns: usize,
}

impl MpsImport {
    /// The file's objective value for a model objective value: divides by `10^cost_scale`
    /// and undoes the negation of `MAX`, as a double (the exact decimal is
    /// [`crate::model::Units::objective`]).
    pub fn file_objective(&self, model_objective: i128) -> f64 {
        let sign = if self.maximize { -1.0 } else { 1.0 };
        sign * model_objective as f64 / 10f64.powi(self.cost_scale as i32)
    }
}

/// The file every error is attributed to, with the line and field.
#[derive(Clone, Copy, Debug)]
struct Origin<'a> {
    file: &'a str,
}

impl Origin<'_> {
    fn at(&self, line: usize, field: &str, message: impl Into<String>) -> Error {
        Error::Input {
            file: self.file.to_string(),
            field: format!("line {line}, {field}"),
            message: message.into(),
        }
    }
}

/// Reads free-format MPS text; `origin` names the source in error messages.
pub fn read(text: &str, origin: &str) -> Result<MpsImport> {
    let origin = Origin { file: origin };
    let lines = lines::split(text).map_err(|unknown| {
        let message = if unknown.foreign {
            format!(
                "section {} is not supported; kernstep reads linear pure integer models",
                unknown.word
            )
        } else {
            format!(
                "{:?} is not a section keyword (data lines must be indented)",
                unknown.word
            )
        };
        origin.at(unknown.number, "section", message)
    })?;
    let raw = reader::read(&lines, origin)?;
    assemble::assemble(&raw, origin)
}
