//! `kernstep._kernstep._TestSet`: a test set built or loaded for a model's matrix, prepared
//! once, and the certified solves of the model's variants.
//!
//! Every solve runs the library's sequence: `Prepared::solve_numbers`, then
//! `kernstep::trace::certify` (the dual bound of a partial set's plan, the independent
//! re-check, and `kernstep::certify::judge`, which alone decides the status). The set is
//! served by `kernstep::testset::serve`, the same policy as the command line's.

use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Mutex};
use std::time::Duration;

use kernstep::augment::{Coverage, MoveSet, Options, Rule};
use kernstep::bound::Multipliers;
use kernstep::cache::SetKind;
use kernstep::certify::{Answer, Claim, Limit};
use kernstep::completion::{moves_of, Progress};
use kernstep::model::Model;
use kernstep::solve::{Numbers, Prepared, WarmStart};
use kernstep::testset::{
    by_cycles, serve, BuildLimits, BuildSpec, Destination, Engine, Job, JobStatus, NormLimit,
    Served, SetLibrary,
};
use kernstep::trace::{certify, record, Certified, Outcome};
use numpy::{PyArray1, PyArray2, PyReadonlyArray1, PyReadonlyArray2};
use pyo3::prelude::*;
use rayon::prelude::*;

use crate::errors::{bad_argument, to_py, to_py_at};
use crate::interrupt::interruptible;
use crate::model::PyModel;
use crate::numbers::{bounds, check_len, exact, Side};

/// Status codes shared with `kernstep.Status` (an `IntEnum`), in the order of
/// [`kernstep::certify::Answer`].
mod code {
    /// Optimal, with a certificate.
    pub const OPTIMAL: u8 = 0;
    /// Feasible and optimal among the moves of a norm-truncated set, not proven optimal.
    pub const FEASIBLE: u8 = 1;
    /// No plan exists, with a proof.
    pub const INFEASIBLE: u8 = 2;
    /// The cost falls without limit along a ray.
    pub const UNBOUNDED: u8 = 3;
    /// A partial set found no feasible plan: nothing is proven.
    pub const UNKNOWN: u8 = 4;
    /// The step limit stopped the solve.
    pub const STEP_LIMIT: u8 = 5;
    /// The solve was interrupted.
    pub const CANCELLED: u8 = 6;
}

/// The status code of `answer`. An answer this binding does not know proves nothing it can
/// name, so it is `UNKNOWN`.
fn status_code(answer: &Answer) -> u8 {
    match answer {
        Answer::Optimal { .. } => code::OPTIMAL,
        Answer::Feasible { .. } => code::FEASIBLE,
        Answer::Infeasible(_) => code::INFEASIBLE,
        Answer::Unbounded(_) => code::UNBOUNDED,
        Answer::Stopped(Limit::Steps) => code::STEP_LIMIT,
        Answer::Stopped(Limit::Cancelled) => code::CANCELLED,
        _ => code::UNKNOWN,
    }
}

/// The cost of the plan an answer certifies (optimal, or optimal among the set's moves).
fn objective_of(answer: &Answer) -> Option<i128> {
    match answer {
        Answer::Optimal { objective, .. } | Answer::Feasible { objective, .. } => Some(*objective),
        _ => None,
    }
}

/// What proves an optimal plan, in the words of `kernstep.Result.claim`.
fn claim_word(answer: &Answer) -> Option<&'static str> {
    match answer {
        Answer::Optimal { claim, .. } => Some(match claim {
            Claim::TestSet => "test_set",
            Claim::BoundMet => "bound_met",
            Claim::Potentials => "potentials",
            _ => "certified",
        }),
        _ => None,
    }
}

/// The set's guarantee as a word and, for a norm-truncated set, its norm limit.
fn coverage_words(coverage: Coverage) -> (&'static str, Option<u64>) {
    match coverage {
        Coverage::Complete => ("complete", None),
        Coverage::BoxValid => ("box", None),
        Coverage::NormTruncated { norm } => ("norm_truncated", Some(norm)),
    }
}

