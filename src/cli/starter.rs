//! `chainwell starter KIND`: a commented input file to begin from.

use std::path::PathBuf;

use chainwell::starters::{text, KINDS};

use super::{CommandError, Outcome};

/// Flags of `chainwell starter`.
#[derive(clap::Args, Debug)]
pub struct StarterArgs {
    /// The kind of system.
    pub kind: Option<String>,
    /// Write to FILE instead of stdout.
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Replace FILE if it exists.
    #[arg(long)]
    pub force: bool,
}

/// Runs `chainwell starter`: prints the list of starters or one starter, or
/// writes it to `--output` (refusing to replace an existing file unless
/// `--force`).
pub fn run(args: StarterArgs) -> Result<Outcome, CommandError> {
    let Some(kind) = args.kind else {
        let mut s = String::from("starters (chainwell starter KIND [-o FILE]):\n");
        for (k, d) in KINDS {
            s.push_str(&format!("  {k:<8} {d}\n"));
        }
        return Ok(Outcome::printed(s, vec![]));
    };
    let body = text(&kind).ok_or_else(|| {
        let names: Vec<&str> = KINDS.iter().map(|(k, _)| *k).collect();
        CommandError::Usage(format!(
            "unknown starter `{kind}`; choose one of {}",
            names.join(", ")
        ))
    })?;
    match args.output {
        None => Ok(Outcome::printed(body.to_string(), vec![])),
        Some(path) => {
            if path.exists() && !args.force {
                return Err(CommandError::Usage(format!(
                    "{} exists; chainwell does not replace it (use --force)",
                    path.display()
                )));
            }
            chainwell::output::write_atomic(&path, body.as_bytes()).map_err(|e| {
                CommandError::Compute(format!("cannot write {}: {e}", path.display()))
            })?;
            Ok(Outcome::default())
        }
    }
}
