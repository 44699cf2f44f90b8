//! `kernstep trace` through the binary, checked from its JSON alone: replaying the steps from
//! the start point gives the final plan, every recorded value is recomputed from the points,
//! phase-II points are feasible, and the certificate is re-checked against the move set that
//! `kernstep build --out` writes. Also the SVG (parsed as XML, with distinct integer tick
//! labels), the 100-column limit, and scenario days traced under the scenario's variable
//! names.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use kernstep::scenario::Scenario;
use serde::Deserialize;
use serde_json::{json, Value};

mod cli_support;
use cli_support::convex::ConvexObjective;
use cli_support::{batch_answers, document_answer, expect_both, scenarios};

fn kernstep(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_kernstep"))
        .args(args)
        .output()
        .expect("run kernstep")
}

fn text(bytes: &[u8]) -> String {
    String::from_utf8(bytes.to_vec()).unwrap()
}

/// The plain numbers of a model, as the test needs them.
struct Instance {
    matrix: Vec<Vec<i64>>,
    rhs: Vec<i64>,
    cost: Vec<i64>,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
}

impl Instance {
    fn write(&self, path: &Path) {
        let model = json!({
            "matrix": self.matrix, "rhs": self.rhs, "cost": self.cost,
            "lower": self.lower, "upper": self.upper,
        });
        std::fs::write(path, model.to_string()).unwrap();
    }

    /// The row names a model file without names gets (README, Model files): `r1`, `r2`, ...
    fn row_names(&self) -> Vec<String> {
        (1..=self.rhs.len()).map(|i| format!("r{i}")).collect()
    }

    fn image(&self, x: &[i64]) -> Vec<i128> {
        self.matrix
            .iter()
            .map(|row| {
                row.iter()
                    .zip(x)
                    .map(|(&a, &v)| i128::from(a) * i128::from(v))
                    .sum()
            })
            .collect()
    }

    fn cost_of(&self, x: &[i64]) -> i128 {
        self.cost
            .iter()
            .zip(x)
            .map(|(&c, &v)| i128::from(c) * i128::from(v))
            .sum()
    }

    /// `sum_i dist(x_i, [l_i, u_i])`.
    fn violation(&self, x: &[i64]) -> i128 {
        x.iter()
            .enumerate()
            .map(|(i, &v)| {
                let below = self.lower[i].map_or(0, |l| (l - v).max(0));
                let above = self.upper[i].map_or(0, |u| (v - u).max(0));
                i128::from(below + above)
            })
            .sum()
    }
}

/// A list of integers: JSON numbers (the model's own) or decimal strings (plan values).
fn numbers(v: &Value) -> Vec<i64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|e| e.as_i64().or_else(|| cli_support::int64(e)).unwrap())
        .collect()
}

fn decimal(v: &Value) -> i128 {
    v.as_str().unwrap().parse().unwrap()
}

