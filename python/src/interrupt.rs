//! Long work without the GIL that Ctrl-C still stops.
//!
//! Python runs signal handlers only on its main thread and only between bytecodes, so a call
//! that releases the GIL for minutes would leave Ctrl-C unheard. [`interruptible`] runs the
//! work on a second thread and keeps the calling thread checking the handlers
//! (`Python::check_signals`); when one raises (`KeyboardInterrupt`), the work's cancellation
//! flag is set (the completion and the solvers consult it between batches of work), the work
//! stops cleanly and the exception is raised.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc;
use std::time::Duration;

use pyo3::prelude::*;

/// How often the calling thread checks the signal handlers.
const POLL: Duration = Duration::from_millis(50);

/// Runs `work` with the GIL released, checking Python's signal handlers every [`POLL`] and
/// calling `tick` (with the GIL held) at each check. An exception from a handler or from
/// `tick` sets `cancel`, waits for `work` to return, and is returned instead of its value.
pub fn interruptible<T: Send>(
    py: Python<'_>,
    cancel: &AtomicBool,
    work: impl FnOnce() -> T + Send,
    mut tick: impl FnMut(Python<'_>) -> PyResult<()> + Send,
) -> PyResult<T> {
    let (value, raised) = py.detach(|| {
        let (done, finished) = mpsc::channel::<()>();
        std::thread::scope(|scope| {
            let worker = scope.spawn(move || {
                let value = work();
                // The receiver waits until the work is done, so the send cannot fail.
                let _ = done.send(());
                value
            });
            let mut raised = None;
            while let Err(mpsc::RecvTimeoutError::Timeout) = finished.recv_timeout(POLL) {
                if raised.is_some() {
                    continue;
                }
                let checked = Python::attach(|py| py.check_signals().and_then(|()| tick(py)));
                if let Err(error) = checked {
                    cancel.store(true, Ordering::Relaxed);
                    raised = Some(error);
                }
            }
            match worker.join() {
                Ok(value) => (value, raised),
                Err(panic) => std::panic::resume_unwind(panic),
            }
        })
    });
    match raised {
        Some(error) => Err(error),
        None => Ok(value),
    }
}
