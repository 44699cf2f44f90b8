//! Resuming project-and-lift from any stage's checkpoint gives the identical set.

mod completion_support;

use std::sync::Mutex;

use completion_support::*;
use kernstep::completion::{complete_kernel, Checkpoint, Completion, Control, Request};
use kernstep::IntMatrix;

fn checkpoints_and_result(a: &IntMatrix, request: &Request) -> (Vec<Checkpoint>, Completion) {
    let saved = Mutex::new(Vec::new());
    let save = |c: &Checkpoint| saved.lock().unwrap().push(c.clone());
    let control = Control::new().on_stage_done(&save);
    let result = complete_kernel(a, request, &control, None).unwrap();
    (saved.into_inner().unwrap(), result)
}

#[test]
fn every_checkpoint_resumes_to_the_same_set() {
    let cases = [
        (transport(3, 4), Request::graver(12)),
        (three_way_margins(3, 3, 3), Request::graver(27)),
        (equal_line_sums(3, true), Request::hilbert(9)),
    ];
    for (a, request) in cases {
        let (checkpoints, full) = checkpoints_and_result(&a, &request);
        // One checkpoint per stage except the last: start projection plus n - d - 1 lifts.
        let d = a.cols() - kernstep::lattice::rank(&a);
        assert_eq!(checkpoints.len(), a.cols() - d);
        for c in &checkpoints {
            let resumed = complete_kernel(&a, &request, &Control::new(), Some(c)).unwrap();
            assert_eq!(resumed, full, "resumed after {} components", c.lifted.len());
        }
    }
}

#[test]
fn a_foreign_checkpoint_is_refused() {
    let a = transport(3, 3);
    let (mut checkpoints, _) = checkpoints_and_result(&a, &Request::graver(9));
    let mut c = checkpoints.pop().unwrap();
    c.elements[0][0] += 1;
    let err = complete_kernel(&a, &Request::graver(9), &Control::new(), Some(&c)).unwrap_err();
    assert!(err.to_string().contains("not in the kernel"), "{err}");
    c.elements[0][0] -= 1;
    c.lifted.truncate(1);
    let err = complete_kernel(&a, &Request::graver(9), &Control::new(), Some(&c)).unwrap_err();
    assert!(err.to_string().contains("not injective"), "{err}");
}
