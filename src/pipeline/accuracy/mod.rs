//! Accuracy you can cite: per-level error estimates, refinement to a
//! tolerance, and convergence reports.
//!
//! Every level of a solve is recomputed on two coarser grids (spacing `2h`
//! and `4h`); [`richardson`] turns the three values into an extrapolated
//! level, an observed order of convergence and an estimate of the error of
//! the fine-grid level. The estimate includes the round-off floor
//! `eps ||H||_1`, which grows as `1/h²`: refining past the spacing where it
//! dominates makes results worse, so higher orders at coarser grids are the
//! way to high accuracy.
//!
//! Orders: the finite-difference stencil's order, 4 for Numerov, and 2 when
//! the potential jumps inside the domain (the jumps are put on grid points,
//! see [`crate::grid::align`], which keeps the error smooth but of order 2).

pub mod estimate;
pub mod refine;
pub mod richardson;

use crate::input::model::Model;

pub use estimate::estimate;
pub use refine::{refine, MAX_REFINEMENTS};
pub use richardson::{analyse, observed_order, LevelError};

/// The order the error of the model's levels should fall with.
pub fn expected_order(model: &Model, has_edges: bool) -> f64 {
    let p = f64::from(model.grid.accuracy_order());
    if has_edges {
        p.min(2.0)
    } else {
        p
    }
}
