//! The limits of a build, one set of flags for every verb that can build (`build`, and
//! `solve`, `trace`, `batch`, `demo` when the cache has no set), turned into the library's
//! [`Control`] in one place; and the error that says which limit stopped a build started by
//! one of the solving verbs, and how to go on.

use std::fmt;
use std::time::Duration;

use clap::Args;
use kernstep::completion::{Control, StopReason};
use kernstep::testset::{BuildLimits, SavedState, GUARD_PERCENT};
use kernstep::text::state_text;

use super::common::interrupted;

/// `--max-elements`, `--time-limit` and `--max-memory`.
#[derive(Debug, Clone, Default, Args)]
pub struct LimitArgs {
    /// Stop a build once its working set exceeds N elements (default: as many as fit in 75%
    /// of the memory available when the build starts, so that a build too large for this
    /// machine stops with a status and a checkpoint instead of being killed).
    #[arg(long, value_name = "N")]
    pub max_elements: Option<usize>,
    /// Stop a build after this long (`90s`, `1h30m`; a bare number is seconds).
    #[arg(long, value_name = "DURATION", value_parser = super::parse::duration)]
    pub time_limit: Option<Duration>,
    /// Memory cap for a build's working set (`6GB`, `6GiB`, `512M`): stop a build, or a level of a
    /// budgeted build, before its working set would need more (default: 75% of the memory
    /// available).
    #[arg(long, value_name = "SIZE", value_parser = super::parse::size)]
    pub max_memory: Option<u64>,
}

impl LimitArgs {
    /// Whether any limit was given on the command line.
    pub fn any(&self) -> bool {
        self.max_elements.is_some() || self.time_limit.is_some() || self.max_memory.is_some()
    }

    /// The library's limits these flags ask for.
    fn limits(&self) -> BuildLimits {
        BuildLimits {
            max_elements: self.max_elements,
            time_limit: self.time_limit,
            max_memory: self.max_memory,
        }
    }

    /// The control of a build of vectors of `width` entries: Ctrl-C, `--time-limit`, and the
    /// element cap from `--max-elements`, `--max-memory` or the default memory guard.
    pub fn control<'a>(&self, width: usize) -> Control<'a> {
        self.limits().control(width, Some(interrupted()))
    }

    /// The element cap of a build of vectors of `width` entries, if any.
    fn element_cap(&self, width: usize) -> Option<usize> {
        self.limits().element_cap(width)
    }

    /// The limit behind `reason`, in the words of the command line.
    pub(super) fn named(&self, reason: StopReason, width: usize) -> String {
        match reason {
            StopReason::Cancelled => "interrupted".to_string(),
            StopReason::TimeLimit => match self.time_limit {
                Some(limit) => format!("--time-limit {} s reached", limit.as_secs_f64()),
                None => "the time limit was reached".to_string(),
            },
            StopReason::ElementLimit => {
                let cap = self
                    .element_cap(width)
                    .map_or_else(String::new, |n| format!(" ({n} working-set members)"));
                match (self.max_elements, self.max_memory) {
                    (Some(n), _) => format!("--max-elements {n} reached"),
                    (None, Some(bytes)) => format!("--max-memory {bytes} bytes reached{cap}"),
                    (None, None) => format!(
                        "the memory guard ({GUARD_PERCENT}% of the memory available{cap}) was reached"
                    ),
                }
            }
        }
    }

    /// The error of a build (its matrix `width` columns wide) that `reason` stopped, with
    /// what the build kept and `command`, the `kernstep build` that builds the same set.
    pub fn stopped(
        &self,
        reason: StopReason,
        command: String,
        width: usize,
        kept: Option<SavedState>,
    ) -> BuildStopped {
        BuildStopped {
            reason,
            limit: self.named(reason, width),
            command,
            kept: kept.map(|state| state_text(&(&state).into())),
        }
    }
}

/// A build that a solving verb started on a cache miss and a limit (or Ctrl-C) stopped
/// before the set was complete. The verb stops with it; [`super::run`] prints it and exits 1
/// (after a signal, with the signal's status). No entry is stored.
#[derive(Debug)]
pub struct BuildStopped {
    reason: StopReason,
    limit: String,
    command: String,
    kept: Option<String>,
}

impl BuildStopped {
    /// The exit status: 1 for a limit, the signal's status (130, 143) after Ctrl-C or SIGTERM.
    pub fn exit_status(&self) -> u8 {
        match self.reason {
            StopReason::Cancelled => super::common::signal_status().unwrap_or(1),
            StopReason::ElementLimit | StopReason::TimeLimit => 1,
        }
    }
}

impl fmt::Display for BuildStopped {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "building the test set stopped: {}; no set stored",
            self.limit
        )?;
        if let Some(kept) = &self.kept {
            write!(f, ", a checkpoint keeps {kept}")?;
        }
        if self.reason == StopReason::Cancelled {
            return Ok(());
        }
        write!(
            f,
            ". Build the set on its own first, with room to finish: `{}` (it resumes from \
             the checkpoint; see its --max-memory, --time-limit and --budget), then run this \
             command again",
            self.command
        )
    }
}

impl std::error::Error for BuildStopped {}
