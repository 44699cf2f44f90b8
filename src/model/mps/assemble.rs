//! Turns [`Raw`] sections into a [`Model`]: scales rows and the cost to integers, adds one
//! slack variable per inequality or ranged row, and settles every variable's bounds.

use super::number::{Decimal, Number};
use super::reader::{ColumnBounds, Entry, Raw, RawColumn, RowKind};
use super::{MpsImport, Origin, MAX_DENSE_ENTRIES};
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::model::{Model, Units, MATRIX_ENTRY_LIMIT, VALUE_LIMIT};
use crate::trace::decimal::MAX_PLACES;

/// The slack variable of one constraint row: `coefficient * s` is added to the row and
/// `0 <= s <= upper`.
#[derive(Clone, Copy, Debug)]
struct Slack {
    coefficient: i64,
    upper: Option<i64>,
}

/// One constraint row after scaling.
struct ScaledRow {
    /// Index among all rows of the file.
    file_row: usize,
    /// The power of ten the row was multiplied by.
    scale: u32,
    rhs: i64,
    slack: Option<Slack>,
}

/// Builds the model the sections describe.
pub(super) fn assemble(raw: &Raw, origin: Origin<'_>) -> Result<MpsImport> {
    let constraint_rows: Vec<usize> = (0..raw.rows.len())
        .filter(|&i| raw.rows[i].kind != RowKind::Free)
        .collect();
    if constraint_rows.is_empty() {
        let message = "declares no constraint row (E, L or G)";
        return Err(origin.at(raw.rows_line, "ROWS", message));
    }
    if raw.columns.is_empty() {
        return Err(origin.at(raw.columns_line, "COLUMNS", "declares no column"));
    }
    for (column, bounds) in raw.columns.iter().zip(&raw.bounds) {
        check_integer(column, bounds, origin)?;
    }
    let by_row = entries_by_row(raw);
    let rows = constraint_rows
        .iter()
        .map(|&i| scale_row(raw, i, &by_row[i], origin))
        .collect::<Result<Vec<ScaledRow>>>()?;
    let (cost, cost_scale) = cost(raw, &by_row, origin)?;
    let matrix = matrix(raw, &rows, origin)?;
    let (mut lower, mut upper) = (Vec::new(), Vec::new());
    for (column, bounds) in raw.columns.iter().zip(&raw.bounds) {
        let (l, u) = column_bounds(column, bounds, origin)?;
        lower.push(l);
        upper.push(u);
    }
    let slacks: Vec<(usize, Slack)> = rows
        .iter()
        .filter_map(|r| r.slack.map(|s| (r.file_row, s)))
        .collect();
    lower.extend(slacks.iter().map(|_| Some(0)));
    upper.extend(slacks.iter().map(|(_, s)| s.upper));
    let variable_names = variable_names(raw, &slacks, origin)?;
    let mut full_cost = cost;
    full_cost.resize(variable_names.len(), 0);
    let units = Units {
        maximize: raw.maximize,
        cost_scale,
        added_columns: slacks.len(),
    };
    let model = Model {
        convex: crate::model::ConvexCosts::default(),
        change_cost: Vec::new(),
        matrix,
        rhs: rows.iter().map(|r| r.rhs).collect(),
        cost: full_cost,
        lower,
        upper,
        variable_names,
        row_names: rows
            .iter()
            .map(|r| raw.rows[r.file_row].name.clone())
            .collect(),
        units,
    };
    Ok(MpsImport {
        model,
        maximize: raw.maximize,
        cost_scale,
        row_scales: rows.iter().map(|r| r.scale).collect(),
        file_columns: raw.columns.len(),
    })
}

fn check_integer(column: &RawColumn, bounds: &ColumnBounds, origin: Origin<'_>) -> Result<()> {
    if column.marked_integer || bounds.integer {
        return Ok(());
    }
    let message = format!(
        "variable {:?} is continuous (declared outside 'MARKER' 'INTORG'/'INTEND' and not bounded BV, LI or UI); kernstep handles pure integer models",
        column.name
    );
    Err(origin.at(column.line, "COLUMNS field 1", message))
}

/// For every row of the file, its coefficients as `(column, entry)`.
fn entries_by_row(raw: &Raw) -> Vec<Vec<(usize, Entry)>> {
    let mut by_row = vec![Vec::new(); raw.rows.len()];
    for (j, column) in raw.columns.iter().enumerate() {
        for entry in &column.entries {
            by_row[entry.row].push((j, *entry));
        }
    }
    by_row
}

/// The power of ten that makes every value integral.
fn places<'d>(values: impl Iterator<Item = &'d Decimal>) -> u32 {
    values.map(Decimal::places).max().unwrap_or(0)
}

