//! Pieces shared by the verbs: the cache directory flag, Ctrl-C, thread pools, model lists,
//! the Graver set a solve needs, and the caution that goes with every summary of plans.

use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::{Arc, OnceLock};

use anyhow::Context;
use clap::{Args, ValueEnum};
use kernstep::model::Model;
pub use kernstep::solve::capped_threads;
use kernstep::solve::in_pool;
use kernstep::testset::{by_cycles, serve, serve_file, Engine, Served, SetLibrary};
use signal_hook::consts::{SIGINT, SIGTERM};

use super::limits::LimitArgs;

pub use kernstep::formats::CAUTION;

/// The cache directory option of every verb that reads or writes test sets.
#[derive(Debug, Clone, Args)]
pub struct CacheArgs {
    /// Cache directory (default: $KERNSTEP_CACHE_DIR, else the platform cache directory,
    /// e.g. ~/.cache/kernstep).
    #[arg(long, value_name = "DIR", global = true)]
    pub cache_dir: Option<PathBuf>,
}

impl CacheArgs {
    /// Opens the cache directory.
    pub fn open(&self) -> anyhow::Result<SetLibrary> {
        Ok(SetLibrary::open(self.cache_dir.as_deref())?.on_wait(Arc::new(report_wait)))
    }

    /// Opens the cache directory to store the sets of the model read from `model`: its
    /// entries are labelled with the file's name (`standard input` for `-`).
    pub fn open_for(&self, model: &Path) -> anyhow::Result<SetLibrary> {
        Ok(self.open()?.for_model_file(model))
    }
}

/// Says on stderr that a build waits for another build of the same set, and for which one.
fn report_wait(holder: Option<cache::LockHolder>) {
    match holder {
        Some(holder) => eprintln!(
            "kernstep: waiting for another build of this set (process {}, started {}); \
             Ctrl-C stops waiting",
            holder.pid,
            humantime::format_rfc3339_seconds(holder.since)
        ),
        None => eprintln!(
            "kernstep: waiting for another build of this set to finish; Ctrl-C stops waiting"
        ),
    }
}

/// The error and its causes joined by `: `, skipping a cause whose text the message before
/// it already shows (errors that print their source themselves).
pub fn render_chain(err: &anyhow::Error) -> String {
    let mut text = String::new();
    for cause in err.chain() {
        let part = cause.to_string();
        if text.is_empty() {
            text = part;
        } else if !text.contains(&part) {
            text = format!("{text}: {part}");
        }
    }
    text
}

/// The interrupting signals: the flag the completion and the solvers watch, and which
/// signal set it.
struct Signals {
    flag: Arc<AtomicBool>,
    which: Arc<AtomicUsize>,
}

/// Installs the handlers of SIGINT (Ctrl-C) and SIGTERM on first use: the first one sets the
/// flag (the work stops at its next check and saves what it can), a second one ends the
/// process at once with the signal's exit status.
fn signals() -> &'static Signals {
    static SIGNALS: OnceLock<Signals> = OnceLock::new();
    SIGNALS.get_or_init(|| {
        let signals = Signals {
            flag: Arc::new(AtomicBool::new(false)),
            which: Arc::new(AtomicUsize::new(0)),
        };
        for signal in [SIGINT, SIGTERM] {
            // Without handlers (none can be installed) a signal simply ends the process.
            let status = 128 + signal;
            let _ = signal_hook::flag::register_conditional_shutdown(
                signal,
                status,
                Arc::clone(&signals.flag),
            );
            let _ = signal_hook::flag::register_usize(
                signal,
                Arc::clone(&signals.which),
                signal as usize,
            );
            let _ = signal_hook::flag::register(signal, Arc::clone(&signals.flag));
        }
        signals
    })
}

/// A flag set by Ctrl-C or SIGTERM (the handlers are installed on first use).
pub fn interrupted() -> &'static AtomicBool {
    &signals().flag
}

/// The exit status for the signal that set [`interrupted`] (130 for SIGINT, 143 for
/// SIGTERM, the shell's convention of 128 plus the signal number), if one did.
pub fn signal_status() -> Option<u8> {
    match signals().which.load(Ordering::Relaxed) {
        0 => None,
        signal => u8::try_from(128 + signal).ok(),
    }
}

