//! The results of a batch: one record per day (JSON Lines or CSV) and the tally of a run.
//!
//! A record says how the day ended in one word ([`DayStatus`], from the day's certified
//! answer, never derived here), the plan's cost, the dual bound and gap of a partial set's
//! plan, the steps and the plan itself (nonzero entries by variable name in JSON Lines, one
//! column per variable in CSV). [`Tally`] counts records, so a run's summary can be rebuilt
//! from its results file.

use std::borrow::Cow;
use std::fmt;
use std::io::{self, BufRead, Write};
use std::marker::PhantomData;

use num_bigint::BigInt;
use schemars::JsonSchema;
use serde::de::{MapAccess, Visitor};
use serde::ser::SerializeMap;
use serde::{Deserialize, Deserializer, Serialize, Serializer};

use crate::certify::{Answer, Limit, Proof};
use crate::error::{Error, Result};
use crate::model::Units;
use crate::scenario::{DayOutcome, DayResult};
use crate::solve::{PlanFigures, Stability, Verdict};
use crate::testset::{Served, Source};
use crate::text::in_file_sense;
use crate::trace::decimal::Lenient;
use crate::trace::Decimal;

use super::CAUTION;

/// How a day ended, in the words of the records: the day's certified answer
/// ([`crate::certify::judge`]) or why there is none.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
#[non_exhaustive]
pub enum DayStatus {
    /// Proven optimal.
    Optimal,
    /// Optimal among the moves of a truncated set, not proven optimal.
    OptimalWithinNorm,
    /// Proven to have no plan.
    Infeasible,
    /// A partial set found no plan: nothing proven.
    Unknown,
    /// The cost falls without limit.
    Unbounded,
    /// The step limit stopped the solve.
    StepLimit,
    /// Ctrl-C stopped the solve, or came before it.
    Interrupted,
    /// The day's line was bad, or the solver refused it.
    Error,
}

impl DayStatus {
    /// The status of `result`.
    pub fn of(result: &DayResult) -> DayStatus {
        DayStatus::judged(result, result.answer().as_ref())
    }

    /// The status of `result`, whose certified answer is `answer`.
    fn judged(result: &DayResult, answer: Option<&Answer>) -> DayStatus {
        match &result.outcome {
            DayOutcome::Solved(_) => match answer {
                Some(Answer::Optimal { .. }) => DayStatus::Optimal,
                Some(Answer::Feasible { .. }) => DayStatus::OptimalWithinNorm,
                Some(Answer::Infeasible(_)) => DayStatus::Infeasible,
                Some(Answer::Unknown { .. }) => DayStatus::Unknown,
                Some(Answer::Unbounded(_)) => DayStatus::Unbounded,
                Some(Answer::Stopped(Limit::Steps)) => DayStatus::StepLimit,
                Some(Answer::Stopped(Limit::Cancelled)) | None => DayStatus::Interrupted,
            },
            DayOutcome::Failed(_) => DayStatus::Error,
            DayOutcome::NotRun => DayStatus::Interrupted,
        }
    }

    /// The word written for it (its serialised form).
    pub fn word(self) -> &'static str {
        match self {
            DayStatus::Optimal => "optimal",
            DayStatus::OptimalWithinNorm => "optimal_within_norm",
            DayStatus::Infeasible => "infeasible",
            DayStatus::Unknown => "unknown",
            DayStatus::Unbounded => "unbounded",
            DayStatus::StepLimit => "step_limit",
            DayStatus::Interrupted => "interrupted",
            DayStatus::Error => "error",
        }
    }

    /// The status written as `word`, if any.
    pub fn from_word(word: &str) -> Option<DayStatus> {
        DayStatus::ALL.into_iter().find(|s| s.word() == word)
    }

    /// Every status, in the order of the summary.
    pub const ALL: [DayStatus; 8] = [
        DayStatus::Optimal,
        DayStatus::OptimalWithinNorm,
        DayStatus::Infeasible,
        DayStatus::Unknown,
        DayStatus::Unbounded,
        DayStatus::StepLimit,
        DayStatus::Interrupted,
        DayStatus::Error,
    ];

    /// True when the day has no proven answer (the run then exits 1).
    pub fn unproven(self) -> bool {
        !matches!(self, DayStatus::Optimal | DayStatus::OptimalWithinNorm)
    }
}

