//! The scenario file schema, validated into a [`Scenario`]: keys allowed per kind, every name
//! resolved, every number range-checked.

use serde_json::{Map, Value};

use super::reader::{join, kind as value_kind, Reader};
use super::{Field, Lane, Scenario, ScenarioKind, Table};
use crate::error::Result;
use crate::model::{Pieces, MATRIX_ENTRY_LIMIT};

/// Top-level keys of each kind.
fn top_keys(kind: ScenarioKind) -> &'static [&'static str] {
    match kind {
        ScenarioKind::Lanes => &[
            "kind",
            "title",
            "depots",
            "zones",
            "supply",
            "demand",
            "keep_cost",
            "lanes",
        ],
        ScenarioKind::ProductLines => &[
            "kind", "title", "depots", "zones", "products", "stock", "demand", "lanes",
        ],
        ScenarioKind::Truckloads => &[
            "kind",
            "title",
            "depots",
            "zones",
            "truck_capacity",
            "supply",
            "demand",
            "keep_cost",
            "lanes",
        ],
    }
}

/// Keys of one `lanes` entry for each kind.
fn lane_keys(kind: ScenarioKind) -> &'static [&'static str] {
    match kind {
        ScenarioKind::Lanes => &["from", "to", "cost", "capacity", "surcharge", "change_cost"],
        ScenarioKind::ProductLines => &["from", "to", "cost", "volume"],
        ScenarioKind::Truckloads => &[
            "from",
            "to",
            "cost",
            "truck_cost",
            "capacity",
            "surcharge",
            "change_cost",
        ],
    }
}

/// Keys of one step of a lane's `surcharge`.
const STEP_KEYS: [&str; 2] = ["above", "per_unit"];

/// The lists of names a scenario declares, shared while its numbers are read.
struct Names {
    depots: Vec<String>,
    zones: Vec<String>,
    products: Vec<String>,
}

/// Validates a parsed scenario file.
pub(crate) fn scenario(tree: &Value, origin: &str) -> Result<Scenario> {
    let r = Reader {
        file: origin,
        prefix: String::new(),
    };
    let kind = scenario_kind(&r, tree)?;
    let top = r.object(tree, "", top_keys(kind))?;
    let need = |key: &str| {
        top.get(key)
            .ok_or_else(|| r.error(key, format!("missing; {} scenarios need it", kind.name())))
    };
    let names = Names {
        depots: r.names(need("depots")?, "depots")?,
        zones: r.names(need("zones")?, "zones")?,
        products: match kind {
            ScenarioKind::ProductLines => r.names(need("products")?, "products")?,
            _ => Vec::new(),
        },
    };
    let truck_capacity = match kind {
        ScenarioKind::Truckloads => Some(truck_capacity(&r, need("truck_capacity")?)?),
        _ => None,
    };
    let title = top
        .get("title")
        .map(|t| r.string(t, "title").map(str::to_string))
        .transpose()?;
    let entries = lane_entries(&r, need("lanes")?, kind)?;
    let lanes = lane_ends(&r, &entries, &names)?;
    let mut scenario = Scenario {
        kind,
        title,
        depots: names.depots.clone(),
        zones: names.zones.clone(),
        products: names.products.clone(),
        lanes,
        truck_capacity,
        tables: Vec::new(),
        surcharges: Vec::new(),
        change_costs: Vec::new(),
    };
    for &field in kind.fields() {
        let table = read_table(&r, field, top, &entries, &scenario)?;
        scenario.tables.push(table);
    }
    let costs = scenario.table(Field::Cost).map(|t| t.values.as_slice());
    scenario.surcharges = entries
        .iter()
        .enumerate()
        .map(|(i, entry)| match entry.get("surcharge") {
            Some(steps) => {
                let cost = costs.and_then(|c| c[i]).unwrap_or(0);
                surcharge(&r, steps, &format!("lanes[{i}].surcharge"), cost)
            }
            None => Ok(None),
        })
        .collect::<Result<_>>()?;
    scenario.change_costs = entries
        .iter()
        .enumerate()
        .map(|(i, entry)| {
            let at = format!("lanes[{i}].change_cost");
            entry
                .get("change_cost")
                .map(|w| change_cost(&r, w, &at))
                .transpose()
        })
        .collect::<Result<_>>()?;
    Ok(scenario)
}

