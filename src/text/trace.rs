//! A trace in words: the start point, the table of augmenting steps with each signed move by
//! name, the final point, the status and the certificate (what `kernstep trace` prints).

use std::fmt::Write;

use super::layout::{wrap_units, wrapped};
use super::sense::in_file_sense;
use super::solve::{bound_text, set_text, WIDTH};
use crate::model::{Model, Units};
use crate::testset::Served;
use crate::trace::{certificate_words, terms, Decimal, StepPhase, StepRecord, TraceDocument};

/// A move column narrower than this moves below the step's numbers.
const MIN_MOVE_WIDTH: usize = 28;
/// A move is elided after this many lines.
const MOVE_LINES: usize = 3;

/// The trace `doc` of the instance called `title`, solved with `set` on `model`; `warm` when
/// it started from a previous plan.
pub fn trace_text(
    doc: &TraceDocument,
    title: &str,
    warm: bool,
    set: &Served,
    model: &Model,
) -> String {
    let mut head = format!("trace of {title}");
    if warm {
        head.push_str(", warm start");
    }
    let mut out = wrapped(&head, WIDTH, 0);
    out.push_str(&wrapped(&format!("moves: {}", set_text(set)), WIDTH, 2));
    let units = &model.units;
    if let Some(start) = &doc.start {
        out.push_str(&point_text("start point", start, doc, units));
    }
    if !doc.steps.is_empty() {
        out.push('\n');
        out.push_str(&steps_text(&doc.steps, units.own(&doc.variables), units));
        out.push('\n');
    }
    if let Some(x) = &doc.x {
        out.push_str(&point_text("final point", x, doc, units));
    }
    let status = in_file_sense(doc.outcome.to_string(), units);
    let _ = writeln!(out, "status: {status}");
    let time = format!("{:.3} ms", doc.seconds * 1e3);
    let _ = writeln!(out, "steps: {} in {time}", doc.steps.len());
    let objective = doc.objective.and_then(Decimal::integer);
    if let Some((bound, objective)) = doc.bound.as_ref().zip(objective) {
        if let Some(bound) = bound.in_units(objective, units) {
            let bound = in_file_sense(bound_text(&bound), units);
            let _ = writeln!(out, "dual bound: {bound}");
        }
    }
    let words = certificate_words(&doc.outcome, doc.recheck.as_ref(), model);
    out.push_str(&wrapped(&in_file_sense(words, units), WIDTH, 2));
    out
}

/// `start point: violation 14, cost 52: +7 brackwater_east, ...`, wrapped; the cost and the
/// named values in the model file's `units` (its own columns only).
fn point_text(label: &str, x: &[i64], doc: &TraceDocument, units: &Units) -> String {
    let violation: i128 = x
        .iter()
        .enumerate()
        .map(|(i, &v)| {
            let v = i128::from(v);
            let below = doc.lower[i].map_or(0, |l| (i128::from(l) - v).max(0));
            let above = doc.upper[i].map_or(0, |u| (v - i128::from(u)).max(0));
            below + above
        })
        .sum();
    let cost = doc.cost_at(x).and_then(|c| units.objective(c).ok());
    let cost = cost.map_or("beyond 128 bits".to_string(), |c| c.to_string());
    let head = format!("{label}: violation {violation}, cost {cost}:");
    let mut words: Vec<String> = head.split(' ').map(str::to_string).collect();
    let entries = terms(units.own(x), units.own(&doc.variables));
    if entries.is_empty() {
        words.push("every variable 0".to_string());
    }
    let last = entries.len().saturating_sub(1);
    words.extend(entries.into_iter().enumerate().map(
        |(i, e)| {
            if i < last {
                format!("{e},")
            } else {
                e
            }
        },
    ));
    let mut out = String::new();
    for line in wrap_units(words.iter().map(String::as_str), WIDTH, 2) {
        let _ = writeln!(out, "{line}");
    }
    out
}

/// A step's values before and after it and its gain: a violation as it is, a cost in the
/// file's `units` (the gain, an improvement, stays positive).
fn step_values(step: &StepRecord, units: &Units) -> [String; 3] {
    let cost = step.phase == StepPhase::Cost;
    let value = |v: Decimal| match v.integer().filter(|_| cost) {
        Some(v) => units
            .objective(v)
            .map_or_else(|_| v.to_string(), |f| f.to_string()),
        None => v.to_string(),
    };
    let gain = (step.gain.integer().filter(|_| cost))
        .and_then(|g| Decimal::scaled(g, units.cost_scale))
        .unwrap_or(step.gain);
    [value(step.before), value(step.after), gain.to_string()]
}

