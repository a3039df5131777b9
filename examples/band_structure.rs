//! The infinite chain: bands of an alternating chain's repeat unit and the
//! gap the HOMO–LUMO gaps of long chains approach.
//!
//! Run: `cargo run --release --example band_structure`

use std::path::Path;

use chainwell::bands::{band_edges, band_structure, gaps};
use chainwell::input;
use chainwell::pipeline::cell::cell_from_model;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let text = "[chain]\nbonds = 10\nbond_length = 1.40\nalternation = 1.0\n[grid]\nspacing = 0.02\norder = 8\n";
    let (model, _) = input::load_str("polymer.toml", text.into(), Path::new("."), &[])?;
    let cell = cell_from_model(&model)?;
    let problem = cell.problem();
    let structure = band_structure(&problem, 21, 4)?;
    for (bottom, top) in band_edges(&problem, &structure) {
        println!(
            "band {}: {:>9.4} .. {:>9.4} eV   (m* at bottom {:?})",
            bottom.band, bottom.energy, top.energy, bottom.effective_mass
        );
    }
    for g in gaps(&problem, &structure, 1e-6) {
        println!(
            "gap {}-{}: {:.4} eV at k = {:.4} 1/A",
            g.below, g.above, g.size, g.lower_edge.k
        );
    }
    Ok(())
}
