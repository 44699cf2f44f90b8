//! `kernstep analyze MODEL`: the figures of the model's constraint matrix.

use std::io::{self, Write};
use std::process::ExitCode;
use std::time::Duration;

use kernstep::analysis::{
    norm_step, AnalysisOptions, Decision, Delta, MatrixAnalysis, RankCondition,
};
use kernstep::completion::Control;
use kernstep::model::Model;
use kernstep::network::Network;
use kernstep::scenario::PlanInput;
use kernstep::testset::{estimate, BuildEstimate, Range};
use serde::Serialize;

use super::args::AnalyzeArgs;
use super::common::interrupted;
use super::table::write_pairs;

/// The `--json` document.
#[derive(Serialize)]
struct Report<'a> {
    model: String,
    norm_limit: u64,
    network: NetworkReport,
    analysis: &'a MatrixAnalysis,
    #[serde(skip_serializing_if = "Option::is_none")]
    build_estimate: Option<EstimateDoc>,
}

/// `build_estimate` in the `--json` document.
#[derive(Serialize)]
struct EstimateDoc {
    /// 2 when every kernel vector has even ℓ1 norm (odd limits hold nothing more), else 1.
    norm_step: u64,
    /// `complete`, or `norm<=N` with `--up-to N`.
    set: String,
    /// Whether the probe finished the build: the figures are then measured.
    measured: bool,
    /// The estimate of the complete set (absent when the probe finished too little to
    /// extrapolate from, or with `--up-to`).
    #[serde(skip_serializing_if = "Option::is_none")]
    complete: Option<FiguresDoc>,
    /// The estimate of the set up to the `--up-to` norm.
    #[serde(skip_serializing_if = "Option::is_none")]
    up_to_norm: Option<FiguresDoc>,
    stages: usize,
    probe: Vec<kernstep::testset::StageMark>,
}

/// Elements (a decimal string) and seconds, with their low and high ends.
#[derive(Serialize)]
struct FiguresDoc {
    elements: String,
    seconds: f64,
    low: EndDoc,
    high: EndDoc,
}

/// One end of an estimate's range.
#[derive(Serialize)]
struct EndDoc {
    elements: String,
    seconds: f64,
}

impl FiguresDoc {
    fn of(e: &BuildEstimate) -> Self {
        let count = |x: f64| format!("{:.0}", x.round());
        let end = |elements: f64, seconds: f64| EndDoc {
            elements: count(elements),
            seconds,
        };
        Self {
            elements: count(e.elements.value),
            seconds: e.seconds.value,
            low: end(e.elements.low, e.seconds.low),
            high: end(e.elements.high, e.seconds.high),
        }
    }
}

/// The probe's outcome: an estimate, or a probe too short to extrapolate from.
struct Probed {
    norm_step: u64,
    up_to: Option<u64>,
    estimate: Option<BuildEstimate>,
    stages: usize,
}

impl Probed {
    fn doc(&self) -> EstimateDoc {
        let figures = self.estimate.as_ref().map(FiguresDoc::of);
        let truncated = self.estimate.as_ref().map_or(self.up_to, |e| e.norm_limit);
        let (complete, up_to_norm) = match truncated {
            None => (figures, None),
            Some(_) => (None, figures),
        };
        EstimateDoc {
            norm_step: self.norm_step,
            set: truncated.map_or("complete".into(), |n| format!("norm<={n}")),
            measured: self.estimate.as_ref().is_some_and(|e| e.measured),
            complete,
            up_to_norm,
            stages: self.stages,
            probe: self
                .estimate
                .as_ref()
                .map(|e| e.probe.clone())
                .unwrap_or_default(),
        }
    }
}

/// Whether the matrix is a network matrix, and if not, what stands in the way.
#[derive(Serialize)]
struct NetworkReport {
    /// Some scaling of rows by -1 leaves every column with at most one +1 and one -1.
    network: bool,
    /// With `network`: rows scaled by +1 and by -1; else the first obstacle, in words.
    detail: String,
}

impl NetworkReport {
    fn of(model: &Model) -> Self {
        match Network::detect(&model.matrix) {
            Ok(network) => {
                let plus = network.row_signs().iter().filter(|&&s| s > 0).count();
                NetworkReport {
                    network: true,
                    detail: format!(
                        "rows +1: {plus}, -1: {}; the Graver basis is its cycles (nothing to enumerate)",
                        network.row_signs().len() - plus
                    ),
                }
            }
            Err(why) => NetworkReport {
                network: false,
                detail: why.to_string(),
            },
        }
    }
}

/// Loads the model, analyses its matrix and prints the figures.
pub fn run(args: &AnalyzeArgs) -> anyhow::Result<ExitCode> {
    let model = PlanInput::load(&args.model)?.into_model();
    let options = AnalysisOptions::new().subdet_limit(args.subdet_limit);
    let analysis = MatrixAnalysis::of(&model.matrix, &options);
    let network = NetworkReport::of(&model);
    let estimate = match args.estimate {
        Some(probe) => Some(build_estimate(&model, &analysis, probe, args.up_to)?),
        None => None,
    };
    let mut out = io::stdout().lock();
    if args.json {
        let report = Report {
            model: args.model.display().to_string(),
            norm_limit: analysis.norm_limit(),
            network,
            analysis: &analysis,
            build_estimate: estimate.as_ref().map(Probed::doc),
        };
        let text = serde_json::to_string_pretty(&report)?;
        writeln!(out, "{text}")?;
    } else {
        let mut rows = table_rows(&args.model.display().to_string(), &model, &analysis);
        let verdict = if network.network { "yes" } else { "no" };
        rows.push((
            "network matrix".to_string(),
            format!("{verdict}: {}", network.detail),
        ));
        write_pairs(&mut out, &rows)?;
        if let Some(probed) = &estimate {
            writeln!(out)?;
            write_estimate(&mut out, probed)?;
        }
    }
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}

