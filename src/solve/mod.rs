//! Re-optimising instances of a model with a test set: variants, start points, verdicts.

mod change;
mod fittings;
mod instance;
mod network;
mod pool;
mod prepared;
mod rounding;
mod variant;

pub use change::{ChangePrice, PlanFigures, Stability};
pub use instance::{coverage_of, FlowAnswer, Verdict, WarmStart};
pub use pool::{capped_threads, in_pool};
pub use prepared::Prepared;
pub use variant::{parse_lines, Numbers, ParsedLine, Variant};
