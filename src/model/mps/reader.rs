//! Reads the sections of an MPS file into [`Raw`] data: rows, columns with their entries,
//! right-hand sides, ranges and bounds, each remembered with the line it came from.
//!
//! The reader checks what one line can show (field counts, known names, numbers, section
//! order, markers); [`super::assemble`] checks what needs the whole model.

use std::collections::HashMap;

use super::lines::{Line, Section};
use super::number::{self, Decimal, Number};
use super::Origin;
use crate::error::{Error, Result};

/// The sense of a row.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum RowKind {
    /// `N`: a free row (the first, or the `OBJNAME` one, is the objective).
    Free,
    /// `E`: `a.x = b`.
    Equal,
    /// `L`: `a.x <= b`.
    Less,
    /// `G`: `a.x >= b`.
    Greater,
}

/// A row of the `ROWS` section.
#[derive(Clone, Debug)]
pub(super) struct RawRow {
    pub(super) name: String,
    pub(super) kind: RowKind,
    pub(super) line: usize,
}

/// One coefficient of a column.
#[derive(Clone, Copy, Debug)]
pub(super) struct Entry {
    pub(super) row: usize,
    pub(super) value: Decimal,
    pub(super) line: usize,
}

/// A column of the `COLUMNS` section.
#[derive(Clone, Debug)]
pub(super) struct RawColumn {
    pub(super) name: String,
    /// Declared between `'INTORG'` and `'INTEND'` markers.
    pub(super) marked_integer: bool,
    pub(super) line: usize,
    pub(super) entries: Vec<Entry>,
}

/// A number with the line it came from.
#[derive(Clone, Copy, Debug)]
pub(super) struct Located<T> {
    pub(super) value: T,
    pub(super) line: usize,
}

/// One side of a variable's bounds as the file sets it; `None` means infinite.
pub(super) type Side = Located<Option<Decimal>>;

/// A column's bounds; `None` sides keep the default `[0, +inf)`.
#[derive(Clone, Copy, Debug, Default)]
pub(super) struct ColumnBounds {
    pub(super) lower: Option<Side>,
    pub(super) upper: Option<Side>,
    /// Made integer by a `BV`, `LI` or `UI` bound.
    pub(super) integer: bool,
}

/// Everything the sections say, before the model is assembled.
#[derive(Debug, Default)]
pub(super) struct Raw {
    pub(super) rows: Vec<RawRow>,
    /// The objective row, if the file has a free row.
    pub(super) objective: Option<usize>,
    pub(super) maximize: bool,
    pub(super) columns: Vec<RawColumn>,
    pub(super) rhs: Vec<Option<Located<Decimal>>>,
    /// Per row; magnitudes of at least `1e20` are read as infinite.
    pub(super) ranges: Vec<Option<Located<Number>>>,
    pub(super) bounds: Vec<ColumnBounds>,
    /// Line of the `ROWS` header.
    pub(super) rows_line: usize,
    /// Line of the `COLUMNS` header.
    pub(super) columns_line: usize,
}

/// The reader's state while it walks the lines.
struct Reader<'a> {
    origin: Origin<'a>,
    raw: Raw,
    section: Option<Section>,
    seen: Vec<Section>,
    objective_name: Option<Located<String>>,
    row_index: HashMap<String, usize>,
    column_index: HashMap<String, usize>,
    /// Line of the open `'INTORG'` marker.
    integer_from: Option<usize>,
    /// The first set name seen in RHS, RANGES and BOUNDS.
    set_names: HashMap<Section, String>,
}

