//! What a build will cost before it runs: the first norm levels are built for real (a short
//! [`super::deepen`]), and the levels beyond are extrapolated geometrically from them.
//!
//! Over the first levels that carry elements, counts grow by a roughly constant factor per
//! level, and the time of a level at least as fast (common practice, and what the builds of
//! this project show; the lattice points of norm up to `N` are far more than the Graver
//! elements among them, so no closed count serves).
//! The factor is taken from the last two measured levels with different counts (matrices
//! whose elements all have even norm repeat each count), the time factor from the last two
//! measured times. An estimate, good to an order of magnitude: it tells which budget to set.

use super::deepen::{Level, LevelEnd};

/// Times below this (seconds) are too noisy to extrapolate from.
const NOISE: f64 = 0.01;
/// At most this many levels are projected: the next, then doubling distances, then the
/// last one asked for.
const MAX_AHEAD: usize = 16;
/// Levels projected past this many seconds (30 days) are not listed.
const HORIZON: f64 = 30.0 * 86_400.0;

/// One level's size and time, measured or extrapolated.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct Projection {
    /// The ℓ1 norm limit.
    pub limit: u64,
    /// Elements of the set up to the limit.
    pub elements: f64,
    /// Seconds to build the set up to the limit, from scratch.
    pub seconds: f64,
    /// True for a level that was built; false for an extrapolated one.
    pub measured: bool,
}

/// The measured levels of `levels` followed by levels up to `up_to` (the next ones, at
/// doubling distances, and `up_to`) extrapolated from them (only the measured ones when fewer than two levels carry distinct counts). A level
/// that a limit stopped is extrapolated, and at least the time it ran.
pub fn project(levels: &[Level], up_to: u64) -> Vec<Projection> {
    let mut out: Vec<Projection> = levels
        .iter()
        .filter_map(|l| match l.end {
            LevelEnd::Built { elements } => Some(Projection {
                limit: l.limit,
                elements: elements as f64,
                seconds: l.elapsed.as_secs_f64(),
                measured: true,
            }),
            LevelEnd::Stopped(_) => None,
        })
        .collect();
    let Some((anchor, growth)) = element_growth(&out) else {
        return out;
    };
    let pace = time_growth(&out).map_or(growth, |t| t.max(growth));
    let Some(&last) = out.last() else {
        return out;
    };
    let stopped: Vec<(u64, f64)> = levels
        .iter()
        .filter(|l| matches!(l.end, LevelEnd::Stopped(_)))
        .map(|l| (l.limit, l.elapsed.as_secs_f64()))
        .collect();
    let ahead = (0..)
        .map(|k| last.limit.saturating_add(1u64 << k))
        .take_while(|&l| l < up_to)
        .take(MAX_AHEAD)
        .chain((last.limit < up_to).then_some(up_to));
    for limit in ahead {
        let steps = (limit - last.limit) as f64;
        let ran = stopped
            .iter()
            .find(|(l, _)| *l == limit)
            .map_or(0.0, |(_, s)| *s);
        let seconds = (last.seconds.max(NOISE) * pace.powf(steps)).max(ran);
        if seconds > HORIZON {
            break;
        }
        out.push(Projection {
            limit,
            elements: anchor.elements * growth.powf((limit - anchor.limit) as f64),
            seconds,
            measured: false,
        });
    }
    out
}

/// The first level of the last distinct nonzero element count, and the per-level factor
/// between the last two distinct counts (counts are extrapolated from that level, so a count
/// that repeats every other level is not mistaken for a slowdown).
fn element_growth(measured: &[Projection]) -> Option<(Projection, f64)> {
    let mut distinct: Vec<&Projection> = Vec::new();
    for p in measured.iter().filter(|p| p.elements > 0.0) {
        if distinct.last().is_none_or(|d| d.elements != p.elements) {
            distinct.push(p);
        }
    }
    let [.., a, b] = distinct.as_slice() else {
        return None;
    };
    let factor = (b.elements / a.elements).powf(1.0 / (b.limit - a.limit) as f64);
    Some((**b, factor))
}

/// The per-level factor between the last two measured times above the noise.
fn time_growth(measured: &[Projection]) -> Option<f64> {
    let timed: Vec<&Projection> = measured.iter().filter(|p| p.seconds >= NOISE).collect();
    let [.., a, b] = timed.as_slice() else {
        return None;
    };
    Some((b.seconds / a.seconds).powf(1.0 / (b.limit - a.limit) as f64))
}

#[cfg(test)]
mod tests {
    use std::time::Duration;

    use super::*;
    use crate::completion::StopReason;

    fn built(limit: u64, elements: usize, seconds: f64) -> Level {
        Level {
            limit,
            end: LevelEnd::Built { elements },
            elapsed: Duration::from_secs_f64(seconds),
        }
    }

    #[test]
    fn counts_that_repeat_every_other_level_give_the_factor_per_level() {
        // Counts 0, 0, 100, 100, 2500, 2500 at norms 2..7: a factor 25 over two levels, 5 per
        // level, from norm 6 on; times 0.2 then 1.0 then 5.0 s: 5 per level (by hand).
        let levels = [
            built(2, 0, 0.001),
            built(3, 0, 0.001),
            built(4, 100, 0.1),
            built(5, 100, 0.2),
            built(6, 2500, 1.0),
            built(7, 2500, 5.0),
            Level {
                limit: 8,
                end: LevelEnd::Stopped(StopReason::TimeLimit),
                elapsed: Duration::from_secs(40),
            },
        ];
        let p = project(&levels, 9);
        assert_eq!(p.len(), 8);
        assert!(p[..6].iter().all(|p| p.measured));
        // Norm 8: 2500 * 5^2 elements; 5 * 5 = 25 s, but the stopped level already ran 40 s.
        assert!((p[6].elements - 62_500.0).abs() < 1e-6);
        assert!((p[6].seconds - 40.0).abs() < 1e-9);
        // Norm 9: 2500 * 5^3 elements, 5 * 5^2 s.
        assert!((p[7].elements - 312_500.0).abs() < 1e-6);
        assert!((p[7].seconds - 125.0).abs() < 1e-6);
    }

    #[test]
    fn one_count_gives_nothing_to_extrapolate() {
        let p = project(&[built(2, 0, 0.0), built(3, 7, 0.02)], 10);
        assert_eq!(p.len(), 2);
    }
}
