//! The SVG picture of the price of stability of one day: plan cost against units moved, one
//! marked point per piece of the curve (the plan optimal from that price on), joined in order
//! of rising price, each labelled with the price where its piece starts. The points lie on
//! the lower-left frontier of the (units moved, plan cost) pairs: a higher price moves fewer
//! units at a higher plan cost.

use plotters::prelude::*;

use super::plot::{draw_error, integer_ticks, padded};
use crate::error::{Error, Result};
use crate::scenario::CurvePiece;

/// Size of the picture in pixels.
const SIZE: (u32, u32) = (900, 560);

/// At most this many ticks on an axis.
const TICKS: usize = 8;

/// The SVG picture of the curve `pieces` (by rising price, as
/// [`crate::trace::Instance::stability_curve`] gives them), headed by `title`.
pub fn curve_plot(pieces: &[CurvePiece], title: &str) -> Result<String> {
    let points = pieces
        .iter()
        .map(|p| {
            let moved = i128::try_from(p.figures.moved)
                .map_err(|_| Error::Overflow("the units moved, for the plot".into()))?;
            Ok((moved, p.figures.plan_cost, p.from.to_string()))
        })
        .collect::<Result<Vec<(i128, i128, String)>>>()?;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE).map_err(draw_error)?;
        let root = root.titled(title, ("sans-serif", 20)).map_err(draw_error)?;
        if points.is_empty() {
            root.draw(&Text::new("no piece", (40, 30), ("sans-serif", 16)))
                .map_err(draw_error)?;
        } else {
            draw_curve(&root, &points)?;
        }
        root.present().map_err(draw_error)?;
    }
    Ok(svg)
}

/// Draws the points `(units moved, plan cost, price where the piece starts)` on `area`.
fn draw_curve<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    points: &[(i128, i128, String)],
) -> Result<()>
where
    DB::ErrorType: 'static,
{
    let extent = |values: &mut dyn Iterator<Item = i128>| {
        values.fold((i128::MAX, i128::MIN), |(l, h), v| (l.min(v), h.max(v)))
    };
    let (x_low, x_high) = extent(&mut points.iter().map(|p| p.0));
    let (y_low, y_high) = extent(&mut points.iter().map(|p| p.1));
    let mut chart = ChartBuilder::on(area)
        .margin(16)
        .x_label_area_size(40)
        .y_label_area_size(90)
        .build_cartesian_2d(
            padded(x_low, x_high).with_key_points(integer_ticks(x_low, x_high, TICKS)),
            padded(y_low, y_high).with_key_points(integer_ticks(y_low, y_high, TICKS)),
        )
        .map_err(draw_error)?;
    chart
        .configure_mesh()
        .x_desc("units moved against the previous plan")
        .y_desc("plan cost")
        .x_label_formatter(&|v| v.to_string())
        .y_label_formatter(&|v| v.to_string())
        .draw()
        .map_err(draw_error)?;
    let blue = RGBColor(30, 90, 170);
    chart
        .draw_series(LineSeries::new(
            points.iter().map(|p| (p.0, p.1)),
            blue.stroke_width(2),
        ))
        .map_err(draw_error)?;
    chart
        .draw_series(points.iter().map(|(x, y, from)| {
            EmptyElement::at((*x, *y))
                + Circle::new((0, 0), 5, blue.filled())
                + Text::new(format!("from {from}"), (8, -18), ("sans-serif", 13))
        }))
        .map_err(draw_error)?;
    Ok(())
}
