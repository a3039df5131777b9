//! The sweep document (`chainwell.sweep/1`), its table and its tidy CSV.
//!
//! The CSV of a sweep is in tidy long form, one line per case and level,
//! so that `pandas.read_csv` gives a frame ready for grouping and plotting:
//! `case`, one column per varied key, `n`, `energy`, `occupied` (electrons
//! in the level), then the case's `homo`, `lumo`, `gap` and `wavelength_nm`
//! (empty when the input fills no electrons); with `[response]`, the case's
//! `alpha_angstrom3`, `beta_au` and `gamma_au` follow.

use std::fmt::Write;

use serde_json::{json, Map, Value};

use super::envelope::program;
use crate::study::sweep::{SweepHeader, SweepResult, SweepRow, FORMAT};

fn opt<T: std::fmt::Display>(v: Option<T>) -> String {
    v.map(|x| x.to_string()).unwrap_or_default()
}

/// The sweep as tidy CSV text (see the module docs).
pub fn sweep_csv(result: &SweepResult) -> String {
    let mut out = String::from("case");
    for k in &result.header.keys {
        out.push(',');
        out.push_str(k);
    }
    out.push_str(",n,energy,occupied,homo,lumo,gap,wavelength_nm");
    let with_response = result.rows.iter().any(|r| r.response.is_some());
    if with_response {
        out.push_str(",alpha_angstrom3,beta_au,gamma_au");
    }
    out.push('\n');
    for row in &result.rows {
        for (n, e) in row.energies() {
            let _ = write!(out, "{}", row.case);
            for v in &row.values {
                let _ = write!(out, ",{}", v.to_json());
            }
            let _ = write!(
                out,
                ",{n},{e},{},{},{},{},{}",
                opt(row.electrons_in(n)),
                opt(row.homo()),
                opt(row.lumo()),
                opt(row.gap()),
                opt(row.wavelength_nm()),
            );
            if with_response {
                let r = row.response.as_ref();
                let _ = write!(
                    out,
                    ",{},{},{}",
                    opt(r.map(|r| r.alpha)),
                    opt(r.and_then(|r| r.beta)),
                    opt(r.and_then(|r| r.gamma)),
                );
            }
            out.push('\n');
        }
    }
    out
}

/// The sweep as a readable table: the varied values, then the frontier
/// levels, gap and wavelength (or the lowest levels when no electrons are
/// filled).
pub fn sweep_table(result: &SweepResult) -> String {
    let energy = result.header.units["energy"].as_str().unwrap_or("eV");
    let with_occ = result.rows.iter().any(|r| r.occupancy.is_some());
    let with_response = result.rows.iter().any(|r| r.response.is_some());
    let mut head: Vec<String> = result.header.keys.clone();
    if with_occ {
        head.extend([
            "HOMO".to_string(),
            format!("E_HOMO/{energy}"),
            format!("E_LUMO/{energy}"),
            format!("gap/{energy}"),
            "wavelength/nm".to_string(),
        ]);
    } else {
        head.extend((1..=4).map(|n| format!("E{n}/{energy}")));
    }
    if with_response {
        head.extend(["alpha/A^3", "gamma/a.u."].map(String::from));
    }
    let mut lines: Vec<Vec<String>> = vec![head];
    for row in &result.rows {
        let mut cells: Vec<String> = row.values.iter().map(|v| v.to_json().to_string()).collect();
        let es = row.energies();
        let at = |n: Option<usize>| {
            n.and_then(|n| es.iter().find(|(m, _)| *m == n))
                .map(|(_, e)| format!("{e:.6}"))
                .unwrap_or_default()
        };
        if with_occ {
            cells.push(opt(row.homo()));
            cells.push(at(row.homo()));
            cells.push(at(row.lumo()));
            cells.push(row.gap().map(|g| format!("{g:.6}")).unwrap_or_default());
            cells.push(
                row.wavelength_nm()
                    .map(|w| format!("{w:.2}"))
                    .unwrap_or_default(),
            );
        } else {
            cells.extend(es.iter().take(4).map(|(_, e)| format!("{e:.6}")));
        }
        if with_response {
            let r = row.response.as_ref();
            cells.push(r.map(|r| format!("{:.6}", r.alpha)).unwrap_or_default());
            cells.push(
                r.and_then(|r| r.gamma)
                    .map(|g| format!("{g:.6e}"))
                    .unwrap_or_default(),
            );
        }
        lines.push(cells);
    }
    let cols = lines.iter().map(Vec::len).max().unwrap_or(0);
    let widths: Vec<usize> = (0..cols)
        .map(|c| {
            lines
                .iter()
                .filter_map(|l| l.get(c))
                .map(String::len)
                .max()
                .unwrap_or(0)
        })
        .collect();
    let mut out = String::new();
    if !result.complete {
        out.push_str("# incomplete: not every case finished\n");
    }
    for l in &lines {
        let cells: Vec<String> = l
            .iter()
            .zip(&widths)
            .map(|(s, w)| format!("{s:>w$}"))
            .collect();
        out.push_str(cells.join("  ").trim_end());
        out.push('\n');
    }
    if let Some(sc) = scaling(result) {
        let exp = |k: &str| {
            sc[k]
                .as_f64()
                .map(|v| format!("{v:.3}"))
                .unwrap_or("-".into())
        };
        let _ = writeln!(
            out,
            "# fitted on a log-log scale: alpha ~ L^{}, gamma ~ L^{} (L the box length)",
            exp("alpha_exponent"),
            exp("gamma_exponent")
        );
    }
    out
}

