//! `kernstep batch INPUT DAYS`: re-optimise every day of a scenario (or every variant of a
//! model) with one test set, prepared once, in parallel or chained.
//!
//! Results (one record per day, in input order) go to `--out` or stdout; the summary goes to
//! stdout when the results went to a file, else to stderr. Exit code: 2 if a line was bad or
//! a day failed, else 1 if a day was infeasible, unbounded, hit the step limit or was not
//! solved because of Ctrl-C, else 0.

use std::fs::File;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::atomic::Ordering;
use std::time::{Duration, Instant};

use anyhow::Context;
use clap::{Args, ValueEnum};
use kernstep::certify::{Answer, Limit, Proof};
use kernstep::model::Model;
use kernstep::scenario::{replan, DayOutcome, DayResult, PlanInput, ReplanSettings};
use kernstep::solve::{ParsedLine, Prepared, Verdict};
use serde::ser::{SerializeMap, Serializer};
use serde::{Deserialize, Serialize};

use kernstep::testset::{Served, Source};

use super::common::{
    capped_threads, graver_for, interrupted, with_threads, CacheArgs, EngineArg, CAUTION,
};
use super::days::read_days;
use super::limits::LimitArgs;
use super::table::write_pairs;

/// Arguments of `batch`.
#[derive(Debug, Args)]
pub struct BatchArgs {
    /// A scenario file, or a model file (.json, .toml or .mps).
    pub input: PathBuf,
    /// The days: JSON Lines of changes by name (or of numeric variants for a model file), or
    /// CSV rows `day,field,name,value` (.csv, scenarios only).
    pub days: PathBuf,
    /// Worker threads for the days (default: one per core).
    #[arg(long, value_name = "N")]
    pub threads: Option<usize>,
    /// Warm-start each day from the previous day's plan (the days then run one after another).
    #[arg(long)]
    pub chain: bool,
    /// Build the test set when the cache has none, instead of stopping.
    #[arg(long)]
    pub build: bool,
    #[command(flatten)]
    pub limits: LimitArgs,
    /// Which test set serves the days.
    #[arg(long, value_enum, default_value_t = EngineArg::Auto)]
    pub engine: EngineArg,
    /// Write the results to FILE instead of stdout (the summary then goes to stdout).
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Layout of the results.
    #[arg(long, value_enum, default_value_t = Format::Jsonl)]
    pub format: Format,
    #[command(flatten)]
    pub cache: CacheArgs,
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

/// Runs `batch`.
pub fn run(args: &BatchArgs) -> anyhow::Result<ExitCode> {
    // Install the Ctrl-C handler before any work, so that an early Ctrl-C is also clean.
    interrupted();
    let input = PlanInput::load(&args.input)?;
    let days = read_days(&input, &args.days)?;
    let model = input.model();
    let set = graver_for(
        model,
        &args.input,
        &args.cache,
        args.build,
        args.engine,
        &args.limits,
    )?;
    let started = Instant::now();
    let prepared = set.prepare(&model.matrix)?;
    #[cfg(feature = "mpi")]
    if let Some(ranks) = super::ranked::current() {
        let days = super::ranked::batch::block(days, ranks);
        let results = solve_days(&prepared, model, days, args.chain, args.threads, &args.days)?;
        let named = (&set, model.variable_names.as_slice());
        return super::ranked::batch::finish(args, named, &results, started, ranks);
    }
    let results = solve_days(&prepared, model, days, args.chain, args.threads, &args.days)?;
    let wall = started.elapsed();
    report_failures(&results);
    let tally = Tally::of(&results);
    let summary = Summary::new(&tally, &set, args.threads, wall);
    let mut body = Vec::new();
    write_results(&mut body, args.format, &results, &model.variable_names)?;
    emit(args, &body, &summary)?;
    Ok(tally.exit_code())
}

/// Writes the rendered results to `--out` (the summary then to stdout) or to stdout (the
/// summary then to stderr).
pub(super) fn emit(args: &BatchArgs, body: &[u8], summary: &Summary<'_>) -> anyhow::Result<()> {
    match &args.out {
        Some(path) => {
            let file =
                File::create(path).with_context(|| format!("creating {}", path.display()))?;
            let mut out = BufWriter::new(file);
            out.write_all(body)
                .and_then(|()| out.flush())
                .with_context(|| format!("writing {}", path.display()))?;
            summary.write(&mut io::stdout().lock(), args.json)?;
        }
        None => {
            let mut out = io::stdout().lock();
            out.write_all(body)?;
            out.flush()?;
            summary.write(&mut io::stderr().lock(), args.json)?;
        }
    }
    Ok(())
}

/// Re-optimises every day with the prepared set on `threads` threads (Ctrl-C stops).
pub(super) fn solve_days(
    prepared: &Prepared,
    model: &Model,
    days: Vec<ParsedLine>,
    chain: bool,
    threads: Option<usize>,
    origin: &Path,
) -> anyhow::Result<Vec<DayResult>> {
    let settings = ReplanSettings {
        chain,
        ..ReplanSettings::default()
    };
    let origin = origin.display().to_string();
    let cancel = || interrupted().load(Ordering::Relaxed);
    with_threads(threads, || {
        replan(prepared, model, days, &settings, &origin, &cancel)
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

/// How a day ended, as written in results and counted in the summary: the day's certified
/// answer ([`kernstep::certify::judge`]) in the words of the batch records.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum DayStatus {
    /// Proven optimal.
    Optimal,
    /// Optimal among the moves of a truncated set, not proven optimal.
    OptimalWithinNorm,
    /// Proven to have no plan.
    Infeasible,
    /// A partial set found no plan: nothing proven.
    Unknown,
    /// The cost falls without limit.
    Unbounded,
    /// The step limit stopped the solve.
    StepLimit,
    /// Ctrl-C stopped the solve, or came before it.
    Interrupted,
    /// The day's line was bad, or the solver refused it.
    Error,
}

impl DayStatus {
    /// The status of `result`.
    pub(super) fn of(result: &DayResult) -> DayStatus {
        match &result.outcome {
            DayOutcome::Solved(_) => match result.answer() {
                Some(Answer::Optimal { .. }) => DayStatus::Optimal,
                Some(Answer::Feasible { .. }) => DayStatus::OptimalWithinNorm,
                Some(Answer::Infeasible(_)) => DayStatus::Infeasible,
                Some(Answer::Unknown { .. }) => DayStatus::Unknown,
                Some(Answer::Unbounded(_)) => DayStatus::Unbounded,
                Some(Answer::Stopped(Limit::Steps)) => DayStatus::StepLimit,
                Some(Answer::Stopped(Limit::Cancelled)) | None => DayStatus::Interrupted,
            },
            DayOutcome::Failed(_) => DayStatus::Error,
            DayOutcome::NotRun => DayStatus::Interrupted,
        }
    }

    /// The word written for it.
    pub(super) fn word(self) -> &'static str {
        match self {
            DayStatus::Optimal => "optimal",
            DayStatus::OptimalWithinNorm => "optimal_within_norm",
            DayStatus::Infeasible => "infeasible",
            DayStatus::Unknown => "unknown",
            DayStatus::Unbounded => "unbounded",
            DayStatus::StepLimit => "step_limit",
            DayStatus::Interrupted => "interrupted",
            DayStatus::Error => "error",
        }
    }
}

/// The optimal (or best found) plan's cost and the plan, when the day has an answer.
pub(super) fn answer(result: &DayResult) -> Option<(i128, &[i64])> {
    match &result.outcome {
        DayOutcome::Solved(verdict) => verdict.optimum(),
        _ => None,
    }
}

/// The day's dual bound and gap as decimal strings, when it has one.
fn bound_and_gap(result: &DayResult) -> Option<(String, String)> {
    let (cost, _) = answer(result)?;
    let bound = result.bound.as_ref()?;
    Some((bound.ceiling().to_string(), bound.gap(cost).to_string()))
}

/// Augmenting steps over both phases.
pub(super) fn steps(result: &DayResult) -> Option<u64> {
    match &result.outcome {
        // No integer point reached (no integer solution, a network's cut): no step count.
        DayOutcome::Solved(v) => v.point().map(|_| {
            let (feasibility, cost) = v.steps();
            feasibility + cost
        }),
        _ => None,
    }
}

/// Why a day has no answer, in words.
fn detail(result: &DayResult) -> Option<String> {
    let answer = match &result.outcome {
        DayOutcome::Solved(_) => result.answer()?,
        DayOutcome::Failed(e) => return Some(e.to_string()),
        DayOutcome::NotRun => return Some("not solved: interrupted before this day".into()),
    };
    let network = matches!(&result.outcome, DayOutcome::Solved(Verdict::Flow(_)));
    Some(match answer {
        Answer::Optimal { .. } => return None,
        Answer::Feasible { norm, .. } => match answer.gap() {
            Some(gap) => format!(
                "no improving move of norm <= {norm}; the dual bound leaves a gap of {gap}"
            ),
            None => format!("no improving move of norm <= {norm}; no finite dual bound"),
        },
        Answer::Infeasible(Proof::NoIntegerSolution { .. }) => {
            "the day's numbers admit no integer solution of the rows".into()
        }
        Answer::Infeasible(Proof::EmptyRange { variable }) => {
            format!("variable {variable} has a lower bound above its upper bound")
        }
        Answer::Infeasible(Proof::NoLatticePointInBox { min_violation }) => format!(
            "no lattice point of this fibre lies in the box (minimum violation {min_violation})"
        ),
        Answer::Infeasible(Proof::Cut { weights }) => format!(
            "no plan meets the bounds: {} rows (a cut) ask for more than their lanes can carry",
            weights.iter().filter(|&&w| w != 0).count()
        ),
        Answer::Unknown { violation } => format!(
            "no feasible plan found (violation {violation}); the move set is incomplete, so this is not a proof of infeasibility"
        ),
        Answer::Unbounded(_) if network => "the cost falls without limit along a cycle".into(),
        Answer::Unbounded(ray) if ray.move_index.is_some() => {
            "the cost falls without limit along a move".into()
        }
        Answer::Unbounded(_) => "the cost falls without limit along a sum of moves".into(),
        Answer::Stopped(Limit::Steps) => "stopped at the step limit".into(),
        Answer::Stopped(Limit::Cancelled) => "interrupted during the solve".into(),
    })
}

/// The nonzero entries of a plan, by variable name, in model order.
struct Plan<'a> {
    names: &'a [String],
    x: &'a [i64],
}

impl Serialize for Plan<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let nonzero = self.names.iter().zip(self.x).filter(|(_, v)| **v != 0);
        let mut map = serializer.serialize_map(Some(nonzero.clone().count()))?;
        for (name, value) in nonzero {
            map.serialize_entry(name, value)?;
        }
        map.end()
    }
}

