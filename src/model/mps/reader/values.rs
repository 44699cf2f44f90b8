//! The `RHS`, `RANGES` and `BOUNDS` lines: values attached to rows and columns that the
//! `ROWS` and `COLUMNS` sections declared.

use super::super::lines::Section;
use super::super::number::{Decimal, Number};
use super::{Located, Reader, RowKind, Side};
use crate::error::Result;

/// What a `BOUNDS` type sets.
#[derive(Clone, Copy, PartialEq, Eq)]
enum BoundKind {
    Upper,
    Lower,
    Fixed,
    LowerInteger,
    UpperInteger,
    Minus,
    Plus,
    Free,
    Binary,
}

impl BoundKind {
    fn parse(word: &str) -> Option<Self> {
        Some(match word.to_ascii_uppercase().as_str() {
            "UP" => Self::Upper,
            "LO" => Self::Lower,
            "FX" => Self::Fixed,
            "LI" => Self::LowerInteger,
            "UI" => Self::UpperInteger,
            "MI" => Self::Minus,
            "PL" => Self::Plus,
            "FR" => Self::Free,
            "BV" => Self::Binary,
            _ => return None,
        })
    }

    fn takes_value(self) -> bool {
        matches!(
            self,
            Self::Upper | Self::Lower | Self::Fixed | Self::LowerInteger | Self::UpperInteger
        )
    }
}

