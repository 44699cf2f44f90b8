//! `kernstep analyze MODEL`: the figures of the model's constraint matrix.

use std::io::{self, Write};
use std::process::ExitCode;

use kernstep::analysis::AnalysisOptions;
use kernstep::formats::analysis::{analyze, Probe};
use kernstep::formats::tagged;
use kernstep::scenario::PlanInput;
use kernstep::text::analysis_text;

use super::args::AnalyzeArgs;
use super::common::interrupted;

/// Loads the model, analyses its matrix and prints the figures.
pub fn run(args: &AnalyzeArgs) -> anyhow::Result<ExitCode> {
    let model = PlanInput::load(&args.model)?.into_model();
    let options = AnalysisOptions::new().subdet_limit(args.subdet_limit);
    let probe = args.estimate.map(|time| Probe {
        time,
        up_to: args.up_to,
        cancel: Some(interrupted()),
    });
    let report = analyze(&model, &args.model.display().to_string(), &options, probe)?;
    let mut out = io::stdout().lock();
    if args.json {
        writeln!(out, "{}", tagged::pretty(&report)?)?;
    } else {
        out.write_all(analysis_text(&report, &model).as_bytes())?;
    }
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}
