//! Faults as Python exceptions: a fault in the input or in an argument is
//! an [`InputError`] (a `ValueError`) whose text is exactly what the command
//! line prints on stderr (`error: FILE:LINE:COL: `KEY`: ...` and the quoted
//! line); a computation that could not finish is a `RuntimeError`.

use chainwell::input::InputError as Located;
use chainwell::pipeline::Fault;
use pyo3::exceptions::{PyRuntimeError, PyValueError};
use pyo3::prelude::*;

pyo3::create_exception!(
    _chainwell,
    InputError,
    PyValueError,
    "A fault in the input or in an argument. `str(e)` is the message the command line prints; `key`, `file`, `line` and `column` say where (`line` and `column` are 0 when not tied to a line; `key` is None for argument faults)."
);

/// The Python exception of a fault.
pub fn to_pyerr(py: Python<'_>, fault: Fault) -> PyErr {
    match fault {
        Fault::Input(i) => located(py, &i),
        Fault::Usage(m) => usage(py, &m),
        Fault::Compute(m) => PyRuntimeError::new_err(format!("error: {m}")),
    }
}

/// An [`InputError`] for a located fault, with its key and place as
/// attributes.
pub fn located(py: Python<'_>, e: &Located) -> PyErr {
    let err = InputError::new_err(e.render());
    let value = err.value(py);
    let key = (!e.key.is_empty()).then(|| e.key.clone());
    // An attribute that cannot be set leaves the message, which says it all.
    let _ = value.setattr("key", key);
    let _ = value.setattr("file", e.location.file.clone());
    let _ = value.setattr("line", e.location.line);
    let _ = value.setattr("column", e.location.column);
    err
}

/// An [`InputError`] for a fault in an argument (not located in a file).
pub fn usage(py: Python<'_>, message: &str) -> PyErr {
    let err = InputError::new_err(format!("error: {message}"));
    let value = err.value(py);
    let _ = value.setattr("key", py.None());
    let _ = value.setattr("file", py.None());
    let _ = value.setattr("line", 0);
    let _ = value.setattr("column", 0);
    err
}
