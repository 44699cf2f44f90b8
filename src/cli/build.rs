//! `kernstep build MODEL...`: compute test sets and store them in the cache (the overnight
//! run), or write one set to a file with `--out`.

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::{Duration, Instant};

use cache::SetKind;
use clap::{Args, ValueEnum};
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::{Control, Method, Progress, Sign, StopReason, WorkShare};
use kernstep::model::Model;
use kernstep::network::Network;
use kernstep::scenario::PlanInput;
use kernstep::testset::{
    build, deepen, entry_key, set_document, BoxPolicy, BuildOutcome, BuildSpec, BuiltSet, LevelEnd,
    NormLimit, Obtained, SavedState, SetAside,
};
use serde::Serialize;

use super::common::{
    model_paths, overflow_named, render_chain, signal_status, with_threads, write_atomically,
    CacheArgs, EngineArg,
};
use super::limits::LimitArgs;
use super::progress::{BuildProgress, ProgressArg};
use super::table::write_table;

/// Arguments of `build`.
#[derive(Debug, Args)]
pub struct BuildArgs {
    /// Model files, transport scenario files, or directories of them (every .json and .toml inside).
    #[arg(required = true, value_name = "MODEL")]
    pub models: Vec<PathBuf>,
    /// Which set: the Graver basis, or the Hilbert basis of the sign-restricted kernel.
    #[arg(long, value_enum, default_value_t = KindArg::Graver)]
    pub kind: KindArg,
    /// Sign of each variable in the moves, one character per variable: `+` (>= 0), `-`
    /// (<= 0) or `f` (free). Default: all free for graver, all `+` for hilbert.
    #[arg(long, value_name = "PATTERN")]
    pub signs: Option<String>,
    /// l1 norm limit: `auto` (the smallest proven bound; loses nothing), `none`, or a number
    /// (below the proven bound the set is partial and recorded as such).
    #[arg(long, value_name = "auto|none|N", default_value = "auto", value_parser = parse_norm_limit)]
    pub norm_limit: NormLimit,
    /// Truncate to the model's box |g_i| <= u_i - l_i (`auto`), valid for every instance
    /// inside that box, or not at all (`none`).
    #[arg(long = "box", value_enum, default_value_t = BoxArg::None)]
    pub bounds: BoxArg,
    /// Completion method.
    #[arg(long, value_enum, default_value_t = MethodArg::Lift)]
    pub method: MethodArg,
    /// Worker threads (default: one per core).
    #[arg(long, value_name = "N")]
    pub threads: Option<usize>,
    /// Overnight budget (`90s`, `40m`, `8h`): deepen the norm limit one level at a time and
    /// keep the largest level that finishes in the budget (and under the memory cap), stored
    /// as norm-truncated; the proven bound reached gives the complete set. With
    /// `--norm-limit N` the deepening stops at N.
    #[arg(long, value_name = "DURATION", value_parser = parse_duration)]
    pub budget: Option<Duration>,
    #[command(flatten)]
    pub limits: LimitArgs,
    /// Save the build's state at least this often (`60s`, `5m`), inside stages too, so that an
    /// interrupted build (Ctrl-C, SIGTERM, a limit, a crash) loses at most this much work;
    /// running the same command again resumes.
    #[arg(long, value_name = "DURATION", value_parser = parse_duration,
          default_value = "60s")]
    pub checkpoint_every: Duration,
    /// Progress on stderr: `auto` (a bar on a terminal, otherwise a line at most every 30 s),
    /// `bar`, `lines`, `json` (one object per line) or `none`.
    #[arg(long, value_enum, default_value_t = ProgressArg::Auto)]
    pub progress: ProgressArg,
    /// Write the set of the one model to FILE (JSON) instead of the cache.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Rebuild even when a valid entry exists, replacing it.
    #[arg(long)]
    pub rebuild: bool,
    /// `auto`: a network matrix (with linear costs) asked for its Graver basis gets an
    /// implicit entry (its cycles; nothing enumerated); `moves`: always enumerate; `cycles`:
    /// the implicit entry, an error when the matrix is no network.
    #[arg(long, value_enum, default_value_t = EngineArg::Auto)]
    pub engine: EngineArg,
    #[command(flatten)]
    pub cache: CacheArgs,
    /// Print the summary as JSON.
    #[arg(long)]
    pub json: bool,
}

