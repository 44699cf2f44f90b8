//! `kernstep build MODEL...`: compute test sets and store them in the cache (the overnight
//! run), or write one set to a file with `--out`.

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::{Duration, Instant};

use cache::SetKind;
use clap::{Args, ValueEnum};
#[cfg(feature = "mpi")]
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::{Method, Progress, Sign, StopReason, WorkShare};
use kernstep::formats::published::{BuildReport, BuildRow};
use kernstep::formats::tagged;
use kernstep::model::Model;
use kernstep::scenario::PlanInput;
#[cfg(feature = "mpi")]
use kernstep::testset::{build, entry_key, BuildOutcome};
use kernstep::testset::{
    BoxPolicy, BuildSpec, Destination, Job, JobReport, JobStatus, NormLimit, SetAside,
};
use kernstep::text::{cell, job_text, kind_name, table, StopWords, SHORT_KEY};

use super::common::{
    overflow_named, render_chain, signal_status, with_threads, CacheArgs, EngineArg,
};
use super::limits::LimitArgs;
use super::parse;
use super::progress::{BuildProgress, ProgressArg};

/// Arguments of `build`.
#[derive(Debug, Args)]
pub struct BuildArgs {
    /// Model files, transport scenario files, or directories of them (every .json, .toml and
    /// .mps file inside, .gz compressed too).
    #[arg(required = true, value_name = "MODEL")]
    pub models: Vec<PathBuf>,
    /// Which set: the Graver basis, or the Hilbert basis of the sign-restricted kernel.
    #[arg(long, value_enum, default_value_t = KindArg::Graver)]
    pub kind: KindArg,
    /// Sign of each variable in the moves, one character per variable: `+` (>= 0), `-`
    /// (<= 0) or `f` (free). Default: all free for graver, all `+` for hilbert.
    #[arg(long, value_name = "PATTERN", allow_hyphen_values = true)]
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
    #[arg(long, short = 'j', value_name = "N")]
    pub threads: Option<usize>,
    /// Overnight budget (`90s`, `40m`, `8h`): deepen the norm limit one level at a time and
    /// keep the largest level that finishes in the budget (and under the memory cap), stored
    /// as norm-truncated; the proven bound reached gives the complete set. With
    /// `--norm-limit N` the deepening stops at N.
    #[arg(long, value_name = "DURATION", value_parser = parse::duration)]
    pub budget: Option<Duration>,
    #[command(flatten)]
    pub limits: LimitArgs,
    /// Save the build's state at least this often (`60s`, `5m`), inside stages too, so that an
    /// interrupted build (Ctrl-C, SIGTERM, a limit, a crash) loses at most this much work;
    /// running the same command again resumes.
    #[arg(long, value_name = "DURATION", value_parser = parse::duration,
          default_value = "60s")]
    pub checkpoint_every: Duration,
    /// Progress on stderr: `auto` (a bar on a terminal, otherwise a line at most every 30 s),
    /// `bar`, `lines`, `json` (one object per line) or `none`.
    #[arg(long, value_enum, default_value_t = ProgressArg::Auto)]
    pub progress: ProgressArg,
    /// Write the set of the one model to FILE (JSON) instead of the cache.
    #[arg(long, short = 'o', value_name = "FILE")]
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
        .map(|(i, c)| {
            Sign::from_symbol(c).ok_or_else(|| {
                anyhow::anyhow!("--signs: character {} is {c:?}; use +, - or f", i + 1)
            })
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

    /// The library's job for `model`, putting the set in `destination`.
    fn job<'a>(&self, model: &Model, destination: Destination<'a>) -> anyhow::Result<Job<'a>> {
        if self.engine == EngineArg::Cycles && self.out.is_some() {
            anyhow::bail!(
                "--engine cycles stores the implicit entry in the cache, which --out cannot write; leave --engine out (or pass --engine moves) to write the enumerated cycles"
            );
        }
        Ok(Job {
            spec: self.spec(model)?,
            engine: self.engine.engine(),
            budget: self.budget,
            rebuild: self.rebuild,
            destination,
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
    let paths = PlanInput::files(&args.models)?;
    if args.out.is_some() && paths.len() != 1 {
        anyhow::bail!("--out writes one set: name exactly one model");
    }
    let rows = with_threads(args.threads, || {
        paths
            .iter()
            .map(|p| build_one(args, p, share))
            .collect::<Vec<BuildRow>>()
    })?;
    let code = exit_code(&rows);
    let mut out = io::stdout().lock();
    if args.json {
        writeln!(out, "{}", tagged::pretty(&BuildReport { models: rows })?)?;
    } else {
        render(&mut out, &rows)?;
    }
    out.flush()?;
    Ok(code)
}

/// 2 if a build failed (it has no report), a signal's status if one stopped a build, 1 if a
/// limit stopped one.
fn exit_code(rows: &[BuildRow]) -> ExitCode {
    let failed = rows.iter().any(|r| r.report.is_none());
    let stopped = rows
        .iter()
        .any(|r| r.report.as_ref().and_then(JobReport::stop).is_some());
    let signalled = rows
        .iter()
        .any(|r| r.report.as_ref().and_then(JobReport::stop) == Some(StopReason::Cancelled))
        .then(signal_status)
        .flatten();
    match (failed, signalled, stopped) {
        (true, _, _) => ExitCode::from(2),
        (false, Some(status), _) => ExitCode::from(status),
        (false, None, true) => ExitCode::from(1),
        _ => ExitCode::SUCCESS,
    }
}

fn render(out: &mut impl Write, rows: &[BuildRow]) -> io::Result<()> {
    let cells: Vec<Vec<String>> = rows
        .iter()
        .map(|r| {
            let report = r.report.as_ref();
            let key = report.and_then(|r| r.key.as_deref());
            vec![
                r.model.clone(),
                cell(key.map(|k| &k[..SHORT_KEY.min(k.len())])),
                cell(report.map(|r| kind_name(r.kind))),
                cell(report.and_then(|r| r.elements)),
                format!("{:.2}", r.seconds),
                r.status.clone(),
            ]
        })
        .collect();
    let head = ["model", "key", "kind", "elements", "seconds", "status"];
    out.write_all(table(&head, &cells).as_bytes())
}

/// Builds one model's set; every problem becomes the row's status, not an error.
fn build_one(args: &BuildArgs, path: &Path, share: Option<&dyn WorkShare>) -> BuildRow {
    let start = Instant::now();
    let mut row = BuildRow {
        model: path.display().to_string(),
        report: None,
        resume_command: None,
        seconds: 0.0,
        status: String::new(),
    };
    match run_job(args, path, share) {
        Ok((report, width)) => {
            warn_set_aside(report.set_aside.as_ref());
            let words = Words {
                limits: &args.limits,
                width,
            };
            row.status = job_text(&report, args.budget.is_some(), &words);
            if let (JobStatus::Stopped { .. }, Some(_)) = (report.status, &report.kept) {
                row.resume_command = Some(command_line());
            }
            row.report = Some(report);
        }
        Err(e) => {
            row.status = format!("failed: {}", render_chain(&overflow_named(e, path)));
        }
    }
    row.seconds = start.elapsed().as_secs_f64();
    row
}

/// Runs the library's job for the model at `path`; the report and the model's width.
fn run_job(
    args: &BuildArgs,
    path: &Path,
    share: Option<&dyn WorkShare>,
) -> anyhow::Result<(JobReport, usize)> {
    let model = PlanInput::load(path)?.into_model();
    let library = match &args.out {
        Some(_) => None,
        None => Some(
            args.cache
                .open_for(path)?
                .checkpoint_every(args.checkpoint_every),
        ),
    };
    let destination = match (&args.out, &library) {
        (Some(out), _) => Destination::File(out),
        (None, Some(library)) => Destination::Cache(library),
        (None, None) => unreachable!("a cache is open without --out"),
    };
    let job = args.job(&model, destination)?;
    let bar = BuildProgress::new(args.progress, path);
    let report = |p: &Progress| bar.report(p);
    let mut control = args.limits.control(model.variables()).progress(&report);
    if let Some(share) = share {
        control = control.shared(share);
    }
    let outcome = job.run(&model, control);
    bar.finish();
    Ok((outcome?, model.variables()))
}

/// The limits of a build of vectors of `width` entries named by their flags, and this
/// command as the one that resumes the build.
struct Words<'a> {
    limits: &'a LimitArgs,
    width: usize,
}

impl StopWords for Words<'_> {
    fn limit(&self, reason: StopReason) -> String {
        self.limits.named(reason, self.width)
    }

    fn resume(&self) -> String {
        command_line()
    }
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
    let library = args.cache.open()?;
    let destination = match &args.out {
        Some(out) => Destination::File(out),
        None => Destination::Cache(&library),
    };
    if args.job(&model, destination)?.network(&model)?.is_some() {
        return Ok(false);
    }
    if args.out.is_some() || args.rebuild {
        return Ok(true);
    }
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let spec = args.spec(&model)?.resolve(&model, &analysis)?;
    Ok(library.find(&entry_key(&model.matrix, &spec))?.is_none())
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
    let control = args.limits.control(model.variables()).shared(share);
    let outcome = with_threads(args.threads, || {
        build(&model.matrix, &analysis, &spec, &control, resume.as_ref())
    })??;
    Ok(match outcome {
        BuildOutcome::Built(_) => ExitCode::SUCCESS,
        BuildOutcome::Stopped(_) => ExitCode::from(1),
    })
}
