//! Band edges, gaps and effective masses.
//!
//! **Extrema.** Each band's bottom and top are first located on the sampled
//! k grid of a [`BandStructure`] and then refined by solving `H_k` at nearby
//! wavevectors. Bands of a 1D crystal are even in `k` and periodic with
//! `2 pi / a`, so `k = 0` and `k = pi / a` are always stationary points and
//! extrema almost always sit there (Ashcroft & Mermin, *Solid State Physics*,
//! ch. 8-9). A grid extremum at `0` or `pi / a` is kept there (exactly) when a
//! probe a little inside confirms it is locally extremal; otherwise, and for
//! any grid extremum inside the zone, the position is refined by golden-section
//! search (J. Kiefer, Proc. Am. Math. Soc. 4, 502 (1953); Press et al.,
//! *Numerical Recipes*, 3rd ed., sec. 10.2) on the bracket formed by the two
//! grid neighbours, clipped to `[0, pi / a]`.
//!
//! **Effective mass.** `m* / m_e = (hbar^2 / m_e) / E''(k) = 2 (hbar^2 / 2 m_e)
//! / E''(k)` with `hbar^2 / 2 m_e` from `constants::hbar2_over_2me_ev_a2()`
//! (Kittel, *Introduction to Solid State Physics*, ch. 8). It is in electron
//! masses whatever the `kinetic` prefactor of the cell, and negative at a
//! band top. `E''` comes from the centred second difference
//! `(E(k+dk) + E(k-dk) - 2 E(k)) / dk^2`; at `k = 0` or `pi / a` the evenness
//! `E(k0 + dk) = E(k0 - dk)` turns it into `2 (E(k0 +- dk) - E(k0)) / dk^2`
//! (one extra solve per step, staying inside the zone).
//!
//! *Choice of step.* The difference has truncation error `E'''' dk^2 / 12` and
//! round-off error about `4 delta / dk^2`, where `delta` is the absolute
//! round-off of one eigenvalue. The fourth derivative is not known in
//! advance: near a small gap `Delta` it is huge (the band bends over on the
//! scale `kappa ~ Delta / (2 t pi / a)`), away from gaps it is of order
//! `E'' a^2`. So the step is not fixed but walked down: `dk_n = dk_0 / 2^n`
//! with `dk_0 = 0.1 pi / a`, each estimate improved by one Richardson step
//! `R_n = (4 D_n - D_{n-1}) / 3` (L. F. Richardson, Phil. Trans. R. Soc. A 226,
//! 299 (1927)), stopping when two successive `R_n` agree to `1e-7` relative
//! (the step is then small enough for the truncation error) or when the
//! round-off bound `8 delta / dk^2` reaches `1e-3 |D_n|` (any smaller step
//! would be dominated by round-off). `delta` is estimated as
//! `M * eps * ||H||` with the bound `||H|| <= (t / h^2) sum |c_d| + max |V|`.
//! The estimate with the smallest change is kept if that change is below
//! `1e-4` relative (plus the round-off bound); otherwise the curvature is
//! reported as unresolved (`None`).
//!
//! **Degenerate edges.** Where a band touches its neighbour (e.g. the free
//! particle at `k = pi / a`), `E` has a kink and `E''` is meaningless: the
//! mass is `None`. Levels are called touching when they differ by less than
//! `100 delta`: about `2e-8` eV for `M = 64` and `1.5e-6` eV for `M = 400`
//! (order 8, `a = 2.8` Å), where exactly degenerate free-particle levels
//! were measured split by only `1e-12` and `1e-10` eV. A genuine gap smaller
//! than that is reported as touching.
//!
//! **Interior extrema.** For the continuum 1D Schroedinger equation every
//! band is monotonic between `0` and `pi / a` (W. Kohn, Phys. Rev. 115, 809
//! (1959)), so the golden-section branch is a safeguard for unusual stencils
//! or user-built structures; it is tested on synthetic band functions.

use rayon::prelude::*;
use serde::Serialize;

use super::bloch::{solve_validated, BandStructure, CellProblem};
use crate::constants::hbar2_over_2me_ev_a2;

/// The bottom or top of one band.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BandEdge {
    /// Band number, 1-based (band 1 is the lowest).
    pub band: usize,
    /// Energy of the extremum in eV (refined, not just the grid value).
    pub energy: f64,
    /// Wavevector of the extremum in 1/Å, inside `[0, pi / a]`; exactly `0` or
    /// `pi / a` when the extremum is at the zone centre or edge.
    pub k: f64,
    /// Effective mass `m* / m_e` in electron masses (negative at a band top),
    /// or `None` when the band touches a neighbour there or the curvature
    /// could not be resolved.
    pub effective_mass: Option<f64>,
}

