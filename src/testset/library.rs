//! The test sets of one cache directory: reuse what is stored, build what is missing.

use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use cache::{
    BuildGuard, CheckpointState, Digest, EntryKey, EntrySummary, LockHolder, LockWait, Provenance,
    SetMetadata, Store, StoredSet,
};

use super::build::{build, BuildOutcome, BuiltSet};
use super::network::cycles_entry;
use super::saved::{self, RequestRecord, Saved};
use super::spec::ResolvedSpec;
use super::verify::verify_content;
use crate::analysis::MatrixAnalysis;
use crate::completion::{check_resumable, Checkpoint, Control, Method, StateView, StopReason};
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::network::Network;

/// What [`SetLibrary::obtain`] produced.
#[derive(Debug)]
pub enum Obtained {
    /// A valid stored entry that serves the request (exact key or a covering one).
    Reused(Box<StoredSet>),
    /// Built now and stored; `replaced` tells why an existing entry was not used.
    Built {
        /// The new set.
        built: Box<BuiltSet>,
        /// The damage found in the entry this one replaced, if any.
        replaced: Option<String>,
        /// When an interrupted build was resumed: the state it resumed from.
        resumed: Option<SavedState>,
        /// An unusable checkpoint of the key, moved aside before the build started over.
        set_aside: Option<SetAside>,
    },
    /// A limit or a cancellation stopped the build; no entry was stored, and the state
    /// saved last (from which the same request resumes), if any, is `kept`.
    Stopped {
        /// Why it stopped.
        reason: StopReason,
        /// The state saved last.
        kept: Option<SavedState>,
        /// An unusable checkpoint of the key, moved aside before the build started over.
        set_aside: Option<SetAside>,
    },
}

/// A checkpoint that could not be resumed (damaged, of an older layout, or inconsistent with
/// the lattice although its checksum is right): renamed aside so that builds start over
/// instead of failing on it, and kept for inspection until `cache prune` removes it.
#[derive(Clone, Debug, PartialEq)]
pub struct SetAside {
    /// Where the checkpoint was.
    pub from: PathBuf,
    /// Where it is now.
    pub to: PathBuf,
    /// Why it was unusable.
    pub problem: String,
}

impl Obtained {
    /// A build stopped while it waited for another build's lock: nothing of its own kept.
    fn stopped_waiting(control: &Control<'_>) -> Self {
        Self::Stopped {
            reason: control.interrupted().unwrap_or(StopReason::Cancelled),
            kept: None,
            set_aside: None,
        }
    }
}

/// A checkpoint as listed: its file facts and, when readable, the state it holds.
#[derive(Clone, Debug, PartialEq)]
pub struct CheckpointInfo {
    /// Key digest, size, age and whether a build holds the key's lock.
    pub file: cache::FileSummary,
    /// Whether it was set aside as unusable.
    pub set_aside: bool,
    /// Components lifted (out of the key's width), moves and work time; `None` when the
    /// file cannot be read as a checkpoint.
    pub state: Option<CheckpointFacts>,
}

/// What a readable checkpoint holds.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CheckpointFacts {
    /// Components lifted so far.
    pub lifted: usize,
    /// Number of components (variables).
    pub width: usize,
    /// Whether it was saved inside a stage.
    pub mid_stage: bool,
    /// Moves in the state.
    pub moves: usize,
    /// Build work up to the state.
    pub work: Duration,
}

/// A saved state of a build, as reported: where it stands and the work it holds.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SavedState {
    /// The stage being worked on (stages finished, plus one when saved inside a stage).
    pub stage: usize,
    /// Number of stages of the build (the rank of the matrix plus one).
    pub stages: usize,
    /// Whether the state was saved inside a stage.
    pub mid_stage: bool,
    /// Moves in the state (a stage's working set inside a stage; one per `±` pair).
    pub moves: usize,
    /// Build work, over every run, up to the state.
    pub work: Duration,
}