/// The kind of set as `kernstep.TestSet.kind` names it.
fn kind_word(kind: SetKind) -> &'static str {
    match kind {
        SetKind::Graver => "graver",
        SetKind::Hilbert => "hilbert",
        SetKind::Cycles => "cycles",
    }
}

/// What solves use: the prepared set, the start of a network's variants and the prices that
/// seed the bounds of a partial set's variants (both from the model's own numbers, as the
/// command line's batch takes them).
struct Serving {
    prepared: Prepared,
    base: Option<WarmStart>,
    prices: Option<Multipliers>,
}

/// The numbers of one variant, owned: the model's where the caller gave none.
struct Variant {
    rhs: Vec<i64>,
    cost: Vec<i64>,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
    /// Whether any number differs from the model's arguments (the caller gave one).
    given: bool,
}

/// One row of a `solve_many`: status code, objective, plan and steps.
type RowAnswer = (u8, Option<i128>, Option<Vec<i64>>, u64);

/// A test set serving one model's variants.
#[pyclass(name = "_TestSet", module = "kernstep._kernstep", frozen)]
pub struct PyTestSet {
    model: Model,
    kind: SetKind,
    moves: Arc<MoveSet>,
    coverage: Coverage,
    source: String,
    /// `None` for a Hilbert basis, which serves no solves.
    serving: Option<Serving>,
}

impl PyTestSet {
    /// The test set of `served` for `model`, prepared, with the network start and the prices
    /// of the model's own numbers.
    fn from_served(py: Python<'_>, model: &Model, served: Served) -> PyResult<Self> {
        let prepared = served.prepare(&model.matrix).map_err(|e| to_py(py, &e))?;
        let options = Options::default();
        let (base, prices) = py.detach(|| {
            let base = prepared.base_start(model, &options, &|| false);
            (base, prepared.base_multipliers(model))
        });
        let kind = if served.network.is_some() {
            SetKind::Cycles
        } else {
            SetKind::Graver
        };
        Ok(PyTestSet {
            model: model.clone(),
            kind,
            coverage: served.coverage,
            source: served.source.to_string(),
            moves: served.moves,
            serving: Some(Serving {
                prepared,
                base,
                prices,
            }),
        })
    }

    /// The prepared set, or an error for a set that serves no solves.
    fn serving(&self, py: Python<'_>) -> PyResult<&Serving> {
        self.serving.as_ref().ok_or_else(|| {
            to_py(
                py,
                &kernstep::Error::Unsupported(
                    "a Hilbert basis of a sign-restricted kernel is no test set for these solves; build kind=\"graver\"".to_string(),
                ),
            )
        })
    }

