//! `chainwell solve`: levels of one input.

use std::path::PathBuf;

use chainwell::input::Document;
use chainwell::pipeline::{self, SolveOptions};
use chainwell::report;

use super::figure::FigureArgs;
use super::{json_text, parse_overrides, CommandError, Outcome, Plan};

/// Flags of `chainwell solve`.
#[derive(clap::Args, Debug)]
pub struct SolveArgs {
    /// The input file (TOML).
    pub input: PathBuf,
    /// Override an input value: KEY=VALUE (e.g. grid.points=20000).
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub set: Vec<String>,
    /// Print one JSON document on stdout.
    #[arg(long)]
    pub json: bool,
    /// Leave timings out of the JSON, so that runs compare byte for byte.
    #[arg(long)]
    pub no_timing: bool,
    /// Write levels.csv, wavefunctions.csv, transitions.csv and
    /// spectrum.csv into this folder.
    #[arg(long, value_name = "DIR")]
    pub csv: Option<PathBuf>,
    /// Skip the error estimate (two coarser solves) when only speed matters.
    #[arg(long)]
    pub no_estimate: bool,
    /// Figures: states (default), density, spectrum.
    #[command(flatten)]
    pub plot: FigureArgs,
}

/// Runs `chainwell solve`.
pub fn run(args: SolveArgs) -> Result<Outcome, CommandError> {
    let overrides = parse_overrides(&args.set)?;
    let figure = args.plot.check(&["states", "density", "spectrum"])?;
    let document = Document::open(&args.input)?;
    let (model, source) = document.model(&overrides)?;
    Plan::new()
        .document(&args.input, &document)
        .output("--plot", figure.as_ref().map(|f| f.path.as_path()))
        .output_dir("--csv", args.csv.as_deref(), &report::solve_csv::FILE_NAMES)
        .check()?;
    let opts = SolveOptions {
        estimate: !args.no_estimate,
        ..Default::default()
    };
    let sol = pipeline::solve_with(&model, &opts).map_err(|e| e.locate(&model, &source))?;
    if let Some(dir) = &args.csv {
        let spectrum = pipeline::spectrum(&model, &sol);
        let files = report::solve_csv::solve_files(&model, &sol, &spectrum);
        report::solve_csv::write_solve_files(dir, &files).map_err(|e| {
            CommandError::Compute(format!(
                "cannot write CSV files into {}: {e}",
                dir.display()
            ))
        })?;
    }
    if let Some(plan) = &figure {
        let fig = match plan.kind {
            "spectrum" => report::figure::spectrum(
                &sol,
                &pipeline::spectrum(&model, &sol),
                plan.spectrum_axis,
                plan.measured.clone(),
            ),
            kind => report::figure::states(&model, &sol, kind == "density"),
        };
        plan.render(&fig)?;
    }
    let out = if args.json {
        json_text(&report::solve::solve_document(
            &model,
            &source,
            &sol,
            !args.no_timing,
        ))?
    } else {
        report::solve_table::solve_table(&model, &sol)
    };
    Ok(Outcome::printed(out, sol.warnings))
}
