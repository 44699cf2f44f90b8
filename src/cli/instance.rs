//! The instance options shared by `solve` and `trace`: the model (or scenario), the variant
//! (or day), the warm start and the solver settings, turned once into a prepared instance.

use std::path::{Path, PathBuf};
use std::sync::atomic::Ordering;

use anyhow::Context;
use augment::{Options, Rule};
use clap::{Args, ValueEnum};
use kernstep::input::read_text;
use kernstep::model::Model;
use kernstep::scenario::{pick_day, read_variant, PlanInput};
use kernstep::solve::{ChangePrice, Variant, WarmStart};
use kernstep::trace::Instance;

use super::common::{interrupted, ServeArgs};

/// Which instance to solve, and how.
#[derive(Debug, Args)]
pub struct InstanceArgs {
    /// The model file (.json, .toml or .mps), or a transport scenario file (.json or .toml);
    /// .gz compressed too; `-` reads standard input.
    pub model: PathBuf,
    /// For a model file, a variant: inline JSON such as `{"id":"mon","rhs":[...]}`, or a JSON
    /// Lines file of variants (then --variant-id picks one; default the first). For a
    /// scenario, a days file as `batch` reads it: JSON Lines, or CSV rows `day,field,name,value`
    /// (.csv); then --day picks one (default the first).
    #[arg(long, value_name = "FILE_OR_JSON")]
    pub variant: Option<String>,
    /// The id of the variant to take from the --variant file (model files; for a scenario use
    /// --day).
    #[arg(long, value_name = "ID", requires = "variant")]
    pub variant_id: Option<String>,
    /// The day to take from the --variant days file, by its `day` name (scenarios; for a model
    /// file use --variant-id).
    #[arg(long, value_name = "DAY", requires = "variant")]
    pub day: Option<String>,
    /// Start from a previous plan: a `solve --json` (or `trace --json`) document; its `x` plus
    /// a particular solution of `A z = b - rhs_prev` is the start point.
    #[arg(long, value_name = "FILE")]
    pub warm_start: Option<PathBuf>,
    /// How each augmenting step is chosen.
    #[arg(long, value_enum, default_value_t = StrategyArg::GraverBest)]
    pub strategy: StrategyArg,
    /// Restrict step lengths to powers of two.
    #[arg(long)]
    pub powers_of_two: bool,
    /// Stop (exit 1) after N steps over both phases.
    #[arg(long, value_name = "N", default_value_t = Options::default().step_limit())]
    pub max_steps: u64,
    #[command(flatten)]
    pub serving: ServeArgs,
}

/// `--strategy`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StrategyArg {
    /// The step with the largest improvement (Graver-best augmentation).
    GraverBest,
    /// The first improving move in index order, with its best length.
    First,
    /// The largest improvement per unit ℓ1 norm of the move.
    Steepest,
}

impl InstanceArgs {
    /// Loads the model, applies the variant, reads the warm start and finds the moves; with
    /// `change` (a weight and whether to compare), prices every unit changed.
    pub fn load(&self, change: Option<(i64, bool)>) -> anyhow::Result<Instance> {
        let input = PlanInput::load(&self.model)?;
        let path = self.model.display().to_string();
        let (model, variant) = match &self.variant {
            None => (input.model().clone(), None),
            Some(spec) => {
                let (variant, origin) = self.pick_variant(&input, spec)?;
                (variant.apply(input.model(), &origin)?, Some(variant.id))
            }
        };
        let warm = self
            .warm_start
            .as_deref()
            .map(|path| read_warm_start(path, &model))
            .transpose()?;
        let price = change
            .map(|(w, _)| ChangePrice::of_model(&model, w, "--change-cost"))
            .transpose()?;
        let to_serve = price.as_ref().map(|p| p.model_to_serve(&model));
        let set = (self.serving).served(
            to_serve.transpose()?.as_ref().unwrap_or(&model),
            &self.model,
        )?;
        let rule = match self.strategy {
            StrategyArg::GraverBest => Rule::GraverBest,
            StrategyArg::First => Rule::FirstImproving,
            StrategyArg::Steepest => Rule::Steepest,
        };
        let options = Options::default()
            .rule(rule)
            .powers_of_two(self.powers_of_two)
            .max_steps(self.max_steps);
        let mut instance = Instance::new(model, &path, set, options)?;
        if let Some(warm) = warm {
            instance = instance.warm_start(warm);
        }
        if let (Some(price), Some((_, compare))) = (price, change) {
            instance = instance.priced(price, compare);
        }
        if let Some(id) = variant {
            instance = instance.variant_of(id, input.model(), &cancelled);
        }
        Ok(instance)
    }

    /// The variant `--variant` names: a day of a scenario's days file (picked by `--day`) or a
    /// variant of a model file (picked by `--variant-id`), with the origin for messages.
    fn pick_variant(&self, input: &PlanInput, spec: &str) -> anyhow::Result<(Variant, String)> {
        let model = self.model.display();
        match input {
            PlanInput::Scenario(scenario, _) => {
                if self.variant_id.is_some() {
                    anyhow::bail!(
                        "--variant-id picks a variant of a model file; {model} is a scenario, so pick a day of its days file with --day"
                    );
                }
                let path = Path::new(spec);
                let day = pick_day(scenario, path, self.day.as_deref())?;
                Ok((day, path.display().to_string()))
            }
            PlanInput::Model(_) => {
                if self.day.is_some() {
                    anyhow::bail!(
                        "--day picks a day of a scenario's days file; {model} is a model file, so pick its variant with --variant-id"
                    );
                }
                Ok(read_variant(spec, self.variant_id.as_deref(), "--variant")?)
            }
        }
    }
}

/// The cancellation hook of a solve: Ctrl-C.
pub fn cancelled() -> bool {
    interrupted().load(Ordering::Relaxed)
}

/// The plan of a previous solve document at `path`, checked against `model`.
fn read_warm_start(path: &Path, model: &Model) -> anyhow::Result<WarmStart> {
    let origin = path.display().to_string();
    let text = read_text(path).with_context(|| format!("reading the warm start {origin}"))?;
    Ok(kernstep::trace::read_warm_start(&text, &origin, model)?)
}
