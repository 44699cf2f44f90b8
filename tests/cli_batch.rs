//! `kernstep batch` through the binary: results equal one-by-one `Prepared::solve` runs (cold,
//! and warm-started from the day before with `--chain`) for 1 and 2 threads; optima equal the
//! HiGHS 1.16 optima recorded by `scripts/demo_reference.py` in `tests/fixtures/demo/` (two
//! of the scenarios with surcharges, that is convex costs); a bad
//! line is reported with its number while the other days solve; exit codes; CSV; model files;
//! the summary's caution goes wherever the summary goes.

use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

use augment::{Options, Status};
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::Control;
use kernstep::model::Model;
use kernstep::network::{FlowOutcome, Network};
use kernstep::scenario::{parse_day_lines, Scenario};
use kernstep::solve::{coverage_of, Prepared, Verdict, WarmStart};
use kernstep::testset::{build, BuildOutcome, BuildSpec};
use serde_json::Value;

mod cli_support;
use cli_support::{expect_both as expect, kernstep, scenarios};

/// A record's objective (a decimal string) as a number.
fn objective(record: &Value) -> Option<i64> {
    cli_support::int64(&record["objective"])
}

fn records(stdout: &str) -> Vec<Value> {
    stdout
        .lines()
        .map(|l| serde_json::from_str(l).expect("a JSON line"))
        .collect()
}

/// What one day's record says: status, objective, steps and the nonzero plan by name.
type Summary = (String, Option<i64>, Option<u64>, BTreeMap<String, i64>);

fn summary_of_record(r: &Value) -> Summary {
    let plan = r["plan"]
        .as_object()
        .map(|m| {
            m.iter()
                .map(|(k, v)| (k.clone(), cli_support::int64(v).unwrap()))
                .collect()
        })
        .unwrap_or_default();
    (
        r["status"].as_str().unwrap().to_string(),
        objective(r),
        r["steps"].as_u64(),
        plan,
    )
}

/// The set the binary uses: the network itself for a network matrix, else the Graver basis.
fn prepared_for(model: &Model) -> Prepared {
    if let Ok(network) = Network::detect(&model.matrix) {
        return Prepared::network(&model.matrix, network);
    }
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let spec = BuildSpec::default().resolve(model, &analysis).unwrap();
    let BuildOutcome::Built(built) =
        build(&model.matrix, &analysis, &spec, &Control::new(), None).unwrap()
    else {
        panic!("the build stopped")
    };
    let coverage = coverage_of(&built.metadata.completeness);
    Prepared::new(&model.matrix, &built.set, coverage).unwrap()
}

/// The days solved one at a time with the library, cold or warm-started from the last
/// feasible plan, summarised as `batch` writes them.
fn one_by_one(scenario_file: &str, days_file: &str, chain: bool) -> Vec<Summary> {
    let scenario = Scenario::load(&scenarios().join(scenario_file)).unwrap();
    let model = scenario.compile().unwrap();
    let prepared = prepared_for(&model);
    let text = std::fs::read_to_string(scenarios().join(days_file)).unwrap();
    // Unchained days on a network all start from the optimum of the scenario's own numbers
    // (README, batch); the others start cold.
    let base = match prepared.network_of() {
        Some(_) if !chain => {
            let verdict = prepared
                .solve(&model, &Options::default(), None, &|| false)
                .unwrap();
            let Verdict::Flow(flow) = &verdict else {
                panic!("a network gives a flow verdict")
            };
            let FlowOutcome::Optimal {
                flow, potentials, ..
            } = &flow.solution.outcome
            else {
                panic!("the scenario's own numbers have an optimum")
            };
            Some(WarmStart {
                rhs: model.rhs.clone(),
                x: flow.clone(),
                potentials: Some(potentials.clone()),
            })
        }
        _ => None,
    };
    let mut warm: Option<WarmStart> = base.clone();
    let mut out = Vec::new();
    for (_, parsed) in parse_day_lines(&scenario, &text, days_file) {
        let day = parsed.unwrap().apply(&model, days_file).unwrap();
        let verdict = prepared
            .solve(&day, &Options::default(), warm.as_ref(), &|| false)
            .unwrap();
        let (f, c) = verdict.steps();
        let summary = match (&verdict, verdict.optimum()) {
            (_, Some((objective, x))) => {
                let named = model.variable_names.iter().cloned().zip(x.to_vec());
                let plan = named.filter(|(_, v)| *v != 0).collect();
                (
                    "optimal".to_string(),
                    Some(objective as i64),
                    Some(f + c),
                    plan,
                )
            }
            (Verdict::NoIntegerSolution(_), None) => {
                ("infeasible".into(), None, None, BTreeMap::new())
            }
            (Verdict::Solved(s), None) if matches!(s.status, Status::Infeasible(_)) => {
                ("infeasible".into(), None, Some(f + c), BTreeMap::new())
            }
            // A cut proves it before any integer point is reached: no step count.
            (Verdict::Flow(flow), None)
                if matches!(flow.solution.outcome, FlowOutcome::Infeasible(_)) =>
            {
                ("infeasible".into(), None, None, BTreeMap::new())
            }
            (other, None) => panic!("unexpected verdict {other:?}"),
        };
        if let (true, Some((_, x))) = (chain, verdict.optimum()) {
            warm = Some(WarmStart {
                rhs: day.rhs.clone(),
                x: x.to_vec(),
                potentials: verdict.potentials().map(<[i64]>::to_vec),
            });
        }
        out.push(summary);
    }
    out
}

