//! The library's serving policy (`testset::serve`, issue 23): which stored set serves a model,
//! what a miss does, and how a stopped build and a wrong engine are reported. The sets come
//! from the library's own builds; the points are the order and the errors, not the counts.

use augment::Coverage;
use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
use kernstep::completion::{Control, StopReason};
use kernstep::model::{Model, ModelKind};
use kernstep::testset::{
    serve, BoxPolicy, BuildSpec, Engine, NormLimit, Obtained, Served, SetLibrary, Source,
};
use kernstep::Error;

/// The twisted cubic's matrix `[[1, 1, 1, 1], [0, 1, 2, 3]]` with every variable in `[0, 1]`
/// (no network: its columns are no arcs).
fn cubic() -> Model {
    let text = r#"{"matrix": [[1, 1, 1, 1], [0, 1, 2, 3]], "rhs": [4, 6],
        "cost": [3, 1, 1, 3], "lower": [0, 0, 0, 0], "upper": [1, 1, 1, 1]}"#;
    Model::from_str(text, ModelKind::Json, "cubic.json").unwrap()
}

/// The moves of a served set, as rows.
fn rows(served: &Served) -> Vec<Vec<i64>> {
    served.moves.rows().collect()
}

/// Stores the set `spec` asks for in `library`.
fn store(library: &SetLibrary, model: &Model, spec: BuildSpec) {
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let resolved = spec.resolve(model, &analysis).unwrap();
    let obtained = library
        .obtain(&model.matrix, &analysis, &resolved, &Control::new(), false)
        .unwrap();
    assert!(matches!(obtained, Obtained::Built { .. }), "{obtained:?}");
}

#[test]
fn the_complete_set_comes_before_a_box_and_a_box_before_a_norm() {
    let model = cubic();
    let dir = tempfile::tempdir().unwrap();
    let library = SetLibrary::open(Some(dir.path())).unwrap();
    let served = serve(&model, Some(&library), Engine::Auto, None);
    assert!(matches!(served, Err(Error::NotCached { .. })), "{served:?}");

    store(
        &library,
        &model,
        BuildSpec {
            norm_limit: NormLimit::AtMost(2),
            ..BuildSpec::default()
        },
    );
    let by_norm = serve(&model, Some(&library), Engine::Auto, None).unwrap();
    assert_eq!(by_norm.coverage, Coverage::NormTruncated { norm: 2 });
    assert!(matches!(by_norm.source, Source::Cached(_)));

    store(
        &library,
        &model,
        BuildSpec {
            bounds: BoxPolicy::FromBounds,
            ..BuildSpec::default()
        },
    );
    let boxed = serve(&model, Some(&library), Engine::Auto, None).unwrap();
    assert_eq!(boxed.coverage, Coverage::BoxValid);
    assert_eq!(boxed.box_limit, Some(vec![1, 1, 1, 1]));

    let built = serve(&model, Some(&library), Engine::Auto, Some(&Control::new())).unwrap();
    assert_eq!(
        built.coverage,
        Coverage::BoxValid,
        "a box that holds the model serves it"
    );
    let whole = {
        let fresh = tempfile::tempdir().unwrap();
        let library = SetLibrary::open(Some(fresh.path())).unwrap();
        let built = serve(&model, Some(&library), Engine::Auto, Some(&Control::new())).unwrap();
        assert_eq!(built.source, Source::Built);
        assert_eq!(built.coverage, Coverage::Complete);
        let again = serve(&model, Some(&library), Engine::Auto, None).unwrap();
        assert!(matches!(again.source, Source::Cached(_)));
        assert_eq!(rows(&again), rows(&built));
        built
    };
    store(&library, &model, BuildSpec::default());
    let complete = serve(&model, Some(&library), Engine::Auto, None).unwrap();
    assert_eq!(complete.coverage, Coverage::Complete);
    assert_eq!(rows(&complete), rows(&whole));
}

#[test]
fn a_stopped_build_and_a_wrong_engine_are_typed_errors() {
    let model = cubic();
    let dir = tempfile::tempdir().unwrap();
    let library = SetLibrary::open(Some(dir.path())).unwrap();
    let tight = Control::new().max_elements(1);
    match serve(&model, Some(&library), Engine::Auto, Some(&tight)) {
        Err(Error::BuildStopped { reason, .. }) => assert_eq!(reason, StopReason::ElementLimit),
        other => panic!("{other:?}"),
    }
    match serve(&model, None, Engine::Moves, Some(&tight)) {
        Err(Error::BuildStopped { reason, kept, .. }) => {
            assert_eq!(reason, StopReason::ElementLimit);
            assert_eq!(kept, None, "without a cache nothing is saved");
        }
        other => panic!("{other:?}"),
    }
    let refused = serve(&model, Some(&library), Engine::Cycles, None);
    assert!(matches!(refused, Err(Error::Unsupported(_))), "{refused:?}");
}

#[test]
fn a_network_is_served_by_its_cycles_without_a_cache() {
    // The 2 x 2 transportation matrix: supplies, then demands.
    let text = r#"{"matrix": [[1, 1, 0, 0], [0, 0, 1, 1], [1, 0, 1, 0], [0, 1, 0, 1]],
        "rhs": [3, 4, 5, 2], "cost": [1, 2, 3, 1], "lower": [0, 0, 0, 0]}"#;
    let model = Model::from_str(text, ModelKind::Json, "transport.json").unwrap();
    let served = serve(&model, None, Engine::Auto, None).unwrap();
    assert_eq!(served.source, Source::Network);
    assert!(served.network.is_some() && served.moves.is_empty());
    let moves = serve(&model, None, Engine::Moves, Some(&Control::new())).unwrap();
    assert_eq!(moves.source, Source::Built);
    // One 4-cycle of K_{2,2}: the formula sum_k C(2,k)^2 k!(k-1)!/2 gives 1 (OEIS A070968).
    assert_eq!(moves.moves.len(), 1);
}
