//! What a build will cost before it runs: the build itself runs for a short probe, and the
//! stages it did not reach are extrapolated from the ones it finished.
//!
//! Project-and-lift passes through `r + 1` stages (the start projection, then one lifted
//! component each), and the set after stage `k` is the minimal set of the lattice projected
//! to the components lifted so far; the last one is the set asked for. Early stages are cheap
//! and the last few hold nearly all the time, so a probe of seconds finishes most stages. Two
//! regularities of the stage sizes `s_k` serve the extrapolation (observed on the builds of
//! this project: three-way tables, complete bipartite graphs, lane plans; common practice, not
//! a theorem): the growth `s_k / s_{k-1} - 1` shrinks from stage to stage once it falls, by a
//! roughly steady factor, and a stage's time grows as a power `α` of its size (the pairs it
//! forms). The factor and `α` are read off the last stages measured; their spread over those
//! stages gives the low and high ends of the estimate. A probe that finishes gives the exact
//! count.
//!
//! The earlier estimate, which extrapolated norm levels up to the proven norm bound, is gone:
//! proven bounds run to millions where the moves stop at a few dozen, so it predicted sets
//! many times too large.

use std::sync::Mutex;
use std::time::Instant;

use schemars::JsonSchema;
use serde::Serialize;

use super::build::{build, BuildOutcome};
use super::spec::{BuildSpec, NormLimit};
use crate::analysis::MatrixAnalysis;
use crate::completion::{Control, StateView};
use crate::error::Result;
use crate::model::Model;

/// Growth below this between two stages is not a trend (stages that lift a component few
/// moves touch).
const FLAT: f64 = 0.05;
/// Stage durations below this (seconds) are too noisy to fit `α` from.
const NOISE: f64 = 0.005;
/// Decay factors considered: the last this many.
const RECENT: usize = 2;
/// The power of a stage's size its time grows with when no stage shows it (pairs of members:
/// quadratic; common practice).
const DEFAULT_POWER: f64 = 2.0;
/// A stage whose growth differs from both neighbours' by this factor, the same way, marks
/// stages that alternate between growing and nearly flat (three-way tables lift the cells of
/// one line after another).
const ALTERNATION: f64 = 3.0;
/// The decay of the growth per stage assumed for alternating stages, whose decay cannot be
/// read off, with its low and high ends (observed on the three-way tables, 3x3x4 and 3x3x5).
const ALTERNATING_DECAY: (f64, f64, f64) = (0.6, 0.45, 0.75);

/// A finished stage of the probe.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, JsonSchema)]
pub struct StageMark {
    /// Stage number (0 is the start projection).
    pub stage: usize,
    /// Moves of the stage's set (one per `±` pair).
    pub elements: usize,
    /// Seconds from the start of the probe to the end of the stage.
    pub seconds: f64,
}

/// A figure with its plausible range.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, JsonSchema)]
pub struct Range {
    /// The estimate.
    pub value: f64,
    /// Its low end.
    pub low: f64,
    /// Its high end.
    pub high: f64,
}

impl Range {
    fn exact(value: f64) -> Self {
        Self {
            value,
            low: value,
            high: value,
        }
    }
}

/// The estimated cost of one build.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct BuildEstimate {
    /// The norm limit of the set estimated (`None`: the complete set).
    pub norm_limit: Option<u64>,
    /// Whether the probe finished the build (the figures are then measured).
    pub measured: bool,
    /// Moves of the set.
    pub elements: Range,
    /// Seconds of a build from scratch.
    pub seconds: Range,
    /// Stages of the build.
    pub stages: usize,
    /// The stages the probe finished.
    pub probe: Vec<StageMark>,
}

