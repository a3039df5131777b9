//! The uniform grid on the domain.
//!
//! With hard walls the unknowns are the interior points
//! `x_i = from + i h`, `i = 1..=N`, `h = L / (N + 1)`: `psi` is zero at both
//! walls and `points` counts the unknowns. On a ring the unknowns are
//! `x_i = from + i h`, `i = 0..N`, `h = L / N`.

pub mod align;
pub mod kink;
mod stencil;

pub use kink::Corner;
pub use stencil::{dispersion, fornberg, second_derivative_weights, Order};

use serde::Serialize;

/// Boundary condition of the domain.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Boundary {
    /// `psi = 0` at both ends (a box with hard walls).
    Walls,
    /// A ring: `psi(from) = psi(to)`.
    Periodic,
}

/// The interval the particle lives on.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Domain {
    /// Left end, Å.
    pub from: f64,
    /// Right end, Å (`to > from`).
    pub to: f64,
    /// Walls or a ring.
    pub boundary: Boundary,
}

impl Domain {
    /// Length `to - from`, Å.
    pub fn length(&self) -> f64 {
        self.to - self.from
    }
}

/// The discretisation of the kinetic energy.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Scheme {
    /// Central finite differences of the grid's order.
    FiniteDifference,
    /// Numerov's fourth-order scheme in matrix form.
    Numerov,
}

/// A uniform grid of unknowns.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    /// Left end of the domain, Å.
    pub from: f64,
    /// Spacing, Å.
    pub spacing: f64,
    /// Number of unknowns.
    pub points: usize,
    /// Walls or ring.
    pub boundary: Boundary,
}

impl Grid {
    /// A grid of `points` unknowns on `domain`.
    pub fn with_points(domain: &Domain, points: usize) -> Self {
        let steps = match domain.boundary {
            Boundary::Walls => points + 1,
            Boundary::Periodic => points,
        };
        Self {
            from: domain.from,
            spacing: domain.length() / steps as f64,
            points,
            boundary: domain.boundary,
        }
    }

    /// The grid whose spacing is closest to `spacing` (Å) with whole steps.
    pub fn with_spacing(domain: &Domain, spacing: f64) -> Self {
        let steps = (domain.length() / spacing).round().max(2.0) as usize;
        let points = match domain.boundary {
            Boundary::Walls => steps - 1,
            Boundary::Periodic => steps,
        };
        Self::with_points(domain, points.max(3))
    }

    /// A grid of `steps` steps (intervals) on `domain`: `steps - 1` unknowns
    /// with walls, `steps` on a ring.
    pub fn with_steps(domain: &Domain, steps: usize) -> Self {
        let points = match domain.boundary {
            Boundary::Walls => steps.saturating_sub(1),
            Boundary::Periodic => steps,
        };
        Self::with_points(domain, points)
    }

    /// Number of steps (intervals) across the domain.
    pub fn steps(&self) -> usize {
        match self.boundary {
            Boundary::Walls => self.points + 1,
            Boundary::Periodic => self.points,
        }
    }

    /// Position of unknown `i` (0-based), Å.
    pub fn x(&self, i: usize) -> f64 {
        match self.boundary {
            Boundary::Walls => self.from + (i + 1) as f64 * self.spacing,
            Boundary::Periodic => self.from + i as f64 * self.spacing,
        }
    }

    /// Positions of all unknowns, Å.
    pub fn positions(&self) -> Vec<f64> {
        (0..self.points).map(|i| self.x(i)).collect()
    }
}
