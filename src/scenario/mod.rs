//! Transport scenarios: a planner's description of depots, zones, product lines and lanes,
//! compiled into a [`Model`], and the named daily changes that turn into
//! [`crate::solve::Variant`]s.
//!
//! A scenario file (JSON or TOML, one schema) has a `kind` that selects the model:
//!
//! - [`ScenarioKind::Lanes`]: one variable per lane (`north->harbour`, units shipped, at most
//!   the lane's `capacity`) and one per depot (`north/kept`, surplus kept at the depot). Rows
//!   `north/supply`: lanes out of the depot plus kept = supply; `harbour/demand`: lanes into
//!   the zone = demand.
//! - [`ScenarioKind::ProductLines`]: the planar three-index transport problem, one variable per
//!   lane and product (`north->harbour/dairy`). Rows `north->harbour/volume`: the products on a
//!   lane add up to its booked volume; `north/dairy/stock`: a depot ships exactly its stock of a
//!   product; `harbour/dairy/demand`: a zone receives exactly its demand of a product.
//! - [`ScenarioKind::Truckloads`]: per lane the units (`north->harbour`), the unused room in
//!   the last truck (`north->harbour/spare`, `0 ..= C - 1`) and the trucks
//!   (`north->harbour/trucks`, at most the lane's `capacity` trucks); rows as for lanes plus
//!   `north->harbour/load`: units + spare - C trucks = 0, with the truck capacity `C`.
//!
//! A lane of a lanes or truckloads scenario may carry a `surcharge`: a list of steps
//! `{ above = N, per_unit = S }` (`N >= 0` strictly increasing, `S >= 0`), each unit on the
//! lane beyond `N` costing `S` more on top of the lane's `cost`. It compiles into the convex
//! cost ([`Pieces`]) of the lane's units variable, with breaks the steps' `above` and slopes
//! `0, S_1, S_1 + S_2, ...`; nondecreasing slopes make it convex by construction. Product lines
//! refuse the key.
//!
//! A lane of a lanes or truckloads scenario may also carry a `change_cost` (an integer `>= 0`):
//! the price per unit of its units changed against a previous plan, used when a change price
//! is asked for (`--change-cost`, [`crate::solve::ChangePrice::of_model`]).
//!
//! Invariant: the matrix depends only on the kind, the depots, zones, products, lanes and the
//! truck capacity, never on the day's numbers, so one test set serves every day of a scenario.
//! The numbers (supply, demand, stock, volume, costs, capacities) are [`Table`]s, one per
//! [`Field`], which daily changes overwrite by name. Daily changes touch only those fields:
//! surcharges stay as in the scenario file.

mod compile;
mod day_record;
mod days;
mod days_file;
mod file;
mod reader;
mod replan;
mod stability;

use std::path::{Path, PathBuf};

use crate::error::{Error, Result};
use crate::input::syntax_path;
use crate::model::{Model, ModelKind, Pieces};

pub use days::{day_named, parse_csv, parse_day_lines};
pub use days_file::{pick_day, pick_variant, read_days, read_variant};
pub use replan::{replan, DayChange, DayOutcome, DayResult, ReplanSettings};
pub use stability::{CurvePiece, StabilityCurve};

/// Which model a scenario compiles into.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ScenarioKind {
    /// Two-index lane plan with surplus kept at the depots and lane capacities.
    Lanes,
    /// Three-index plan (lane x product) with booked volumes, stock and demand all fixed.
    ProductLines,
    /// Units carried in whole trucks of a fixed capacity, with a cost per truck.
    Truckloads,
}

impl ScenarioKind {
    /// The spelling used in files.
    pub fn name(self) -> &'static str {
        match self {
            ScenarioKind::Lanes => "lanes",
            ScenarioKind::ProductLines => "product_lines",
            ScenarioKind::Truckloads => "truckloads",
        }
    }

    /// The numeric fields a scenario of this kind holds, in the order they are documented.
    pub fn fields(self) -> &'static [Field] {
        match self {
            ScenarioKind::Lanes => &[
                Field::Supply,
                Field::Demand,
                Field::Cost,
                Field::Capacity,
                Field::KeepCost,
            ],
            ScenarioKind::ProductLines => {
                &[Field::Volume, Field::Stock, Field::Demand, Field::Cost]
            }
            ScenarioKind::Truckloads => &[
                Field::Supply,
                Field::Demand,
                Field::Cost,
                Field::TruckCost,
                Field::Capacity,
                Field::KeepCost,
            ],
        }
    }
}

