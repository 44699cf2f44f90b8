//! The library's reports in words: the text every front end shows for a solve, a trace, a
//! batch, an analysis or the cache's contents. Each function returns the text (the library
//! never prints); the command line writes it, an embedding program may show it.

mod analysis;
mod batch;
mod build;
mod inventory;
mod layout;
mod progress;
mod sense;
mod solve;
mod trace;

pub use analysis::analysis_text;
pub use batch::summary_text;
pub use build::{job_text, state_text, StopWords};
pub use inventory::{
    age_text, entry_text, kind_name, listing_text, prune_text, short_key, verify_text, SHORT_KEY,
};
pub use layout::{cell, count_moves, labelled, pairs, table, wrap, wrap_units, wrapped};
pub use progress::{duration_text, progress_text};
pub use sense::in_file_sense;
pub use solve::{bound_text, curve_text, set_text, solve_summary};
pub use trace::trace_text;
