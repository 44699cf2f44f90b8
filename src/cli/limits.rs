//! The limits of a build, one set of flags for every verb that can build (`build`, and
//! `solve`, `trace`, `batch`, `demo` when the cache has no set), turned into the library's
//! [`Control`] in one place; and the error that says which limit stopped a build started by
//! one of the solving verbs, and how to go on.

use std::fmt;
use std::time::Duration;

use anyhow::Context;
use clap::Args;
use kernstep::completion::{Control, StopReason};
use kernstep::testset::SavedState;

use super::common::interrupted;

/// Share of the memory available that the default guard lets a build's working set use: the
/// rest is left to the other programs on the machine (and to this one's other needs).
const GUARD_PERCENT: u64 = 75;

/// `--max-elements`, `--time-limit` and `--max-memory`.
#[derive(Debug, Clone, Default, Args)]
pub struct LimitArgs {
    /// Stop a build once its working set exceeds N elements (default: as many as fit in 75%
    /// of the memory available when the build starts, so that a build too large for this
    /// machine stops with a status and a checkpoint instead of being killed).
    #[arg(long, value_name = "N")]
    pub max_elements: Option<usize>,
    /// Stop a build after S seconds.
    #[arg(long, value_name = "S")]
    pub time_limit: Option<f64>,
    /// Memory cap for a build's working set (`512M`, `6G`): stop a build, or a level of a
    /// budgeted build, before its working set would need more (default: 75% of the memory
    /// available).
    #[arg(long, value_name = "SIZE", value_parser = parse_size)]
    pub max_memory: Option<u64>,
}

impl LimitArgs {
    /// Whether any limit was given on the command line.
    pub fn any(&self) -> bool {
        self.max_elements.is_some() || self.time_limit.is_some() || self.max_memory.is_some()
    }

    /// The control of a build of vectors of `width` entries: Ctrl-C, `--time-limit`, and the
    /// element cap from `--max-elements`, `--max-memory` or the default memory guard.
    pub fn control<'a>(&self, width: usize) -> anyhow::Result<Control<'a>> {
        let mut control = Control::new().cancel_flag(interrupted());
        if let Some(s) = self.time_limit {
            let limit = Duration::try_from_secs_f64(s)
                .context("--time-limit must be a number of seconds")?;
            control = control.time_limit(limit);
        }
        if let Some(cap) = self.element_cap(width) {
            control = control.max_elements(cap);
        }
        Ok(control)
    }

    /// The element cap of a build of vectors of `width` entries, if any.
    fn element_cap(&self, width: usize) -> Option<usize> {
        self.max_elements.or_else(|| match self.max_memory {
            Some(bytes) => Some(members_in(bytes, width)),
            None => memory_guard(width),
        })
    }

    /// The limit behind `reason`, in the words of the command line.
    pub(super) fn named(&self, reason: StopReason, width: usize) -> String {
        match reason {
            StopReason::Cancelled => "interrupted".to_string(),
            StopReason::TimeLimit => match self.time_limit {
                Some(s) => format!("--time-limit {s} s reached"),
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
            kept: kept.map(|state| super::build::describe(&state)),
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

/// `512M`, `6G`, `800K` or a number of bytes.
fn parse_size(text: &str) -> Result<u64, String> {
    let upper = text.trim().to_ascii_uppercase();
    let (number, shift) = match "KMGT".find(upper.chars().last().unwrap_or(' ')) {
        Some(power) => (&upper[..upper.len() - 1], 10 * (power + 1)),
        None => (upper.as_str(), 0),
    };
    number
        .parse::<u64>()
        .ok()
        .and_then(|n| n.checked_mul(1u64 << shift))
        .filter(|&n| n > 0)
        .ok_or_else(|| format!("expected a size such as 512M or 6G, got {text:?}"))
}

/// Working-set members that fit in `bytes`, with the headroom of [`memory_guard`].
fn members_in(bytes: u64, width: usize) -> usize {
    usize::try_from(bytes / (5 * bytes_per_member(width))).unwrap_or(usize::MAX)
}

/// Bytes of one working-set member (each sign of a vector counts): 4-byte entries, sign masks
/// and index slots.
fn bytes_per_member(width: usize) -> u64 {
    4 * width as u64 + 40
}

/// The largest working set that fits in [`GUARD_PERCENT`] of the memory available now (from
/// /proc/meminfo), so that a build that would run out of memory stops cleanly with an
/// element-limit status (and a checkpoint) instead of being killed, and leaves the rest of
/// the memory to the machine. The factor 5 of headroom covers pair buffers and the
/// minimal-set pass: the K_{6,6} build peaked at 197 MiB with 227,730 members, 4.9 times the
/// plain member size. `None` where the figure is unknown.
fn memory_guard(width: usize) -> Option<usize> {
    guard_of(&std::fs::read_to_string("/proc/meminfo").ok()?, width)
}

/// [`memory_guard`] for the text of /proc/meminfo.
fn guard_of(meminfo: &str, width: usize) -> Option<usize> {
    let kib: u64 = meminfo
        .lines()
        .find(|l| l.starts_with("MemAvailable:"))?
        .split_whitespace()
        .nth(1)?
        .parse()
        .ok()?;
    let usable = kib.saturating_mul(1024) / 100 * GUARD_PERCENT;
    Some(members_in(usable, width))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sizes_in_every_unit() {
        assert_eq!(parse_size("800"), Ok(800));
        assert_eq!(parse_size("2k"), Ok(2048));
        assert_eq!(parse_size("512M"), Ok(512 << 20));
        assert_eq!(parse_size("6G"), Ok(6 << 30));
        assert!(parse_size("0").is_err());
        assert!(parse_size("16E").is_err());
        assert!(parse_size("99999999T").is_err());
    }

    #[test]
    fn the_memory_cap_counts_members_with_headroom() {
        // 10 variables: 80 bytes a member, five times over (the guard's headroom).
        assert_eq!(members_in(400 * 1000, 10), 1000);
        let args = LimitArgs {
            max_memory: Some(400 * 1000),
            ..LimitArgs::default()
        };
        assert_eq!(args.element_cap(10), Some(1000));
        let both = LimitArgs {
            max_elements: Some(7),
            ..args
        };
        assert_eq!(both.element_cap(10), Some(7), "--max-elements wins");
    }

    #[test]
    fn the_default_guard_leaves_a_quarter_of_the_memory_available() {
        let meminfo = "MemTotal:        8000000 kB\nMemAvailable:    4000000 kB\n";
        // 75% of 4,000,000 KiB, over 5 x 80 bytes a member (10 variables).
        assert_eq!(guard_of(meminfo, 10), Some(3_000_000 * 1024 / 400));
        assert_eq!(guard_of("MemTotal: 8000000 kB\n", 10), None);
    }

    #[test]
    fn stops_name_the_limit_and_the_way_on() {
        let args = LimitArgs {
            max_elements: Some(10),
            ..LimitArgs::default()
        };
        let command = "kernstep build m.json".to_string();
        let stop = args.stopped(StopReason::ElementLimit, command.clone(), 9, None);
        let text = stop.to_string();
        assert!(text.contains("--max-elements 10 reached"), "{text}");
        assert!(text.contains("`kernstep build m.json`"), "{text}");
        assert_eq!(stop.exit_status(), 1);
        let timed = LimitArgs {
            time_limit: Some(0.5),
            ..LimitArgs::default()
        }
        .stopped(StopReason::TimeLimit, command, 9, None);
        assert!(timed.to_string().contains("--time-limit 0.5 s reached"));
    }
}
