//! `kernstep solve MODEL`: re-optimise one instance of a model with its cached Graver basis and
//! print the plan with its certificate.

use std::io::{self, Write};
use std::process::ExitCode;

use clap::Args;
use kernstep::solve::{Numbers, Verdict};
use kernstep::trace::{certify, BoundDoc, Certified, CoverageDoc, Decimal, Outcome, Recheck};
use serde::Serialize;

use kernstep::testset::{Served, Source};

use super::explain::{certificate_line, count_moves, status_line, wrap};
use super::instance::{cancelled, Instance, InstanceArgs, SOLVE_SCHEMA};
use super::table::{write_pairs, write_table};

/// Output width of the human summary.
const WIDTH: usize = 100;
/// At most this many plan values are listed in the human summary.
const PLAN_ROWS: usize = 40;

/// Arguments of `solve`.
#[derive(Debug, Args)]
pub struct SolveArgs {
    #[command(flatten)]
    pub instance: InstanceArgs,
    /// Print one JSON document (layout in the README) instead of the summary.
    #[arg(long)]
    pub json: bool,
}

/// The `--json` document.
#[derive(Serialize)]
struct SolveDoc<'a> {
    schema: &'static str,
    model: &'a str,
    variant: Option<&'a str>,
    warm_start: bool,
    status: &'a Outcome,
    bound: Option<&'a BoundDoc>,
    objective: Option<Decimal>,
    violation: Option<Decimal>,
    x: Option<&'a [i64]>,
    rhs: &'a [i64],
    variables: &'a [String],
    steps: StepCounts,
    seconds: f64,
    coverage: CoverageDoc,
    set: SetDoc<'a>,
    recheck: Option<&'a Recheck>,
}

#[derive(Serialize)]
struct StepCounts {
    feasibility: u64,
    cost: u64,
}

/// Where the moves came from.
#[derive(Serialize)]
struct SetDoc<'a> {
    source: &'static str,
    digest: Option<&'a str>,
    moves: usize,
}

impl<'a> SetDoc<'a> {
    fn of(set: &'a Served) -> Self {
        let (source, digest) = match &set.source {
            Source::Cached(d) => ("cache", Some(d.as_str())),
            Source::Built => ("built", None),
            Source::Network => ("network", None),
        };
        SetDoc {
            source,
            digest,
            moves: set.set.elements.len(),
        }
    }
}

/// Solves the instance, re-checks the claim and prints the result.
pub fn run(args: &SolveArgs) -> anyhow::Result<ExitCode> {
    let instance = args.instance.load()?;
    let verdict = instance.prepared.solve(
        &instance.model,
        &instance.options,
        instance.start(),
        &cancelled,
    )?;
    let Certified {
        verdict,
        bound,
        recheck: checked,
        answer,
    } = certify(
        &instance.prepared,
        &instance.model.matrix,
        Numbers::of(&instance.model),
        verdict,
        None,
    )?;
    let outcome = Outcome::of_answer(
        &answer,
        &instance.model.variable_names,
        &instance.model.row_names,
    );
    let report = Report {
        verdict: &verdict,
        outcome: &outcome,
        checked: checked.as_ref(),
        bound: verdict
            .optimum()
            .zip(bound.as_ref())
            .map(|((cost, _), b)| BoundDoc::of(b, cost)),
    };
    let mut out = io::stdout().lock();
    if args.json {
        let doc = document(&instance, &report)?;
        writeln!(out, "{}", serde_json::to_string_pretty(&doc)?)?;
    } else {
        write_summary(&mut out, &instance, &report)?;
    }
    out.flush()?;
    Ok(exit_code(&outcome))
}

/// What a solve found, with its re-check and the dual bound of a truncated set's plan.
struct Report<'a> {
    verdict: &'a Verdict,
    outcome: &'a Outcome,
    checked: Option<&'a Recheck>,
    bound: Option<BoundDoc>,
}

/// 0 for an optimal plan (also among truncated moves), 1 for every other outcome.
pub fn exit_code(outcome: &Outcome) -> ExitCode {
    if outcome.is_optimal() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    }
}

/// The point a solve reached with its cost (once inside the box) and violation.
struct Reached<'a> {
    x: &'a [i64],
    objective: Option<i128>,
    violation: i128,
}

/// What `verdict` reached, evaluated on the instance's own numbers.
fn reached<'a>(instance: &Instance, verdict: &'a Verdict) -> anyhow::Result<Option<Reached<'a>>> {
    let Some(x) = verdict.point() else {
        return Ok(None);
    };
    let problem = Numbers::of(&instance.model).problem()?;
    let violation = problem.violation(x)?;
    let objective = match verdict {
        Verdict::Solved(s) => s.objective,
        _ if violation == 0 => Some(problem.objective().value(x)?),
        _ => None,
    };
    Ok(Some(Reached {
        x,
        objective,
        violation,
    }))
}

