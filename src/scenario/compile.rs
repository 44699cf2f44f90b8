//! Compiling a [`Scenario`] into a [`Model`]: the structure (matrix and names) from the
//! depots, zones, products and lanes, the numbers (rhs, cost, bounds) from the tables.
//!
//! Column and row orders, per kind (`L` lanes, `D` depots, `Z` zones, `P` products):
//! - lanes: columns lane `0..L`, then kept `0..D`; rows supply `0..D`, then demand `0..Z`;
//! - product lines: column `l * P + p`; rows volume `0..L`, stock `d * P + p`, demand
//!   `z * P + p`;
//! - truckloads: columns `3l` units, `3l + 1` spare, `3l + 2` trucks, then kept `0..D`; rows
//!   supply `0..D`, demand `0..Z`, load `0..L`.
//!
//! A lane's surcharge becomes the convex cost of its units column (`l` for lanes, `3l` for
//! truckloads).

use super::{Field, Scenario, ScenarioKind};
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;
use crate::model::{ConvexCosts, Model};

/// The model of `s` with its own numbers.
pub(crate) fn model(s: &Scenario) -> Result<Model> {
    let (matrix, variable_names, row_names) = structure(s);
    let (rhs, cost, lower, upper) = numbers(s);
    if rhs.len() != matrix.rows() || [cost.len(), lower.len(), upper.len()] != [matrix.cols(); 3] {
        return Err(Error::Dimension(format!(
            "scenario tables give {} right-hand sides and {} costs for a {} x {} matrix",
            rhs.len(),
            cost.len(),
            matrix.rows(),
            matrix.cols()
        )));
    }
    Ok(Model {
        matrix,
        rhs,
        cost,
        convex: surcharges(s),
        change_cost: change_costs(s),
        lower,
        upper,
        variable_names,
        row_names,
        units: crate::model::Units::default(),
    })
}

/// The column of lane `l`'s units.
fn units(s: &Scenario, l: usize) -> usize {
    match s.kind {
        ScenarioKind::Truckloads => 3 * l,
        // Product lines have no surcharges or change costs (the invariant of `Scenario`).
        ScenarioKind::Lanes | ScenarioKind::ProductLines => l,
    }
}

/// The lanes' change costs as prices of their units columns.
fn change_costs(s: &Scenario) -> Vec<(usize, i64)> {
    let entries = s.change_costs.iter().enumerate();
    entries
        .filter_map(|(l, w)| w.map(|w| (units(s, l), w)))
        .collect()
}

/// The lanes' surcharges as convex costs of their units columns.
fn surcharges(s: &Scenario) -> ConvexCosts {
    let units = |l: usize| units(s, l);
    let entries = s.surcharges.iter().enumerate();
    ConvexCosts::new(
        entries
            .filter_map(|(l, pieces)| pieces.clone().map(|p| (units(l), p)))
            .collect(),
    )
}

/// Rhs, cost, lower and upper bounds of `s`.
type Numbers = (Vec<i64>, Vec<i64>, Vec<Option<i64>>, Vec<Option<i64>>);

/// The matrix, variable names and row names: they depend on the structure only.
fn structure(s: &Scenario) -> (IntMatrix, Vec<String>, Vec<String>) {
    let lanes: Vec<String> = (0..s.lanes.len()).map(|l| s.lane_name(l)).collect();
    let suffixed = |names: &[String], suffix: &str| -> Vec<String> {
        names.iter().map(|n| format!("{n}/{suffix}")).collect()
    };
    let (d, z, l) = (s.depots.len(), s.zones.len(), s.lanes.len());
    match s.kind {
        ScenarioKind::Lanes => {
            let mut a = IntMatrix::zeros(d + z, l + d);
            for (j, lane) in s.lanes.iter().enumerate() {
                a.set(lane.depot, j, 1);
                a.set(d + lane.zone, j, 1);
            }
            for depot in 0..d {
                a.set(depot, l + depot, 1);
            }
            let vars = [lanes.clone(), suffixed(&s.depots, "kept")].concat();
            let rows = [suffixed(&s.depots, "supply"), suffixed(&s.zones, "demand")].concat();
            (a, vars, rows)
        }
        ScenarioKind::ProductLines => product_lines(s, &lanes),
        ScenarioKind::Truckloads => truckloads(s, &lanes),
    }
}

