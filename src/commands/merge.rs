//! `chainwell merge`: the documents of a sharded sweep joined into one.

use std::path::PathBuf;

use super::CommandError;
use crate::study::merge;
use crate::study::sweep::SweepResult;

/// Runs `chainwell merge` and returns the text for stdout: the merged
/// document with `json`, else its table. `csv` also writes the tidy CSV.
pub fn run(
    files: &[PathBuf],
    json: bool,
    csv: Option<&std::path::Path>,
) -> Result<String, CommandError> {
    let parts = files
        .iter()
        .map(|f| SweepResult::read(f).map(|r| (f.display().to_string(), r)))
        .collect::<Result<Vec<_>, _>>()
        .map_err(CommandError::Usage)?;
    let merged = merge::merge(&parts).map_err(|e| CommandError::Usage(e.to_string()))?;
    super::sweep::write_csv(&merged, csv)?;
    Ok(super::sweep::render(&merged, json))
}