impl SavedState {
    /// The report of a state with `lifted` components lifted, saved inside a stage or not,
    /// holding `moves`.
    fn of(
        (lifted, mid_stage, moves): (usize, bool, usize),
        width: usize,
        rank: usize,
        work: Duration,
    ) -> Self {
        let lifted_past_start = lifted.saturating_sub(width - rank);
        Self {
            stage: lifted_past_start + usize::from(mid_stage),
            stages: rank + 1,
            mid_stage,
            moves,
            work,
        }
    }
}

/// How often a build saves its state by default.
pub const CHECKPOINT_EVERY: Duration = Duration::from_secs(60);

/// Told, once per wait, who holds the lock of a key that a build has to wait for (`None`
/// when the lock file holds no readable record).
pub type WaitReport = dyn Fn(Option<LockHolder>) + Send + Sync;

/// A cache directory used by the root crate.
#[derive(Clone)]
pub struct SetLibrary {
    store: Store,
    checkpoint_every: Duration,
    on_wait: Option<Arc<WaitReport>>,
    model: Option<String>,
}

impl std::fmt::Debug for SetLibrary {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("SetLibrary")
            .field("store", &self.store)
            .field("checkpoint_every", &self.checkpoint_every)
            .field("on_wait", &self.on_wait.is_some())
            .field("model", &self.model)
            .finish()
    }
}

/// A wait for another build's lock: reported through the library's [`WaitReport`], given up
/// when the build's [`Control`] is cancelled or out of time.
struct Patience<'a> {
    report: Option<&'a WaitReport>,
    control: &'a Control<'a>,
}

impl LockWait for Patience<'_> {
    fn waiting(&mut self, holder: Option<LockHolder>) {
        if let Some(report) = self.report {
            report(holder);
        }
    }

    fn give_up(&mut self) -> bool {
        self.control.interrupted().is_some()
    }
}

impl SetLibrary {
    /// Opens the directory `dir`, else `$KERNSTEP_CACHE_DIR`, else the platform cache directory.
    pub fn open(dir: Option<&Path>) -> Result<Self> {
        Ok(Self {
            store: Store::open_default(dir)?,
            checkpoint_every: CHECKPOINT_EVERY,
            on_wait: None,
            model: None,
        })
    }

    /// Record the model read from `path` (its file's name; `standard input` for `-`) as the
    /// model of the entries this library stores, so that a listing says which model each
    /// serves. A name with control characters is left out (it could forge a listing's lines).
    pub fn for_model_file(mut self, path: &Path) -> Self {
        let name = match path.file_name() {
            _ if path.as_os_str() == "-" => "standard input".to_string(),
            Some(name) => name.to_string_lossy().into_owned(),
            None => path.display().to_string(),
        };
        self.model = (!name.chars().any(char::is_control)).then_some(name);
        self
    }

    /// `metadata` with this library's model name, unless it names one already.
    fn labelled(&self, metadata: &SetMetadata) -> SetMetadata {
        let mut labelled = metadata.clone();
        if labelled.model.is_none() {
            labelled.model.clone_from(&self.model);
        }
        labelled
    }

    /// Tell `report` who holds the lock whenever a build has to wait for another build of
    /// the same key (a wait is otherwise silent).
    pub fn on_wait(mut self, report: Arc<WaitReport>) -> Self {
        self.on_wait = Some(report);
        self
    }

    /// Takes the key's build lock, waiting patiently (see [`Patience`]); `Ok(None)` when
    /// the control stopped the wait. With `rebuild` the lock is granted over a valid entry.
    fn lock(
        &self,
        key: &EntryKey,
        control: &Control<'_>,
        rebuild: bool,
    ) -> Result<Option<BuildGuard>> {
        let mut patience = Patience {
            report: self.on_wait.as_deref(),
            control,
        };
        Ok(if rebuild {
            self.store
                .lock_for_rebuild_waiting(key, &mut patience)?
                .map(BuildGuard::Build)
        } else {
            self.store.lock_for_build_waiting(key, &mut patience)?
        })
    }

