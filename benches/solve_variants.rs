//! Per-variant re-optimisation time of kernstep, for the side-by-side comparison with HiGHS
//! driven by `benches/replan_vs_highs.py` (which also runs this binary).
//!
//! `cargo bench --bench solve_variants -- MODEL.json VARIANTS.jsonl THREADS` builds the Graver
//! basis once (timed separately), prepares the matrix once, then solves every variant (in
//! parallel over variants when THREADS > 1) and prints one JSON line per variant
//! (`id`, `status`, `objective`) and a last line with the timings.

use std::time::Instant;

use augment::{Coverage, Options, Status};
use kernstep::completion::{complete_kernel, Completion, Control, Request};
use kernstep::model::Model;
use kernstep::solve::{parse_lines, Prepared, Verdict};
use rayon::prelude::*;

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| a != "--bench")
        .collect();
    let [model_path, variants_path, threads] = args.as_slice() else {
        eprintln!("usage: solve_variants MODEL VARIANTS THREADS");
        std::process::exit(2);
    };
    let threads: usize = threads.parse().expect("THREADS is a number");
    let model = Model::load(model_path.as_ref()).expect("model loads");
    let text = std::fs::read_to_string(variants_path).expect("variants file");
    let variants: Vec<Model> = parse_lines(&text, variants_path)
        .into_iter()
        .map(|(_, v)| {
            v.expect("variant parses")
                .apply(&model, variants_path)
                .expect("applies")
        })
        .collect();
    let ids: Vec<String> = parse_lines(&text, variants_path)
        .into_iter()
        .map(|(_, v)| v.expect("variant parses").id)
        .collect();

    let start = Instant::now();
    let request = Request::graver(model.variables());
    let Completion::Finished(set, _) =
        complete_kernel(&model.matrix, &request, &Control::new(), None).expect("completion runs")
    else {
        panic!("completion stopped");
    };
    let build_s = start.elapsed().as_secs_f64();
    let prepared = Prepared::new(&model.matrix, &set, Coverage::Complete).expect("prepares");

    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .expect("pool");
    let start = Instant::now();
    let results: Vec<(String, Option<i128>, [u64; 2])> = pool.install(|| {
        variants
            .par_iter()
            .map(|m| outcome(&prepared.solve(m, &Options::default(), None, &|| false)))
            .collect()
    });
    let solve_s = start.elapsed().as_secs_f64();
    for (id, (status, objective, steps)) in ids.iter().zip(&results) {
        println!(
            "{}",
            serde_json::json!({
                "id": id, "status": status, "objective": objective.map(|o| o.to_string()),
                "steps": steps,
            })
        );
    }
    println!(
        "{}",
        serde_json::json!({
            "summary": true, "elements": set.len(), "build_seconds": build_s,
            "solve_seconds": solve_s, "variants": variants.len(), "threads": threads,
        })
    );
}

/// Status name, optimum and steps per phase of one solve.
fn outcome(result: &kernstep::Result<Verdict>) -> (String, Option<i128>, [u64; 2]) {
    match result {
        Ok(Verdict::Solved(s)) => {
            let steps = [s.feasibility_steps, s.optimality_steps];
            let status = match &s.status {
                Status::Optimal => "optimal".to_string(),
                Status::Unbounded(_) => "unbounded".to_string(),
                Status::Infeasible(_) => "infeasible".to_string(),
                other => format!("{other:?}"),
            };
            let objective = (s.status == Status::Optimal)
                .then_some(s.objective)
                .flatten();
            (status, objective, steps)
        }
        Ok(Verdict::NoIntegerSolution(_)) => ("infeasible".to_string(), None, [0, 0]),
        Ok(v @ Verdict::Flow(_)) => {
            let (f, c) = v.steps();
            let status = if v.optimum().is_some() {
                "optimal"
            } else {
                "not optimal"
            };
            (status.to_string(), v.optimum().map(|(o, _)| o), [f, c])
        }
        Err(e) => (format!("error: {e}"), None, [0, 0]),
    }
}