/// Runs the build of the Graver basis (up to `up_to`, else complete) for up to `probe`, then
/// measures or extrapolates its size and time.
fn build_estimate(
    model: &Model,
    analysis: &MatrixAnalysis,
    probe: Duration,
    up_to: Option<u64>,
) -> anyhow::Result<Probed> {
    let control = Control::new().time_limit(probe).cancel_flag(interrupted());
    Ok(Probed {
        norm_step: norm_step(&model.matrix)?,
        up_to,
        estimate: estimate(model, analysis, up_to, &control)?,
        stages: analysis.rank + 1,
    })
}

fn write_estimate(out: &mut impl Write, probed: &Probed) -> io::Result<()> {
    let set = probed
        .up_to
        .map_or("the complete Graver basis".to_string(), |n| {
            format!("the Graver elements up to norm {n}")
        });
    let Some(e) = &probed.estimate else {
        return writeln!(
            out,
            "build estimate for {set}: the probe finished too few growing stages of {}; probe longer",
            probed.stages
        );
    };
    let range = |r: &Range, digits: usize| {
        if e.measured {
            format!("{:.*}", digits, r.value)
        } else {
            format!(
                "about {:.*} ({:.*} to {:.*})",
                digits, r.value, digits, r.low, digits, r.high
            )
        }
    };
    let how = if e.measured {
        "measured: the probe finished the build".to_string()
    } else {
        let done = e.probe.last().map_or(0, |m| m.stage);
        format!(
            "extrapolated from {done} of {} stages finished in the probe",
            e.stages - 1
        )
    };
    let rows = vec![
        ("set".to_string(), set),
        ("moves".to_string(), range(&e.elements, 0)),
        ("build seconds".to_string(), range(&e.seconds, 1)),
        ("source".to_string(), how),
        (
            "norm step".to_string(),
            match probed.norm_step {
                2 => "2 (every kernel vector has even norm; budgets try even limits)".to_string(),
                _ => "1".to_string(),
            },
        ),
    ];
    writeln!(out, "build estimate:")?;
    write_pairs(out, &rows)
}

fn decision(d: Decision) -> String {
    match d {
        Decision::Yes => "yes",
        Decision::No => "no",
        Decision::Undecided => "undecided (over --subdet-limit)",
    }
    .to_string()
}

fn delta_text(a: &MatrixAnalysis) -> String {
    match &a.delta {
        Delta::Exact(d) => {
            let gcd = a
                .maximal_minor_gcd
                .as_ref()
                .map_or(String::new(), |g| format!(", gcd {g}"));
            format!(
                "{d} (exact, {} maximal minors{gcd})",
                a.maximal_minors_evaluated
            )
        }
        Delta::UpperBound(d) => {
            format!("at most {d} (Hadamard bound; enumeration over --subdet-limit)")
        }
    }
}

fn published_text(a: &MatrixAnalysis) -> String {
    let Some(p) = &a.published_column_number else {
        return "no published value for this Δ".to_string();
    };
    let verdict = match a.within_published_column_number {
        Some(true) => "within",
        _ => "exceeds",
    };
    let rank_note = match p.condition {
        RankCondition::EveryRank => "",
        RankCondition::LargeRank => ", proven for large r only",
    };
    let bound_note = if a.delta.is_exact() {
        ""
    } else {
        " (Δ bounded)"
    };
    format!(
        "{} for Δ = {}{bound_note}: {} ({}{rank_note}); {verdict}",
        p.value, p.delta, p.formula, p.source
    )
}

/// The human table: one `(label, value)` per figure.
fn table_rows(file: &str, model: &Model, a: &MatrixAnalysis) -> Vec<(String, String)> {
    let rows: Vec<&str> = a
        .independent_rows
        .iter()
        .map(|&i| model.row_names[i].as_str())
        .collect();
    let b = &a.bounds;
    let mut pairs: Vec<(&str, String)> = vec![
        ("model", file.to_string()),
        ("variables n", a.variables.to_string()),
        ("constraints m", a.constraints.to_string()),
        ("rank r", a.rank.to_string()),
        ("kernel dimension n - r", a.kernel_dimension.to_string()),
        ("independent rows", rows.join(", ")),
        ("largest |entry|", a.max_abs_entry.to_string()),
        ("zero columns", a.zero_columns.to_string()),
        ("column number h (±a once)", a.column_number.to_string()),
        ("non-parallel columns", a.column_number_parallel.to_string()),
        ("published maximum", published_text(a)),
        ("Δ (largest r x r minor)", delta_text(a)),
        ("unimodular", decision(a.unimodular)),
        ("totally unimodular", decision(a.totally_unimodular)),
        (
            "Graver ℓ1 bound, n",
            format!("{} = (n - r)(r + 1)Δ", b.by_variables),
        ),
        (
            "Graver ℓ1 bound, h",
            format!("{} = max(2, (h - r)(r + 1)Δ)", b.by_column_number),
        ),
        (
            "Graver ℓ1 bound, Steinitz",
            format!("{} = (2r·max|B| + 1)^r", b.steinitz),
        ),
        ("norm limit", a.norm_limit().to_string()),
        ("proximity", format!("{} = nΔ", b.proximity)),
    ];
    if let Some(u) = &b.unimodular {
        let at = pairs.len() - 2;
        pairs.insert(
            at,
            (
                "Graver ℓ1 bound, circuits",
                format!("{u} = max(2, r + 1), unimodular"),
            ),
        );
    }
    pairs.into_iter().map(|(l, v)| (l.to_string(), v)).collect()
}
