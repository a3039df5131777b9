//! Eigenpairs to a [`Solution`]: normalised wavefunctions, levels beside the
//! ideal box, per-state summaries, the filling of the levels, transitions
//! (with the planar dipole on a ring), the Thomas–Reiche–Kuhn sum and the
//! warnings.

use crate::eigen::{EigenInfo, Eigenpairs, Method};
use crate::grid::{align, Boundary, Grid};
use crate::input::Model;
use crate::observables::{self, states, Occupancy, OccupancyError, StateSummary, Transition};

use super::corners::wall_slope_felt;
use super::discretise::Discretised;
use super::guards::Rounding;
use super::warnings::{corner_warning, jump_warning, precision_warnings, warnings};
use super::{Diagnostics, EdgeReport, Level, Solution, SolveError, Timing};

/// Builds the solution from the checked eigenpairs of `d` on `grid`. Timing
/// is left at zero for the caller to fill.
pub fn assemble(
    model: &Model,
    grid: &Grid,
    d: Discretised,
    pairs: Eigenpairs,
    info: &EigenInfo,
    rounding: Rounding,
) -> Result<Solution, SolveError> {
    let Discretised {
        x,
        edges,
        breaks,
        corners,
        v,
        disc,
    } = d;
    let h = grid.spacing;
    let box_length = model.domain.length();
    let first0 = pairs.first;
    let mut levels = Vec::with_capacity(pairs.values.len());
    let mut psis = Vec::with_capacity(pairs.values.len());
    for (j, (energy, vector)) in pairs.values.iter().zip(pairs.vectors).enumerate() {
        let n = first0 + j + 1;
        let mut psi = disc.psi(vector);
        states::normalise(&mut psi, h);
        let box_energy = (grid.boundary == Boundary::Walls)
            .then(|| model.kinetic() * (n as f64 * std::f64::consts::PI / box_length).powi(2));
        levels.push(Level {
            n,
            energy: *energy,
            nodes: states::count_nodes(&psi),
            box_energy,
            error_estimate: None,
            extrapolated: None,
            observed_order: None,
            estimate_widened: false,
            effective_length: None,
        });
        psis.push(psi);
    }
    let floor = v.iter().copied().fold(f64::INFINITY, f64::min);
    let kinetic = model.kinetic();
    for l in &mut levels {
        l.effective_length = observables::effective_box_length(l.energy - floor, l.n, kinetic);
    }
    let energies: Vec<f64> = levels.iter().map(|l| l.energy).collect();
    let states_summary: Vec<StateSummary> = levels
        .iter()
        .zip(&psis)
        .map(|(l, psi)| observables::summarise(l.n, &x, &v, psi, h, l.energy))
        .collect();
    let first_n = first0 + 1;
    let (mut occupancy, skipped_filling) = fill(model, &energies, first_n)?;
    let occupations: Vec<f64> = occupancy
        .as_ref()
        .map(|o| o.occupations.clone())
        .unwrap_or_default();
    let ring = grid.boundary == Boundary::Periodic;
    let mut transitions = if occupancy.is_none() && !model.spectrum.all_pairs {
        vec![]
    } else if ring {
        ring_transitions(
            grid,
            &psis,
            &energies,
            first_n,
            &occupations,
            model.spectrum.all_pairs,
        )
    } else {
        observables::transitions(
            &x,
            &psis,
            &energies,
            first_n,
            &occupations,
            h,
            Some(box_length).filter(|_| model.potential.terms.is_empty() || model.chain.is_some()),
            model.spectrum.all_pairs,
        )
    };
    // An open shell: no zero-energy excitation inside the HOMO's group; the
    // lowest allowed one is named instead of a gap.
    if let Some(o) = occupancy.as_mut() {
        transitions.retain(|t| o.keeps(t));
        o.name_lowest(&transitions);
    }
    let sum_rule = (first_n == 1 && !ring && levels.len() > 1)
        .then(|| observables::trk_sum(&x, &psis, &energies, h, kinetic, 0));
    let steps = grid.steps();
    let on_grid = |set: &[f64]| align::is_aligned(&model.domain, set, steps);
    let corrected = |set: &[f64]| set.iter().all(|x| corners.corrected.contains(x));
    let edge_report = EdgeReport {
        aligned: on_grid(&edges),
        positions: edges,
        kinks_aligned: on_grid(&breaks.kinks),
        kinks_corrected: corrected(&breaks.kinks),
        weak_aligned: on_grid(&breaks.weak),
        weak_corrected: corrected(&breaks.weak),
        kinks: breaks.kinks,
        weak_breaks: breaks.weak,
        uncorrected: corners.uncorrected,
        wall_slope: wall_slope_felt(model, grid, &v, &psis),
    };
    let mut warnings = warnings(model, grid, &v, &levels);
    warnings.extend(precision_warnings(
        model,
        grid,
        &levels,
        rounding.rounding,
        rounding.scale,
    ));
    warnings.extend(skipped_filling);
    warnings.extend(model.warnings.iter().cloned());
    warnings.extend(
        occupancy
            .as_ref()
            .and_then(|o| o.open_shell_warning(&model.units)),
    );
    warnings.extend(jump_warning(model, &edge_report));
    warnings.extend(corner_warning(model, &edge_report));
    let huckel = huckel(model, &mut warnings)?;
    let roundoff = rounding.rounding;
    Ok(Solution {
        grid: grid.clone(),
        x,
        potential: v,
        box_length,
        levels,
        psi: psis,
        states: states_summary,
        roundoff_floor: roundoff,
        edges: edge_report,
        refinement: None,
        occupancy,
        transitions,
        sum_rule,
        huckel,
        diagnostics: Diagnostics {
            residual_ratio: info.residual_ratio,
            orthogonality_ratio: info.orthogonality_ratio,
            method: method_name(info.method).to_string(),
            iterations: info.iterations,
            inertia_below: info.inertia_below,
        },
        warnings,
        timing: Timing {
            solve_s: 0.0,
            total_s: 0.0,
        },
        response: None,
    })
}

