//! A build job: what the overnight build does for one model, as one library call.
//!
//! The job chooses the engine (a network matrix asked for its default Graver basis gets the
//! implicit entry of its cycles), reuses a valid stored entry, builds (resuming the state
//! saved for the same request) or deepens the norm limit within a budget, and stores the set
//! in the cache or writes its document to a file. The outcome is a [`JobReport`]: typed and
//! serialisable, for the caller to word.

use std::path::{Path, PathBuf};
use std::time::Duration;

use cache::{Completeness, SetKind};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::build::{build, entry_key, BuildOutcome, BuiltSet};
use super::deepen::{deepen, Deepened, LevelEnd};
use super::document::write_set_document;
use super::library::{Obtained, SavedState, SetAside, SetLibrary};
use super::serve::Engine;
use super::spec::{BoxPolicy, BuildSpec, NormLimit};
use crate::analysis::{AnalysisOptions, MatrixAnalysis};
use crate::completion::{Control, Method, StopReason};
use crate::error::{Error, Result};
use crate::model::Model;
use crate::network::Network;

/// Where a job puts the set it builds.
#[derive(Clone, Copy, Debug)]
pub enum Destination<'a> {
    /// Stored in the cache (a valid entry there is reused, a saved state resumed).
    Cache(&'a SetLibrary),
    /// Written to this file as the set document, atomically.
    File(&'a Path),
}

/// One model's build: the request, the engine, the budget and where the set goes.
#[derive(Clone, Debug)]
pub struct Job<'a> {
    /// The set asked for.
    pub spec: BuildSpec,
    /// Whether a network matrix gets the implicit entry of its cycles.
    pub engine: Engine,
    /// Deepen the norm limit level by level within this time and keep the last level that
    /// finished (`None`: build the request at once).
    pub budget: Option<Duration>,
    /// Build even when a valid entry exists, replacing it.
    pub rebuild: bool,
    /// Where the set goes.
    pub destination: Destination<'a>,
}

/// How a job ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(tag = "state", rename_all = "snake_case")]
#[non_exhaustive]
pub enum JobStatus {
    /// A valid entry serves the request already (for a budget: the whole request).
    Present,
    /// Built, and stored or written.
    Built,
    /// A limit or a cancellation stopped the build; nothing stored.
    Stopped {
        /// Why.
        reason: StopReason,
    },
}

/// A saved state of a build, in a report.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct StateRecord {
    /// The stage being worked on.
    pub stage: usize,
    /// Number of stages.
    pub stages: usize,
    /// Whether the state was saved inside a stage.
    pub mid_stage: bool,
    /// Moves in the state, as a decimal (counts of moves can pass 2^53 in principle).
    pub moves: String,
    /// Build work over every run up to the state, in seconds.
    pub work_seconds: f64,
}

impl From<&SavedState> for StateRecord {
    fn from(state: &SavedState) -> Self {
        StateRecord {
            stage: state.stage,
            stages: state.stages,
            mid_stage: state.mid_stage,
            moves: state.moves.to_string(),
            work_seconds: state.work.as_secs_f64(),
        }
    }
}

/// One level of a budgeted build.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct LevelRecord {
    /// The level's ℓ1 norm limit.
    pub norm_limit: u64,
    /// Elements of the level's set, when it finished.
    pub elements: Option<usize>,
    /// Wall-clock seconds of the level.
    pub seconds: f64,
    /// What stopped the level, when something did.
    pub stopped: Option<StopReason>,
}

/// What a budgeted build reached.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct BudgetRecord {
    /// The norm limit of the kept set (`None`: no level finished, nothing kept).
    pub norm_limit: Option<u64>,
    /// The proven norm bound of the matrix (`None`: no finite bound).
    pub proven_bound: Option<u64>,
    /// Whether the kept set is complete (it reached the proven bound, or its limit cut
    /// nothing).
    pub complete: bool,
    /// Every level tried, in order.
    pub levels: Vec<LevelRecord>,
}

impl BudgetRecord {
    /// The level that stopped the deepening, when one did.
    pub fn stopped_level(&self) -> Option<&LevelRecord> {
        self.levels.last().filter(|l| l.stopped.is_some())
    }
}