    /// Save the state of a build at least every `every` of work, inside stages too (default:
    /// [`CHECKPOINT_EVERY`]), so an interrupted build loses at most that much.
    pub fn checkpoint_every(mut self, every: Duration) -> Self {
        self.checkpoint_every = every;
        self
    }

    /// The underlying store (for listing, verifying, pruning).
    pub fn store(&self) -> &Store {
        &self.store
    }

    /// A stored set that serves `key` (the entry itself or one whose truncation covers it).
    /// A foreign entry is served only after its content passes [`verify_content`]; one that
    /// fails is an error naming the file.
    pub fn find(&self, key: &EntryKey) -> Result<Option<StoredSet>> {
        self.store
            .find_covering(key)?
            .found
            .map(|s| self.admit(s))
            .transpose()
    }

    /// The stored set with the most elements that covers `key`, skipping damaged entries
    /// (foreign ones as in [`SetLibrary::find`]).
    pub fn find_largest(&self, key: &EntryKey) -> Result<Option<StoredSet>> {
        self.store
            .find_largest_covering(key)?
            .found
            .map(|s| self.admit(s))
            .transpose()
    }

    /// `set` as it may be served: a sealed one as it is; a foreign one (not sealed by this
    /// cache) after a full check of its content, then sealed with this cache's key.
    fn admit(&self, set: StoredSet) -> Result<StoredSet> {
        if set.provenance == Provenance::Sealed {
            return Ok(set);
        }
        verify_content(&set, &self.store.entry_path(set.digest))?;
        self.store.reseal(&set)?;
        Ok(StoredSet {
            provenance: Provenance::Sealed,
            ..set
        })
    }

    /// Checks the entry `digest` in full: the file (checksum, key, layout, seal) and its
    /// content ([`verify_content`]). Returns its summary and whether this cache sealed it; a
    /// foreign entry that passes is left as it is (it is sealed when first served).
    pub fn verify_entry(&self, digest: Digest) -> Result<(EntrySummary, Provenance)> {
        let set = self.store.load_digest(&digest.to_hex())?;
        verify_content(&set, &self.store.entry_path(digest))?;
        Ok((set.summary(), set.provenance))
    }

    /// Every checkpoint of the cache, with the state it holds when readable.
    pub fn checkpoints(&self) -> Result<Vec<CheckpointInfo>> {
        let mut out = Vec::new();
        for (file, set_aside) in self.store.list_checkpoints()? {
            let state = if set_aside {
                None
            } else {
                match self.store.load_checkpoint_of(file.digest)? {
                    CheckpointState::Present(bytes) => {
                        saved::peek(&bytes).map(|(width, saved)| CheckpointFacts {
                            lifted: saved.state.lifted.len(),
                            width,
                            mid_stage: saved.state.within.is_some(),
                            moves: saved.state.elements.len(),
                            work: Duration::from_secs_f64(saved.work_seconds),
                        })
                    }
                    CheckpointState::Missing | CheckpointState::Damaged(_) => None,
                }
            };
            out.push(CheckpointInfo {
                file,
                set_aside,
                state,
            });
        }
        Ok(out)
    }

