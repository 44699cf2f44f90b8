//! Days files: read in the layout their extension and the input call for, every day for
//! `batch`, or one day picked by name for `solve` and `trace` on a scenario.

use std::path::Path;

use anyhow::Context;
use kernstep::scenario::{day_named, parse_csv, parse_day_lines, PlanInput, Scenario};
use kernstep::solve::{parse_lines, ParsedLine, Variant};

/// At most this many day names are listed when a day is not found.
const NAMES_SHOWN: usize = 8;

/// Reads the days file in the layout its extension and the input call for.
pub(super) fn read_days(input: &PlanInput, path: &Path) -> anyhow::Result<Vec<ParsedLine>> {
    let text = read_text(path)?;
    let origin = path.display().to_string();
    Ok(match input {
        PlanInput::Scenario(s, _) => scenario_days(s, &text, path),
        PlanInput::Model(_) if is_csv(path) => anyhow::bail!(
            "{origin}: CSV days name scenario fields; for a model file write JSON Lines variants"
        ),
        PlanInput::Model(_) => parse_lines(&text, &origin),
    })
}

/// The day named `day` of the scenario's days file at `path` (default: the first entry of
/// the file). A bad line of that day is reported as `batch` reports it (file, line, field);
/// a day the file does not name is an error naming the file and the day.
pub(super) fn pick_day(
    scenario: &Scenario,
    path: &Path,
    day: Option<&str>,
) -> anyhow::Result<Variant> {
    let text = read_text(path)?;
    let origin = path.display().to_string();
    let days = scenario_days(scenario, &text, path);
    let Some(day) = day else {
        return match days.into_iter().next() {
            Some((_, parsed)) => Ok(parsed?),
            None => anyhow::bail!("{origin}: the file holds no day"),
        };
    };
    let rows: Vec<&str> = text.lines().collect();
    let mut shown = Shown::default();
    let mut bad_day = None;
    let mut illegible = None;
    let mut other_bad = None;
    for (line, parsed) in days {
        match parsed {
            Ok(v) if v.id == day => return Ok(v),
            Ok(v) => shown.note(v.id),
            // A bad entry is this day's when its line names the day (an empty CSV file's error
            // is numbered 1, past its last line).
            Err(e) => match rows
                .get(line - 1)
                .and_then(|row| day_named(row, is_csv(path)))
            {
                Some(name) if name == day => bad_day = bad_day.or(Some(e)),
                Some(name) => {
                    shown.note(name);
                    other_bad = other_bad.or(Some(e));
                }
                None => illegible = illegible.or(Some(e)),
            },
        }
    }
    if let Some(e) = bad_day {
        return Err(e.into());
    }
    // The first bad line, when there is one, preferring one whose day cannot be read.
    let bad = illegible.or(other_bad);
    let readable = if bad.is_some() { "readable " } else { "" };
    let mut missing = format!("{origin}: no {readable}day named {day:?}");
    if !shown.names.is_empty() {
        let more = if shown.more { ", ..." } else { "" };
        missing.push_str(&format!(" (days: {}{more})", shown.names.join(", ")));
    }
    match bad {
        Some(e) => Err(anyhow::Error::new(e).context(missing)),
        None => anyhow::bail!(missing),
    }
}

/// The first few distinct day names of a file, for the message about a missing day.
#[derive(Default)]
struct Shown {
    names: Vec<String>,
    more: bool,
}

impl Shown {
    fn note(&mut self, name: String) {
        if self.names.contains(&name) {
            return;
        }
        if self.names.len() < NAMES_SHOWN {
            self.names.push(name);
        } else {
            self.more = true;
        }
    }
}

fn read_text(path: &Path) -> anyhow::Result<String> {
    kernstep::input::read_text(path).with_context(|| format!("reading {}", path.display()))
}

/// A scenario's days from the text of `path`: CSV rows for a `.csv` file, else JSON Lines.
fn scenario_days(scenario: &Scenario, text: &str, path: &Path) -> Vec<ParsedLine> {
    let origin = path.display().to_string();
    if is_csv(path) {
        parse_csv(scenario, text, &origin)
    } else {
        parse_day_lines(scenario, text, &origin)
    }
}

fn is_csv(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"))
}
