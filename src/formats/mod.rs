//! The documents kernstep writes for other programs, each with a writer and a reader.
//!
//! A document's writer and reader live side by side so that what one writes the other reads
//! back unchanged (round trips are tested); the command line only chooses which to write and
//! where. The set document is [`crate::testset::set_document`], the trace document
//! [`crate::trace::TraceDocument`].

pub mod analysis;
pub mod batch;
pub mod demo;
pub mod progress;
pub mod published;
pub mod tagged;

/// The caution every plan report carries: plans affect people, and the tool checks only the
/// model.
pub const CAUTION: &str =
    "plans must also meet vehicle limits, working-time rules and local regulations (not checked)";