#[test]
fn batch_equals_one_by_one_solves_for_any_thread_count_with_and_without_chain() {
    let cache = tempfile::tempdir().unwrap();
    for (scenario, days) in [
        ("brackle_lanes.toml", "brackle_lanes_days.jsonl"),
        ("vell_valley.toml", "vell_valley_days.jsonl"),
    ] {
        let (s, d) = (scenarios().join(scenario), scenarios().join(days));
        let (s, d) = (s.to_str().unwrap(), d.to_str().unwrap());
        for chain in [false, true] {
            let expected = one_by_one(scenario, days, chain);
            for threads in ["1", "2"] {
                let mut args = vec!["batch", s, d, "--build", "--threads", threads];
                if chain {
                    args.push("--chain");
                }
                let code = if expected.iter().all(|e| e.0 == "optimal") {
                    0
                } else {
                    1
                };
                let (stdout, _) = expect(cache.path(), &args, code);
                let got: Vec<Summary> = records(&stdout).iter().map(summary_of_record).collect();
                assert_eq!(
                    got, expected,
                    "{scenario}, chain {chain}, {threads} threads"
                );
            }
        }
    }
}

/// The violation of the point a solve started from: the first phase-I step's `before`, or 0
/// when phase I had nothing to repair.
fn start_violation(s: &augment::Solution) -> i128 {
    let trace = s.trace.as_ref().expect("traced");
    trace
        .iter()
        .find(|t| t.phase == augment::Phase::Feasibility)
        .map_or(0, |t| t.before)
}

/// The point a solve started from: its result minus every traced step.
fn start_point(s: &augment::Solution, moves: &augment::MoveSet) -> Vec<i64> {
    let mut x = s.x.clone();
    for t in s.trace.as_ref().expect("traced") {
        let factor = t.length * t.sign.factor();
        for (xi, g) in x.iter_mut().zip(moves.row(t.move_index)) {
            *xi -= factor * g;
        }
    }
    x
}

