//! Daily changes by name (JSON Lines and CSV) become numeric variants of the compiled model;
//! bad lines are reported with file, line and field and spoil only their own day.

use std::path::Path;

use kernstep::model::ModelKind;
use kernstep::scenario::{parse_csv, parse_day_lines, Scenario};
use kernstep::solve::{ParsedLine, Variant};

const LANES: &str = r#"
kind = "lanes"
depots = ["a", "b"]
zones = ["x", "y"]
supply = { a = 7, b = 5 }
demand = { x = 4, y = 6 }
lanes = [
  { from = "a", to = "x", cost = 3, capacity = 4 },
  { from = "a", to = "y", cost = 5 },
  { from = "b", to = "y", cost = 2, capacity = 6 },
]
"#;

fn lanes() -> Scenario {
    Scenario::from_str(LANES, ModelKind::Toml, "s.toml").unwrap()
}

fn ok(lines: &[ParsedLine], i: usize) -> &Variant {
    lines[i].1.as_ref().unwrap()
}

fn err(lines: &[ParsedLine], i: usize) -> String {
    lines[i].1.as_ref().unwrap_err().to_string()
}

/// Rows are a/supply, b/supply, x/demand, y/demand; columns a->x, a->y, b->y, a/kept, b/kept.
#[test]
fn a_change_by_name_lands_in_its_row_or_column() {
    let text = concat!(
        r#"{"day": "mon", "demand": {"x": 3}, "supply": {"b": 9}}"#,
        "\n",
        r#"{"day": "tue", "cost": {"b->y": 11}, "capacity": {"a->x": null, "b->y": 1}}"#,
        "\n",
    );
    let lines = parse_day_lines(&lanes(), text, "d.jsonl");
    let mon = ok(&lines, 0);
    assert_eq!(mon.id, "mon");
    assert_eq!(mon.rhs.as_deref(), Some(&[7, 9, 3, 6][..]));
    assert_eq!(mon.cost.as_deref(), Some(&[3, 5, 2, 0, 0][..]));
    let tue = ok(&lines, 1);
    // Omitted fields are as in the scenario, not as on the day before.
    assert_eq!(tue.rhs.as_deref(), Some(&[7, 5, 4, 6][..]));
    assert_eq!(tue.cost.as_deref(), Some(&[3, 5, 11, 0, 0][..]));
    assert_eq!(
        tue.upper.as_deref(),
        Some(&[None, None, Some(1), None, None][..])
    );
}

#[test]
fn bad_lines_name_line_and_field_and_spare_the_others() {
    let text = [
        r#"{"day": "d1", "demand": {"x": 1}}"#,
        r#"{"day": "d2", "demand": {"z": 1}}"#,
        "",
        r#"{"day": "d3", "stock": {"a/p": 1}}"#,
        r#"{"day": "d4", "supply": {"a": 1.5}}"#,
        r#"{"day": "d1"}"#,
        r#"{"demand": {"x": 1}}"#,
        "{not json",
        r#"{"day": "d5", "capacity": {"a->y": 2}, "demand": {"y": -1}}"#,
        r#"{"day": "d6", "cost": {"a->x": null}}"#,
        r#"{"day": "d7", "cost": {"a->x": 1}}"#,
    ]
    .join("\n");
    let lines = parse_day_lines(&lanes(), &text, "d.jsonl");
    let numbers: Vec<usize> = lines.iter().map(|(n, _)| *n).collect();
    assert_eq!(numbers, [1, 2, 4, 5, 6, 7, 8, 9, 10, 11]);
    assert!(lines[0].1.is_ok() && lines[9].1.is_ok());
    let expected = [
        (
            1,
            "d.jsonl: line 2: demand.z: no zone named \"z\" (known: x, y)",
        ),
        (
            2,
            "d.jsonl: line 4: stock: stock does not apply to lanes scenarios",
        ),
        (3, "d.jsonl: line 5: supply.a: 1.5 is not an integer"),
        (4, "d.jsonl: line 6: day: \"d1\" is already given on line 1"),
        (5, "d.jsonl: line 7: day: missing"),
        (6, "d.jsonl: line 8: not valid JSON"),
        (7, "d.jsonl: line 9: demand.y: -1 is negative"),
        (8, "d.jsonl: line 10: cost.a->x: needs a number"),
    ];
    for (i, prefix) in expected {
        let message = err(&lines, i);
        assert!(message.starts_with(prefix), "{message}\nexpected {prefix}");
    }
}

