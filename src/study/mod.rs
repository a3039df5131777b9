//! Studies: the pipeline run many times.
//!
//! - [`bands`]: the bands of the infinite chain, their filling, finite chains beside.
//! - [`cases`]: `--vary` flags, the grid of cases, shards.
//! - [`sweep`]: one solve per case, in parallel, rows in case order.
//! - [`merge`]: the shards of a sweep joined into the unsharded document.
//! - [`quantity`]: gap, wavelength, HOMO/LUMO and level energies of a solve.
//! - [`data`]: measured series (CSV) for fits.
//! - [`fit`]: Levenberg–Marquardt least squares of input values to data.
//! - [`target`]: Brent's root finder for the value that gives a wanted quantity.
//! - [`converge`]: the levels on grids whose spacing halves, observed orders.
//! - [`checkpoint`]: Ctrl-C and progress files, so interrupted work is kept.
//! - [`runner`]: the stop flag, progress and checkpoint every long study shares.

pub mod bands;
pub mod cases;
pub mod checkpoint;
pub mod converge;
pub mod curve;
pub mod data;
pub mod fit;
pub mod merge;
pub mod quantity;
pub mod runner;
pub mod sweep;
pub mod target;
pub mod termination;

pub use cases::{Case, CaseGrid, CaseValue, Shard, Vary};
pub use fit::FitResult;
pub use quantity::Quantity;
pub use sweep::{SweepResult, SweepRow};
pub use target::TargetResult;
