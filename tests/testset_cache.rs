//! Test sets through the cache: same-kernel matrices share one entry, cached equals fresh,
//! truncations and signs make other entries, and a checkpoint is resumed only by a build of
//! the request it was saved for.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Mutex;

use cache::{Completeness, SetKind};
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::{
    complete_kernel, Control, Progress, Request, Sign, StateView, StopReason,
};
use kernstep::model::{Model, ModelKind};
use kernstep::testset::{
    build, default_graver_keys, entry_key, BoxPolicy, BuildOutcome, BuildSpec, NormLimit, Obtained,
    ResolvedSpec, SetLibrary,
};
use kernstep::IntMatrix;

fn model(rows: &[Vec<i64>], upper: i64) -> Model {
    let n = rows[0].len();
    let text = serde_json::json!({
        "matrix": rows,
        "rhs": vec![0; rows.len()],
        "cost": vec![0; n],
        "lower": vec![0; n],
        "upper": vec![upper; n],
    })
    .to_string();
    Model::from_str(&text, ModelKind::Json, "test.json").unwrap()
}

fn obtain(lib: &SetLibrary, m: &Model, spec: &BuildSpec) -> Obtained {
    let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
    let resolved = spec.resolve(m, &analysis).unwrap();
    lib.obtain(&m.matrix, &analysis, &resolved, &Control::new(), false)
        .unwrap()
}

fn elements(o: &Obtained) -> Vec<Vec<i64>> {
    match o {
        Obtained::Reused(s) => s.data.rows().collect(),
        Obtained::Built { built, .. } => built.set.to_rows(),
        Obtained::Stopped { reason, .. } => panic!("stopped: {reason:?}"),
    }
}

/// The 3 x 3 transportation matrix (supplies, then demands).
fn transport() -> Vec<Vec<i64>> {
    IntMatrix::transportation(3, 3).to_rows()
}

#[test]
fn same_kernel_matrices_share_one_entry_and_cached_equals_fresh() {
    let dir = tempfile::tempdir().unwrap();
    let lib = SetLibrary::open(Some(dir.path())).unwrap();
    let spec = BuildSpec::default();
    let base = transport();
    let first = obtain(&lib, &model(&base, 5), &spec);
    assert!(matches!(first, Obtained::Built { .. }));
    // 15 cycles of K_{3,3} (standard count, see completion_reference.rs).
    assert_eq!(elements(&first).len(), 15);

    let mut scaled = base.clone();
    scaled[0].iter_mut().for_each(|v| *v *= 3);
    let mut permuted = base.clone();
    permuted.swap(0, 4);
    let mut redundant = base.clone();
    redundant.push(base[0].iter().zip(&base[1]).map(|(a, b)| a + b).collect());
    for rows in [scaled, permuted, redundant] {
        let again = obtain(&lib, &model(&rows, 5), &spec);
        assert!(matches!(again, Obtained::Reused(_)), "{rows:?}");
        assert_eq!(elements(&again), elements(&first));
    }
    assert_eq!(lib.store().list().unwrap().len(), 1);
}

#[test]
fn signs_and_truncations_make_their_own_entries() {
    let dir = tempfile::tempdir().unwrap();
    let lib = SetLibrary::open(Some(dir.path())).unwrap();
    let m = model(&transport(), 1);
    let short = BuildSpec {
        norm_limit: NormLimit::AtMost(4),
        ..BuildSpec::default()
    };
    let short_set = obtain(&lib, &m, &short);
    let Obtained::Built { built, .. } = &short_set else {
        panic!("the first set of a new store is built");
    };
    assert_eq!(
        built.metadata.completeness,
        Completeness::NormTruncated { limit: 4 }
    );
    // A truncated set does not serve a request for the complete one.
    let graver = obtain(&lib, &m, &BuildSpec::default());
    assert!(matches!(graver, Obtained::Built { .. }));
    let full = elements(&graver);
    let expected: Vec<_> = full
        .iter()
        .filter(|g| g.iter().map(|x| x.abs()).sum::<i64>() <= 4)
        .cloned()
        .collect();
    assert_eq!(elements(&short_set), expected);
    let hilbert = BuildSpec {
        kind: SetKind::Hilbert,
        signs: Some(vec![Sign::Free; 9]),
        ..BuildSpec::default()
    };
    assert!(matches!(obtain(&lib, &m, &hilbert), Obtained::Built { .. }));
    // The complete set covers every truncation of the same kind and signs.
    let boxed = BuildSpec {
        bounds: BoxPolicy::FromBounds,
        ..BuildSpec::default()
    };
    assert!(matches!(obtain(&lib, &m, &boxed), Obtained::Reused(_)));
    assert!(matches!(obtain(&lib, &m, &short), Obtained::Reused(_)));
    assert_eq!(lib.store().list().unwrap().len(), 3);
}

