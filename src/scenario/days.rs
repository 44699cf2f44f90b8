//! Daily changes to a scenario, by name, turned into [`Variant`]s of its compiled model.
//!
//! JSON Lines: one object per line, `{"day": "2026-03-02", "demand": {"harbour": 40},
//! "cost": {"north->harbour": 7}}`; besides `day` (required, unique) the keys are the fields of
//! the scenario's kind ([`super::ScenarioKind::fields`]), each a table from names to new
//! values (`null` only for a capacity: no limit). Anything omitted stays as in the scenario
//! file (not as on the day before).
//!
//! CSV: a header `day,field,name,value`, then one change per row; rows of one day may be
//! anywhere and are gathered in the order days first appear; an empty value or `none` lifts a
//! capacity. Blank lines and lines starting with `#` are skipped.
//!
//! Every error names the file, the line and the field; a bad line spoils only its own day.

use std::collections::HashMap;

use serde_json::Value;

use super::compile::variant_numbers;
use super::file::unknown;
use super::reader::{join, strip_position, Reader};
use super::{Field, Scenario};
use crate::error::{Error, Result};
use crate::solve::{ParsedLine, Variant};

/// Parses JSON Lines of daily changes; each non-blank line gives its 1-based number and the
/// day's variant or the error that spoils it.
pub fn parse_day_lines(scenario: &Scenario, text: &str, origin: &str) -> Vec<ParsedLine> {
    let mut seen: HashMap<String, usize> = HashMap::new();
    text.lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty())
        .map(|(i, line)| {
            let number = i + 1;
            let r = Reader {
                file: origin,
                prefix: format!("line {number}: "),
            };
            (number, day_line(scenario, &r, line, number, &mut seen))
        })
        .collect()
}

fn day_line(
    scenario: &Scenario,
    r: &Reader,
    line: &str,
    number: usize,
    seen: &mut HashMap<String, usize>,
) -> Result<Variant> {
    let value: Value = serde_json::from_str(line).map_err(|e| {
        r.error(
            "",
            format!("not valid JSON: {}", strip_position(&e.to_string())),
        )
    })?;
    let mut allowed = vec!["day"];
    allowed.extend(scenario.kind.fields().iter().map(|f| f.key()));
    let map = r.object(&value, "", &allowed).map_err(|e| {
        let unknown_field = value
            .as_object()
            .and_then(|m| m.keys().find(|k| !allowed.contains(&k.as_str())))
            .and_then(|k| Field::from_key(k));
        match unknown_field {
            Some(field) => r.error(field.key(), not_applicable(scenario.kind, field)),
            None => e,
        }
    })?;
    let day = map
        .get("day")
        .ok_or_else(|| r.error("day", "missing; name the day"))?;
    let day = r.string(day, "day")?;
    remember_day(r, seen, day, number)?;
    let mut changed = scenario.clone();
    for (key, changes) in map.iter().filter(|(k, _)| *k != "day") {
        let field = Field::from_key(key).ok_or_else(|| r.error(key, "unknown field"))?;
        let entries = changes
            .as_object()
            .ok_or_else(|| r.error(key, "expected a table from names to values"))?;
        for (name, v) in entries {
            let at = join(key, name);
            let value = match v {
                Value::Null => None,
                other => Some(r.int(other, &at)?),
            };
            set(&mut changed, r, field, name, value, &at)?;
        }
    }
    Ok(variant_numbers(&changed, day))
}

/// Refuses a day named twice.
fn remember_day(
    r: &Reader,
    seen: &mut HashMap<String, usize>,
    day: &str,
    number: usize,
) -> Result<()> {
    if day.trim().is_empty() {
        return Err(r.error("day", "a day needs a name"));
    }
    match seen.insert(day.to_string(), number) {
        Some(first) => {
            seen.insert(day.to_string(), first);
            Err(r.error("day", format!("{day:?} is already given on line {first}")))
        }
        None => Ok(()),
    }
}

fn not_applicable(kind: super::ScenarioKind, field: Field) -> String {
    let fields: Vec<&str> = kind.fields().iter().map(|f| f.key()).collect();
    format!(
        "{} does not apply to {} scenarios (fields: {})",
        field.key(),
        kind.name(),
        fields.join(", ")
    )
}

