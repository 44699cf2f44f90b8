//! `kernstep demo`: the whole job on an invented scenario built into the binary: obtain the
//! test set (cache, or build), re-optimise every day, print the table of days and the total,
//! and write the step trace and plot of the day that took the most steps.

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::Instant;

use anyhow::Context;
use clap::Args;
use kernstep::formats::batch::{DayRecord, Tally};
use kernstep::formats::demo::{highlight, DemoDay, DemoReport, TraceFiles};
use kernstep::formats::tagged;
use kernstep::model::{Model, ModelKind};
use kernstep::scenario::{parse_day_lines, DayResult, ReplanSettings, Scenario};
use kernstep::solve::Prepared;
use kernstep::trace::step_plot;

use kernstep::testset::Served;

use super::batch::solve_days;
use super::common::{
    graver_for, graver_uncached, interrupted, render_chain, write_atomically, CacheArgs, EngineArg,
    CAUTION,
};
use super::limits::{BuildStopped, LimitArgs};

/// Where the embedded scenario lives in the source tree (for messages).
const SCENARIO_PATH: &str = "examples/scenarios/vell_valley.toml";
/// Where the embedded days live in the source tree (for messages).
const DAYS_PATH: &str = "examples/scenarios/vell_valley_days.jsonl";
/// The embedded scenario.
const SCENARIO: &str = include_str!("../../examples/scenarios/vell_valley.toml");
/// The embedded days.
const DAYS: &str = include_str!("../../examples/scenarios/vell_valley_days.jsonl");

/// Arguments of `demo`.
#[derive(Debug, Args)]
pub struct DemoArgs {
    #[command(flatten)]
    pub cache: CacheArgs,
    #[command(flatten)]
    pub limits: LimitArgs,
    /// Run the first N of the 30 demo days.
    #[arg(long, value_name = "N", default_value_t = 30,
          value_parser = clap::value_parser!(u16).range(1..=30))]
    pub days: u16,
    /// Directory for the trace (JSON) and plot (SVG) of the highlighted day (default: a
    /// `kernstep-demo` directory in the system's temporary directory).
    #[arg(long, value_name = "DIR")]
    pub trace_dir: Option<PathBuf>,
    /// Print the days and totals as one JSON document.
    #[arg(long)]
    pub json: bool,
}

/// Runs `demo`; exit code 0 when every day was solved (the demo includes an infeasible day on
/// purpose), 1 when Ctrl-C cut it short, 2 on any error.
pub fn run(args: &DemoArgs) -> anyhow::Result<ExitCode> {
    let scenario = Scenario::from_str(SCENARIO, ModelKind::Toml, SCENARIO_PATH)?;
    let model = scenario.compile()?;
    let mut days = parse_day_lines(&scenario, DAYS, DAYS_PATH);
    days.truncate(usize::from(args.days));
    let started = Instant::now();
    let set = obtain_set(&model, &args.cache, &args.limits)?;
    let set_seconds = started.elapsed().as_secs_f64();
    let prepared = set.prepare(&model.matrix)?;
    let results = solve_days(
        &prepared,
        &model,
        days,
        &ReplanSettings::default(),
        None,
        Path::new(DAYS_PATH),
    )?;
    let records: Vec<DayRecord> = results
        .iter()
        .map(|r| DayRecord::of(r, &model.variable_names, &model.units))
        .collect();
    let tally = Tally::of(&records);
    let highlight = highlight(&records);
    let trace_files = match highlight {
        Some(index) => Some(write_highlight(
            &scenario,
            &prepared,
            &results[index],
            args,
        )?),
        None => None,
    };
    let mut out = io::stdout().lock();
    let report = DemoReport {
        scenario: scenario.title.as_deref().unwrap_or(SCENARIO_PATH).into(),
        variables: model.variables(),
        rows: model.constraints(),
        moves: set.moves.len(),
        set: set.source.to_string(),
        set_seconds,
        days: records.iter().map(DemoDay::of).collect(),
        trace: trace_files.map(|(json, svg)| TraceFiles { json, svg }),
        caution: CAUTION.into(),
        tally,
    };
    if args.json {
        writeln!(out, "{}", tagged::pretty(&report)?)?;
    } else {
        report.write(&mut out)?;
    }
    out.flush()?;
    Ok(if report.tally.errors > 0 {
        ExitCode::from(2)
    } else if report.tally.interrupted > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

/// The Graver basis from the cache or built (and stored) within `limits`; built in memory
/// when the cache cannot be used at all. A build that a limit stopped is not tried again.
fn obtain_set(model: &Model, cache: &CacheArgs, limits: &LimitArgs) -> anyhow::Result<Served> {
    let input = Path::new(SCENARIO_PATH);
    match graver_for(model, input, cache, true, EngineArg::Auto, limits) {
        Ok(set) => Ok(set),
        Err(e) if e.downcast_ref::<BuildStopped>().is_some() => Err(e),
        Err(e) => {
            eprintln!(
                "kernstep: warning: {}; building the test set in memory",
                render_chain(&e)
            );
            graver_uncached(model, input, cache, limits)
        }
    }
}

/// Solves the highlighted day again with the trace on and writes the trace document and
/// the step plot; returns their paths.
fn write_highlight(
    scenario: &Scenario,
    prepared: &Prepared,
    result: &DayResult,
    args: &DemoArgs,
) -> anyhow::Result<(PathBuf, PathBuf)> {
    let day = result.id.clone().unwrap_or_default();
    let variant = parse_day_lines(scenario, DAYS, DAYS_PATH)
        .into_iter()
        .find(|(line, _)| *line == result.line)
        .map(|(_, v)| v)
        .context("the highlighted day is no longer in the demo days")??;
    let model = variant.apply(&scenario.compile()?, DAYS_PATH)?;
    let cancel = || interrupted().load(std::sync::atomic::Ordering::Relaxed);
    let doc = kernstep::trace::record(
        prepared,
        &model,
        &augment::Options::default(),
        None,
        &cancel,
    )?;
    let dir = args
        .trace_dir
        .clone()
        .unwrap_or_else(|| std::env::temp_dir().join("kernstep-demo"));
    std::fs::create_dir_all(&dir).with_context(|| format!("creating {}", dir.display()))?;
    let json = dir.join(format!("{day}.trace.json"));
    let svg = dir.join(format!("{day}.svg"));
    write_atomically(&json, tagged::pretty(&doc)?.as_bytes())?;
    let title = format!(
        "{}: {day}, {} steps",
        scenario.title.as_deref().unwrap_or("demo"),
        doc.steps.len()
    );
    write_atomically(&svg, step_plot(&doc, &title)?.as_bytes())?;
    Ok((json, svg))
}