fn product_lines(s: &Scenario, lanes: &[String]) -> (IntMatrix, Vec<String>, Vec<String>) {
    let (d, z, l, p) = (
        s.depots.len(),
        s.zones.len(),
        s.lanes.len(),
        s.products.len(),
    );
    let mut a = IntMatrix::zeros(l + d * p + z * p, l * p);
    for (k, lane) in s.lanes.iter().enumerate() {
        for q in 0..p {
            let j = k * p + q;
            a.set(k, j, 1);
            a.set(l + lane.depot * p + q, j, 1);
            a.set(l + d * p + lane.zone * p + q, j, 1);
        }
    }
    let cross = |outer: &[String], suffix: &str| -> Vec<String> {
        outer
            .iter()
            .flat_map(|o| s.products.iter().map(move |q| format!("{o}/{q}{suffix}")))
            .collect()
    };
    let vars = cross(lanes, "");
    let volume = lanes.iter().map(|n| format!("{n}/volume")).collect();
    let rows = [
        volume,
        cross(&s.depots, "/stock"),
        cross(&s.zones, "/demand"),
    ]
    .concat();
    (a, vars, rows)
}

fn truckloads(s: &Scenario, lanes: &[String]) -> (IntMatrix, Vec<String>, Vec<String>) {
    let (d, z, l) = (s.depots.len(), s.zones.len(), s.lanes.len());
    let c = s.truck_capacity.unwrap_or(1);
    let mut a = IntMatrix::zeros(d + z + l, 3 * l + d);
    let mut vars = Vec::with_capacity(3 * l + d);
    for (k, lane) in s.lanes.iter().enumerate() {
        a.set(lane.depot, 3 * k, 1);
        a.set(d + lane.zone, 3 * k, 1);
        a.set(d + z + k, 3 * k, 1);
        a.set(d + z + k, 3 * k + 1, 1);
        a.set(d + z + k, 3 * k + 2, -c);
        let name = &lanes[k];
        vars.extend([
            name.clone(),
            format!("{name}/spare"),
            format!("{name}/trucks"),
        ]);
    }
    for depot in 0..d {
        a.set(depot, 3 * l + depot, 1);
        vars.push(format!("{}/kept", s.depots[depot]));
    }
    let rows = [
        s.depots.iter().map(|n| format!("{n}/supply")).collect(),
        s.zones.iter().map(|n| format!("{n}/demand")).collect(),
        lanes
            .iter()
            .map(|n| format!("{n}/load"))
            .collect::<Vec<_>>(),
    ]
    .concat();
    (a, vars, rows)
}

/// The values of `field` (0 for a field the kind lacks, which the invariant excludes).
fn values(s: &Scenario, field: Field) -> Vec<i64> {
    s.table(field).map_or_else(Vec::new, |t| {
        t.values.iter().map(|v| v.unwrap_or(0)).collect()
    })
}

/// The numbers, in the column and row orders of [`structure`].
fn numbers(s: &Scenario) -> Numbers {
    let limits = s
        .table(Field::Capacity)
        .map_or_else(Vec::new, |t| t.values.clone());
    match s.kind {
        ScenarioKind::Lanes => {
            let rhs = [values(s, Field::Supply), values(s, Field::Demand)].concat();
            let cost = [values(s, Field::Cost), values(s, Field::KeepCost)].concat();
            let upper = [limits, vec![None; s.depots.len()]].concat();
            let lower = vec![Some(0); cost.len()];
            (rhs, cost, lower, upper)
        }
        ScenarioKind::ProductLines => {
            let rhs = [
                values(s, Field::Volume),
                values(s, Field::Stock),
                values(s, Field::Demand),
            ]
            .concat();
            let cost = values(s, Field::Cost);
            let n = cost.len();
            (rhs, cost, vec![Some(0); n], vec![None; n])
        }
        ScenarioKind::Truckloads => truckload_numbers(s, &limits),
    }
}

fn truckload_numbers(s: &Scenario, limits: &[Option<i64>]) -> Numbers {
    let c = s.truck_capacity.unwrap_or(1);
    let rhs = [
        values(s, Field::Supply),
        values(s, Field::Demand),
        vec![0; s.lanes.len()],
    ]
    .concat();
    let (unit, truck) = (values(s, Field::Cost), values(s, Field::TruckCost));
    let mut cost = Vec::with_capacity(3 * s.lanes.len() + s.depots.len());
    let mut upper = Vec::with_capacity(cost.capacity());
    for k in 0..s.lanes.len() {
        cost.extend([
            unit.get(k).copied().unwrap_or(0),
            0,
            truck.get(k).copied().unwrap_or(0),
        ]);
        upper.extend([None, Some(c - 1), limits.get(k).copied().flatten()]);
    }
    cost.extend(values(s, Field::KeepCost));
    upper.extend(vec![None; s.depots.len()]);
    let lower = vec![Some(0); cost.len()];
    (rhs, cost, lower, upper)
}

/// Right-hand side, cost and bounds of `s`, as a variant of its compiled model.
pub(crate) fn variant_numbers(s: &Scenario, id: &str) -> crate::solve::Variant {
    let (rhs, cost, lower, upper) = numbers(s);
    crate::solve::Variant {
        id: id.to_string(),
        rhs: Some(rhs),
        cost: Some(cost),
        lower: Some(lower),
        upper: Some(upper),
    }
}