impl Reader<'_> {
    /// An `RHS` or `RANGES` line: `[set] row value [row value]`.
    pub(super) fn row_values(
        &mut self,
        line: usize,
        fields: &[&str],
        section: Section,
    ) -> Result<()> {
        let word = section.keyword();
        let (set, pairs) = match fields.len() {
            2 | 4 => (None, fields),
            3 | 5 => (Some(fields[0]), &fields[1..]),
            _ => {
                let wanted = "2 to 5 fields ([set], row, value[, row, value])";
                return Err(self.count_error(line, word, wanted, fields));
            }
        };
        if let Some(set) = set {
            self.set_name(line, section, &format!("{word} field 1"), set)?;
        }
        let first = if set.is_some() { 2 } else { 1 };
        for (pair, chunk) in pairs.chunks(2).enumerate() {
            let row_field = format!("{word} field {}", first + 2 * pair);
            let value_field = format!("{word} field {}", first + 1 + 2 * pair);
            let row = self.row_named(line, &row_field, chunk[0])?;
            if section == Section::Rhs {
                self.rhs_entry(line, row, &value_field, chunk[1])?;
            } else if self.raw.rows[row].kind == RowKind::Free {
                let message = format!("row {:?} is an N row, which takes no range", chunk[0]);
                return Err(self.origin.at(line, &row_field, message));
            } else {
                self.range_entry(line, row, &value_field, chunk[1])?;
            }
        }
        Ok(())
    }

    fn rhs_entry(&mut self, line: usize, row: usize, field: &str, text: &str) -> Result<()> {
        let value = self.finite(line, field, text)?;
        let name = &self.raw.rows[row].name;
        if self.raw.objective == Some(row) && !value.is_zero() {
            let message = format!(
                "a right-hand side on the objective row {name:?} sets an objective constant, which kernstep does not read; remove it"
            );
            return Err(self.origin.at(line, field, message));
        }
        if let Some(earlier) = self.raw.rhs[row] {
            let message = format!(
                "row {name:?} already has a right-hand side (line {})",
                earlier.line
            );
            return Err(self.origin.at(line, field, message));
        }
        self.raw.rhs[row] = Some(Located { value, line });
        Ok(())
    }

    fn range_entry(&mut self, line: usize, row: usize, field: &str, text: &str) -> Result<()> {
        let value = self.extended(line, field, text)?;
        let name = &self.raw.rows[row].name;
        if let Some(earlier) = self.raw.ranges[row] {
            let message = format!("row {name:?} already has a range (line {})", earlier.line);
            return Err(self.origin.at(line, field, message));
        }
        self.raw.ranges[row] = Some(Located { value, line });
        Ok(())
    }

    /// A `BOUNDS` line: `type [set] column [value]`.
    pub(super) fn bound(&mut self, line: usize, fields: &[&str]) -> Result<()> {
        let Some(&word) = fields.first() else {
            return Err(self.count_error(line, "BOUNDS", "a bound type", fields));
        };
        let Some(kind) = BoundKind::parse(word) else {
            let message =
                format!("{word:?} is not a bound type; use UP, LO, FX, MI, PL, FR, BV, LI or UI");
            return Err(self.origin.at(line, "BOUNDS field 1", message));
        };
        let (set, column, value) = match (kind.takes_value(), fields) {
            (true, [_, set, column, value]) => (Some(*set), *column, Some(*value)),
            (true, [_, column, value]) => (None, *column, Some(*value)),
            (false, [_, set, column]) => (Some(*set), *column, None),
            (false, [_, column]) => (None, *column, None),
            (true, _) => {
                let wanted = format!("3 or 4 fields ({word}, [set], column, value)");
                return Err(self.count_error(line, "BOUNDS", &wanted, fields));
            }
            (false, _) => {
                let wanted = format!("2 or 3 fields ({word}, [set], column)");
                return Err(self.count_error(line, "BOUNDS", &wanted, fields));
            }
        };
        if let Some(set) = set {
            self.set_name(line, Section::Bounds, "BOUNDS field 2", set)?;
        }
        let column_field = format!("BOUNDS field {}", if set.is_some() { 3 } else { 2 });
        let Some(&j) = self.column_index.get(column) else {
            let message = format!("column {column:?} is not declared in COLUMNS");
            return Err(self.origin.at(line, &column_field, message));
        };
        let value_field = format!("BOUNDS field {}", if set.is_some() { 4 } else { 3 });
        let value = match value {
            Some(text) => Some(self.extended(line, &value_field, text)?),
            None => None,
        };
        self.apply_bound(line, j, kind, value, &value_field)
    }

    fn apply_bound(
        &mut self,
        line: usize,
        j: usize,
        kind: BoundKind,
        value: Option<Number>,
        field: &str,
    ) -> Result<()> {
        let infinite = Side { value: None, line };
        let at = |d: Decimal| Side {
            value: Some(d),
            line,
        };
        let side = |lower: bool| -> Result<Side> {
            match value {
                Some(Number::Finite(d)) => Ok(at(d)),
                Some(Number::Infinite(negative))
                    if negative == lower && kind != BoundKind::Fixed =>
                {
                    Ok(infinite)
                }
                _ => {
                    let message = match kind {
                        BoundKind::Fixed => "a variable cannot be fixed at an infinite value",
                        _ if lower => "a lower bound of +infinity leaves no value",
                        _ => "an upper bound of -infinity leaves no value",
                    };
                    Err(self.origin.at(line, field, message))
                }
            }
        };
        let mut bounds = self.raw.bounds[j];
        match kind {
            BoundKind::Upper | BoundKind::UpperInteger => bounds.upper = Some(side(false)?),
            BoundKind::Lower | BoundKind::LowerInteger => bounds.lower = Some(side(true)?),
            BoundKind::Fixed => {
                bounds.lower = Some(side(true)?);
                bounds.upper = bounds.lower;
            }
            BoundKind::Minus => bounds.lower = Some(infinite),
            BoundKind::Plus => bounds.upper = Some(infinite),
            BoundKind::Free => (bounds.lower, bounds.upper) = (Some(infinite), Some(infinite)),
            BoundKind::Binary => {
                bounds.lower = Some(at(Decimal::from_int(0)));
                bounds.upper = Some(at(Decimal::from_int(1)));
            }
        }
        bounds.integer |= matches!(
            kind,
            BoundKind::Binary | BoundKind::LowerInteger | BoundKind::UpperInteger
        );
        self.raw.bounds[j] = bounds;
        Ok(())
    }
}
