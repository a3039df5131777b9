//! `chainwell solve`: levels of one input.

use std::path::Path;

use super::CommandError;
use crate::input::{self, InputError, Model, Override, SourceText};
use crate::report;
use crate::solve::{self, Solution, SolveError};

/// Options of `chainwell solve`.
#[derive(Debug, Clone, Default)]
pub struct SolveOptions {
    /// `--set` overrides.
    pub overrides: Vec<Override>,
    /// Print JSON instead of a table.
    pub json: bool,
    /// Leave timings out of the JSON (for byte-identical documents).
    pub no_timing: bool,
}

/// Turns a pipeline error into a command error, locating input faults.
pub fn solve_error(model: &Model, source: &SourceText, e: SolveError) -> CommandError {
    let file = source.locate(None);
    let at = |key: &str, fallback: &str| {
        let loc = model.location_of(key, &model.location_of(fallback, &file));
        CommandError::Input(InputError::new(loc, key, e.to_string()))
    };
    match &e {
        SolveError::NonFinitePotential(nf) => {
            let (key, location) = model
                .term_locations
                .get(nf.term)
                .cloned()
                .unwrap_or_else(|| ("term".into(), file.clone()));
            CommandError::Input(InputError::new(
                location,
                key,
                format!(
                    "gives {} at x = {} {}; the potential must be finite at every grid point",
                    nf.value,
                    model.units.length_out(nf.x),
                    model.units.length.label()
                ),
            ))
        }
        SolveError::Occupancy(_) => at("levels.electrons", "levels"),
        SolveError::TooManyLevels { .. } => {
            if model.key_locations.contains_key("levels.count") {
                at("levels.count", "levels")
            } else {
                at("grid.points", "grid")
            }
        }
        SolveError::GridTooSmall { .. } => at("grid.points", "grid"),
        SolveError::TooLarge { .. }
        | SolveError::IllConditioned { .. }
        | SolveError::NotConverged { .. } => CommandError::Compute(e.to_string()),
        SolveError::Eigen(_) if e.is_input_error() => at("levels", "levels"),
        SolveError::Eigen(_) => CommandError::Compute(e.to_string()),
    }
}

/// Runs `chainwell solve` and returns the text for stdout and the warnings
/// for stderr.
pub fn run(path: &Path, opts: &SolveOptions) -> Result<(String, Vec<String>), CommandError> {
    let (model, source) = input::load(path, &opts.overrides)?;
    let sol: Solution = solve::solve(&model).map_err(|e| solve_error(&model, &source, e))?;
    let out = if opts.json {
        let doc = report::json::solve_document(&model, &source, &sol, !opts.no_timing);
        let mut s =
            serde_json::to_string_pretty(&doc).map_err(|e| CommandError::Compute(e.to_string()))?;
        s.push('\n');
        s
    } else {
        report::table::solve_table(&model, &sol)
    };
    Ok((out, sol.warnings.clone()))
}
