//! The bands study: the energy bands of the infinite chain, their filling,
//! and finite chains beside them.
//!
//! The input's cell ([`crate::pipeline::cell`]: its domain, or the two-bond
//! repeat unit of its `[chain]`) is solved with the Bloch condition
//! `psi(x + a) = e^{i k a} psi(x)` at `--kpoints` wavevectors from `0` to
//! `pi / a` ([`crate::bands::band_structure`]); band edges with their
//! effective masses and the gaps follow from [`crate::bands::band_edges`] and
//! [`crate::bands::gaps`]. With `--finite`, finite chains of the given bond
//! counts are solved at the cell's grid spacing (same stencil, so the
//! comparison is not blurred by discretisation) and their HOMO, LUMO and gap
//! are laid beside the band edges, showing the approach to the polymer limit.
//!
//! Filling: a chain's repeat unit holds two atoms and so two pi electrons,
//! which fill band 1; its HOMO-LUMO gap in the polymer limit is the gap
//! between bands 1 and 2 at the zone edge (Kuhn's argument, H. Kuhn,
//! J. Chem. Phys. 17, 1198 (1949)). For an explicit domain, `levels.electrons`
//! (when written) is the count per cell.

use std::time::Instant;

use rayon::prelude::*;
use serde::Serialize;

use crate::bands::{self, band_edges, band_structure, BandEdge, BandStructure, BandsError, Gap};
use crate::eigen::EigenParams;
use crate::grid::Grid;
use crate::input::{Document, InputError, Model, Override, SourceText};
use crate::pipeline::cell::{cell_from_model, Cell};
use crate::pipeline::{Fault, SolveError};

/// Wavevectors used when `--kpoints` is not given.
pub const DEFAULT_KPOINTS: usize = 41;

/// Bands computed when `levels.count` is not written in the input (a chain's
/// default level count is meant for its finite box, not for the cell).
pub const DEFAULT_BANDS: usize = crate::input::model::DEFAULT_COUNT;

/// Most finite chains one `--finite` may ask for.
pub const MAX_FINITE_CHAINS: usize = 200;

/// The filling of the bands by the cell's electrons.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Filling {
    /// Electrons per cell.
    pub electrons_per_cell: usize,
    /// Bands completely filled (two electrons each).
    pub filled_bands: usize,
    /// Whether an odd electron half-fills the band above (no gap: a metal in
    /// this model).
    pub half_filled: bool,
    /// The gap above the last filled band, eV: `Some(0.0)` when the bands
    /// touch or overlap, `None` when half-filled or not enough bands were
    /// computed.
    pub gap: Option<f64>,
    /// The gap's edges (top of the last filled band, bottom of the next).
    pub edges: Option<(BandEdge, BandEdge)>,
}

/// One finite chain laid beside the infinite one.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FiniteChain {
    /// Bonds of the chain.
    pub bonds: usize,
    /// Its box length, Å.
    pub box_length: f64,
    /// Unknowns of its grid.
    pub points: usize,
    /// HOMO level number.
    pub homo: usize,
    /// LUMO level number.
    pub lumo: usize,
    /// HOMO energy, eV.
    pub homo_energy: f64,
    /// LUMO energy, eV.
    pub lumo_energy: f64,
    /// HOMO-LUMO gap, eV.
    pub gap: f64,
}

/// Everything `chainwell bands` computes, in internal units (Å, 1/Å, eV);
/// a figure of the bands can be drawn from it.
#[derive(Debug, Clone)]
pub struct BandsResult {
    /// The cell solved.
    pub cell: Cell,
    /// Band energies on the k grid.
    pub structure: BandStructure,
    /// Bottom and top of each band.
    pub edges: Vec<(BandEdge, BandEdge)>,
    /// Gaps between consecutive bands.
    pub gaps: Vec<Gap>,
    /// Filling by the cell's electrons, when their number is known.
    pub filling: Option<Filling>,
    /// Finite chains asked for with `--finite`, by bond count.
    pub finite: Vec<FiniteChain>,
    /// What the user should know.
    pub warnings: Vec<String>,
    /// Wall-clock seconds of the whole computation.
    pub total_s: f64,
}