/// Runs `f` on a rayon pool of `threads` threads (default: rayon's choice), capped to the
/// machine ([`capped_threads`]) with one warning line on stderr when the count was above it.
///
/// The first call of a process makes the calling thread worker 0 of rayon's global pool of
/// that many threads, so `f` runs where it was called and `--threads 1` starts no thread at
/// all; later calls asking for the same count run in that pool too (work done in between,
/// such as preparing a set, uses the same threads). Otherwise `f` runs in a pool of its own.
pub fn with_threads<T: Send>(
    threads: Option<usize>,
    f: impl FnOnce() -> T + Send,
) -> anyhow::Result<T> {
    match threads {
        None => Ok(f()),
        Some(0) => anyhow::bail!("--threads must be at least 1"),
        Some(asked) => {
            let n = capped_threads(asked);
            // A verb may call this more than once (loading, then solving): one warning.
            static WARNED: AtomicBool = AtomicBool::new(false);
            if n < asked && !WARNED.swap(true, Ordering::Relaxed) {
                eprintln!(
                    "kernstep: warning: --threads {asked} is more than the {n} threads this machine runs at once; using {n}"
                );
            }
            if joins_global_pool(n) {
                return Ok(f());
            }
            Ok(in_pool(n, f)?)
        }
    }
}

/// Whether the calling thread is (or has just become) a worker of rayon's global pool of
/// exactly `n` threads. Building the global pool fails harmlessly once it exists.
fn joins_global_pool(n: usize) -> bool {
    let _ = rayon::ThreadPoolBuilder::new()
        .num_threads(n)
        .use_current_thread()
        .build_global();
    rayon::current_thread_index().is_some() && rayon::current_num_threads() == n
}

/// Writes `bytes` to `path` atomically with the cache's writer ([`cache::write_atomic`]: a
/// hidden temporary file beside it, synced, renamed into place, the directory synced), so
/// readers see the old file or the whole new one, never a part.
pub fn write_atomically(path: &Path, bytes: &[u8]) -> anyhow::Result<()> {
    cache::write_atomic(path, bytes).with_context(|| format!("writing {}", path.display()))
}

/// Where a solving verb gets its test set: the cache, a build on a miss (within limits), and
/// the engine.
#[derive(Debug, Args)]
pub struct ServeArgs {
    /// Use the set in FILE (a document `build --out` or `cache export` wrote), checked in full
    /// against the model, instead of the cache.
    #[arg(long, value_name = "FILE", conflicts_with_all = ["build", "engine"])]
    pub set: Option<PathBuf>,
    /// Build the test set (and store it in the cache) when the cache has none, instead of
    /// stopping.
    #[arg(long)]
    pub build: bool,
    #[command(flatten)]
    pub limits: LimitArgs,
    /// Which test set serves the solves.
    #[arg(long, value_enum, default_value_t = EngineArg::Auto)]
    pub engine: EngineArg,
    #[command(flatten)]
    pub cache: CacheArgs,
}

impl ServeArgs {
    /// The test set that serves `model`, read from `input`: the `--set` file, else as
    /// [`graver_for`] finds it.
    pub fn served(&self, model: &Model, input: &Path) -> anyhow::Result<Served> {
        if let Some(file) = &self.set {
            return Ok(serve_file(model, file)?);
        }
        graver_for(
            model,
            input,
            &self.cache,
            self.build,
            self.engine,
            &self.limits,
        )
    }
}

/// `--engine`: which test set serves the solves.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum EngineArg {
    /// A network matrix with linear costs is solved along its cycles (no set to build);
    /// any other model with its Graver basis from the cache.
    Auto,
    /// Always the enumerated Graver basis from the cache, also for network matrices.
    Moves,
    /// The cycles of the network; an error when the matrix is no network matrix.
    Cycles,
}

impl EngineArg {
    /// The library's engine choice.
    pub fn engine(self) -> Engine {
        match self {
            EngineArg::Auto => Engine::Auto,
            EngineArg::Moves => Engine::Moves,
            EngineArg::Cycles => Engine::Cycles,
        }
    }
}

