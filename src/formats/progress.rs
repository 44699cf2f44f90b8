//! Progress of a running build for programs that watch it: one record per report (schema
//! [`PROGRESS_SCHEMA`]), with the time left extrapolated from the stages finished as the
//! build estimate does ([`crate::testset::extrapolate`]).

use std::sync::Mutex;
use std::time::{Duration, Instant};

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::completion::Progress;
use crate::testset::{extrapolate, StageMark};

/// The `schema` value of progress records.
pub const PROGRESS_SCHEMA: &str = "kernstep.progress/2";

/// One snapshot of a running build.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct ProgressRecord {
    /// Always [`PROGRESS_SCHEMA`].
    pub schema: String,
    /// The model being built.
    pub model: String,
    /// The stage being worked on.
    pub stage: usize,
    /// Number of stages.
    pub stages: usize,
    /// The norm level reached inside the stage.
    pub norm_level: u64,
    /// Moves in the working set.
    pub moves: usize,
    /// The most moves the working set has held so far (at the end of a norm level, where it
    /// is largest): with the process's peak memory, the bytes per working move.
    pub peak_moves: usize,
    /// Moves per second of build time so far.
    pub moves_per_second: f64,
    /// Seconds since the build started.
    pub elapsed_seconds: f64,
    /// Seconds left, extrapolated from the stages finished (absent until two have grown).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub eta_seconds: Option<f64>,
}

/// Turns a build's progress reports into records, remembering the stages seen to end, and
/// spaces out the records that a log (rather than a live display) shows.
#[derive(Debug, Default)]
pub struct ProgressWatch {
    stages: Mutex<Stages>,
    /// When [`ProgressWatch::due`] last said yes.
    last_shown: Mutex<Option<Instant>>,
}

/// The ends of stages seen in the reports: the last report of each stage.
#[derive(Debug, Default)]
struct Stages {
    marks: Vec<StageMark>,
    current: Option<StageMark>,
    /// The most members reported.
    peak: usize,
}

impl ProgressWatch {
    /// Whether a record is due in a log that shows at most one per `every`: the first one
    /// always is; a yes starts the next interval.
    pub fn due(&self, every: Duration) -> bool {
        let Ok(mut last) = self.last_shown.lock() else {
            return false;
        };
        let due = last.is_none_or(|at| at.elapsed() >= every);
        if due {
            *last = Some(Instant::now());
        }
        due
    }

    /// The record of report `p` of the build of `model`.
    pub fn record(&self, model: &str, p: &Progress) -> ProgressRecord {
        let seconds = p.elapsed.as_secs_f64();
        ProgressRecord {
            schema: PROGRESS_SCHEMA.to_string(),
            model: model.to_string(),
            stage: p.stage,
            stages: p.stages,
            norm_level: p.level,
            moves: p.elements,
            peak_moves: self.stages.lock().map_or(p.elements, |mut s| {
                s.peak = s.peak.max(p.elements);
                s.peak
            }),
            moves_per_second: if seconds > 0.0 {
                p.elements as f64 / seconds
            } else {
                0.0
            },
            elapsed_seconds: seconds,
            eta_seconds: self.stages.lock().ok().and_then(|mut s| s.eta(p)),
        }
    }
}

impl Stages {
    /// Takes a report; returns the seconds left.
    fn eta(&mut self, p: &Progress) -> Option<f64> {
        let seconds = p.elapsed.as_secs_f64();
        if let Some(current) = self.current.filter(|c| c.stage != p.stage) {
            self.marks.push(current);
        }
        self.current = Some(StageMark {
            stage: p.stage,
            // Members count both signs of a move.
            elements: p.elements / 2,
            seconds,
        });
        let (_, total) = extrapolate(&self.marks, p.stages.saturating_sub(1), seconds)?;
        Some((total.value - seconds).max(0.0))
    }
}

#[cfg(test)]
mod tests {
    use std::time::Duration;

    use super::*;

    fn report(stage: usize, members: usize, seconds: f64) -> Progress {
        Progress {
            stage,
            stages: 10,
            level: 4,
            elements: members,
            elapsed: Duration::from_secs_f64(seconds),
        }
    }

    #[test]
    fn the_time_left_comes_once_stages_have_grown() {
        let watch = ProgressWatch::default();
        let eta = |stage, members, seconds| watch.record("m", &report(stage, members, seconds));
        // Stage ends (each a stage's last report): 100, 300 and 600 moves (members / 2).
        assert_eq!(eta(5, 200, 1.0).eta_seconds, None);
        assert_eq!(eta(6, 600, 2.0).eta_seconds, None);
        // Stage 6 grew: a first guess (the default decay of the growth).
        assert!(eta(7, 1200, 6.0).eta_seconds.is_some());
        let record = eta(8, 1300, 7.0);
        let left = record.eta_seconds.expect("two growing stages ended");
        // Stage 7 took 4 s; stages 8 and 9 grow by 1/2 and 1/4 (the growth halves) with a
        // quadratic time: 4 * 1.5^2 = 9 s and 9 * 1.25^2 = 14.06 s after second 6, so
        // 22.06 s are left at second 7 (by hand).
        assert!((left - (6.0 + 9.0 + 14.0625 - 7.0)).abs() < 1e-6, "{left}");
        let text = serde_json::to_string(&record).unwrap();
        assert_eq!(
            serde_json::from_str::<ProgressRecord>(&text).unwrap(),
            record
        );
        assert!(
            text.starts_with(r#"{"schema":"kernstep.progress/2","model":"m""#),
            "{text}"
        );
    }

    /// The peak is the largest working set reported so far, whatever came after it (a stage's
    /// minimal pass shrinks the set).
    #[test]
    fn the_peak_is_the_most_moves_reported() {
        let watch = ProgressWatch::default();
        let peak = |stage, members| watch.record("m", &report(stage, members, 1.0)).peak_moves;
        assert_eq!(peak(1, 200), 200);
        assert_eq!(peak(1, 900), 900);
        assert_eq!(peak(2, 400), 900);
        assert_eq!(peak(2, 1000), 1000);
    }
}