/// Chained truckload days (demands and supplies drawn by a fixed linear congruential sequence,
/// some of them infeasible): a warm start begins no farther from the box than a cold start of
/// the same day, starts from another point than the cold start on some days (yesterday's plan
/// is used), and both reach the same optimum.
#[test]
fn a_warm_start_never_begins_farther_from_the_box_than_a_cold_one() {
    let scenario = Scenario::load(&scenarios().join("hollin_trucks.toml")).unwrap();
    let model = scenario.compile().unwrap();
    let prepared = prepared_for(&model);
    let mut seed = 20261202u64;
    let mut draw = |low: u64, high: u64| {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        low + (seed >> 33) % (high - low + 1)
    };
    let text: String = (0..60)
        .map(|k| {
            let (east, west, kiln) = (draw(0, 12), draw(0, 12), draw(0, 12));
            let (sawmill, pinegate) = (draw(0, 20), draw(0, 20));
            format!(
                "{{\"day\": \"d{k}\", \"demand\": {{\"east_yard\": {east}, \"west_yard\": {west}, \
                 \"kiln\": {kiln}}}, \"supply\": {{\"sawmill\": {sawmill}, \"pinegate\": {pinegate}}}}}\n"
            )
        })
        .collect();
    let options = Options::default().trace(true);
    let (mut warm, mut elsewhere) = (None::<WarmStart>, 0);
    for (_, parsed) in parse_day_lines(&scenario, &text, "days.jsonl") {
        let day = parsed.unwrap().apply(&model, "days.jsonl").unwrap();
        let solve = |from: Option<&WarmStart>| match prepared.solve(&day, &options, from, &|| false)
        {
            Ok(Verdict::Solved(s)) => s,
            other => panic!("unexpected {other:?}"),
        };
        let cold = solve(None);
        if let Some(w) = &warm {
            let warmed = solve(Some(w));
            assert!(start_violation(&warmed) <= start_violation(&cold));
            let moves = prepared.moves().unwrap();
            elsewhere += usize::from(start_point(&warmed, moves) != start_point(&cold, moves));
            assert_eq!(warmed.objective, cold.objective);
            assert_eq!(warmed.violation, cold.violation);
        }
        if cold.violation == 0 {
            warm = Some(WarmStart {
                rhs: day.rhs.clone(),
                x: cold.x.clone(),
                potentials: None,
            });
        }
    }
    assert!(elsewhere > 0, "no day started from yesterday's plan");
}

#[test]
fn optima_equal_the_recorded_highs_optima() {
    let cache = tempfile::tempdir().unwrap();
    let fixtures = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/demo");
    // wendle_ferries and corran_quarries (lanes, truckloads) carry surcharges: convex costs.
    for name in [
        "vell_valley",
        "brackle_lanes",
        "hollin_trucks",
        "wendle_ferries",
        "corran_quarries",
    ] {
        let text = std::fs::read_to_string(fixtures.join(format!("{name}.json"))).unwrap();
        let fixture: Value = serde_json::from_str(&text).unwrap();
        // Reference: HiGHS 1.16 through highspy, written by scripts/demo_reference.py
        // (surcharges as integer overflow variables, the linearisation of Wolsey 1998).
        assert_eq!(fixture["reference"]["solver"], "HiGHS");
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        let scenario = root.join(fixture["scenario"].as_str().unwrap());
        let days = root.join(fixture["days_file"].as_str().unwrap());
        let out = cache.path().join(format!("{name}.jsonl"));
        let args = [
            "batch",
            scenario.to_str().unwrap(),
            days.to_str().unwrap(),
            "--build",
            "--json",
            "--out",
            out.to_str().unwrap(),
        ];
        let output = kernstep(cache.path(), &args);
        assert!(matches!(output.status.code(), Some(0 | 1)), "{name}");
        let summary: Value = serde_json::from_slice(&output.stdout).unwrap();
        // The summary writes the total as a decimal string (the JSON contract).
        assert_eq!(
            cli_support::int64(&summary["total_objective"]),
            fixture["total_objective"].as_i64(),
            "{name}"
        );
        let got = records(&std::fs::read_to_string(&out).unwrap());
        let want = fixture["days"].as_array().unwrap();
        assert_eq!(got.len(), want.len(), "{name}");
        for (g, w) in got.iter().zip(want) {
            assert_eq!(g["day"], w["day"], "{name}");
            assert_eq!(g["status"], w["status"], "{name} {}", w["day"]);
            assert_eq!(objective(g), w["objective"].as_i64(), "{name} {}", w["day"]);
        }
    }
}

#[test]
fn a_bad_line_is_reported_with_its_number_and_the_other_days_solve() {
    let dir = tempfile::tempdir().unwrap();
    let days = dir.path().join("days.jsonl");
    std::fs::write(
        &days,
        "{\"day\": \"d1\", \"demand\": {\"old_docks\": 10}}\n\
         {\"day\": \"d2\", \"demand\": {\"old_dock\": 10}}\n\
         {\"day\": \"d3\", \"supply\": {\"windmill\": 40}}\n",
    )
    .unwrap();
    let scenario = scenarios().join("brackle_lanes.toml");
    let args = [
        "batch",
        scenario.to_str().unwrap(),
        days.to_str().unwrap(),
        "--build",
        "--threads",
        "2",
    ];
    let (stdout, stderr) = expect(dir.path(), &args, 2);
    assert!(
        stderr.contains("days.jsonl: line 2: demand.old_dock: no zone named \"old_dock\""),
        "{stderr}"
    );
    let got = records(&stdout);
    let statuses: Vec<&str> = got.iter().map(|r| r["status"].as_str().unwrap()).collect();
    assert_eq!(statuses, ["optimal", "error", "optimal"]);
    assert_eq!(got[1]["line"], 2);
    assert!(got[1]["detail"].as_str().unwrap().contains("line 2"));
    assert!(
        stderr
            .lines()
            .any(|l| l.starts_with("bad lines or errors") && l.ends_with(" 1")),
        "{stderr}"
    );
}