/// A kind of number in a scenario; each has one value per name of its [`Table`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Field {
    /// Units available at a depot (lanes, truckloads), by depot.
    Supply,
    /// Units a zone needs: by zone, or by `zone/product` for product lines.
    Demand,
    /// Stock of a product at a depot, by `depot/product` (product lines).
    Stock,
    /// Booked volume of a lane, by lane (product lines).
    Volume,
    /// Cost per unit: by lane, or by `lane/product` for product lines.
    Cost,
    /// Upper bound per lane: units (lanes) or trucks (truckloads); `None` is no limit.
    Capacity,
    /// Cost per truck, by lane (truckloads).
    TruckCost,
    /// Cost per unit kept at a depot, by depot (lanes, truckloads).
    KeepCost,
}

impl Field {
    /// Every field.
    pub const ALL: [Field; 8] = [
        Field::Supply,
        Field::Demand,
        Field::Stock,
        Field::Volume,
        Field::Cost,
        Field::Capacity,
        Field::TruckCost,
        Field::KeepCost,
    ];

    /// The key used in scenario and day files.
    pub fn key(self) -> &'static str {
        match self {
            Field::Supply => "supply",
            Field::Demand => "demand",
            Field::Stock => "stock",
            Field::Volume => "volume",
            Field::Cost => "cost",
            Field::Capacity => "capacity",
            Field::TruckCost => "truck_cost",
            Field::KeepCost => "keep_cost",
        }
    }

    /// Whether values must be `>= 0` (quantities and capacities; costs may have any sign).
    pub fn is_quantity(self) -> bool {
        !matches!(self, Field::Cost | Field::TruckCost | Field::KeepCost)
    }

    /// The field spelled `key`, if any.
    pub fn from_key(key: &str) -> Option<Field> {
        Field::ALL.into_iter().find(|f| f.key() == key)
    }
}

/// The numbers of one field, one per name.
///
/// Invariant: `names.len() == values.len()`; `None` occurs only for [`Field::Capacity`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Table {
    /// The field.
    pub field: Field,
    /// The names the values are addressed by (`north`, `harbour/dairy`, `north->harbour`).
    pub names: Vec<String>,
    /// One value per name.
    pub values: Vec<Option<i64>>,
}

/// A lane from a depot to a zone, as indices into [`Scenario::depots`] and
/// [`Scenario::zones`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Lane {
    /// The depot it leaves.
    pub depot: usize,
    /// The zone it serves.
    pub zone: usize,
}

/// A validated transport scenario.
///
/// Invariant: names are unique within depots, zones and products; lanes are unique pairs;
/// `tables` holds exactly one table per field of `kind`, named as documented on [`Field`];
/// `truck_capacity` is `Some(C)` with `1 <= C <= 2^31 - 1` exactly for truckloads;
/// `surcharges` and `change_costs` have one entry per lane, all `None` for product lines.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Scenario {
    /// Which model it compiles into.
    pub kind: ScenarioKind,
    /// A free-text title.
    pub title: Option<String>,
    /// Depot names.
    pub depots: Vec<String>,
    /// Zone names.
    pub zones: Vec<String>,
    /// Product line names (product lines only; empty otherwise).
    pub products: Vec<String>,
    /// The lanes, in file order.
    pub lanes: Vec<Lane>,
    /// Units per truck (truckloads only).
    pub truck_capacity: Option<i64>,
    /// The numbers, one table per field of the kind.
    pub tables: Vec<Table>,
    /// Per lane, the convex cost its `surcharge` adds to its units (breaks the steps' `above`,
    /// slopes the running sums of their `per_unit` after a leading 0); `None` without one.
    pub surcharges: Vec<Option<Pieces>>,
    /// Per lane, its `change_cost`: the price per unit of its units changed against a
    /// previous plan (see [`crate::solve::ChangePrice::of_model`]); `None` without one.
    pub change_costs: Vec<Option<i64>>,
}

