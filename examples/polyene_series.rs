//! A polyene-like series: how the HOMO–LUMO gap and the absorption
//! wavelength move as an alternating chain grows, beside the ideal box.
//!
//! Run: `cargo run --release --example polyene_series`
//! (the alternation amplitude is an invented demo value).

use std::path::Path;

use chainwell::input::{self, Override};
use chainwell::pipeline;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let base = "[chain]\nbonds = 3\nbond_length = 1.40\nalternation = 0.8\n[grid]\nspacing = 0.02\norder = 6\n";
    println!(
        "{:>6} {:>12} {:>14} {:>14}",
        "bonds", "gap (eV)", "lambda (nm)", "box gap (eV)"
    );
    for bonds in (3..=21).step_by(2) {
        let ov = [Override::parse(&format!("chain.bonds={bonds}"))?];
        let (model, _) = input::load_str("series.toml", base.into(), Path::new("."), &ov)?;
        let sol = pipeline::solve(&model)?;
        let occ = sol
            .occupancy
            .as_ref()
            .ok_or("a chain fills its electrons")?;
        let gap = occ.gap.ok_or("no gap")?;
        // The ideal box of the same length: (h^2/8mL^2)(N + 1) for N electrons,
        // N = bonds + 1.
        let n = (bonds + 1) as f64;
        let box_gap = model.kinetic() * (std::f64::consts::PI / sol.box_length).powi(2) * (n + 1.0);
        println!(
            "{bonds:>6} {gap:>12.4} {:>14.1} {box_gap:>14.4}",
            occ.wavelength_nm.unwrap_or(f64::NAN)
        );
    }
    Ok(())
}
