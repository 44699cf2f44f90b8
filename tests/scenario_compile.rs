//! Scenario files compile to the documented models: one hand-worked example per kind (every
//! row and bound checked by hand against the layout in `src/scenario/compile.rs` and the
//! README), structure independent of the numbers, and errors that name file and field.

use kernstep::model::{Model, ModelKind, Pieces};
use kernstep::scenario::{PlanInput, Scenario, ScenarioKind};

fn compile(text: &str) -> Model {
    Scenario::from_str(text, ModelKind::Toml, "test.toml")
        .unwrap()
        .compile()
        .unwrap()
}

fn error(text: &str) -> String {
    Scenario::from_str(text, ModelKind::Toml, "test.toml")
        .unwrap_err()
        .to_string()
}

const LANES: &str = r#"
kind = "lanes"
depots = ["a", "b"]
zones = ["x", "y"]
supply = { a = 7, b = 5 }
demand = { x = 4, y = 6 }
keep_cost = { b = 1 }
lanes = [
  { from = "a", to = "x", cost = 3, capacity = 4 },
  { from = "a", to = "y", cost = 5 },
  { from = "b", to = "y", cost = 2, capacity = 6 },
]
"#;

/// Worked by hand: columns a->x, a->y, b->y, a/kept, b/kept; a depot row sums its lanes and
/// its kept variable, a zone row the lanes into it.
#[test]
fn lanes_worked_example() {
    let m = compile(LANES);
    assert_eq!(
        m.matrix.to_rows(),
        vec![
            vec![1, 1, 0, 1, 0],
            vec![0, 0, 1, 0, 1],
            vec![1, 0, 0, 0, 0],
            vec![0, 1, 1, 0, 0],
        ]
    );
    assert_eq!(m.rhs, vec![7, 5, 4, 6]);
    assert_eq!(m.cost, vec![3, 5, 2, 0, 1]);
    assert_eq!(m.lower, vec![Some(0); 5]);
    assert_eq!(m.upper, vec![Some(4), None, Some(6), None, None]);
    assert_eq!(
        m.variable_names,
        ["a->x", "a->y", "b->y", "a/kept", "b/kept"]
    );
    assert_eq!(
        m.row_names,
        ["a/supply", "b/supply", "x/demand", "y/demand"]
    );
}

const PRODUCT_LINES: &str = r#"
kind = "product_lines"
depots = ["a", "b"]
zones = ["x", "y"]
products = ["p", "q"]
stock = { a = { p = 2, q = 3 }, b = { p = 1, q = 0 } }
demand = { x = { p = 1, q = 1 }, y = { p = 2, q = 2 } }
lanes = [
  { from = "a", to = "x", volume = 2, cost = { p = 4, q = 5 } },
  { from = "b", to = "y", volume = 1, cost = { p = 6, q = 7 } },
  { from = "a", to = "y", volume = 3, cost = { p = 8, q = 9 } },
]
"#;

/// Worked by hand: column `lane * 2 + product`; volume rows per lane, then stock rows
/// a/p, a/q, b/p, b/q, then demand rows x/p, x/q, y/p, y/q.
#[test]
fn product_lines_worked_example() {
    let m = compile(PRODUCT_LINES);
    assert_eq!(
        m.matrix.to_rows(),
        vec![
            vec![1, 1, 0, 0, 0, 0],
            vec![0, 0, 1, 1, 0, 0],
            vec![0, 0, 0, 0, 1, 1],
            vec![1, 0, 0, 0, 1, 0],
            vec![0, 1, 0, 0, 0, 1],
            vec![0, 0, 1, 0, 0, 0],
            vec![0, 0, 0, 1, 0, 0],
            vec![1, 0, 0, 0, 0, 0],
            vec![0, 1, 0, 0, 0, 0],
            vec![0, 0, 1, 0, 1, 0],
            vec![0, 0, 0, 1, 0, 1],
        ]
    );
    assert_eq!(m.rhs, vec![2, 1, 3, 2, 3, 1, 0, 1, 1, 2, 2]);
    assert_eq!(m.cost, vec![4, 5, 6, 7, 8, 9]);
    assert_eq!(m.upper, vec![None; 6]);
    assert_eq!(m.variable_names[4], "a->y/p");
    assert_eq!(m.row_names[3], "a/p/stock");
    assert_eq!(m.row_names[10], "y/q/demand");
}

const TRUCKLOADS: &str = r#"
kind = "truckloads"
depots = ["a"]
zones = ["x", "y"]
truck_capacity = 3
supply = { a = 9 }
demand = { x = 4, y = 2 }
lanes = [
  { from = "a", to = "x", cost = 2, truck_cost = 10, capacity = 2 },
  { from = "a", to = "y", cost = 1, truck_cost = 7 },
]
"#;