/// The energy gap between two consecutive bands.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Gap {
    /// Band number (1-based) below the gap.
    pub below: usize,
    /// Band number (1-based) above the gap, `below + 1`.
    pub above: usize,
    /// Gap size in eV: bottom of `above` minus top of `below`.
    pub size: f64,
    /// Top of band `below`.
    pub lower_edge: BandEdge,
    /// Bottom of band `above`.
    pub upper_edge: BandEdge,
    /// Whether both edges sit at the same wavevector (within `1e-6 pi / a`).
    pub direct: bool,
}

/// Which extremum of a band is sought.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Extremum {
    Bottom,
    Top,
}

impl Extremum {
    /// `+1` for a minimum, `-1` for a maximum: `sign * E` is minimised.
    fn sign(self) -> f64 {
        match self {
            Extremum::Bottom => 1.0,
            Extremum::Top => -1.0,
        }
    }
}

/// Bottom and top of every band in `bands`, refined and with effective
/// masses (see the module docs for the method).
///
/// `cell` must be the cell `bands` was computed from. Returns one
/// `(bottom, top)` pair per band. If the k grid is empty or a band's length
/// differs from it, the result is empty. If `cell` is invalid the grid
/// extrema are returned unrefined with `effective_mass: None`. Bands are
/// processed in parallel (deterministically).
pub fn band_edges(cell: &CellProblem, bands: &BandStructure) -> Vec<(BandEdge, BandEdge)> {
    let n = bands.k.len();
    if n == 0 || bands.bands.iter().any(|b| b.len() != n) {
        return Vec::new();
    }
    let refine = cell.validate().is_ok() && n >= 2;
    (0..bands.bands.len())
        .into_par_iter()
        .map(|b| {
            (
                edge_of(cell, bands, b, Extremum::Bottom, refine),
                edge_of(cell, bands, b, Extremum::Top, refine),
            )
        })
        .collect()
}

/// Gaps between consecutive bands of `bands` larger than `min_size` (eV).
///
/// Uses [`band_edges`]. A gap is listed when its size exceeds both `min_size`
/// and the round-off level at which two levels count as touching (see the
/// module docs), so touching bands never give a spurious tiny gap even with
/// `min_size = 0`.
pub fn gaps(cell: &CellProblem, bands: &BandStructure, min_size: f64) -> Vec<Gap> {
    let edges = band_edges(cell, bands);
    let threshold = touching_tolerance(cell);
    let kmax = bands.k.last().copied().unwrap_or(0.0);
    edges
        .windows(2)
        .filter_map(|pair| {
            let top = &pair[0].1;
            let bottom = &pair[1].0;
            let size = bottom.energy - top.energy;
            let keep = size > min_size && size > threshold;
            keep.then(|| Gap {
                below: top.band,
                above: bottom.band,
                size,
                direct: (top.k - bottom.k).abs() <= 1e-6 * kmax,
                lower_edge: top.clone(),
                upper_edge: bottom.clone(),
            })
        })
        .collect()
}

/// Energy difference (eV) below which two levels are taken as touching.
fn touching_tolerance(cell: &CellProblem) -> f64 {
    if cell.validate().is_ok() {
        100.0 * cell.eigenvalue_noise()
    } else {
        0.0
    }
}

/// Locates, refines and characterises one extremum of band `b` (0-based).
fn edge_of(
    cell: &CellProblem,
    bands: &BandStructure,
    b: usize,
    kind: Extremum,
    refine: bool,
) -> BandEdge {
    let s = kind.sign();
    let ks = &bands.k;
    let es = &bands.bands[b];
    let n = ks.len();
    let mut best = 0;
    for i in 1..n {
        if s * es[i] < s * es[best] {
            best = i;
        }
    }
    let grid_edge = BandEdge {
        band: b + 1,
        energy: es[best],
        k: ks[best],
        effective_mass: None,
    };
    if !refine {
        return grid_edge;
    }
    let energy_at = |k: f64| -> Option<f64> {
        solve_validated(cell, k, b + 1)
            .ok()
            .and_then(|v| v.get(b).copied())
    };
    let kmax = ks[n - 1];
    let noise = cell.eigenvalue_noise();
    let (k_star, e_star) = match locate(&energy_at, ks, es, best, s, noise) {
        Some(found) => found,
        None => return grid_edge,
    };
    let at_zone_point = k_star == 0.0 || k_star == kmax;
    let effective_mass = if touches_neighbour(cell, k_star, b) {
        None
    } else {
        let direction = if k_star == kmax { -1.0 } else { 1.0 };
        curvature(
            &energy_at,
            k_star,
            e_star,
            at_zone_point,
            direction,
            0.1 * cell.zone_edge(),
            noise,
        )
        .filter(|d2| s * d2 > 0.0)
        .map(|d2| 2.0 * hbar2_over_2me_ev_a2() / d2)
        .filter(|m| m.is_finite())
    };
    BandEdge {
        band: b + 1,
        energy: e_star,
        k: k_star,
        effective_mass,
    }
}

