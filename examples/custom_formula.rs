//! A potential written as a formula: a corrugated well, its levels and the
//! strongest absorption.
//!
//! Run: `cargo run --release --example custom_formula`

use std::path::Path;

use chainwell::input;
use chainwell::pipeline;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let text = r#"
[domain]
from = 0.0
to = 16.0
[grid]
points = 800
order = 8
[levels]
count = 8
electrons = 8
[[term]]
shape = "formula"
expression = "a * sin(pi * x / p)^2 - d * exp(-((x - 8) / w)^2)"
[term.constants]
a = 0.6
p = 2.0
d = 1.2
w = 3.0
"#;
    let (model, _) = input::load_str("formula.toml", text.into(), Path::new("."), &[])?;
    let sol = pipeline::solve(&model)?;
    for l in &sol.levels {
        println!(
            "n = {:>2}  E = {:>10.5} eV  (+- {:.1e})  nodes {}",
            l.n,
            l.energy,
            l.error_estimate.unwrap_or(f64::NAN),
            l.nodes
        );
    }
    if let Some(t) = sol
        .transitions
        .iter()
        .max_by(|a, b| a.strength.total_cmp(&b.strength))
    {
        println!(
            "strongest: {} -> {} at {:.1} nm, f = {:.3}",
            t.from, t.to, t.wavelength_nm, t.strength
        );
    }
    Ok(())
}