/// Worked by hand: per lane units, spare, trucks, then a/kept; load rows say
/// units + spare - 3 trucks = 0; spare is at most C - 1 = 2, trucks at most the capacity.
#[test]
fn truckloads_worked_example() {
    let m = compile(TRUCKLOADS);
    assert_eq!(
        m.matrix.to_rows(),
        vec![
            vec![1, 0, 0, 1, 0, 0, 1],
            vec![1, 0, 0, 0, 0, 0, 0],
            vec![0, 0, 0, 1, 0, 0, 0],
            vec![1, 1, -3, 0, 0, 0, 0],
            vec![0, 0, 0, 1, 1, -3, 0],
        ]
    );
    assert_eq!(m.rhs, vec![9, 4, 2, 0, 0]);
    assert_eq!(m.cost, vec![2, 0, 10, 1, 0, 7, 0]);
    assert_eq!(
        m.upper,
        vec![None, Some(2), Some(2), None, Some(2), None, None]
    );
    assert_eq!(
        m.variable_names,
        [
            "a->x",
            "a->x/spare",
            "a->x/trucks",
            "a->y",
            "a->y/spare",
            "a->y/trucks",
            "a/kept"
        ]
    );
    assert_eq!(m.row_names[3], "a->x/load");
}

/// Worked by hand from the README ("Transport scenarios", lane `surcharge`): steps above 3 at
/// 4 and above 5 at 2 give breaks [3, 5] and slopes [0, 4, 4 + 2 = 6] on the lane's units
/// column (a->y is column 1 of the lanes model and column 3 = 3 * 1 of the truckloads model);
/// the matrix and the linear costs stay as without the key.
#[test]
fn surcharges_become_the_convex_cost_of_the_lane_units() {
    let steps = "surcharge = [{ above = 3, per_unit = 4 }, { above = 5, per_unit = 2 }]";
    let want = Pieces::new(vec![3, 5], vec![0, 4, 6]).unwrap();
    for (text, lane, column) in [
        (LANES, "{ from = \"a\", to = \"y\", cost = 5", 1),
        (TRUCKLOADS, "{ from = \"a\", to = \"y\", cost = 1", 3),
    ] {
        let surcharged = text.replace(lane, &format!("{lane}, {steps}"));
        assert_ne!(surcharged, text);
        let (plain, m) = (compile(text), compile(&surcharged));
        assert_eq!(m.convex.iter().count(), 1);
        assert_eq!(m.convex.get(column), Some(&want), "column {column}");
        assert_eq!((&m.matrix, &m.cost), (&plain.matrix, &plain.cost));
        assert!(plain.convex.is_empty());
    }
    // By hand: 6 units pay 4 * (5 - 3) + 6 * (6 - 5) = 14 above the lane cost, 3 units none.
    assert_eq!((want.value(6), want.value(3)), (14, 0));
}

/// Other numbers, same depots, zones and lanes: the same matrix and names (one test set).
#[test]
fn numbers_do_not_change_the_structure() {
    let other = LANES
        .replace("a = 7, b = 5", "a = 70, b = 1")
        .replace("cost = 3, capacity = 4", "cost = -8");
    let (m1, m2) = (compile(LANES), compile(&other));
    assert_eq!(m1.matrix, m2.matrix);
    assert_eq!(m1.variable_names, m2.variable_names);
    assert_ne!(m1.rhs, m2.rhs);
    assert_ne!(m1.upper, m2.upper);
}

#[test]
fn the_example_scenarios_load_with_their_kinds() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/scenarios");
    // The last number counts the surcharged lanes, each a convex cost of the model.
    for (file, kind, vars, surcharged) in [
        ("vell_valley.toml", ScenarioKind::ProductLines, 27, 0),
        ("brackle_lanes.toml", ScenarioKind::Lanes, 15, 0),
        ("hollin_trucks.toml", ScenarioKind::Truckloads, 20, 0),
        ("wendle_ferries.toml", ScenarioKind::Lanes, 12, 4),
        ("corran_quarries.toml", ScenarioKind::Truckloads, 14, 2),
    ] {
        let s = Scenario::load(&dir.join(file)).unwrap();
        assert_eq!(s.kind, kind, "{file}");
        let model = s.compile().unwrap();
        assert_eq!(model.variables(), vars, "{file}");
        assert_eq!(model.convex.iter().count(), surcharged, "{file}");
        assert!(matches!(
            PlanInput::load(&dir.join(file)).unwrap(),
            PlanInput::Scenario(..)
        ));
    }
    let model = dir.join("../lane_plan.toml");
    assert!(matches!(
        PlanInput::load(&model).unwrap(),
        PlanInput::Model(_)
    ));
}

#[test]
fn json_and_toml_give_the_same_scenario() {
    let json = r#"{"kind": "lanes", "depots": ["a", "b"], "zones": ["x", "y"],
        "supply": {"a": 7, "b": 5}, "demand": {"x": 4, "y": 6}, "keep_cost": {"b": 1},
        "lanes": [{"from": "a", "to": "x", "cost": 3, "capacity": 4},
                  {"from": "a", "to": "y", "cost": 5},
                  {"from": "b", "to": "y", "cost": 2, "capacity": 6}]}"#;
    let s = Scenario::from_str(json, ModelKind::Json, "test.json").unwrap();
    assert_eq!(s.compile().unwrap(), compile(LANES));
}

