//! Progress of a build on stderr: a bar on a terminal, otherwise one line at most every
//! [`LINE_EVERY`] (logs, cron, CI), or JSON lines for programs that watch the build.

use std::io::{self, IsTerminal, Write};
use std::path::Path;
use std::sync::Mutex;
use std::time::Duration;

use clap::ValueEnum;
use indicatif::{ProgressBar, ProgressStyle};
use kernstep::completion::Progress;
use kernstep::formats::progress::{ProgressRecord, ProgressWatch};
use kernstep::text::progress_text;

/// Longest silence of a build whose stderr is not a terminal.
pub const LINE_EVERY: Duration = Duration::from_secs(30);

/// `--progress`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ProgressArg {
    /// A bar on a terminal, lines otherwise.
    Auto,
    /// A bar (drawn only on a terminal).
    Bar,
    /// One line at most every 30 s, and the last one at the end.
    Lines,
    /// One JSON object per line at most every 30 s, and the last one at the end (schema
    /// `kernstep.progress/2`).
    Json,
    /// Nothing.
    None,
}

/// The reporter of one model's build.
pub struct BuildProgress {
    mode: ProgressArg,
    model: String,
    bar: ProgressBar,
    /// The stages seen to end, for the time left.
    watch: ProgressWatch,
    /// The last record, when a log has not shown it (written at the end, so that a log ends
    /// with the build's last state and its peak).
    unshown: Mutex<Option<ProgressRecord>>,
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
            watch: ProgressWatch::default(),
            unshown: Mutex::new(None),
        }
    }

    /// Shows a snapshot of the running completion.
    pub fn report(&self, p: &Progress) {
        let record = self.watch.record(&self.model, p);
        match self.mode {
            ProgressArg::Bar => self.bar.set_message(progress_text(&record)),
            ProgressArg::Lines | ProgressArg::Json => {
                let shown = self.watch.due(LINE_EVERY).then(|| self.show(&record));
                if let Ok(mut unshown) = self.unshown.lock() {
                    *unshown = shown.is_none().then_some(record);
                }
            }
            _ => {}
        }
    }

    /// Removes the bar, or writes the last record a log has not shown.
    pub fn finish(&self) {
        self.bar.finish_and_clear();
        if let Some(record) = self.unshown.lock().ok().and_then(|mut u| u.take()) {
            self.show(&record);
        }
    }

    /// Writes `record` as a line of a log.
    fn show(&self, record: &ProgressRecord) {
        match self.mode {
            ProgressArg::Lines => {
                let text = progress_text(record);
                self.line(&format!("{text}, {:.0} s", record.elapsed_seconds));
            }
            ProgressArg::Json => {
                if let Ok(json) = serde_json::to_string(record) {
                    self.write(&json);
                }
            }
            _ => {}
        }
    }

    fn line(&self, text: &str) {
        self.write(&format!("kernstep: {}: {text}", self.model));
    }

    fn write(&self, line: &str) {
        // Progress is best effort: a closed stderr must not stop the build.
        let _ = writeln!(io::stderr().lock(), "{line}");
    }
}
