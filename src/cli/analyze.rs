//! `kernstep analyze MODEL`: the figures of the model's constraint matrix.

use std::io::{self, Write};
use std::process::ExitCode;
use std::time::Duration;

use kernstep::analysis::{AnalysisOptions, Decision, Delta, MatrixAnalysis, RankCondition};
use kernstep::completion::Control;
use kernstep::model::Model;
use kernstep::network::Network;
use kernstep::scenario::PlanInput;
use kernstep::testset::{deepen, project, BuildSpec, Projection};
use serde::Serialize;

use super::args::AnalyzeArgs;
use super::common::interrupted;
use super::table::{write_pairs, write_table};

/// The `--json` document.
#[derive(Serialize)]
struct Report<'a> {
    model: String,
    norm_limit: u64,
    network: NetworkReport,
    analysis: &'a MatrixAnalysis,
    #[serde(skip_serializing_if = "Option::is_none")]
    build_estimate: Option<Vec<Projection>>,
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
            build_estimate: estimate,
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
        if let Some(levels) = &estimate {
            writeln!(out)?;
            write_estimate(&mut out, levels)?;
        }
    }
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}

/// The Graver basis's levels: the first built for up to `probe`, the rest up to `up_to` (or
/// the proven bound) extrapolated.
fn build_estimate(
    model: &Model,
    analysis: &MatrixAnalysis,
    probe: Duration,
    up_to: Option<u64>,
) -> anyhow::Result<Vec<Projection>> {
    let control = Control::new().time_limit(probe).cancel_flag(interrupted());
    let deepened = deepen(
        model,
        analysis,
        &BuildSpec::default(),
        &control,
        &mut |_| {},
    )?;
    Ok(project(
        &deepened.levels,
        up_to.unwrap_or(deepened.proven_bound),
    ))
}

fn write_estimate(out: &mut impl Write, levels: &[Projection]) -> io::Result<()> {
    writeln!(
        out,
        "build estimate (Graver basis; measured levels, then extrapolated, an order of magnitude):"
    )?;
    let cells: Vec<Vec<String>> = levels
        .iter()
        .map(|p| {
            vec![
                p.limit.to_string(),
                format!("{:.0}", p.elements),
                format!("{:.2}", p.seconds),
                if p.measured { "built" } else { "extrapolated" }.to_string(),
            ]
        })
        .collect();
    write_table(
        out,
        &["norm limit", "elements", "seconds", "source"],
        &cells,
    )?;
    if let Some(last) = levels.last().filter(|p| !p.measured) {
        writeln!(
            out,
            "a build up to norm {} would take about {:.0} s; `build --budget` keeps the largest level that fits",
            last.limit, last.seconds
        )?;
    }
    Ok(())
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