/// The nonzero entries of a plan by variable name, in model order (a JSON object).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Plan<'a>(pub Vec<(Cow<'a, str>, i64)>);

impl<'a> Plan<'a> {
    /// The nonzero entries of `x`, named by `names`.
    pub fn of(names: &'a [String], x: &[i64]) -> Plan<'a> {
        Plan(
            names
                .iter()
                .zip(x)
                .filter(|(_, v)| **v != 0)
                .map(|(n, v)| (Cow::Borrowed(n.as_str()), *v))
                .collect(),
        )
    }

    /// The whole plan over `names` (variables not listed are 0); `None` names a variable the
    /// plan lists but `names` lacks.
    pub fn dense(&self, names: &[String]) -> std::result::Result<Vec<i64>, String> {
        let mut x = vec![0; names.len()];
        for (name, value) in &self.0 {
            let i = names
                .iter()
                .position(|n| n == name)
                .ok_or_else(|| name.to_string())?;
            x[i] = *value;
        }
        Ok(x)
    }
}

impl Serialize for Plan<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> std::result::Result<S::Ok, S::Error> {
        let mut map = serializer.serialize_map(Some(self.0.len()))?;
        for (name, value) in &self.0 {
            map.serialize_entry(name, &value.to_string())?;
        }
        map.end()
    }
}

impl JsonSchema for Plan<'_> {
    fn schema_name() -> std::borrow::Cow<'static, str> {
        "Plan".into()
    }

    fn json_schema(_: &mut schemars::SchemaGenerator) -> schemars::Schema {
        schemars::json_schema!({
            "description": "The plan's nonzero entries by variable name, in model order, each a decimal string.",
            "type": "object",
            "additionalProperties": { "type": "string", "pattern": "^-?[0-9]+$" },
        })
    }
}

impl<'de, 'a> Deserialize<'de> for Plan<'a> {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> std::result::Result<Self, D::Error> {
        struct Entries<'a>(PhantomData<Plan<'a>>);
        impl<'de, 'a> Visitor<'de> for Entries<'a> {
            type Value = Plan<'a>;
            fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
                f.write_str("an object of variable names to integers (decimal strings)")
            }
            fn visit_map<M: MapAccess<'de>>(
                self,
                mut map: M,
            ) -> std::result::Result<Self::Value, M::Error> {
                let mut entries = Vec::new();
                while let Some((name, value)) = map.next_entry::<String, Lenient<i64>>()? {
                    entries.push((Cow::Owned(name), value.0));
                }
                Ok(Plan(entries))
            }
        }
        deserializer.deserialize_map(Entries(PhantomData))
    }
}

/// One day's result record.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct DayRecord<'a> {
    /// The day's name, when its line could be read.
    pub day: Option<Cow<'a, str>>,
    /// The line the day starts on in its file.
    pub line: usize,
    /// How the day ended.
    pub status: DayStatus,
    /// Why the day has no proven answer, in words.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub detail: Option<String>,
    /// The plan's cost, when the day has a plan, in the model file's own units
    /// ([`Units`]), as a decimal string.
    pub objective: Option<Decimal>,
    /// The proven bound `ceil(L(y))` of a partial set's plan, as a decimal in the file's
    /// units (an upper bound when the file maximises).
    pub bound: Option<String>,
    /// The distance from the plan's objective to the bound (`>= 0`), as a decimal in the
    /// file's units.
    pub gap: Option<String>,
    /// Augmenting steps over both phases, when an integer point was reached.
    pub steps: Option<u64>,
    /// Wall-clock seconds spent on the day.
    pub seconds: f64,
    /// The plan.
    pub plan: Option<Plan<'a>>,
    /// A day priced against the day before: its plan cost and change cost apart, the
    /// variables changed and the units moved (and the same for the plan without the price,
    /// when compared). `objective` and `bound` are then those of the whole objective.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub change: Option<Stability>,
}