/// One JSON Lines result record.
#[derive(Serialize)]
struct Record<'a> {
    day: Option<&'a str>,
    line: usize,
    status: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    detail: Option<String>,
    objective: Option<i128>,
    /// The proven lower bound `ceil(L(y))` of a truncated set's plan.
    bound: Option<String>,
    /// `objective - bound`.
    gap: Option<String>,
    steps: Option<u64>,
    seconds: f64,
    plan: Option<Plan<'a>>,
}

/// Writes the results in `format`; a CSV starts with its header.
pub(super) fn write_results(
    out: &mut impl Write,
    format: Format,
    results: &[DayResult],
    names: &[String],
) -> anyhow::Result<()> {
    if format == Format::Csv {
        write_csv_header(out, names)?;
    }
    write_records(out, format, results, names)
}

/// Writes one record or CSV row per result, without a header.
pub(super) fn write_records(
    out: &mut impl Write,
    format: Format,
    results: &[DayResult],
    names: &[String],
) -> anyhow::Result<()> {
    match format {
        Format::Jsonl => {
            for r in results {
                let answer = answer(r);
                let (bound, gap) = bound_and_gap(r).unzip();
                let record = Record {
                    day: r.id.as_deref(),
                    line: r.line,
                    status: DayStatus::of(r).word(),
                    detail: detail(r),
                    objective: answer.map(|(o, _)| o),
                    bound,
                    gap,
                    steps: steps(r),
                    seconds: r.elapsed.as_secs_f64(),
                    plan: answer.map(|(_, x)| Plan { names, x }),
                };
                serde_json::to_writer(&mut *out, &record)?;
                writeln!(out)?;
            }
        }
        Format::Csv => write_csv(out, results, names)?,
    }
    Ok(())
}