/// `err`, with an integer overflow of a build turned into an input error naming the model file
/// (`input`) and its matrix: the reader keeps each entry within the completion's 32-bit
/// entries, but a test set's entries grow with the matrix's subdeterminants (the matrix
/// `[a 1 0; 0 a 1]` has the move `(1, -a, a^2)`), which only the build finds out.
pub fn overflow_named(err: anyhow::Error, input: &Path) -> anyhow::Error {
    match err.downcast::<kernstep::Error>() {
        Ok(kernstep::Error::Overflow(what)) => kernstep::Error::Input {
            file: input.display().to_string(),
            field: "matrix".to_string(),
            message: format!(
                "its test set needs entries beyond 2^31 - 1, more than a build holds (integer overflow in {what}): the matrix's subdeterminants are too large"
            ),
        }
        .into(),
        Ok(other) => other.into(),
        Err(err) => err,
    }
}

/// The test set that serves `model` (read from `input`), as the library's policy chooses it
/// ([`serve`]): on a miss built within `limits` when `build_on_miss` (a stopped build is a
/// [`super::limits::BuildStopped`] error), else the error says which `build` to run.
pub fn graver_for(
    model: &Model,
    input: &Path,
    cache: &CacheArgs,
    build_on_miss: bool,
    engine: EngineArg,
    limits: &LimitArgs,
) -> anyhow::Result<Served> {
    if limits.any() && !build_on_miss {
        anyhow::bail!(
            "--max-elements, --max-memory and --time-limit limit the build that --build starts on a cache miss; add --build"
        );
    }
    let served = match by_cycles(model, engine.engine()) {
        // A network needs no cache: open none.
        Ok(Some(served)) => Ok(served),
        Ok(None) => {
            let library = match cache.open_for(input) {
                Ok(library) => Some(library),
                Err(e) if build_on_miss => {
                    eprintln!(
                        "kernstep: warning: {}; building without the cache",
                        render_chain(&e)
                    );
                    None
                }
                Err(e) => return Err(e),
            };
            let control = build_on_miss.then(|| limits.control(model.variables()));
            serve(model, library.as_ref(), engine.engine(), control.as_ref())
        }
        Err(e) => Err(e),
    };
    if let Ok(served) = &served {
        super::build::warn_set_aside(served.set_aside.as_ref());
    }
    served.map_err(|e| serve_error(e, model, input, cache, engine, limits))
}

/// The complete set of `model` built in memory within `limits`, with no cache.
pub fn graver_uncached(
    model: &Model,
    input: &Path,
    cache: &CacheArgs,
    limits: &LimitArgs,
) -> anyhow::Result<Served> {
    let control = limits.control(model.variables());
    serve(model, None, Engine::Moves, Some(&control))
        .map_err(|e| serve_error(e, model, input, cache, EngineArg::Auto, limits))
}

/// A serve's error in the words of the command line: the `build` command that goes on, the
/// limit that stopped a build, the file whose matrix overflowed.
fn serve_error(
    e: kernstep::Error,
    model: &Model,
    input: &Path,
    cache: &CacheArgs,
    engine: EngineArg,
    limits: &LimitArgs,
) -> anyhow::Error {
    match e {
        kernstep::Error::NotCached { dir } => anyhow::anyhow!(
            "no test set for this matrix in the cache ({}); run `{}` first, or pass --build",
            dir.display(),
            build_command(input, cache, engine)
        ),
        kernstep::Error::BuildStopped {
            reason,
            kept,
            set_aside,
        } => {
            super::build::warn_set_aside(set_aside.as_deref());
            limits
                .stopped(
                    reason,
                    build_command(input, cache, engine),
                    model.variables(),
                    kept,
                )
                .into()
        }
        kernstep::Error::Unsupported(why) if engine == EngineArg::Cycles => {
            anyhow::anyhow!(
                "--engine cycles: {}: {why}; use --engine moves",
                input.display()
            )
        }
        e => overflow_named(e.into(), input),
    }
}

/// The `kernstep build` command that stores the set a solve of `input` looks for.
pub fn build_command(input: &Path, cache: &CacheArgs, engine: EngineArg) -> String {
    let engine = match engine {
        EngineArg::Moves => " --engine moves",
        EngineArg::Auto | EngineArg::Cycles => "",
    };
    let dir = cache
        .cache_dir
        .as_ref()
        .map(|d| format!(" --cache-dir {}", d.display()))
        .unwrap_or_default();
    format!("kernstep build {}{engine}{dir}", input.display())
}