/// Reads the lines of one file.
pub(super) fn read(lines: &[Line<'_>], origin: Origin<'_>) -> Result<Raw> {
    let mut reader = Reader {
        origin,
        raw: Raw::default(),
        section: None,
        seen: Vec::new(),
        objective_name: None,
        row_index: HashMap::new(),
        column_index: HashMap::new(),
        integer_from: None,
        set_names: HashMap::new(),
    };
    for line in lines {
        match line {
            Line::Header {
                number,
                section,
                rest,
            } => reader.header(*number, *section, rest)?,
            Line::Data { number, fields } => reader.data(*number, fields)?,
        }
    }
    let last = lines.last().map_or(1, |l| match l {
        Line::Header { number, .. } | Line::Data { number, .. } => *number,
    });
    if !reader.seen.contains(&Section::End) {
        return Err(origin.at(
            last,
            "end of file",
            "missing ENDATA; the file may be truncated",
        ));
    }
    Ok(reader.raw)
}

impl Reader<'_> {
    fn header(&mut self, line: usize, section: Section, rest: &[&str]) -> Result<()> {
        let word = section.keyword();
        if self.seen.contains(&section) {
            return Err(self.origin.at(line, word, "this section appears twice"));
        }
        self.check_order(line, section)?;
        if self.section == Some(Section::Columns) {
            self.close_columns(line)?;
        }
        match (section, rest) {
            (Section::Name, _) | (_, []) => {}
            (Section::ObjSense, [sense]) => self.sense(line, word, sense)?,
            (Section::ObjName, [name]) => self.objective_name(line, name),
            _ => {
                let message = format!("unexpected text {:?} after the keyword", rest.join(" "));
                return Err(self.origin.at(line, word, message));
            }
        }
        if section == Section::Columns {
            self.resolve_objective()?;
        }
        self.seen.push(section);
        self.section = Some(section);
        match section {
            Section::Rows => self.raw.rows_line = line,
            Section::Columns => self.raw.columns_line = line,
            _ => {}
        }
        Ok(())
    }

    fn check_order(&self, line: usize, section: Section) -> Result<()> {
        let word = section.keyword();
        let needs = match section {
            Section::Name => None,
            Section::ObjSense | Section::ObjName | Section::Rows => None,
            Section::Columns => Some(Section::Rows),
            Section::Rhs | Section::Ranges | Section::Bounds | Section::End => {
                Some(Section::Columns)
            }
        };
        if let Some(needed) = needs.filter(|n| !self.seen.contains(n)) {
            let message = format!("comes before {}", needed.keyword());
            return Err(self.origin.at(line, word, message));
        }
        let late = match section {
            Section::Name => Some(Section::Rows),
            Section::ObjSense | Section::ObjName | Section::Rows => Some(Section::Columns),
            _ => None,
        };
        if let Some(after) = late.filter(|l| self.seen.contains(l)) {
            let message = format!("must come before {}", after.keyword());
            return Err(self.origin.at(line, word, message));
        }
        Ok(())
    }

    fn close_columns(&mut self, line: usize) -> Result<()> {
        match self.integer_from.take() {
            Some(from) => Err(self.origin.at(
                line,
                "COLUMNS",
                format!("the 'INTORG' marker at line {from} has no matching 'INTEND'"),
            )),
            None => Ok(()),
        }
    }

    fn sense(&mut self, line: usize, field: &str, word: &str) -> Result<()> {
        self.raw.maximize = match word.to_ascii_uppercase().as_str() {
            "MIN" | "MINIMIZE" | "MINIMISE" => false,
            "MAX" | "MAXIMIZE" | "MAXIMISE" => true,
            _ => {
                let message = format!("{word:?} is not a sense; use MIN or MAX");
                return Err(self.origin.at(line, field, message));
            }
        };
        Ok(())
    }

    fn objective_name(&mut self, line: usize, name: &str) {
        self.objective_name = Some(Located {
            value: name.to_string(),
            line,
        });
    }

    fn resolve_objective(&mut self) -> Result<()> {
        let Some(named) = &self.objective_name else {
            self.raw.objective = self.raw.rows.iter().position(|r| r.kind == RowKind::Free);
            return Ok(());
        };
        match self.row_index.get(&named.value) {
            Some(&i) if self.raw.rows[i].kind == RowKind::Free => {
                self.raw.objective = Some(i);
                Ok(())
            }
            found => {
                let why = if found.is_some() {
                    "is not an N row"
                } else {
                    "is not in ROWS"
                };
                let message = format!("objective row {:?} {why}", named.value);
                Err(self.origin.at(named.line, "OBJNAME", message))
            }
        }
    }

    fn data(&mut self, line: usize, fields: &[&str]) -> Result<()> {
        match self.section {
            None => Err(self
                .origin
                .at(line, "data", "comes before any section header")),
            Some(Section::ObjSense) => match fields {
                [word] => self.sense(line, "OBJSENSE field 1", word),
                _ => Err(self.count_error(line, "OBJSENSE", "one field (MIN or MAX)", fields)),
            },
            Some(Section::ObjName) => match fields {
                [name] => {
                    self.objective_name(line, name);
                    Ok(())
                }
                _ => Err(self.count_error(line, "OBJNAME", "one field (a row name)", fields)),
            },
            Some(Section::Rows) => self.row(line, fields),
            Some(Section::Columns) => self.column_line(line, fields),
            Some(Section::Rhs) => self.row_values(line, fields, Section::Rhs),
            Some(Section::Ranges) => self.row_values(line, fields, Section::Ranges),
            Some(Section::Bounds) => self.bound(line, fields),
            Some(Section::Name | Section::End) => {
                let section = self.section.map_or("", Section::keyword);
                Err(self
                    .origin
                    .at(line, section, "this section takes no data lines"))
            }
        }
    }

    fn count_error(&self, line: usize, section: &str, wanted: &str, fields: &[&str]) -> Error {
        let message = format!("expected {wanted}, found {} fields", fields.len());
        self.origin.at(line, section, message)
    }

    fn row(&mut self, line: usize, fields: &[&str]) -> Result<()> {
        let [kind, name] = fields else {
            return Err(self.count_error(line, "ROWS", "two fields (type, name)", fields));
        };
        let kind = match kind.to_ascii_uppercase().as_str() {
            "N" => RowKind::Free,
            "E" => RowKind::Equal,
            "L" => RowKind::Less,
            "G" => RowKind::Greater,
            _ => {
                let message = format!("{kind:?} is not a row type; use N, E, L or G");
                return Err(self.origin.at(line, "ROWS field 1", message));
            }
        };
        let index = self.raw.rows.len();
        if let Some(&first) = self.row_index.get(*name) {
            let message = format!("row {name:?} repeats line {}", self.raw.rows[first].line);
            return Err(self.origin.at(line, "ROWS field 2", message));
        }
        self.row_index.insert(name.to_string(), index);
        self.raw.rows.push(RawRow {
            name: name.to_string(),
            kind,
            line,
        });
        self.raw.rhs.push(None);
        self.raw.ranges.push(None);
        Ok(())
    }

    fn column_line(&mut self, line: usize, fields: &[&str]) -> Result<()> {
        if fields.len() == 3 && fields[1].eq_ignore_ascii_case("'MARKER'") {
            return self.marker(line, fields[2]);
        }
        if !matches!(fields.len(), 3 | 5) {
            let wanted = "3 or 5 fields (column, row, value[, row, value])";
            return Err(self.count_error(line, "COLUMNS", wanted, fields));
        }
        let column = self.column(line, fields[0])?;
        for (pair, chunk) in fields[1..].chunks(2).enumerate() {
            let row_field = format!("COLUMNS field {}", 2 + 2 * pair);
            let value_field = format!("COLUMNS field {}", 3 + 2 * pair);
            let row = self.row_named(line, &row_field, chunk[0])?;
            let value = self.finite(line, &value_field, chunk[1])?;
            let entries = &mut self.raw.columns[column].entries;
            if let Some(earlier) = entries.iter().find(|e| e.row == row) {
                let message = format!(
                    "column {:?} already has a coefficient in row {:?} (line {})",
                    fields[0], chunk[0], earlier.line
                );
                return Err(self.origin.at(line, &row_field, message));
            }
            entries.push(Entry { row, value, line });
        }
        Ok(())
    }

    fn marker(&mut self, line: usize, kind: &str) -> Result<()> {
        let field = "COLUMNS field 3";
        match (kind.to_ascii_uppercase().as_str(), self.integer_from) {
            ("'INTORG'", None) => self.integer_from = Some(line),
            ("'INTEND'", Some(_)) => self.integer_from = None,
            ("'INTORG'", Some(from)) => {
                let message = format!("'INTORG' inside the integer block opened at line {from}");
                return Err(self.origin.at(line, field, message));
            }
            ("'INTEND'", None) => {
                return Err(self
                    .origin
                    .at(line, field, "'INTEND' without an open 'INTORG'"));
            }
            _ => {
                let message = format!("{kind:?} is not a marker; use 'INTORG' or 'INTEND'");
                return Err(self.origin.at(line, field, message));
            }
        }
        Ok(())
    }

    /// The index of the column named on this line, opening it if it is new.
    fn column(&mut self, line: usize, name: &str) -> Result<usize> {
        let last = self.raw.columns.len().checked_sub(1);
        match self.column_index.get(name) {
            Some(&j) if Some(j) == last => Ok(j),
            Some(&j) => {
                let message = format!(
                    "column {name:?} was declared at line {} and continued after other columns; keep a column's entries together",
                    self.raw.columns[j].line
                );
                Err(self.origin.at(line, "COLUMNS field 1", message))
            }
            None => {
                let j = self.raw.columns.len();
                self.column_index.insert(name.to_string(), j);
                self.raw.columns.push(RawColumn {
                    name: name.to_string(),
                    marked_integer: self.integer_from.is_some(),
                    line,
                    entries: Vec::new(),
                });
                self.raw.bounds.push(ColumnBounds::default());
                Ok(j)
            }
        }
    }

    fn row_named(&self, line: usize, field: &str, name: &str) -> Result<usize> {
        self.row_index.get(name).copied().ok_or_else(|| {
            self.origin
                .at(line, field, format!("row {name:?} is not declared in ROWS"))
        })
    }

    fn number(&self, line: usize, field: &str, text: &str) -> Result<Number> {
        number::parse(text).map_err(|e| {
            self.origin
                .at(line, field, format!("{text:?} {}", e.describe()))
        })
    }

    fn finite(&self, line: usize, field: &str, text: &str) -> Result<Decimal> {
        match self.number(line, field, text)? {
            Number::Finite(d) => Ok(d),
            Number::Infinite(_) => {
                Err(self
                    .origin
                    .at(line, field, format!("{text:?} must be finite here")))
            }
        }
    }

    /// A bound-like value: magnitudes of at least `1e20` are infinite.
    fn extended(&self, line: usize, field: &str, text: &str) -> Result<Number> {
        Ok(match self.number(line, field, text)? {
            Number::Finite(d) if d.is_huge() => Number::Infinite(d.is_negative()),
            other => other,
        })
    }

    /// Checks the set name of an RHS, RANGES or BOUNDS line: one set per section.
    fn set_name(&mut self, line: usize, section: Section, field: &str, name: &str) -> Result<()> {
        let word = section.keyword();
        match self.set_names.get(&section) {
            Some(first) if first != name => {
                let message = format!(
                    "a second {word} set {name:?}; kernstep reads one set per section (the first is {first:?})"
                );
                Err(self.origin.at(line, field, message))
            }
            Some(_) => Ok(()),
            None => {
                self.set_names.insert(section, name.to_string());
                Ok(())
            }
        }
    }
}

mod values;