/// `--kind`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum KindArg {
    /// Graver basis.
    Graver,
    /// Hilbert basis of the sign-restricted kernel.
    Hilbert,
}

/// `--box`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum BoxArg {
    /// The model's box.
    Auto,
    /// No box.
    None,
}

/// `--method`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MethodArg {
    /// Project-and-lift.
    Lift,
    /// Pottier's completion (baseline).
    Pottier,
}

/// `90`, `90s`, `40m` or `8h`.
pub(super) fn parse_duration(text: &str) -> Result<Duration, String> {
    let (number, unit) = match text.char_indices().last() {
        Some((i, c)) if c.is_ascii_alphabetic() => (&text[..i], c),
        _ => (text, 's'),
    };
    let scale = match unit {
        's' => 1.0,
        'm' => 60.0,
        'h' => 3600.0,
        other => return Err(format!("unknown unit {other:?}; use s, m or h (e.g. 40m)")),
    };
    number
        .trim()
        .parse::<f64>()
        .ok()
        .and_then(|n| Duration::try_from_secs_f64(n * scale).ok())
        .filter(|d| !d.is_zero())
        .ok_or_else(|| format!("expected a positive duration such as 90s, 40m or 8h, got {text:?}"))
}

fn parse_norm_limit(text: &str) -> Result<NormLimit, String> {
    match text {
        "auto" => Ok(NormLimit::Auto),
        "none" => Ok(NormLimit::Unlimited),
        n => n
            .parse::<u64>()
            .map(NormLimit::AtMost)
            .map_err(|_| format!("expected auto, none or a whole number, got {n:?}")),
    }
}

/// Parses a `--signs` pattern for `n` variables.
fn parse_signs(pattern: &str, n: usize) -> anyhow::Result<Vec<Sign>> {
    let signs = pattern
        .chars()
        .enumerate()
        .map(|(i, c)| match c {
            '+' => Ok(Sign::NonNegative),
            '-' => Ok(Sign::NonPositive),
            'f' | 'F' => Ok(Sign::Free),
            other => anyhow::bail!("--signs: character {} is {other:?}; use +, - or f", i + 1),
        })
        .collect::<anyhow::Result<Vec<_>>>()?;
    if signs.len() != n {
        anyhow::bail!(
            "--signs has {} characters, the model has {n} variables",
            signs.len()
        );
    }
    Ok(signs)
}

/// One line of the summary.
#[derive(Debug, Serialize)]
struct Row {
    model: String,
    key: Option<String>,
    kind: Option<SetKind>,
    elements: Option<usize>,
    /// The norm limit a budgeted build reached.
    #[serde(skip_serializing_if = "Option::is_none")]
    norm_limit: Option<u64>,
    /// The levels of a budgeted build.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    levels: Vec<LevelRow>,
    /// The saved state a build resumed from.
    #[serde(skip_serializing_if = "Option::is_none")]
    resumed: Option<StateDoc>,
    /// The saved state a stopped build left for the next run.
    #[serde(skip_serializing_if = "Option::is_none")]
    kept: Option<StateDoc>,
    /// The command that resumes a stopped build.
    #[serde(skip_serializing_if = "Option::is_none")]
    resume_command: Option<String>,
    seconds: f64,
    status: String,
    /// Why a build stopped (`cancelled`, `time_limit`, `element_limit`).
    #[serde(skip)]
    stop: Option<StopReason>,
    /// Whether the build failed (an error, told in `status`).
    #[serde(skip)]
    failed: bool,
}

/// A saved state in the JSON summary.
#[derive(Debug, Serialize)]
struct StateDoc {
    stage: usize,
    stages: usize,
    mid_stage: bool,
    /// A decimal string: counts of moves can pass 2^53 in principle.
    moves: String,
    work_seconds: f64,
}

impl StateDoc {
    fn of(state: &SavedState) -> Self {
        Self {
            stage: state.stage,
            stages: state.stages,
            mid_stage: state.mid_stage,
            moves: state.moves.to_string(),
            work_seconds: state.work.as_secs_f64(),
        }
    }
}