    /// The variant of the model with the numbers given (checked for lengths and range).
    fn variant(
        &self,
        py: Python<'_>,
        b: Option<PyReadonlyArray1<'_, i64>>,
        c: Option<PyReadonlyArray1<'_, i64>>,
        lower: Option<PyReadonlyArray1<'_, i64>>,
        upper: Option<PyReadonlyArray1<'_, i64>>,
    ) -> PyResult<Variant> {
        let (m, n) = (self.model.constraints(), self.model.variables());
        let given = b.is_some() || c.is_some() || lower.is_some() || upper.is_some();
        let vector = |name: &str, array: &PyReadonlyArray1<'_, i64>, len: usize, what: &str| {
            let values = array.as_array().to_vec();
            check_len(py, name, values.len(), len, what).map(|()| values)
        };
        let rhs = match &b {
            Some(b) => exact(py, ("b", 0), &vector("b", b, m, "rows")?)?,
            None => self.model.rhs.clone(),
        };
        let cost = match &c {
            Some(c) => exact(py, ("c", 0), &vector("c", c, n, "variables")?)?,
            None => self.model.cost.clone(),
        };
        let lower = match &lower {
            Some(l) => bounds(
                py,
                ("lower", 0),
                &vector("lower", l, n, "variables")?,
                Side::Lower,
            )?,
            None => self.model.lower.clone(),
        };
        let upper = match &upper {
            Some(u) => bounds(
                py,
                ("upper", 0),
                &vector("upper", u, n, "variables")?,
                Side::Upper,
            )?,
            None => self.model.upper.clone(),
        };
        Ok(Variant {
            rhs,
            cost,
            lower,
            upper,
            given,
        })
    }

    /// The previous plan `x` (of the right-hand side `A x`) as a checked start.
    fn warm_start(
        &self,
        py: Python<'_>,
        x: Option<PyReadonlyArray1<'_, i64>>,
    ) -> PyResult<Option<WarmStart>> {
        let Some(x) = x else {
            return Ok(None);
        };
        let x = x.as_array().to_vec();
        check_len(
            py,
            "warm_start",
            x.len(),
            self.model.variables(),
            "variables",
        )?;
        let x = exact(py, ("warm_start", 0), &x)?;
        let rhs = self.model.matrix.mul_vec(&x).ok_or_else(|| {
            to_py(
                py,
                &kernstep::Error::Overflow("A x of the warm start".to_string()),
            )
        })?;
        let warm = WarmStart {
            rhs,
            x,
            potentials: None,
        };
        warm.check(&self.model.matrix, "warm_start")
            .map_err(|e| to_py(py, &e))?;
        Ok(Some(warm))
    }

    /// The numbers of `variant` as the solver reads them.
    fn numbers<'a>(&'a self, variant: &'a Variant) -> Numbers<'a> {
        Numbers {
            rhs: &variant.rhs,
            cost: &variant.cost,
            convex: &self.model.convex,
            lower: &variant.lower,
            upper: &variant.upper,
        }
    }
}

/// Solver options: the step rule named by `strategy` (the command line's `--strategy`) and
/// an optional step limit.
fn options(py: Python<'_>, strategy: &str, max_steps: Option<u64>) -> PyResult<Options> {
    let rule = match strategy {
        "graver_best" => Rule::GraverBest,
        "first" => Rule::FirstImproving,
        "steepest" => Rule::Steepest,
        other => {
            return Err(bad_argument(
                py,
                "strategy",
                &format!(
                    "{other:?} is no strategy; use \"graver_best\", \"first\" or \"steepest\""
                ),
            ))
        }
    };
    let options = Options::default().rule(rule);
    Ok(match max_steps {
        Some(steps) => options.max_steps(steps),
        None => options,
    })
}

/// The `kind` argument of a build.
fn parse_kind(py: Python<'_>, kind: &str) -> PyResult<SetKind> {
    match kind {
        "graver" => Ok(SetKind::Graver),
        "hilbert" => Ok(SetKind::Hilbert),
        other => Err(bad_argument(
            py,
            "kind",
            &format!("{other:?} is no kind of set; use \"graver\" or \"hilbert\""),
        )),
    }
}

/// A build's progress reported to the Python callable `report` as
/// `(stage, stages, level, elements, seconds)`.
fn report_progress(py: Python<'_>, report: &Py<PyAny>, progress: Progress) -> PyResult<()> {
    report.call1(
        py,
        (
            progress.stage,
            progress.stages,
            progress.level,
            progress.elements,
            progress.elapsed.as_secs_f64(),
        ),
    )?;
    Ok(())
}

