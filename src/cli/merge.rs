//! `chainwell merge`: the documents of a sharded sweep joined into one.

use std::path::PathBuf;

use chainwell::study::merge;
use chainwell::study::sweep::SweepResult;

use super::{CommandError, Outcome, Plan};

/// Flags of `chainwell merge`.
#[derive(clap::Args, Debug)]
pub struct MergeArgs {
    /// The shards' JSON documents.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
    /// Accepted for symmetry with the other commands; refused when given.
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub set: Vec<String>,
    /// Print one JSON document on stdout.
    #[arg(long)]
    pub json: bool,
    /// Also write a tidy CSV (one line per case and level).
    #[arg(long, value_name = "FILE")]
    pub csv: Option<PathBuf>,
}

/// Runs `chainwell merge`: the merged document with `--json`, else its
/// table; `--csv` also writes the tidy CSV.
pub fn run(args: MergeArgs) -> Result<Outcome, CommandError> {
    if !args.set.is_empty() {
        return Err(CommandError::Usage(
            "merge joins finished documents; --set has nothing to change there".into(),
        ));
    }
    let mut plan = Plan::new();
    for f in &args.files {
        plan.input("a merge part", f);
    }
    plan.output("--csv", args.csv.as_deref()).check()?;
    let parts = args
        .files
        .iter()
        .map(|f| SweepResult::read(f).map(|r| (f.display().to_string(), r)))
        .collect::<Result<Vec<_>, _>>()
        .map_err(CommandError::Usage)?;
    let merged = merge::merge(&parts).map_err(|e| CommandError::Usage(e.to_string()))?;
    super::sweep::write_csv(&merged, args.csv.as_deref())?;
    Ok(Outcome::printed(
        super::sweep::render(&merged, args.json),
        vec![],
    ))
}
