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
//! Orders ([`expected`]): the finite-difference stencil's order, 4 for
//! Numerov, lowered by what the potential and the walls do to it:
//!
//! | cause | order that holds |
//! | --- | --- |
//! | a jump of V (on a grid point, see [`crate::grid::align`]) | 2 |
//! | a kink not corrected, or between grid points | 2 |
//! | a kink or weak break on a grid point, corrected ([`crate::grid::kink`]) | 6 |
//! | a weak break not corrected | 4 |
//! | a wall where V has a slope the levels feel (odd reflection) | 4 |
//!
//! A break between grid points also makes the error erratic in `h`
//! ([`Smoothness::Erratic`]), and the estimate then stops trusting
//! Richardson's formula.

pub mod estimate;
pub mod refine;
pub mod richardson;

use serde::Serialize;

use crate::grid::kink::CORRECTED_ORDER;
use crate::input::model::Model;
use crate::pipeline::EdgeReport;

pub use estimate::estimate;
pub use refine::{refine, MAX_REFINEMENTS};
pub use richardson::{analyse, observed_order, LevelError, Smoothness};

/// What limits the order of convergence below the scheme's.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Limit {
    /// V jumps inside the domain.
    Jump,
    /// A kink lies between grid points.
    KinkBetweenGridPoints,
    /// A kink on a grid point whose stencil is not corrected.
    Kink,
    /// A kink or weak break whose stencil is corrected (what remains).
    CorrectedCorner,
    /// A weak break (V''' jumps) not corrected.
    WeakBreak,
    /// V has a slope at a hard wall and the levels feel it.
    WallSlope,
}

impl Limit {
    /// The cause, in words.
    pub fn describe(self) -> &'static str {
        match self {
            Limit::Jump => "a jump of the potential",
            Limit::KinkBetweenGridPoints => "a kink of the potential between grid points",
            Limit::Kink => "a kink of the potential whose stencil is not corrected",
            Limit::CorrectedCorner => "a corrected kink or weak break (order 6 remains)",
            Limit::WeakBreak => "a weak break of the potential (V''' jumps)",
            Limit::WallSlope => "the potential's slope at a hard wall (odd reflection)",
        }
    }
}

/// The order a model's levels should converge with on grids like the one
/// `edges` describes, and what limits it below the scheme's.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Expected {
    /// The order.
    pub order: f64,
    /// Why it is below the scheme's, if it is.
    pub limited_by: Option<Limit>,
}

/// The order the error of the model's levels should fall with (see the
/// module docs), and its cause.
pub fn expected(model: &Model, edges: &EdgeReport) -> Expected {
    let scheme = f64::from(model.grid.accuracy_order());
    let corrected = f64::from(CORRECTED_ORDER);
    let mut causes: Vec<(f64, Limit)> = Vec::new();
    if !edges.positions.is_empty() {
        causes.push((2.0, Limit::Jump));
    }
    if !edges.kinks.is_empty() {
        causes.push(if !edges.kinks_aligned {
            (2.0, Limit::KinkBetweenGridPoints)
        } else if !edges.kinks_corrected {
            (2.0, Limit::Kink)
        } else {
            (corrected, Limit::CorrectedCorner)
        });
    }
    if !edges.weak_breaks.is_empty() {
        causes.push(if edges.weak_aligned && edges.weak_corrected {
            (corrected, Limit::CorrectedCorner)
        } else {
            (4.0, Limit::WeakBreak)
        });
    }
    if edges.wall_slope {
        causes.push((4.0, Limit::WallSlope));
    }
    let lowest = causes
        .into_iter()
        .filter(|c| c.0 < scheme)
        .min_by(|a, b| a.0.total_cmp(&b.0));
    match lowest {
        Some((order, cause)) => Expected {
            order,
            limited_by: Some(cause),
        },
        None => Expected {
            order: scheme,
            limited_by: None,
        },
    }
}

/// The order the error of the model's levels should fall with
/// ([`expected`] without its cause).
pub fn expected_order(model: &Model, edges: &EdgeReport) -> f64 {
    expected(model, edges).order
}

/// Whether the levels' error is a smooth function of the spacing on grids
/// like the one `edges` describes: not when a jump, kink or weak break lies
/// between grid points.
pub fn smoothness(edges: &EdgeReport) -> Smoothness {
    let off = |set: &[f64], aligned: bool| !set.is_empty() && !aligned;
    if off(&edges.positions, edges.aligned)
        || off(&edges.kinks, edges.kinks_aligned)
        || off(&edges.weak_breaks, edges.weak_aligned)
    {
        Smoothness::Erratic
    } else {
        Smoothness::Smooth
    }
}