/// One level of a budgeted build in the JSON summary.
#[derive(Debug, Serialize)]
struct LevelRow {
    norm_limit: u64,
    elements: Option<usize>,
    seconds: f64,
    stopped: Option<String>,
}

impl BuildArgs {
    fn spec(&self, model: &Model) -> anyhow::Result<BuildSpec> {
        Ok(BuildSpec {
            kind: match self.kind {
                KindArg::Graver => SetKind::Graver,
                KindArg::Hilbert => SetKind::Hilbert,
            },
            signs: self
                .signs
                .as_deref()
                .map(|p| parse_signs(p, model.variables()))
                .transpose()?,
            norm_limit: self.norm_limit,
            bounds: match self.bounds {
                BoxArg::Auto => BoxPolicy::FromBounds,
                BoxArg::None => BoxPolicy::Unlimited,
            },
            method: match self.method {
                MethodArg::Lift => Method::ProjectAndLift,
                MethodArg::Pottier => Method::Pottier,
            },
        })
    }
}

/// Builds every model's set; exits 0 if all are stored, 1 if a limit stopped one, 2 if one
/// failed (the others are still built). Under `mpirun` (feature `mpi`) the ranks share the
/// build (see `ranked`).
pub fn run(args: &BuildArgs) -> anyhow::Result<ExitCode> {
    #[cfg(feature = "mpi")]
    if let Some(ranks) = super::ranked::current() {
        return super::ranked::build::run(args, ranks);
    }
    run_with(args, None)
}

/// [`run`], with the completion's work shared through `share` when given.
pub(super) fn run_with(
    args: &BuildArgs,
    share: Option<&dyn WorkShare>,
) -> anyhow::Result<ExitCode> {
    let paths = model_paths(&args.models)?;
    if args.out.is_some() && paths.len() != 1 {
        anyhow::bail!("--out writes one set: name exactly one model");
    }
    let rows = with_threads(args.threads, || {
        paths
            .iter()
            .map(|p| build_one(args, p, share))
            .collect::<Vec<Row>>()
    })?;
    let mut out = io::stdout().lock();
    if args.json {
        writeln!(out, "{}", serde_json::to_string_pretty(&rows)?)?;
    } else {
        render(&mut out, &rows)?;
    }
    out.flush()?;
    let failed = rows.iter().any(|r| r.failed);
    let stopped = rows.iter().any(|r| r.stop.is_some());
    let signalled = rows
        .iter()
        .any(|r| r.stop == Some(StopReason::Cancelled))
        .then(signal_status)
        .flatten();
    Ok(match (failed, signalled, stopped) {
        (true, _, _) => ExitCode::from(2),
        (false, Some(status), _) => ExitCode::from(status),
        (false, None, true) => ExitCode::from(1),
        _ => ExitCode::SUCCESS,
    })
}

fn render(out: &mut impl Write, rows: &[Row]) -> io::Result<()> {
    let cells: Vec<Vec<String>> = rows
        .iter()
        .map(|r| {
            vec![
                r.model.clone(),
                r.key
                    .as_deref()
                    .map_or("-".into(), |k| k[..12.min(k.len())].to_string()),
                r.kind
                    .map_or("-".into(), |k| format!("{k:?}").to_lowercase()),
                r.elements.map_or("-".into(), |e| e.to_string()),
                format!("{:.2}", r.seconds),
                r.status.clone(),
            ]
        })
        .collect();
    write_table(
        out,
        &["model", "key", "kind", "elements", "seconds", "status"],
        &cells,
    )
}

/// Builds one model's set; every problem becomes the row's status, not an error.
fn build_one(args: &BuildArgs, path: &Path, share: Option<&dyn WorkShare>) -> Row {
    let start = Instant::now();
    let mut row = Row {
        model: path.display().to_string(),
        key: None,
        kind: None,
        elements: None,
        norm_limit: None,
        levels: Vec::new(),
        resumed: None,
        kept: None,
        resume_command: None,
        seconds: 0.0,
        status: String::new(),
        stop: None,
        failed: false,
    };
    match try_build(args, path, &mut row, share) {
        Ok(status) => row.status = status,
        Err(e) => {
            row.failed = true;
            row.status = format!("failed: {}", render_chain(&overflow_named(e, path)));
        }
    }
    row.seconds = start.elapsed().as_secs_f64();
    row
}

