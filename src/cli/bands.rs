//! `chainwell bands`: the energy bands of the infinite chain.

use std::path::PathBuf;

use chainwell::input::Document;
use chainwell::report;
use chainwell::study::bands::{self, BandsSpec, DEFAULT_KPOINTS};

use super::figure::FigureArgs;
use super::{json_text, parse_overrides, CommandError, Outcome, Plan};

/// Flags of `chainwell bands`.
#[derive(clap::Args, Debug)]
pub struct BandsArgs {
    /// The input file (TOML): a [domain] is one cell; a [chain] gives its two-bond repeat unit.
    pub input: PathBuf,
    /// Override an input value: KEY=VALUE (e.g. chain.alternation=1.2).
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub set: Vec<String>,
    /// Wavevectors from 0 to pi/period (at least 2).
    #[arg(long, default_value_t = DEFAULT_KPOINTS)]
    pub kpoints: usize,
    /// Print one JSON document on stdout.
    #[arg(long)]
    pub json: bool,
    /// Also write the bands as CSV (one row per k and band) to FILE.
    #[arg(long, value_name = "FILE")]
    pub csv: Option<PathBuf>,
    /// Lay finite chains of these bond counts beside the band edges:
    /// START:STOP[:STEP] or N1,N2,...
    #[arg(long, value_name = "BONDS")]
    pub finite: Option<String>,
    /// Leave timings out of the JSON, so that runs compare byte for byte.
    #[arg(long)]
    pub no_timing: bool,
    /// Figure: bands (E against k, gaps shaded, finite chains beside).
    #[command(flatten)]
    pub plot: FigureArgs,
}

/// Runs `chainwell bands`.
pub fn run(args: BandsArgs) -> Result<Outcome, CommandError> {
    let overrides = parse_overrides(&args.set)?;
    let figure = args.plot.check(&["bands"])?;
    bands::check_kpoints(args.kpoints)?;
    let finite = args
        .finite
        .as_deref()
        .map(bands::parse_bond_counts)
        .transpose()
        .map_err(|m| CommandError::Usage(format!("--finite {m}")))?;
    let spec = BandsSpec {
        kpoints: args.kpoints,
        finite,
    };
    let document = Document::open(&args.input)?;
    // Reads the tables the input names, so that the same-file rule sees
    // them; the model itself is checked again by the study.
    document.model(&overrides)?;
    Plan::new()
        .document(&args.input, &document)
        .output("--csv", args.csv.as_deref())
        .output("--plot", figure.as_ref().map(|f| f.path.as_path()))
        .check()?;
    let (model, source, result) = bands::compute(&document, &overrides, &spec)?;
    if let Some(csv_path) = &args.csv {
        chainwell::output::write_atomic(
            csv_path,
            report::bands::bands_csv(&model, &result).as_bytes(),
        )
        .map_err(|e| CommandError::Compute(format!("cannot write {}: {e}", csv_path.display())))?;
    }
    if let Some(plan) = &figure {
        plan.render(&report::figure::bands(&model, &result))?;
    }
    let out = if args.json {
        json_text(&report::bands::bands_document(
            &model,
            &source,
            &result,
            !args.no_timing,
        ))?
    } else {
        report::bands::bands_table(&model, &result)
    };
    Ok(Outcome::printed(out, result.warnings))
}
