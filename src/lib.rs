//! chainwell: levels, wavefunctions, transition dipoles and spectra of
//! one-dimensional potentials, for the pi electrons of conjugated chains.
//!
//! The pipeline, one module per stage:
//!
//! ```text
//! input file ─> input (raw TOML, then checked model) ─> potential ─> grid + hamiltonian
//!           ─> eigen (selected eigenpairs) ─> observables ─> report (table/JSON/CSV)
//! ```
//!
//! [`pipeline`] runs it once; [`study`] drives it many times (sweeps, fits,
//! bands, convergence); [`report`] turns results into documents, tables
//! and figures. The `chainwell` binary's command layer sits on top.
//!
//! ```
//! use chainwell::input;
//! let text = r#"
//! [domain]
//! from = 0.0
//! to = 10.0
//! [grid]
//! points = 400
//! order = 8
//! [levels]
//! count = 3
//! "#;
//! let (model, _) = input::load_str("box.toml", text.into(), std::path::Path::new("."), &[]).unwrap();
//! let sol = chainwell::pipeline::solve(&model).unwrap();
//! // The ideal box: E_n = n^2 h^2 / (8 m L^2).
//! let e1 = sol.levels[0].box_energy.unwrap();
//! assert!((sol.levels[0].energy / e1 - 1.0).abs() < 1e-8);
//! ```
#![deny(missing_docs)]

pub mod bands;
pub mod constants;
pub mod eigen;
pub mod files;
pub mod grid;
pub mod hamiltonian;
pub mod input;
pub mod observables;
pub mod output;
pub mod pipeline;
pub mod plot;
pub mod potential;
pub mod report;
pub mod starters;
pub mod study;
pub mod units;