/// Estimates the build of `model`'s Graver basis (up to `up_to`, else complete) by running it
/// under `control` (whose time limit is the probe); `None` when the probe finished too few
/// growing stages to extrapolate from.
pub fn estimate(
    model: &Model,
    analysis: &MatrixAnalysis,
    up_to: Option<u64>,
    control: &Control<'_>,
) -> Result<Option<BuildEstimate>> {
    let spec = BuildSpec {
        norm_limit: up_to.map_or(NormLimit::Auto, NormLimit::AtMost),
        ..BuildSpec::default()
    };
    let resolved = spec.resolve(model, analysis)?;
    let start_dimension = model.variables() - analysis.rank;
    let started = Instant::now();
    let marks = Mutex::new(Vec::new());
    let record = |state: &StateView<'_>| {
        if !state.mid_stage() {
            let mark = StageMark {
                stage: state.lifted().len().saturating_sub(start_dimension),
                elements: state.elements(),
                seconds: started.elapsed().as_secs_f64(),
            };
            marks.lock().map(|mut m| m.push(mark)).ok();
        }
    };
    let probe = control.on_save(&record, std::time::Duration::MAX);
    let outcome = build(&model.matrix, analysis, &resolved, &probe, None)?;
    let elapsed = started.elapsed().as_secs_f64();
    let probe_marks = marks.into_inner().unwrap_or_default();
    let stages = analysis.rank + 1;
    let norm_limit = up_to.filter(|&n| n < resolved.proven_bound);
    Ok(match outcome {
        BuildOutcome::Built(built) => Some(BuildEstimate {
            norm_limit,
            measured: true,
            elements: Range::exact(built.set.len() as f64),
            seconds: Range::exact(elapsed),
            stages,
            probe: probe_marks,
        }),
        BuildOutcome::Stopped(_) => {
            extrapolate(&probe_marks, stages - 1, elapsed).map(|(elements, seconds)| {
                BuildEstimate {
                    norm_limit,
                    measured: false,
                    elements,
                    seconds,
                    stages,
                    probe: probe_marks,
                }
            })
        }
    })
}

/// The size and time of the stage `last` extrapolated from the finished stages `marks` (in
/// stage order) of a probe that ran `ran` seconds; `None` without a growing stage.
pub fn extrapolate(marks: &[StageMark], last: usize, ran: f64) -> Option<(Range, Range)> {
    let end = marks.last()?;
    let steps: Vec<(&StageMark, &StageMark)> = marks
        .windows(2)
        .map(|w| (&w[0], &w[1]))
        .filter(|(a, b)| b.stage == a.stage + 1 && a.elements > 0)
        .collect();
    let growths: Vec<f64> = steps
        .iter()
        .map(|(a, b)| b.elements as f64 / a.elements as f64 - 1.0)
        .filter(|&g| g >= FLAT)
        .collect();
    let &last_growth = growths.last()?;
    let (growth, (decay, decay_low, decay_high)) = match growths.as_slice() {
        [.., a, b, c] if alternate(*a, *b, *c) => {
            // The mean growth of the last two stages, decaying at the assumed rate.
            (((1.0 + b) * (1.0 + c)).sqrt() - 1.0, ALTERNATING_DECAY)
        }
        _ => {
            let decays: Vec<f64> = growths
                .windows(2)
                .map(|w| w[1] / w[0])
                .rev()
                .take(RECENT)
                .collect();
            (last_growth, spread(&decays, 0.7, 0.2, 1.0))
        }
    };
    let powers: Vec<f64> = steps
        .windows(2)
        .filter_map(|w| {
            let ((a, b), (_, c)) = (w[0], w[1]);
            let (before, after) = (b.seconds - a.seconds, c.seconds - b.seconds);
            let size = c.elements as f64 / b.elements as f64;
            (before >= NOISE && after >= NOISE && size > 1.0 + FLAT)
                .then(|| (after / before).ln() / size.ln())
        })
        .rev()
        .take(RECENT)
        .collect();
    let (power, power_low, power_high) = spread(&powers, DEFAULT_POWER, 1.0, 4.0);
    let duration = steps
        .last()
        .map_or(end.seconds, |(a, b)| (b.seconds - a.seconds).max(NOISE));
    let remaining = last.saturating_sub(end.stage);
    let project = |decay: f64, power: f64| {
        let (mut size, mut growth, mut stage_time, mut total) =
            (end.elements as f64, growth, duration, end.seconds);
        for _ in 0..remaining {
            growth *= decay;
            stage_time *= (1.0 + growth).powf(power);
            size *= 1.0 + growth;
            total += stage_time;
        }
        (size, total.max(ran))
    };
    // Each end varies one thing at a time: the growth for the counts, then the growth or the
    // power for the times (both at once would compound into a useless range).
    let (elements, seconds) = project(decay, power);
    let (low, fewer) = project(decay_low, power);
    let (high, more) = project(decay_high, power);
    let (_, cheaper) = project(decay, power_low);
    let (_, dearer) = project(decay, power_high);
    let (fast, slow) = (fewer.min(cheaper), more.max(dearer));
    Some((
        Range {
            value: elements,
            low,
            high,
        },
        Range {
            value: seconds,
            low: fast,
            high: slow,
        },
    ))
}

