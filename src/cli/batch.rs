//! `kernstep batch INPUT DAYS`: re-optimise every day of a scenario (or every variant of a
//! model) with one test set, prepared once, in parallel or chained.
//!
//! Results (one record per day, in input order) go to `--out` or stdout; the summary goes to
//! stdout when the results went to a file, else to stderr. Exit code: 2 if a line was bad or
//! a day failed, else 1 if a day was infeasible, unbounded, hit the step limit or was not
//! solved because of Ctrl-C, else 0.

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::atomic::Ordering;
use std::time::Instant;

use clap::{Args, ValueEnum};
use kernstep::formats::batch::{self, ChangeColumns, DayRecord, Layout, RunSummary, Tally};
use kernstep::formats::tagged;
use kernstep::input::is_stdin;
use kernstep::model::Model;
use kernstep::scenario::{read_days, replan, DayOutcome, DayResult, PlanInput, ReplanSettings};
use kernstep::solve::{ChangePrice, ParsedLine, Prepared};
use kernstep::text::summary_text;

use super::common::{capped_threads, interrupted, with_threads, write_atomically, ServeArgs};

/// Arguments of `batch`.
#[derive(Debug, Args)]
pub struct BatchArgs {
    /// A scenario file, or a model file (.json, .toml or .mps; .gz compressed too; `-` reads
    /// standard input).
    pub input: PathBuf,
    /// The days: JSON Lines of changes by name (or of numeric variants for a model file), or
    /// CSV rows `day,field,name,value` (.csv, scenarios only); .gz compressed too; `-` reads
    /// standard input.
    pub days: PathBuf,
    /// Worker threads for the days (default: one per core).
    #[arg(long, short = 'j', value_name = "N")]
    pub threads: Option<usize>,
    /// Warm-start each day from the previous day's plan (the days then run one after another).
    #[arg(long)]
    pub chain: bool,
    /// With --chain: add W per unit changed against the day before to each day's cost (a
    /// variable the input file prices with its own `change_cost` keeps that price).
    #[arg(long, value_name = "W", requires = "chain")]
    pub change_cost: Option<i64>,
    /// With --change-cost: also solve each day without the price and report its figures.
    #[arg(long, requires = "change_cost")]
    pub compare: bool,
    #[command(flatten)]
    pub serving: ServeArgs,
    /// Write the results to FILE instead of stdout (the summary then goes to stdout).
    #[arg(long, short = 'o', value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Layout of the results.
    #[arg(long, value_enum, default_value_t = Format::Jsonl)]
    pub format: Format,
    /// Print the summary as JSON.
    #[arg(long)]
    pub json: bool,
}

/// `--format`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// One JSON object per day.
    Jsonl,
    /// A header and one row per day, the plan one column per variable.
    Csv,
}

impl BatchArgs {
    /// The records' layout: the format, with the change-price columns of a priced run.
    pub fn layout(&self) -> Layout {
        self.format.layout(self.change_cost.is_some(), self.compare)
    }
}

impl Format {
    /// The library's layout, for a run with a change price (`priced`) compared with the plan
    /// without it (`compared`).
    pub fn layout(self, priced: bool, compared: bool) -> Layout {
        match self {
            Format::Jsonl => Layout::Jsonl,
            Format::Csv => Layout::Csv(ChangeColumns::of(priced, compared)),
        }
    }
}

/// Runs `batch`.
pub fn run(args: &BatchArgs) -> anyhow::Result<ExitCode> {
    // Install the Ctrl-C handler before any work, so that an early Ctrl-C is also clean.
    interrupted();
    if is_stdin(&args.input) && is_stdin(&args.days) {
        anyhow::bail!("standard input (-) holds one file: the input or the days, not both");
    }
    let input = PlanInput::load(&args.input)?;
    let days = read_days(&input, &args.days)?;
    let model = input.model();
    let settings = ReplanSettings {
        chain: args.chain,
        change: args
            .change_cost
            .map(|w| ChangePrice::of_model(model, w, "--change-cost"))
            .transpose()?,
        compare: args.compare,
        ..ReplanSettings::default()
    };
    let priced = settings.change.as_ref().map(|p| p.model_to_serve(model));
    let served = priced.transpose()?;
    // Loading and preparing the set run on the threads the days get.
    let (set, prepared, started) = with_threads(args.threads, || -> anyhow::Result<_> {
        let set = args
            .serving
            .served(served.as_ref().unwrap_or(model), &args.input)?;
        let started = Instant::now();
        let prepared = set.prepare(&model.matrix)?;
        Ok((set, prepared, started))
    })??;
    #[cfg(feature = "mpi")]
    if let Some(ranks) = super::ranked::current() {
        let days = super::ranked::batch::block(days, ranks);
        let results = solve_days(&prepared, model, days, &settings, args.threads, &args.days)?;
        return super::ranked::batch::finish(args, (&set, model), &results, started, ranks);
    }
    let results = solve_days(&prepared, model, days, &settings, args.threads, &args.days)?;
    let wall = started.elapsed().as_secs_f64();
    report_failures(&results);
    let (names, units) = (&model.variable_names, &model.units);
    let records: Vec<DayRecord> = results
        .iter()
        .map(|r| DayRecord::of(r, names, units))
        .collect();
    let tally = Tally::of(&records);
    let code = tally.exit_code();
    let summary = RunSummary::new(tally, &set, args.threads.map(capped_threads), wall);
    let mut body = Vec::new();
    let own = units.own(names);
    batch::write_records(&mut body, args.layout(), &records, own, true)?;
    emit(args, &body, &summary)?;
    Ok(ExitCode::from(code))
}

/// Writes the rendered results to `--out` with the one atomic writer (the summary then to
/// stdout) or to stdout (the summary then to stderr).
pub(super) fn emit(args: &BatchArgs, body: &[u8], summary: &RunSummary) -> anyhow::Result<()> {
    match &args.out {
        Some(path) => {
            write_atomically(path, body)?;
            write_summary(&mut io::stdout().lock(), summary, args.json)?;
        }
        None => {
            let mut out = io::stdout().lock();
            out.write_all(body)?;
            out.flush()?;
            write_summary(&mut io::stderr().lock(), summary, args.json)?;
        }
    }
    Ok(())
}

/// Re-optimises every day with the prepared set on `threads` threads (Ctrl-C stops).
pub(super) fn solve_days(
    prepared: &Prepared,
    model: &Model,
    days: Vec<ParsedLine>,
    settings: &ReplanSettings,
    threads: Option<usize>,
    origin: &Path,
) -> anyhow::Result<Vec<DayResult>> {
    let origin = origin.display().to_string();
    let cancel = || interrupted().load(Ordering::Relaxed);
    with_threads(threads, || {
        replan(prepared, model, days, settings, &origin, &cancel)
    })
}

/// Each failed day's error on stderr.
pub(super) fn report_failures(results: &[DayResult]) {
    for error in results.iter().filter_map(failure) {
        eprintln!("kernstep: {error}");
    }
}

fn failure(result: &DayResult) -> Option<&kernstep::Error> {
    match &result.outcome {
        DayOutcome::Failed(e) => Some(e),
        _ => None,
    }
}

/// Writes the summary as JSON or as a table of labelled counts.
pub(super) fn write_summary(
    out: &mut impl Write,
    summary: &RunSummary,
    json: bool,
) -> anyhow::Result<()> {
    if json {
        writeln!(out, "{}", tagged::pretty(summary)?)?;
        return Ok(());
    }
    out.write_all(summary_text(summary).as_bytes())?;
    Ok(())
}
