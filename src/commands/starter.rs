//! `chainwell starter KIND`: a commented input file to begin from.
//!
//! Each starter is a complete, runnable input for one kind of system, with
//! every key explained, so that a researcher edits numbers instead of
//! looking up key names.

use std::path::Path;

use super::CommandError;

/// The kinds of starter, with a one-line description each.
pub const KINDS: &[(&str, &str)] = &[
    (
        "box",
        "an ideal box with hard walls: the free-electron reference",
    ),
    (
        "chain",
        "a conjugated chain with bond alternation and an optional heteroatom site",
    ),
    ("ring", "a cyclic molecule: a particle on a ring"),
    (
        "wells",
        "a double well built from terms: harmonic trap and Gaussian barrier",
    ),
    ("table", "a potential read from a CSV table"),
    (
        "formula",
        "a potential written as a formula with named constants",
    ),
    (
        "polymer",
        "the repeat unit of an alternating chain, for `chainwell bands`",
    ),
];

/// The text of a starter.
pub fn text(kind: &str) -> Option<&'static str> {
    Some(match kind {
        "box" => include_str!("starters/box.toml"),
        "chain" => include_str!("starters/chain.toml"),
        "ring" => include_str!("starters/ring.toml"),
        "wells" => include_str!("starters/wells.toml"),
        "table" => include_str!("starters/table.toml"),
        "formula" => include_str!("starters/formula.toml"),
        "polymer" => include_str!("starters/polymer.toml"),
        _ => return None,
    })
}

/// Runs `chainwell starter`: returns the text for stdout, or writes it to
/// `output` (refusing to replace an existing file unless `force`).
pub fn run(kind: Option<&str>, output: Option<&Path>, force: bool) -> Result<String, CommandError> {
    let Some(kind) = kind else {
        let mut s = String::from("starters (chainwell starter KIND [-o FILE]):\n");
        for (k, d) in KINDS {
            s.push_str(&format!("  {k:<8} {d}\n"));
        }
        return Ok(s);
    };
    let body = text(kind).ok_or_else(|| {
        let names: Vec<&str> = KINDS.iter().map(|(k, _)| *k).collect();
        CommandError::Usage(format!(
            "unknown starter `{kind}`; choose one of {}",
            names.join(", ")
        ))
    })?;
    match output {
        None => Ok(body.to_string()),
        Some(path) => {
            if path.exists() && !force {
                return Err(CommandError::Usage(format!(
                    "{} exists; chainwell does not replace it (use --force)",
                    path.display()
                )));
            }
            crate::output::write_atomic(path, body.as_bytes()).map_err(|e| {
                CommandError::Compute(format!("cannot write {}: {e}", path.display()))
            })?;
            Ok(String::new())
        }
    }
}