impl<'a> DayRecord<'a> {
    /// The record of `result` for a model in `units`, its plan named by `names` (the model's
    /// variable names; the plan lists the file's own columns only).
    pub fn of(result: &'a DayResult, names: &'a [String], units: &Units) -> DayRecord<'a> {
        // Judged once: the status and the detail both read it.
        let judged = result.answer();
        let answer = optimum(result);
        // The solver's objective leaves out the change price's constant; add it back.
        let constant = result.change.map_or(0, |c| c.constant);
        let (bound, gap) = answer
            .zip(result.bound.as_ref())
            .map(|((cost, _), b)| {
                let value = b.ceiling() + BigInt::from(constant);
                (units.value_text(&value), units.gap_text(&b.gap(cost)))
            })
            .unzip();
        let objective = answer.and_then(|(o, _)| o.checked_add(constant));
        DayRecord {
            day: result.id.as_deref().map(Cow::Borrowed),
            line: result.line,
            status: DayStatus::judged(result, judged.as_ref()),
            detail: detail(result, judged.as_ref()).map(|d| in_file_sense(d, units)),
            objective: objective.and_then(|o| units.objective(o).ok()),
            bound,
            gap,
            steps: steps(result),
            seconds: result.elapsed.as_secs_f64(),
            plan: answer.map(|(_, x)| Plan::of(units.own(names), x)),
            change: result.change.map(|c| c.stability),
        }
    }
}

/// The plan's cost and the plan, when the day has one (optimal or best found).
pub fn optimum(result: &DayResult) -> Option<(i128, &[i64])> {
    match &result.outcome {
        DayOutcome::Solved(verdict) => verdict.optimum(),
        _ => None,
    }
}

/// Augmenting steps over both phases; `None` when no integer point was reached.
pub fn steps(result: &DayResult) -> Option<u64> {
    match &result.outcome {
        DayOutcome::Solved(v) => v.point().map(|_| {
            let (feasibility, cost) = v.steps();
            feasibility + cost
        }),
        _ => None,
    }
}

/// Why a day has no proven answer, in words (`None` for a proven optimum); `answer` is the
/// day's certified answer.
fn detail(result: &DayResult, answer: Option<&Answer>) -> Option<String> {
    let answer = match &result.outcome {
        DayOutcome::Solved(_) => answer?,
        DayOutcome::Failed(e) => return Some(e.to_string()),
        DayOutcome::NotRun => return Some("not solved: interrupted before this day".into()),
    };
    let network = matches!(&result.outcome, DayOutcome::Solved(Verdict::Flow(_)));
    Some(match answer {
        Answer::Optimal { .. } => return None,
        Answer::Feasible { norm, .. } => match answer.gap() {
            Some(gap) => format!(
                "no improving move of norm <= {norm}; the dual bound leaves a gap of {gap}"
            ),
            None => format!("no improving move of norm <= {norm}; no finite dual bound"),
        },
        Answer::Infeasible(proof) => infeasible_detail(proof),
        Answer::Unknown { violation } => format!(
            "no feasible plan found (violation {violation}); the move set is incomplete, so this is not a proof of infeasibility"
        ),
        Answer::Unbounded(_) if network => "the cost falls without limit along a cycle".into(),
        Answer::Unbounded(ray) if ray.move_index.is_some() => {
            "the cost falls without limit along a move".into()
        }
        Answer::Unbounded(_) => "the cost falls without limit along a sum of moves".into(),
        Answer::Stopped(Limit::Steps) => "stopped at the step limit".into(),
        Answer::Stopped(Limit::Cancelled) => "interrupted during the solve".into(),
    })
}

/// What proves a day infeasible, in words.
fn infeasible_detail(proof: &Proof) -> String {
    match proof {
        Proof::NoIntegerSolution { .. } => {
            "the day's numbers admit no integer solution of the rows".into()
        }
        Proof::EmptyRange { variable } => {
            format!("variable {variable} has a lower bound above its upper bound")
        }
        Proof::NoLatticePointInBox { min_violation } => format!(
            "no lattice point of this fibre lies in the box (minimum violation {min_violation})"
        ),
        Proof::Cut { weights } => format!(
            "no plan meets the bounds: {} rows (a cut) ask for more than their lanes can carry",
            weights.iter().filter(|&&w| w != 0).count()
        ),
    }
}

