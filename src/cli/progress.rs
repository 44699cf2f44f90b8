//! Progress of a build on stderr: a bar on a terminal, otherwise one line at most every
//! [`LINE_EVERY`] (logs, cron, CI), or JSON lines for programs that watch the build.

use std::io::{self, IsTerminal, Write};
use std::path::Path;
use std::sync::Mutex;
use std::time::{Duration, Instant};

use clap::ValueEnum;
use indicatif::{ProgressBar, ProgressStyle};
use kernstep::completion::Progress;
use kernstep::testset::{extrapolate, StageMark};
use serde::Serialize;

/// Longest silence of a build whose stderr is not a terminal.
pub const LINE_EVERY: Duration = Duration::from_secs(30);

/// `--progress`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ProgressArg {
    /// A bar on a terminal, lines otherwise.
    Auto,
    /// A bar (drawn only on a terminal).
    Bar,
    /// One line at most every 30 s.
    Lines,
    /// One JSON object per line at most every 30 s (schema `kernstep.progress/1`).
    Json,
    /// Nothing.
    None,
}

/// One progress record of `--progress json`.
#[derive(Serialize)]
struct ProgressLine<'a> {
    schema: &'static str,
    model: &'a str,
    stage: usize,
    stages: usize,
    norm_level: u64,
    moves: usize,
    moves_per_second: f64,
    elapsed_seconds: f64,
    /// Seconds left, extrapolated from the stages finished (absent until two have grown).
    #[serde(skip_serializing_if = "Option::is_none")]
    eta_seconds: Option<f64>,
}

/// The reporter of one model's build.
pub struct BuildProgress {
    mode: ProgressArg,
    model: String,
    bar: ProgressBar,
    /// When the last line was written (none yet: `None`).
    last_line: Mutex<Option<Instant>>,
    /// The stages seen to end, for the time left.
    stages: Mutex<Stages>,
}

/// The ends of stages seen in the reports: the last report of each stage.
#[derive(Default)]
struct Stages {
    marks: Vec<StageMark>,
    current: Option<StageMark>,
}

impl Stages {
    /// Takes a report; returns the seconds left, extrapolated as `analyze --estimate` does.
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

impl BuildProgress {
    /// A reporter for the build of `path` in `mode` (`Auto` resolved against stderr).
    pub fn new(mode: ProgressArg, path: &Path) -> Self {
        let terminal = io::stderr().is_terminal();
        let mode = match mode {
            ProgressArg::Auto if terminal => ProgressArg::Bar,
            ProgressArg::Auto => ProgressArg::Lines,
            ProgressArg::Bar if !terminal => ProgressArg::None,
            other => other,
        };
        let model = path.display().to_string();
        let bar = if mode == ProgressArg::Bar {
            let bar = ProgressBar::new_spinner().with_prefix(model.clone());
            bar.set_style(
                ProgressStyle::with_template("{spinner} {prefix}: {msg} [{elapsed}]")
                    .unwrap_or_else(|_| ProgressStyle::default_spinner()),
            );
            bar.enable_steady_tick(Duration::from_millis(200));
            bar
        } else {
            ProgressBar::hidden()
        };
        Self {
            mode,
            model,
            bar,
            last_line: Mutex::new(None),
            stages: Mutex::new(Stages::default()),
        }
    }

    /// Shows a snapshot of the running completion.
    pub fn report(&self, p: &Progress) {
        let seconds = p.elapsed.as_secs_f64();
        let rate = if seconds > 0.0 {
            p.elements as f64 / seconds
        } else {
            0.0
        };
        let eta = self.stages.lock().ok().and_then(|mut s| s.eta(p));
        let left = eta.map_or(String::new(), |s| {
            format!(", about {} left", duration_text(s))
        });
        let text = format!(
            "stage {}/{}, norm level {}, {} moves, {:.0} moves/s{left}",
            p.stage, p.stages, p.level, p.elements, rate
        );
        match self.mode {
            ProgressArg::Bar => self.bar.set_message(text),
            ProgressArg::Lines => {
                if self.line_due() {
                    self.line(&format!("{text}, {:.0} s", seconds));
                }
            }
            ProgressArg::Json => {
                if self.line_due() {
                    let record = ProgressLine {
                        schema: "kernstep.progress/1",
                        model: &self.model,
                        stage: p.stage,
                        stages: p.stages,
                        norm_level: p.level,
                        moves: p.elements,
                        moves_per_second: rate,
                        elapsed_seconds: seconds,
                        eta_seconds: eta,
                    };
                    if let Ok(json) = serde_json::to_string(&record) {
                        self.write(&json);
                    }
                }
            }
            ProgressArg::Auto | ProgressArg::None => {}
        }
    }

    /// Removes the bar.
    pub fn finish(&self) {
        self.bar.finish_and_clear();
    }

    /// Whether a line is due (the first one always is), taking the slot if so.
    fn line_due(&self) -> bool {
        let Ok(mut last) = self.last_line.lock() else {
            return false;
        };
        let due = last.is_none_or(|at| at.elapsed() >= LINE_EVERY);
        if due {
            *last = Some(Instant::now());
        }
        due
    }

    fn line(&self, text: &str) {
        self.write(&format!("kernstep: {}: {text}", self.model));
    }

    fn write(&self, line: &str) {
        // Progress is best effort: a closed stderr must not stop the build.
        let _ = writeln!(io::stderr().lock(), "{line}");
    }
}

/// Seconds as the largest one or two units (`45 s`, `12 min`, `3 h 20 min`).
fn duration_text(seconds: f64) -> String {
    let s = seconds.round() as u64;
    match s {
        0..=119 => format!("{s} s"),
        120..=7199 => format!("{} min", s / 60),
        _ => format!("{} h {} min", s / 3600, s % 3600 / 60),
    }
}

#[cfg(test)]
mod tests {
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
        let mut stages = Stages::default();
        // Stage ends (each a stage's last report): 100, 300 and 600 moves (members / 2).
        assert_eq!(stages.eta(&report(5, 200, 1.0)), None);
        assert_eq!(stages.eta(&report(6, 600, 2.0)), None);
        // Stage 6 grew: a first guess (the default decay of the growth).
        assert!(stages.eta(&report(7, 1200, 6.0)).is_some());
        let left = stages
            .eta(&report(8, 1300, 7.0))
            .expect("two growing stages ended");
        // Stage 7 took 4 s; stages 8 and 9 grow by 1/2 and 1/4 (the growth halves) with a
        // quadratic time: 4 * 1.5^2 = 9 s and 9 * 1.25^2 = 14.06 s after second 6, so
        // 22.06 s are left at second 7 (by hand).
        assert!((left - (6.0 + 9.0 + 14.0625 - 7.0)).abs() < 1e-6, "{left}");
        assert_eq!(duration_text(75.0), "75 s");
        assert_eq!(duration_text(725.0), "12 min");
        assert_eq!(duration_text(12_000.0), "3 h 20 min");
    }
}
