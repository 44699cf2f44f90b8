//! The report of a matrix analysis (`analyze --json`): the figures that bound a completion,
//! whether the matrix is a network's, and optionally the estimated cost of the build.

use std::sync::atomic::AtomicBool;
use std::time::Duration;

use schemars::JsonSchema;
use serde::Serialize;

use crate::analysis::{norm_step, AnalysisOptions, MatrixAnalysis};
use crate::completion::Control;
use crate::error::Result;
use crate::model::Model;
use crate::network::Network;
use crate::testset::{estimate, BuildEstimate, StageMark};

/// Whether the matrix is a network matrix, and if not, what stands in the way.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct NetworkRecord {
    /// Some scaling of rows by -1 leaves every column with at most one +1 and one -1.
    pub network: bool,
    /// With `network`: rows scaled by +1 and by -1; else the first obstacle, in words.
    pub detail: String,
}

impl NetworkRecord {
    /// The record of `model`'s matrix.
    pub fn of(model: &Model) -> Self {
        match Network::detect(&model.matrix) {
            Ok(network) => {
                let plus = network.row_signs().iter().filter(|&&s| s > 0).count();
                NetworkRecord {
                    network: true,
                    detail: format!(
                        "rows +1: {plus}, -1: {}; the Graver basis is its cycles (nothing to enumerate)",
                        network.row_signs().len() - plus
                    ),
                }
            }
            Err(why) => NetworkRecord {
                network: false,
                detail: why.to_string(),
            },
        }
    }
}

/// One end of an estimate's range.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct EndRecord {
    /// Elements, as a decimal string.
    pub elements: String,
    /// Build seconds.
    pub seconds: f64,
}

/// Elements (a decimal string) and seconds, with their low and high ends.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct FiguresRecord {
    /// Elements, as a decimal string.
    pub elements: String,
    /// Build seconds.
    pub seconds: f64,
    /// The low end.
    pub low: EndRecord,
    /// The high end.
    pub high: EndRecord,
}

impl FiguresRecord {
    fn of(e: &BuildEstimate) -> Self {
        let count = |x: f64| format!("{:.0}", x.round());
        let end = |elements: f64, seconds: f64| EndRecord {
            elements: count(elements),
            seconds,
        };
        FiguresRecord {
            elements: count(e.elements.value),
            seconds: e.seconds.value,
            low: end(e.elements.low, e.seconds.low),
            high: end(e.elements.high, e.seconds.high),
        }
    }
}

/// The estimated cost of the build, from a probe of limited time.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct EstimateRecord {
    /// 2 when every kernel vector has even ℓ1 norm (odd limits hold nothing more), else 1.
    pub norm_step: u64,
    /// `complete`, or `norm<=N` for a set up to norm `N`.
    pub set: String,
    /// Whether the probe finished the build: the figures are then measured.
    pub measured: bool,
    /// The estimate of the complete set (absent when the probe finished too little to
    /// extrapolate from, or for a set up to a norm).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub complete: Option<FiguresRecord>,
    /// The estimate of the set up to a norm.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub up_to_norm: Option<FiguresRecord>,
    /// Stages of the build (the rank plus one).
    pub stages: usize,
    /// The stages the probe finished.
    pub probe: Vec<StageMark>,
    /// The norm the set was asked up to, if any.
    #[serde(skip)]
    pub up_to: Option<u64>,
    /// The estimate itself (`None`: the probe finished too little).
    #[serde(skip)]
    pub estimate: Option<BuildEstimate>,
}

/// How long to probe a build for an estimate, and of which set.
#[derive(Clone, Copy, Debug)]
pub struct Probe<'a> {
    /// The probe's time.
    pub time: Duration,
    /// Estimate the set up to this ℓ1 norm instead of the complete one.
    pub up_to: Option<u64>,
    /// Stops the probe when set.
    pub cancel: Option<&'a AtomicBool>,
}

/// The analysis report of one model.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
#[non_exhaustive]
pub struct AnalysisReport {
    /// The model file.
    pub model: String,
    /// The norm limit a complete build uses.
    pub norm_limit: u64,
    /// Whether the matrix is a network's.
    pub network: NetworkRecord,
    /// The figures.
    pub analysis: MatrixAnalysis,
    /// The build's estimated cost, when a probe was asked for.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub build_estimate: Option<EstimateRecord>,
}

/// Analyses `model` (read from `file`) with `options`, and probes its build when asked.
pub fn analyze(
    model: &Model,
    file: &str,
    options: &AnalysisOptions,
    probe: Option<Probe<'_>>,
) -> Result<AnalysisReport> {
    let analysis = MatrixAnalysis::of(&model.matrix, options);
    let build_estimate = probe
        .map(|p| estimate_record(model, &analysis, p))
        .transpose()?;
    Ok(AnalysisReport {
        model: file.to_string(),
        norm_limit: analysis.norm_limit(),
        network: NetworkRecord::of(model),
        analysis,
        build_estimate,
    })
}

/// Runs the build of the Graver basis (up to the probe's norm, else complete) for the probe's
/// time, then measures or extrapolates its size and time.
fn estimate_record(
    model: &Model,
    analysis: &MatrixAnalysis,
    probe: Probe<'_>,
) -> Result<EstimateRecord> {
    let mut control = Control::new().time_limit(probe.time);
    if let Some(flag) = probe.cancel {
        control = control.cancel_flag(flag);
    }
    let estimate = estimate(model, analysis, probe.up_to, &control)?;
    let figures = estimate.as_ref().map(FiguresRecord::of);
    let truncated = estimate.as_ref().map_or(probe.up_to, |e| e.norm_limit);
    let (complete, up_to_norm) = match truncated {
        None => (figures, None),
        Some(_) => (None, figures),
    };
    Ok(EstimateRecord {
        norm_step: norm_step(&model.matrix)?,
        set: truncated.map_or("complete".into(), |n| format!("norm<={n}")),
        measured: estimate.as_ref().is_some_and(|e| e.measured),
        complete,
        up_to_norm,
        stages: analysis.rank + 1,
        probe: estimate
            .as_ref()
            .map(|e| e.probe.clone())
            .unwrap_or_default(),
        up_to: probe.up_to,
        estimate,
    })
}