/// A lane's `change_cost`: an integer, 0 or more.
fn change_cost(r: &Reader, value: &Value, at: &str) -> Result<i64> {
    let weight = r.int(value, at)?;
    if weight < 0 {
        return Err(r.error(
            at,
            format!("{weight} is negative; a price per unit changed is 0 or more"),
        ));
    }
    Ok(weight)
}

/// One lane's `surcharge` steps as the convex cost of its units; `cost` is the lane's cost per
/// unit, which the surcharged cost must fit in 64 bits with. An empty list is no surcharge.
fn surcharge(r: &Reader, value: &Value, at: &str, cost: i64) -> Result<Option<Pieces>> {
    let steps = value.as_array().ok_or_else(|| {
        r.error(
            at,
            format!(
                "expected a list of {{ above, per_unit }} steps, found {}",
                value_kind(value)
            ),
        )
    })?;
    if steps.is_empty() {
        return Ok(None);
    }
    let mut breaks: Vec<i64> = Vec::with_capacity(steps.len());
    let mut slopes = vec![0i64];
    for (k, step) in steps.iter().enumerate() {
        let here = format!("{at}[{k}]");
        let map = r.object(step, &here, &STEP_KEYS)?;
        let number = |key: &str| -> Result<(i64, String)> {
            let field = join(&here, key);
            let value = map.get(key).ok_or_else(|| r.error(&field, "missing"))?;
            Ok((r.int(value, &field)?, field))
        };
        let (above, above_at) = number("above")?;
        if above < 0 {
            return Err(r.error(&above_at, format!("{above} is negative")));
        }
        if let Some(&before) = breaks.last().filter(|&&b| above <= b) {
            return Err(r.error(
                &above_at,
                format!("{above} is not above the step before it ({before})"),
            ));
        }
        let (per_unit, per_unit_at) = number("per_unit")?;
        if per_unit < 0 {
            return Err(r.error(
                &per_unit_at,
                format!("{per_unit} is negative; a surcharge adds cost, so the cost stays convex"),
            ));
        }
        let slope = slopes[k].checked_add(per_unit).ok_or_else(|| {
            r.error(
                &per_unit_at,
                "the surcharges up to this step add up to more than 64 bits hold",
            )
        })?;
        breaks.push(above);
        slopes.push(slope);
    }
    let pieces = Pieces::new(breaks, slopes).map_err(|fault| r.error(at, fault.to_string()))?;
    pieces.term(cost).map_err(|_| {
        r.error(
            at,
            format!("with the lane cost {cost}, the surcharged cost does not fit in 64 bits"),
        )
    })?;
    Ok(Some(pieces))
}

fn scenario_kind(r: &Reader, tree: &Value) -> Result<ScenarioKind> {
    let value = tree
        .get("kind")
        .ok_or_else(|| r.error("kind", "missing; use lanes, product_lines or truckloads"))?;
    match r.string(value, "kind")? {
        "lanes" => Ok(ScenarioKind::Lanes),
        "product_lines" => Ok(ScenarioKind::ProductLines),
        "truckloads" => Ok(ScenarioKind::Truckloads),
        other => Err(r.error(
            "kind",
            format!("{other:?} is not a scenario kind; use lanes, product_lines or truckloads"),
        )),
    }
}

fn truck_capacity(r: &Reader, value: &Value) -> Result<i64> {
    let c = r.int(value, "truck_capacity")?;
    if c < 1 || i128::from(c) > MATRIX_ENTRY_LIMIT {
        return Err(r.error("truck_capacity", format!("{c} is not in 1 ..= 2^31 - 1")));
    }
    Ok(c)
}

