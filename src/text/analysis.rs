//! An analysis in words: the figures of a model's constraint matrix as a label/value list,
//! and the build estimate when a probe ran (what `kernstep analyze` prints).

use super::layout::{labelled, pairs};
use crate::analysis::{Decision, Delta, MatrixAnalysis, RankCondition};
use crate::formats::analysis::{AnalysisReport, EstimateRecord};
use crate::model::Model;
use crate::testset::Range;

/// The figures of `report` (an analysis of `model`), then its build estimate.
pub fn analysis_text(report: &AnalysisReport, model: &Model) -> String {
    let mut rows = figure_rows(&report.model, model, &report.analysis);
    let network = &report.network;
    let verdict = if network.network { "yes" } else { "no" };
    rows.push(("network matrix", format!("{verdict}: {}", network.detail)));
    let mut out = labelled(rows);
    if let Some(probed) = &report.build_estimate {
        out.push('\n');
        out.push_str(&estimate_text(probed));
    }
    out
}

fn estimate_text(probed: &EstimateRecord) -> String {
    let set = probed
        .up_to
        .map_or("the complete Graver basis".to_string(), |n| {
            format!("the Graver elements up to norm {n}")
        });
    let Some(e) = &probed.estimate else {
        return format!(
            "build estimate for {set}: the probe finished too few growing stages of {}; probe longer\n",
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
    let norm_step = match probed.norm_step {
        2 => "2 (every kernel vector has even norm; budgets try even limits)".to_string(),
        _ => "1".to_string(),
    };
    let rows = vec![
        ("set".to_string(), set),
        ("moves".to_string(), range(&e.elements, 0)),
        ("build seconds".to_string(), range(&e.seconds, 1)),
        ("source".to_string(), how),
        ("norm step".to_string(), norm_step),
    ];
    format!("build estimate:\n{}", pairs(&rows))
}

fn decision(d: Decision) -> String {
    match d {
        Decision::Yes => "yes",
        Decision::No => "no",
        Decision::Undecided => "undecided (over the subdeterminant limit)",
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
            format!("at most {d} (Hadamard bound; enumeration over the subdeterminant limit)")
        }
    }
}

fn published_text(a: &MatrixAnalysis) -> String {
    let Some(p) = &a.published_column_number else {
        return "no published value for this Δ".to_string();
    };
    let verdict = match a.within_published_column_number {
        Some(true) => "the matrix's h is within it",
        _ => "the matrix's h exceeds it",
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

/// One `(label, value)` per figure.
fn figure_rows<'a>(file: &str, model: &Model, a: &MatrixAnalysis) -> Vec<(&'a str, String)> {
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
    pairs
}