/// The network of `model` when its set is to be the implicit one (see `--engine`). A set
/// written to a file (`--out`) is always enumerated: a file cannot hold the implicit set.
fn implicit_network(args: &BuildArgs, model: &Model) -> anyhow::Result<Option<Network>> {
    let default_request = args.kind == KindArg::Graver
        && args.signs.is_none()
        && matches!(args.norm_limit, NormLimit::Auto | NormLimit::Unlimited)
        && args.bounds == BoxArg::None
        && args.method == MethodArg::Lift;
    match args.engine {
        EngineArg::Cycles if args.out.is_some() => anyhow::bail!(
            "--engine cycles stores the implicit entry in the cache, which --out cannot write; leave --engine out (or pass --engine moves) to write the enumerated cycles"
        ),
        EngineArg::Moves => Ok(None),
        EngineArg::Auto if args.out.is_some() => Ok(None),
        EngineArg::Auto if !default_request || !model.convex.is_empty() => Ok(None),
        EngineArg::Auto => Ok(Network::detect(&model.matrix).ok()),
        EngineArg::Cycles if !default_request => anyhow::bail!(
            "--engine cycles stores the whole Graver basis of a network; it takes no --kind, --signs, --norm-limit N, --box or --method"
        ),
        EngineArg::Cycles if !model.convex.is_empty() => anyhow::bail!(
            "--engine cycles: the model has convex costs, which the network solver does not take"
        ),
        EngineArg::Cycles => Network::detect(&model.matrix)
            .map(Some)
            .map_err(|why| anyhow::anyhow!("--engine cycles: not a network matrix: {why}")),
    }
}

/// Stores the implicit entry of a network matrix.
fn build_cycles(
    args: &BuildArgs,
    model: &Model,
    network: &Network,
    row: &mut Row,
) -> anyhow::Result<String> {
    row.kind = Some(SetKind::Cycles);
    row.elements = Some(0);
    let library = args.cache.open()?;
    Ok(
        match library.obtain_cycles(&model.matrix, network, args.rebuild)? {
            Obtained::Reused(stored) => {
                row.key = Some(stored.digest.to_hex());
                "present".to_string()
            }
            Obtained::Built {
                built, replaced, ..
            } => {
                row.key = Some(built.key.digest().to_hex());
                let mut status =
                    "built (implicit: the network's cycles, nothing enumerated)".to_string();
                if let Some(damage) = replaced {
                    status.push_str(&format!(" (replaced a damaged entry: {damage})"));
                }
                status
            }
            Obtained::Stopped { reason, .. } => stopped(row, reason, None),
        },
    )
}

fn try_build(
    args: &BuildArgs,
    path: &Path,
    row: &mut Row,
    share: Option<&dyn WorkShare>,
) -> anyhow::Result<String> {
    let model = PlanInput::load(path)?.into_model();
    if let Some(network) = implicit_network(args, &model)? {
        return build_cycles(args, &model, &network, row);
    }
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let spec = args.spec(&model)?.resolve(&model, &analysis)?;
    row.kind = Some(spec.kind);
    let bar = BuildProgress::new(args.progress, path);
    let report = |p: &Progress| bar.report(p);
    let mut control = args.limits.control(model.variables())?.progress(&report);
    if let Some(share) = share {
        control = control.shared(share);
    }
    if let Some(budget) = args.budget {
        let status = budgeted(args, &model, &analysis, control.time_limit(budget), row);
        bar.finish();
        return status;
    }
    let status = if let Some(out) = &args.out {
        row.key = Some(entry_key(&model.matrix, &spec).digest().to_hex());
        match build(&model.matrix, &analysis, &spec, &control, None)? {
            BuildOutcome::Built(built) => {
                write_set_file(out, &built)?;
                row.elements = Some(built.set.elements.len());
                format!("written to {}", out.display())
            }
            BuildOutcome::Stopped(reason) => stopped(row, reason, None),
        }
    } else {
        let library = args.cache.open()?.checkpoint_every(args.checkpoint_every);
        match library.obtain(&model.matrix, &analysis, &spec, &control, args.rebuild)? {
            Obtained::Reused(stored) => {
                row.key = Some(stored.digest.to_hex());
                row.elements = Some(stored.data.len());
                "present".to_string()
            }
            Obtained::Built {
                built,
                replaced,
                resumed,
                set_aside,
            } => {
                warn_set_aside(set_aside.as_ref());
                row.key = Some(built.key.digest().to_hex());
                row.elements = Some(built.set.elements.len());
                let mut status = "built".to_string();
                if built.key != entry_key(&model.matrix, &spec) {
                    status.push_str(" (complete: the truncation cut nothing)");
                }
                if let Some(state) = resumed {
                    status.push_str(&format!(" (resumed from {})", describe(&state)));
                    row.resumed = Some(StateDoc::of(&state));
                }
                if let Some(damage) = replaced {
                    status.push_str(&format!(" (replaced a damaged entry: {damage})"));
                }
                status
            }
            Obtained::Stopped {
                reason,
                kept,
                set_aside,
            } => {
                warn_set_aside(set_aside.as_ref());
                stopped(row, reason, kept)
            }
        }
    };
    bar.finish();
    Ok(status)
}

