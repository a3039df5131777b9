//! Long studies that Ctrl-C (a notebook's "interrupt") can stop.
//!
//! The work runs on a scoped thread that never holds the GIL; the calling
//! thread waits for it with the GIL released and, every
//! [`POLL`], takes the GIL just long enough to let Python run its signal
//! handlers. A `KeyboardInterrupt` raises the study's stop flag (the same
//! flag Ctrl-C raises in the command line), the study stops at its next
//! case or evaluation, and the interrupt is raised in Python once the work
//! has returned.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{self, RecvTimeoutError};
use std::time::Duration;

use pyo3::exceptions::PyRuntimeError;
use pyo3::prelude::*;

/// How often the waiting thread looks at Python's signals.
pub const POLL: Duration = Duration::from_millis(100);

/// Runs `work` without the GIL, raising `stop` when Python is
/// interrupted. Returns the work's value and the interrupt, if one came.
pub fn run<T, F>(py: Python<'_>, stop: &AtomicBool, work: F) -> PyResult<(T, Option<PyErr>)>
where
    T: Send,
    F: FnOnce() -> T + Send,
{
    let (tx, mut rx) = mpsc::channel();
    let mut interrupt = None;
    std::thread::scope(|s| {
        s.spawn(move || {
            // The receiver lives until the scope ends: the send cannot fail.
            let _ = tx.send(work());
        });
        loop {
            // The receiver is not Sync: it moves into the GIL-free wait and back.
            let (back, got) = py.detach(move || {
                let got = rx.recv_timeout(POLL);
                (rx, got)
            });
            rx = back;
            match got {
                Ok(value) => return Ok((value, interrupt.take())),
                Err(RecvTimeoutError::Timeout) => {
                    if interrupt.is_none() {
                        if let Err(e) = py.check_signals() {
                            stop.store(true, Ordering::Relaxed);
                            interrupt = Some(e);
                        }
                    }
                }
                Err(RecvTimeoutError::Disconnected) => {
                    return Err(PyRuntimeError::new_err(
                        "error: the computation stopped without a result",
                    ))
                }
            }
        }
    })
}
