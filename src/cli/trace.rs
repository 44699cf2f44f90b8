//! `kernstep trace MODEL`: solve one instance with the trace on and show every augmenting
//! step, the start and final points and the certificate; `--json` prints the replayable
//! document, `--svg` draws the steps.

use std::io::{self, Write};
use std::path::PathBuf;
use std::process::ExitCode;

use clap::Args;
use kernstep::formats::tagged;
use kernstep::text::trace_text;
use kernstep::trace::{step_plot, Instance};

use super::common::write_atomically;
use super::instance::{cancelled, InstanceArgs};
use super::solve::exit_code;

/// Arguments of `trace`.
#[derive(Debug, Args)]
pub struct TraceArgs {
    #[command(flatten)]
    pub instance: InstanceArgs,
    /// Print the replayable JSON document (layout in the README) instead of the steps.
    #[arg(long)]
    pub json: bool,
    /// Also draw the violation and cost per step as an SVG picture in FILE.
    #[arg(long, value_name = "FILE")]
    pub svg: Option<PathBuf>,
}

/// Solves the instance with the trace on and prints it.
pub fn run(args: &TraceArgs) -> anyhow::Result<ExitCode> {
    let instance = args.instance.load(None)?;
    let doc = instance.trace(&cancelled)?;
    let title = title(&instance);
    if let Some(path) = &args.svg {
        write_atomically(path, step_plot(&doc, &title)?.as_bytes())?;
    }
    let mut out = io::stdout().lock();
    if args.json {
        writeln!(out, "{}", tagged::pretty(&doc)?)?;
    } else {
        let warm = instance.warm.is_some();
        let text = trace_text(&doc, &title, warm, &instance.set, &instance.model);
        out.write_all(text.as_bytes())?;
        if let Some(path) = &args.svg {
            writeln!(out, "plot written to {}", path.display())?;
        }
    }
    out.flush()?;
    Ok(exit_code(&doc.outcome))
}

/// `model` or `model / variant`: the trace's heading and the plot's title.
fn title(instance: &Instance) -> String {
    match &instance.variant {
        Some(id) => format!("{} / {id}", instance.path),
        None => instance.path.clone(),
    }
}