/// Names on stderr a checkpoint that could not be resumed and was moved aside.
pub(super) fn warn_set_aside(set_aside: Option<&SetAside>) {
    if let Some(s) = set_aside {
        eprintln!(
            "kernstep: warning: checkpoint {} cannot be resumed ({}); moved it to {} and started the build over",
            s.from.display(),
            s.problem,
            s.to.display()
        );
    }
}

/// Records a stop in `row` and returns its status: why, what was kept, and how to go on.
fn stopped(row: &mut Row, reason: StopReason, kept: Option<SavedState>) -> String {
    row.stop = Some(reason);
    let why = match reason {
        StopReason::Cancelled => "interrupted",
        StopReason::TimeLimit => "time limit reached",
        StopReason::ElementLimit => "element or memory limit reached",
    };
    let Some(state) = kept else {
        return format!("stopped: {why}; nothing kept");
    };
    row.kept = Some(StateDoc::of(&state));
    let command = command_line();
    let status = format!(
        "stopped: {why}; kept {}; resume with: {command}",
        describe(&state)
    );
    row.resume_command = Some(command);
    status
}

/// A saved state in words.
pub(super) fn describe(state: &SavedState) -> String {
    let within = if state.mid_stage { " (mid-stage)" } else { "" };
    format!(
        "stage {}/{}{within}, {} moves, {:.0} s of work",
        state.stage,
        state.stages,
        state.moves,
        state.work.as_secs_f64()
    )
}

/// This process's command line, quoted for a POSIX shell: running it again resumes the build.
fn command_line() -> String {
    std::env::args()
        .map(|arg| {
            let plain = !arg.is_empty()
                && arg
                    .bytes()
                    .all(|b| b.is_ascii_alphanumeric() || b"-_./=:,+@%".contains(&b));
            if plain {
                arg
            } else {
                format!("'{}'", arg.replace('\'', "'\\''"))
            }
        })
        .collect::<Vec<_>>()
        .join(" ")
}

/// Whether `build` of the one model at `path` would run a completion (no implicit network
/// entry, and no stored entry to reuse): what the ranks of a shared build agree on first, so
/// that all of them build or none.
#[cfg(feature = "mpi")]
pub(super) fn would_complete(args: &BuildArgs, path: &Path) -> anyhow::Result<bool> {
    let model = PlanInput::load(path)?.into_model();
    if implicit_network(args, &model)?.is_some() {
        return Ok(false);
    }
    if args.out.is_some() || args.rebuild {
        return Ok(true);
    }
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let spec = args.spec(&model)?.resolve(&model, &analysis)?;
    let key = entry_key(&model.matrix, &spec);
    Ok(args.cache.open()?.find(&key)?.is_none())
}

