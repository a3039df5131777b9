//! Laying the grid so that the potential's jumps fall on grid points.
//!
//! A jump in V(x) between grid points makes the finite-difference error of
//! the levels erratic in h (it depends on where the jump falls between two
//! points), which defeats Richardson extrapolation. With every jump on a grid
//! point, and V there taken as the mean of its two sides, the error is again
//! a smooth function of h (the same reason the composite trapezoid rule keeps
//! its Euler–Maclaurin expansion on each smooth piece), though of order 2
//! whatever the stencil's order. The grid keeps this property when the
//! spacing is halved, so a whole Richardson sequence stays aligned.

use crate::grid::{Boundary, Domain};

/// How far above the wanted number of steps the search may go (10 %).
pub const SEARCH_SLACK: f64 = 0.10;

/// Edges strictly inside the domain (a jump at a wall changes nothing).
pub fn interior_edges(domain: &Domain, edges: &[f64]) -> Vec<f64> {
    let tol = 1e-12 * domain.length();
    let mut e: Vec<f64> = edges
        .iter()
        .copied()
        .filter(|&s| s.is_finite() && s > domain.from + tol && s < domain.to - tol)
        .collect();
    if domain.boundary == Boundary::Periodic {
        // On a ring the ends are the same point, which is a grid point.
        e.retain(|&s| (s - domain.from).abs() > tol);
    }
    e
}

/// Whether a grid of `steps` steps on the domain has a point at every edge.
pub fn is_aligned(domain: &Domain, edges: &[f64], steps: usize) -> bool {
    edges.iter().all(|&s| {
        let f = (s - domain.from) / domain.length() * steps as f64;
        (f - f.round()).abs() <= 1e-9 * steps as f64
    })
}

/// The smallest number of steps `M >= wanted`, within [`SEARCH_SLACK`] of
/// `wanted`, such that the grid of `M / multiple` steps (and so every grid of
/// `M / 2^j` steps down to it) has a point at every edge; `None` when there is
/// none (edges at incommensurate positions).
pub fn aligned_steps(
    domain: &Domain,
    edges: &[f64],
    wanted: usize,
    multiple: usize,
) -> Option<usize> {
    aligned_steps_within(domain, edges, wanted, multiple, SEARCH_SLACK)
}

/// Like [`aligned_steps`], searching up to `slack` (a fraction of
/// `wanted`) above `wanted`.
pub fn aligned_steps_within(
    domain: &Domain,
    edges: &[f64],
    wanted: usize,
    multiple: usize,
    slack: f64,
) -> Option<usize> {
    let multiple = multiple.max(1);
    // Step counts near usize::MAX (a huge domain at a fine spacing) cannot
    // be searched; the caller's limits refuse such grids.
    // Beyond 2^52 steps a grid position is no longer exact in f64, so
    // alignment means nothing there.
    if wanted > 1usize << 52 {
        return None;
    }
    let start = wanted.div_ceil(multiple).checked_mul(multiple)?;
    let above = (wanted as f64) * (1.0 + slack);
    if above.is_nan() || above >= usize::MAX as f64 {
        return None;
    }
    let stop = (above.ceil() as usize).checked_add(multiple)?;
    let mut m = start;
    let mut tries = 0;
    while m <= stop && tries < 200_000 {
        if is_aligned(domain, edges, m / multiple) {
            return Some(m);
        }
        m = m.checked_add(multiple)?;
        tries += 1;
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d() -> Domain {
        Domain {
            from: -15.0,
            to: 15.0,
            boundary: Boundary::Walls,
        }
    }

    #[test]
    fn finds_a_multiple_of_the_edge_denominator() {
        // Edges at -3 and 3 sit at 12/30 and 18/30 = 2/5 and 3/5 of the domain.
        let edges = interior_edges(&d(), &[-3.0, 3.0, -15.0]);
        assert_eq!(edges.len(), 2);
        let m = aligned_steps(&d(), &edges, 2001, 4).unwrap();
        assert_eq!(m % 20, 0, "{m}");
        assert!((2001..2201).contains(&m));
        assert!(is_aligned(&d(), &edges, m / 2));
        assert!(is_aligned(&d(), &edges, m / 4));
    }

    #[test]
    fn huge_step_counts_find_nothing_and_do_not_overflow() {
        let edges = [1.0];
        assert!(aligned_steps(&d(), &edges, usize::MAX, 4).is_none());
        assert!(aligned_steps(&d(), &edges, usize::MAX - 3, 4).is_none());
        assert!(aligned_steps(&d(), &edges, usize::MAX / 2, 4).is_none());
    }

    #[test]
    fn incommensurate_edges_find_nothing_nearby() {
        let edges = [std::f64::consts::PI];
        assert!(aligned_steps(&d(), &edges, 1000, 4).is_none());
    }
}
