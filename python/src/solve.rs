//! `solve`: one input's levels, as `chainwell solve --json` gives them, and
//! the grid, the potential and the wavefunctions as numpy arrays.

use std::path::PathBuf;

use chainwell::input::Model;
use chainwell::pipeline::{self, Fault, Solution, SolveOptions};
use chainwell::report;
use numpy::ndarray::Array2;
use numpy::{IntoPyArray, PyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;

use crate::errors::to_pyerr;
use crate::source::{overrides, Source};

/// What a solve hands back to Python, computed without the GIL.
struct Solved {
    /// The `chainwell.solve/1` document, as `solve --json` prints it
    /// (timing included).
    json: String,
    /// Grid points (the unknowns), input length unit.
    x: Vec<f64>,
    /// The potential at `x`, input energy unit.
    potential: Vec<f64>,
    /// Level numbers.
    n: Vec<i64>,
    /// Energies, input energy unit.
    energies: Vec<f64>,
    /// Electrons in each computed level, when electrons are filled.
    occupations: Option<Vec<f64>>,
    /// Wavefunctions, row-major (points × levels), in 1/sqrt(length unit).
    psi: Array2<f64>,
    /// Grid spacing, input length unit.
    spacing: f64,
}

fn arrays(model: &Model, sol: &Solution, json: String) -> Solved {
    let u = &model.units;
    // psi in 1/sqrt(length unit), as the wavefunctions CSV writes it: the
    // grid integral sum(psi^2) * spacing is 1 in any unit.
    let scale = u.length.in_angstrom().sqrt();
    let (rows, cols) = (sol.x.len(), sol.psi.len());
    let psi = Array2::from_shape_fn((rows, cols), |(i, j)| sol.psi[j][i] * scale);
    Solved {
        json,
        x: sol.x.iter().map(|x| u.length_out(*x)).collect(),
        potential: sol.potential.iter().map(|v| u.energy_out(*v)).collect(),
        n: sol.levels.iter().map(|l| l.n as i64).collect(),
        energies: sol.levels.iter().map(|l| u.energy_out(l.energy)).collect(),
        occupations: sol.occupancy.as_ref().map(|o| o.occupations.clone()),
        psi,
        spacing: u.length_out(sol.grid.spacing),
    }
}

/// The steps of `chainwell solve --json`, without the GIL.
fn run(source: &Source, sets: &[String], estimate: bool) -> Result<Solved, Fault> {
    let overrides = overrides(sets)?;
    let document = source.document()?;
    let (model, text) = document.model(&overrides).map_err(Fault::Input)?;
    let opts = SolveOptions {
        estimate,
        ..Default::default()
    };
    let sol = pipeline::solve_with(&model, &opts).map_err(|e| e.locate(&model, &text))?;
    let doc = report::solve::solve_document(&model, &text, &sol, true);
    let json = serde_json::to_string(&doc).map_err(|e| Fault::Compute(e.to_string()))?;
    Ok(arrays(&model, &sol, json))
}

/// Solves one input: `text` (TOML) or `path`, with `set` overrides
/// (`KEY=VALUE` strings). Returns a dict of `json` (the solve document's
/// text), `x`, `potential`, `n`, `energies`, `occupations` (or None),
/// `wavefunctions` (points × levels) and `spacing`.
#[pyfunction]
#[pyo3(signature = (text=None, path=None, name=None, set=Vec::new(), estimate=true))]
pub fn solve<'py>(
    py: Python<'py>,
    text: Option<String>,
    path: Option<PathBuf>,
    name: Option<String>,
    set: Vec<String>,
    estimate: bool,
) -> PyResult<Bound<'py, PyDict>> {
    let source = Source::new(text, path, name)?;
    let solved = py
        .detach(|| run(&source, &set, estimate))
        .map_err(|f| to_pyerr(py, f))?;
    let out = PyDict::new(py);
    out.set_item("json", solved.json)?;
    out.set_item("x", PyArray1::from_vec(py, solved.x))?;
    out.set_item("potential", PyArray1::from_vec(py, solved.potential))?;
    out.set_item("n", PyArray1::from_vec(py, solved.n))?;
    out.set_item("energies", PyArray1::from_vec(py, solved.energies))?;
    out.set_item(
        "occupations",
        solved.occupations.map(|o| PyArray1::from_vec(py, o)),
    )?;
    out.set_item("wavefunctions", solved.psi.into_pyarray(py))?;
    out.set_item("spacing", solved.spacing)?;
    Ok(out)
}
