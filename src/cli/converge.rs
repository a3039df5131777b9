//! `chainwell converge`: the levels on a sequence of grids, their observed
//! order of convergence, and the levels whose order falls short.

use std::path::PathBuf;

use chainwell::eigen::EigenParams;
use chainwell::input::Document;
use chainwell::report;
use chainwell::study::converge;

use super::figure::FigureArgs;
use super::{json_text, parse_overrides, CommandError, Outcome, Plan};

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
    if args.grids < 3 {
        return Err(CommandError::Usage(format!(
            "--grids {}: a convergence order needs at least 3 grids",
            args.grids
        )));
    }
    let document = Document::open(&args.input)?;
    let (model, source) = document.model(&overrides)?;
    Plan::new()
        .document(&args.input, &document)
        .output("--plot", figure.as_ref().map(|f| f.path.as_path()))
        .check()?;
    let usable = converge::usable_grids(&model, args.grids);
    if usable < args.grids {
        return Err(CommandError::Usage(format!(
            "--grids {}: halving the grid of {} points leaves {usable} grids that still hold the levels asked for; ask for --grids {usable} or fewer, or raise grid.points",
            args.grids,
            converge::finest_points(&model, args.grids),
        )));
    }
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
