//! Per-state observables: the normalisation and sign convention, the node
//! count, position moments and the classically allowed regions.
//!
//! # Conventions
//! Samples `psi[i]` sit at the unknowns' positions `x[i]` of a uniform grid
//! with spacing `h` (Å). The grid integral of a function `f` is
//! `h * sum_i f_i`: for hard walls this is the trapezoid rule with the zero
//! end values at the walls left out, for a periodic ring the same sum over
//! one period. A state is normalised when `h * sum_i psi_i^2 = 1` (so `psi`
//! carries units of Å^-1/2).
//!
//! Eigenvectors are only fixed up to a sign. To make output reproducible the
//! sign is chosen so that the first *non-negligible* sample from the left,
//! the first `i` with `|psi_i| > SIGN_THRESHOLD * max|psi|`, is positive. The
//! threshold keeps exponentially small tail values (whose sign is round-off)
//! from deciding the sign.
//!
//! The classically allowed region of a level `E` is `{x : V(x) <= E}`; its end
//! points (the classical turning points) are found by linear interpolation of
//! `V` between neighbouring grid points, the usual textbook construction
//! (e.g. D. J. Griffiths, *Introduction to Quantum Mechanics*, the chapter
//! on the WKB approximation).

use serde::Serialize;

/// Fraction of `max|psi|` a sample must exceed to take part in the sign rule
/// of [`normalise`] (1e-3).
pub const SIGN_THRESHOLD: f64 = 1e-3;

/// Fraction of `max|psi|` at or below which samples are skipped by
/// [`count_nodes`] (1e-6).
pub const NODE_THRESHOLD: f64 = 1e-6;

/// Largest absolute value in `values`, ignoring NaN; 0 for an empty slice.
fn max_abs(values: &[f64]) -> f64 {
    values.iter().fold(0.0_f64, |acc, v| acc.max(v.abs()))
}

/// Normalises `psi` in place so that `h * sum psi_i^2 = 1` and applies the
/// sign rule: the first sample with `|psi_i| > SIGN_THRESHOLD * max|psi|` is
/// made positive.
///
/// `h` is the grid spacing in Å (must be positive). When the norm cannot be
/// formed (all samples zero, `h <= 0`, or a non-finite sample) `psi` is left
/// unchanged; no panic is possible.
pub fn normalise(psi: &mut [f64], h: f64) {
    let sum_sq: f64 = psi.iter().map(|p| p * p).sum();
    let norm = (h * sum_sq).sqrt();
    if !(norm.is_finite() && norm > 0.0) {
        return;
    }
    let peak = max_abs(psi);
    let leading = psi
        .iter()
        .copied()
        .find(|p| p.abs() > SIGN_THRESHOLD * peak)
        .unwrap_or(0.0);
    let scale = if leading < 0.0 {
        -1.0 / norm
    } else {
        1.0 / norm
    };
    for p in psi.iter_mut() {
        *p *= scale;
    }
}

/// Number of nodes (sign changes) of the sampled function `psi`.
///
/// Samples with `|psi_i| <= NODE_THRESHOLD * max|psi|` (1e-6 of the peak) are
/// skipped and the signs of the remaining samples are compared in order. This
/// ignores round-off wiggles in decaying tails and zero samples that fall
/// exactly on a node, while a genuine node is still counted even when the
/// function is tiny around it (e.g. the node of the odd state of a double
/// well under a high barrier), because the significant lobes on both sides
/// still differ in sign. The one case it cannot see is a pair of nodes
/// enclosing a lobe that never exceeds the threshold. An all-zero or empty
/// `psi` has 0 nodes. The ground state has 0 nodes and level `n` of a 1D
/// potential with hard walls has `n - 1`.
pub fn count_nodes(psi: &[f64]) -> usize {
    let peak = max_abs(psi);
    if !(peak.is_finite() && peak > 0.0) {
        return 0;
    }
    let floor = NODE_THRESHOLD * peak;
    let mut last_positive: Option<bool> = None;
    let mut nodes = 0;
    for &p in psi {
        if p.abs() > floor {
            let positive = p > 0.0;
            if let Some(previous) = last_positive {
                if previous != positive {
                    nodes += 1;
                }
            }
            last_positive = Some(positive);
        }
    }
    nodes
}

/// Probability density `psi_i^2` at each grid point, in Å^-1 for a state
/// normalised by [`normalise`].
pub fn density(psi: &[f64]) -> Vec<f64> {
    psi.iter().map(|p| p * p).collect()
}

