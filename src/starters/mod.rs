//! Starters: commented input files to begin from, one per kind of system
//! (`chainwell starter KIND`).
//!
//! Each starter is a complete, runnable input for one kind of system, with
//! every key explained, so that a researcher edits numbers instead of
//! looking up key names.

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
        "box" => include_str!("box.toml"),
        "chain" => include_str!("chain.toml"),
        "ring" => include_str!("ring.toml"),
        "wells" => include_str!("wells.toml"),
        "table" => include_str!("table.toml"),
        "formula" => include_str!("formula.toml"),
        "polymer" => include_str!("polymer.toml"),
        _ => return None,
    })
}
