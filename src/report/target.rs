//! The `chainwell.target/1` document and its line of text.

use serde_json::{json, Value};

use super::envelope::{constants, program};
use crate::study::target::TargetResult;

/// The `chainwell.target/1` document.
pub fn target_document(target: &TargetResult, units: &Value, input: &Value) -> Value {
    json!({
        "format": "chainwell.target/1",
        "program": program(),
        "constants": constants(),
        "units": units,
        "parameters": [{"key": target.key, "value": target.value}],
        "quantity": target.quantity.name(),
        "target": target.target,
        "achieved": target.achieved,
        "bracket": [target.bracket.0, target.bracket.1],
        "evaluations": target.evaluations,
        "input": input,
    })
}

/// A readable line.
pub fn target_table(target: &TargetResult) -> String {
    format!(
        "{} = {:.10}  gives {} = {:.8} (target {}), {} solves\n",
        target.key,
        target.value,
        target.quantity.name(),
        target.achieved,
        target.target,
        target.evaluations
    )
}
