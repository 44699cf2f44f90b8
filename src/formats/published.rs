//! Every layout kernstep prints for other programs, with its schema name, and the documents
//! that give a list or a bare value its object: the published JSON Schemas are generated
//! from this list ([`published`]), and the tests check every verb's output against them.

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use serde_json::Value;

use super::analysis::AnalysisReport;
use super::batch::{DayRecord, RunSummary};
use super::demo::DemoReport;
use super::progress::{ProgressRecord, PROGRESS_SCHEMA};
use super::tagged::{json_schema, Document};
use crate::scenario::CurvePiece;
use crate::testset::{EntryRecord, JobReport, Listing, VerifyRecord};
use crate::trace::{SolveDocument, TraceDocument, SOLVE_SCHEMA, TRACE_SCHEMA};

/// `build --json`: one row per model, in the order given.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct BuildReport {
    /// The models' rows.
    pub models: Vec<BuildRow>,
}

/// One model's build: the library's report with the words the command line gave it.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct BuildRow {
    /// The model file.
    pub model: String,
    /// The job's report (absent when the build failed before it ran).
    #[serde(flatten)]
    pub report: Option<JobReport>,
    /// The command that resumes a stopped build.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub resume_command: Option<String>,
    /// Wall-clock seconds of the model's build.
    pub seconds: f64,
    /// The outcome in words.
    pub status: String,
}

/// `cache verify --json`: one record per entry checked.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct VerifyReport {
    /// The entries checked.
    pub entries: Vec<VerifyRecord>,
}

/// `cache remove --json`: the entry removed.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct Removed {
    /// The removed entry's key digest.
    pub removed: String,
}

/// `cache import --json`: the entry stored.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct ImportReport {
    /// The stored entry's key digest.
    pub imported: String,
    /// Its elements.
    pub elements: usize,
    /// The damage found in an entry it replaced, if any.
    pub replaced: Option<String>,
}

/// `solve --price-curve --json`: the price of stability of one day.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct PriceCurve {
    /// The curve's pieces, by rising price.
    pub pieces: Vec<CurvePiece>,
}

/// Implements [`Document`] for each `type => schema name`, and lists them in [`published`].
macro_rules! documents {
    ($($ty:ty => $schema:expr $(, self_tagged = $own:literal)?;)*) => {
        $(impl Document for $ty {
            const SCHEMA: &'static str = $schema;
            $(const SELF_TAGGED: bool = $own;)?
        })*

        /// Every published layout: its schema name and its JSON Schema.
        pub fn published() -> Vec<(&'static str, Value)> {
            vec![$((<$ty as Document>::SCHEMA, json_schema::<$ty>()),)*]
        }
    };
}

documents! {
    AnalysisReport => "kernstep.analysis/1";
    BuildReport => "kernstep.build/1";
    RunSummary => "kernstep.batch_summary/1";
    DayRecord<'_> => "kernstep.day/1";
    EntryRecord => "kernstep.cache_entry/1";
    ImportReport => "kernstep.cache_import/1";
    Listing => "kernstep.cache_list/1";
    cache::PruneReport => "kernstep.cache_prune/1";
    Removed => "kernstep.cache_remove/1";
    VerifyReport => "kernstep.cache_verify/1";
    DemoReport => "kernstep.demo/1";
    PriceCurve => "kernstep.price_curve/1";
    ProgressRecord => PROGRESS_SCHEMA, self_tagged = true;
    SolveDocument => SOLVE_SCHEMA, self_tagged = true;
    TraceDocument => TRACE_SCHEMA, self_tagged = true;
}

/// The file name a layout's schema is published under: `solve.schema.json` for
/// `kernstep.solve/1`.
pub fn file_name(schema: &str) -> String {
    let name = schema.trim_start_matches("kernstep.");
    let name = name.split('/').next().unwrap_or(name);
    format!("{name}.schema.json")
}