#[pymethods]
impl PyTestSet {
    /// Builds the set of `model` into the cache at `cache_dir` (default: the platform's) and
    /// serves it; see `kernstep.TestSet.build`.
    #[staticmethod]
    #[pyo3(signature = (model, kind="graver", norm_limit=None, budget=None, max_memory=None, cache_dir=None, progress=None, rebuild=false))]
    #[allow(clippy::too_many_arguments)]
    fn build(
        py: Python<'_>,
        model: &PyModel,
        kind: &str,
        norm_limit: Option<u64>,
        budget: Option<f64>,
        max_memory: Option<u64>,
        cache_dir: Option<PathBuf>,
        progress: Option<Py<PyAny>>,
        rebuild: bool,
    ) -> PyResult<Self> {
        let kind = parse_kind(py, kind)?;
        let budget = budget
            .map(|seconds| {
                Duration::try_from_secs_f64(seconds).map_err(|_| {
                    bad_argument(py, "budget", &format!("{seconds} is no number of seconds"))
                })
            })
            .transpose()?;
        let library = SetLibrary::open(cache_dir.as_deref())
            .map_err(|e| to_py(py, &e))?
            .for_model_file(std::path::Path::new(&model.origin));
        let job = Job {
            spec: BuildSpec {
                kind,
                signs: model.signs.clone(),
                norm_limit: norm_limit.map_or(NormLimit::Auto, NormLimit::AtMost),
                ..BuildSpec::default()
            },
            engine: Engine::Auto,
            budget,
            rebuild,
            destination: Destination::Cache(&library),
        };
        let cancel = AtomicBool::new(false);
        let latest: Mutex<Option<Progress>> = Mutex::new(None);
        let note = |p: &Progress| {
            if let Ok(mut slot) = latest.lock() {
                *slot = Some(*p);
            }
        };
        let limits = BuildLimits {
            max_memory,
            ..BuildLimits::default()
        };
        let control = limits
            .control(model.model.variables(), Some(&cancel))
            .progress(&note);
        let tick = |py: Python<'_>| match (&progress, latest.lock().ok().and_then(|mut s| s.take()))
        {
            (Some(report), Some(p)) => report_progress(py, report, p),
            _ => Ok(()),
        };
        let report = interruptible(py, &cancel, || job.run(&model.model, control), tick)?
            .map_err(|e| to_py(py, &e))?;
        if let JobStatus::Stopped { reason } = report.status {
            let stopped = kernstep::Error::BuildStopped {
                reason,
                kept: None,
                set_aside: None,
            };
            return Err(to_py(py, &stopped));
        }
        if kind == SetKind::Hilbert {
            let Some(digest) = report.key else {
                let unstored = "the build finished without storing a set".to_string();
                return Err(to_py(py, &kernstep::Error::Unsupported(unstored)));
            };
            let stored = library
                .store()
                .load_digest(&digest)
                .map_err(|e| to_py(py, &kernstep::Error::Cache(e)))?;
            let coverage = kernstep::solve::coverage_of(&stored.metadata.completeness);
            return Ok(PyTestSet {
                model: model.model.clone(),
                kind,
                moves: Arc::new(moves_of(&stored.data, coverage).map_err(|e| to_py(py, &e))?),
                coverage,
                source: format!("built into the cache ({})", &digest[..digest.len().min(12)]),
                serving: None,
            });
        }
        let served =
            serve(&model.model, Some(&library), Engine::Auto, None).map_err(|e| to_py(py, &e))?;
        Self::from_served(py, &model.model, served)
    }

    /// The set that serves `model` from the cache at `cache_dir` (a network needs none); see
    /// `kernstep.TestSet.load`.
    #[staticmethod]
    #[pyo3(signature = (model, cache_dir=None))]
    fn load(py: Python<'_>, model: &PyModel, cache_dir: Option<PathBuf>) -> PyResult<Self> {
        let served = match by_cycles(&model.model, Engine::Auto).map_err(|e| to_py(py, &e))? {
            Some(served) => served,
            None => {
                let library = SetLibrary::open(cache_dir.as_deref()).map_err(|e| to_py(py, &e))?;
                py.detach(|| serve(&model.model, Some(&library), Engine::Auto, None))
                    .map_err(|e| to_py(py, &e))?
            }
        };
        Self::from_served(py, &model.model, served)
    }

