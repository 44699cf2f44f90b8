//! Daily changes to a scenario, by name, turned into [`Variant`]s of its compiled model.
//!
//! JSON Lines: one object per line, `{"day": "2026-03-02", "demand": {"harbour": 40},
//! "cost": {"north->harbour": 7}}`; besides `day` (required, unique) the keys are the fields of
//! the scenario's kind ([`super::ScenarioKind::fields`]), each a table from names to new
//! values (`null` only for a capacity: no limit). Anything omitted stays as in the scenario
//! file (not as on the day before), and so do the lanes' surcharges, which days cannot change.
//!
//! CSV: a header `day,field,name,value`, then one change per row; rows of one day may be
//! anywhere and are gathered in the order days first appear; an empty value or `none` lifts a
//! capacity. Blank lines and lines starting with `#` are skipped.
//!
//! Every error names the file, the line and the field; a bad line spoils only its own day.

use rustc_hash::FxHashMap;

use serde_json::Value;

use super::compile::variant_numbers;
use super::day_record::DayRecord;
use super::file::unknown;
use super::reader::{join, strip_position, Reader};
use super::{Field, Scenario};
use crate::error::{Error, Result};
use crate::model::VALUE_LIMIT;
use crate::solve::{ParsedLine, Variant};

/// Parses JSON Lines of daily changes; each non-blank line gives its 1-based number and the
/// day's variant or the error that spoils it.
pub fn parse_day_lines(scenario: &Scenario, text: &str, origin: &str) -> Vec<ParsedLine> {
    let mut seen: FxHashMap<String, usize> = FxHashMap::default();
    let names = Names::of(scenario);
    let mut working = scenario.clone();
    text.lines()
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty())
        .map(|(i, line)| {
            let number = i + 1;
            let r = Reader {
                file: origin,
                prefix: format!("line {number}: "),
            };
            // The quick reading serves valid lines of the simple shape; any other line goes
            // to the careful one, which words the error.
            let day = match quick_changes(scenario, &names, &r, line) {
                Some((day, changed)) => remember_day(&r, &mut seen, day, number)
                    .map(|()| (day.to_string(), changed))
                    .map_err(|e| e.for_day(day)),
                None => careful_line(scenario, &names, &r, line, number, &mut seen),
            };
            let day = day.map(|(day, changes)| numbers_with(&mut working, &changes, &day));
            (number, day)
        })
        .collect()
}

/// The name and the checked changes of any JSON line, with a message for every error; an
/// error of a line that names its day carries the name ([`Error::for_day`]).
fn careful_line(
    scenario: &Scenario,
    names: &Names,
    r: &Reader,
    line: &str,
    number: usize,
    seen: &mut FxHashMap<String, usize>,
) -> Result<(String, Vec<Change>)> {
    let value: Value = crate::input::parse_json(line).map_err(|e| {
        r.error(
            "",
            format!("not valid JSON: {}", strip_position(&e.to_string())),
        )
    })?;
    checked_line(scenario, names, r, &value, number, seen).map_err(|e| {
        match value.get("day").and_then(Value::as_str) {
            Some(day) => e.for_day(day),
            None => e,
        }
    })
}

/// The name and the checked changes of a line read as JSON.
fn checked_line(
    scenario: &Scenario,
    names: &Names,
    r: &Reader,
    value: &Value,
    number: usize,
    seen: &mut FxHashMap<String, usize>,
) -> Result<(String, Vec<Change>)> {
    let mut allowed = vec!["day"];
    allowed.extend(scenario.kind.fields().iter().map(|f| f.key()));
    let map = r.object(value, "", &allowed).map_err(|e| {
        let unknown_key = value
            .as_object()
            .and_then(|m| m.keys().find(|k| !allowed.contains(&k.as_str())));
        match unknown_key.map(|k| (k, Field::from_key(k))) {
            Some((_, Some(field))) => r.error(field.key(), not_applicable(scenario.kind, field)),
            Some((key, None)) if key == SURCHARGE => {
                r.error(SURCHARGE, fixed_surcharges(scenario.kind))
            }
            _ => e,
        }
    })?;
    let day = map
        .get("day")
        .ok_or_else(|| r.error("day", "missing; name the day"))?;
    let day = r.string(day, "day")?;
    remember_day(r, seen, day, number)?;
    let mut changed = Vec::new();
    for (key, changes) in map.iter().filter(|(k, _)| *k != "day") {
        let field = Field::from_key(key).ok_or_else(|| r.error(key, "unknown field"))?;
        let entries = changes
            .as_object()
            .ok_or_else(|| r.error(key, "expected a table from names to values"))?;
        for (name, v) in entries {
            let value = match v {
                Value::Null => None,
                other => match other
                    .as_i64()
                    .filter(|n| i128::from(*n).abs() <= VALUE_LIMIT)
                {
                    Some(n) => Some(n),
                    None => Some(r.int(other, &join(key, name))?),
                },
            };
            changed.push(names.resolve(scenario, r, (field, key), name, value)?);
        }
    }
    Ok((day.to_string(), changed))
}