/// The filling of the computed levels by the model's electrons, and the
/// warning when a chain's default count (one per atom) falls outside them.
fn fill(
    model: &Model,
    energies: &[f64],
    first_n: usize,
) -> Result<(Option<Occupancy>, Option<String>), SolveError> {
    let Some(e) = model.levels.electrons else {
        return Ok((None, None));
    };
    match observables::fill(energies, first_n, e) {
        Ok(o) => Ok((Some(o), None)),
        // A chain's default electrons (one per atom) that fall outside the
        // levels asked for are no fault of the input: skip the filling.
        Err(
            err @ (OccupancyError::TooFewLevels { .. } | OccupancyError::HomoBelowComputed { .. }),
        ) if !model.levels.electrons_given => Ok((
            None,
            Some(format!(
                "no occupancy: {err}; set levels.first and levels.count around the HOMO (or levels.electrons) to fill the chain"
            )),
        )),
        Err(err) => Err(err.into()),
    }
}

/// The Hückel levels of the model's atoms, filled with its electrons; a
/// count the Hückel levels cannot hold (a LUMO is needed) leaves them
/// unfilled, with a warning.
fn huckel(
    model: &Model,
    warnings: &mut Vec<String>,
) -> Result<Option<observables::Huckel>, SolveError> {
    let Some(spec) = &model.huckel else {
        return Ok(None);
    };
    let solved = match observables::huckel::solve(spec, model.levels.electrons) {
        Err(observables::HuckelError::Occupancy(e)) => {
            warnings.push(format!("Hückel levels left unfilled: {e}"));
            observables::huckel::solve(spec, None)
        }
        other => other,
    };
    let h = solved.map_err(|e| match e {
        observables::HuckelError::Eigen(e) => SolveError::Eigen(e),
        observables::HuckelError::Occupancy(e) => SolveError::from(e),
    })?;
    if let Some(w) = h
        .occupancy
        .as_ref()
        .and_then(|o| o.open_shell_warning(&model.units))
    {
        warnings.push(format!("Hückel levels: {w}"));
    }
    Ok(Some(h))
}

/// Transitions on a ring of radius `R = L / 2 pi`: the dipole of a planar
/// ring has the components `<i|R cos theta|j>` and `<i|R sin theta|j>`
/// (`theta = 2 pi (x - from) / L`); the reported dipole is their length and
/// the strength, proportional to `|d|^2`, the sum of both components'.
fn ring_transitions(
    grid: &Grid,
    psis: &[Vec<f64>],
    energies: &[f64],
    first_n: usize,
    occupations: &[f64],
    all_pairs: bool,
) -> Vec<Transition> {
    let length = grid.spacing * grid.points as f64;
    let radius = length / (2.0 * std::f64::consts::PI);
    let theta: Vec<f64> = grid
        .positions()
        .iter()
        .map(|x| 2.0 * std::f64::consts::PI * (x - grid.from) / length)
        .collect();
    let cx: Vec<f64> = theta.iter().map(|t| radius * t.cos()).collect();
    let sy: Vec<f64> = theta.iter().map(|t| radius * t.sin()).collect();
    let h = grid.spacing;
    let tx = observables::transitions(
        &cx,
        psis,
        energies,
        first_n,
        occupations,
        h,
        None,
        all_pairs,
    );
    let ty = observables::transitions(
        &sy,
        psis,
        energies,
        first_n,
        occupations,
        h,
        None,
        all_pairs,
    );
    tx.into_iter()
        .zip(ty)
        .map(|(a, b)| Transition {
            dipole: a.dipole.hypot(b.dipole),
            dipole_debye: a.dipole_debye.hypot(b.dipole_debye),
            strength: a.strength + b.strength,
            ..a
        })
        .collect()
}

fn method_name(m: Method) -> &'static str {
    match m {
        Method::Auto => "auto",
        Method::Dense => "dense",
        Method::Tridiagonal => "tridiagonal",
        Method::ShiftInvert => "shift-invert",
        Method::Guided => "guided",
    }
}
