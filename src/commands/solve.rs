//! `chainwell solve`: levels of one input.

use std::path::Path;

use super::CommandError;
use crate::input::{self, InputError, Model, Override, SourceText};
use crate::pipeline::{self, Solution, SolveError};
use crate::report;

/// Options of `chainwell solve`.
#[derive(Debug, Clone, Default)]
pub struct SolveOptions {
    /// `--set` overrides.
    pub overrides: Vec<Override>,
    /// Print JSON instead of a table.
    pub json: bool,
    /// Leave timings out of the JSON (for byte-identical documents).
    pub no_timing: bool,
    /// Write levels.csv, wavefunctions.csv, transitions.csv and
    /// spectrum.csv into this folder.
    pub csv_dir: Option<std::path::PathBuf>,
    /// Skip the error estimate (two coarser solves): faster, but levels
    /// carry no `error_estimate`.
    pub no_estimate: bool,
    /// `--plot` and its options: figures `states` (default), `density`,
    /// `spectrum`.
    pub figure: super::figure::FigureOptions,
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
        SolveError::GridTooSmall { .. } | SolveError::TooCoarseToConverge { .. } => {
            at("grid.points", "grid")
        }
        SolveError::ToleranceUnreachable { .. } => at("grid.tolerance", "grid"),
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
    let sopts = pipeline::SolveOptions {
        estimate: !opts.no_estimate,
        ..Default::default()
    };
    let sol: Solution =
        pipeline::solve_with(&model, &sopts).map_err(|e| solve_error(&model, &source, e))?;
    if let Some(dir) = &opts.csv_dir {
        let spectrum = pipeline::spectrum(&model, &sol);
        let files = report::csv::solve_files(&model, &sol, &spectrum);
        report::csv::write_solve_files(dir, &files).map_err(|e| {
            CommandError::Compute(format!(
                "cannot write CSV files into {}: {e}",
                dir.display()
            ))
        })?;
    }
    if opts.figure.path.is_some() {
        let fig = match opts.figure.kind(&["states", "density", "spectrum"])? {
            "spectrum" => super::figure::spectrum(&sol, &pipeline::spectrum(&model, &sol)),
            kind => super::figure::states(&model, &sol, kind == "density"),
        };
        opts.figure.render(&fig)?;
    }
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