#[test]
fn the_lookup_key_without_analysis_equals_the_resolved_default_key() {
    // A unimodular transport matrix, and a non-unimodular one (Delta = 4) with a norm bound
    // far above its shortest moves; each without and with a finite box.
    for rows in [transport(), vec![vec![1, 2, 3, 4], vec![4, 3, 2, 1]]] {
        for upper in [None, Some(7)] {
            let n = rows[0].len();
            let text = serde_json::json!({
                "matrix": rows, "rhs": vec![0; rows.len()], "lower": vec![0; n],
                "upper": vec![upper; n],
            });
            let m = Model::from_str(&text.to_string(), ModelKind::Json, "test.json").unwrap();
            let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
            for bounds in [BoxPolicy::Unlimited, BoxPolicy::FromBounds] {
                let spec = BuildSpec {
                    bounds,
                    ..BuildSpec::default()
                };
                let resolved = spec.resolve(&m, &analysis).unwrap();
                let (complete, boxed) = default_graver_keys(&m);
                let key = match bounds {
                    BoxPolicy::Unlimited => complete,
                    // Without a finite box the boxed spec is the complete one.
                    BoxPolicy::FromBounds => boxed.unwrap_or(complete),
                };
                assert_eq!(
                    key,
                    entry_key(&m.matrix, &resolved),
                    "{rows:?} upper {upper:?} {bounds:?}"
                );
            }
        }
    }
}

/// Builds `spec` through `lib` and cancels it once it reaches stage `stage`, so that the
/// checkpoint of the stage before is left in the cache.
fn stopped_at(lib: &SetLibrary, m: &Model, spec: &ResolvedSpec, stage: usize) {
    let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
    let cancel = AtomicBool::new(false);
    let report = |p: &Progress| {
        if p.stage >= stage {
            cancel.store(true, Ordering::Relaxed);
        }
    };
    let control = Control::new().cancel_flag(&cancel).progress(&report);
    let outcome = lib
        .obtain(&m.matrix, &analysis, spec, &control, false)
        .unwrap();
    assert!(
        matches!(
            outcome,
            Obtained::Stopped {
                reason: StopReason::Cancelled,
                ..
            }
        ),
        "{outcome:?}"
    );
}

/// `lib.obtain` of `spec` when nothing is stored: the set and the stage it resumed in.
fn built(lib: &SetLibrary, m: &Model, spec: &ResolvedSpec) -> (Vec<Vec<i64>>, Option<usize>) {
    let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
    match lib
        .obtain(&m.matrix, &analysis, spec, &Control::new(), false)
        .unwrap()
    {
        Obtained::Built { built, resumed, .. } => {
            (built.set.to_rows(), resumed.map(|state| state.stage))
        }
        other => panic!("{other:?}"),
    }
}

/// The set of `spec` built without any cache or checkpoint.
fn fresh(m: &Model, spec: &ResolvedSpec) -> Vec<Vec<i64>> {
    let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
    match build(&m.matrix, &analysis, spec, &Control::new(), None).unwrap() {
        BuildOutcome::Built(b) => b.set.to_rows(),
        BuildOutcome::Stopped(r) => panic!("stopped: {r:?}"),
    }
}

#[test]
fn a_checkpoint_resumes_only_a_build_of_its_own_request() {
    let dir = tempfile::tempdir().unwrap();
    let lib = SetLibrary::open(Some(dir.path())).unwrap();
    let m = model(&transport(), 5);
    let analysis = MatrixAnalysis::of(&m.matrix, &AnalysisOptions::new());
    let resolve = |norm_limit| {
        let spec = BuildSpec {
            norm_limit,
            ..BuildSpec::default()
        };
        spec.resolve(&m, &analysis).unwrap()
    };
    // `none` and `auto` give the same entry (the proven bound truncates nothing) but run the
    // completion with different norm limits, so they share one checkpoint file.
    let (unlimited, auto) = (resolve(NormLimit::Unlimited), resolve(NormLimit::Auto));
    let key = entry_key(&m.matrix, &auto);
    assert_eq!(entry_key(&m.matrix, &unlimited), key);
    assert_ne!(unlimited.truncation, auto.truncation);
    let checkpoint = lib.store().checkpoint_path(key.digest());
    let remove_entry = || lib.store().remove(&key.digest().to_hex()).unwrap();

    stopped_at(&lib, &m, &unlimited, 3);
    let saved = std::fs::read(&checkpoint).expect("a checkpoint of the stopped build");
    // Another request of the same key starts fresh.
    let (set, resumed) = built(&lib, &m, &auto);
    assert_eq!(resumed, None);
    assert_eq!(set, fresh(&m, &auto));
    assert!(!checkpoint.exists());

    // The request the checkpoint was saved for resumes from it.
    remove_entry();
    std::fs::write(&checkpoint, &saved).unwrap();
    let (set, resumed) = built(&lib, &m, &unlimited);
    assert!(resumed.is_some_and(|k| k > 0), "{resumed:?}");
    assert_eq!(set, fresh(&m, &unlimited));

    // A checkpoint of the older layout (the bare state, no request) is ignored, not an error,
    // even though it holds a sound state of this very request.
    let states = Mutex::new(Vec::new());
    let keep = |c: &StateView<'_>| states.lock().unwrap().push(c.to_checkpoint());
    let request = Request {
        signs: unlimited.signs.clone(),
        truncation: unlimited.truncation.clone(),
        method: unlimited.method,
        check_cuts: false,
    };
    complete_kernel(
        &m.matrix,
        &request,
        &Control::new().on_save(&keep, std::time::Duration::MAX),
        None,
    )
    .unwrap();
    let state = states.into_inner().unwrap().pop().unwrap();
    let bare = bincode::serde::encode_to_vec(&state, bincode::config::standard()).unwrap();
    remove_entry();
    lib.store().save_checkpoint(&key, &bare).unwrap();
    let (set, resumed) = built(&lib, &m, &unlimited);
    assert_eq!(resumed, None);
    assert_eq!(set, fresh(&m, &unlimited));
}