/// The day and changes of a line of the simple shape ([`DayRecord`]) whose every key, name
/// and value is valid; `None` otherwise, and [`careful_line`] then finds
/// the error. A valid line gives the same changes either way, in another order (here by
/// entry, there by key; a name given twice is left to the careful reading, where the last
/// value wins).
fn quick_changes<'a>(
    scenario: &Scenario,
    names: &Names,
    r: &Reader,
    line: &'a str,
) -> Option<(&'a str, Vec<Change>)> {
    let record = DayRecord::read(line)?;
    let fields = scenario.kind.fields();
    let mut changed = Vec::new();
    for &(key, ref entries) in &record.tables {
        let field = Field::from_key(key).filter(|f| fields.contains(f))?;
        for &(name, value) in entries {
            if value.is_some_and(|v| i128::from(v).abs() > VALUE_LIMIT) {
                return None;
            }
            changed.push(names.resolve(scenario, r, (field, key), name, value).ok()?);
        }
    }
    changed.sort_unstable_by_key(|c| (c.table, c.index));
    if changed
        .windows(2)
        .any(|w| (w[0].table, w[0].index) == (w[1].table, w[1].index))
    {
        return None;
    }
    Some((record.day?, changed))
}

/// One checked change: entry `index` of table `table` becomes `value`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Change {
    table: usize,
    index: usize,
    value: Option<i64>,
}

/// The scenario's numbers with `changes` applied, as a variant named `id`. The changes are
/// made on `working` (a copy of the scenario) and undone afterwards, so no day pays for a
/// copy of every name.
fn numbers_with(working: &mut Scenario, changes: &[Change], id: &str) -> Variant {
    let before: Vec<Option<i64>> = changes
        .iter()
        .map(|c| std::mem::replace(&mut working.tables[c.table].values[c.index], c.value))
        .collect();
    let variant = variant_numbers(working, id);
    for (c, old) in changes.iter().zip(before).rev() {
        working.tables[c.table].values[c.index] = old;
    }
    variant
}

/// Where every name of every table of a scenario sits, for lookups in constant time (a fast
/// non-cryptographic hash: the names come from the user's own files).
struct Names<'s> {
    tables: Vec<FxHashMap<&'s str, usize>>,
}

impl<'s> Names<'s> {
    fn of(scenario: &'s Scenario) -> Self {
        let tables = scenario
            .tables
            .iter()
            .map(|t| {
                t.names
                    .iter()
                    .enumerate()
                    .map(|(i, n)| (n.as_str(), i))
                    .collect()
            })
            .collect();
        Self { tables }
    }

    /// Checks one change of `field` (spelt `key` in the input) to the entry `name`: the
    /// field, the name and the value; and locates it.
    fn resolve(
        &self,
        s: &Scenario,
        r: &Reader,
        (field, key): (Field, &str),
        name: &str,
        value: Option<i64>,
    ) -> Result<Change> {
        let at = || join(key, name);
        let table = s
            .tables
            .iter()
            .position(|t| t.field == field)
            .ok_or_else(|| r.error(field.key(), not_applicable(s.kind, field)))?;
        let index = *self.tables[table].get(name).ok_or_else(|| {
            r.error(
                &at(),
                unknown(what(s.kind, field), name, &s.tables[table].names),
            )
        })?;
        match value {
            None if field != Field::Capacity => return Err(r.error(&at(), "needs a number")),
            Some(v) if v < 0 && field.is_quantity() => {
                return Err(r.error(&at(), format!("{v} is negative")))
            }
            _ => {}
        }
        Ok(Change {
            table,
            index,
            value,
        })
    }
}

/// Refuses a day named twice.
fn remember_day(
    r: &Reader,
    seen: &mut FxHashMap<String, usize>,
    day: &str,
    number: usize,
) -> Result<()> {
    if day.trim().is_empty() {
        return Err(r.error("day", "a day needs a name"));
    }
    crate::input::printable(day).map_err(|why| r.error("day", why))?;
    match seen.insert(day.to_string(), number) {
        Some(first) => {
            seen.insert(day.to_string(), first);
            Err(r.error("day", format!("{day:?} is already given on line {first}")))
        }
        None => Ok(()),
    }
}

/// The lane key of the scenario file that days cannot change.
const SURCHARGE: &str = "surcharge";

