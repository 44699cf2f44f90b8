//! Test sets as users handle them: a request resolved against a model, built by the
//! completion, stored in and reused from the cache, resumed from a checkpoint saved for the
//! same request, or deepened level by level within a budget.

mod build;
mod deepen;
mod document;
mod estimate;
mod inventory;
mod job;
mod library;
mod limits;
mod network;
mod saved;
mod serve;
mod set_file;
mod spec;
mod verify;

pub use build::{build, default_graver_keys, entry_key, method_name, BuildOutcome, BuiltSet};
pub use deepen::{deepen, Deepened, Level, LevelEnd, FIRST_LEVEL};
pub use document::{
    read_set_document, set_document, write_set_document, SetDocument, SET_FORMAT, SET_VERSION,
};
pub use estimate::{estimate, extrapolate, BuildEstimate, Range, StageMark};
pub use inventory::{CheckpointRecord, CheckpointState, EntryRecord, Listing, VerifyRecord};
pub use job::{BudgetRecord, Destination, Job, JobReport, JobStatus, LevelRecord, StateRecord};
pub use library::{
    CheckpointFacts, CheckpointInfo, Obtained, SavedState, SetAside, SetLibrary, CHECKPOINT_EVERY,
};
pub use limits::{members_in, memory_guard, BuildLimits, GUARD_PERCENT};
pub use network::{cycles_entry, cycles_key, enumerate_cycles, CYCLES_METHOD};
pub use serve::{by_cycles, serve, Engine, Served, Source};
pub use set_file::{read_set_file, serve_file, Imported};
pub use spec::{BoxPolicy, BuildSpec, NormLimit, ResolvedSpec};
pub use verify::verify_content;