/// The `lanes` list, each entry checked for its keys.
fn lane_entries<'v>(
    r: &Reader,
    value: &'v Value,
    kind: ScenarioKind,
) -> Result<Vec<&'v Map<String, Value>>> {
    let items = value
        .as_array()
        .filter(|a| !a.is_empty())
        .ok_or_else(|| r.error("lanes", "expected a non-empty list of lanes"))?;
    items
        .iter()
        .enumerate()
        .map(|(i, item)| {
            let at = format!("lanes[{i}]");
            if kind == ScenarioKind::ProductLines && item.get("surcharge").is_some() {
                return Err(r.error(
                    &join(&at, "surcharge"),
                    "product_lines scenarios take no surcharge (a product_lines lane carries its \
                     booked volume); surcharges apply to lanes and truckloads scenarios",
                ));
            }
            r.object(item, &at, lane_keys(kind))
        })
        .collect()
}

/// The depot and zone of every lane, each pair at most once.
fn lane_ends(r: &Reader, entries: &[&Map<String, Value>], names: &Names) -> Result<Vec<Lane>> {
    let mut lanes: Vec<Lane> = Vec::with_capacity(entries.len());
    for (i, entry) in entries.iter().enumerate() {
        let end = |key: &str, list: &[String], what: &str| -> Result<usize> {
            let at = format!("lanes[{i}].{key}");
            let value = entry
                .get(key)
                .ok_or_else(|| r.error(&at, format!("missing; name the {what}")))?;
            let name = r.string(value, &at)?;
            list.iter()
                .position(|n| n == name)
                .ok_or_else(|| r.error(&at, unknown(what, name, list)))
        };
        let lane = Lane {
            depot: end("from", &names.depots, "depot")?,
            zone: end("to", &names.zones, "zone")?,
        };
        if lanes.contains(&lane) {
            return Err(r.error(
                &format!("lanes[{i}]"),
                format!(
                    "lane {}->{} is listed twice",
                    names.depots[lane.depot], names.zones[lane.zone]
                ),
            ));
        }
        lanes.push(lane);
    }
    Ok(lanes)
}

/// "no zone named X (zones: a, b, c)".
pub(crate) fn unknown(what: &str, name: &str, list: &[String]) -> String {
    const SHOWN: usize = 8;
    let mut known = list
        .iter()
        .take(SHOWN)
        .cloned()
        .collect::<Vec<_>>()
        .join(", ");
    if list.len() > SHOWN {
        known.push_str(", ...");
    }
    format!("no {what} named {name:?} (known: {known})")
}

/// Reads the numbers of `field` from the file.
fn read_table(
    r: &Reader,
    field: Field,
    top: &Map<String, Value>,
    entries: &[&Map<String, Value>],
    s: &Scenario,
) -> Result<Table> {
    let key = field.key();
    let lane_names: Vec<String> = (0..s.lanes.len()).map(|l| s.lane_name(l)).collect();
    let required = |key: &str| {
        top.get(key)
            .ok_or_else(|| r.error(key, format!("missing; {} scenarios need it", s.kind.name())))
    };
    let values: Vec<Option<i64>> = match field {
        Field::Supply => some(flat(r, required(key)?, key, &s.depots, "depot")?),
        Field::KeepCost => match top.get(key) {
            Some(v) => some(partial(r, v, key, &s.depots, "depot")?),
            None => vec![Some(0); s.depots.len()],
        },
        Field::Demand if s.kind == ScenarioKind::ProductLines => some(nested(
            r,
            required(key)?,
            key,
            &s.zones,
            "zone",
            &s.products,
        )?),
        Field::Demand => some(flat(r, required(key)?, key, &s.zones, "zone")?),
        Field::Stock => some(nested(
            r,
            required(key)?,
            key,
            &s.depots,
            "depot",
            &s.products,
        )?),
        Field::Cost if s.kind == ScenarioKind::ProductLines => {
            product_costs(r, entries, &s.products)?
        }
        Field::Capacity => lane_values(r, entries, key, false)?,
        Field::Cost | Field::Volume | Field::TruckCost => lane_values(r, entries, key, true)?,
    };
    let names = table_names(field, s, &lane_names);
    let negative = names
        .iter()
        .zip(&values)
        .find_map(|(n, v)| v.filter(|v| *v < 0).map(|v| (n, v)));
    match negative {
        Some((name, v)) if field.is_quantity() => {
            Err(r.error(&join(key, name), format!("{v} is negative")))
        }
        _ => Ok(Table {
            field,
            names,
            values,
        }),
    }
}