#[test]
fn errors_name_the_file_and_field() {
    let cases = [
        (
            LANES.replace("to = \"y\", cost = 5", "to = \"z\", cost = 5"),
            "test.toml: lanes[1].to: no zone named \"z\"",
        ),
        (
            LANES.replace("b = 5 }", "b = 5.5 }"),
            "test.toml: supply.b: 5.5 is not an integer",
        ),
        (
            LANES.replace("x = 4, y = 6", "x = 4"),
            "test.toml: demand: no value for zone \"y\"",
        ),
        (
            LANES.replace("x = 4, y", "x = -4, y"),
            "test.toml: demand.x: -4 is negative",
        ),
        (
            LANES.replace("[\"a\", \"b\"]", "[\"a\", \"b/c\"]"),
            "test.toml: depots[1]: \"b/c\" contains '/'",
        ),
        (
            LANES.replace("keep_cost", "stock"),
            "test.toml: stock: unknown key",
        ),
        (
            LANES
                .replace("to = \"y\", cost = 2", "to = \"x\", cost = 2")
                .replace("\"b\", to = \"x\"", "\"a\", to = \"x\""),
            "test.toml: lanes[2]: lane a->x is listed twice",
        ),
        (
            LANES.replace("\"lanes\"", "\"routes\""),
            "test.toml: kind: \"routes\" is not a scenario kind",
        ),
        (
            TRUCKLOADS.replace("truck_capacity = 3", "truck_capacity = 0"),
            "test.toml: truck_capacity: 0 is not in 1 ..= 2^31 - 1",
        ),
        (
            PRODUCT_LINES.replace("volume = 1, ", ""),
            "test.toml: lanes[1].volume: missing",
        ),
        (
            PRODUCT_LINES.replace(
                "volume = 3,",
                "surcharge = [{ above = 1, per_unit = 2 }], volume = 3,",
            ),
            "test.toml: lanes[2].surcharge: product_lines scenarios take no surcharge",
        ),
    ];
    for (text, expected) in cases {
        let message = error(&text);
        assert!(
            message.starts_with(expected),
            "{message}\nexpected {expected}"
        );
    }
}

/// LANES with `steps` as the surcharge of its third lane (b->y, cost 2).
fn surcharged(steps: &str) -> String {
    let lane = "to = \"y\", cost = 2, capacity = 6";
    LANES.replace(lane, &format!("{lane}, surcharge = {steps}"))
}

#[test]
fn surcharge_errors_name_the_step_and_key() {
    let cases = [
        (
            "[{ above = 30, per_unit = 4 }, { above = 20, per_unit = 1 }]",
            "test.toml: lanes[2].surcharge[1].above: 20 is not above the step before it (30)",
        ),
        (
            "[{ above = 30, per_unit = 4 }, { above = 30, per_unit = 1 }]",
            "test.toml: lanes[2].surcharge[1].above: 30 is not above the step before it (30)",
        ),
        (
            "[{ above = -1, per_unit = 4 }]",
            "test.toml: lanes[2].surcharge[0].above: -1 is negative",
        ),
        (
            "[{ above = 3, per_unit = 4 }, { above = 5, per_unit = -1 }]",
            "test.toml: lanes[2].surcharge[1].per_unit: -1 is negative",
        ),
        (
            "[{ above = 3 }]",
            "test.toml: lanes[2].surcharge[0].per_unit: missing",
        ),
        (
            "[{ above = 3, per_unit = 1, rate = 2 }]",
            "test.toml: lanes[2].surcharge[0].rate: unknown key",
        ),
        (
            "[{ above = 3.5, per_unit = 1 }]",
            "test.toml: lanes[2].surcharge[0].above: 3.5 is not an integer",
        ),
        (
            "{ above = 3, per_unit = 1 }",
            "test.toml: lanes[2].surcharge: expected a list of { above, per_unit } steps",
        ),
        // 2^62 + 2^62 = 2^63 is one more than the largest 64-bit integer.
        (
            "[{ above = 1, per_unit = 4611686018427387904 }, \
              { above = 2, per_unit = 4611686018427387904 }]",
            "test.toml: lanes[2].surcharge[1].per_unit: the surcharges up to this step add up",
        ),
        // Slope 2^62 plus the lane cost 2 fits, but the cost at 2^62 + 1 units does not.
        (
            "[{ above = 4611686018427387903, per_unit = 4611686018427387904 }]",
            "test.toml: lanes[2].surcharge: with the lane cost 2, the surcharged cost does not fit",
        ),
    ];
    for (steps, expected) in cases {
        let message = error(&surcharged(steps));
        assert!(
            message.starts_with(expected),
            "{message}\nexpected {expected}"
        );
    }
    // An empty list is no surcharge at all.
    assert_eq!(compile(&surcharged("[]")), compile(LANES));
}
