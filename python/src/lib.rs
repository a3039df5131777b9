//! `chainwell._chainwell`: the compiled half of the `chainwell` Python
//! package. It wraps the library, not the command line: each function checks
//! its arguments as the matching command checks its flags, runs the same
//! library calls with the GIL released, and hands back the same documents
//! the command prints with `--json` (as JSON text, so that Python's
//! `json.loads` gives exactly what a script reading the command's output
//! gets), plus numpy arrays where they are useful. The pure-Python half
//! (`chainwell/__init__.py`) builds the user's objects from these.
//!
//! Sweeps and fits stop at Ctrl-C (a notebook's interrupt) and raise
//! `KeyboardInterrupt`; see [`interrupt`].
//!
//! Errors: a fault in the input or in an argument raises `InputError` (a
//! `ValueError`) whose text is the message the command line prints on
//! stderr; a computation that cannot finish raises `RuntimeError`.

mod errors;
mod interrupt;
mod solve;
mod source;
mod studies;

use pyo3::prelude::*;

/// The compiled module.
#[pymodule]
fn _chainwell(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add("InputError", m.py().get_type::<errors::InputError>())?;
    m.add("__version__", env!("CARGO_PKG_VERSION"))?;
    m.add_function(wrap_pyfunction!(source::to_toml, m)?)?;
    m.add_function(wrap_pyfunction!(solve::solve, m)?)?;
    m.add_function(wrap_pyfunction!(studies::sweep, m)?)?;
    m.add_function(wrap_pyfunction!(studies::fit, m)?)?;
    m.add_function(wrap_pyfunction!(studies::bands, m)?)?;
    Ok(())
}
