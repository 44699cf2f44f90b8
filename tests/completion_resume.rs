//! Resuming project-and-lift from any saved state (between stages, inside a stage, or where a
//! stop left it) gives the identical set: a cross-check of the resumed path against the
//! uninterrupted one, which `completion_oracle.rs` checks against brute force and Pottier.

mod completion_support;

use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::Mutex;
use std::time::Duration;

use completion_support::*;
use kernstep::completion::{
    complete_kernel, Checkpoint, Completion, Control, PackedRows, Progress, Request, StagePoint,
    StateView, StopReason, Truncation,
};
use kernstep::IntMatrix;

/// Every state saved by a run of `request` (saving whenever `every` has passed) and the run's
/// result.
fn states_and_result(
    a: &IntMatrix,
    request: &Request,
    every: Duration,
) -> (Vec<Checkpoint>, Completion) {
    let saved = Mutex::new(Vec::new());
    let save = |c: &StateView<'_>| saved.lock().unwrap().push(owned(c));
    let control = Control::new().on_save(&save, every);
    let result = complete_kernel(a, request, &control, None).unwrap();
    (saved.into_inner().unwrap(), result)
}

/// The owned state a hook's view stands for, checked to encode (bincode, as a cache build
/// stores it) byte for byte as the view.
fn owned(view: &StateView<'_>) -> Checkpoint {
    let state = view.to_checkpoint();
    let config = bincode::config::standard();
    let view_bytes = bincode::serde::encode_to_vec(view, config).unwrap();
    assert_eq!(
        view_bytes,
        bincode::serde::encode_to_vec(&state, config).unwrap()
    );
    state
}

fn resumed(a: &IntMatrix, request: &Request, state: &Checkpoint) -> Completion {
    complete_kernel(a, request, &Control::new(), Some(state)).unwrap()
}

#[test]
fn every_stage_checkpoint_resumes_to_the_same_set() {
    let cases = [
        (transport(3, 4), Request::graver(12)),
        (three_way_margins(3, 3, 3), Request::graver(27)),
        (equal_line_sums(3, true), Request::hilbert(9)),
    ];
    for (a, request) in cases {
        let (checkpoints, full) = states_and_result(&a, &request, Duration::MAX);
        // One checkpoint per stage except the last: start projection plus n - d - 1 lifts.
        let d = a.cols() - kernstep::lattice::rank(&a);
        assert_eq!(checkpoints.len(), a.cols() - d);
        for c in &checkpoints {
            assert!(c.within.is_none());
            assert_eq!(resumed(&a, &request, c), full, "after {:?}", c.lifted);
        }
    }
}

#[test]
fn every_mid_stage_state_resumes_to_the_same_set() {
    let truncated = Request {
        truncation: Truncation {
            norm_limit: Some(12),
            bounds: None,
        },
        check_cuts: true,
        ..Request::graver(27)
    };
    for request in [Request::graver(27), truncated] {
        let a = three_way_margins(3, 3, 3);
        let (states, full) = states_and_result(&a, &request, Duration::ZERO);
        let kinds = |catch_up: bool| {
            states
                .iter()
                .filter_map(|s| s.within.as_ref())
                .filter(|s| matches!(s.point, StagePoint::CatchUp { .. }) == catch_up)
                .count()
        };
        // Saves at every level end (pairs from the next level) and before catch-up rounds.
        assert!(kinds(false) > 10 && kinds(true) > 10, "{states:?}");
        let step = states.len() / 40 + 1;
        for state in states.iter().step_by(step) {
            assert_eq!(resumed(&a, &request, state), full, "{:?}", state.within);
        }
    }
}

#[test]
fn a_stop_anywhere_saves_a_state_that_resumes_to_the_same_set() {
    let a = three_way_margins(3, 3, 3);
    let request = Request::graver(27);
    let full = complete_kernel(&a, &request, &Control::new(), None).unwrap();
    // Stop after the k-th progress report, for k across the whole run.
    let reports = AtomicUsize::new(0);
    let count = |_: &Progress| {
        reports.fetch_add(1, Ordering::Relaxed);
    };
    complete_kernel(&a, &request, &Control::new().progress(&count), None).unwrap();
    let total = reports.load(Ordering::Relaxed);
    assert!(total > 20, "{total} reports");
    for k in (1..total).step_by(total / 15) {
        let (cancel, seen) = (AtomicBool::new(false), AtomicUsize::new(0));
        let report = |_: &Progress| {
            if seen.fetch_add(1, Ordering::Relaxed) + 1 >= k {
                cancel.store(true, Ordering::Relaxed);
            }
        };
        let last = Mutex::new(None);
        let save = |c: &StateView<'_>| *last.lock().unwrap() = Some(owned(c));
        let control = Control::new()
            .cancel_flag(&cancel)
            .progress(&report)
            .on_save(&save, Duration::MAX);
        let stopped = complete_kernel(&a, &request, &control, None).unwrap();
        assert_eq!(
            stopped,
            Completion::Stopped(StopReason::Cancelled),
            "k = {k}"
        );
        let state = last.into_inner().unwrap().expect("a stop saves its state");
        assert!(
            state.within.is_some(),
            "a stop inside a stage saves that stage"
        );
        assert_eq!(resumed(&a, &request, &state), full, "stopped at report {k}");
    }
}

#[test]
fn a_foreign_checkpoint_is_refused() {
    let a = transport(3, 3);
    let (mut checkpoints, _) = states_and_result(&a, &Request::graver(9), Duration::MAX);
    let mut c = checkpoints.pop().unwrap();
    let rows = c.elements.to_rows();
    let mut forged = rows.clone();
    forged[0][0] += 1;
    c.elements = PackedRows::from_rows(&forged).unwrap();
    let err = complete_kernel(&a, &Request::graver(9), &Control::new(), Some(&c)).unwrap_err();
    assert!(err.to_string().contains("not in the kernel"), "{err}");
    c.elements = PackedRows::from_rows(&rows).unwrap();
    c.lifted.truncate(1);
    let err = complete_kernel(&a, &Request::graver(9), &Control::new(), Some(&c)).unwrap_err();
    assert!(err.to_string().contains("not injective"), "{err}");
}
