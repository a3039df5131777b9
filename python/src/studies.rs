//! `sweep`, `fit` and `bands`: the studies, run as the command line runs
//! them, handing back the documents `--json` prints and the tidy CSV text
//! the `--csv` files hold (from the same builders, so neither can drift).

use std::path::PathBuf;
use std::sync::atomic::AtomicBool;

use chainwell::input::{Document, Override};
use chainwell::pipeline::Fault;
use chainwell::report;
use chainwell::study::bands::{self as bands_study, BandsSpec};
use chainwell::study::cases::{CaseError, CaseGrid, Vary};
use chainwell::study::data::Data;
use chainwell::study::fit::{self as fit_study, EvalError, FitError, FitSpec, Free};
use chainwell::study::runner::Runner;
use chainwell::study::sweep::{self as sweep_study, SweepSpec};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use serde_json::{json, Value};

use crate::errors::to_pyerr;
use crate::interrupt;
use crate::source::{overrides, Source};

fn text(doc: &Value) -> Result<String, Fault> {
    serde_json::to_string(doc).map_err(|e| Fault::Compute(e.to_string()))
}

/// A document, a CSV text and warnings, as a dict for Python.
fn hand_back<'py>(
    py: Python<'py>,
    json: String,
    csv: Option<String>,
    warnings: Vec<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let out = PyDict::new(py);
    out.set_item("json", json)?;
    out.set_item("csv", csv)?;
    out.set_item("warnings", warnings)?;
    Ok(out)
}

fn run_sweep(
    source: &Source,
    vary: &[String],
    sets: &[String],
    stop: &AtomicBool,
) -> Result<(String, String), Fault> {
    let overrides = overrides(sets)?;
    if vary.is_empty() {
        return Err(Fault::Usage(
            "sweep needs at least one key to vary: vary={\"chain.bonds\": [3, 5, 7]}".into(),
        ));
    }
    let usage = |e: CaseError| Fault::Usage(e.to_string());
    let varies = vary
        .iter()
        .map(|v| Vary::parse(v))
        .collect::<Result<Vec<_>, _>>()
        .map_err(usage)?;
    let grid = CaseGrid::new(varies).map_err(usage)?;
    let spec = SweepSpec {
        document: source.document()?,
        overrides,
        grid,
        shard: None,
    };
    let prepared = sweep_study::prepare(&spec).map_err(|e| sweep_study::locate_error(&spec, e))?;
    let result = sweep_study::run(&prepared, Vec::new(), &Runner::new().with_stop(stop))
        .map_err(|e| sweep_study::locate_error(&spec, e))?;
    let json = text(&report::sweep::sweep_document(&result))?;
    Ok((json, report::sweep::sweep_csv(&result)))
}

/// Runs a sweep: `vary` holds `KEY=V1,V2,...` or `KEY=START:STOP[:STEP]`
/// texts, as `--vary` takes them. Returns a dict of `json` (the sweep
/// document), `csv` (the tidy CSV) and `warnings` (empty: each row carries
/// its own).
#[pyfunction]
#[pyo3(signature = (text=None, path=None, name=None, vary=Vec::new(), set=Vec::new()))]
pub fn sweep<'py>(
    py: Python<'py>,
    text: Option<String>,
    path: Option<PathBuf>,
    name: Option<String>,
    vary: Vec<String>,
    set: Vec<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let source = Source::new(text, path, name)?;
    let stop = AtomicBool::new(false);
    let (result, interrupted) =
        interrupt::run(py, &stop, || run_sweep(&source, &vary, &set, &stop))?;
    if let Some(e) = interrupted {
        return Err(e);
    }
    let (json, csv) = result.map_err(|f| to_pyerr(py, f))?;
    hand_back(py, json, Some(csv), Vec::new())
}

/// A `bounds` entry: key, lower and upper bound.
type Bound3 = (String, Option<f64>, Option<f64>);

