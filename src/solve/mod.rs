//! Re-optimising instances of a model with a test set: variants, start points, verdicts.

mod fittings;
mod instance;
mod rounding;
mod variant;

pub use instance::{coverage_of, Prepared, Verdict, WarmStart};
pub use variant::{parse_lines, Numbers, ParsedLine, Variant};
