//! What every document carries: the program that wrote it and the echo of
//! the input that made it, so that any output can be reproduced.

use serde_json::{json, Value};

use crate::input::{Model, SourceText};

/// Program name and version, in every document.
pub fn program() -> Value {
    json!({"name": "chainwell", "version": env!("CARGO_PKG_VERSION")})
}

/// The key naming the edition of the physical constants behind the
/// numbers; every document carries it beside `program`.
pub const CONSTANTS_KEY: &str = "constants";

/// The edition of the physical constants ([`crate::constants::EDITION`]),
/// the value of [`CONSTANTS_KEY`] in every document.
pub fn constants() -> Value {
    json!(crate::constants::EDITION)
}

/// The echo of the input: the file's text, the overrides and the checked
/// values that matter for reproducing the run.
pub fn input_echo(model: &Model, source: &SourceText) -> Value {
    let u = &model.units;
    json!({
        "file": source.name,
        "text": source.text,
        "overrides": source.overrides,
        "checked": {
            "title": model.title,
            "mass": model.mass,
            "domain": {
                "from": u.length_out(model.domain.from),
                "to": u.length_out(model.domain.to),
                "boundary": model.domain.boundary,
            },
            "grid": model.grid,
            "levels": model.levels,
            "terms": model.potential.terms.len(),
            "chain": model.chain,
        }
    })
}