/// Refines the grid extremum at index `i` of `(ks, es)`; `s * E` is minimised.
/// Returns `(k, E)`; `None` only if a solve fails.
fn locate<F: Fn(f64) -> Option<f64>>(
    energy_at: &F,
    ks: &[f64],
    es: &[f64],
    i: usize,
    s: f64,
    noise: f64,
) -> Option<(f64, f64)> {
    let n = ks.len();
    let (k0, kmax) = (ks[0], ks[n - 1]);
    if i == 0 || i == n - 1 {
        // Stationary by symmetry; confirm it is locally extremal with a probe
        // a thousandth of a grid step inside the zone.
        let inner = if i == 0 { ks[1] } else { ks[n - 2] };
        let probe = ks[i] + 1e-3 * (inner - ks[i]);
        let e_probe = energy_at(probe)?;
        if s * e_probe >= s * es[i] - noise {
            return Some((ks[i], es[i]));
        }
    }
    let lo = ks[i.saturating_sub(1)];
    let hi = ks[(i + 1).min(n - 1)];
    let g = |k: f64| energy_at(k).map(|e| s * e);
    let (k_gs, f_gs) = golden_section_min(&g, lo, hi, 1e-7 * (kmax - k0).abs())?;
    let mut result = (ks[i], es[i]);
    if f_gs < s * es[i] {
        result = (k_gs, s * f_gs);
    }
    // Snap to a zone point when the search ran into it.
    for zone_k in [k0, kmax] {
        if (result.0 - zone_k).abs() <= 1e-6 * (kmax - k0).abs() {
            let e = energy_at(zone_k)?;
            if s * e <= s * result.1 + noise {
                result = (zone_k, e);
            }
        }
    }
    Some(result)
}

/// Golden-section search for the minimum of `g` on `[lo, hi]`, to a bracket
/// narrower than `tol`. Returns the best point seen and its value.
fn golden_section_min<G: Fn(f64) -> Option<f64>>(
    g: &G,
    lo: f64,
    hi: f64,
    tol: f64,
) -> Option<(f64, f64)> {
    let ratio = (5.0_f64.sqrt() - 1.0) / 2.0; // 1 / golden ratio
    let (mut a, mut b) = (lo.min(hi), lo.max(hi));
    let mut c = b - ratio * (b - a);
    let mut d = a + ratio * (b - a);
    let mut fc = g(c)?;
    let mut fd = g(d)?;
    for _ in 0..200 {
        if b - a <= tol {
            break;
        }
        if fc <= fd {
            b = d;
            d = c;
            fd = fc;
            c = b - ratio * (b - a);
            fc = g(c)?;
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + ratio * (b - a);
            fd = g(d)?;
        }
    }
    Some(if fc <= fd { (c, fc) } else { (d, fd) })
}

/// Whether band `b` (0-based) touches band `b - 1` or `b + 1` at `k`.
fn touches_neighbour(cell: &CellProblem, k: f64, b: usize) -> bool {
    let want = (b + 2).min(cell.points());
    let levels = match solve_validated(cell, k, want) {
        Ok(v) => v,
        Err(_) => return false,
    };
    let tol = touching_tolerance(cell);
    let close = |x: Option<&f64>, y: Option<&f64>| match (x, y) {
        (Some(x), Some(y)) => (x - y).abs() <= tol,
        _ => false,
    };
    (b > 0 && close(levels.get(b - 1), levels.get(b))) || close(levels.get(b), levels.get(b + 1))
}