    /// Returns the stored set for `spec`, or builds and stores it. Two processes asking for
    /// the same key build it once: the second waits and then reuses the first one's entry.
    /// With `rebuild` an existing entry is replaced.
    pub fn obtain(
        &self,
        a: &IntMatrix,
        analysis: &MatrixAnalysis,
        spec: &ResolvedSpec,
        control: &Control<'_>,
        rebuild: bool,
    ) -> Result<Obtained> {
        let key = super::build::entry_key(a, spec);
        if !rebuild {
            if let Some(found) = self.find(&key)? {
                return Ok(Obtained::Reused(Box::new(found)));
            }
        }
        let lock = match self.lock(&key, control, rebuild)? {
            Some(BuildGuard::Build(lock)) => lock,
            Some(BuildGuard::Ready(set)) => {
                return Ok(Obtained::Reused(Box::new(self.admit(set)?)));
            }
            None => return Ok(Obtained::stopped_waiting(control)),
        };
        let replaced = lock.damaged_entry().map(ToString::to_string);
        let request = RequestRecord::of(&key, spec);
        let (resume, set_aside) = match self.checkpoint(&key, &request, spec, a)? {
            Ok(resume) => (resume, None),
            Err(problem) => (None, self.set_aside(&key, problem)?),
        };
        let (width, rank) = (a.cols(), analysis.rank);
        let (outcome, last_saved) = self.build_saving(
            a,
            analysis,
            spec,
            (&key, &request),
            resume.as_ref(),
            control,
        )?;
        let resumed = resume.map(|r| {
            let state = &r.state;
            SavedState::of(
                (
                    state.lifted.len(),
                    state.within.is_some(),
                    state.elements.len(),
                ),
                width,
                rank,
                Duration::from_secs_f64(r.work_seconds),
            )
        });
        match outcome {
            BuildOutcome::Stopped(reason) => Ok(Obtained::Stopped {
                reason,
                kept: last_saved.or(resumed),
                set_aside,
            }),
            BuildOutcome::Built(built) => {
                if built.key == key {
                    lock.commit(built.set.data(), &self.labelled(&built.metadata))?;
                } else {
                    // The completion showed that the truncation cut nothing: the whole set,
                    // stored under its own key.
                    drop(lock);
                    self.keep(&built)?;
                }
                self.store.remove_checkpoint(&key)?;
                Ok(Obtained::Built {
                    built,
                    replaced,
                    resumed,
                    set_aside,
                })
            }
        }
    }