#[test]
fn csv_days_and_csv_results() {
    let cache = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("brackle_lanes.toml");
    let days = scenarios().join("brackle_lanes_days.csv");
    let args = [
        "batch",
        scenario.to_str().unwrap(),
        days.to_str().unwrap(),
        "--build",
        "--format",
        "csv",
    ];
    // Two of the example days are infeasible on purpose: exit code 1.
    let (stdout, stderr) = expect(cache.path(), &args, 1);
    let lines: Vec<&str> = stdout.lines().collect();
    assert_eq!(lines.len(), 9);
    assert!(lines[0].starts_with(
        "day,line,status,objective,bound,gap,steps,seconds,detail,quayside->north_bank,"
    ));
    let cells = lines[0].split(',').count();
    assert!(lines
        .iter()
        .all(|l| l.split(',').count() == cells || l.contains('"')));
    assert!(
        lines[1].starts_with("2026-03-02,2,optimal,265,"),
        "{}",
        lines[1]
    );
    let infeasible = stderr.lines().find(|l| l.starts_with("infeasible"));
    assert_eq!(
        infeasible.map(|l| l.split_whitespace().collect::<Vec<_>>()),
        Some(vec!["infeasible", "2"]),
        "{stderr}"
    );
}

#[test]
fn model_files_take_numeric_variants() {
    let dir = tempfile::tempdir().unwrap();
    let model = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/lane_plan.toml");
    let days = dir.path().join("v.jsonl");
    // lane_plan.toml: brackwater ships 7, north needs 5, east needs 6; costs 4 6 5 3;
    // brackwater_north <= 5, fennick_north <= 4. Optimum by hand: 5 north, 2 east from
    // brackwater (4*5 + 6*2 = 32), fennick 0 north, 4 east (3*4 = 12): 44.
    std::fs::write(
        &days,
        "{\"id\": \"base\"}\n{\"id\": \"more\", \"rhs\": [7, 5, 8]}\n",
    )
    .unwrap();
    let args = [
        "batch",
        model.to_str().unwrap(),
        days.to_str().unwrap(),
        "--build",
    ];
    let (stdout, _) = expect(dir.path(), &args, 0);
    let got = records(&stdout);
    assert_eq!(got[0]["day"], "base");
    assert_eq!(got[0]["objective"], "44");
    assert_eq!(got[0]["plan"]["brackwater_north"], "5");
    // Two more units east come from fennick at 3 each.
    assert_eq!(got[1]["objective"], "50");
    let csv = dir.path().join("v.csv");
    std::fs::write(&csv, "day,field,name,value\n").unwrap();
    let args = [
        "batch",
        model.to_str().unwrap(),
        csv.to_str().unwrap(),
        "--build",
    ];
    let (_, stderr) = expect(dir.path(), &args, 2);
    assert!(stderr.contains("CSV days name scenario fields"), "{stderr}");
}

/// The caution line of the human summary (README, Caution).
const CAUTION: &str =
    "caution: plans must also meet vehicle limits, working-time rules and local regulations (not checked)";