/// The outcome of a [`Job`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct JobReport {
    /// How it ended.
    #[serde(flatten)]
    pub status: JobStatus,
    /// The entry key's digest in hex (`None` when the job stopped before knowing it).
    pub key: Option<String>,
    /// The kind of set.
    pub kind: SetKind,
    /// Elements of the set (0 for the implicit cycles of a network).
    pub elements: Option<usize>,
    /// The file the set was written to.
    pub written_to: Option<PathBuf>,
    /// Stored as complete although the request was truncated: the truncation cut nothing.
    pub cut_nothing: bool,
    /// The damage found in an entry this one replaced.
    pub replaced: Option<String>,
    /// The saved state the build resumed from.
    pub resumed: Option<StateRecord>,
    /// The saved state a stopped build left for the next run.
    pub kept: Option<StateRecord>,
    /// What a budgeted build reached.
    pub budget: Option<BudgetRecord>,
    /// An unusable checkpoint moved aside before the build started over.
    #[serde(skip)]
    pub set_aside: Option<SetAside>,
}

impl JobReport {
    fn new(kind: SetKind) -> Self {
        JobReport {
            status: JobStatus::Built,
            key: None,
            kind,
            elements: None,
            written_to: None,
            cut_nothing: false,
            replaced: None,
            resumed: None,
            kept: None,
            budget: None,
            set_aside: None,
        }
    }

    /// True when the set is the implicit one of a network's cycles.
    pub fn implicit(&self) -> bool {
        self.kind == SetKind::Cycles
    }

    /// What stopped the job, as far as its caller goes: the job's own stop, or a
    /// cancellation that ended a budgeted deepening after a level was kept (the kept level
    /// is stored, but the caller was asked to stop).
    pub fn stop(&self) -> Option<StopReason> {
        match self.status {
            JobStatus::Stopped { reason } => Some(reason),
            _ => self
                .budget
                .as_ref()
                .and_then(BudgetRecord::stopped_level)
                .and_then(|l| l.stopped)
                .filter(|r| *r == StopReason::Cancelled),
        }
    }
}

impl Job<'_> {
    /// Runs the job for `model` under `control` (whose time limit the budget replaces).
    pub fn run(&self, model: &Model, control: Control<'_>) -> Result<JobReport> {
        if let Some(network) = self.network(model)? {
            return self.store_cycles(model, &network);
        }
        let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
        let spec = self.spec.resolve(model, &analysis)?;
        let mut report = JobReport::new(spec.kind);
        if let Some(budget) = self.budget {
            self.deepen(model, &analysis, control.time_limit(budget), &mut report)?;
            return Ok(report);
        }
        let requested = entry_key(&model.matrix, &spec).digest().to_hex();
        report.key = Some(requested.clone());
        let obtained = match self.destination {
            Destination::File(path) => {
                match build(&model.matrix, &analysis, &spec, &control, None)? {
                    BuildOutcome::Built(built) => {
                        self.write(&built, path, &mut report)?;
                        return Ok(report);
                    }
                    BuildOutcome::Stopped(reason) => Obtained::Stopped {
                        reason,
                        kept: None,
                        set_aside: None,
                    },
                }
            }
            Destination::Cache(library) => {
                library.obtain(&model.matrix, &analysis, &spec, &control, self.rebuild)?
            }
        };
        report.record(obtained);
        report.cut_nothing =
            report.status == JobStatus::Built && report.key.as_ref() != Some(&requested);
        Ok(report)
    }

    /// The network whose implicit entry the job stores, if it does (see [`Engine`]): only a
    /// request for the default Graver basis of a network with linear costs gets one, and a
    /// file cannot hold it.
    pub fn network(&self, model: &Model) -> Result<Option<Network>> {
        let spec = &self.spec;
        let default_request = spec.kind == SetKind::Graver
            && spec.signs.is_none()
            && matches!(spec.norm_limit, NormLimit::Auto | NormLimit::Unlimited)
            && spec.bounds == BoxPolicy::Unlimited
            && spec.method == Method::ProjectAndLift;
        let to_file = matches!(self.destination, Destination::File(_));
        let refuse = |why: &str| Err(Error::Unsupported(why.to_string()));
        match self.engine {
            Engine::Moves => Ok(None),
            Engine::Auto if to_file || !default_request || !model.convex.is_empty() => Ok(None),
            Engine::Auto => Ok(Network::detect(&model.matrix).ok()),
            Engine::Cycles if to_file => {
                refuse("a file cannot hold the implicit set of a network's cycles")
            }
            Engine::Cycles if !default_request => refuse(
                "the implicit set is the whole Graver basis of a network; it takes no other kind, sign pattern, norm limit, box or method",
            ),
            Engine::Cycles if !model.convex.is_empty() => {
                refuse("the model has convex costs, which the network solver does not take")
            }
            Engine::Cycles => Network::detect(&model.matrix)
                .map(Some)
                .map_err(|why| Error::Unsupported(format!("not a network matrix: {why}"))),
        }
    }

    /// Stores the implicit entry of a network matrix.
    fn store_cycles(&self, model: &Model, network: &Network) -> Result<JobReport> {
        let Destination::Cache(library) = self.destination else {
            unreachable!("Job::network refuses the cycles engine for a file");
        };
        let mut report = JobReport::new(SetKind::Cycles);
        report.record(library.obtain_cycles(&model.matrix, network, self.rebuild)?);
        report.elements = Some(0);
        Ok(report)
    }

    /// Deepens the norm limit under `control` and stores (or writes) the last level that
    /// finished.
    fn deepen(
        &self,
        model: &Model,
        analysis: &MatrixAnalysis,
        control: Control<'_>,
        report: &mut JobReport,
    ) -> Result<()> {
        let complete = self.spec.resolve(model, analysis)?;
        if let (Destination::Cache(library), false) = (self.destination, self.rebuild) {
            if let Some(stored) = library.find(&entry_key(&model.matrix, &complete))? {
                report.status = JobStatus::Present;
                report.key = Some(stored.digest.to_hex());
                report.elements = Some(stored.data.len());
                return Ok(());
            }
        }
        let deepened = deepen(model, analysis, &self.spec, &control, &mut |_| {})?;
        report.budget = Some(budget_record(&deepened));
        let Some(built) = deepened.kept.as_deref() else {
            let reason = report
                .budget
                .as_ref()
                .and_then(BudgetRecord::stopped_level)
                .and_then(|l| l.stopped)
                .unwrap_or(StopReason::Cancelled);
            report.status = JobStatus::Stopped { reason };
            return Ok(());
        };
        match self.destination {
            Destination::File(path) => self.write(built, path, report)?,
            Destination::Cache(library) => {
                report.key = Some(built.key.digest().to_hex());
                report.elements = Some(built.set.len());
                report.replaced = library.keep(built)?;
            }
        }
        Ok(())
    }

    /// Writes `built`'s document to `path` (never half-written).
    fn write(&self, built: &BuiltSet, path: &Path, report: &mut JobReport) -> Result<()> {
        cache::write_atomic_with(path, |out| {
            write_set_document(out, &built.key, &built.metadata, built.set.data())
        })?;
        report.key = Some(built.key.digest().to_hex());
        report.elements = Some(built.set.len());
        report.written_to = Some(path.to_path_buf());
        Ok(())
    }
}