    /// Runs the build of `spec` (from `resume` when given), saving a checkpoint of it under
    /// `key` with `request` whenever `control` calls for one. Returns the outcome and the
    /// last state saved, if any (what a stopped build keeps). The error of a failed save is
    /// returned once the build has ended.
    fn build_saving(
        &self,
        a: &IntMatrix,
        analysis: &MatrixAnalysis,
        spec: &ResolvedSpec,
        (key, request): (&EntryKey, &RequestRecord),
        resume: Option<&Saved>,
        control: &Control<'_>,
    ) -> Result<(BuildOutcome, Option<SavedState>)> {
        let (width, rank) = (a.cols(), analysis.rank);
        let earlier = resume.map_or(0.0, |r| r.work_seconds);
        let started = Instant::now();
        let last_saved = Mutex::new(None);
        let save_failed = Mutex::new(None);
        let save = |state: &StateView<'_>| {
            let work = earlier + started.elapsed().as_secs_f64();
            match self.save_checkpoint(key, request, state, work) {
                Ok(()) => {
                    let work = Duration::from_secs_f64(work);
                    let at = (state.lifted().len(), state.mid_stage(), state.elements());
                    let saved = SavedState::of(at, width, rank, work);
                    last_saved.lock().map(|mut slot| *slot = Some(saved)).ok();
                }
                Err(e) => {
                    save_failed.lock().map(|mut slot| *slot = Some(e)).ok();
                }
            }
        };
        let control = control.on_save(&save, self.checkpoint_every);
        let outcome = build(a, analysis, spec, &control, resume.map(|r| &r.state))?;
        if let Some(e) = save_failed.into_inner().ok().flatten() {
            return Err(e);
        }
        Ok((outcome, last_saved.into_inner().ok().flatten()))
    }

    /// Stores `built` (a set built outside [`SetLibrary::obtain`], such as the kept level of a
    /// budgeted build), replacing any entry under its key; returns the damage found in the
    /// entry it replaced, if any.
    pub fn keep(&self, built: &BuiltSet) -> Result<Option<String>> {
        let lock = self.store.lock_for_rebuild(&built.key)?;
        let replaced = lock.damaged_entry().map(ToString::to_string);
        lock.commit(built.set.data(), &self.labelled(&built.metadata))?;
        Ok(replaced)
    }

    /// The checkpoint that [`SetLibrary::obtain`] would resume `spec` from, if any: what the
    /// other processes of a shared build (see [`crate::completion::WorkShare`]) start from,
    /// so that all resume together.
    pub fn resume_point(&self, a: &IntMatrix, spec: &ResolvedSpec) -> Result<Option<Checkpoint>> {
        let key = super::build::entry_key(a, spec);
        Ok(self
            .checkpoint(&key, &RequestRecord::of(&key, spec), spec, a)?
            .ok()
            .flatten()
            .map(|saved| saved.state))
    }

    /// Returns the entry of the network matrix `a` (its implicit set of cycles, see
    /// [`super::cycles_entry`]), storing it when missing; with `rebuild` it is replaced.
    pub fn obtain_cycles(
        &self,
        a: &IntMatrix,
        network: &Network,
        rebuild: bool,
    ) -> Result<Obtained> {
        let built = cycles_entry(a, network)?;
        if !rebuild {
            if let Some(found) = self.find(&built.key)? {
                return Ok(Obtained::Reused(Box::new(found)));
            }
        }
        let lock = if rebuild {
            self.store.lock_for_rebuild(&built.key)?
        } else {
            match self.store.lock_for_build(&built.key)? {
                BuildGuard::Ready(set) => {
                    return Ok(Obtained::Reused(Box::new(self.admit(set)?)));
                }
                BuildGuard::Build(lock) => lock,
            }
        };
        let replaced = lock.damaged_entry().map(ToString::to_string);
        lock.commit(built.set.data(), &self.labelled(&built.metadata))?;
        Ok(Obtained::Built {
            built: Box::new(built),
            replaced,
            resumed: None,
            set_aside: None,
        })
    }

    /// The saved state of an interrupted build of `key`, if one was saved for exactly
    /// `request` (`Ok(Ok(None))` when there is none, or one saved for another request of the
    /// same key, which the build's first save replaces). `Ok(Err(problem))`: the checkpoint
    /// cannot be resumed (damaged, of an older layout, or inconsistent with `a`'s lattice);
    /// the caller sets it aside.
    fn checkpoint(
        &self,
        key: &EntryKey,
        request: &RequestRecord,
        spec: &ResolvedSpec,
        a: &IntMatrix,
    ) -> Result<std::result::Result<Option<Saved>, String>> {
        if spec.method != Method::ProjectAndLift {
            return Ok(Ok(None));
        }
        let bytes = match self.store.load_checkpoint(key)? {
            CheckpointState::Missing => return Ok(Ok(None)),
            CheckpointState::Damaged(e) => return Ok(Err(e.to_string())),
            CheckpointState::Present(bytes) => bytes,
        };
        let path = self.store.checkpoint_path(key.digest());
        Ok(match saved::decode(&bytes, request) {
            Ok(Some(saved)) => match check_resumable(a, &saved.state) {
                Ok(()) => Ok(Some(saved)),
                Err(e) => Err(format!("{}: {e}", path.display())),
            },
            Ok(None) => Ok(None),
            Err(problem) => Err(format!("{}: {problem}", path.display())),
        })
    }

    /// Moves the checkpoint of `key` aside for `problem` (the caller holds the key's lock).
    fn set_aside(&self, key: &EntryKey, problem: String) -> Result<Option<SetAside>> {
        let from = self.store.checkpoint_path(key.digest());
        Ok(self
            .store
            .set_aside_checkpoint(key)?
            .map(|to| SetAside { from, to, problem }))
    }

    fn save_checkpoint(
        &self,
        key: &EntryKey,
        request: &RequestRecord,
        state: &StateView<'_>,
        work_seconds: f64,
    ) -> Result<()> {
        let len = saved::payload_len(request, state, work_seconds);
        self.store.save_checkpoint_with(key, len, |out| {
            saved::append(request, state, work_seconds, out);
        })?;
        Ok(())
    }
}