impl Scenario {
    /// Reads a scenario file; the extension (`.json` or `.toml`) decides the syntax.
    pub fn load(path: &Path) -> Result<Scenario> {
        let (text, kind, origin) = read_input(path)?;
        Scenario::from_str(&text, kind, &origin)
    }

    /// Parses and validates scenario text; `origin` names the source in error messages.
    pub fn from_str(text: &str, kind: ModelKind, origin: &str) -> Result<Scenario> {
        let tree = reader::parse_tree(text, kind, origin)?;
        file::scenario(&tree, origin)
    }

    /// The name of lane `l`: `depot->zone`.
    pub fn lane_name(&self, l: usize) -> String {
        let lane = self.lanes[l];
        format!("{}->{}", self.depots[lane.depot], self.zones[lane.zone])
    }

    /// The table of `field`, if the kind has that field.
    pub fn table(&self, field: Field) -> Option<&Table> {
        self.tables.iter().find(|t| t.field == field)
    }

    /// The model for this scenario's numbers.
    pub fn compile(&self) -> Result<Model> {
        compile::model(self)
    }
}

/// What a planning input file holds: a scenario, or a plain model.
#[derive(Clone, Debug)]
pub enum PlanInput {
    /// A transport scenario and the model it compiles into.
    Scenario(Box<Scenario>, Model),
    /// A model file.
    Model(Model),
}

impl PlanInput {
    /// Reads `path`: a JSON or TOML file with a top-level `kind` key is a scenario, any other
    /// file a model.
    pub fn load(path: &Path) -> Result<PlanInput> {
        let (text, kind, origin) = read_input(path)?;
        if kind == ModelKind::Mps {
            return Ok(PlanInput::Model(Model::from_str(&text, kind, &origin)?));
        }
        // A file that does not parse at all is reported by the model reader, whose messages
        // give the line and column.
        let Ok(tree) = reader::parse_tree(&text, kind, &origin) else {
            return Ok(PlanInput::Model(Model::from_str(&text, kind, &origin)?));
        };
        if tree.get("kind").is_some() {
            let scenario = file::scenario(&tree, &origin)?;
            let model = scenario.compile()?;
            Ok(PlanInput::Scenario(Box::new(scenario), model))
        } else {
            Ok(PlanInput::Model(Model::from_str(&text, kind, &origin)?))
        }
    }

    /// The model (compiled from the scenario's own numbers for a scenario).
    pub fn model(&self) -> &Model {
        match self {
            PlanInput::Scenario(_, model) | PlanInput::Model(model) => model,
        }
    }

    /// The model, owned; the scenario (if any) is dropped.
    pub fn into_model(self) -> Model {
        match self {
            PlanInput::Scenario(_, model) | PlanInput::Model(model) => model,
        }
    }

    /// The input files `paths` name: a file as given, a directory replaced by the files
    /// directly inside it that [`PlanInput::load`] takes by their extension (`.json`, `.toml`,
    /// `.mps`, also `.gz` compressed), in name order. A directory with none is an error.
    pub fn files(paths: &[PathBuf]) -> Result<Vec<PathBuf>> {
        let mut out = Vec::new();
        for path in paths {
            if !path.is_dir() {
                out.push(path.clone());
                continue;
            }
            let io = |source| Error::Io {
                path: path.clone(),
                source,
            };
            let mut found = Vec::new();
            for entry in std::fs::read_dir(path).map_err(io)? {
                let file = entry.map_err(io)?.path();
                if file.is_file() && ModelKind::from_path(syntax_path(&file)).is_some() {
                    found.push(file);
                }
            }
            if found.is_empty() {
                return Err(Error::Input {
                    file: path.display().to_string(),
                    field: "directory".to_string(),
                    message: "no .json, .toml or .mps model files inside".to_string(),
                });
            }
            found.sort();
            out.extend(found);
        }
        Ok(out)
    }
}

fn read_input(path: &Path) -> Result<(String, ModelKind, String)> {
    let origin = path.display().to_string();
    let (text, kind) = ModelKind::read(
        path,
        "unknown model file type; use a .json, .toml or .mps extension, .gz compressed too (scenarios: .json or .toml)",
    )?;
    Ok((text, kind, origin))
}