/// The move set of the model's matrix, written by `build --out`.
fn move_set(model: &Path, dir: &Path) -> Vec<Vec<i64>> {
    let out_file = dir.join("set.json");
    let out = kernstep(&[
        "build",
        "--engine",
        "moves",
        model.to_str().unwrap(),
        "--out",
        out_file.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let set: Value = serde_json::from_str(&std::fs::read_to_string(out_file).unwrap()).unwrap();
    set["elements"]
        .as_array()
        .unwrap()
        .iter()
        .map(numbers)
        .collect()
}

fn trace_json(model: &Path, cache: &Path, extra: &[&str]) -> (i32, Value) {
    let cache = cache.join("cache");
    let (m, c) = (model.to_str().unwrap(), cache.to_str().unwrap());
    let mut args = vec!["trace", m, "--json", "--build", "--cache-dir", c];
    args.extend_from_slice(extra);
    let out = kernstep(&args);
    let code = out.status.code().unwrap();
    assert!(code < 2, "{}", text(&out.stderr));
    (code, serde_json::from_str(&text(&out.stdout)).unwrap())
}

fn add(x: &[i64], d: &[i64], times: i64) -> Vec<i64> {
    x.iter().zip(d).map(|(&a, &b)| a + times * b).collect()
}

fn in_box(m: &Instance, x: &[i64]) -> bool {
    m.violation(x) == 0
}

/// Replays the steps from the start point, recomputing every recorded value; `cost` is the
/// instance's objective (its linear cost, or that plus convex costs).
fn replay(m: &Instance, doc: &Value, set: &[Vec<i64>], cost: &dyn Fn(&[i64]) -> i128) {
    let Some(start) = doc["start"].as_array().map(|_| numbers(&doc["start"])) else {
        // No integer point at all, or (network) a cut proves the box empty before any step.
        let tag = doc["outcome"]["tag"].as_str().unwrap();
        assert!(
            ["no_integer_solution", "infeasible_cut"].contains(&tag),
            "{tag}"
        );
        return;
    };
    let rhs: Vec<i128> = m.rhs.iter().map(|&b| i128::from(b)).collect();
    assert_eq!(m.image(&start), rhs, "A start = b");
    let mut x = start;
    let mut in_phase_two = false;
    for (i, step) in doc["steps"].as_array().unwrap().iter().enumerate() {
        assert_eq!(step["step"], i + 1);
        let d = numbers(&step["direction"]);
        let sign = step["sign"].as_i64().unwrap();
        match step["move_index"].as_u64() {
            Some(k) => assert_eq!(
                d,
                add(&vec![0; d.len()], &set[k as usize], sign),
                "direction = sign * move"
            ),
            // A network's step is one of its cycles: a 0/±1 vector (a circuit of A).
            None => assert!(d.iter().all(|v| v.abs() <= 1) && doc["moves"].is_null()),
        }
        assert!(m.image(&d).iter().all(|&v| v == 0), "A d = 0");
        let length = cli_support::int64(&step["length"]).unwrap();
        assert!(length >= 1);
        let next = add(&x, &d, length);
        let values = match step["phase"].as_str().unwrap() {
            "feasibility" => {
                assert!(!in_phase_two, "phase I after phase II");
                (m.violation(&x), m.violation(&next))
            }
            "cost" => {
                in_phase_two = true;
                assert!(in_box(m, &x) && in_box(m, &next), "phase II leaves the box");
                (cost(&x), cost(&next))
            }
            other => panic!("phase {other}"),
        };
        let (before, after, gain) = (
            decimal(&step["before"]),
            decimal(&step["after"]),
            decimal(&step["gain"]),
        );
        assert_eq!((before, after), values, "step {}", i + 1);
        assert!(gain > 0 && gain == before - after);
        x = next;
    }
    assert_eq!(x, numbers(&doc["x"]), "start + steps = final point");
    if !doc["objective"].is_null() {
        assert_eq!(decimal(&doc["objective"]), cost(&x));
    }
}

/// Re-checks the final claim from the JSON and the move set, without the solver.
fn recheck(m: &Instance, doc: &Value, set: &[Vec<i64>]) {
    let tag = doc["outcome"]["tag"].as_str().unwrap();
    let signed = || {
        set.iter()
            .flat_map(|g| [g.clone(), add(&vec![0; g.len()], g, -1)])
    };
    match tag {
        "optimal" => {
            let x = numbers(&doc["x"]);
            assert!(in_box(m, &x));
            let improving = signed()
                .map(|g| add(&x, &g, 1))
                .filter(|y| in_box(m, y) && m.cost_of(y) < m.cost_of(&x))
                .count();
            assert_eq!(improving, 0, "a move improves the final plan");
            if doc["moves"].is_null() {
                assert_eq!(doc["recheck"]["claim"], "dual_potentials");
            } else {
                assert_eq!(doc["recheck"]["moves_checked"], set.len());
            }
        }
        "infeasible_cut" => {
            // w^T A x = w^T b for the cut's rows, but on the box w^T A x ranges over an
            // interval without w^T b (Farkas-type argument, checked from the JSON alone).
            let rows = m.row_names();
            let mut w = vec![0i128; m.rhs.len()];
            let cut = &doc["outcome"];
            for (name, weight) in cut["rows"]
                .as_array()
                .unwrap()
                .iter()
                .zip(cut["weights"].as_array().unwrap())
            {
                let r = rows
                    .iter()
                    .position(|n| n == name.as_str().unwrap())
                    .unwrap();
                w[r] = i128::from(weight.as_i64().unwrap());
            }
            let target: i128 = w.iter().zip(&m.rhs).map(|(a, &b)| a * i128::from(b)).sum();
            let (mut low, mut high) = (Some(0i128), Some(0i128));
            for j in 0..m.cost.len() {
                let coef: i128 = (0..w.len())
                    .map(|r| w[r] * i128::from(m.matrix[r][j]))
                    .sum();
                let (lo, hi) = (m.lower[j].map(i128::from), m.upper[j].map(i128::from));
                let (a, b) = if coef >= 0 { (lo, hi) } else { (hi, lo) };
                low = low
                    .zip(if coef == 0 {
                        Some(0)
                    } else {
                        a.map(|v| coef * v)
                    })
                    .map(|(s, t)| s + t);
                high = high
                    .zip(if coef == 0 {
                        Some(0)
                    } else {
                        b.map(|v| coef * v)
                    })
                    .map(|(s, t)| s + t);
            }
            assert!(
                low.is_some_and(|l| target < l) || high.is_some_and(|h| target > h),
                "the cut does not separate: {target} within [{low:?}, {high:?}]"
            );
        }
        "no_lattice_point_in_box" => {
            let x = numbers(&doc["x"]);
            let base = m.violation(&x);
            assert!(base > 0);
            assert!(signed().all(|g| m.violation(&add(&x, &g, 1)) >= base));
        }
        "unbounded" => {
            let d = numbers(&doc["outcome"]["direction"]);
            assert!(m.image(&d).iter().all(|&v| v == 0) && m.cost_of(&d) < 0);
            let free = d.iter().enumerate().all(|(i, &v)| {
                v == 0 || (v > 0 && m.upper[i].is_none()) || (v < 0 && m.lower[i].is_none())
            });
            assert!(free && in_box(m, &numbers(&doc["x"])));
        }
        "no_integer_solution" => {}
        other => panic!("unexpected outcome {other}"),
    }
}

#[derive(Deserialize)]
struct Fixture {
    matrix: Vec<Vec<i64>>,
    variants: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    rhs: Vec<i64>,
    cost: Vec<i64>,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
    expect: Expect,
}

#[derive(Deserialize)]
struct Expect {
    objective: Option<i64>,
}

fn fixture_instances(name: &str) -> Vec<(Instance, Option<i64>)> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/solve")
        .join(name);
    let f: Fixture = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    f.variants
        .into_iter()
        .map(|c| {
            let instance = Instance {
                matrix: f.matrix.clone(),
                rhs: c.rhs,
                cost: c.cost,
                lower: c.lower,
                upper: c.upper,
            };
            (instance, c.expect.objective)
        })
        .collect()
}

fn check_fixture(name: &str) {
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("model.json");
    let instances = fixture_instances(name);
    instances[0].0.write(&model);
    let set = move_set(&model, dir.path());
    let mut steps_seen = [0usize; 2];
    // Both engines: the enumerated set, and `auto` (a network matrix along its cycles).
    for ((m, optimum), engine) in instances.iter().flat_map(|i| [(i, "moves"), (i, "auto")]) {
        m.write(&model);
        let (code, doc) = trace_json(&model, dir.path(), &["--engine", engine]);
        assert_eq!(code == 0, doc["outcome"]["tag"] == "optimal");
        replay(m, &doc, &set, &|x| m.cost_of(x));
        recheck(m, &doc, &set);
        if let Some(optimum) = optimum {
            // Optimum recorded by HiGHS 1.16 (fixture file).
            assert_eq!(decimal(&doc["objective"]), i128::from(*optimum));
        }
        for step in doc["steps"].as_array().unwrap() {
            steps_seen[usize::from(step["phase"] == "cost")] += 1;
        }
    }
    assert!(steps_seen[0] > 0 && steps_seen[1] > 0, "{steps_seen:?}");
}

#[test]
fn lanes_3x3_traces_replay_and_recheck() {
    check_fixture("lanes_3x3.json");
}

#[test]
fn dense_3x6_traces_replay_and_recheck() {
    check_fixture("dense_3x6_b.json");
}

/// `examples/depot_stores.toml` (convex costs on two lanes and both stores) traced under every
/// variant of its HiGHS fixture: the document records the file's convex costs, its steps
/// replay from the start to the final plan, and every phase-II `before`/`after` and the
/// objective equal `c.x + sum_i p_i(x_i)` computed here by the closed form
/// (`cli_support::convex`), not by kernstep.
#[test]
fn convex_traces_replay_with_the_convex_costs() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let path = root.join("examples/depot_stores.toml");
    let file: toml::Table = std::fs::read_to_string(&path).unwrap().parse().unwrap();
    let matrix: Vec<Vec<i64>> = file["matrix"]
        .as_array()
        .unwrap()
        .iter()
        .map(|row| {
            let row = row.as_array().unwrap();
            row.iter().map(|v| v.as_integer().unwrap()).collect()
        })
        .collect();
    let objective = ConvexObjective::read(&path);
    let fixture = std::fs::read_to_string(root.join("tests/fixtures/convex/depot_stores.json"));
    let fixture: Value = serde_json::from_str(&fixture.unwrap()).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let set = move_set(&path, dir.path());
    let mut steps_seen = [0usize; 2];
    for case in fixture["variants"].as_array().unwrap() {
        let mut variant = case.clone();
        let fields = variant.as_object_mut().unwrap();
        fields.retain(|k, _| ["id", "rhs", "cost", "lower", "upper"].contains(&k.as_str()));
        let (_, doc) = trace_json(&path, dir.path(), &["--variant", &variant.to_string()]);
        let id = case["id"].as_str().unwrap();
        let bounds = |key: &str| -> Vec<Option<i64>> {
            let list = doc[key].as_array().unwrap();
            list.iter().map(Value::as_i64).collect()
        };
        let m = Instance {
            matrix: matrix.clone(),
            rhs: numbers(&doc["rhs"]),
            cost: numbers(&doc["cost"]),
            lower: bounds("lower"),
            upper: bounds("upper"),
        };
        let want_cost = case.get("cost").map_or(objective.cost.clone(), numbers);
        assert_eq!(m.cost, want_cost, "{id}: the document's linear cost");
        for (variable, breaks, slopes) in &objective.pieces {
            let recorded = &doc["convex_cost"][doc["variables"][*variable].as_str().unwrap()];
            assert_eq!(
                (numbers(&recorded["breaks"]), numbers(&recorded["slopes"])),
                (breaks.clone(), slopes.clone()),
                "{id}"
            );
        }
        let cost = objective.with_cost(&m.cost);
        replay(&m, &doc, &set, &|x| cost.value(x));
        for step in doc["steps"].as_array().unwrap() {
            steps_seen[usize::from(step["phase"] == "cost")] += 1;
        }
    }
    assert!(steps_seen[0] > 0 && steps_seen[1] > 0, "{steps_seen:?}");
}