/// The free keys with their start values (from the input and `set`) and
/// bounds, checked as `chainwell fit` checks `--free` and `--bounds`.
fn frees(
    document: &Document,
    overrides: &[Override],
    keys: &[String],
    bounds: &[Bound3],
) -> Result<Vec<Free>, Fault> {
    if keys.is_empty() {
        return Err(Fault::Usage(
            "fit needs free=[KEY, ...]: the input keys to adjust".into(),
        ));
    }
    for (k, lo, hi) in bounds {
        if !keys.contains(k) {
            return Err(Fault::Usage(format!(
                "bounds {k}: {k} is not among the free keys"
            )));
        }
        if let (Some(a), Some(b)) = (lo, hi) {
            if a >= b {
                return Err(Fault::Usage(format!(
                    "bounds {k}: the lower bound {a} must be below the upper {b}"
                )));
            }
        }
        if lo.is_some_and(|x| !x.is_finite()) || hi.is_some_and(|x| !x.is_finite()) {
            return Err(Fault::Usage(format!(
                "bounds {k}: bounds must be finite numbers (None for no bound)"
            )));
        }
    }
    let mut out = Vec::new();
    for (i, key) in keys.iter().enumerate() {
        if keys[..i].contains(key) {
            return Err(Fault::Usage(format!("free {key}: the key is named twice")));
        }
        let (start, integer) = fit_study::start_value(document, overrides, key)
            .map_err(Fault::Input)?
            .ok_or_else(|| {
                Fault::Usage(format!(
                    "free {key}: the input gives no number for {key}; give a start value with set={{\"{key}\": VALUE}}"
                ))
            })?;
        if integer {
            return Err(Fault::Usage(format!(
                "free {key}: {key} takes whole numbers and cannot be fitted; vary it with chainwell.sweep instead"
            )));
        }
        let (lower, upper) = bounds
            .iter()
            .find(|(k, _, _)| k == key)
            .map_or((None, None), |(_, a, b)| (*a, *b));
        if lower.is_some_and(|l| start < l) || upper.is_some_and(|u| start > u) {
            return Err(Fault::Usage(format!(
                "free {key}: the start value {start} lies outside its bounds; change it with set={{\"{key}\": VALUE}}"
            )));
        }
        out.push(Free {
            key: key.clone(),
            start,
            lower,
            upper,
        });
    }
    Ok(out)
}

/// A failed evaluation as the user meets it.
fn eval_fault(e: EvalError) -> Fault {
    match e {
        EvalError::Input(i) => Fault::Input(i),
        other => Fault::Compute(other.to_string()),
    }
}

/// A failed fit as `chainwell fit` reports it.
fn fit_fault(e: FitError) -> Fault {
    match e {
        FitError::Start(e) => match eval_fault(*e) {
            Fault::Compute(m) => Fault::Compute(format!("at the start values: {m}")),
            other => other,
        },
        FitError::Eval { at, source } => match eval_fault(*source) {
            Fault::Input(mut i) => {
                i.message = format!("at {at}: {}", i.message);
                Fault::Input(i)
            }
            Fault::Compute(m) => Fault::Compute(format!("at {at}: {m}")),
            other => other,
        },
        e @ FitError::TooFewRows { .. } => Fault::Usage(e.to_string()),
        e => Fault::Compute(e.to_string()),
    }
}

/// Where a fit's data come from.
enum DataSource {
    Path(PathBuf),
    Text { name: String, text: String },
}

fn run_fit(
    source: &Source,
    data: &DataSource,
    free: &[String],
    bounds: &[Bound3],
    sets: &[String],
    stop: &AtomicBool,
) -> Result<String, Fault> {
    let overrides = overrides(sets)?;
    let document = source.document()?;
    let (base, text_source) = document.model(&overrides).map_err(Fault::Input)?;
    let units = base.units.to_json();
    let free = frees(&document, &overrides, free, bounds)?;
    let data = match data {
        DataSource::Path(p) => Data::read(p),
        DataSource::Text { name, text } => Data::parse(name, text),
    }
    .map_err(|e| Fault::Usage(e.to_string().trim_start_matches("error: ").to_string()))?;
    if free.iter().any(|f| f.key == data.key) {
        return Err(Fault::Usage(format!(
            "free {0}: {0} is the data's varied key",
            data.key
        )));
    }
    let input = json!({
        "file": text_source.name, "text": text_source.text, "overrides": text_source.overrides,
        "data": data.file, "free": free.iter().map(|f| json!({"key": f.key, "start": f.start, "lower": f.lower, "upper": f.upper})).collect::<Vec<_>>(),
    });
    let spec = FitSpec {
        document,
        overrides,
        data,
        free,
    };
    let r = fit_study::fit(&spec, &Runner::new().with_stop(stop)).map_err(fit_fault)?;
    text(&report::fit::fit_document(&r, &units, &input))
}