impl JobReport {
    /// Records what [`SetLibrary::obtain`] (or its cycles variant) produced.
    fn record(&mut self, obtained: Obtained) {
        match obtained {
            Obtained::Reused(stored) => {
                self.status = JobStatus::Present;
                self.key = Some(stored.digest.to_hex());
                self.elements = Some(stored.data.len());
            }
            Obtained::Built {
                built,
                replaced,
                resumed,
                set_aside,
            } => {
                self.status = JobStatus::Built;
                self.key = Some(built.key.digest().to_hex());
                self.elements = Some(built.set.len());
                self.replaced = replaced;
                self.resumed = resumed.as_ref().map(StateRecord::from);
                self.set_aside = set_aside;
            }
            Obtained::Stopped {
                reason,
                kept,
                set_aside,
            } => {
                self.status = JobStatus::Stopped { reason };
                self.kept = kept.as_ref().map(StateRecord::from);
                self.set_aside = set_aside;
            }
        }
    }
}

/// The levels and the reach of a deepening.
fn budget_record(deepened: &Deepened) -> BudgetRecord {
    let norm_limit = deepened.limit_reached();
    let complete = deepened.kept.as_deref().is_some_and(|built| {
        !matches!(
            built.metadata.completeness,
            Completeness::NormTruncated { .. }
        )
    });
    BudgetRecord {
        norm_limit,
        proven_bound: (deepened.proven_bound != u64::MAX).then_some(deepened.proven_bound),
        complete,
        levels: deepened
            .levels
            .iter()
            .map(|l| LevelRecord {
                norm_limit: l.limit,
                elements: match l.end {
                    LevelEnd::Built { elements } => Some(elements),
                    LevelEnd::Stopped(_) => None,
                },
                seconds: l.elapsed.as_secs_f64(),
                stopped: match l.end {
                    LevelEnd::Stopped(reason) => Some(reason),
                    LevelEnd::Built { .. } => None,
                },
            })
            .collect(),
    }
}