/// Position moments and classically allowed regions of one level.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StateSummary {
    /// Level number, counted from 1 for the lowest level.
    pub n: usize,
    /// Mean position `<x>` in Å.
    pub mean_x: f64,
    /// Mean square position `<x^2>` in Å^2.
    pub mean_x2: f64,
    /// Spread `sqrt(<x^2> - <x>^2)` in Å.
    pub spread: f64,
    /// Classically allowed intervals `{x : V(x) <= E}` as `(start, end)` in Å,
    /// ordered from left to right (see [`allowed_intervals`]).
    pub allowed: Vec<(f64, f64)>,
}

/// Summarises level `n` with energy `energy` (eV) on the grid `x` (Å) with
/// potential `v` (eV) and samples `psi`; `h` is the grid spacing (Å).
///
/// The moments are grid integrals divided by the grid norm `h * sum psi^2`,
/// so a `psi` that is not yet normalised gives the same result. The spread
/// is computed as `sqrt(<(x - <x>)^2>)` in a second pass, which equals
/// `sqrt(<x^2> - <x>^2)` but does not lose digits when `|<x>|` is large
/// compared with the spread. An all-zero `psi` gives NaN moments. The slices
/// should have equal lengths; extra entries of a longer slice are ignored.
/// For a periodic ring `<x>` is taken over the period as sampled, so it
/// depends on where the period starts.
pub fn summarise(n: usize, x: &[f64], v: &[f64], psi: &[f64], h: f64, energy: f64) -> StateSummary {
    let mut norm = 0.0;
    let mut first = 0.0;
    let mut second = 0.0;
    for (&xi, &pi) in x.iter().zip(psi) {
        let w = pi * pi;
        norm += w;
        first += w * xi;
        second += w * xi * xi;
    }
    let norm = h * norm;
    let mean_x = h * first / norm;
    let mean_x2 = h * second / norm;
    let centred: f64 = x
        .iter()
        .zip(psi)
        .map(|(&xi, &pi)| {
            let d = xi - mean_x;
            pi * pi * d * d
        })
        .sum();
    let spread = (h * centred / norm).max(0.0).sqrt();
    StateSummary {
        n,
        mean_x,
        mean_x2,
        spread,
        allowed: allowed_intervals(x, v, energy),
    }
}

/// Point between `(xa, va)` and `(xb, vb)` where the linear interpolant of
/// `V` equals `energy`; `fallback` when that is undefined (NaN potential).
fn crossing(xa: f64, xb: f64, va: f64, vb: f64, energy: f64, fallback: f64) -> f64 {
    let t = (energy - va) / (vb - va);
    if t.is_finite() {
        xa + t.clamp(0.0, 1.0) * (xb - xa)
    } else {
        fallback
    }
}