/// The response's scaling exponents over the rows (see
/// [`super::response::scaling_json`]).
fn scaling(result: &SweepResult) -> Option<Value> {
    let records: Vec<_> = result
        .rows
        .iter()
        .filter_map(|r| r.response.as_ref())
        .collect();
    super::response::scaling_json(&records)
}

/// The header's keys of a sweep document (no `rows`, no `complete`).
pub fn header_json(h: &SweepHeader) -> Map<String, Value> {
    let mut doc = Map::new();
    doc.insert("format".into(), json!(FORMAT));
    doc.insert("program".into(), program());
    doc.insert("units".into(), h.units.clone());
    doc.insert("key".into(), json!(h.keys.first()));
    if h.keys.len() > 1 {
        doc.insert("keys".into(), json!(h.keys));
    }
    doc.insert("vary".into(), json!(h.specs));
    doc.insert("cases".into(), json!(h.cases));
    if let Some(s) = h.shard {
        doc.insert("shard".into(), json!({"index": s.index, "count": s.count}));
    }
    doc.insert("input".into(), h.input.clone());
    doc
}

/// The row object of the document.
pub fn row_json(row: &SweepRow) -> Value {
    let mut m = Map::new();
    m.insert("case".into(), json!(row.case));
    m.insert("value".into(), row.values[0].to_json());
    if row.values.len() > 1 {
        m.insert(
            "values".into(),
            Value::Array(row.values.iter().map(|v| v.to_json()).collect()),
        );
    }
    m.insert(
        "levels".into(),
        serde_json::to_value(&row.levels).unwrap_or(Value::Null),
    );
    if let Some(o) = &row.occupancy {
        m.insert(
            "occupancy".into(),
            serde_json::to_value(o).unwrap_or(Value::Null),
        );
    }
    if let Some(r) = &row.response {
        m.insert(
            "response".into(),
            serde_json::to_value(r).unwrap_or(Value::Null),
        );
    }
    if !row.warnings.is_empty() {
        m.insert("warnings".into(), json!(row.warnings));
    }
    Value::Object(m)
}

/// The `chainwell.sweep/1` document.
pub fn sweep_document(result: &SweepResult) -> Value {
    let mut doc = header_json(&result.header);
    doc.insert("complete".into(), json!(result.complete));
    if let Some(sc) = scaling(result) {
        doc.insert("response_scaling".into(), sc);
    }
    doc.insert(
        "rows".into(),
        Value::Array(result.rows.iter().map(row_json).collect()),
    );
    Value::Object(doc)
}

/// The document as pretty JSON text with a final newline.
pub fn sweep_text(result: &SweepResult) -> String {
    let mut s = serde_json::to_string_pretty(&sweep_document(result)).unwrap_or_default();
    s.push('\n');
    s
}
