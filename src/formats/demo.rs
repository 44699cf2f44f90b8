//! The demo's report: the scenario and its set, one row per day, the tally, and where the
//! highlighted day's trace went; written as a table or as JSON, and read back from JSON.
//!
//! Which day is highlighted is decided here too ([`highlight`]): the optimal day that took the
//! most steps, the earliest among equals.

use std::io::{self, Write};
use std::path::PathBuf;

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::batch::{DayRecord, DayStatus, Tally};
use crate::error::{Error, Result};
use crate::text::{cell, table};
use crate::trace::Decimal;

/// One row of the table of days.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct DemoDay {
    /// The day's id, or `line N` for a day without one.
    pub day: String,
    /// How the day ended, in its record's word.
    pub status: String,
    /// The plan's cost, when there is a plan (a decimal string).
    pub objective: Option<Decimal>,
    /// Augmenting steps taken.
    pub steps: Option<u64>,
    /// Solve time in milliseconds.
    pub ms: f64,
}

impl DemoDay {
    /// The row of a day's record.
    pub fn of(r: &DayRecord) -> DemoDay {
        DemoDay {
            day: r
                .day
                .as_deref()
                .map_or_else(|| format!("line {}", r.line), String::from),
            status: r.status.word().into(),
            objective: r.objective,
            steps: r.steps,
            ms: r.seconds * 1000.0,
        }
    }
}

/// Where the highlighted day's step trace (JSON) and plot (SVG) were written.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TraceFiles {
    /// The replayable trace document.
    pub json: PathBuf,
    /// The step plot.
    pub svg: PathBuf,
}

/// What the demo reports.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct DemoReport {
    /// The scenario's title.
    pub scenario: String,
    /// Variables of the compiled model.
    pub variables: usize,
    /// Constraints of the compiled model.
    pub rows: usize,
    /// Moves of the test set.
    pub moves: usize,
    /// Where the set came from.
    pub set: String,
    /// Time to obtain the set.
    pub set_seconds: f64,
    /// One row per day.
    pub days: Vec<DemoDay>,
    /// The days counted by status.
    pub tally: Tally,
    /// The highlighted day's files, when a day was highlighted.
    pub trace: Option<TraceFiles>,
    /// What the plans do not check.
    pub caution: String,
}

impl DemoReport {
    /// Writes the report as a table of days with a summary.
    pub fn write(&self, out: &mut impl Write) -> io::Result<()> {
        writeln!(
            out,
            "{}: {} variables, {} rows; test set of {} moves {} in {:.2} s",
            self.scenario, self.variables, self.rows, self.moves, self.set, self.set_seconds
        )?;
        writeln!(out)?;
        let rows: Vec<Vec<String>> = self
            .days
            .iter()
            .map(|d| {
                let ms = format!("{:.2}", d.ms);
                vec![
                    d.day.clone(),
                    d.status.clone(),
                    cell(d.objective),
                    cell(d.steps),
                    ms,
                ]
            })
            .collect();
        let head = ["day", "status", "objective", "steps", "ms"];
        out.write_all(table(&head, &rows).as_bytes())?;
        let t = &self.tally;
        writeln!(out)?;
        writeln!(
            out,
            "total: {} days, {} optimal, {} infeasible; total objective {}; solve time {:.1} ms",
            t.days,
            t.optimal,
            t.infeasible,
            t.total_objective,
            t.solve_seconds * 1000.0
        )?;
        writeln!(out, "caution: {}", self.caution)?;
        if let Some(files) = &self.trace {
            writeln!(out, "steps of the longest day: {}", files.svg.display())?;
            writeln!(out, "replayable trace: {}", files.json.display())?;
        }
        Ok(())
    }

    /// Reads a report written as JSON; `origin` names the source in errors.
    pub fn read(text: &str, origin: &str) -> Result<DemoReport> {
        serde_json::from_str(text).map_err(|e| Error::Input {
            file: origin.to_string(),
            field: format!("line {}, column {}", e.line(), e.column()),
            message: format!("not a demo report: {e}"),
        })
    }
}

/// The day to highlight: the optimal one that took the most steps (the earliest among
/// equals), if any day is optimal.
pub fn highlight(records: &[DayRecord]) -> Option<usize> {
    records
        .iter()
        .enumerate()
        .filter(|(_, r)| r.status == DayStatus::Optimal)
        .max_by_key(|(i, r)| (r.steps.unwrap_or(0), std::cmp::Reverse(*i)))
        .map(|(i, _)| i)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::formats::CAUTION;

    fn report() -> DemoReport {
        DemoReport {
            scenario: "Tarn depots".into(),
            variables: 6,
            rows: 5,
            moves: 42,
            set: "from the cache".into(),
            set_seconds: 0.25,
            days: vec![DemoDay {
                day: "d001".into(),
                status: DayStatus::Optimal.word().into(),
                objective: Some(Decimal::from(
                    -170_141_183_460_469_231_731_687_303_715_884_105_727,
                )),
                steps: Some(3),
                ms: 0.5,
            }],
            tally: Tally::default(),
            trace: Some(TraceFiles {
                json: "/tmp/d001.trace.json".into(),
                svg: "/tmp/d001.svg".into(),
            }),
            caution: CAUTION.into(),
        }
    }

    #[test]
    fn report_reads_back_what_it_wrote() {
        let written = report();
        let text = serde_json::to_string_pretty(&written).unwrap();
        assert_eq!(DemoReport::read(&text, "report.json").unwrap(), written);
        let err = DemoReport::read("{\"scenario\": 1}", "report.json").unwrap_err();
        assert!(err.to_string().contains("report.json"), "{err}");
    }

    #[test]
    fn table_names_the_day_and_the_caution() {
        let mut out = Vec::new();
        report().write(&mut out).unwrap();
        let text = String::from_utf8(out).unwrap();
        assert!(text.contains("d001") && text.contains("optimal"), "{text}");
        assert!(text.contains(CAUTION), "{text}");
        assert!(
            text.contains("replayable trace: /tmp/d001.trace.json"),
            "{text}"
        );
    }
}