/// Classically allowed intervals `{x : V(x) <= energy}` on the grid `x` (Å,
/// ascending) with potential `v` (eV).
///
/// Interior end points are found by linear interpolation of `V` between the
/// two grid points that straddle the level. Intervals are clipped to the
/// sampled span `[x[0], x[last]]`: for hard walls the walls themselves lie
/// one spacing further out, so an interval reaching a wall ends at the
/// outermost interior point. On a periodic ring a region that wraps around
/// the seam is reported as two intervals, one at each end. A NaN potential
/// value counts as forbidden. Extra entries of the longer slice are ignored.
pub fn allowed_intervals(x: &[f64], v: &[f64], energy: f64) -> Vec<(f64, f64)> {
    let len = x.len().min(v.len());
    let mut intervals = Vec::new();
    if len == 0 {
        return intervals;
    }
    let mut start = (v[0] <= energy).then_some(x[0]);
    for i in 1..len {
        let was_inside = v[i - 1] <= energy;
        let inside = v[i] <= energy;
        if inside && !was_inside {
            start = Some(crossing(x[i - 1], x[i], v[i - 1], v[i], energy, x[i]));
        } else if was_inside && !inside {
            let end = crossing(x[i - 1], x[i], v[i - 1], v[i], energy, x[i - 1]);
            if let Some(s) = start.take() {
                intervals.push((s, end));
            }
        }
    }
    if let Some(s) = start {
        intervals.push((s, x[len - 1]));
    }
    intervals
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;
    use std::f64::consts::PI;

    /// Interior points of a hard-wall box [0, length] with `points` unknowns.
    fn box_grid(length: f64, points: usize) -> (Vec<f64>, f64) {
        let h = length / (points + 1) as f64;
        ((1..=points).map(|i| i as f64 * h).collect(), h)
    }

    #[test]
    fn normalise_sets_unit_grid_norm_and_positive_first_lobe() {
        let (x, h) = box_grid(10.0, 999);
        // Level 2 with its first lobe negative and an arbitrary scale.
        let mut psi: Vec<f64> = x
            .iter()
            .map(|&xi| -3.7 * (2.0 * PI * xi / 10.0).sin())
            .collect();
        normalise(&mut psi, h);
        let norm: f64 = h * psi.iter().map(|p| p * p).sum::<f64>();
        assert_relative_eq!(norm, 1.0, max_relative = 1e-13); // definition
                                                              // Discrete sine orthogonality: h * sum sin^2 = L/2 exactly, so the
                                                              // normalised amplitude is sqrt(2/L) (closed form).
        let expected = (2.0_f64 / 10.0).sqrt() * (2.0 * PI * x[100] / 10.0).sin();
        assert_relative_eq!(psi[100], expected, max_relative = 1e-12);
        assert!(psi[0] > 0.0);
    }

    #[test]
    fn sign_rule_ignores_negligible_leading_tail() {
        // A tail value of -1e-9 (below 1e-3 of the peak) must not decide the
        // sign; the first real lobe is negative, so the state is flipped.
        let mut psi = vec![-1e-9, 1e-9, -0.2, -1.0, -0.3, 0.1];
        normalise(&mut psi, 0.5);
        assert!(psi[2] > 0.0 && psi[3] > 0.0);
        assert!(psi[0] > 0.0); // the tail is flipped along with everything
    }

    #[test]
    fn normalise_leaves_zero_vector_alone() {
        let mut psi = vec![0.0; 5];
        normalise(&mut psi, 0.1);
        assert!(psi.iter().all(|&p| p == 0.0));
        let mut psi = vec![1.0, 2.0];
        normalise(&mut psi, -1.0);
        assert_eq!(psi, vec![1.0, 2.0]);
    }

    #[test]
    fn count_nodes_of_box_states_is_n_minus_one() {
        let (x, _) = box_grid(7.0, 499);
        for n in 1..=12 {
            let psi: Vec<f64> = x
                .iter()
                .map(|&xi| (n as f64 * PI * xi / 7.0).sin())
                .collect();
            assert_eq!(count_nodes(&psi), n - 1, "level {n}"); // closed form
        }
    }

    #[test]
    fn count_nodes_not_fooled_by_tail_noise() {
        // Level 3 of a box followed by a long tail of alternating 1e-14
        // round-off noise (as in a deep well embedded in a wider domain).
        let (x, _) = box_grid(5.0, 300);
        let mut psi: Vec<f64> = x.iter().map(|&xi| (3.0 * PI * xi / 5.0).sin()).collect();
        psi.extend((0..80).map(|i| if i % 2 == 0 { 1e-14 } else { -1e-14 }));
        let mut front: Vec<f64> = (0..40)
            .map(|i| if i % 3 == 0 { -1e-14 } else { 1e-14 })
            .collect();
        front.extend(psi);
        assert_eq!(count_nodes(&front), 2);
        // A state with values exactly zero on the node grid points.
        assert_eq!(count_nodes(&[0.0, 1.0, 0.0, -1.0, 0.0]), 1);
        assert_eq!(count_nodes(&[]), 0);
        assert_eq!(count_nodes(&[0.0, 0.0]), 0);
    }

    #[test]
    fn count_nodes_sees_node_under_high_barrier() {
        // Odd double-well state: the node region is 1e-8 of the peak, below
        // the threshold, but the lobes on both sides differ in sign.
        let psi = [0.0, 0.5, 1.0, 0.5, 1e-8, -1e-8, -0.5, -1.0, -0.5, 0.0];
        assert_eq!(count_nodes(&psi), 1);
    }

    #[test]
    fn density_squares() {
        assert_eq!(density(&[-2.0, 0.5]), vec![4.0, 0.25]);
    }

    #[test]
    fn harmonic_turning_points_match_closed_form() {
        // V = (hbar w)^2 x^2 / (4 kinetic), E_n = hbar w (n + 1/2); turning
        // points x_t = sqrt(4 kinetic E) / (hbar w) (closed form, from
        // V(x_t) = E).
        let kinetic = 3.81;
        let hw = 0.5;
        let h = 0.01;
        let x: Vec<f64> = (-2000..=2000).map(|i| i as f64 * h).collect();
        let v: Vec<f64> = x
            .iter()
            .map(|&xi| hw * hw * xi * xi / (4.0 * kinetic))
            .collect();
        for n in 0..5 {
            let e = hw * (n as f64 + 0.5);
            let xt = (4.0 * kinetic * e).sqrt() / hw;
            let s = summarise(n + 1, &x, &v, &vec![1.0; x.len()], h, e);
            assert_eq!(s.allowed.len(), 1);
            // Linear interpolation of a parabola: error below h^2/(8 x_t).
            assert_relative_eq!(s.allowed[0].0, -xt, epsilon = 1e-5);
            assert_relative_eq!(s.allowed[0].1, xt, epsilon = 1e-5);
        }
    }

    #[test]
    fn allowed_regions_of_double_well_and_clipping() {
        let x: Vec<f64> = (0..=10).map(f64::from).collect();
        // Two wells with a barrier in the middle; edges are allowed.
        let v = [0.0, 0.0, 1.0, 2.0, 1.0, 3.0, 1.0, 2.0, 1.0, 0.0, 0.0];
        let got = allowed_intervals(&x, &v, 1.5);
        // By hand: [0, 2.5], [3.5, 4.25], [5.75, 6.5], [7.5, 10].
        let expected = [(0.0, 2.5), (3.5, 4.25), (5.75, 6.5), (7.5, 10.0)];
        assert_eq!(got.len(), expected.len());
        for (g, e) in got.iter().zip(expected) {
            assert_relative_eq!(g.0, e.0, epsilon = 1e-12);
            assert_relative_eq!(g.1, e.1, epsilon = 1e-12);
        }
        assert!(allowed_intervals(&x, &v, -1.0).is_empty());
        assert_eq!(allowed_intervals(&x, &v, 5.0), vec![(0.0, 10.0)]);
    }

    #[test]
    fn moments_of_a_box_ground_state() {
        // Box [0, L] ground state: <x> = L/2, <x^2> = L^2 (1/3 - 1/(2 pi^2))
        // (Griffiths, Problem 2.4).
        let length = 4.0;
        let (x, h) = box_grid(length, 4000);
        let mut psi: Vec<f64> = x.iter().map(|&xi| (PI * xi / length).sin()).collect();
        normalise(&mut psi, h);
        let v = vec![0.0; x.len()];
        let s = summarise(1, &x, &v, &psi, h, 1.0);
        let x2 = length * length * (1.0 / 3.0 - 1.0 / (2.0 * PI * PI));
        assert_relative_eq!(s.mean_x, length / 2.0, max_relative = 1e-12);
        assert_relative_eq!(s.mean_x2, x2, max_relative = 1e-6);
        assert_relative_eq!(s.spread, (x2 - 4.0).sqrt(), max_relative = 1e-5);
        assert_eq!(s.allowed, vec![(x[0], x[x.len() - 1])]);
    }

    proptest! {
        #[test]
        fn normalise_is_idempotent_and_unit(
            values in prop::collection::vec(-10.0f64..10.0, 2..60),
            h in 0.01f64..2.0,
        ) {
            prop_assume!(values.iter().any(|v| v.abs() > 1e-3));
            let mut psi = values.clone();
            normalise(&mut psi, h);
            let norm: f64 = h * psi.iter().map(|p| p * p).sum::<f64>();
            prop_assert!((norm - 1.0).abs() < 1e-12);
            let peak = max_abs(&psi);
            let lead = psi.iter().find(|p| p.abs() > SIGN_THRESHOLD * peak).copied();
            prop_assert!(lead.unwrap_or(1.0) > 0.0);
            let again = {
                let mut p = psi.clone();
                normalise(&mut p, h);
                p
            };
            for (a, b) in psi.iter().zip(&again) {
                prop_assert!((a - b).abs() < 1e-12 * peak.max(1.0));
            }
            // Node count does not depend on sign or scale.
            let flipped: Vec<f64> = values.iter().map(|v| -2.5 * v).collect();
            prop_assert_eq!(count_nodes(&values), count_nodes(&flipped));
        }
    }
}