/// The CSV header: the fixed columns, then one per variable.
pub(super) fn write_csv_header(out: &mut impl Write, names: &[String]) -> io::Result<()> {
    let mut header = [
        "day",
        "line",
        "status",
        "objective",
        "bound",
        "gap",
        "steps",
        "seconds",
        "detail",
    ]
    .map(String::from)
    .to_vec();
    header.extend(names.iter().cloned());
    writeln!(out, "{}", csv_row(&header))
}

fn write_csv(out: &mut impl Write, results: &[DayResult], names: &[String]) -> io::Result<()> {
    for r in results {
        let answer = answer(r);
        let (bound, gap) = bound_and_gap(r).unzip();
        let mut row = vec![
            r.id.clone().unwrap_or_default(),
            r.line.to_string(),
            DayStatus::of(r).word().to_string(),
            answer.map(|(o, _)| o.to_string()).unwrap_or_default(),
            bound.unwrap_or_default(),
            gap.unwrap_or_default(),
            steps(r).map(|s| s.to_string()).unwrap_or_default(),
            format!("{:.6}", r.elapsed.as_secs_f64()),
            detail(r).unwrap_or_default(),
        ];
        match answer {
            Some((_, x)) => row.extend(x.iter().map(i64::to_string)),
            None => row.extend(std::iter::repeat_n(String::new(), names.len())),
        }
        writeln!(out, "{}", csv_row(&row))?;
    }
    Ok(())
}