#[test]
fn the_summary_carries_the_caution_to_stderr_or_stdout() {
    let dir = tempfile::tempdir().unwrap();
    let model = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/lane_plan.toml");
    let days = dir.path().join("v.jsonl");
    std::fs::write(&days, "{\"id\": \"base\"}\n").unwrap();
    let (m, d) = (model.to_str().unwrap(), days.to_str().unwrap());
    let cautions = |text: &str| text.lines().filter(|l| l.starts_with("caution")).count();
    // Results on stdout: the summary, and its caution, on stderr.
    let (stdout, stderr) = expect(dir.path(), &["batch", m, d, "--build"], 0);
    assert_eq!(cautions(&stdout), 0, "{stdout}");
    assert_eq!(
        stderr.lines().filter(|l| *l == CAUTION).count(),
        1,
        "{stderr}"
    );
    assert_eq!(cautions(&stderr), 1, "{stderr}");
    // Results in a file: the summary on stdout.
    let out = dir.path().join("out.jsonl");
    let o = out.to_str().unwrap();
    let (stdout, stderr) = expect(dir.path(), &["batch", m, d, "--out", o], 0);
    assert_eq!(
        stdout.lines().filter(|l| *l == CAUTION).count(),
        1,
        "{stdout}"
    );
    assert_eq!(cautions(&stderr), 0, "{stderr}");
    // JSON summaries carry it as a field, on stdout or stderr alike.
    let field = |json: &str| {
        let summary: Value = serde_json::from_str(json).unwrap();
        summary["caution"].as_str().map(|c| format!("caution: {c}"))
    };
    let (stdout, _) = expect(dir.path(), &["batch", m, d, "--out", o, "--json"], 0);
    assert_eq!(field(&stdout).as_deref(), Some(CAUTION), "{stdout}");
    let (_, stderr) = expect(dir.path(), &["batch", m, d, "--json"], 0);
    assert_eq!(field(&stderr).as_deref(), Some(CAUTION), "{stderr}");
}

#[test]
fn without_a_cached_set_batch_says_what_to_build_and_that_build_serves_it() {
    let cache = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("brackle_lanes.toml");
    let days = scenarios().join("brackle_lanes_days.jsonl");
    // The lane plan is a network matrix; `--engine moves` asks for its enumerated set.
    let (s, d) = (scenario.to_str().unwrap(), days.to_str().unwrap());
    let args = ["batch", s, d, "--engine", "moves"];
    let (_, stderr) = expect(cache.path(), &args, 2);
    // The command names the engine too: without it `build` would store the implicit entry.
    let command = format!(
        "kernstep build {} --engine moves --cache-dir {}",
        scenario.display(),
        cache.path().display()
    );
    assert!(stderr.contains(&command), "{stderr}");
    // The overnight step on the scenario file itself, then the day's batch finds the set.
    let (stdout, _) = expect(
        cache.path(),
        &["build", "--engine", "moves", scenario.to_str().unwrap()],
        0,
    );
    assert!(stdout.contains("built"), "{stdout}");
    let (_, stderr) = expect(cache.path(), &args, 1);
    assert!(stderr.contains("cached"), "{stderr}");
}

#[test]
fn a_box_truncated_set_refuses_days_whose_box_is_wider() {
    let cache = tempfile::tempdir().unwrap();
    // The lanes' box cuts no cycle (every cycle moves one unit per lane), so `--box auto`
    // stores the complete set; closing tannery->north_bank (capacity 0) makes it cut every
    // cycle through that lane.
    let original = std::fs::read_to_string(scenarios().join("brackle_lanes.toml")).unwrap();
    let lane = "to = \"north_bank\"\ncost = 7\ncapacity = 12";
    assert!(original.contains(lane));
    let closed = original.replacen(lane, "to = \"north_bank\"\ncost = 7\ncapacity = 0", 1);
    let scenario = cache.path().join("brackle_closed.toml");
    std::fs::write(&scenario, closed).unwrap();
    let days = scenarios().join("brackle_lanes_days.jsonl");
    let s = scenario.to_str().unwrap();
    let built = expect(
        cache.path(),
        &["build", s, "--box", "auto", "--engine", "moves"],
        0,
    );
    assert!(!built.0.contains("complete"), "{built:?}");
    // The same matrix with its own box (another cache: the complete set would serve both).
    let other = tempfile::tempdir().unwrap();
    let original = scenarios().join("brackle_lanes.toml");
    let args = [
        "build",
        original.to_str().unwrap(),
        "--box",
        "auto",
        "--engine",
        "moves",
    ];
    let (whole, _) = expect(other.path(), &args, 0);
    assert!(
        whole.contains("built (complete: the truncation cut nothing)"),
        "{whole}"
    );
    // Day 2026-03-09 lifts the capacity of tannery->north_bank: its range is then unbounded,
    // wider than the box the set was built for, so no answer may claim optimality.
    let d = days.to_str().unwrap();
    let (stdout, stderr) = expect(cache.path(), &["batch", s, d, "--engine", "moves"], 2);
    let got = records(&stdout);
    assert_eq!(got.len(), 8);
    for r in &got {
        if r["day"] == "2026-03-09" {
            assert_eq!(r["status"], "error", "{r}");
            let detail = r["detail"].as_str().unwrap();
            assert!(detail.contains("wider than the box"), "{detail}");
        } else {
            assert_ne!(r["status"], "error", "{r}");
        }
    }
    assert!(stderr.contains("build the complete set"), "{stderr}");
}