/// The part of a shared build that a rank other than the leader runs: the same completion
/// from the same checkpoint, with its share of each round, storing nothing. 0 when the set
/// was completed, 1 when a limit stopped it (agreed by all ranks).
#[cfg(feature = "mpi")]
pub(super) fn follow(
    args: &BuildArgs,
    path: &Path,
    share: &dyn WorkShare,
) -> anyhow::Result<ExitCode> {
    let model = PlanInput::load(path)?.into_model();
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let spec = args.spec(&model)?.resolve(&model, &analysis)?;
    let resume = match &args.out {
        Some(_) => None,
        None => args.cache.open()?.resume_point(&model.matrix, &spec)?,
    };
    let control = args.limits.control(model.variables())?.shared(share);
    let outcome = with_threads(args.threads, || {
        build(&model.matrix, &analysis, &spec, &control, resume.as_ref())
    })??;
    Ok(match outcome {
        BuildOutcome::Built(_) => ExitCode::SUCCESS,
        BuildOutcome::Stopped(_) => ExitCode::from(1),
    })
}

/// Deepens the norm limit within the budget of `control` and stores (or writes) the last
/// level that finished.
fn budgeted(
    args: &BuildArgs,
    model: &Model,
    analysis: &MatrixAnalysis,
    control: Control<'_>,
    row: &mut Row,
) -> anyhow::Result<String> {
    let spec = args.spec(model)?;
    let library = match &args.out {
        Some(_) => None,
        None => Some(args.cache.open()?),
    };
    let complete = spec.resolve(model, analysis)?;
    if let (Some(library), false) = (&library, args.rebuild) {
        if let Some(stored) = library.find(&entry_key(&model.matrix, &complete))? {
            row.key = Some(stored.digest.to_hex());
            row.elements = Some(stored.data.len());
            return Ok("present (the whole request; no deepening needed)".to_string());
        }
    }
    let deepened = deepen(model, analysis, &spec, &control, &mut |_| {})?;
    row.levels = deepened
        .levels
        .iter()
        .map(|l| LevelRow {
            norm_limit: l.limit,
            elements: match l.end {
                LevelEnd::Built { elements } => Some(elements),
                LevelEnd::Stopped(_) => None,
            },
            seconds: l.elapsed.as_secs_f64(),
            stopped: match l.end {
                LevelEnd::Stopped(reason) => Some(format!("{reason:?}")),
                LevelEnd::Built { .. } => None,
            },
        })
        .collect();
    let stopped = deepened.levels.last().and_then(|l| match l.end {
        LevelEnd::Stopped(reason) => Some((l.limit, reason, l.elapsed)),
        LevelEnd::Built { .. } => None,
    });
    let Some(built) = deepened.kept.as_deref() else {
        let (limit, reason, _) = stopped.expect("a deepening without a kept level stopped");
        return Ok(format!(
            "stopped: {reason:?} at norm limit {limit}, the first level; nothing stored"
        ));
    };
    let limit = deepened.limit_reached().unwrap_or_default();
    row.key = Some(built.key.digest().to_hex());
    row.elements = Some(built.set.elements.len());
    row.norm_limit = Some(limit);
    let mut status = match &args.out {
        Some(out) => {
            write_set_file(out, built)?;
            format!("written to {}", out.display())
        }
        None => {
            let library = library.expect("a cache is open without --out");
            match library.keep(built)? {
                Some(damage) => format!("built (replaced a damaged entry: {damage})"),
                None => "built".to_string(),
            }
        }
    };
    let proven = match deepened.proven_bound {
        u64::MAX => "no finite proven bound".to_string(),
        bound => format!("proven bound {bound}"),
    };
    match built.metadata.completeness {
        cache::Completeness::NormTruncated { .. } => status.push_str(&format!(
            " within the budget: norm limit {limit} ({proven}; partial)"
        )),
        _ if limit >= deepened.proven_bound => status.push_str(&format!(
            " within the budget: complete (norm limit {limit} reached the proven bound)"
        )),
        _ => status.push_str(&format!(
            " within the budget: complete (norm limit {limit} cut nothing)"
        )),
    }
    if let Some((next, reason, elapsed)) = stopped {
        if reason == StopReason::Cancelled {
            row.stop = Some(reason);
        }
        status.push_str(&format!(
            "; norm limit {next} stopped on {reason:?} after {:.1} s",
            elapsed.as_secs_f64()
        ));
    }
    Ok(status)
}

/// Writes the set's document (see [`set_document`]) next to `path`, then renames it into
/// place (never half-written).
fn write_set_file(path: &Path, built: &BuiltSet) -> anyhow::Result<()> {
    let doc = set_document(&built.key, &built.metadata, &built.set.elements);
    write_atomically(path, doc.as_bytes())
}
