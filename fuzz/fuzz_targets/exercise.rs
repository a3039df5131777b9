//! The path the fuzz target drives, shared with `tests/no_panic.rs` (which
//! compiles and runs it in the main build, so the target cannot rot).
//!
//! The bytes are an input file; after a NUL byte, each line is one
//! `--set KEY=VALUE`. A checked input is solved on at most [`MAX_POINTS`]
//! unknowns, and a solution is rendered as JSON and as a table.

use std::path::Path;

use chainwell::eigen::EigenParams;
use chainwell::grid::Grid;
use chainwell::input::{self, Override};
use chainwell::{pipeline, report};

/// Most unknowns a fuzzed input is solved on, to keep each run cheap.
pub const MAX_POINTS: usize = 40;

/// Runs `data` through the pipeline. `Ok` holds the JSON document, `Err`
/// the rendered error message; neither may come from a panic.
pub fn exercise(data: &[u8]) -> Result<String, String> {
    exercise_in(data, Path::new("."))
}

/// As [`exercise`], with table files looked up in `base_dir`.
pub fn exercise_in(data: &[u8], base_dir: &Path) -> Result<String, String> {
    let (text, sets) = match data.iter().position(|&b| b == 0) {
        Some(i) => (&data[..i], &data[i + 1..]),
        None => (data, &[][..]),
    };
    let text = std::str::from_utf8(text).map_err(|e| format!("error: {e}"))?;
    let sets = String::from_utf8_lossy(sets);
    let overrides = sets
        .lines()
        .filter(|l| !l.is_empty())
        .map(Override::parse)
        .collect::<Result<Vec<_>, _>>()
        .map_err(|e| format!("error: {e}"))?;
    let (model, source) = input::load_str("fuzz.toml", text.to_string(), base_dir, &overrides)
        .map_err(|e| e.render())?;
    let mut grid = pipeline::grid_for(&model);
    if grid.points > MAX_POINTS {
        grid = Grid::with_points(&model.domain, MAX_POINTS);
    }
    let sol = pipeline::solve_on(&model, &grid, &EigenParams::default())
        .map_err(|e| e.locate(&model, &source).to_string())?;
    let _ = report::solve_table::solve_table(&model, &sol);
    let doc = report::solve::solve_document(&model, &source, &sol, false);
    serde_json::to_string(&doc).map_err(|e| format!("error: {e}"))
}