/// Product-line costs, lane-major: every lane's `cost = { product = n }`.
fn product_costs(
    r: &Reader,
    entries: &[&Map<String, Value>],
    products: &[String],
) -> Result<Vec<Option<i64>>> {
    let mut out = Vec::with_capacity(entries.len() * products.len());
    for (i, e) in entries.iter().enumerate() {
        let at = format!("lanes[{i}].cost");
        let v = e.get("cost").ok_or_else(|| r.error(&at, "missing"))?;
        out.extend(some(flat(r, v, &at, products, "product line")?));
    }
    Ok(out)
}

/// The names a field's values are addressed by (see [`Field`]).
pub(crate) fn table_names(field: Field, s: &Scenario, lane_names: &[String]) -> Vec<String> {
    let cross = |outer: &[String], inner: &[String]| -> Vec<String> {
        outer
            .iter()
            .flat_map(|o| inner.iter().map(move |i| format!("{o}/{i}")))
            .collect()
    };
    let per_product = s.kind == ScenarioKind::ProductLines;
    match field {
        Field::Supply | Field::KeepCost => s.depots.clone(),
        Field::Demand if per_product => cross(&s.zones, &s.products),
        Field::Demand => s.zones.clone(),
        Field::Stock => cross(&s.depots, &s.products),
        Field::Cost if per_product => cross(lane_names, &s.products),
        Field::Volume | Field::Cost | Field::Capacity | Field::TruckCost => lane_names.to_vec(),
    }
}

fn some(values: Vec<i64>) -> Vec<Option<i64>> {
    values.into_iter().map(Some).collect()
}

/// One value per name of `list`, every name present, no other keys.
fn flat(r: &Reader, value: &Value, field: &str, list: &[String], what: &str) -> Result<Vec<i64>> {
    let map = name_map(r, value, field, list, what)?;
    list.iter()
        .map(|name| match map.get(name) {
            Some(v) => r.int(v, &join(field, name)),
            None => Err(r.error(field, format!("no value for {what} {name:?}"))),
        })
        .collect()
}

/// One value per name of `list`; a missing name is 0.
fn partial(
    r: &Reader,
    value: &Value,
    field: &str,
    list: &[String],
    what: &str,
) -> Result<Vec<i64>> {
    let map = name_map(r, value, field, list, what)?;
    list.iter()
        .map(|name| {
            map.get(name)
                .map_or(Ok(0), |v| r.int(v, &join(field, name)))
        })
        .collect()
}

/// `outer = { inner = n }` for every pair, outer-major.
fn nested(
    r: &Reader,
    value: &Value,
    field: &str,
    outer: &[String],
    what: &str,
    products: &[String],
) -> Result<Vec<i64>> {
    let map = name_map(r, value, field, outer, what)?;
    let mut out = Vec::with_capacity(outer.len() * products.len());
    for name in outer {
        let at = join(field, name);
        let inner = map
            .get(name)
            .ok_or_else(|| r.error(field, format!("no values for {what} {name:?}")))?;
        out.extend(flat(r, inner, &at, products, "product line")?);
    }
    Ok(out)
}

/// `value` as a table whose keys are all names of `list`.
fn name_map<'v>(
    r: &Reader,
    value: &'v Value,
    field: &str,
    list: &[String],
    what: &str,
) -> Result<&'v Map<String, Value>> {
    let map = value
        .as_object()
        .ok_or_else(|| r.error(field, format!("expected a table of {what} names")))?;
    match map.keys().find(|k| !list.contains(k)) {
        Some(k) => Err(r.error(&join(field, k), unknown(what, k, list))),
        None => Ok(map),
    }
}

/// The lane entries' `key` values; a missing one is an error when `required`, else no limit.
fn lane_values(
    r: &Reader,
    entries: &[&Map<String, Value>],
    key: &str,
    required: bool,
) -> Result<Vec<Option<i64>>> {
    entries
        .iter()
        .enumerate()
        .map(|(i, e)| {
            let at = format!("lanes[{i}].{key}");
            match e.get(key) {
                Some(Value::Null) if !required => Ok(None),
                Some(v) => r.int(v, &at).map(Some),
                None if required => Err(r.error(&at, "missing")),
                None => Ok(None),
            }
        })
        .collect()
}