/// The step table: numbers in aligned columns (costs in the file's `units`), the signed move
/// by name on the right (the columns `names` names: the file's own).
fn steps_text(steps: &[StepRecord], names: &[String], units: &Units) -> String {
    let rows: Vec<[String; 6]> = steps
        .iter()
        .map(|s| {
            let [before, after, gain] = step_values(s, units);
            [
                s.step.to_string(),
                phase_name(s.phase).to_string(),
                s.length.to_string(),
                before,
                after,
                gain,
            ]
        })
        .collect();
    let header = ["step", "phase", "length", "before", "after", "gain"];
    let mut widths = header.map(str::len);
    for row in &rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(cell.len());
        }
    }
    let prefix: usize = widths.iter().map(|w| w + 2).sum();
    if WIDTH.saturating_sub(prefix) < MIN_MOVE_WIDTH {
        return stacked_text(steps, &rows, names);
    }
    let line = |cells: [&str; 6]| -> String {
        let mut text = String::new();
        for (i, (cell, w)) in cells.iter().zip(widths).enumerate() {
            if i == 1 {
                let _ = write!(text, "{cell:<w$}  ");
            } else {
                let _ = write!(text, "{cell:>w$}  ");
            }
        }
        text
    };
    let mut out = String::new();
    let _ = writeln!(out, "{}move (signed; added `length` times)", line(header));
    for (row, step) in rows.iter().zip(steps) {
        let cells = [0, 1, 2, 3, 4, 5].map(|i| row[i].as_str());
        let lines = move_lines(
            &terms(&step.direction[..names.len()], names),
            WIDTH - prefix,
        );
        let _ = writeln!(out, "{}{}", line(cells), lines[0]);
        for rest in &lines[1..] {
            let _ = writeln!(out, "{:prefix$}{rest}", "");
        }
    }
    out
}

/// One block per step, for numbers too wide for the table.
fn stacked_text(steps: &[StepRecord], rows: &[[String; 6]], names: &[String]) -> String {
    let mut out = String::new();
    for (row, step) in rows.iter().zip(steps) {
        let _ = writeln!(out, "step {}  {}  length {}", row[0], row[1], row[2]);
        let _ = writeln!(out, "  before  {}", row[3]);
        let _ = writeln!(out, "  after   {}", row[4]);
        let _ = writeln!(out, "  gain    {}", row[5]);
        let lines = move_lines(&terms(&step.direction[..names.len()], names), WIDTH - 10);
        let _ = writeln!(out, "  move    {}", lines[0]);
        for rest in &lines[1..] {
            let _ = writeln!(out, "{:10}{rest}", "");
        }
    }
    out
}

fn phase_name(phase: StepPhase) -> &'static str {
    match phase {
        StepPhase::Feasibility => "feasibility",
        StepPhase::Cost => "cost",
    }
}

/// The move's entries joined by `, ` in lines of at most `width` characters, at most
/// [`MOVE_LINES`] of them; what does not fit is counted as `... +k more`.
fn move_lines(entries: &[String], width: usize) -> Vec<String> {
    let pieces: Vec<String> = entries
        .iter()
        .enumerate()
        .map(|(i, e)| {
            let piece = if i + 1 < entries.len() {
                format!("{e},")
            } else {
                e.clone()
            };
            elide(&piece, width)
        })
        .collect();
    let mut lines: Vec<Vec<&str>> = vec![Vec::new()];
    for (i, piece) in pieces.iter().enumerate() {
        let current = lines.last().map_or(0, |l| joined_len(l));
        if current > 0 && current + 1 + piece.chars().count() > width {
            if lines.len() == MOVE_LINES {
                return finish_elided(lines, pieces.len() - i, width);
            }
            lines.push(Vec::new());
        }
        if let Some(last) = lines.last_mut() {
            last.push(piece);
        }
    }
    lines.into_iter().map(|l| l.join(" ")).collect()
}

/// Closes the last line with `... +k more`, dropping entries from it until the note fits.
fn finish_elided(mut lines: Vec<Vec<&str>>, mut left: usize, width: usize) -> Vec<String> {
    loop {
        let note = format!("... +{left} more");
        let last = lines.last_mut().map_or(0, |l| joined_len(l));
        let fits = last + 1 + note.len() <= width;
        match lines.last_mut() {
            Some(l) if !fits && l.len() > 1 => {
                l.pop();
                left += 1;
            }
            _ => {
                let mut out: Vec<String> = lines.iter().map(|l| l.join(" ")).collect();
                if let Some(last) = out.last_mut() {
                    last.push(' ');
                    last.push_str(&note);
                }
                return out;
            }
        }
    }
}

fn joined_len(pieces: &[&str]) -> usize {
    let chars: usize = pieces.iter().map(|p| p.chars().count()).sum();
    chars + pieces.len().saturating_sub(1)
}

/// `text` cut to `width` characters, with `…` marking the cut.
fn elide(text: &str, width: usize) -> String {
    if text.chars().count() <= width {
        return text.to_string();
    }
    let kept: String = text.chars().take(width.saturating_sub(1)).collect();
    format!("{kept}…")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn entries(n: usize) -> Vec<String> {
        (0..n).map(|i| format!("+1 lane_{i:02}")).collect()
    }

    #[test]
    fn short_moves_stay_on_one_line() {
        assert_eq!(move_lines(&entries(2), 40), ["+1 lane_00, +1 lane_01"]);
    }

    #[test]
    fn long_moves_wrap_then_elide_within_the_width() {
        let lines = move_lines(&entries(40), 30);
        assert_eq!(lines.len(), MOVE_LINES);
        assert!(lines.iter().all(|l| l.chars().count() <= 30), "{lines:?}");
        let last = lines.last().unwrap();
        let shown: usize = lines.iter().map(|l| l.matches("lane_").count()).sum();
        assert!(
            last.ends_with(&format!("... +{} more", 40 - shown)),
            "{last}"
        );
    }
}