/// Whether the growth `b` of a stage stands out from both neighbours' `a` and `c` by
/// [`ALTERNATION`], the same way (above both or below both).
fn alternate(a: f64, b: f64, c: f64) -> bool {
    (b >= ALTERNATION * a && b >= ALTERNATION * c) || (ALTERNATION * b <= a && ALTERNATION * b <= c)
}

/// The geometric mean of `values` (else `default`) and a range around it: the smallest and
/// largest value, widened by 15% each way, all within `[floor, ceiling]`.
fn spread(values: &[f64], default: f64, floor: f64, ceiling: f64) -> (f64, f64, f64) {
    let clamp = |x: f64| x.clamp(floor, ceiling);
    if values.is_empty() {
        return (default, clamp(default * 0.7), clamp(default * 1.3));
    }
    let mean = (values.iter().map(|v| v.ln()).sum::<f64>() / values.len() as f64).exp();
    let low = values.iter().copied().fold(mean, f64::min) * 0.85;
    let high = values.iter().copied().fold(mean, f64::max) * 1.15;
    (clamp(mean), clamp(low), clamp(high))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn marks(sizes: &[(usize, f64)], first: usize) -> Vec<StageMark> {
        sizes
            .iter()
            .enumerate()
            .map(|(i, &(elements, seconds))| StageMark {
                stage: first + i,
                elements,
                seconds,
            })
            .collect()
    }

    #[test]
    fn growth_shrinking_by_half_each_stage_is_carried_on() {
        // Sizes 100, 300 (growth 2), 600 (growth 1): the growth halves; two more stages give
        // 600 * 1.5 * 1.25 = 1125 (by hand). Times double-quadratic: 1, 1 + 4 s.
        let probe = marks(&[(100, 1.0), (300, 2.0), (600, 6.0)], 5);
        let (elements, seconds) = extrapolate(&probe, 9, 6.5).unwrap();
        assert!((elements.value - 1125.0).abs() < 1e-6, "{elements:?}");
        assert!(elements.low <= elements.value && elements.value <= elements.high);
        assert!(seconds.value > 6.5 && seconds.low <= seconds.value);
        assert!(seconds.value <= seconds.high);
    }

    #[test]
    fn a_probe_without_growth_gives_nothing() {
        let probe = marks(&[(10, 0.1), (10, 0.2), (10, 0.3)], 0);
        assert_eq!(extrapolate(&probe, 9, 1.0), None);
        assert_eq!(extrapolate(&[], 9, 1.0), None);
    }

    #[test]
    fn alternating_stages_of_the_3x3x5_tables_within_3x() {
        // Stage-end sizes of the 3x3x5 tables' build (stages 21..25 of 29) measured by this
        // project; the complete build, run to its end, has 263,610 moves.
        let probe = marks(
            &[
                (444, 0.013),
                (2268, 0.044),
                (2460, 0.070),
                (21540, 1.057),
                (27852, 3.221),
            ],
            21,
        );
        let (elements, _) = extrapolate(&probe, 29, 30.0).unwrap();
        let truth = 263_610.0;
        assert!(
            elements.value < 3.0 * truth && elements.value > truth / 3.0,
            "{elements:?}"
        );
        assert!(
            elements.low <= truth && truth <= elements.high,
            "{elements:?}"
        );
    }

    #[test]
    fn the_complete_bipartite_graph_k66_within_3x() {
        // Stage-end sizes of the K_{6,6} incidence matrix's build, measured by this project
        // (stages 6..9, seconds from the start); the Graver basis has 113,865 moves, the
        // circuits of K_{6,6}: sum_k C(6,k)^2 k! (k-1)! / 2 (standard cycle count).
        let probe = marks(
            &[
                (75, 0.007),
                (325, 0.008),
                (1525, 0.018),
                (6795, 0.122),
                (23935, 2.123),
            ],
            5,
        );
        let (elements, _) = extrapolate(&probe, 11, 5.0).unwrap();
        let truth: f64 = (2..=6u64)
            .map(|k| {
                let c = (1..=k).fold(1.0, |acc, i| acc * (7 - i) as f64 / i as f64);
                let f = |m: u64| (1..=m).product::<u64>() as f64;
                c * c * f(k) * f(k - 1) / 2.0
            })
            .sum();
        assert_eq!(truth, 113_865.0);
        assert!(
            elements.value < 3.0 * truth && elements.value > truth / 3.0,
            "{elements:?}"
        );
    }
}