/// Cells joined by commas, quoted (RFC 4180) where they hold a comma, quote or line break.
fn csv_row(cells: &[String]) -> String {
    cells
        .iter()
        .map(|c| {
            if c.contains([',', '"', '\n', '\r']) {
                format!("\"{}\"", c.replace('"', "\"\""))
            } else {
                c.clone()
            }
        })
        .collect::<Vec<_>>()
        .join(",")
}

/// Counts of the days by status, with the total cost of the answered days.
#[derive(Debug, Default, Serialize, Deserialize)]
pub(super) struct Tally {
    /// Days in the input.
    pub days: usize,
    /// Proven optimal.
    pub optimal: usize,
    /// Of the optimal days, those proven by a dual bound (a truncated set's plan).
    pub optimal_by_bound: usize,
    /// Optimal among the moves of a truncated set.
    pub optimal_within_norm: usize,
    /// The largest gap left by a dual bound, over the days optimal within the norm that have
    /// one.
    pub largest_gap: Option<String>,
    /// Proven to have no plan.
    pub infeasible: usize,
    /// No plan found with a partial set: nothing proven.
    pub unknown: usize,
    /// Cost without limit.
    pub unbounded: usize,
    /// Stopped by the step limit.
    pub step_limit: usize,
    /// Not solved because of Ctrl-C.
    pub interrupted: usize,
    /// Bad lines and refused days.
    pub errors: usize,
    /// Sum of the answered days' costs.
    pub total_objective: i128,
    /// Sum of the days' solve times, in seconds.
    pub solve_seconds: f64,
}

impl Tally {
    /// Counts `results`.
    pub(super) fn of(results: &[DayResult]) -> Tally {
        let mut t = Tally {
            days: results.len(),
            ..Tally::default()
        };
        let mut widest = None;
        for r in results {
            let status = DayStatus::of(r);
            let slot = match status {
                DayStatus::Optimal => &mut t.optimal,
                DayStatus::OptimalWithinNorm => &mut t.optimal_within_norm,
                DayStatus::Infeasible => &mut t.infeasible,
                DayStatus::Unknown => &mut t.unknown,
                DayStatus::Unbounded => &mut t.unbounded,
                DayStatus::StepLimit => &mut t.step_limit,
                DayStatus::Interrupted => &mut t.interrupted,
                DayStatus::Error => &mut t.errors,
            };
            *slot += 1;
            if r.bound.is_some() && status == DayStatus::Optimal {
                t.optimal_by_bound += 1;
            }
            if let Some(gap) = answer(r).zip(r.bound.as_ref()).map(|((o, _), b)| b.gap(o)) {
                widest = widest.max(Some(gap));
            }
            t.total_objective = t
                .total_objective
                .saturating_add(answer(r).map_or(0, |(o, _)| o));
            t.solve_seconds += r.elapsed.as_secs_f64();
        }
        t.largest_gap = widest.map(|g| g.to_string());
        t
    }