/// Fits the `free` keys to a measured series: `data_path` (a CSV file) or
/// `data_text` (its text, named `data_name` in messages), with optional
/// `bounds` `(key, lower, upper)`. Returns a dict of `json` (the fit
/// document), `csv` (None) and `warnings` (empty).
#[pyfunction]
#[pyo3(signature = (text=None, path=None, name=None, data_path=None, data_text=None, data_name=None, free=Vec::new(), bounds=Vec::new(), set=Vec::new()))]
#[allow(clippy::too_many_arguments)]
pub fn fit<'py>(
    py: Python<'py>,
    text: Option<String>,
    path: Option<PathBuf>,
    name: Option<String>,
    data_path: Option<PathBuf>,
    data_text: Option<String>,
    data_name: Option<String>,
    free: Vec<String>,
    bounds: Vec<Bound3>,
    set: Vec<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let source = Source::new(text, path, name)?;
    let data = match (data_path, data_text) {
        (Some(p), None) => DataSource::Path(p),
        (None, Some(text)) => DataSource::Text {
            name: data_name.unwrap_or_else(|| "<data>".into()),
            text,
        },
        _ => {
            return Err(pyo3::exceptions::PyTypeError::new_err(
                "give exactly one of data_path= and data_text=",
            ))
        }
    };
    let stop = AtomicBool::new(false);
    let (result, interrupted) = interrupt::run(py, &stop, || {
        run_fit(&source, &data, &free, &bounds, &set, &stop)
    })?;
    if let Some(e) = interrupted {
        return Err(e);
    }
    let json = result.map_err(|f| to_pyerr(py, f))?;
    hand_back(py, json, None, Vec::new())
}

fn run_bands(
    source: &Source,
    kpoints: usize,
    finite: Option<&str>,
    sets: &[String],
) -> Result<(String, String, Vec<String>), Fault> {
    let overrides = overrides(sets)?;
    bands_study::check_kpoints(kpoints)?;
    let finite = finite
        .map(bands_study::parse_bond_counts)
        .transpose()
        .map_err(|m| Fault::Usage(format!("finite {m}")))?;
    let spec = BandsSpec { kpoints, finite };
    let document = source.document()?;
    let (model, text_source, result) = bands_study::compute(&document, &overrides, &spec)?;
    let json = text(&report::bands::bands_document(
        &model,
        &text_source,
        &result,
        true,
    ))?;
    let csv = report::bands::bands_csv(&model, &result);
    Ok((json, csv, result.warnings))
}

/// The bands of the infinite chain: `kpoints` wavevectors from 0 to
/// pi/period; `finite` the bond counts of finite chains to lay beside
/// (`START:STOP[:STEP]` or `N1,N2,...`). Returns a dict of `json` (the
/// bands document), `csv` (one row per wavevector and band) and
/// `warnings`.
#[pyfunction]
#[pyo3(signature = (text=None, path=None, name=None, kpoints=bands_study::DEFAULT_KPOINTS, finite=None, set=Vec::new()))]
pub fn bands<'py>(
    py: Python<'py>,
    text: Option<String>,
    path: Option<PathBuf>,
    name: Option<String>,
    kpoints: usize,
    finite: Option<String>,
    set: Vec<String>,
) -> PyResult<Bound<'py, PyDict>> {
    let source = Source::new(text, path, name)?;
    let (json, csv, warnings) = py
        .detach(|| run_bands(&source, kpoints, finite.as_deref(), &set))
        .map_err(|f| to_pyerr(py, f))?;
    hand_back(py, json, Some(csv), warnings)
}