/// How the records of a run are laid out.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Layout {
    /// One JSON object per day ([`write_jsonl`]).
    Jsonl,
    /// A header and one row per day, the plan one column per variable ([`write_csv_rows`]),
    /// with the change-price columns a priced run needs.
    Csv(ChangeColumns),
}

/// The change-price columns of CSV results, between `detail` and the variables: none for a
/// run without a change price, the priced plan's figures (plan cost, change cost, variables
/// changed, units moved) for a priced run, and the unpriced plan's too when it is compared.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum ChangeColumns {
    /// No change price.
    #[default]
    None,
    /// A change price: plan cost, change cost, variables changed, units moved.
    Priced,
    /// A change price compared with the plan without it: the same four figures for each.
    Compared,
}

impl ChangeColumns {
    /// The columns of a run with a change price (`priced`), compared with the unpriced plan
    /// (`compared`).
    pub fn of(priced: bool, compared: bool) -> Self {
        match (priced, compared) {
            (false, _) => ChangeColumns::None,
            (true, false) => ChangeColumns::Priced,
            (true, true) => ChangeColumns::Compared,
        }
    }

    /// The column names, in order.
    fn names(self) -> &'static [&'static str] {
        match self {
            ChangeColumns::None => &[],
            ChangeColumns::Priced => &CHANGE_COLUMNS[..FIGURES],
            ChangeColumns::Compared => &CHANGE_COLUMNS,
        }
    }

    /// The columns a CSV header names after the fixed ones.
    fn of_header(after_fixed: &[&str]) -> Self {
        if after_fixed.starts_with(&CHANGE_COLUMNS) {
            ChangeColumns::Compared
        } else if after_fixed.starts_with(&CHANGE_COLUMNS[..FIGURES]) {
            ChangeColumns::Priced
        } else {
            ChangeColumns::None
        }
    }

    /// The cells of a record's change figures (empty when it has none, as the first day of
    /// a chain).
    fn cells(self, change: Option<&Stability>) -> Vec<String> {
        let figures = |f: Option<&PlanFigures>| -> [String; 4] {
            match f {
                Some(f) => [
                    f.plan_cost.to_string(),
                    f.change_cost.to_string(),
                    f.changed.to_string(),
                    f.moved.to_string(),
                ],
                None => Default::default(),
            }
        };
        let priced = change.map(|c| &c.priced);
        let unpriced = change.and_then(|c| c.unpriced.as_ref());
        match self {
            ChangeColumns::None => Vec::new(),
            ChangeColumns::Priced => figures(priced).to_vec(),
            ChangeColumns::Compared => [figures(priced), figures(unpriced)].concat(),
        }
    }
}

/// The change-price columns of CSV results: the priced plan's four (a priced run), then the
/// unpriced plan's four (a compared run).
const CHANGE_COLUMNS: [&str; 8] = [
    "plan_cost",
    "change_cost",
    "changed",
    "moved",
    "unpriced_plan_cost",
    "unpriced_change_cost",
    "unpriced_changed",
    "unpriced_moved",
];

/// How many of [`CHANGE_COLUMNS`] give one plan's figures.
const FIGURES: usize = 4;