/// Parses `--finite`: `START:STOP[:STEP]` (inclusive, step 1 by default) or
/// a comma-separated list of bond counts, each at least 1.
pub fn parse_bond_counts(spec: &str) -> Result<Vec<usize>, String> {
    let number = |s: &str| -> Result<usize, String> {
        match s.trim().parse::<usize>() {
            Ok(n) if n >= 1 => Ok(n),
            _ => Err(format!(
                "`{}` is not a bond count (a whole number, at least 1)",
                s.trim()
            )),
        }
    };
    let counts: Vec<usize> = if spec.contains(':') {
        let parts: Vec<&str> = spec.split(':').collect();
        if parts.len() > 3 {
            return Err(format!("`{spec}` is not START:STOP[:STEP]"));
        }
        let start = number(parts[0])?;
        let stop = number(parts[1])?;
        let step = parts.get(2).map(|s| number(s)).transpose()?.unwrap_or(1);
        if stop < start {
            return Err(format!("`{spec}`: STOP is below START"));
        }
        let n = (stop - start) / step + 1;
        if n > MAX_FINITE_CHAINS {
            return Err(format!(
                "`{spec}` gives {n} chains; at most {MAX_FINITE_CHAINS} are allowed"
            ));
        }
        (0..n).map(|i| start + i * step).collect()
    } else {
        spec.split(',').map(number).collect::<Result<_, _>>()?
    };
    if counts.is_empty() || counts.len() > MAX_FINITE_CHAINS {
        return Err(format!(
            "`{spec}` must give 1 to {MAX_FINITE_CHAINS} bond counts"
        ));
    }
    Ok(counts)
}

/// What a bands study computes besides the cell.
#[derive(Debug, Clone, PartialEq)]
pub struct BandsSpec {
    /// Wavevectors from `0` to `pi / a` (at least 2).
    pub kpoints: usize,
    /// Bond counts of finite chains to lay beside the band edges (needs a
    /// `[chain]`).
    pub finite: Option<Vec<usize>>,
}

impl Default for BandsSpec {
    fn default() -> Self {
        Self {
            kpoints: DEFAULT_KPOINTS,
            finite: None,
        }
    }
}

/// Refuses fewer than two wavevectors (the grid counts `k = 0` and
/// `k = pi / a`).
pub fn check_kpoints(kpoints: usize) -> Result<(), Fault> {
    if kpoints < 2 {
        return Err(Fault::Usage(format!(
            "--kpoints must be at least 2 (it counts k = 0 and k = pi/a), got {kpoints}"
        )));
    }
    Ok(())
}

/// Points of the cell [`cell_from_model`] builds for `model`, found
/// without building it (no allocation), for the memory estimate.
pub fn cell_points(model: &Model) -> usize {
    use crate::grid::{Boundary, Domain};
    use crate::input::model::{Resolution, DEFAULT_SPACING_ANGSTROM};
    let (from, period, spacing) = match &model.chain {
        Some(c) => (
            c.atom_position(1),
            2.0 * c.bond_length,
            crate::pipeline::grid_for(model).spacing,
        ),
        None => (
            model.domain.from,
            model.domain.length(),
            match model.grid.resolution {
                Resolution::Points(n) => model.domain.length() / n as f64,
                Resolution::Spacing(h) => h,
                Resolution::Tolerance(_) => DEFAULT_SPACING_ANGSTROM,
            },
        ),
    };
    let ring = Domain {
        from,
        to: from + period,
        boundary: Boundary::Periodic,
    };
    Grid::with_spacing(&ring, spacing).points
}

