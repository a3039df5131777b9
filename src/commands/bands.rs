//! `chainwell bands`: the energy bands of the infinite chain.
//!
//! The input's cell ([`crate::bands::cell`]: its domain, or the two-bond
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

use std::fmt::Write;
use std::path::{Path, PathBuf};
use std::time::Instant;

use rayon::prelude::*;
use serde::Serialize;
use serde_json::{json, Map, Value};

use super::solve::solve_error;
use super::CommandError;
use crate::bands::{
    self, band_edges, band_structure, cell_from_model, BandEdge, BandStructure, BandsError, Cell,
    CellSource, Gap,
};
use crate::eigen::EigenParams;
use crate::grid::Grid;
use crate::input::{self, InputError, Model, Override, SourceText};
use crate::report::json::{input_echo, program};

/// Wavevectors used when `--kpoints` is not given.
pub const DEFAULT_KPOINTS: usize = 41;

/// Bands computed when `levels.count` is not written in the input (a chain's
/// default level count is meant for its finite box, not for the cell).
pub const DEFAULT_BANDS: usize = crate::input::model::DEFAULT_COUNT;

/// Most finite chains one `--finite` may ask for.
pub const MAX_FINITE_CHAINS: usize = 200;

/// Options of `chainwell bands`.
#[derive(Debug, Clone)]
pub struct BandsOptions {
    /// `--set` overrides.
    pub overrides: Vec<Override>,
    /// Number of wavevectors from `0` to `pi / a` (at least 2).
    pub kpoints: usize,
    /// Print JSON instead of a table.
    pub json: bool,
    /// Write the bands as tidy CSV to this file.
    pub csv: Option<PathBuf>,
    /// Bond counts of finite chains to lay beside the band edges
    /// (`START:STOP[:STEP]` or `N1,N2,...`).
    pub finite: Option<String>,
    /// Leave timings out of the JSON.
    pub no_timing: bool,
    /// `--plot`: the bands (E against k, gaps shaded, finite chains beside).
    pub figure: super::figure::FigureOptions,
}

impl Default for BandsOptions {
    fn default() -> Self {
        Self {
            overrides: Vec::new(),
            kpoints: DEFAULT_KPOINTS,
            json: false,
            csv: None,
            finite: None,
            no_timing: false,
            figure: Default::default(),
        }
    }
}

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

