//! Where an input comes from: a file (read like the command line reads it,
//! table files relative to its folder) or TOML text (a string, or a Python
//! dict written out as TOML by [`to_toml`]; table files relative to the
//! working folder). Both become one [`Document`], checked by the library's
//! own input stage, so a fault is located exactly as for a file.

use std::path::{Path, PathBuf};

use chainwell::input::{Document, Override};
use chainwell::pipeline::Fault;
use pyo3::exceptions::{PyTypeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyDict, PyFloat, PyInt, PyList, PyString, PyTuple};

/// An input as the Python caller gave it.
#[derive(Debug, Clone)]
pub enum Source {
    /// An input file.
    Path(PathBuf),
    /// TOML text, named `name` in messages.
    Text {
        /// The name messages give.
        name: String,
        /// The TOML text.
        text: String,
    },
}

impl Source {
    /// The source from the arguments of a compiled function: exactly one of
    /// `text` and `path`.
    pub fn new(
        text: Option<String>,
        path: Option<PathBuf>,
        name: Option<String>,
    ) -> PyResult<Self> {
        match (text, path) {
            (Some(text), None) => Ok(Source::Text {
                name: name.unwrap_or_else(|| "<string>".to_string()),
                text,
            }),
            (None, Some(path)) => Ok(Source::Path(path)),
            _ => Err(PyTypeError::new_err("give exactly one of text= and path=")),
        }
    }

    /// Reads and parses the input once.
    pub fn document(&self) -> Result<Document, Fault> {
        match self {
            Source::Path(p) => Document::open(p).map_err(Fault::Input),
            Source::Text { name, text } => {
                Document::from_text(name, text.clone(), Path::new(".")).map_err(Fault::Input)
            }
        }
    }
}

/// `KEY=VALUE` overrides, checked as `--set` flags are (the same message).
pub fn overrides(sets: &[String]) -> Result<Vec<Override>, Fault> {
    sets.iter()
        .map(|s| Override::parse(s).map_err(|m| Fault::Usage(format!("--set {s}: {m}"))))
        .collect()
}

/// A Python value as a TOML value; `at` is its dotted key, for messages.
fn value(obj: &Bound<'_, PyAny>, at: &str) -> PyResult<toml::Value> {
    if obj.is_instance_of::<PyBool>() {
        return Ok(toml::Value::Boolean(obj.extract()?));
    }
    if obj.is_instance_of::<PyInt>() {
        return obj.extract::<i64>().map(toml::Value::Integer).map_err(|_| {
            PyValueError::new_err(format!("{at}: the integer {obj} does not fit in 64 bits"))
        });
    }
    if obj.is_instance_of::<PyFloat>() {
        return Ok(toml::Value::Float(obj.extract()?));
    }
    if obj.is_instance_of::<PyString>() {
        return Ok(toml::Value::String(obj.extract()?));
    }
    if let Ok(d) = obj.cast::<PyDict>() {
        return table(d, at).map(toml::Value::Table);
    }
    if obj.is_instance_of::<PyList>() || obj.is_instance_of::<PyTuple>() {
        let mut items = Vec::new();
        for (i, item) in obj.try_iter()?.enumerate() {
            // Arrays are counted from 1, as `--set term.2.height` counts them.
            items.push(value(&item?, &format!("{at}.{}", i + 1))?);
        }
        return Ok(toml::Value::Array(items));
    }
    // numpy scalars and other numbers: integers first, so that
    // numpy.int64(7) stays a whole number.
    if obj.hasattr("__index__")? {
        if let Ok(i) = obj.extract::<i64>() {
            return Ok(toml::Value::Integer(i));
        }
    }
    if obj.hasattr("__float__")? {
        if let Ok(x) = obj.extract::<f64>() {
            return Ok(toml::Value::Float(x));
        }
    }
    let type_name = obj.get_type().name()?;
    Err(PyTypeError::new_err(format!(
        "{at}: a value of type {type_name} has no TOML form (use bool, int, float, str, list or dict)"
    )))
}

/// A Python dict as a TOML table.
fn table(d: &Bound<'_, PyDict>, at: &str) -> PyResult<toml::Table> {
    let mut t = toml::Table::new();
    for (k, v) in d.iter() {
        let key: String = k.extract().map_err(|_| {
            PyTypeError::new_err(format!(
                "{}: keys must be strings, not {k}",
                if at.is_empty() { "the input" } else { at }
            ))
        })?;
        let path = if at.is_empty() {
            key.clone()
        } else {
            format!("{at}.{key}")
        };
        if v.is_none() {
            // TOML has no null: a key given as None is left out, so its
            // default applies.
            continue;
        }
        t.insert(key, value(&v, &path)?);
    }
    Ok(t)
}

/// A dict as a TOML document (`inline=False`), or any value as the TOML
/// text of one value (`inline=True`, for `KEY=VALUE` overrides).
#[pyfunction]
#[pyo3(signature = (obj, inline=false))]
pub fn to_toml(obj: &Bound<'_, PyAny>, inline: bool) -> PyResult<String> {
    if inline {
        return Ok(value(obj, "the value")?.to_string());
    }
    let d = obj
        .cast::<PyDict>()
        .map_err(|_| PyTypeError::new_err("an input given as a mapping must be a dict"))?;
    let t = table(d, "")?;
    toml::to_string(&t)
        .map_err(|e| PyValueError::new_err(format!("cannot write the dict as TOML: {e}")))
}