fn document<'a>(instance: &'a Instance, report: &'a Report<'a>) -> anyhow::Result<SolveDoc<'a>> {
    let verdict = report.verdict;
    let point = reached(instance, verdict)?;
    let (feasibility, cost) = verdict.steps();
    Ok(SolveDoc {
        schema: SOLVE_SCHEMA,
        model: &instance.path,
        variant: instance.variant.as_deref(),
        warm_start: instance.warm.is_some(),
        status: report.outcome,
        bound: report.bound.as_ref(),
        objective: point.as_ref().and_then(|p| p.objective).map(Decimal),
        violation: point.as_ref().map(|p| Decimal(p.violation)),
        x: point.as_ref().map(|p| p.x),
        rhs: &instance.model.rhs,
        variables: &instance.model.variable_names,
        steps: StepCounts { feasibility, cost },
        seconds: verdict.elapsed().as_secs_f64(),
        coverage: instance.set.coverage.into(),
        set: SetDoc::of(&instance.set),
        recheck: report.checked,
    })
}

/// `4 moves, complete Graver basis, cache entry 1a2b3c4d5e6f`, or the implicit set of a
/// network.
pub fn set_text(set: &Served) -> String {
    let source = match &set.source {
        Source::Cached(digest) => format!("cache entry {}", &digest[..digest.len().min(12)]),
        Source::Built => "built for this run".to_string(),
        Source::Network => {
            return "the cycles of the network (its Graver basis, implicit: nothing enumerated)"
                .to_string()
        }
    };
    let coverage = match CoverageDoc::from(set.coverage) {
        CoverageDoc::Complete => "complete Graver basis".to_string(),
        CoverageDoc::BoxValid => "Graver basis truncated to the build's box".to_string(),
        CoverageDoc::NormTruncated { norm } => format!("Graver basis up to ℓ1 norm {norm}"),
    };
    format!(
        "{}, {coverage}, {source}",
        count_moves(set.set.elements.len())
    )
}

fn write_summary(
    out: &mut impl Write,
    instance: &Instance,
    report: &Report<'_>,
) -> anyhow::Result<()> {
    let (verdict, outcome) = (report.verdict, report.outcome);
    let mut rows = vec![("model".to_string(), instance.path.clone())];
    if let Some(id) = &instance.variant {
        rows.push(("variant".to_string(), id.clone()));
    }
    let start = if instance.warm.is_some() {
        "warm (previous plan + particular solution of the change)"
    } else if instance.base.is_some() {
        "from the optimum of the model's own numbers (network)"
    } else {
        "cold (integer solution of A x = b)"
    };
    rows.push(("start".to_string(), start.to_string()));
    rows.push(("status".to_string(), status_line(outcome)));
    let point = reached(instance, verdict)?;
    if let Some(p) = &point {
        if let Some(objective) = p.objective {
            rows.push(("objective".to_string(), objective.to_string()));
            if let Some(bound) = &report.bound {
                rows.push(("dual bound".to_string(), bound_text(bound)));
            }
        } else {
            rows.push(("violation".to_string(), p.violation.to_string()));
        }
        let (feasibility, cost) = verdict.steps();
        rows.push((
            "steps".to_string(),
            format!("{feasibility} in phase I (feasibility), {cost} in phase II (cost)"),
        ));
        rows.push((
            "time".to_string(),
            format!("{:.3} ms", verdict.elapsed().as_secs_f64() * 1e3),
        ));
    }
    rows.push(("moves".to_string(), set_text(&instance.set)));
    write_pairs(out, &rows)?;
    if let Some(p) = &point {
        writeln!(out)?;
        if let Some(heading) = point_heading(outcome) {
            writeln!(out, "{heading}")?;
        }
        write_plan(out, p.x, &instance.model.variable_names)?;
    }
    writeln!(out)?;
    for line in wrap(
        &certificate_line(outcome, report.checked, &instance.model),
        WIDTH,
        2,
    ) {
        writeln!(out, "{line}")?;
    }
    Ok(())
}

/// `2780, meets the cost` or `2750, gap 30 (1.08%)`, with where the bound came from.
pub fn bound_text(bound: &BoundDoc) -> String {
    let reach = if bound.gap == "0" {
        "meets the cost: no plan is cheaper".to_string()
    } else {
        format!("gap {} ({:.2}%)", bound.gap, bound.relative_gap * 100.0)
    };
    format!(
        "{}, {reach} (LP relaxation's dual, evaluated exactly)",
        bound.value
    )
}

/// What the listed point is, when it is not an optimal plan.
fn point_heading(outcome: &Outcome) -> Option<&'static str> {
    match outcome {
        Outcome::Optimal | Outcome::OptimalForMovesUpTo { .. } => None,
        Outcome::Unbounded { .. } => Some("the feasible plan the ray starts from:"),
        Outcome::StepLimit | Outcome::Cancelled => Some("the point reached so far:"),
        _ => Some("the point where phase I stopped (outside the bounds):"),
    }
}

/// The nonzero plan values by variable name, at most [`PLAN_ROWS`] of them.
fn write_plan(out: &mut impl Write, x: &[i64], names: &[String]) -> io::Result<()> {
    let nonzero: Vec<Vec<String>> = x
        .iter()
        .zip(names)
        .filter(|(&v, _)| v != 0)
        .map(|(v, name)| vec![name.clone(), v.to_string()])
        .collect();
    if nonzero.is_empty() {
        return writeln!(out, "every variable is 0");
    }
    let shown = nonzero.len().min(PLAN_ROWS);
    write_table(out, &["variable", "value"], &nonzero[..shown])?;
    if shown < nonzero.len() {
        writeln!(
            out,
            "... and {} more nonzero values (--json lists the whole plan)",
            nonzero.len() - shown
        )?;
    }
    Ok(())
}