#[test]
fn csv_rows_gather_into_days() {
    let text = "day,field,name,value\nmon,demand,x,3\ntue,capacity,a->x,\n# note\nmon,supply,b,9\n";
    let lines = parse_csv(&lanes(), text, "d.csv");
    assert_eq!(lines.len(), 2);
    assert_eq!(lines[0].0, 2);
    assert_eq!(ok(&lines, 0).rhs.as_deref(), Some(&[7, 9, 3, 6][..]));
    assert_eq!(lines[1].0, 3);
    assert_eq!(ok(&lines, 1).upper.as_ref().unwrap()[0], None);
}

#[test]
fn csv_errors_name_line_and_field() {
    let text = "day,field,name,value\nmon,demand,x,3\ntue,volume,a->x,2\nwed,demand,x\n\
                thu,cost,a->y,ten\nmon,supply,c,1\n";
    let lines = parse_csv(&lanes(), text, "d.csv");
    let expected = [
        // The day starts on line 2; the error names the row that spoils it.
        (2, "d.csv: line 6: supply.c: no depot named \"c\""),
        (
            3,
            "d.csv: line 3: volume: volume does not apply to lanes scenarios",
        ),
        (4, "d.csv: line 4: expected 4 cells"),
        (5, "d.csv: line 5: cost.a->y: \"ten\" is not an integer"),
    ];
    for (line, prefix) in expected {
        let (_, parsed) = lines.iter().find(|(n, _)| *n == line).unwrap();
        let message = parsed.as_ref().unwrap_err().to_string();
        assert!(message.starts_with(prefix), "{message}\nexpected {prefix}");
    }
    let missing = parse_csv(&lanes(), "when,what\n", "d.csv");
    assert!(err(&missing, 0).starts_with("d.csv: line 1: the first line must be the header"));
}

/// The CSV and JSON Lines example days hold the same changes, so they give the same variants.
#[test]
fn example_csv_and_json_lines_agree() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/scenarios");
    let scenario = Scenario::load(&dir.join("brackle_lanes.toml")).unwrap();
    let read = |name: &str| std::fs::read_to_string(dir.join(name)).unwrap();
    let jsonl = parse_day_lines(&scenario, &read("brackle_lanes_days.jsonl"), "j");
    let csv = parse_csv(&scenario, &read("brackle_lanes_days.csv"), "c");
    assert_eq!(jsonl.len(), 8);
    let variants = |lines: Vec<ParsedLine>| -> Vec<Variant> {
        lines.into_iter().map(|(_, v)| v.unwrap()).collect()
    };
    assert_eq!(variants(jsonl), variants(csv));
}

