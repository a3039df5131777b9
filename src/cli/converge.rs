//! `chainwell converge`: the levels on a sequence of grids, their observed
//! order of convergence, and the levels whose order falls short.

use std::path::PathBuf;

use chainwell::eigen::EigenParams;
use chainwell::input;
use chainwell::report;
use chainwell::study::converge;

use super::figure::FigureArgs;
use super::{json_text, parse_overrides, CommandError, Outcome};

/// Flags of `chainwell converge`.
#[derive(clap::Args, Debug)]
pub struct ConvergeArgs {
    /// The input file (TOML); its grid is the finest.
    pub input: PathBuf,
    /// Override an input value: KEY=VALUE.
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub set: Vec<String>,
    /// Number of grids (at least 3).
    #[arg(long, default_value_t = 4)]
    pub grids: usize,
    /// Print one JSON document on stdout.
    #[arg(long)]
    pub json: bool,
    /// Figure: errors (error against spacing, log-log).
    #[command(flatten)]
    pub plot: FigureArgs,
}

/// Runs `chainwell converge`.
pub fn run(args: ConvergeArgs) -> Result<Outcome, CommandError> {
    let overrides = parse_overrides(&args.set)?;
    let figure = args.plot.check(&["errors"])?;
    let (model, source) = input::load(&args.input, &overrides)?;
    let conv = converge::converge(&model, args.grids, &EigenParams::default())
        .map_err(|e| e.locate(&model, &source))?;
    if let Some(plan) = &figure {
        plan.render(&report::figure::converge(&model, &conv))?;
    }
    let out = if args.json {
        json_text(&report::converge::converge_document(&model, &conv))?
    } else {
        report::converge::converge_table(&model, &conv)
    };
    Ok(Outcome::printed(out, vec![]))
}
