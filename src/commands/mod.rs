//! The subcommands of the `chainwell` binary, as library calls.
//!
//! Each command takes its parsed options, runs the pipeline and returns what
//! to print; the binary maps [`CommandError`] to the exit status (2 for bad
//! input or usage, 1 for a computation that could not finish).

pub mod bands;
pub mod converge;
pub mod figure;
pub mod fit;
pub mod merge;
pub mod solve;
pub mod starter;
pub mod sweep;

use crate::input::InputError;

/// Why a command failed.
#[derive(Debug, thiserror::Error)]
pub enum CommandError {
    /// A fault in the input file or an override (exit status 2).
    #[error("{}", .0.render())]
    Input(#[from] InputError),
    /// A fault in the command line (exit status 2).
    #[error("error: {0}")]
    Usage(String),
    /// A computation that could not finish (exit status 1).
    #[error("error: {0}")]
    Compute(String),
}

impl CommandError {
    /// The exit status for this error.
    pub fn exit_code(&self) -> u8 {
        match self {
            CommandError::Input(_) | CommandError::Usage(_) => 2,
            CommandError::Compute(_) => 1,
        }
    }
}

/// Parses `--set KEY=VALUE` flags.
pub fn parse_overrides(sets: &[String]) -> Result<Vec<crate::input::Override>, CommandError> {
    sets.iter()
        .map(|s| {
            crate::input::Override::parse(s)
                .map_err(|m| CommandError::Usage(format!("--set {s}: {m}")))
        })
        .collect()
}