/// Why a day cannot change surcharges.
fn fixed_surcharges(kind: super::ScenarioKind) -> String {
    let fields: Vec<&str> = kind.fields().iter().map(|f| f.key()).collect();
    format!(
        "surcharges stay as in the scenario file; days change only {}",
        fields.join(", ")
    )
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

/// The day that line `row` of a days file names, read without checking anything else: the
/// `day` string of a JSON line or, with `csv`, the first cell of a CSV row. An entry of
/// [`parse_day_lines`] or [`parse_csv`] is numbered by the line its day starts on, so this
/// names the day of an entry whose reading failed.
pub fn day_named(row: &str, csv: bool) -> Option<String> {
    if csv {
        let (_, cells) = csv_rows(row).next()?;
        let day = cells.ok()?.get(0)?.to_string();
        return (!day.is_empty()).then_some(day);
    }
    let value: Value = serde_json::from_str(row).ok()?;
    value.get("day")?.as_str().map(str::to_string)
}

/// One day gathered from CSV rows: where it first appears and its checked changes.
struct CsvDay {
    line: usize,
    result: Result<Vec<Change>>,
}

/// Parses CSV daily changes (`day,field,name,value`); one entry per day, numbered by the line
/// the day first appears on, plus one entry per row too malformed to belong to a day.
pub fn parse_csv(scenario: &Scenario, text: &str, origin: &str) -> Vec<ParsedLine> {
    let mut rows = csv_rows(text).filter(|(_, cells)| !is_blank(cells));
    let header_error = match rows.next() {
        Some((_, Ok(h))) if is_header(&h) => None,
        Some((line, Err(e))) => Some((line, format!("not CSV: {e}"))),
        Some((line, _)) => Some((
            line,
            "the first line must be the header day,field,name,value".to_string(),
        )),
        None => Some((
            1,
            "no header; the first line must be day,field,name,value".into(),
        )),
    };
    if let Some((line, message)) = header_error {
        let error = Error::Input {
            file: origin.to_string(),
            field: format!("line {line}"),
            message,
        };
        return vec![(line, Err(error))];
    }
    let names = Names::of(scenario);
    let mut order: Vec<(String, CsvDay)> = Vec::new();
    let mut position: FxHashMap<String, usize> = FxHashMap::default();
    let mut out_of_day: Vec<ParsedLine> = Vec::new();
    for (line, cells) in rows {
        let r = Reader {
            file: origin,
            prefix: format!("line {line}: "),
        };
        let cells = match cells {
            Ok(cells) => cells,
            Err(e) => {
                out_of_day.push((line, Err(r.error("", format!("not CSV: {e}")))));
                continue;
            }
        };
        let [day, field, name, value] = cells.iter().collect::<Vec<_>>()[..] else {
            let message = format!(
                "expected 4 cells (day,field,name,value), found {}",
                cells.len()
            );
            out_of_day.push((line, Err(r.error("", message))));
            continue;
        };
        if day.is_empty() {
            out_of_day.push((line, Err(r.error("day", "a day needs a name"))));
            continue;
        }
        let k = *position.entry(day.to_string()).or_insert_with(|| {
            let fresh = CsvDay {
                line,
                result: Ok(Vec::new()),
            };
            order.push((day.to_string(), fresh));
            order.len() - 1
        });
        let slot = &mut order[k].1;
        if let Ok(changes) = &mut slot.result {
            match csv_change(scenario, &names, &r, field, name, value) {
                Ok(change) => changes.push(change),
                Err(e) => slot.result = Err(e),
            }
        }
    }
    let mut working = scenario.clone();
    let mut out: Vec<ParsedLine> = order
        .into_iter()
        .map(|(day, d)| {
            let variant = match d.result {
                Ok(c) => Ok(numbers_with(&mut working, &c, &day)),
                Err(e) => Err(e.for_day(&day)),
            };
            (d.line, variant)
        })
        .chain(out_of_day)
        .collect();
    out.sort_by_key(|(line, _)| *line);
    out
}

/// A CSV record, or why the text is not CSV there.
type CsvRow = std::result::Result<csv::StringRecord, csv::Error>;

/// The records of CSV `text` with the line each starts on, read by the `csv` crate (RFC 4180
/// quoting, a leading byte-order mark ignored, cells trimmed, any number of cells per row).
fn csv_rows(text: &str) -> impl Iterator<Item = (usize, CsvRow)> + '_ {
    csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes())
        .into_records()
        .map(move |record| {
            let position = match &record {
                Ok(r) => r.position(),
                Err(e) => e.position(),
            };
            (position.map_or(1, |p| line_at(text, p.byte())), record)
        })
}