/// Writes `records` in `layout`, plans over `names`; `first` when they start the output (a
/// CSV then starts with its header; a later part of the same run, as another MPI rank
/// writes it, has none).
pub fn write_records(
    out: &mut impl Write,
    layout: Layout,
    records: &[DayRecord<'_>],
    names: &[String],
    first: bool,
) -> io::Result<()> {
    match layout {
        Layout::Jsonl => write_jsonl(out, records),
        Layout::Csv(change) if first => {
            write_csv_header(out, names, change)?;
            write_csv_rows(out, records, names, change)
        }
        Layout::Csv(change) => write_csv_rows(out, records, names, change),
    }
}

/// Writes `records` as JSON Lines, one object per line, each with its `schema` field.
pub fn write_jsonl(out: &mut impl Write, records: &[DayRecord<'_>]) -> io::Result<()> {
    for record in records {
        super::tagged::write_line(&mut *out, record)?;
        writeln!(out)?;
    }
    Ok(())
}

/// Reads JSON Lines records written by [`write_jsonl`]; `origin` names the source in errors,
/// which give the line.
pub fn read_jsonl(input: impl BufRead, origin: &str) -> Result<Vec<DayRecord<'static>>> {
    let mut records = Vec::new();
    for (number, line) in input.lines().enumerate() {
        let line = line.map_err(|source| Error::Io {
            path: origin.into(),
            source,
        })?;
        if line.trim().is_empty() {
            continue;
        }
        let record = serde_json::from_str(&line).map_err(|e| Error::Input {
            file: origin.to_string(),
            field: format!("line {}", number + 1),
            message: format!("not a day record: {e}"),
        })?;
        records.push(record);
    }
    Ok(records)
}

/// The fixed columns of the CSV results, before one column per variable.
const CSV_COLUMNS: [&str; 9] = [
    "day",
    "line",
    "status",
    "objective",
    "bound",
    "gap",
    "steps",
    "seconds",
    "detail",
];

/// Writes the CSV header: the fixed columns, the `change` columns, then one per variable.
pub fn write_csv_header(
    out: &mut impl Write,
    names: &[String],
    change: ChangeColumns,
) -> io::Result<()> {
    let mut writer = csv::Writer::from_writer(out);
    let header = CSV_COLUMNS
        .iter()
        .chain(change.names())
        .copied()
        .chain(names.iter().map(String::as_str));
    writer.write_record(header)?;
    writer.flush()
}

/// Writes one CSV row per record (no header): the fixed cells, the `change` cells, then the
/// plan dense over `names`.
pub fn write_csv_rows(
    out: &mut impl Write,
    records: &[DayRecord<'_>],
    names: &[String],
    change: ChangeColumns,
) -> io::Result<()> {
    let mut writer = csv::Writer::from_writer(out);
    let text = |v: Option<String>| v.unwrap_or_default();
    for r in records {
        let mut row = vec![
            r.day.as_deref().unwrap_or_default().to_string(),
            r.line.to_string(),
            r.status.word().to_string(),
            text(r.objective.map(|o| o.to_string())),
            text(r.bound.clone()),
            text(r.gap.clone()),
            text(r.steps.map(|s| s.to_string())),
            format!("{:.6}", r.seconds),
            text(r.detail.clone()),
        ];
        row.extend(change.cells(r.change.as_ref()));
        match &r.plan {
            Some(plan) => row.extend(
                plan.dense(names)
                    .map_err(|name| {
                        io::Error::new(
                            io::ErrorKind::InvalidInput,
                            format!("the plan names an unknown variable {name}"),
                        )
                    })?
                    .iter()
                    .map(i64::to_string),
            ),
            None => row.extend(std::iter::repeat_n(String::new(), names.len())),
        }
        writer.write_record(&row)?;
    }
    writer.flush()
}

/// Reads CSV results written by [`write_csv_header`] and [`write_csv_rows`]; the variable
/// names come from the header. Errors name `origin`, the line and the column.
pub fn read_csv(input: impl std::io::Read, origin: &str) -> Result<Vec<DayRecord<'static>>> {
    let mut reader = csv::Reader::from_reader(input);
    let header = reader.headers().map_err(|e| csv_error(origin, e))?.clone();
    if header.len() < CSV_COLUMNS.len() || header.iter().zip(CSV_COLUMNS).any(|(a, b)| a != b) {
        return Err(Error::Input {
            file: origin.to_string(),
            field: "line 1".to_string(),
            message: format!("the header must start with {}", CSV_COLUMNS.join(",")),
        });
    }
    let after_fixed: Vec<&str> = header.iter().skip(CSV_COLUMNS.len()).collect();
    let change = ChangeColumns::of_header(&after_fixed);
    let names: Vec<String> = after_fixed[change.names().len()..]
        .iter()
        .map(|n| n.to_string())
        .collect();
    let mut records = Vec::new();
    for row in reader.records() {
        let row = row.map_err(|e| csv_error(origin, e))?;
        let line = row.position().map_or(0, |p| p.line());
        records.push(
            csv_record(&row, &names, change).map_err(|(column, message)| Error::Input {
                file: origin.to_string(),
                field: format!("line {line}, column {column}"),
                message,
            })?,
        );
    }
    Ok(records)
}

/// One CSV row as a record, or the column that is wrong and why.
fn csv_record(
    row: &csv::StringRecord,
    names: &[String],
    change: ChangeColumns,
) -> std::result::Result<DayRecord<'static>, (&'static str, String)> {
    let cell = |i: usize| row.get(i).filter(|c| !c.is_empty());
    fn parsed<T: std::str::FromStr>(
        column: &'static str,
        cell: Option<&str>,
    ) -> std::result::Result<Option<T>, (&'static str, String)> {
        cell.map(|c| {
            c.parse()
                .map_err(|_| (column, format!("not a number: {c}")))
        })
        .transpose()
    }
    let status = cell(2).unwrap_or_default();
    let figures = |at: usize| -> std::result::Result<Option<PlanFigures>, (&'static str, String)> {
        let Some(plan_cost) = parsed("plan_cost", cell(at))? else {
            return Ok(None);
        };
        let missing = |column: &'static str| (column, "missing".to_string());
        Ok(Some(PlanFigures {
            plan_cost,
            change_cost: parsed("change_cost", cell(at + 1))?.ok_or(missing("change_cost"))?,
            changed: parsed("changed", cell(at + 2))?.ok_or(missing("changed"))?,
            moved: parsed("moved", cell(at + 3))?.ok_or(missing("moved"))?,
        }))
    };
    let first_change = CSV_COLUMNS.len();
    let stability = match change {
        ChangeColumns::None => None,
        ChangeColumns::Priced => figures(first_change)?.map(|priced| Stability {
            priced,
            unpriced: None,
        }),
        ChangeColumns::Compared => match figures(first_change)? {
            Some(priced) => Some(Stability {
                priced,
                unpriced: figures(first_change + FIGURES)?,
            }),
            None => None,
        },
    };
    let first_variable = first_change + change.names().len();
    let plan: Vec<(Cow<'static, str>, i64)> = names
        .iter()
        .enumerate()
        .map(|(k, name)| {
            let value = parsed::<i64>("plan", cell(first_variable + k))?;
            Ok((Cow::Owned(name.clone()), value.unwrap_or(0)))
        })
        .collect::<std::result::Result<_, _>>()?;
    let objective = parsed("objective", cell(3))?;
    Ok(DayRecord {
        day: cell(0).map(|d| Cow::Owned(d.to_string())),
        line: parsed("line", cell(1))?.ok_or(("line", "missing".to_string()))?,
        status: DayStatus::from_word(status)
            .ok_or_else(|| ("status", format!("unknown status {status:?}")))?,
        detail: cell(8).map(String::from),
        objective,
        bound: cell(4).map(String::from),
        gap: cell(5).map(String::from),
        steps: parsed("steps", cell(6))?,
        seconds: parsed("seconds", cell(7))?.unwrap_or(0.0),
        plan: objective.map(|_| Plan(plan.into_iter().filter(|(_, v)| *v != 0).collect())),
        change: stability,
    })
}

/// A CSV reading error, with the line when the reader knows it.
fn csv_error(origin: &str, e: csv::Error) -> Error {
    Error::Input {
        file: origin.to_string(),
        field: e
            .position()
            .map_or_else(|| "CSV".to_string(), |p| format!("line {}", p.line())),
        message: e.to_string(),
    }
}

/// Counts of the days by status, with the total cost of the answered days.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct Tally {
    /// Days in the input.
    pub days: usize,
    /// Proven optimal.
    pub optimal: usize,
    /// Of the optimal days, those proven by a dual bound (a truncated set's plan).
    pub optimal_by_bound: usize,
    /// Optimal among the moves of a truncated set.
    pub optimal_within_norm: usize,
    /// The largest gap left by a dual bound over the days that have one, as a decimal.
    pub largest_gap: Option<String>,
    /// Proven to have no plan.
    pub infeasible: usize,
    /// No plan found with a partial set: nothing proven.
    pub unknown: usize,
    /// Cost without limit.
    pub unbounded: usize,
    /// Stopped by the step limit.
    pub step_limit: usize,
    /// Not solved because of Ctrl-C.
    pub interrupted: usize,
    /// Bad lines and refused days.
    pub errors: usize,
    /// Sum of the answered days' objectives, in the file's units like the records', as a
    /// decimal string.
    pub total_objective: Decimal,
    /// Sum of the days' solve times, in seconds.
    pub solve_seconds: f64,
}

