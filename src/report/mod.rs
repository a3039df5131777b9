//! Reports of results, one file per document, in the input's units: JSON
//! documents (the contract's keys), readable tables, tidy CSV files, and the
//! figures built from results.
//!
//! - [`envelope`]: what every document carries (program, input echo).
//! - [`solve`], [`solve_table`], [`solve_csv`]: one solve.
//! - [`response`](mod@response): the static response's object, lines and
//!   scaling exponents.
//! - [`sweep`]: the sweep document, table and CSV.
//! - [`fit`] and [`target`]: fits and design targets.
//! - [`bands`]: the bands document, table and CSV.
//! - [`converge`]: convergence studies.
//! - [`figure`]: figures of every result, ready for [`crate::plot`].

pub mod bands;
pub mod converge;
pub mod envelope;
pub mod figure;
pub mod fit;
pub mod response;
pub mod solve;
pub mod solve_csv;
pub mod solve_table;
pub mod sweep;
pub mod target;