/// Estimated bytes of a band structure of a cell of `points` points,
/// `kpoints` wavevectors and `nbands` bands solved `threads` k points at a
/// time: per k point in flight the dense `points x points` complex Bloch
/// matrix and the eigen-solver's working copy (16 bytes an entry each), and
/// for the result `kpoints x (2 nbands + 1)` numbers. Floating point, so that
/// it cannot overflow.
pub fn memory_estimate(points: usize, kpoints: usize, nbands: usize, threads: usize) -> f64 {
    let m = points as f64;
    let per_k = 2.0 * m * m * 16.0 + 8.0 * m * 8.0;
    let result = kpoints as f64 * (2.0 * nbands as f64 + 1.0) * 8.0;
    threads.clamp(1, kpoints.max(1)) as f64 * per_k + result
}

/// Refuses a band study whose [`memory_estimate`] is above
/// the eigen-solver's limit ([`crate::eigen::memory::default_limit`]: half
/// the machine's memory), saying what to change.
fn check_memory(model: &Model, kpoints: usize) -> Result<(), Fault> {
    let limit = crate::eigen::memory::default_limit() as f64;
    let points = cell_points(model);
    let nbands = if model.levels.count_given {
        model.levels.count
    } else {
        DEFAULT_BANDS.min(points)
    };
    let threads = rayon::current_num_threads();
    let bytes = memory_estimate(points, kpoints, nbands, threads);
    if bytes <= limit {
        return Ok(());
    }
    let results = memory_estimate(0, kpoints, nbands, threads);
    let change = if bytes - results > bytes / 2.0 {
        if threads > 1 && memory_estimate(points, kpoints, nbands, 1) <= limit {
            "use a coarser grid.spacing (fewer points per cell) or fewer threads (RAYON_NUM_THREADS=1)"
        } else {
            "use a coarser grid.spacing (fewer points per cell)"
        }
    } else {
        "use fewer --kpoints (or fewer bands, levels.count)"
    };
    use crate::eigen::memory::gigabytes;
    Err(Fault::Compute(format!(
        "the bands of a cell of {points} points at {kpoints} k points would need about {} (a dense {points} x {points} complex matrix per k point, {threads} at a time), above the limit of {} (half of this machine's memory); {change}",
        gigabytes(bytes),
        gigabytes(limit)
    )))
}

/// Checks the input with `overrides`, computes its bands and, when asked,
/// the finite chains; returns the model, its source text and the result.
pub fn compute(
    document: &Document,
    overrides: &[Override],
    spec: &BandsSpec,
) -> Result<(Model, SourceText, BandsResult), Fault> {
    let start = Instant::now();
    check_kpoints(spec.kpoints)?;
    let (model, source) = document.model(overrides).map_err(Fault::Input)?;
    check_memory(&model, spec.kpoints)?;
    if spec.finite.is_some() && model.chain.is_none() {
        return Err(Fault::Usage(
            "--finite lays finite chains beside the bands and needs an input with a [chain]".into(),
        ));
    }
    let cell = cell_from_model(&model)
        .map_err(|e| SolveError::NonFinitePotential(e).locate(&model, &source))?;
    let mut warnings = cell.warnings.clone();
    for (key, given) in [
        ("levels.first", model.levels.first_given),
        ("levels.below", model.levels.below.is_some()),
    ] {
        if given {
            warnings.push(format!(
                "{key} is not used by bands: the lowest levels.count bands are computed"
            ));
        }
    }
    let nbands = if model.levels.count_given {
        model.levels.count
    } else {
        DEFAULT_BANDS.min(cell.points())
    };
    let problem = cell.problem();
    let structure = band_structure(&problem, spec.kpoints, nbands)
        .map_err(|e| band_error(&model, &source, &cell, e))?;
    let edges = band_edges(&problem, &structure);
    let gaps = bands::gaps(&problem, &structure, 0.0);
    let filling = cell
        .electrons_per_cell
        .filter(|&e| e > 0)
        .map(|e| filling(e, &edges, &gaps));
    if let Some(f) = &filling {
        if !f.half_filled && f.gap.is_none() {
            warnings.push(format!(
                "the gap above band {} needs {} bands; raise levels.count",
                f.filled_bands,
                f.filled_bands + 1
            ));
        }
    }
    let finite = match &spec.finite {
        Some(counts) => finite_chains(document, overrides, counts, cell.spacing(), &mut warnings)?,
        None => Vec::new(),
    };
    let result = BandsResult {
        cell,
        structure,
        edges,
        gaps,
        filling,
        finite,
        warnings,
        total_s: start.elapsed().as_secs_f64(),
    };
    Ok((model, source, result))
}