impl Tally {
    /// Counts `records`.
    pub fn of(records: &[DayRecord<'_>]) -> Tally {
        let mut t = Tally::default();
        for r in records {
            t.add(r);
        }
        t
    }

    /// Counts one more record.
    fn add(&mut self, r: &DayRecord<'_>) {
        self.days += 1;
        *match r.status {
            DayStatus::Optimal => &mut self.optimal,
            DayStatus::OptimalWithinNorm => &mut self.optimal_within_norm,
            DayStatus::Infeasible => &mut self.infeasible,
            DayStatus::Unknown => &mut self.unknown,
            DayStatus::Unbounded => &mut self.unbounded,
            DayStatus::StepLimit => &mut self.step_limit,
            DayStatus::Interrupted => &mut self.interrupted,
            DayStatus::Error => &mut self.errors,
        } += 1;
        if r.bound.is_some() && r.status == DayStatus::Optimal {
            self.optimal_by_bound += 1;
        }
        self.widen_gap(r.gap.as_deref());
        if let Some(objective) = r.objective {
            self.total_objective = self.total_objective.saturating_add(objective);
        }
        self.solve_seconds += r.seconds;
    }

    /// Keeps the larger of the largest gap and `gap`.
    fn widen_gap(&mut self, gap: Option<&str>) {
        let value = |g: Option<&str>| g.and_then(|g| g.parse::<BigInt>().ok());
        if value(gap) > value(self.largest_gap.as_deref()) {
            self.largest_gap = gap.map(String::from);
        }
    }

    /// Adds the counts of `other` (another share of the days).
    pub fn absorb(&mut self, other: Tally) {
        self.days += other.days;
        self.optimal += other.optimal;
        self.optimal_by_bound += other.optimal_by_bound;
        self.optimal_within_norm += other.optimal_within_norm;
        self.infeasible += other.infeasible;
        self.unknown += other.unknown;
        self.unbounded += other.unbounded;
        self.step_limit += other.step_limit;
        self.interrupted += other.interrupted;
        self.errors += other.errors;
        self.total_objective = self.total_objective.saturating_add(other.total_objective);
        self.solve_seconds += other.solve_seconds;
        self.widen_gap(other.largest_gap.as_deref());
    }

    /// 2 for any error, else 1 for any day without a proven answer, else 0.
    pub fn exit_code(&self) -> u8 {
        if self.errors > 0 {
            2
        } else if self.infeasible
            + self.unknown
            + self.unbounded
            + self.step_limit
            + self.interrupted
            > 0
        {
            1
        } else {
            0
        }
    }
}

/// The summary document of a batch run (`batch --json`): the tally and how the run went.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct RunSummary {
    /// The counts.
    #[serde(flatten)]
    pub tally: Tally,
    /// Wall-clock seconds of the whole run.
    pub wall_seconds: f64,
    /// The worker threads asked for (`None`: one per core).
    pub threads: Option<usize>,
    /// Moves in the test set (0 for a network's implicit cycles).
    pub moves: usize,
    /// Where the set came from: `cached <digest prefix>`, `built for this run`, `network` or
    /// `read from <file>`.
    pub set: String,
    /// What the plans must also respect and the tool does not check.
    pub caution: String,
}

impl RunSummary {
    /// The summary of a run that served its days with `served`.
    pub fn new(tally: Tally, served: &Served, threads: Option<usize>, wall_seconds: f64) -> Self {
        RunSummary {
            tally,
            wall_seconds,
            threads,
            moves: served.moves.len(),
            set: match &served.source {
                Source::Cached(digest) => format!("cached {}", &digest[..digest.len().min(12)]),
                Source::Built => "built for this run".to_string(),
                Source::Network => "network".to_string(),
                Source::File(path) => format!("read from {path}"),
            },
            caution: CAUTION.to_string(),
        }
    }
}
