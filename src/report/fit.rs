//! The `chainwell.fit/1` document and its table.

use serde_json::{json, Value};

use super::envelope::{constants, program};
use crate::study::fit::{FitProgress, FitResult, FitSpec, FORMAT};

/// The `chainwell.fit/1` document.
pub fn fit_document(fit: &FitResult, units: &Value, input: &Value) -> Value {
    json!({
        "format": FORMAT,
        "program": program(),
        "constants": constants(),
        "units": units,
        "complete": true,
        "key": fit.key,
        "quantity": fit.quantity.name(),
        "parameters": fit.parameters.iter().map(|p| json!({
            "key": p.key, "value": p.value, "uncertainty": p.uncertainty, "start": p.start,
        })).collect::<Vec<_>>(),
        "correlation": fit.correlation,
        "rms": fit.rms,
        "chi2": fit.chi2,
        "dof": fit.dof,
        "reduced_chi2": if fit.dof > 0 { Some(fit.chi2 / fit.dof as f64) } else { None },
        "evaluations": fit.evaluations,
        "termination": fit.termination,
        "rows": fit.rows.iter().map(|r| {
            let mut row = json!({
                "value": r.value.to_json(), "observed": r.observed, "model": r.model,
                "residual": r.model - r.observed, "uncertainty": r.uncertainty,
            });
            if fit.keys.len() > 1 {
                row["values"] = Value::Array(r.values.iter().map(|v| v.to_json()).collect());
            }
            row
        }).collect::<Vec<_>>(),
        "keys": fit.keys,
        "warnings": fit.warnings,
        "curve": fit.curve.iter().map(|(x, y)| json!({"value": x, "model": y})).collect::<Vec<_>>(),
        "input": input,
    })
}

/// A readable report: parameters, correlations, rows.
pub fn fit_table(fit: &FitResult) -> String {
    let mut out = String::from("parameter                 value            uncertainty\n");
    for p in &fit.parameters {
        out.push_str(&format!(
            "{:<24}  {:<15.8}  {:.3e}\n",
            p.key, p.value, p.uncertainty
        ));
    }
    if fit.parameters.len() > 1 {
        out.push_str("\ncorrelation\n");
        for (p, row) in fit.parameters.iter().zip(&fit.correlation) {
            let cells: Vec<String> = row.iter().map(|c| format!("{c:>7.3}")).collect();
            out.push_str(&format!("{:<24}  {}\n", p.key, cells.join(" ")));
        }
    }
    let q = fit.quantity.name();
    out.push('\n');
    for k in &fit.keys {
        out.push_str(&format!("{k:>14}  "));
    }
    out.push_str(&format!(
        "{:>14}  {:>14}  {:>12}\n",
        format!("observed {q}"),
        "model",
        "residual"
    ));
    for r in &fit.rows {
        for v in &r.values {
            out.push_str(&format!("{:>14}  ", v.to_json().to_string()));
        }
        out.push_str(&format!(
            "{:>14.6}  {:>14.6}  {:>12.3e}\n",
            r.observed,
            r.model,
            r.model - r.observed
        ));
    }
    out.push_str(&format!(
        "\nrms {:.6e}  chi2 {:.6e}  dof {}  evaluations {}\n",
        fit.rms, fit.chi2, fit.dof, fit.evaluations
    ));
    crate::report::no_negative_zero(&out)
}

/// The `chainwell.fit/1` document of a fit that has not finished: its best
/// values so far, `"complete": false` and no rows; `--resume` starts from
/// it.
pub fn fit_progress_document(
    spec: &FitSpec,
    progress: &FitProgress,
    units: &Value,
    input: &Value,
) -> Value {
    json!({
        "format": FORMAT,
        "program": program(),
        "constants": constants(),
        "units": units,
        "complete": false,
        "key": spec.data.key,
        "quantity": spec.data.quantity.name(),
        "parameters": spec.free.iter().zip(&progress.best).map(|(f, v)| json!({"key": f.key, "value": v, "uncertainty": null, "start": f.start})).collect::<Vec<_>>(),
        "evaluations": progress.evaluations,
        "rows": [],
        "input": input,
    })
}