/// Loads the input at `path`, computes its bands and, when asked, the finite
/// chains; returns the model, its source text and the result.
pub fn compute(
    path: &Path,
    opts: &BandsOptions,
) -> Result<(Model, SourceText, BandsResult), CommandError> {
    let start = Instant::now();
    if opts.kpoints < 2 {
        return Err(CommandError::Usage(format!(
            "--kpoints must be at least 2 (it counts k = 0 and k = pi/a), got {}",
            opts.kpoints
        )));
    }
    let bond_counts = opts
        .finite
        .as_deref()
        .map(parse_bond_counts)
        .transpose()
        .map_err(|m| CommandError::Usage(format!("--finite {m}")))?;
    let (model, source) = input::load(path, &opts.overrides)?;
    if bond_counts.is_some() && model.chain.is_none() {
        return Err(CommandError::Usage(
            "--finite lays finite chains beside the bands and needs an input with a [chain]".into(),
        ));
    }
    let cell = cell_from_model(&model).map_err(|e| {
        solve_error(
            &model,
            &source,
            crate::solve::SolveError::NonFinitePotential(e),
        )
    })?;
    let mut warnings = cell.warnings.clone();
    for key in ["levels.first", "levels.below"] {
        if model.key_locations.contains_key(key) {
            warnings.push(format!(
                "{key} is not used by bands: the lowest levels.count bands are computed"
            ));
        }
    }
    let nbands = if model.key_locations.contains_key("levels.count") {
        model.levels.count
    } else {
        DEFAULT_BANDS.min(cell.points())
    };
    let problem = cell.problem();
    let structure = band_structure(&problem, opts.kpoints, nbands)
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
    let finite = match &bond_counts {
        Some(counts) => finite_chains(path, opts, counts, cell.spacing(), &mut warnings)?,
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

/// Runs `chainwell bands` and returns the text for stdout and the warnings
/// for stderr; writes the CSV file when asked.
pub fn run(path: &Path, opts: &BandsOptions) -> Result<(String, Vec<String>), CommandError> {
    let (model, source, result) = compute(path, opts)?;
    if let Some(csv_path) = &opts.csv {
        crate::output::write_atomic(csv_path, bands_csv(&model, &result).as_bytes()).map_err(
            |e| CommandError::Compute(format!("cannot write {}: {e}", csv_path.display())),
        )?;
    }
    opts.figure.kind(&["bands"])?;
    opts.figure.render(&super::figure::bands(&model, &result))?;
    let out = if opts.json {
        let doc = bands_document(&model, &source, &result, !opts.no_timing);
        let mut s =
            serde_json::to_string_pretty(&doc).map_err(|e| CommandError::Compute(e.to_string()))?;
        s.push('\n');
        s
    } else {
        bands_table(&model, &result)
    };
    Ok((out, result.warnings))
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
    path: &Path,
    opts: &BandsOptions,
    counts: &[usize],
    spacing: f64,
    warnings: &mut Vec<String>,
) -> Result<Vec<FiniteChain>, CommandError> {
    let solved: Vec<(FiniteChain, Vec<String>)> = counts
        .par_iter()
        .map(|&bonds| finite_chain(path, opts, bonds, spacing))
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

/// One finite chain: the input re-loaded with `chain.bonds = bonds`, one pi
/// electron per atom, and only the HOMO and LUMO asked for.
fn finite_chain(
    path: &Path,
    opts: &BandsOptions,
    bonds: usize,
    spacing: f64,
) -> Result<(FiniteChain, Vec<String>), CommandError> {
    let atoms = bonds + 1;
    let homo = atoms.div_ceil(2);
    let mut overrides = opts.overrides.clone();
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
    let (model, source) = input::load(path, &overrides)?;
    let grid = Grid::with_spacing(&model.domain, spacing);
    let sol = crate::solve::solve_on(&model, &grid, &EigenParams::default())
        .map_err(|e| solve_error(&model, &source, e))?;
    let occ = sol.occupancy.as_ref().ok_or_else(|| {
        CommandError::Compute(format!("the chain of {bonds} bonds was not filled"))
    })?;
    let energy_of = |n: usize| sol.levels.iter().find(|l| l.n == n).map(|l| l.energy);
    let lumo = occ.lumo.unwrap_or(occ.homo + 1);
    let (Some(h), Some(l), Some(gap)) = (energy_of(occ.homo), energy_of(lumo), occ.gap) else {
        return Err(CommandError::Compute(format!(
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
fn band_error(model: &Model, source: &SourceText, cell: &Cell, e: BandsError) -> CommandError {
    let file = source.locate(None);
    let at = |keys: &[&str], message: String| {
        let key = keys
            .iter()
            .find(|k| model.key_locations.contains_key(**k))
            .copied()
            .unwrap_or(keys[keys.len() - 1]);
        CommandError::Input(InputError::new(model.location_of(key, &file), key, message))
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
        other => CommandError::Compute(other.to_string()),
    }
}

/// A wavevector in 1/Å, in 1/(input length unit).
fn k_out(model: &Model, k: f64) -> f64 {
    k * model.units.length.in_angstrom()
}

fn edge_json(model: &Model, e: &BandEdge) -> Value {
    json!({
        "band": e.band,
        "energy": model.units.energy_out(e.energy),
        "k": k_out(model, e.k),
        "effective_mass": e.effective_mass,
    })
}

/// The `chainwell.bands/1` document.
pub fn bands_document(
    model: &Model,
    source: &SourceText,
    r: &BandsResult,
    with_timing: bool,
) -> Value {
    let u = &model.units;
    let mut doc = Map::new();
    doc.insert("format".into(), json!("chainwell.bands/1"));
    doc.insert("program".into(), program());
    let mut units = u.to_json();
    if let Value::Object(m) = &mut units {
        m.insert(
            "wavevector".into(),
            json!(format!("1/{}", u.length.label())),
        );
        m.insert("effective_mass".into(), json!("electron masses"));
    }
    doc.insert("units".into(), units);
    doc.insert(
        "cell".into(),
        json!({
            "source": r.cell.source,
            "from": u.length_out(r.cell.from),
            "period": u.length_out(r.cell.period),
            "points": r.cell.points(),
            "spacing": u.length_out(r.cell.spacing()),
            "order": r.cell.order,
            "electrons_per_cell": r.cell.electrons_per_cell,
        }),
    );
    let k: Vec<f64> = r.structure.k.iter().map(|&k| k_out(model, k)).collect();
    doc.insert("k".into(), json!(k));
    let bands: Vec<Vec<f64>> = r
        .structure
        .bands
        .iter()
        .map(|b| b.iter().map(|&e| u.energy_out(e)).collect())
        .collect();
    doc.insert("bands".into(), json!(bands));
    let edges: Vec<Value> = r
        .edges
        .iter()
        .map(|(bottom, top)| {
            json!({"band": bottom.band, "bottom": edge_json(model, bottom), "top": edge_json(model, top)})
        })
        .collect();
    doc.insert("edges".into(), json!(edges));
    let gaps: Vec<Value> = r
        .gaps
        .iter()
        .map(|g| {
            json!({
                "below": g.below,
                "above": g.above,
                "size": u.energy_out(g.size),
                "direct": g.direct,
                "lower_edge": edge_json(model, &g.lower_edge),
                "upper_edge": edge_json(model, &g.upper_edge),
            })
        })
        .collect();
    doc.insert("gaps".into(), json!(gaps));
    if let Some(f) = &r.filling {
        doc.insert(
            "filling".into(),
            json!({
                "electrons_per_cell": f.electrons_per_cell,
                "filled_bands": f.filled_bands,
                "half_filled": f.half_filled,
                "gap": f.gap.map(|g| u.energy_out(g)),
                "wavelength_nm": f.gap.filter(|g| *g > 0.0).map(|g| crate::constants::hc_ev_nm() / g),
            }),
        );
    }
    if !r.finite.is_empty() {
        let band_gap = r.filling.as_ref().and_then(|f| f.gap);
        let rows: Vec<Value> = r
            .finite
            .iter()
            .map(|c| {
                json!({
                    "bonds": c.bonds,
                    "box_length": u.length_out(c.box_length),
                    "points": c.points,
                    "homo": c.homo,
                    "lumo": c.lumo,
                    "homo_energy": u.energy_out(c.homo_energy),
                    "lumo_energy": u.energy_out(c.lumo_energy),
                    "gap": u.energy_out(c.gap),
                    "gap_minus_band_gap": band_gap.map(|b| u.energy_out(c.gap - b)),
                })
            })
            .collect();
        doc.insert(
            "finite".into(),
            json!({"band_gap": band_gap.map(|g| u.energy_out(g)), "chains": rows}),
        );
    }
    doc.insert("warnings".into(), json!(r.warnings));
    if with_timing {
        doc.insert("timing".into(), json!({"total_s": r.total_s}));
    }
    doc.insert("input".into(), input_echo(model, source));
    Value::Object(doc)
}

/// Tidy CSV of the bands: one row per wavevector and band, units in the
/// header.
pub fn bands_csv(model: &Model, r: &BandsResult) -> String {
    let u = &model.units;
    let mut s = format!(
        "k (1/{}),band,energy ({})\n",
        u.length.label(),
        u.energy.label()
    );
    for (i, &k) in r.structure.k.iter().enumerate() {
        for (b, band) in r.structure.bands.iter().enumerate() {
            let _ = writeln!(s, "{},{},{}", k_out(model, k), b + 1, u.energy_out(band[i]));
        }
    }
    s
}

fn mass_text(m: Option<f64>) -> String {
    match m {
        None => "-".to_string(),
        Some(m) if m.abs() >= 0.01 => format!("{m:.5}"),
        Some(m) => format!("{m:.3e}"),
    }
}

/// "band 1" or "bands 1-3".
fn band_range(filled: usize) -> String {
    if filled == 1 {
        "band 1".to_string()
    } else {
        format!("bands 1-{filled}")
    }
}

/// The table `chainwell bands` prints without `--json`.
pub fn bands_table(model: &Model, r: &BandsResult) -> String {
    let u = &model.units;
    let e = u.energy.label();
    let l = u.length.label();
    let kl = format!("1/{l}");
    let mut s = String::new();
    if let Some(t) = &model.title {
        let _ = writeln!(s, "{t}");
    }
    let what = match r.cell.source {
        CellSource::Chain => "the chain's repeat unit (2 bonds)",
        CellSource::Domain => "the domain",
    };
    let _ = writeln!(
        s,
        "cell: {what}, from {:.6} to {:.6} {l} (period {:.6} {l}); {} points, spacing {:.6} {l}, order {}",
        u.length_out(r.cell.from),
        u.length_out(r.cell.from + r.cell.period),
        u.length_out(r.cell.period),
        r.cell.points(),
        u.length_out(r.cell.spacing()),
        r.cell.order
    );
    let kmax = r.structure.k.last().copied().unwrap_or(0.0);
    let _ = writeln!(
        s,
        "{} wavevectors from 0 to pi/period = {:.6} {kl}",
        r.structure.k.len(),
        k_out(model, kmax)
    );
    let _ = writeln!(s);
    let _ = writeln!(s, "band edges (m*: effective mass in electron masses)");
    let _ = writeln!(
        s,
        "{:>5}  {:>14}  {:>12}  {:>10}  {:>14}  {:>12}  {:>10}",
        "band",
        format!("bottom ({e})"),
        format!("k ({kl})"),
        "m*",
        format!("top ({e})"),
        format!("k ({kl})"),
        "m*"
    );
    for (bottom, top) in &r.edges {
        let _ = writeln!(
            s,
            "{:>5}  {:>14.8}  {:>12.6}  {:>10}  {:>14.8}  {:>12.6}  {:>10}",
            bottom.band,
            u.energy_out(bottom.energy),
            k_out(model, bottom.k),
            mass_text(bottom.effective_mass),
            u.energy_out(top.energy),
            k_out(model, top.k),
            mass_text(top.effective_mass)
        );
    }
    let _ = writeln!(s);
    if r.gaps.is_empty() {
        let _ = writeln!(s, "gaps: none (consecutive bands touch or overlap)");
    } else {
        let _ = writeln!(s, "gaps");
        let _ = writeln!(
            s,
            "{:>6}  {:>14}  {:>16}  {:>16}  {:>8}",
            "bands",
            format!("size ({e})"),
            format!("lower at k ({kl})"),
            format!("upper at k ({kl})"),
            "direct"
        );
        for g in &r.gaps {
            let _ = writeln!(
                s,
                "{:>6}  {:>14.8}  {:>16.6}  {:>16.6}  {:>8}",
                format!("{}-{}", g.below, g.above),
                u.energy_out(g.size),
                k_out(model, g.lower_edge.k),
                k_out(model, g.upper_edge.k),
                if g.direct { "yes" } else { "no" }
            );
        }
    }
    if let Some(f) = &r.filling {
        let _ = writeln!(s);
        let line = match (f.half_filled, f.gap) {
            (true, _) => format!(
                "{} electrons per cell fill {} band(s) and half of the next: no gap (a metal in this model)",
                f.electrons_per_cell, f.filled_bands
            ),
            (false, Some(g)) if g > 0.0 => format!(
                "{} electrons per cell fill {}: the gap above is {:.6} {e} ({:.1} nm), the HOMO-LUMO gap of the infinite chain",
                f.electrons_per_cell,
                band_range(f.filled_bands),
                u.energy_out(g),
                crate::constants::hc_ev_nm() / g
            ),
            (false, Some(_)) => format!(
                "{} electrons per cell fill {}; the next band touches or overlaps it: no gap",
                f.electrons_per_cell,
                band_range(f.filled_bands)
            ),
            (false, None) => format!(
                "{} electrons per cell fill {}; the band above was not computed",
                f.electrons_per_cell,
                band_range(f.filled_bands)
            ),
        };
        let _ = writeln!(s, "{line}");
    }
    if !r.finite.is_empty() {
        finite_table(&mut s, model, r);
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "bands ({e})");
    let _ = write!(s, "{:>12}", format!("k ({kl})"));
    for b in 1..=r.structure.bands.len() {
        let _ = write!(s, "  {:>12}", format!("band {b}"));
    }
    let _ = writeln!(s);
    for (i, &k) in r.structure.k.iter().enumerate() {
        let _ = write!(s, "{:>12.6}", k_out(model, k));
        for band in &r.structure.bands {
            let _ = write!(s, "  {:>12.6}", u.energy_out(band[i]));
        }
        let _ = writeln!(s);
    }
    s
}

fn finite_table(s: &mut String, model: &Model, r: &BandsResult) {
    let u = &model.units;
    let e = u.energy.label();
    let l = u.length.label();
    let band_gap = r.filling.as_ref().and_then(|f| f.gap);
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "finite chains (one pi electron per atom) beside the infinite chain"
    );
    if let Some((top, bottom)) = r.filling.as_ref().and_then(|f| f.edges.as_ref()) {
        let _ = writeln!(
            s,
            "infinite chain: top of band {} {:.6} {e}, bottom of band {} {:.6} {e}, gap {:.6} {e}",
            top.band,
            u.energy_out(top.energy),
            bottom.band,
            u.energy_out(bottom.energy),
            u.energy_out(band_gap.unwrap_or(bottom.energy - top.energy))
        );
    }
    let _ = writeln!(
        s,
        "{:>6}  {:>12}  {:>10}  {:>14}  {:>14}  {:>14}  {:>16}",
        "bonds",
        format!("box ({l})"),
        "HOMO n",
        format!("HOMO ({e})"),
        format!("LUMO ({e})"),
        format!("gap ({e})"),
        format!("minus band gap")
    );
    for c in &r.finite {
        let excess = band_gap.map_or_else(
            || "-".to_string(),
            |b| format!("{:.6}", u.energy_out(c.gap - b)),
        );
        let _ = writeln!(
            s,
            "{:>6}  {:>12.4}  {:>10}  {:>14.6}  {:>14.6}  {:>14.6}  {:>16}",
            c.bonds,
            u.length_out(c.box_length),
            c.homo,
            u.energy_out(c.homo_energy),
            u.energy_out(c.lumo_energy),
            u.energy_out(c.gap),
            excess
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
