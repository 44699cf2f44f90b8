//! Test sets as users handle them: a request resolved against a model, built by the
//! completion, stored in and reused from the cache.

mod build;
mod library;
mod spec;

pub use build::{
    build, default_graver_keys, entry_key, from_data, method_name, to_data, BuildOutcome, BuiltSet,
};
pub use library::{Obtained, SetLibrary};
pub use spec::{BoxPolicy, BuildSpec, NormLimit, ResolvedSpec};
