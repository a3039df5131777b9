//! Tables and CSV files of study results.
//!
//! The CSV of a sweep is in tidy long form, one line per case and level,
//! so that `pandas.read_csv` gives a frame ready for grouping and plotting:
//! `case`, one column per varied key, `n`, `energy`, `occupied` (electrons
//! in the level), then the case's `homo`, `lumo`, `gap` and `wavelength_nm`
//! (empty when the input fills no electrons).

use std::fmt::Write;

use super::sweep::{SweepResult, SweepRow};

fn opt<T: std::fmt::Display>(v: Option<T>) -> String {
    v.map(|x| x.to_string()).unwrap_or_default()
}

fn electrons_in(row: &SweepRow, n: usize) -> Option<u64> {
    let occ = row.occupancy.as_ref()?;
    let electrons = occ["electrons"].as_u64()?;
    let below = 2 * (n as u64 - 1);
    Some(electrons.saturating_sub(below).min(2))
}

/// The sweep as tidy CSV text (see the module docs).
pub fn sweep_csv(result: &SweepResult) -> String {
    let mut out = String::from("case");
    for k in &result.header.keys {
        out.push(',');
        out.push_str(k);
    }
    out.push_str(",n,energy,occupied,homo,lumo,gap,wavelength_nm\n");
    for row in &result.rows {
        for (n, e) in row.energies() {
            let _ = write!(out, "{}", row.case);
            for v in &row.values {
                let _ = write!(out, ",{}", v.to_json());
            }
            let _ = writeln!(
                out,
                ",{n},{e},{},{},{},{},{}",
                opt(electrons_in(row, n)),
                opt(row.homo()),
                opt(row.lumo()),
                opt(row.gap()),
                opt(row.wavelength_nm()),
            );
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
    out
}