#[test]
fn ctrl_c_writes_the_finished_days_and_counts_the_others() {
    let dir = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("vell_valley.toml");
    let s = scenario.to_str().unwrap();
    let first = dir.path().join("first.jsonl");
    std::fs::write(&first, "{\"day\": \"first\"}\n").unwrap();
    expect(
        dir.path(),
        &["batch", s, first.to_str().unwrap(), "--build"],
        0,
    );
    // The signal must land while days are being solved: if a run is over before it arrives
    // (the solver is fast), try again with four times as many days; if it arrives before the
    // first day is solved (reading the days is slow on a loaded machine), wait twice as long.
    let (mut count, mut delay) = (6_000usize, std::time::Duration::from_millis(800));
    for _ in 0..6 {
        let days = dir.path().join("many.jsonl");
        let text: String = (0..count)
            .map(|i| format!("{{\"day\": \"d{i}\"}}\n"))
            .collect();
        std::fs::write(&days, text).unwrap();
        let out = dir.path().join("results.jsonl");
        let child = Command::new(env!("CARGO_BIN_EXE_kernstep"))
            .args([
                "batch",
                s,
                days.to_str().unwrap(),
                "--json",
                "--threads",
                "1",
            ])
            .arg("--out")
            .arg(&out)
            .arg("--cache-dir")
            .arg(dir.path())
            .stdout(std::process::Stdio::piped())
            .spawn()
            .unwrap();
        std::thread::sleep(delay);
        let signal = Command::new("kill")
            .args(["-INT", &child.id().to_string()])
            .status()
            .unwrap();
        assert!(signal.success());
        let output = child.wait_with_output().unwrap();
        let summary: Value = serde_json::from_slice(&output.stdout).unwrap();
        let (optimal, interrupted) = (
            summary["optimal"].as_u64().unwrap(),
            summary["interrupted"].as_u64().unwrap(),
        );
        if interrupted == 0 {
            assert_eq!(output.status.code(), Some(0), "{summary}");
            count *= 4;
            continue;
        }
        assert_eq!(output.status.code(), Some(1));
        assert_eq!(optimal + interrupted, count as u64, "{summary}");
        let got = records(&std::fs::read_to_string(&out).unwrap());
        assert_eq!(got.len(), count);
        let last = got.last().unwrap();
        assert_eq!(last["status"], "interrupted");
        assert_eq!(last["day"], format!("d{}", count - 1));
        if optimal == 0 {
            delay *= 2;
            continue;
        }
        return;
    }
    panic!("no signal arrived while days were being solved");
}