fn tables_model(dir: &Path) -> PathBuf {
    let (m, _) = fixture_instances("tables_3x3x3.json").remove(0);
    let path = dir.join("tables.json");
    m.write(&path);
    path
}

#[test]
fn svg_is_xml_with_one_point_per_step() {
    let dir = tempfile::tempdir().unwrap();
    let model = tables_model(dir.path());
    let svg = dir.path().join("steps.svg");
    let (_, doc) = trace_json(&model, dir.path(), &["--svg", svg.to_str().unwrap()]);
    let content = std::fs::read_to_string(&svg).unwrap();
    let tree = roxmltree::Document::parse(&content).unwrap();
    assert_eq!(tree.root_element().tag_name().name(), "svg");
    let circles = tree
        .descendants()
        .filter(|n| n.tag_name().name() == "circle")
        .count();
    let steps = doc["steps"].as_array().unwrap().len();
    assert!(steps > 0);
    assert_eq!(circles, steps);
    assert!(cli_support::check_integer_ticks(&content) >= 2, "{content}");
    assert!(svg_texts(&tree).contains(&"status: optimal".to_string()));
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert!(left.is_empty(), "temporary files left: {left:?}");
}

/// The text of every `<text>` element of an SVG picture.
fn svg_texts(tree: &roxmltree::Document) -> Vec<String> {
    tree.descendants()
        .filter(|n| n.tag_name().name() == "text")
        .filter_map(|n| n.text())
        .map(|t| t.trim().to_string())
        .collect()
}

