//! SVG plots of a solve's progress: the violation per step in phase I and the cost per step in
//! phase II, each in its own panel, one marked point per augmenting step.

use std::ops::Range;
use std::path::Path;

use kernstep::trace::{StepPhase, StepRecord};
use plotters::prelude::*;

use super::common::write_atomically;

/// Size of the picture in pixels.
const SIZE: (u32, u32) = (900, 560);

/// One panel's data: the value before the phase's first step, then one point per step.
struct Series {
    label: &'static str,
    colour: RGBColor,
    start: (i64, f64),
    points: Vec<(i64, f64)>,
}

/// Draws the steps of a trace as an SVG and writes it to `path` atomically (a temporary file
/// beside it, then a rename); `title` heads the picture.
pub fn write_step_plot(path: &Path, steps: &[StepRecord], title: &str) -> anyhow::Result<()> {
    write_atomically(path, render(steps, title)?.as_bytes())
}

/// The SVG text of the plot.
fn render(steps: &[StepRecord], title: &str) -> anyhow::Result<String> {
    let panels: Vec<Series> = [
        series(steps, StepPhase::Feasibility),
        series(steps, StepPhase::Cost),
    ]
    .into_iter()
    .flatten()
    .collect();
    let total = i64::try_from(steps.len().max(1)).unwrap_or(i64::MAX);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE).map_err(draw_error)?;
        let root = root.titled(title, ("sans-serif", 20)).map_err(draw_error)?;
        if panels.is_empty() {
            root.draw(&Text::new(
                "no augmenting steps: the start point was already optimal",
                (40, 60),
                ("sans-serif", 16),
            ))
            .map_err(draw_error)?;
        }
        let areas = root.split_evenly((panels.len().max(1), 1));
        for (area, panel) in areas.iter().zip(&panels) {
            draw_panel(area, panel, total)?;
        }
        root.present().map_err(draw_error)?;
    }
    Ok(svg)
}

fn series(steps: &[StepRecord], phase: StepPhase) -> Option<Series> {
    let first = steps.iter().position(|s| s.phase == phase)?;
    let (label, colour) = match phase {
        StepPhase::Feasibility => ("violation (phase I)", RGBColor(200, 80, 40)),
        StepPhase::Cost => ("cost (phase II)", RGBColor(30, 90, 180)),
    };
    Some(Series {
        label,
        colour,
        start: (step_number(first), steps[first].before.0 as f64),
        points: steps
            .iter()
            .filter(|s| s.phase == phase)
            .map(|s| (step_number(s.step), s.after.0 as f64))
            .collect(),
    })
}

fn draw_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    panel: &Series,
    steps: i64,
) -> anyhow::Result<()>
where
    DB::ErrorType: 'static,
{
    let mut chart = ChartBuilder::on(area)
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(80)
        .build_cartesian_2d(0..steps, value_range(panel))
        .map_err(draw_error)?;
    chart
        .configure_mesh()
        .x_desc("step")
        .y_desc(panel.label)
        .y_label_formatter(&|v| format!("{v:.0}"))
        .draw()
        .map_err(draw_error)?;
    let line = std::iter::once(panel.start).chain(panel.points.iter().copied());
    chart
        .draw_series(LineSeries::new(line, panel.colour.stroke_width(2)))
        .map_err(draw_error)?;
    chart
        .draw_series(
            panel
                .points
                .iter()
                .map(|&p| Circle::new(p, 4, panel.colour.filled())),
        )
        .map_err(draw_error)?;
    Ok(())
}

/// A step number as a plot coordinate (a trace never holds 2^63 steps).
fn step_number(step: usize) -> i64 {
    i64::try_from(step).unwrap_or(i64::MAX)
}

/// The values' range, widened a little so that no point sits on the frame.
fn value_range(panel: &Series) -> Range<f64> {
    let values = std::iter::once(panel.start.1).chain(panel.points.iter().map(|p| p.1));
    let (low, high) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), v| {
        (l.min(v), h.max(v))
    });
    let pad = ((high - low) * 0.08).max(1.0);
    (low - pad)..(high + pad)
}

fn draw_error<E: std::error::Error + Send + Sync + 'static>(
    e: DrawingAreaErrorKind<E>,
) -> anyhow::Error {
    anyhow::anyhow!("drawing the plot: {e}")
}
