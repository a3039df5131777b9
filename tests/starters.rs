//! Every starter input is valid and solves; the command refuses to replace a
//! file.

mod common;

use std::process::Command;

use chainwell::input::{self, Override};
use chainwell::starters::{text, KINDS};

#[test]
fn every_starter_loads_and_solves() {
    let dir = std::env::temp_dir().join(format!("chainwell-starters-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    // The table starter reads profile.csv beside it.
    std::fs::write(dir.join("profile.csv"), "x,V\n0,0.3\n6,-0.2\n12,0.3\n").unwrap();
    for (kind, _) in KINDS {
        let path = dir.join(format!("{kind}.toml"));
        std::fs::write(&path, text(kind).unwrap()).unwrap();
        // Coarser grids keep the test quick; the files' own grids are for users.
        let ov = [Override::parse("grid.points=300").unwrap()];
        let (model, _) =
            input::load(&path, &ov).unwrap_or_else(|e| panic!("{kind}: {}", e.render()));
        let sol = chainwell::pipeline::solve(&model).unwrap_or_else(|e| panic!("{kind}: {e}"));
        assert!(!sol.levels.is_empty(), "{kind}");
    }
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn starter_does_not_replace_a_file() {
    let dir = std::env::temp_dir().join(format!("chainwell-starter-x-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("mine.toml");
    std::fs::write(&path, "keep me").unwrap();
    let out = Command::new(common::bin())
        .args(["starter", "box", "-o", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(std::fs::read_to_string(&path).unwrap(), "keep me");
    let out = Command::new(common::bin())
        .args(["starter", "nonsense"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    std::fs::remove_dir_all(&dir).unwrap();
}
