//! SVG plots of a solve's progress: the violation per step in phase I and the cost per step in
//! phase II, each in its own panel, one marked point per augmenting step, under a line that
//! says how the solve ended. A phase I that ended outside the box is marked with a cross at its
//! last point; a partial set's dual bound is a dashed line in the cost panel. Both axes hold
//! integers, so their ticks are integers chosen here (distinct, at most a handful per axis).

use std::ops::Range;

use plotters::prelude::*;

use super::document::{StepPhase, StepRecord, TraceDocument};
use super::outcome::Outcome;
use crate::error::{Error, Result};

/// Size of the picture in pixels.
const SIZE: (u32, u32) = (900, 560);

/// At most this many ticks on the step axis.
const STEP_TICKS: usize = 10;

/// At most this many ticks on a value axis (a panel is half the picture's height).
const VALUE_TICKS: usize = 8;

/// The status line is cut to this many characters.
const STATUS_CHARS: usize = 110;

/// One panel's data: the value before the phase's first step, then one point per step.
struct Series {
    label: &'static str,
    colour: RGBColor,
    start: (i64, i128),
    points: Vec<(i64, i128)>,
    /// A horizontal line: the dual bound, in the cost panel.
    bound: Option<i128>,
    /// A cross at the last point, with its label: phase I ended outside the box.
    end: Option<&'static str>,
}