/// The plot of a trace that proves infeasibility marks where phase I ended, and a partial
/// set's plan shows its dual bound. The 2 x 2 transport with sums 5 has the plans
/// `x = (5 - t, t, t, 5 - t)` (by hand); `x1 <= 1` needs `t >= 4` and `x2 <= 3` needs `t <= 3`,
/// so no plan meets the bounds.
#[test]
fn svg_marks_an_infeasible_end_and_the_dual_bound() {
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("capped.toml");
    std::fs::write(
        &model,
        "matrix = [[1, 1, 0, 0], [0, 0, 1, 1], [1, 0, 1, 0], [0, 1, 0, 1]]\n\
         rhs = [5, 5, 5, 5]\ncost = [1, 2, 3, 4]\nlower = [0, 0, 0, 0]\nupper = [1, 3, 3, 1]\n",
    )
    .unwrap();
    // Both engines prove it: the set of moves by phase I's minimum, the network by a cut.
    for (engine, proof) in [
        ("moves", "no_lattice_point_in_box"),
        ("cycles", "infeasible_cut"),
    ] {
        let svg = dir.path().join(format!("capped_{engine}.svg"));
        let extra = ["--engine", engine, "--svg", svg.to_str().unwrap()];
        let (code, doc) = trace_json(&model, dir.path(), &extra);
        assert_eq!(code, 1);
        assert_eq!(doc["outcome"]["tag"], proof, "{doc}");
        let content = std::fs::read_to_string(&svg).unwrap();
        let texts = svg_texts(&roxmltree::Document::parse(&content).unwrap());
        assert!(
            texts.iter().any(|t| t.starts_with("status: infeasible")),
            "{texts:?}"
        );
        assert!(
            texts.contains(&"infeasible".to_string()),
            "{engine}: {texts:?}"
        );
    }

    // The Graver elements up to norm 2 of the product-line scenario: the first day's plan is
    // optimal among them only, with a dual bound (README, Partial sets).
    let scenario = scenarios().join("vell_valley.toml");
    let days = scenarios().join("vell_valley_days.jsonl");
    let (s, d) = (scenario.to_str().unwrap(), days.to_str().unwrap());
    let cache = dir.path().join("partial");
    let cache = cache.to_str().unwrap();
    let build = [
        "build",
        s,
        "--engine",
        "moves",
        "--norm-limit",
        "2",
        "--cache-dir",
        cache,
    ];
    assert_eq!(kernstep(&build).status.code(), Some(0));
    let svg = dir.path().join("partial.svg");
    let args = [
        "trace",
        s,
        "--variant",
        d,
        "--engine",
        "moves",
        "--cache-dir",
        cache,
    ];
    let svg_arg = ["--svg", svg.to_str().unwrap(), "--json"];
    let out = kernstep(&[&args[..], &svg_arg[..]].concat());
    let doc: Value = serde_json::from_slice(&out.stdout).unwrap();
    let bound = doc["bound"]["value"]
        .as_str()
        .expect("a partial set's plan has a bound");
    let content = std::fs::read_to_string(&svg).unwrap();
    let texts = svg_texts(&roxmltree::Document::parse(&content).unwrap());
    assert!(texts.contains(&format!("dual bound {bound}")), "{texts:?}");
}

