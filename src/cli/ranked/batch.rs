//! `mpirun -np N kernstep batch INPUT DAYS ...`: the days shared by the ranks.
//!
//! Each rank has loaded the input, the days and the set (from the shared cache) and solves
//! one contiguous block of the days, so that the blocks in rank order are the days in input
//! order; rank 0 writes every result and the summary. With `--chain`, each rank chains its
//! own block (its first day starts cold).

use std::process::ExitCode;
use std::time::Instant;

use kernstep::formats::batch::{write_records, DayRecord, RunSummary, Tally};
use kernstep::model::Model;
use kernstep::scenario::DayResult;
use kernstep::solve::ParsedLine;
use kernstep::testset::Served;

use super::Ranks;
use crate::cli::batch::{emit, report_failures, BatchArgs};
use crate::cli::common::capped_threads;

/// This rank's block of `days`: `[r n / N, (r + 1) n / N)`.
pub fn block(days: Vec<ParsedLine>, ranks: Ranks) -> Vec<ParsedLine> {
    let n = days.len();
    let (from, to) = (
        ranks.rank * n / ranks.size,
        (ranks.rank + 1) * n / ranks.size,
    );
    days.into_iter().skip(from).take(to - from).collect()
}

/// Gathers every rank's results on rank 0, which writes them in input order with the summary
/// of all days; every rank returns the exit code of all days.
pub fn finish(
    args: &BatchArgs,
    (set, model): (&Served, &Model),
    results: &[DayResult],
    started: Instant,
    ranks: Ranks,
) -> anyhow::Result<ExitCode> {
    report_failures(results);
    let (names, units) = (&model.variable_names, &model.units);
    let records: Vec<DayRecord> = results
        .iter()
        .map(|r| DayRecord::of(r, names, units))
        .collect();
    let mut body = Vec::new();
    let first = ranks.rank == 0;
    write_records(&mut body, args.layout(), &records, units.own(names), first)?;
    let gathered = ranks.gather_bytes(&body)?;
    let mine = serde_json::to_string(&Tally::of(&records))?;
    let mut tally = Tally::default();
    for text in ranks.all_gather_text(&mine)? {
        tally.absorb(serde_json::from_str(&text)?);
    }
    let code = tally.exit_code();
    if let Some(all) = gathered {
        let wall = started.elapsed().as_secs_f64();
        let summary = RunSummary::new(tally, set, args.threads.map(capped_threads), wall);
        emit(args, &all, &summary)?;
    }
    Ok(ExitCode::from(code))
}