/// The filling of the lowest bands by `electrons` per cell.
fn filling(electrons: usize, edges: &[(BandEdge, BandEdge)], gaps: &[Gap]) -> Filling {
    let filled = electrons / 2;
    let half_filled = electrons % 2 == 1;
    let pair = (!half_filled && filled >= 1 && filled < edges.len())
        .then(|| (edges[filled - 1].1.clone(), edges[filled].0.clone()));
    let gap = pair.as_ref().map(|_| {
        gaps.iter()
            .find(|g| g.below == filled)
            .map_or(0.0, |g| g.size)
    });
    Filling {
        electrons_per_cell: electrons,
        filled_bands: filled,
        half_filled,
        gap,
        edges: pair,
    }
}

/// Solves the finite chains of `counts` bonds at the cell's `spacing`.
fn finite_chains(
    document: &Document,
    overrides: &[Override],
    counts: &[usize],
    spacing: f64,
    warnings: &mut Vec<String>,
) -> Result<Vec<FiniteChain>, Fault> {
    let solved: Vec<(FiniteChain, Vec<String>)> = counts
        .par_iter()
        .map(|&bonds| finite_chain(document, overrides, bonds, spacing))
        .collect::<Result<_, _>>()?;
    let mut rows = Vec::with_capacity(solved.len());
    for (row, notes) in solved {
        for n in notes {
            warnings.push(format!("finite chain of {} bonds: {n}", row.bonds));
        }
        rows.push(row);
    }
    Ok(rows)
}

/// One finite chain: the input checked again with `chain.bonds = bonds`, one pi
/// electron per atom, and only the HOMO and LUMO asked for.
fn finite_chain(
    document: &Document,
    base: &[Override],
    bonds: usize,
    spacing: f64,
) -> Result<(FiniteChain, Vec<String>), Fault> {
    let atoms = bonds + 1;
    let homo = atoms.div_ceil(2);
    let mut overrides = base.to_vec();
    for (key, value) in [
        ("chain.bonds", bonds),
        ("levels.electrons", atoms),
        ("levels.first", homo),
        ("levels.count", 2),
    ] {
        overrides.push(Override {
            key: key.into(),
            value: value.to_string(),
        });
    }
    let (model, source) = document.model(&overrides).map_err(Fault::Input)?;
    let grid = Grid::with_spacing(&model.domain, spacing);
    let sol = crate::pipeline::solve_on(&model, &grid, &EigenParams::default())
        .map_err(|e| e.locate(&model, &source))?;
    let occ = sol
        .occupancy
        .as_ref()
        .ok_or_else(|| Fault::Compute(format!("the chain of {bonds} bonds was not filled")))?;
    let energy_of = |n: usize| sol.levels.iter().find(|l| l.n == n).map(|l| l.energy);
    let lumo = occ.lumo.unwrap_or(occ.homo + 1);
    let (Some(h), Some(l), Some(gap)) = (energy_of(occ.homo), energy_of(lumo), occ.gap) else {
        return Err(Fault::Compute(format!(
            "the chain of {bonds} bonds has no HOMO-LUMO pair among its computed levels"
        )));
    };
    let row = FiniteChain {
        bonds,
        box_length: sol.box_length,
        points: sol.grid.points,
        homo: occ.homo,
        lumo,
        homo_energy: h,
        lumo_energy: l,
        gap,
    };
    Ok((row, sol.warnings))
}