    /// Adds the counts of `other` (another rank's days).
    #[cfg(feature = "mpi")]
    pub(super) fn absorb(&mut self, other: Tally) {
        self.days += other.days;
        self.optimal += other.optimal;
        self.optimal_by_bound += other.optimal_by_bound;
        self.optimal_within_norm += other.optimal_within_norm;
        self.infeasible += other.infeasible;
        self.unknown += other.unknown;
        self.unbounded += other.unbounded;
        self.step_limit += other.step_limit;
        self.interrupted += other.interrupted;
        self.errors += other.errors;
        self.total_objective = self.total_objective.saturating_add(other.total_objective);
        self.solve_seconds += other.solve_seconds;
        let gap = |g: &Option<String>| {
            g.as_deref()
                .and_then(|g| g.parse::<num_bigint::BigInt>().ok())
        };
        if gap(&other.largest_gap) > gap(&self.largest_gap) {
            self.largest_gap = other.largest_gap;
        }
    }

    /// 2 for any error, else 1 for any day without a proven answer, else 0.
    pub(super) fn exit_code(&self) -> ExitCode {
        if self.errors > 0 {
            ExitCode::from(2)
        } else if self.infeasible
            + self.unknown
            + self.unbounded
            + self.step_limit
            + self.interrupted
            > 0
        {
            ExitCode::from(1)
        } else {
            ExitCode::SUCCESS
        }
    }
}

/// The summary of a run.
#[derive(Serialize)]
pub(super) struct Summary<'a> {
    #[serde(flatten)]
    tally: &'a Tally,
    wall_seconds: f64,
    threads: Option<usize>,
    moves: usize,
    set: String,
    caution: &'static str,
}

impl<'a> Summary<'a> {
    pub(super) fn new(
        tally: &'a Tally,
        set: &Served,
        threads: Option<usize>,
        wall: Duration,
    ) -> Self {
        Summary {
            tally,
            wall_seconds: wall.as_secs_f64(),
            threads: threads.map(capped_threads),
            moves: set.set.elements.len(),
            set: match &set.source {
                Source::Cached(digest) => format!("cached {}", &digest[..digest.len().min(12)]),
                Source::Built => "built for this run".to_string(),
                Source::Network => "network".to_string(),
            },
            caution: CAUTION,
        }
    }

    fn write(&self, out: &mut impl Write, json: bool) -> anyhow::Result<()> {
        if json {
            writeln!(out, "{}", serde_json::to_string_pretty(self)?)?;
            return Ok(());
        }
        let t = self.tally;
        let mut rows = vec![("days".to_string(), t.days.to_string())];
        let counts = [
            ("optimal", t.optimal),
            ("  of which by dual bound", t.optimal_by_bound),
            ("optimal within norm", t.optimal_within_norm),
            ("infeasible", t.infeasible),
            ("unknown (partial set, no plan found)", t.unknown),
            ("unbounded", t.unbounded),
            ("step limit", t.step_limit),
            ("not solved (Ctrl-C)", t.interrupted),
            ("bad lines or errors", t.errors),
        ];
        rows.extend(
            counts
                .iter()
                .filter(|(label, n)| *n > 0 || *label == "optimal")
                .map(|(label, n)| (label.to_string(), n.to_string())),
        );
        if let Some(gap) = &t.largest_gap {
            rows.push(("largest bound gap".into(), gap.clone()));
        }
        rows.push(("total objective".into(), t.total_objective.to_string()));
        rows.push(("solve time".into(), format!("{:.3} s", t.solve_seconds)));
        rows.push(("wall time".into(), format!("{:.3} s", self.wall_seconds)));
        rows.push((
            "test set".into(),
            match self.set.as_str() {
                "network" => "the cycles of the network (implicit: nothing enumerated)".into(),
                _ => format!("{} moves, {}", self.moves, self.set),
            },
        ));
        write_pairs(out, &rows)?;
        writeln!(out, "caution: {}", self.caution)?;
        Ok(())
    }
}
