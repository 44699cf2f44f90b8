//! Days files as a whole: every day of a file in the layout its extension and the input call
//! for, or one day (one variant of a model file) picked by name.

use std::path::Path;

use super::days::{day_named, parse_csv, parse_day_lines};
use super::{PlanInput, Scenario};
use crate::error::{Error, Result};
use crate::input::{is_stdin, read_text, syntax_path};
use crate::solve::{parse_lines, ParsedLine, Variant};

/// At most this many day names are listed when a day is not found.
const NAMES_SHOWN: usize = 8;

/// Every day of the days file at `path` for `input`: for a scenario CSV rows (`.csv`) or
/// JSON Lines of changes by name, for a model file JSON Lines of numeric variants. A file
/// without a single day is an error.
pub fn read_days(input: &PlanInput, path: &Path) -> Result<Vec<ParsedLine>> {
    let text = read_text(path)?;
    let origin = path.display().to_string();
    let days = every_day(input, path, &text)?;
    if days.is_empty() {
        return Err(missing(&origin, "file", "holds no day".to_string()));
    }
    Ok(days)
}

/// The entries of the days `text` read from `path`.
fn every_day(input: &PlanInput, path: &Path, text: &str) -> Result<Vec<ParsedLine>> {
    let origin = path.display().to_string();
    match input {
        PlanInput::Scenario(s, _) => Ok(scenario_days(s, text, path)),
        PlanInput::Model(_) if is_csv(path, text) => Err(Error::Input {
            file: origin,
            field: "file".to_string(),
            message: "CSV days name scenario fields; for a model file write JSON Lines variants"
                .to_string(),
        }),
        PlanInput::Model(_) => Ok(parse_lines(text, &origin)),
    }
}

/// The day named `day` of the scenario's days file at `path` (default: the file's first
/// entry). A bad line of that day is reported as a batch reports it (file, line, field); a
/// day the file does not name is an error naming the file, the day and the days it holds.
pub fn pick_day(scenario: &Scenario, path: &Path, day: Option<&str>) -> Result<Variant> {
    let text = read_text(path)?;
    let origin = path.display().to_string();
    let days = scenario_days(scenario, &text, path);
    let Some(day) = day else {
        return match days.into_iter().next() {
            Some((_, parsed)) => parsed,
            None => Err(missing(&origin, "file", "holds no day".to_string())),
        };
    };
    let rows: Vec<&str> = text.lines().collect();
    let mut shown = Shown::default();
    let (mut bad_day, mut illegible, mut other_bad) = (None, None, None);
    for (line, parsed) in days {
        match parsed {
            Ok(v) if v.id == day => return Ok(v),
            Ok(v) => shown.note(v.id),
            // A bad entry is this day's when its line names the day (an empty CSV file's error
            // is numbered 1, past its last line).
            Err(e) => match rows
                .get(line - 1)
                .and_then(|row| day_named(row, is_csv(path, &text)))
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
        return Err(e);
    }
    // The first bad line, when there is one, preferring one whose day cannot be read.
    let bad = illegible.or(other_bad);
    let mut text = match bad {
        Some(_) => "no readable line of the file names it".to_string(),
        None => "not in the file".to_string(),
    };
    if !shown.names.is_empty() {
        let more = if shown.more { ", ..." } else { "" };
        text.push_str(&format!(" (days: {}{more})", shown.names.join(", ")));
    }
    if let Some(e) = bad {
        text.push_str(&format!("; the first bad line: {e}"));
    }
    Err(missing(&origin, &format!("day {day:?}"), text))
}

/// The variant `id` (default: the first) of the JSON Lines variants `text` of a model file;
/// `origin` names the file in errors.
pub fn pick_variant(text: &str, origin: &str, id: Option<&str>) -> Result<Variant> {
    let mut unreadable = None;
    for (_, parsed) in parse_lines(text, origin) {
        match parsed {
            Ok(v) if id.is_none_or(|id| id == v.id) => return Ok(v),
            Ok(_) => {}
            Err(e) if id.is_none() => return Err(e),
            Err(e) => unreadable = unreadable.or(Some(e)),
        }
    }
    Err(match (id, unreadable) {
        (Some(id), Some(e)) => missing(
            origin,
            &format!("id {id:?}"),
            format!("no readable variant has it; the first bad line: {e}"),
        ),
        (Some(id), None) => missing(origin, &format!("id {id:?}"), "no variant has it".into()),
        (None, _) => missing(origin, "file", "holds no variant".to_string()),
    })
}

/// The variant that `spec` gives for a model file: inline JSON (`{"id": ...}`, named
/// `inline` in errors) or the path of a JSON Lines file of variants, from which `id` picks
/// one (default: the first); with the origin that names it in later messages.
pub fn read_variant(spec: &str, id: Option<&str>, inline: &str) -> Result<(Variant, String)> {
    if !spec.trim_start().starts_with('{') {
        let path = Path::new(spec);
        let origin = path.display().to_string();
        return Ok((pick_variant(&read_text(path)?, &origin, id)?, origin));
    }
    let variant: Variant =
        serde_json::from_str(spec).map_err(|e| missing(inline, "inline JSON", e.to_string()))?;
    if let Some(id) = id.filter(|&id| id != variant.id) {
        let message = format!(
            "{id:?} was asked for; the inline variant's id is {:?}",
            variant.id
        );
        return Err(missing(inline, "id", message));
    }
    Ok((variant, inline.to_string()))
}

/// A day or variant the file does not hold.
fn missing(origin: &str, field: &str, message: String) -> Error {
    Error::Input {
        file: origin.to_string(),
        field: field.to_string(),
        message,
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

/// A scenario's days from the text of `path`: CSV rows for a `.csv` file, else JSON Lines.
fn scenario_days(scenario: &Scenario, text: &str, path: &Path) -> Vec<ParsedLine> {
    let origin = path.display().to_string();
    if is_csv(path, text) {
        parse_csv(scenario, text, &origin)
    } else {
        parse_day_lines(scenario, text, &origin)
    }
}

/// Whether the days at `path` are CSV: a `.csv` name (under a `.gz`), or for standard input
/// a text that does not open with a JSON object.
fn is_csv(path: &Path, text: &str) -> bool {
    if is_stdin(path) {
        return !text
            .trim_start_matches('\u{feff}')
            .trim_start()
            .starts_with('{');
    }
    syntax_path(path)
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"))
}