/// Days change only the fields of the kind; a lane's surcharge stays as in the scenario file
/// (README, "Daily variants"): asking to change it is refused with that reason, and a day that
/// changes the surcharged lane's cost keeps the surcharge on top of the new cost.
#[test]
fn days_keep_the_scenario_surcharges() {
    let text = LANES.replace(
        "cost = 5 }",
        "cost = 5, surcharge = [{ above = 2, per_unit = 3 }] }",
    );
    let scenario = Scenario::from_str(&text, ModelKind::Toml, "s.toml").unwrap();
    let model = scenario.compile().unwrap();
    let json = parse_day_lines(
        &scenario,
        "{\"day\": \"mon\", \"surcharge\": {\"a->y\": 1}}\n{\"day\": \"tue\", \"cost\": {\"a->y\": 8}}\n",
        "d.jsonl",
    );
    let csv = parse_csv(
        &scenario,
        "day,field,name,value\nmon,surcharge,a->y,1\n",
        "d.csv",
    );
    for (message, prefix) in [
        (
            err(&json, 0),
            "d.jsonl: line 1: surcharge: surcharges stay as in the scenario file",
        ),
        (
            err(&csv, 0),
            "d.csv: line 2: field: surcharges stay as in the scenario file",
        ),
    ] {
        assert!(message.starts_with(prefix), "{message}\nexpected {prefix}");
        assert!(
            message.ends_with("supply, demand, cost, capacity, keep_cost"),
            "{message}"
        );
    }
    let tue = ok(&json, 1).numbers(&model, "d.jsonl").unwrap();
    assert_eq!(tue.cost[1], 8);
    let problem = tue.problem().unwrap();
    // Column a->y (1) at 4 units: 8 * 4 + 3 * (4 - 2) = 38 by hand; every other column is 0.
    assert_eq!(problem.objective().value(&[0, 4, 0, 0, 0]).unwrap(), 38);
}

/// Picking a variant of a model's variants file: by id, the first by default, a missing id
/// named with the first bad line (a bad line spoils only itself; common practice for line
/// files).
#[test]
fn a_variant_is_picked_by_id_and_a_missing_one_is_named() {
    use kernstep::scenario::pick_variant;
    let text = "{\"id\":\"mon\",\"rhs\":[7,5,6]}\n{\"id\":\"tue\",\"rhs\":[oops]}\n\
                {\"id\":\"wed\",\"rhs\":[8,5,6]}\n";
    assert_eq!(pick_variant(text, "v.jsonl", None).unwrap().id, "mon");
    assert_eq!(
        pick_variant(text, "v.jsonl", Some("wed")).unwrap().id,
        "wed"
    );
    let e = pick_variant(text, "v.jsonl", Some("sun"))
        .unwrap_err()
        .to_string();
    assert!(
        e.starts_with(
            "v.jsonl: id \"sun\": no readable variant has it; the first bad line: v.jsonl: line 2"
        ),
        "{e}"
    );
    let e = pick_variant("\n", "v.jsonl", None).unwrap_err().to_string();
    assert_eq!(e, "v.jsonl: file: holds no variant");
}

/// The days CSV is read by the `csv` crate (RFC 4180): a leading byte-order mark (as
/// spreadsheet programs write it) and quoted cells read as the plain file does; a quote left
/// open is named with its line.
#[test]
fn csv_days_take_a_byte_order_mark_and_quoted_cells() {
    let plain = "day,field,name,value\nmon,demand,x,3\ntue,cost,a->y,7\n";
    let dressed = "\u{feff}day,field,name,value\r\n\"mon\",demand,\"x\",\"3\"\r\n\
                   tue,\"cost\",\"a->y\", 7 \r\n";
    let a = parse_csv(&lanes(), plain, "d.csv");
    let b = parse_csv(&lanes(), dressed, "d.csv");
    assert_eq!(a.len(), 2);
    for k in 0..2 {
        assert_eq!(a[k].0, b[k].0);
        assert_eq!(ok(&a, k), ok(&b, k));
    }
    let open = parse_csv(
        &lanes(),
        "day,field,name,value\nmon,demand,\"x,3\n",
        "d.csv",
    );
    assert!(
        err(&open, 0).starts_with("d.csv: line 2"),
        "{}",
        err(&open, 0)
    );
    // Comments, blank lines and CRLF breaks keep every line number (counted by hand).
    let spaced = "day,field,name,value\r\n# note\r\n\r\nmon,demand,x,3\r\n\r\n\
                  # two\r\ntue,cost,a->y,ten\r\n";
    let lines = parse_csv(&lanes(), spaced, "d.csv");
    assert_eq!(lines[0].0, 4);
    assert!(
        err(&lines, 1).starts_with("d.csv: line 7: cost.a->y"),
        "{}",
        err(&lines, 1)
    );
}