/// `10^scale * value` as an integer of at most `limit` in magnitude, or an error naming
/// `what` at `line`.
fn scaled_int(
    value: &Decimal,
    scale: u32,
    limit: i128,
    what: &str,
    at: (usize, &str),
    origin: Origin<'_>,
) -> Result<i64> {
    let scaled = value.scaled(scale).filter(|v| v.abs() <= limit);
    scaled.and_then(|v| i64::try_from(v).ok()).ok_or_else(|| {
        let how = if scale > 0 {
            format!(", multiplied by 10^{scale} to make it integral,")
        } else {
            String::new()
        };
        let message = format!("{what}{how} exceeds the limit of {limit} in absolute value");
        origin.at(at.0, at.1, message)
    })
}

fn scale_row(
    raw: &Raw,
    i: usize,
    entries: &[(usize, Entry)],
    origin: Origin<'_>,
) -> Result<ScaledRow> {
    let row = &raw.rows[i];
    let rhs = raw.rhs[i];
    let scale = places(
        entries
            .iter()
            .map(|(_, e)| &e.value)
            .chain(rhs.iter().map(|r| &r.value)),
    );
    let rhs = match rhs {
        Some(r) => {
            let what = format!("the right-hand side of row {:?}", row.name);
            let at = (r.line, "RHS");
            scaled_int(&r.value, scale, VALUE_LIMIT, &what, at, origin)?
        }
        None => 0,
    };
    let slack = slack(raw, i, scale, origin)?;
    Ok(ScaledRow {
        file_row: i,
        scale,
        rhs,
        slack,
    })
}

/// The slack of row `i` (scaled by `10^scale`), if it is an inequality or has a range.
///
/// Ranges follow the usual MPS meaning, as most MPS readers take it: with range
/// `R`, an `L` row holds `b - |R| <= a.x <= b`, a `G` row `b <= a.x <= b + |R|`, and an `E` row
/// `b <= a.x <= b + R` for `R > 0`, `b + R <= a.x <= b` for `R < 0`.
fn slack(raw: &Raw, i: usize, scale: u32, origin: Origin<'_>) -> Result<Option<Slack>> {
    let range = raw.ranges[i];
    let width = match range {
        None => None,
        Some(r) => match r.value {
            Number::Infinite(_) => None,
            Number::Finite(d) => {
                let floor = d.abs_shifted(scale).floor().filter(|v| *v <= VALUE_LIMIT);
                let what = format!("the range of row {:?}", raw.rows[i].name);
                let message = format!("{what} exceeds the limit of {VALUE_LIMIT}");
                let width = floor.ok_or_else(|| origin.at(r.line, "RANGES", message))?;
                Some(i64::try_from(width).unwrap_or(i64::MAX))
            }
        },
    };
    let negative_range = range.is_some_and(|r| match r.value {
        Number::Infinite(negative) => negative,
        Number::Finite(d) => d.is_negative(),
    });
    let zero_range = range.is_some_and(|r| r.value == Number::Finite(Decimal::from_int(0)));
    let coefficient = match raw.rows[i].kind {
        RowKind::Less => 1,
        RowKind::Greater => -1,
        RowKind::Equal if range.is_none() || zero_range => return Ok(None),
        RowKind::Equal if negative_range => 1,
        RowKind::Equal => -1,
        RowKind::Free => return Ok(None),
    };
    Ok(Some(Slack {
        coefficient,
        upper: width,
    }))
}

/// The objective coefficients (file columns only), scaled to integers as one vector and
/// negated for `OBJSENSE MAX`, with the power of ten used.
fn cost(raw: &Raw, by_row: &[Vec<(usize, Entry)>], origin: Origin<'_>) -> Result<(Vec<i64>, u32)> {
    let mut cost = vec![0; raw.columns.len()];
    let Some(objective) = raw.objective else {
        return Ok((cost, 0));
    };
    let entries = &by_row[objective];
    let scale = places(entries.iter().map(|(_, e)| &e.value));
    if let Some((_, deepest)) = entries.iter().find(|(_, e)| e.value.places() > MAX_PLACES) {
        let message = format!(
            "a cost with {scale} decimal places; reports hold at most {MAX_PLACES}, so the objective could not be given exactly"
        );
        return Err(origin.at(deepest.line, "COLUMNS", message));
    }
    for (j, entry) in entries {
        let what = format!("the cost of {:?}", raw.columns[*j].name);
        let at = (entry.line, "COLUMNS");
        let c = scaled_int(&entry.value, scale, VALUE_LIMIT, &what, at, origin)?;
        cost[*j] = if raw.maximize { -c } else { c };
    }
    Ok((cost, scale))
}

