//! The limits of a build, as a library policy: an element cap from an explicit count, from a
//! memory cap, or by default from the memory available now, and a time limit; turned into
//! the [`Control`] that a completion consults. Every caller (the command line, an embedding
//! program) gets the same guard, so a build too large for the machine stops with a status and
//! a checkpoint instead of being killed.

use std::sync::atomic::AtomicBool;
use std::time::Duration;

use crate::completion::Control;

/// Share of the memory available that the default guard lets a build's working set use: the
/// rest is left to the other programs on the machine (and to this one's other needs).
pub const GUARD_PERCENT: u64 = 75;

/// The limits of one build; `Default` is the memory guard alone.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct BuildLimits {
    /// Stop once the working set exceeds this many elements.
    pub max_elements: Option<usize>,
    /// Stop after this much time.
    pub time_limit: Option<Duration>,
    /// Stop before the working set would need more than this many bytes (default: the
    /// guard, [`GUARD_PERCENT`] of the memory available).
    pub max_memory: Option<u64>,
}

impl BuildLimits {
    /// The element cap of a build of vectors of `width` entries: `max_elements`, else what
    /// `max_memory` holds, else the memory guard; `None` where nothing limits it.
    pub fn element_cap(&self, width: usize) -> Option<usize> {
        self.max_elements.or_else(|| match self.max_memory {
            Some(bytes) => Some(members_in(bytes, width)),
            None => memory_guard(width),
        })
    }

    /// The control of a build of vectors of `width` entries under these limits, stopped
    /// early when `cancel` is set.
    pub fn control<'a>(&self, width: usize, cancel: Option<&'a AtomicBool>) -> Control<'a> {
        let mut control = Control::new();
        if let Some(flag) = cancel {
            control = control.cancel_flag(flag);
        }
        if let Some(limit) = self.time_limit {
            control = control.time_limit(limit);
        }
        if let Some(cap) = self.element_cap(width) {
            control = control.max_elements(cap);
        }
        control
    }
}

/// Working-set members that fit in `bytes`, with the headroom of [`memory_guard`].
pub fn members_in(bytes: u64, width: usize) -> usize {
    usize::try_from(bytes / (5 * bytes_per_member(width))).unwrap_or(usize::MAX)
}

/// Bytes of one working-set member (each sign of a vector counts): 4-byte entries, sign masks
/// and index slots.
fn bytes_per_member(width: usize) -> u64 {
    4 * width as u64 + 40
}

/// The largest working set that fits in [`GUARD_PERCENT`] of the memory available now (from
/// /proc/meminfo). The factor 5 of headroom covers pair buffers and the minimal-set pass: the
/// K_{6,6} build peaked at 197 MiB with 227,730 members, 4.9 times the plain member size.
/// `None` where the figure is unknown.
pub fn memory_guard(width: usize) -> Option<usize> {
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
    fn the_memory_cap_counts_members_with_headroom() {
        // 10 variables: 80 bytes a member, five times over (the guard's headroom).
        assert_eq!(members_in(400 * 1000, 10), 1000);
        let limits = BuildLimits {
            max_memory: Some(400 * 1000),
            ..BuildLimits::default()
        };
        assert_eq!(limits.element_cap(10), Some(1000));
        let both = BuildLimits {
            max_elements: Some(7),
            ..limits
        };
        assert_eq!(both.element_cap(10), Some(7), "an explicit count wins");
    }

    #[test]
    fn the_default_guard_leaves_a_quarter_of_the_memory_available() {
        let meminfo = "MemTotal:        8000000 kB\nMemAvailable:    4000000 kB\n";
        // 75% of 4,000,000 KiB, over 5 x 80 bytes a member (10 variables).
        assert_eq!(guard_of(meminfo, 10), Some(3_000_000 * 1024 / 400));
        assert_eq!(guard_of("MemTotal: 8000000 kB\n", 10), None);
    }
}