/// Overwrites one value of `field`, checking the field, the name and the value.
fn set(
    s: &mut Scenario,
    r: &Reader,
    field: Field,
    name: &str,
    value: Option<i64>,
    at: &str,
) -> Result<()> {
    let kind = s.kind;
    let table = s
        .tables
        .iter_mut()
        .find(|t| t.field == field)
        .ok_or_else(|| r.error(field.key(), not_applicable(kind, field)))?;
    let index = table
        .names
        .iter()
        .position(|n| n == name)
        .ok_or_else(|| r.error(at, unknown(what(kind, field), name, &table.names)))?;
    match value {
        None if field != Field::Capacity => return Err(r.error(at, "needs a number")),
        Some(v) if v < 0 && field.is_quantity() => {
            return Err(r.error(at, format!("{v} is negative")))
        }
        _ => {}
    }
    table.values[index] = value;
    Ok(())
}

/// What the names of `field` are, for messages.
fn what(kind: super::ScenarioKind, field: Field) -> &'static str {
    let per_product = kind == super::ScenarioKind::ProductLines;
    match field {
        Field::Supply | Field::KeepCost => "depot",
        Field::Demand if per_product => "zone/product",
        Field::Demand => "zone",
        Field::Stock => "depot/product",
        Field::Cost if per_product => "lane/product",
        Field::Volume | Field::Cost | Field::Capacity | Field::TruckCost => "lane",
    }
}

/// One day gathered from CSV rows: where it first appears and its changed scenario.
struct CsvDay {
    line: usize,
    result: Result<Scenario>,
}

/// Parses CSV daily changes (`day,field,name,value`); one entry per day, numbered by the line
/// the day first appears on, plus one entry per row too malformed to belong to a day.
pub fn parse_csv(scenario: &Scenario, text: &str, origin: &str) -> Vec<ParsedLine> {
    let mut rows = text
        .lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty() && !l.trim_start().starts_with('#'));
    let header_error = match rows.next() {
        Some((_, h)) if is_header(h) => None,
        Some((i, _)) => Some((
            i + 1,
            "the first line must be the header day,field,name,value",
        )),
        None => Some((1, "no header; the first line must be day,field,name,value")),
    };
    if let Some((line, message)) = header_error {
        let error = Error::Input {
            file: origin.to_string(),
            field: format!("line {line}"),
            message: message.to_string(),
        };
        return vec![(line, Err(error))];
    }
    let mut order: Vec<(String, CsvDay)> = Vec::new();
    let mut out_of_day: Vec<ParsedLine> = Vec::new();
    for (i, line) in rows {
        let r = Reader {
            file: origin,
            prefix: format!("line {}: ", i + 1),
        };
        let cells: Vec<&str> = line.split(',').map(str::trim).collect();
        let [day, field, name, value] = cells[..] else {
            let message = format!(
                "expected 4 cells (day,field,name,value), found {}",
                cells.len()
            );
            out_of_day.push((i + 1, Err(r.error("", message))));
            continue;
        };
        if day.is_empty() {
            out_of_day.push((i + 1, Err(r.error("day", "a day needs a name"))));
            continue;
        }
        let k = match order.iter().position(|(d, _)| d == day) {
            Some(k) => k,
            None => {
                let fresh = CsvDay {
                    line: i + 1,
                    result: Ok(scenario.clone()),
                };
                order.push((day.to_string(), fresh));
                order.len() - 1
            }
        };
        let slot = &mut order[k].1;
        if let Ok(s) = &mut slot.result {
            if let Err(e) = csv_change(s, &r, field, name, value) {
                slot.result = Err(e);
            }
        }
    }
    let mut out: Vec<ParsedLine> = order
        .into_iter()
        .map(|(day, d)| (d.line, d.result.map(|s| variant_numbers(&s, &day))))
        .chain(out_of_day)
        .collect();
    out.sort_by_key(|(line, _)| *line);
    out
}

fn is_header(line: &str) -> bool {
    let cells: Vec<String> = line
        .split(',')
        .map(|c| c.trim().to_ascii_lowercase())
        .collect();
    cells == ["day", "field", "name", "value"]
}

fn csv_change(s: &mut Scenario, r: &Reader, field: &str, name: &str, value: &str) -> Result<()> {
    let f = Field::from_key(field).ok_or_else(|| {
        let fields: Vec<&str> = s.kind.fields().iter().map(|f| f.key()).collect();
        r.error(
            "field",
            format!("{field:?} is not a field; use {}", fields.join(", ")),
        )
    })?;
    let at = join(field, name);
    let parsed = if value.is_empty() || value.eq_ignore_ascii_case("none") {
        None
    } else {
        Some(
            value
                .parse::<i64>()
                .ok()
                .filter(|v| i128::from(*v).abs() <= crate::model::VALUE_LIMIT)
                .ok_or_else(|| r.error(&at, format!("{value:?} is not an integer within ±2^62")))?,
        )
    };
    set(s, r, f, name, parsed, &at)
}
