//! Shared helpers of the integration tests.
#![allow(dead_code)]

use std::path::Path;

use chainwell::input::{self, Model};
use chainwell::pipeline::{self, Solution};

/// hbar^2 / (2 m_e) in eV Å², from chainwell's CODATA module (itself checked
/// against the published value in its unit tests).
pub fn t_e() -> f64 {
    chainwell::constants::hbar2_over_2me_ev_a2()
}

/// Loads an input given as text.
pub fn model(text: &str) -> Model {
    input::load_str("test.toml", text.to_string(), Path::new("."), &[])
        .map(|(m, _)| m)
        .unwrap_or_else(|e| panic!("{}", e.render()))
}

/// Loads and solves an input given as text.
pub fn solve(text: &str) -> Solution {
    pipeline::solve(&model(text)).unwrap_or_else(|e| panic!("{e}"))
}

/// The path of the built `chainwell` binary.
pub fn bin() -> &'static str {
    env!("CARGO_BIN_EXE_chainwell")
}