#[test]
fn human_trace_fits_100_columns_and_states_the_certificate() {
    let dir = tempfile::tempdir().unwrap();
    let model = tables_model(dir.path());
    let (_, doc) = trace_json(&model, dir.path(), &[]);
    let cache = dir.path().join("cache");
    let cache = cache.to_str().unwrap();
    let out = kernstep(&["trace", model.to_str().unwrap(), "--cache-dir", cache]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let shown = text(&out.stdout);
    let widest = shown.lines().map(|l| l.chars().count()).max().unwrap();
    assert!(widest <= 100, "a line has {widest} columns:\n{shown}");
    let steps = doc["steps"].as_array().unwrap();
    for step in steps {
        let number = step["step"].to_string();
        let row = shown
            .lines()
            .find(|l| l.split_whitespace().next() == Some(&number));
        assert!(
            row.is_some_and(|r| r.contains(step["gain"].as_str().unwrap())),
            "{shown}"
        );
    }
    let moves = doc["moves"].as_u64().unwrap();
    let certificate = format!("none of the {moves} moves improves in either sign");
    assert!(shown.contains(&certificate), "{shown}");
}

#[test]
fn trace_exit_codes_follow_the_outcome() {
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("m.json");
    let mut instance = Instance {
        matrix: vec![vec![1, 1, 0, 0], vec![1, 0, 1, 0], vec![0, 1, 0, 1]],
        rhs: vec![7, 5, 6],
        cost: vec![4, 6, 5, 3],
        lower: vec![Some(0); 4],
        upper: vec![Some(5), None, Some(4), None],
    };
    instance.write(&model);
    assert_eq!(trace_json(&model, dir.path(), &[]).0, 0);
    instance.upper = vec![Some(1), Some(1), Some(1), Some(1)];
    instance.write(&model);
    let (code, doc) = trace_json(&model, dir.path(), &["--engine", "moves"]);
    assert_eq!(
        (code, doc["outcome"]["tag"].as_str()),
        (1, Some("no_lattice_point_in_box"))
    );
    // The lane plan is a network matrix: along its cycles the proof is a cut.
    let (code, doc) = trace_json(&model, dir.path(), &[]);
    assert_eq!(
        (code, doc["outcome"]["tag"].as_str()),
        (1, Some("infeasible_cut"))
    );
}

#[test]
fn warm_started_traces_replay_from_the_solver_start() {
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("model.json");
    let instances = fixture_instances("lanes_3x3.json");
    instances[0].0.write(&model);
    let set = move_set(&model, dir.path());
    let (_, yesterday) = trace_json(&model, dir.path(), &[]);
    let previous = dir.path().join("yesterday.json");
    std::fs::write(&previous, yesterday.to_string()).unwrap();
    let warm = ["--warm-start", previous.to_str().unwrap()];
    for (m, optimum) in instances
        .iter()
        .skip(1)
        .filter(|(_, o)| o.is_some())
        .take(5)
    {
        m.write(&model);
        let (_, doc) = trace_json(&model, dir.path(), &warm);
        replay(m, &doc, &set, &|x| m.cost_of(x));
        recheck(m, &doc, &set);
        // Optimum recorded by HiGHS 1.16 (fixture file).
        assert_eq!(decimal(&doc["objective"]), i128::from(optimum.unwrap()));
    }
}

#[test]
fn a_scenario_day_is_traced_with_the_scenario_names() {
    let cache = tempfile::tempdir().unwrap();
    for (scenario, days, day) in [
        ("brackle_lanes.toml", "brackle_lanes_days.csv", "2026-03-03"),
        (
            "hollin_trucks.toml",
            "hollin_trucks_days.jsonl",
            "2026-03-05",
        ),
    ] {
        let (scenario, days) = (scenarios().join(scenario), scenarios().join(days));
        let want = batch_answers(cache.path(), &scenario, &days, &[]);
        let (s, d) = (scenario.to_str().unwrap(), days.to_str().unwrap());
        let args = ["trace", s, "--variant", d, "--day", day, "--build"];
        let (json, _) = expect_both(cache.path(), &[&args[..], &["--json"]].concat(), 0);
        let doc: Value = serde_json::from_str(&json).unwrap();
        assert_eq!(document_answer(&doc), want[day], "{d} {day}");
        let compiled = Scenario::load(&scenario).unwrap().compile().unwrap();
        assert_eq!(doc["variables"], json!(compiled.variable_names), "{d}");
        let (shown, _) = expect_both(cache.path(), &args, 0);
        assert!(
            shown.starts_with(&format!("trace of {s} / {day}\n")),
            "{shown}"
        );
        let steps = doc["steps"].as_array().unwrap();
        assert!(!steps.is_empty(), "{d} {day}");
        for step in steps {
            // The step's row begins its move with the first nonzero entry, by name.
            let (name, value) = compiled
                .variable_names
                .iter()
                .zip(numbers(&step["direction"]))
                .find(|(_, v)| *v != 0)
                .unwrap();
            let number = step["step"].to_string();
            let row = shown
                .lines()
                .find(|l| l.split_whitespace().next() == Some(&number))
                .unwrap_or_else(|| panic!("no row for step {number}:\n{shown}"));
            assert!(row.contains(&format!("{value:+} {name}")), "{row}");
        }
    }
}
