//! Building one test set for a model: key, completion, metadata.

use std::time::Instant;

use cache::{Completeness, EntryKey, SetMetadata};

use super::spec::{model_box, ResolvedSpec};
use crate::analysis::MatrixAnalysis;
use crate::completion::{
    complete_kernel, Checkpoint, Completion, Control, Cut, ElementSet, Method, Request,
};
use crate::error::Result;
use crate::lattice::RowSpaceKey;
use crate::matrix::IntMatrix;
use crate::model::Model;

/// A finished set with everything the cache stores about it.
#[derive(Clone, Debug, PartialEq)]
pub struct BuiltSet {
    /// The cache key.
    pub key: EntryKey,
    /// Build facts.
    pub metadata: SetMetadata,
    /// The moves.
    pub set: ElementSet,
}

/// How a build ended.
#[derive(Clone, Debug, PartialEq)]
pub enum BuildOutcome {
    /// The set was built.
    Built(Box<BuiltSet>),
    /// A limit or a cancellation stopped the completion; nothing was produced.
    Stopped(crate::completion::StopReason),
}

/// The cache key of the set `spec` describes for the matrix `a`.
///
/// The row space (not the matrix) is keyed, so scaled, permuted or redundant rows share one
/// entry; the truncation in the key is only the one that changes the set.
pub fn entry_key(a: &IntMatrix, spec: &ResolvedSpec) -> EntryKey {
    EntryKey {
        row_space: RowSpaceKey::of(a).canonical_text(),
        kind: spec.kind,
        signs: spec.signs.clone(),
        truncation: spec.key_truncation.clone(),
    }
}

/// The keys solving looks up first for `model`: its default Graver basis (all signs free, the
/// norm limit `auto`) complete, and truncated to the model's box when the model has a finite
/// one. The automatic norm limit is the proven bound, which truncates nothing, so unlike
/// [`entry_key`] of a resolved spec these need no analysis of the matrix (no subdeterminants).
pub fn default_graver_keys(model: &Model) -> (EntryKey, Option<EntryKey>) {
    let complete = EntryKey {
        row_space: RowSpaceKey::of(&model.matrix).canonical_text(),
        kind: cache::SetKind::Graver,
        signs: vec![cache::Sign::Free; model.variables()],
        truncation: cache::Truncation::default(),
    };
    let boxed = model_box(model).map(|bounds| EntryKey {
        truncation: cache::Truncation {
            norm_limit: None,
            bounds: Some(bounds),
        },
        ..complete.clone()
    });
    (complete, boxed)
}

/// Runs the completion for `a` as `spec` says, from `resume` if given. A truncated request
/// whose completion shows that the truncation cut nothing gives the whole set, keyed and
/// recorded as complete.
pub fn build(
    a: &IntMatrix,
    analysis: &MatrixAnalysis,
    spec: &ResolvedSpec,
    control: &Control<'_>,
    resume: Option<&Checkpoint>,
) -> Result<BuildOutcome> {
    let start = Instant::now();
    let request = Request {
        signs: spec.signs.clone(),
        truncation: spec.truncation.clone(),
        method: spec.method,
        check_cuts: spec.completeness != Completeness::Complete,
    };
    let (set, cut) = match complete_kernel(a, &request, control, resume)? {
        Completion::Finished(set, cut) => (set, cut),
        Completion::Stopped(reason) => return Ok(BuildOutcome::Stopped(reason)),
    };
    let mut key = entry_key(a, spec);
    let mut completeness = spec.completeness.clone();
    if cut == Cut::Nothing {
        key.truncation = cache::Truncation::default();
        completeness = Completeness::Complete;
    }
    let metadata = SetMetadata {
        matrix: a.to_rows(),
        rank: analysis.rank as u64,
        delta: analysis.delta.value().to_string(),
        delta_exact: analysis.delta.is_exact(),
        column_number: analysis.column_number as u64,
        norm_bound: spec.truncation.norm_limit,
        method: method_name(spec.method).to_string(),
        completeness,
        build_seconds: start.elapsed().as_secs_f64(),
        kernstep_version: env!("CARGO_PKG_VERSION").to_string(),
        created_unix: std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs()),
        model: None,
    };
    Ok(BuildOutcome::Built(Box::new(BuiltSet {
        key,
        metadata,
        set,
    })))
}

/// The name recorded for a method.
pub fn method_name(method: Method) -> &'static str {
    match method {
        Method::ProjectAndLift => "project-and-lift",
        Method::Pottier => "pottier",
    }
}