fn matrix(raw: &Raw, rows: &[ScaledRow], origin: Origin<'_>) -> Result<IntMatrix> {
    let slack_count = rows.iter().filter(|r| r.slack.is_some()).count();
    let width = raw.columns.len() + slack_count;
    let too_big = rows
        .len()
        .checked_mul(width)
        .is_none_or(|e| e > MAX_DENSE_ENTRIES);
    if too_big {
        let message = format!(
            "{} constraint rows and {width} variables (with slacks) exceed the {MAX_DENSE_ENTRIES} matrix entries kernstep holds",
            rows.len()
        );
        return Err(origin.at(raw.rows_line, "ROWS", message));
    }
    let position: Vec<Option<usize>> = {
        let mut p = vec![None; raw.rows.len()];
        for (k, r) in rows.iter().enumerate() {
            p[r.file_row] = Some(k);
        }
        p
    };
    let mut matrix = IntMatrix::zeros(rows.len(), width);
    for (j, column) in raw.columns.iter().enumerate() {
        for entry in &column.entries {
            let Some(k) = position[entry.row] else {
                continue;
            };
            let what = format!(
                "the coefficient of {:?} in row {:?}",
                column.name, raw.rows[entry.row].name
            );
            let at = (entry.line, "COLUMNS");
            let scale = rows[k].scale;
            let a = scaled_int(&entry.value, scale, MATRIX_ENTRY_LIMIT, &what, at, origin)?;
            matrix.set(k, j, a);
        }
    }
    let slacked = rows
        .iter()
        .enumerate()
        .filter_map(|(k, r)| r.slack.map(|s| (k, s)));
    for (offset, (k, s)) in slacked.enumerate() {
        matrix.set(k, raw.columns.len() + offset, s.coefficient);
    }
    Ok(matrix)
}

/// The integer bounds of a column: the default `[0, +inf)` unless `BOUNDS` say otherwise;
/// fractional bounds are rounded inwards (the variable is integer).
fn column_bounds(
    column: &RawColumn,
    bounds: &ColumnBounds,
    origin: Origin<'_>,
) -> Result<(Option<i64>, Option<i64>)> {
    let limited = |v: Option<i128>, line: usize, side: &str| -> Result<i64> {
        v.filter(|v| v.abs() <= VALUE_LIMIT)
            .and_then(|v| i64::try_from(v).ok())
            .ok_or_else(|| {
                let message = format!(
                    "the {side} bound of {:?} exceeds the limit of {VALUE_LIMIT} (values of 1e20 or more mean infinity)",
                    column.name
                );
                origin.at(line, "BOUNDS", message)
            })
    };
    let lower = match bounds.lower {
        None => Some(0),
        Some(side) => match side.value {
            None => None,
            Some(d) => Some(limited(d.ceil(), side.line, "lower")?),
        },
    };
    let upper = match bounds.upper {
        None => None,
        Some(side) => match side.value {
            None => None,
            Some(d) => Some(limited(d.floor(), side.line, "upper")?),
        },
    };
    if let (Some(l), Some(u)) = (lower, upper) {
        if l > u {
            return Err(empty_box(column, bounds, (l, u), origin));
        }
    }
    Ok((lower, upper))
}

fn empty_box(
    column: &RawColumn,
    bounds: &ColumnBounds,
    (l, u): (i64, i64),
    origin: Origin<'_>,
) -> crate::error::Error {
    let name = &column.name;
    let line = [bounds.lower, bounds.upper]
        .iter()
        .flatten()
        .map(|s| s.line)
        .max()
        .unwrap_or(column.line);
    let message = if bounds.lower.is_none() {
        format!(
            "the upper bound {u} of {name:?} is below its default lower bound 0; readers differ here (some then drop the lower bound), so write an MI or LO bound for it"
        )
    } else {
        format!("{name:?} has no integer value between its bounds {l} and {u} (rounded inwards)")
    };
    origin.at(line, "BOUNDS", message)
}

/// The file's column names followed by `slack:<row>` for every slack, all distinct.
fn variable_names(raw: &Raw, slacks: &[(usize, Slack)], origin: Origin<'_>) -> Result<Vec<String>> {
    let mut names: Vec<String> = raw.columns.iter().map(|c| c.name.clone()).collect();
    for (row, _) in slacks {
        let name = format!("slack:{}", raw.rows[*row].name);
        if let Some(column) = raw.columns.iter().find(|c| c.name == name) {
            let message = format!(
                "column {name:?} has the name kernstep gives the slack of row {:?}; rename the column",
                raw.rows[*row].name
            );
            return Err(origin.at(column.line, "COLUMNS field 1", message));
        }
        names.push(name);
    }
    Ok(names)
}
