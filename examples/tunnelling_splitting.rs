//! A symmetric double well: the tunnelling splitting of the two lowest
//! levels falls off exponentially as the barrier between the wells grows.
//! A proton (1836.15 electron masses; from memory) in a quartic well
//! `V = D ((x/a)^2 - 1)^2` with minima 0.7 Å apart, an invented model of a
//! hydrogen bond.
//!
//! Run: `cargo run --release --example tunnelling_splitting`

use std::path::Path;

use chainwell::input::{self, Override};
use chainwell::pipeline;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let base = "[particle]\nmass = 1836.15\n[domain]\nfrom = -1.2\nto = 1.2\n[grid]\npoints = 800\norder = 8\n\
                [levels]\ncount = 2\n[[term]]\nshape = \"formula\"\nexpression = \"D * ((x / a)^2 - 1)^2\"\n\
                [term.constants]\nD = 0.1\na = 0.35\n";
    println!(
        "{:>12} {:>16} {:>12} {:>6}",
        "barrier (eV)", "splitting (eV)", "+- (eV)", "nodes"
    );
    for barrier in [0.1, 0.2, 0.3, 0.4, 0.5, 0.6] {
        let ov = [Override::parse(&format!("term.1.constants.D={barrier}"))?];
        let (model, _) = input::load_str("wells.toml", base.into(), Path::new("."), &ov)?;
        let sol = pipeline::solve(&model)?;
        let (a, b) = (&sol.levels[0], &sol.levels[1]);
        let err = a.error_estimate.unwrap_or(0.0) + b.error_estimate.unwrap_or(0.0);
        println!(
            "{barrier:>12.2} {:>16.6e} {err:>12.1e} {:>3} {:>2}",
            b.energy - a.energy,
            a.nodes,
            b.nodes
        );
    }
    Ok(())
}