/// Issue 23: with a partial set (the Graver elements up to norm 2) no day is called
/// infeasible without a proof. Every example scenario's days against the HiGHS answers of
/// `tests/fixtures/demo/` (HiGHS 1.16.0 through highspy, scripts/demo_reference.py):
/// `infeasible` only where HiGHS finds no plan, `optimal` only at its optimum,
/// `optimal_within_norm` never below it; days the partial set cannot start are `unknown`
/// (before, 8 of them that HiGHS solves were written `infeasible`), and the summary counts
/// them apart.
#[test]
fn a_partial_set_never_calls_a_day_infeasible_without_a_proof() {
    let mut unknown_but_feasible = 0;
    for name in [
        "vell_valley",
        "hollin_trucks",
        "corran_quarries",
        "wendle_ferries",
        "brackle_lanes",
    ] {
        let dir = tempfile::tempdir().unwrap();
        let scenario = scenarios().join(format!("{name}.toml"));
        let days = scenarios().join(format!("{name}_days.jsonl"));
        let (s, d) = (scenario.to_str().unwrap(), days.to_str().unwrap());
        let build = ["build", s, "--engine", "moves", "--norm-limit", "2"];
        expect(dir.path(), &build, 0);
        let batch = kernstep(dir.path(), &["batch", s, d, "--engine", "moves", "--json"]);
        let fixture: Value = serde_json::from_slice(
            &std::fs::read(
                Path::new(env!("CARGO_MANIFEST_DIR"))
                    .join(format!("tests/fixtures/demo/{name}.json")),
            )
            .unwrap(),
        )
        .unwrap();
        assert_eq!(fixture["reference"]["solver"], "HiGHS");
        let reference: BTreeMap<&str, &Value> = fixture["days"]
            .as_array()
            .unwrap()
            .iter()
            .map(|day| (day["day"].as_str().unwrap(), day))
            .collect();
        let stdout = String::from_utf8(batch.stdout).unwrap();
        let mut unknown = 0;
        for record in records(&stdout) {
            let day = record["day"].as_str().unwrap();
            let want = reference[day];
            let optimum = want["objective"].as_i64();
            match record["status"].as_str().unwrap() {
                "infeasible" => assert_eq!(want["status"], "infeasible", "{name} {day}"),
                "optimal" => assert_eq!(objective(&record), optimum, "{name} {day}"),
                "optimal_within_norm" => {
                    assert!(objective(&record) >= optimum, "{name} {day}")
                }
                "unknown" => {
                    unknown += 1;
                    unknown_but_feasible += usize::from(want["status"] == "optimal");
                    let detail = record["detail"].as_str().unwrap();
                    assert!(detail.contains("not a proof"), "{detail}");
                }
                other => panic!("{name} {day}: {other}"),
            }
        }
        if unknown > 0 {
            assert_eq!(batch.status.code(), Some(1), "{name}");
            let summary = kernstep(dir.path(), &["batch", s, d, "--engine", "moves"]);
            let table = String::from_utf8(summary.stderr).unwrap();
            let line = table
                .lines()
                .find(|l| l.starts_with("unknown (partial set, no plan found)"));
            assert_eq!(
                line.and_then(|l| l.split_whitespace().last()),
                Some(unknown.to_string().as_str()),
                "{table}"
            );
        }
    }
    assert!(unknown_but_feasible >= 5, "{unknown_but_feasible}");
}

/// What `batch` writes, the library's readers read back: the JSON Lines and the CSV results
/// of one run agree day by day, and the tally rebuilt from them equals the summary printed.
#[test]
fn the_results_files_read_back_with_the_library_readers() {
    use kernstep::formats::batch::{read_csv, read_jsonl, Tally};
    let cache = tempfile::tempdir().unwrap();
    let scenario = scenarios().join("vell_valley.toml");
    let days = scenarios().join("vell_valley_days.jsonl");
    let out = cache.path().join("results.jsonl");
    let csv = cache.path().join("results.csv");
    let run = |file: &Path, format: &str| {
        let (summary, _) = expect(
            cache.path(),
            &[
                "batch",
                scenario.to_str().unwrap(),
                days.to_str().unwrap(),
                "--build",
                "--json",
                "--format",
                format,
                "--out",
                file.to_str().unwrap(),
            ],
            1, // one day of the scenario is infeasible on purpose
        );
        serde_json::from_str::<Value>(&summary).unwrap()
    };
    let summary = run(&out, "jsonl");
    run(&csv, "csv");
    let jsonl = read_jsonl(std::fs::read(&out).unwrap().as_slice(), "results.jsonl").unwrap();
    let table = read_csv(std::fs::read(&csv).unwrap().as_slice(), "results.csv").unwrap();
    assert_eq!(jsonl.len(), 30);
    for (a, b) in jsonl.iter().zip(&table) {
        assert_eq!(
            (&a.day, a.line, a.status, a.objective, a.steps, &a.plan),
            (&b.day, b.line, b.status, b.objective, b.steps, &b.plan)
        );
    }
    let tally = serde_json::to_value(Tally::of(&jsonl)).unwrap();
    for key in ["days", "optimal", "infeasible", "errors", "total_objective"] {
        assert_eq!(tally[key], summary[key], "{key}");
    }
}