/// The line of the record that starts at byte `at`: the reader places a record after blank
/// lines or a `\r\n` at the line break before it, so breaks at `at` are passed over.
fn line_at(text: &str, at: u64) -> usize {
    let bytes = text.as_bytes();
    let mut k = usize::try_from(at).unwrap_or(bytes.len()).min(bytes.len());
    while k < bytes.len() && matches!(bytes[k], b'\n' | b'\r') {
        k += 1;
    }
    bytes[..k].iter().filter(|&&b| b == b'\n').count() + 1
}

/// A row to pass over: a blank line, or a comment (its first cell starts with `#`).
fn is_blank(cells: &CsvRow) -> bool {
    cells.as_ref().is_ok_and(|c| {
        c.iter().all(str::is_empty) || c.get(0).is_some_and(|first| first.starts_with('#'))
    })
}

fn is_header(cells: &csv::StringRecord) -> bool {
    let cells: Vec<String> = cells.iter().map(str::to_ascii_lowercase).collect();
    cells == ["day", "field", "name", "value"]
}

fn csv_change(
    s: &Scenario,
    names: &Names,
    r: &Reader,
    field: &str,
    name: &str,
    value: &str,
) -> Result<Change> {
    let f = Field::from_key(field).ok_or_else(|| {
        if field == SURCHARGE {
            return r.error("field", fixed_surcharges(s.kind));
        }
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
                .filter(|v| i128::from(*v).abs() <= VALUE_LIMIT)
                .ok_or_else(|| r.error(&at, format!("{value:?} is not an integer within ±2^62")))?,
        )
    };
    names.resolve(s, r, (f, field), name, parsed)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::ModelKind;

    /// The example lane scenario (depots quayside, tannery, windmill; zones north_bank,
    /// old_docks, riverside, saltmarsh; every lane).
    const LANES: &str = include_str!("../../examples/scenarios/brackle_lanes.toml");

    /// Sorted, since the quick reading keeps input order and the careful one key order.
    fn sorted(mut changes: Vec<Change>) -> Vec<Change> {
        changes.sort_by_key(|c| (c.table, c.index));
        changes
    }

    #[test]
    fn the_quick_reading_gives_the_careful_changes_or_leaves_the_line_to_it() {
        let s = Scenario::from_str(LANES, ModelKind::Toml, "s.toml").unwrap();
        let names = Names::of(&s);
        let r = Reader {
            file: "days.jsonl",
            prefix: String::new(),
        };
        let quick = [
            r#"{"day": "mon"}"#,
            r#"{"demand": {"old_docks": 3, "north_bank": 0}, "day": "tue", "supply": {"tannery": 9}}"#,
            r#"{"day": "wed", "capacity": {"quayside->north_bank": null}, "cost": {"tannery->riverside": -4}}"#,
        ];
        for line in quick {
            let (day, changes) = quick_changes(&s, &names, &r, line).expect(line);
            let careful = careful_line(&s, &names, &r, line, 1, &mut FxHashMap::default()).unwrap();
            assert_eq!(
                (day.to_string(), sorted(changes)),
                (careful.0, sorted(careful.1))
            );
        }
        let careful_only = [
            r#"{"day": "mon", "demand": {"harbour": 3}}"#,
            r#"{"day": "mon", "demand": {"old_docks": -3}}"#,
            r#"{"day": "mon", "supply": {"windmill": null}}"#,
            r#"{"day": "mon", "stock": {"windmill": 1}}"#,
            r#"{"day": "mon", "colour": {"windmill": 1}}"#,
            r#"{"day": "mon", "cost": {"tannery->riverside": 9223372036854775807}}"#,
            r#"{"demand": {"old_docks": 3}}"#,
            r#"{"day": "mon", "cost": {"tannery->riverside": 2}, "cost": {"tannery->riverside": 3}}"#,
            r#"{"day": "mon", "cost": {"windmill->saltmarsh": 1, "windmill->saltmarsh": 8}}"#,
        ];
        for line in careful_only {
            assert!(quick_changes(&s, &names, &r, line).is_none(), "{line}");
        }
    }

    #[test]
    fn the_day_of_a_line_is_read_whatever_else_the_line_holds() {
        let bad_name = r#"{"demand": {"harbor": 3}, "day": "tue"}"#;
        assert_eq!(day_named(bad_name, false).as_deref(), Some("tue"));
        assert_eq!(
            day_named(r#"{"day": "a\"b", "colour": 1}"#, false).as_deref(),
            Some("a\"b")
        );
        assert_eq!(day_named(r#"{"day": 7}"#, false), None);
        assert_eq!(day_named(r#"{"day": "tue""#, false), None);
        assert_eq!(
            day_named(" tue , demand, harbor ,3", true).as_deref(),
            Some("tue")
        );
        assert_eq!(day_named(",demand,harbour,3", true), None);
    }
}
