//! Solve reports that other programs can read back: outcomes in a stable tagged form,
//! independent re-checks of what a solve claims, and replayable step-by-step traces.
//!
//! Everything here is data; the binary renders it as words, tables, JSON or plots.

mod bound;
mod certified;
#[cfg(feature = "plot")]
mod curve_plot;
pub mod decimal;
mod document;
mod instance;
mod outcome;
#[cfg(feature = "plot")]
mod plot;
mod recheck;
mod solve_doc;
mod sparse;
mod words;

pub use bound::BoundDoc;
pub use certified::{certify, Certified};
#[cfg(feature = "plot")]
pub use curve_plot::curve_plot;
pub use decimal::Decimal;
pub use document::{record, PiecesDoc, StepPhase, StepRecord, TraceDocument, TRACE_SCHEMA};
pub use instance::Instance;
pub use outcome::{sign_number, Outcome};
#[cfg(feature = "plot")]
pub use plot::step_plot;
pub use recheck::{recheck, recheck_with_bound, Claim, Defect, Recheck, SignedMove};
pub use solve_doc::{
    read_warm_start, solve_document, ChangeContext, SetRecord, SolveContext, SolveDocument,
    StepCounts, SOLVE_SCHEMA,
};
pub use sparse::{named_entries, NamedEntry};
pub use words::{certificate_words, terms};
