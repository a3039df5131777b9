//! Every curated input in `potentials/` loads, solves, and gives sane levels.

mod common;

use std::path::{Path, PathBuf};

use chainwell::grid::Boundary;
use chainwell::input;
use chainwell::pipeline;

fn curated() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("potentials");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        .collect();
    files.sort();
    files
}

#[test]
fn there_are_at_least_ten_curated_inputs_with_headers() {
    let files = curated();
    assert!(files.len() >= 10, "{files:?}");
    for f in &files {
        let text = std::fs::read_to_string(f).unwrap();
        assert!(
            text.starts_with('#'),
            "{} has no comment header",
            f.display()
        );
    }
}

#[test]
fn every_curated_input_solves() {
    for f in curated() {
        let (model, _) = input::load(&f, &[]).unwrap_or_else(|e| panic!("{}", e.render()));
        let sol = pipeline::solve(&model).unwrap_or_else(|e| panic!("{}: {e}", f.display()));
        assert!(!sol.levels.is_empty(), "{}", f.display());
        for w in sol.levels.windows(2) {
            assert!(w[0].energy <= w[1].energy, "{}: not ascending", f.display());
        }
        if model.domain.boundary == Boundary::Walls {
            // Sturm-Liouville: level n has n - 1 nodes.
            for l in &sol.levels {
                assert_eq!(l.nodes, l.n - 1, "{}: level {}", f.display(), l.n);
            }
        }
        assert!(sol.diagnostics.residual_ratio < 30.0, "{}", f.display());
        assert!(
            sol.diagnostics.orthogonality_ratio < 30.0,
            "{}",
            f.display()
        );
    }
}