/// Second derivative `E''(k0)` in eV Å² by walked-down finite differences
/// with Richardson extrapolation (module docs). `symmetric` uses the evenness
/// about `k0` with the single side `direction` (`+1` or `-1`).
fn curvature<F: Fn(f64) -> Option<f64>>(
    energy_at: &F,
    k0: f64,
    e0: f64,
    symmetric: bool,
    direction: f64,
    dk0: f64,
    noise: f64,
) -> Option<f64> {
    let estimate = |dk: f64| -> Option<f64> {
        if symmetric {
            Some(2.0 * (energy_at(k0 + direction * dk)? - e0) / (dk * dk))
        } else {
            Some((energy_at(k0 + dk)? + energy_at(k0 - dk)? - 2.0 * e0) / (dk * dk))
        }
    };
    let mut dk = dk0;
    let mut prev_d = estimate(dk)?;
    let mut prev_r: Option<f64> = None;
    // (change between successive Richardson values, value, round-off bound)
    let mut best: Option<(f64, f64, f64)> = None;
    for _ in 0..60 {
        dk *= 0.5;
        let d = estimate(dk)?;
        let r = (4.0 * d - prev_d) / 3.0;
        let roundoff = 8.0 * noise / (dk * dk);
        if let Some(pr) = prev_r {
            let change = (r - pr).abs();
            if best.is_none_or(|(c, _, _)| change < c) {
                best = Some((change, r, roundoff));
            }
            if change <= 1e-7 * r.abs() {
                return Some(r);
            }
        }
        if roundoff >= 1e-3 * d.abs() {
            break;
        }
        prev_d = d;
        prev_r = Some(r);
    }
    let (change, value, roundoff) = best?;
    (change <= 1e-4 * value.abs() + roundoff).then_some(value)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::bands::bloch::band_structure;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    // Central second-derivative weights, Fornberg, Math. Comp. 51, 699 (1988).
    const W2: [f64; 2] = [-2.0, 1.0];
    const W8: [f64; 5] = [
        -205.0 / 72.0,
        8.0 / 5.0,
        -1.0 / 5.0,
        8.0 / 315.0,
        -1.0 / 560.0,
    ];

    fn cell<'a>(v: &'a [f64], w: &'a [f64], a: f64) -> CellProblem<'a> {
        CellProblem {
            potential: v,
            period: a,
            kinetic: hbar2_over_2me_ev_a2(),
            weights: w,
        }
    }

    /// `V(x) = 2 V1 cos(2 pi x / a)` sampled at `x_j = j a / M`.
    fn cosine(v1: f64, m: usize) -> Vec<f64> {
        (0..m)
            .map(|j| 2.0 * v1 * (2.0 * PI * j as f64 / m as f64).cos())
            .collect()
    }

    #[test]
    fn free_particle_mass_is_one_and_crossing_has_none() {
        let a = 2.8;
        let v = vec![0.0; 64];
        let c = cell(&v, &W8, a);
        let bs = band_structure(&c, 9, 3).unwrap();
        let edges = band_edges(&c, &bs);
        let (bottom, top) = &edges[0];
        assert_eq!(bottom.k, 0.0);
        assert!(bottom.energy.abs() < 1e-10);
        let m = bottom.effective_mass.unwrap();
        eprintln!("free-particle mass at k = 0: {m:.12}");
        // m* = m_e for a free electron (closed form, E = hbar^2 k^2 / 2 m_e).
        assert_relative_eq!(m, 1.0, max_relative = 1e-6);
        // Top of band 1 at pi/a touches band 2 (folded parabolas cross): no mass.
        assert_eq!(top.k, PI / a);
        assert_eq!(top.effective_mass, None);
        assert_eq!(edges[1].0.effective_mass, None);
        // Touching bands give no gap (closed form: the free particle has none).
        assert!(gaps(&c, &bs, 0.0).is_empty());
    }

    #[test]
    fn weak_cosine_opens_gap_two_v1_at_zone_edge() {
        // Nearly-free-electron theory (Ashcroft & Mermin ch. 9; Kittel ch. 7):
        // the first gap at k = pi/a is 2 |V1| to first order in V1.
        let a = 2.8;
        let v1 = 0.01;
        let m = 64;
        let v = cosine(v1, m);
        let c = cell(&v, &W8, a);
        let bs = band_structure(&c, 11, 3).unwrap();
        let g = gaps(&c, &bs, 1e-6);
        assert!(!g.is_empty());
        let first = &g[0];
        eprintln!("NFE gap {} eV (2 V1 = {} eV)", first.size, 2.0 * v1);
        assert_eq!((first.below, first.above), (1, 2));
        // Second-order shifts from the other plane waves are ~V1^2 / (8 E0) ~ 3e-6 eV
        // and nearly equal for both edges, so 1e-4 relative is ample (measured 7e-8).
        assert_relative_eq!(first.size, 2.0 * v1, max_relative = 1e-4);
        assert_eq!(first.lower_edge.k, PI / a);
        assert_eq!(first.upper_edge.k, PI / a);
        assert!(first.direct);
    }

    #[test]
    fn nfe_band_edge_masses_follow_two_band_formula() {
        // Two-band NFE model at k = pi/a + kappa, G = 2 pi / a:
        //   E(+-) = t (G^2/4 + kappa^2) +- sqrt((t G kappa)^2 + V1^2)
        // (secular 2x2 equation, Ashcroft & Mermin eq. 9.26), so
        //   E'' = 2 t (1 +- t G^2 / (2 |V1|)) = 2 t (1 +- 2 E0 / |V1|),
        // E0 = t (pi/a)^2, and m*/m = 1 / (1 +- 2 E0 / |V1|) = 1/(1 +- 4 E0/Delta),
        // Delta = 2 |V1|: light positive mass at the bottom of band 2, negative
        // at the top of band 1. Neglected bands enter only at O(V1^2).
        let a = 2.8;
        let v1 = 0.01;
        let v = cosine(v1, 64);
        let c = cell(&v, &W8, a);
        let bs = band_structure(&c, 11, 3).unwrap();
        let edges = band_edges(&c, &bs);
        let e0 = c.kinetic * (PI / a).powi(2);
        let upper = 1.0 / (1.0 + 2.0 * e0 / v1);
        let lower = 1.0 / (1.0 - 2.0 * e0 / v1);
        let m_top1 = edges[0].1.effective_mass.unwrap();
        let m_bot2 = edges[1].0.effective_mass.unwrap();
        eprintln!("NFE masses: top1 {m_top1:e} (two-band {lower:e}), bottom2 {m_bot2:e} (two-band {upper:e})");
        assert!(m_top1 < 0.0 && m_bot2 > 0.0);
        // measured agreement ~2e-6
        assert_relative_eq!(m_top1, lower, max_relative = 1e-4);
        assert_relative_eq!(m_bot2, upper, max_relative = 1e-4);
        // Band 1 bottom is at k = 0 with mass slightly above 1 (second-order
        // NFE shift, from memory: m*/m = 1 + O(V1^2 / E0^2)).
        assert_eq!(edges[0].0.k, 0.0);
        assert_relative_eq!(edges[0].0.effective_mass.unwrap(), 1.0, max_relative = 1e-3);
    }

    #[test]
    fn tiny_gap_is_still_resolved_with_its_masses() {
        // V1 = 1e-4 eV: gap 2e-4 eV and |m*| ~ 1e-5 (same NFE formulas as
        // above); the band bends over within kappa ~ 2e-5 1/Å of pi/a, so this
        // exercises the walked-down k step of the curvature.
        let a = 2.8;
        let v1 = 1e-4;
        let v = cosine(v1, 64);
        let c = cell(&v, &W8, a);
        let bs = band_structure(&c, 11, 2).unwrap();
        let g = gaps(&c, &bs, 0.0);
        assert_eq!(g.len(), 1);
        assert_relative_eq!(g[0].size, 2.0 * v1, max_relative = 1e-4);
        let e0 = c.kinetic * (PI / a).powi(2);
        let m_top = g[0].lower_edge.effective_mass.unwrap();
        let m_bot = g[0].upper_edge.effective_mass.unwrap();
        eprintln!("tiny gap masses {m_top:e} {m_bot:e}");
        assert_relative_eq!(m_top, 1.0 / (1.0 - 2.0 * e0 / v1), max_relative = 1e-3);
        assert_relative_eq!(m_bot, 1.0 / (1.0 + 2.0 * e0 / v1), max_relative = 1e-3);
    }

    #[test]
    fn golden_section_finds_an_interior_minimum() {
        // f(k) = (k - 0.3141)^2 + 2: minimum at 0.3141 (closed form).
        let f = |k: f64| Some((k - 0.3141).powi(2) + 2.0);
        let (k, v) = golden_section_min(&f, 0.2, 0.5, 1e-9).unwrap();
        assert!((k - 0.3141).abs() < 1e-7, "{k}"); // flat to sqrt(eps) near the minimum
        assert_relative_eq!(v, 2.0, max_relative = 1e-15);
    }

    #[test]
    fn locate_and_curvature_handle_an_interior_maximum() {
        // A synthetic "camel-back" band E(k) = -cos(2k) - 0.5 cos(4k) on [0, pi/2]
        // (a = 2): E'(k) = 2 sin 2k + 2 sin 4k = 2 sin 2k (1 + 2 cos 2k), interior
        // maximum at cos 2k = -1/2, k = pi/3, E = 0.5 + 0.25 = 0.75, and
        // E'' = 4 cos 2k + 8 cos 4k = -2 - 4 = -6 there (closed form).
        let band = |k: f64| Some(-(2.0 * k).cos() - 0.5 * (4.0 * k).cos());
        let ks: Vec<f64> = (0..9).map(|i| i as f64 / 8.0 * PI / 2.0).collect();
        let es: Vec<f64> = ks.iter().map(|&k| band(k).unwrap()).collect();
        let mut best = 0;
        for i in 1..ks.len() {
            if es[i] > es[best] {
                best = i;
            }
        }
        let (k, e) = locate(&band, &ks, &es, best, -1.0, 1e-15).unwrap();
        assert!((k - PI / 3.0).abs() < 1e-6, "{k}");
        assert_relative_eq!(e, 0.75, max_relative = 1e-12);
        let d2 = curvature(&band, k, e, false, 1.0, 0.1 * PI / 2.0, 1e-15).unwrap();
        assert_relative_eq!(d2, -6.0, max_relative = 1e-6);
        // At k = 0 the same function is a local minimum found without search.
        let mut best = 0;
        for i in 1..ks.len() {
            if es[i] < es[best] {
                best = i;
            }
        }
        let (k, e) = locate(&band, &ks, &es, best, 1.0, 1e-15).unwrap();
        assert_eq!(k, 0.0);
        assert_relative_eq!(e, -1.5, max_relative = 1e-15);
    }

    #[test]
    fn curvature_reports_a_kink_as_unresolved() {
        // |k| has no second derivative at 0 (closed form): must give None.
        let kink = |k: f64| Some(k.abs());
        assert_eq!(curvature(&kink, 0.0, 0.0, true, 1.0, 0.1, 1e-15), None);
    }

    #[test]
    fn kronig_penney_edges_and_masses_have_consistent_signs() {
        // Square wells (order 2, low resolution is enough for signs):
        // band 1 is a minimum at k = 0 and a maximum at pi/a (Kronig & Penney,
        // Proc. R. Soc. A 130, 499 (1931)); band 2 the reverse.
        let m = 80;
        let v: Vec<f64> = (0..m).map(|j| if j < m / 2 { -3.0 } else { 0.0 }).collect();
        let c = cell(&v, &W2, 5.0);
        let bs = band_structure(&c, 9, 2).unwrap();
        let e = band_edges(&c, &bs);
        assert_eq!(e[0].0.k, 0.0);
        assert_eq!(e[0].1.k, PI / 5.0);
        assert!(e[0].0.effective_mass.unwrap() > 0.0);
        assert!(e[0].1.effective_mass.unwrap() < 0.0);
        assert_eq!(e[1].0.k, PI / 5.0);
        assert_eq!(e[1].1.k, 0.0);
        assert!(e[1].0.effective_mass.unwrap() > 0.0);
        assert!(e[1].1.effective_mass.unwrap() < 0.0);
        let g = gaps(&c, &bs, 0.0);
        assert_eq!(g.len(), 1);
        assert!(g[0].direct);
    }

    #[test]
    fn malformed_structures_give_empty_or_unrefined_edges() {
        let v = vec![0.0; 16];
        let c = cell(&v, &W2, 2.0);
        let empty = BandStructure {
            k: vec![],
            bands: vec![vec![]],
        };
        assert!(band_edges(&c, &empty).is_empty());
        let ragged = BandStructure {
            k: vec![0.0, 1.0],
            bands: vec![vec![0.0]],
        };
        assert!(band_edges(&c, &ragged).is_empty());
        let bs = band_structure(&c, 3, 1).unwrap();
        let bad = CellProblem { period: -1.0, ..c };
        let e = band_edges(&bad, &bs);
        assert_eq!(e.len(), 1);
        assert_eq!(e[0].0.effective_mass, None);
        assert_eq!(e[0].0.energy, bs.bands[0][0]);
    }
}