    /// Solves one variant; see `kernstep.TestSet.solve`. Returns `(status, outcome JSON, x,
    /// objective, claim, bound, gap, feasibility steps, cost steps, seconds)`.
    #[pyo3(signature = (b=None, c=None, lower=None, upper=None, warm_start=None, strategy="graver_best", max_steps=None))]
    #[allow(clippy::too_many_arguments, clippy::type_complexity)]
    fn solve<'py>(
        &self,
        py: Python<'py>,
        b: Option<PyReadonlyArray1<'_, i64>>,
        c: Option<PyReadonlyArray1<'_, i64>>,
        lower: Option<PyReadonlyArray1<'_, i64>>,
        upper: Option<PyReadonlyArray1<'_, i64>>,
        warm_start: Option<PyReadonlyArray1<'_, i64>>,
        strategy: &str,
        max_steps: Option<u64>,
    ) -> PyResult<(
        u8,
        String,
        Option<Bound<'py, PyArray1<i64>>>,
        Option<i128>,
        Option<&'static str>,
        Option<String>,
        Option<String>,
        u64,
        u64,
        f64,
    )> {
        let serving = self.serving(py)?;
        let variant = self.variant(py, b, c, lower, upper)?;
        let warm = self.warm_start(py, warm_start)?;
        let start = warm
            .as_ref()
            .or(serving.base.as_ref().filter(|_| variant.given));
        let numbers = self.numbers(&variant);
        let options = options(py, strategy, max_steps)?;
        let certified = py
            .detach(|| {
                let verdict = serving
                    .prepared
                    .solve_numbers(numbers, &options, start, &|| false)?;
                certify(
                    &serving.prepared,
                    &self.model.matrix,
                    numbers,
                    verdict,
                    None,
                )
            })
            .map_err(|e| to_py(py, &e))?;
        let Certified {
            verdict,
            bound,
            answer,
            ..
        } = certified;
        let outcome =
            Outcome::of_answer(&answer, &self.model.variable_names, &self.model.row_names);
        let outcome = serde_json::to_string(&outcome)
            .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))?;
        let (feasibility, cost) = verdict.steps();
        Ok((
            status_code(&answer),
            outcome,
            verdict.point().map(|x| PyArray1::from_slice(py, x)),
            objective_of(&answer),
            claim_word(&answer),
            bound.as_ref().map(|b| b.ceiling().to_string()),
            answer.gap().map(|g| g.to_string()),
            feasibility,
            cost,
            verdict.elapsed().as_secs_f64(),
        ))
    }

    /// Solves the rows of `b`, `c`, `lower` and `upper` in parallel without the GIL; see
    /// `kernstep.TestSet.solve_many`. Returns `(status, objective, x, steps)`.
    #[pyo3(signature = (b=None, c=None, lower=None, upper=None, threads=None, strategy="graver_best", max_steps=None))]
    #[allow(clippy::too_many_arguments, clippy::type_complexity)]
    fn solve_many<'py>(
        &self,
        py: Python<'py>,
        b: Option<PyReadonlyArray2<'_, i64>>,
        c: Option<PyReadonlyArray2<'_, i64>>,
        lower: Option<PyReadonlyArray2<'_, i64>>,
        upper: Option<PyReadonlyArray2<'_, i64>>,
        threads: Option<usize>,
        strategy: &str,
        max_steps: Option<u64>,
    ) -> PyResult<(
        Bound<'py, PyArray1<u8>>,
        Bound<'py, PyArray1<i64>>,
        Bound<'py, PyArray2<i64>>,
        Bound<'py, PyArray1<u64>>,
    )> {
        let serving = self.serving(py)?;
        let (m, n) = (self.model.constraints(), self.model.variables());
        let mut count: Option<(usize, &str)> = None;
        let mut table = |name: &'static str,
                         array: &Option<PyReadonlyArray2<'_, i64>>,
                         width: usize,
                         what: &str|
         -> PyResult<Option<Vec<i64>>> {
            let Some(array) = array else {
                return Ok(None);
            };
            let view = array.as_array();
            let (rows, cols) = view.dim();
            if cols != width {
                return Err(bad_argument(
                    py,
                    name,
                    &format!("has {cols} columns, the model has {width} {what}"),
                ));
            }
            match count {
                Some((k, first)) if k != rows => {
                    return Err(bad_argument(
                        py,
                        name,
                        &format!("has {rows} rows, {first} has {k}"),
                    ))
                }
                _ => count = Some((rows, name)),
            }
            Ok(Some(view.iter().copied().collect()))
        };
        let rhs = table("B", &b, m, "rows")?;
        let cost = table("C", &c, n, "variables")?;
        let low = table("L", &lower, n, "variables")?;
        let up = table("U", &upper, n, "variables")?;
        let Some((k, _)) = count else {
            return Err(bad_argument(
                py,
                "B",
                "give at least one of B, C, L and U (one variant per row)",
            ));
        };
        let rhs = rhs.map(|v| exact(py, ("B", m), &v)).transpose()?;
        let cost = cost.map(|v| exact(py, ("C", n), &v)).transpose()?;
        let low = low
            .map(|v| bounds(py, ("L", n), &v, Side::Lower))
            .transpose()?;
        let up = up
            .map(|v| bounds(py, ("U", n), &v, Side::Upper))
            .transpose()?;
        let pool = match threads {
            Some(0) => return Err(bad_argument(py, "threads", "must be at least 1")),
            Some(t) => Some(
                rayon::ThreadPoolBuilder::new()
                    .num_threads(t)
                    .build()
                    .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))?,
            ),
            None => None,
        };
        let options = options(py, strategy, max_steps)?;
        let model = &self.model;
        let cancel = AtomicBool::new(false);
        let row = |i: usize| -> kernstep::Result<RowAnswer> {
            // After Ctrl-C the rows not yet started are not run (the call raises anyway).
            if cancel.load(Ordering::Relaxed) {
                return Ok((code::CANCELLED, None, None, 0));
            }
            let pick = |all: &Option<Vec<i64>>, own: &[i64], w: usize| -> Vec<i64> {
                all.as_ref()
                    .map_or_else(|| own.to_vec(), |v| v[i * w..(i + 1) * w].to_vec())
            };
            let pick_bounds = |all: &Option<Vec<Option<i64>>>, own: &[Option<i64>]| {
                all.as_ref()
                    .map_or_else(|| own.to_vec(), |v| v[i * n..(i + 1) * n].to_vec())
            };
            let variant = Variant {
                rhs: pick(&rhs, &model.rhs, m),
                cost: pick(&cost, &model.cost, n),
                lower: pick_bounds(&low, &model.lower),
                upper: pick_bounds(&up, &model.upper),
                given: true,
            };
            let numbers = self.numbers(&variant);
            let cancelled = || cancel.load(Ordering::Relaxed);
            let verdict = serving.prepared.solve_numbers(
                numbers,
                &options,
                serving.base.as_ref(),
                &cancelled,
            )?;
            let Certified {
                verdict, answer, ..
            } = certify(
                &serving.prepared,
                &model.matrix,
                numbers,
                verdict,
                serving.prices.as_ref(),
            )?;
            let objective = objective_of(&answer);
            let plan = objective.and(verdict.point().map(<[i64]>::to_vec));
            let (feasibility, cost_steps) = verdict.steps();
            Ok((
                status_code(&answer),
                objective,
                plan,
                feasibility + cost_steps,
            ))
        };
        let work = || {
            let run = || (0..k).into_par_iter().map(row).collect::<Vec<_>>();
            match &pool {
                Some(pool) => pool.install(run),
                None => run(),
            }
        };
        let answers = interruptible(py, &cancel, work, |_| Ok(()))?;
        let mut status = Vec::with_capacity(k);
        let mut objective = Vec::with_capacity(k);
        let mut plans = vec![0i64; k * n];
        let mut steps = Vec::with_capacity(k);
        for (i, answer) in answers.into_iter().enumerate() {
            let (code, cost, plan, taken) =
                answer.map_err(|e| to_py_at(py, &e, &format!("row {i}")))?;
            let cost = cost.map_or(Ok(0), i64::try_from).map_err(|_| {
                to_py_at(
                    py,
                    &kernstep::Error::Overflow("the objective (it exceeds int64)".to_string()),
                    &format!("row {i}"),
                )
            })?;
            if let Some(plan) = plan {
                plans[i * n..(i + 1) * n].copy_from_slice(&plan);
            }
            status.push(code);
            objective.push(cost);
            steps.push(taken);
        }
        let plans = numpy::ndarray::Array2::from_shape_vec((k, n), plans)
            .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))?;
        Ok((
            PyArray1::from_vec(py, status),
            PyArray1::from_vec(py, objective),
            PyArray2::from_owned_array(py, plans),
            PyArray1::from_vec(py, steps),
        ))
    }

    /// Solves one variant with every step recorded; see `kernstep.TestSet.trace`. Returns the
    /// trace document as JSON (the layout of the command line's `trace --json`).
    #[pyo3(signature = (b=None, c=None, lower=None, upper=None, warm_start=None, strategy="graver_best", max_steps=None))]
    #[allow(clippy::too_many_arguments)]
    fn trace(
        &self,
        py: Python<'_>,
        b: Option<PyReadonlyArray1<'_, i64>>,
        c: Option<PyReadonlyArray1<'_, i64>>,
        lower: Option<PyReadonlyArray1<'_, i64>>,
        upper: Option<PyReadonlyArray1<'_, i64>>,
        warm_start: Option<PyReadonlyArray1<'_, i64>>,
        strategy: &str,
        max_steps: Option<u64>,
    ) -> PyResult<String> {
        let serving = self.serving(py)?;
        let variant = self.variant(py, b, c, lower, upper)?;
        let warm = self.warm_start(py, warm_start)?;
        let start = warm
            .as_ref()
            .or(serving.base.as_ref().filter(|_| variant.given));
        let model = Model {
            rhs: variant.rhs,
            cost: variant.cost,
            lower: variant.lower,
            upper: variant.upper,
            ..self.model.clone()
        };
        let options = options(py, strategy, max_steps)?;
        let document = py
            .detach(|| record(&serving.prepared, &model, &options, start, &|| false))
            .map_err(|e| to_py(py, &e))?;
        serde_json::to_string(&document)
            .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))
    }

    /// `graver`, `hilbert`, or `cycles` (a network's Graver basis, its cycles, kept implicit).
    #[getter]
    fn kind(&self) -> &'static str {
        kind_word(self.kind)
    }

    /// What the set guarantees: `complete`, `box` or `norm_truncated`.
    #[getter]
    fn coverage(&self) -> &'static str {
        coverage_words(self.coverage).0
    }

    /// The ℓ1 norm limit of a norm-truncated set, else `None`.
    #[getter]
    fn norm_limit(&self) -> Option<u64> {
        coverage_words(self.coverage).1
    }

    /// Where the set came from, in words.
    #[getter]
    fn source(&self) -> &str {
        &self.source
    }

    /// The moves, one per row (each stands for itself and its negation; none for a
    /// network's implicit cycles).
    #[getter]
    fn moves<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<i64>>> {
        let flat: Vec<i64> = self.moves.rows().flatten().collect();
        let array =
            numpy::ndarray::Array2::from_shape_vec((self.moves.len(), self.moves.width()), flat)
                .map_err(|e| pyo3::exceptions::PyRuntimeError::new_err(e.to_string()))?;
        Ok(PyArray2::from_owned_array(py, array))
    }
}