/// The SVG picture of the trace `doc`, headed by `title`: its steps, the status and, where
/// they apply, the infeasible end of phase I and the dual bound.
pub fn step_plot(doc: &TraceDocument, title: &str) -> Result<String> {
    let mut panels = panels(doc);
    mark(&mut panels, doc);
    let total = i64::try_from(doc.steps.len().max(1)).unwrap_or(i64::MAX);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE).map_err(draw_error)?;
        let root = root.titled(title, ("sans-serif", 20)).map_err(draw_error)?;
        let (line, root) = root.split_vertically(28);
        line.draw(&Text::new(
            status_line(&doc.outcome),
            (40, 4),
            ("sans-serif", 15),
        ))
        .map_err(draw_error)?;
        if panels.is_empty() {
            root.draw(&Text::new(
                "no augmenting steps",
                (40, 30),
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

/// `status: ...`, cut to [`STATUS_CHARS`] characters.
fn status_line(outcome: &Outcome) -> String {
    let text = format!("status: {outcome}");
    if text.chars().count() <= STATUS_CHARS {
        return text;
    }
    let kept: String = text.chars().take(STATUS_CHARS - 1).collect();
    format!("{kept}…")
}

/// The panels of `doc`: one per phase with steps, and, for a phase without steps, one of the
/// start point alone when there is something to mark on it (phase I ending outside the box,
/// a dual bound on the plan's cost).
fn panels(doc: &TraceDocument) -> Vec<Series> {
    let alone = |phase, value: i128| Series {
        start: (0, value),
        points: Vec::new(),
        ..blank(phase)
    };
    let feasibility = series(&doc.steps, StepPhase::Feasibility).or_else(|| {
        let violation = doc.violation.filter(|v| v.parts().0 > 0)?;
        Some(alone(StepPhase::Feasibility, violation.parts().0))
    });
    let cost = series(&doc.steps, StepPhase::Cost).or_else(|| {
        doc.bound.as_ref()?;
        Some(alone(StepPhase::Cost, doc.objective?.parts().0))
    });
    feasibility.into_iter().chain(cost).collect()
}

/// Adds the dual bound to the cost panel and, when phase I ended above zero violation, the
/// cross at its last point, labelled by what the end means.
fn mark(panels: &mut [Series], doc: &TraceDocument) {
    let end = match doc.outcome {
        Outcome::NoIntegerSolution { .. }
        | Outcome::EmptyRange { .. }
        | Outcome::NoLatticePointInBox { .. }
        | Outcome::InfeasibleCut { .. } => Some("infeasible"),
        Outcome::InfeasibleUnproven { .. } => Some("no plan found (not a proof)"),
        Outcome::StepLimit | Outcome::Cancelled => Some("stopped outside the box"),
        _ => None,
    };
    for panel in panels.iter_mut() {
        if panel.label == COST {
            panel.bound = doc.bound.as_ref().and_then(|b| b.value.parse().ok());
        } else if panel.points.last().unwrap_or(&panel.start).1 > 0 {
            panel.end = end;
        }
    }
}

/// The label of the cost panel.
const COST: &str = "cost (phase II)";

/// The panel of `phase` with no points yet.
fn blank(phase: StepPhase) -> Series {
    let (label, colour) = match phase {
        StepPhase::Feasibility => ("violation (phase I)", RGBColor(200, 80, 40)),
        StepPhase::Cost => (COST, RGBColor(30, 90, 180)),
    };
    Series {
        label,
        colour,
        start: (0, 0),
        points: Vec::new(),
        bound: None,
        end: None,
    }
}

/// The panel of the steps of `phase`, if it has any.
fn series(steps: &[StepRecord], phase: StepPhase) -> Option<Series> {
    let first = steps.iter().position(|s| s.phase == phase)?;
    Some(Series {
        start: (step_number(first), steps[first].before.parts().0),
        points: steps
            .iter()
            .filter(|s| s.phase == phase)
            .map(|s| (step_number(s.step), s.after.parts().0))
            .collect(),
        ..blank(phase)
    })
}

fn draw_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    panel: &Series,
    steps: i64,
) -> Result<()>
where
    DB::ErrorType: 'static,
{
    let (low, high) = value_extent(panel);
    let step_ticks = integer_ticks(0, i128::from(steps), STEP_TICKS)
        .into_iter()
        .filter_map(|t| i64::try_from(t).ok())
        .collect();
    let mut chart = ChartBuilder::on(area)
        .margin(12)
        .x_label_area_size(36)
        .y_label_area_size(80)
        .build_cartesian_2d(
            (0..steps).with_key_points(step_ticks),
            padded(low, high).with_key_points(integer_ticks(low, high, VALUE_TICKS)),
        )
        .map_err(draw_error)?;
    chart
        .configure_mesh()
        .x_desc("step")
        .y_desc(panel.label)
        .x_label_formatter(&|v| v.to_string())
        .y_label_formatter(&|v| v.to_string())
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
    if panel.points.is_empty() {
        let start =
            EmptyElement::at(panel.start) + Circle::new((0, 0), 5, panel.colour.stroke_width(2));
        chart.draw_series([start]).map_err(draw_error)?;
    }
    if let Some(bound) = panel.bound {
        let grey = RGBColor(90, 90, 90);
        chart
            .draw_series(DashedLineSeries::new(
                [(0, bound), (steps, bound)],
                8,
                6,
                grey.stroke_width(2),
            ))
            .map_err(draw_error)?;
        let label = format!("dual bound {bound}");
        let label = EmptyElement::at((0, bound)) + Text::new(label, (6, -18), ("sans-serif", 13));
        chart.draw_series([label]).map_err(draw_error)?;
    }
    if let Some(label) = panel.end {
        let at = panel.points.last().copied().unwrap_or(panel.start);
        let red = RGBColor(190, 20, 20);
        let font = ("sans-serif", 14).into_font().color(&red);
        let mark = EmptyElement::at(at)
            + Cross::new((0, 0), 9, red.stroke_width(3))
            + Text::new(label, (14, -20), font);
        chart.draw_series([mark]).map_err(draw_error)?;
    }
    Ok(())
}

/// A step number as a plot coordinate (a trace never holds 2^63 steps).
fn step_number(step: usize) -> i64 {
    i64::try_from(step).unwrap_or(i64::MAX)
}

/// The smallest and the largest value of a panel, its bound included.
fn value_extent(panel: &Series) -> (i128, i128) {
    let values = std::iter::once(panel.start.1)
        .chain(panel.points.iter().map(|p| p.1))
        .chain(panel.bound);
    values.fold((i128::MAX, i128::MIN), |(l, h), v| (l.min(v), h.max(v)))
}

/// `low..high` widened by about 8% of its length on each side (at least 1), so that no point
/// sits on the frame.
pub(super) fn padded(low: i128, high: i128) -> Range<i128> {
    let pad = (high.abs_diff(low) / 12).max(1);
    let pad = i128::try_from(pad).unwrap_or(i128::MAX);
    low.saturating_sub(pad)..high.saturating_add(pad)
}

/// Tick positions for an integer axis showing `low..=high` (`low <= high`): the multiples of
/// the smallest step of the form 1, 2 or 5 times a power of ten that puts at most `most`
/// (at least 1) of them in the range, in increasing order; `low` alone where that step has no
/// multiple in the range (a range of one value, or a narrow range and `most` = 1).
pub(super) fn integer_ticks(low: i128, high: i128, most: usize) -> Vec<i128> {
    let most = u128::try_from(most.max(1)).unwrap_or(u128::MAX);
    let mut decade: i128 = 1;
    loop {
        for factor in [1, 2, 5] {
            let Some(step) = decade.checked_mul(factor) else {
                return vec![low];
            };
            let first = low.div_euclid(step) + i128::from(low.rem_euclid(step) != 0);
            let last = high.div_euclid(step);
            if first > last {
                return vec![low];
            }
            if last.abs_diff(first) < most {
                return (first..=last).map(|k| k * step).collect();
            }
        }
        match decade.checked_mul(10) {
            Some(next) => decade = next,
            None => return vec![low],
        }
    }
}

/// A drawing failure as the library's error.
pub(super) fn draw_error<E: std::error::Error + Send + Sync + 'static>(
    e: DrawingAreaErrorKind<E>,
) -> Error {
    Error::Unsupported(format!("drawing the plot: {e}"))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Checks the rules every tick list must keep and returns the list.
    fn checked(low: i128, high: i128, most: usize) -> Vec<i128> {
        let ticks = integer_ticks(low, high, most);
        assert!(!ticks.is_empty(), "{low}..={high}: no ticks");
        assert!(ticks.len() <= most, "{low}..={high}: {ticks:?}");
        assert!(ticks.windows(2).all(|w| w[0] < w[1]), "{ticks:?}");
        assert!(ticks.iter().all(|t| (low..=high).contains(t)), "{ticks:?}");
        ticks
    }

    #[test]
    fn small_ranges_get_every_integer() {
        assert_eq!(checked(0, 0, 8), vec![0]);
        assert_eq!(checked(-3, -3, 8), vec![-3]);
        assert_eq!(checked(0, 1, 8), vec![0, 1]);
        assert_eq!(checked(-1, 0, 8), vec![-1, 0]);
        assert_eq!(checked(3, 7, 8), vec![3, 4, 5, 6, 7]);
        assert_eq!(checked(0, 7, 8), (0..=7).collect::<Vec<_>>());
    }

    #[test]
    fn wider_ranges_step_by_one_two_or_five_times_a_power_of_ten() {
        assert_eq!(checked(0, 8, 8), vec![0, 2, 4, 6, 8]);
        assert_eq!(checked(0, 10, 10), vec![0, 2, 4, 6, 8, 10]);
        assert_eq!(checked(-7, 12, 8), vec![-5, 0, 5, 10]);
        assert_eq!(checked(44, 138, 8), vec![60, 80, 100, 120]);
        assert_eq!(checked(1, 9, 1), vec![5]);
        assert_eq!(
            checked(1_234_567, 9_876_543, 8),
            (2..=9).map(|k| k * 1_000_000).collect::<Vec<_>>()
        );
    }

    #[test]
    fn huge_ranges_keep_few_ticks() {
        let ticks = checked(i128::MIN, i128::MAX, 8);
        assert!(ticks.len() >= 2, "{ticks:?}");
        assert!(ticks.contains(&0));
        let ticks = checked(i128::MAX - 3, i128::MAX, 8);
        assert_eq!(ticks.len(), 4);
        let ticks = checked(-(10_i128.pow(30)), 10_i128.pow(30), 8);
        assert_eq!(ticks.len(), 5, "{ticks:?}");
    }

    #[test]
    fn padding_widens_both_sides_and_saturates() {
        assert_eq!(padded(0, 0), -1..1);
        assert_eq!(padded(0, 120), -10..130);
        assert_eq!(padded(i128::MIN, i128::MAX), i128::MIN..i128::MAX);
    }
}