/// Turns a band-solver error into a command error, locating input faults.
fn band_error(model: &Model, source: &SourceText, cell: &Cell, e: BandsError) -> Fault {
    let file = source.locate(None);
    let at = |keys: &[&str], message: String| {
        let key = keys
            .iter()
            .find(|k| model.key_locations.contains_key(**k))
            .copied()
            .unwrap_or(keys[keys.len() - 1]);
        Fault::Input(InputError::new(model.location_of(key, &file), key, message))
    };
    match e {
        BandsError::TooFewPoints { points, needed } => at(
            &["grid.points", "grid.spacing", "grid"],
            format!(
                "the cell of length {} {} gets {points} grid points, but an order-{} stencil needs at least {needed}; refine the grid",
                model.units.length_out(cell.period),
                model.units.length.label(),
                cell.order
            ),
        ),
        BandsError::TooFewBands { asked, available } => at(
            &["levels.count", "levels"],
            format!("asks for {asked} bands, but a cell of {available} points has only {available}"),
        ),
        other => Fault::Compute(other.to_string()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_memory_estimate_counts_the_points_of_the_cell_that_is_built() {
        for text in [
            "[chain]\nbonds = 6\nalternation = 1.0\n[grid]\nspacing = 0.05\n",
            "[chain]\nbonds = 3\nbond_length = 1.3\n",
            "[domain]\nfrom = 0.0\nto = 2.5\nboundary = \"periodic\"\n[grid]\npoints = 90\n",
            "[domain]\nfrom = 1.0\nto = 3.0\n[grid]\nspacing = 0.013\n",
        ] {
            let (model, _) =
                crate::input::load_str("t.toml", text.into(), std::path::Path::new("."), &[])
                    .unwrap();
            let cell = cell_from_model(&model).unwrap();
            assert_eq!(cell_points(&model), cell.points(), "{text}");
        }
        // Two dense complex 1000 x 1000 matrices (16 bytes an entry) per
        // thread, and 41 x (2 x 10 + 1) numbers: counted by hand.
        let bytes = memory_estimate(1000, 41, 10, 2);
        assert_eq!(
            bytes,
            2.0 * (2.0 * 1.0e6 * 16.0 + 64.0 * 1000.0) + 41.0 * 21.0 * 8.0
        );
    }

    #[test]
    fn bond_counts_parse_ranges_and_lists() {
        assert_eq!(parse_bond_counts("3:11:4").unwrap(), vec![3, 7, 11]);
        assert_eq!(parse_bond_counts("5:7").unwrap(), vec![5, 6, 7]);
        assert_eq!(parse_bond_counts("5:8:2").unwrap(), vec![5, 7]);
        assert_eq!(parse_bond_counts("9, 21,41").unwrap(), vec![9, 21, 41]);
        assert_eq!(parse_bond_counts("13").unwrap(), vec![13]);
        for bad in ["0:4", "4:2", "a", "1:2:0", "1:2:3:4", "", "1:100000"] {
            assert!(parse_bond_counts(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn filling_reports_the_gap_above_the_filled_bands() {
        let edge = |band, energy| BandEdge {
            band,
            energy,
            k: 0.0,
            effective_mass: None,
        };
        let edges = vec![(edge(1, 0.0), edge(1, 1.0)), (edge(2, 1.5), edge(2, 3.0))];
        let gap = Gap {
            below: 1,
            above: 2,
            size: 0.5,
            lower_edge: edge(1, 1.0),
            upper_edge: edge(2, 1.5),
            direct: true,
        };
        let f = filling(2, &edges, &[gap]);
        assert_eq!(f.filled_bands, 1);
        assert_eq!(f.gap, Some(0.5));
        assert!(filling(3, &edges, &[]).half_filled);
        assert_eq!(filling(3, &edges, &[]).gap, None);
        // Bands touching: no entry in the gap list, a gap of 0.
        assert_eq!(filling(2, &edges, &[]).gap, Some(0.0));
        // Not enough bands computed.
        assert_eq!(filling(4, &edges, &[]).gap, None);
    }
}
