//! The figures built from results, in the input's units, ready for
//! [`crate::plot::render`].

use crate::grid::Boundary;
use crate::input::Model;
use crate::observables::Spectrum;
use crate::pipeline::Solution;
use crate::plot::{self, ConvergeFigure, ErrorSeries, Figure, StateLevel, StatesFigure, Stick};
use crate::study::converge::Convergence;

/// The potential with each level across its allowed region and its
/// wavefunction (or density) drawn at its energy.
pub fn states(model: &Model, sol: &Solution, density: bool) -> Figure {
    let u = &model.units;
    let walls = sol.grid.boundary == Boundary::Walls;
    let scale = u.length.in_angstrom().sqrt();
    let mut x: Vec<f64> = sol.x.iter().map(|x| u.length_out(*x)).collect();
    let mut v: Vec<f64> = sol.potential.iter().map(|e| u.energy_out(*e)).collect();
    if walls {
        let (a, b) = (model.domain.from, model.domain.to);
        x.insert(0, u.length_out(a));
        x.push(u.length_out(b));
        v.insert(0, u.energy_out(model.potential.eval(a)));
        v.push(u.energy_out(model.potential.eval(b)));
    }
    let occupations = sol
        .occupancy
        .as_ref()
        .map(|o| o.occupations.clone())
        .unwrap_or_default();
    let levels = sol
        .levels
        .iter()
        .zip(&sol.psi)
        .zip(&sol.states)
        .enumerate()
        .map(|(j, ((l, psi), st))| {
            let mut p: Vec<f64> = psi.iter().map(|p| p * scale).collect();
            if walls {
                p.insert(0, 0.0);
                p.push(0.0);
            }
            StateLevel {
                n: l.n,
                energy: u.energy_out(l.energy),
                psi: p,
                allowed: st
                    .allowed
                    .iter()
                    .map(|(a, b)| (u.length_out(*a), u.length_out(*b)))
                    .collect(),
                occupation: occupations
                    .get(j)
                    .map_or(0, |o| o.round().clamp(0.0, 2.0) as u8),
            }
        })
        .collect();
    let mut f = StatesFigure::new(x, v, levels);
    f.density = density;
    if walls {
        f.walls = Some((
            u.length_out(model.domain.from),
            u.length_out(model.domain.to),
        ));
    }
    f.x_unit = u.length.label().to_string();
    f.energy_unit = u.energy.label().to_string();
    Figure::States(f)
}

/// Molar absorptivity against wavelength (or energy, or wavenumber), with
/// the transitions as sticks and a measured spectrum over them if given.
pub fn spectrum(
    sol: &Solution,
    sp: &Spectrum,
    axis: plot::SpectrumAxis,
    measured: Option<plot::MeasuredSpectrum>,
) -> Figure {
    let sticks = sol
        .transitions
        .iter()
        .filter(|t| t.wavelength_nm.is_finite() && t.strength > 0.0)
        .map(|t| Stick {
            wavelength: t.wavelength_nm,
            strength: t.strength,
        })
        .collect();
    let mut f = plot::SpectrumFigure::new(sp.wavelength_nm.clone(), sp.epsilon.clone(), sticks);
    f.axis = axis;
    f.measured = measured;
    Figure::Spectrum(f)
}

/// Error against spacing on log-log axes, with the expected slope.
pub fn converge(model: &Model, conv: &Convergence) -> Figure {
    let u = &model.units;
    let series = conv
        .rows
        .iter()
        .map(|r| ErrorSeries {
            label: format!("n = {}", r.n),
            error: r.errors.iter().map(|e| u.energy_out(*e)).collect(),
        })
        .collect();
    let h = conv.spacings.iter().map(|h| u.length_out(*h)).collect();
    let mut f = ConvergeFigure::new(h, series, conv.expected_order);
    f.h_unit = u.length.label().to_string();
    f.error_unit = u.energy.label().to_string();
    Figure::Converge(f)
}

/// Band structure E(k) with the gaps shaded, and the HOMO and LUMO of
/// finite chains beside it when asked.
pub fn bands(model: &Model, result: &crate::study::bands::BandsResult) -> Figure {
    let u = &model.units;
    let per_unit = u.length.in_angstrom();
    let k = result.structure.k.iter().map(|k| k * per_unit).collect();
    // The bands that matter are the filled ones and the few above them; a
    // figure of ten bands squeezes the gap into a line.
    let shown = result
        .filling
        .as_ref()
        .map_or(4, |f| f.electrons_per_cell / 2 + 3)
        .max(4);
    let bands = result
        .structure
        .bands
        .iter()
        .take(shown)
        .map(|b| b.iter().map(|e| u.energy_out(*e)).collect())
        .collect();
    let mut f = plot::BandsFigure::new(k, bands);
    f.chains = result
        .finite
        .iter()
        .map(|c| plot::ChainLadder {
            label: format!("{}", c.bonds),
            energies: vec![u.energy_out(c.homo_energy), u.energy_out(c.lumo_energy)],
        })
        .collect();
    f.k_unit = format!("1/{}", u.length.label());
    f.energy_unit = u.energy.label().to_string();
    Figure::Bands(f)
}

/// Levels (with HOMO and LUMO marked), the gap, or the wavelength against
/// the first varied key of a sweep, with measured values of the same
/// quantity drawn over them when given.
pub fn sweep(
    result: &crate::study::sweep::SweepResult,
    kind: &str,
    measured: Option<&crate::study::data::Data>,
) -> Figure {
    let key = result.header.keys.first().cloned().unwrap_or_default();
    let energy_unit = result.header.units["energy"]
        .as_str()
        .unwrap_or("eV")
        .to_string();
    let length_unit = result.header.units["length"]
        .as_str()
        .unwrap_or("angstrom")
        .to_string();
    let key_title = plot::key_title(&key, &length_unit, &energy_unit);
    let values: Vec<f64> = result
        .rows
        .iter()
        .map(|r| r.values.first().map_or(f64::NAN, |v| v.as_f64()))
        .collect();
    let (data, y_unit) = match kind {
        "gap" => (
            plot::SweepData::Quantity {
                name: "HOMO–LUMO gap".into(),
                values: result
                    .rows
                    .iter()
                    .map(|r| r.gap().unwrap_or(f64::NAN))
                    .collect(),
            },
            energy_unit,
        ),
        "wavelength" => (
            plot::SweepData::Quantity {
                name: "λ_max".into(),
                values: result
                    .rows
                    .iter()
                    .map(|r| r.wavelength_nm().unwrap_or(f64::NAN))
                    .collect(),
            },
            "nm".to_string(),
        ),
        _ => (
            plot::SweepData::Levels(
                result
                    .rows
                    .iter()
                    .map(|r| {
                        // The frontier: three levels below the HOMO to three
                        // above the LUMO, where the chemistry is.
                        let levels: Vec<(usize, f64)> = match (r.homo(), r.lumo()) {
                            (Some(h), Some(l)) => r
                                .energies()
                                .into_iter()
                                .filter(|(n, _)| *n + 3 >= h && *n <= l + 3)
                                .collect(),
                            _ => r.energies(),
                        };
                        let index = |n: Option<usize>| {
                            n.and_then(|n| levels.iter().position(|(m, _)| *m == n))
                        };
                        plot::SweepCase {
                            energies: levels.iter().map(|(_, e)| *e).collect(),
                            homo: index(r.homo()),
                            lumo: index(r.lumo()),
                        }
                    })
                    .collect(),
            ),
            energy_unit,
        ),
    };
    Figure::Sweep(plot::SweepFigure {
        key: key_title,
        key_unit: String::new(),
        values,
        data,
        y_unit,
        measured: measured
            .map(|d| {
                d.rows
                    .iter()
                    .map(|r| plot::Measured {
                        x: r.value.as_f64(),
                        y: r.observed,
                        sigma: r.uncertainty.unwrap_or(0.0),
                    })
                    .collect()
            })
            .unwrap_or_default(),
    })
}

/// Observed against model values of a fit, the model as a curve over the
/// whole range, residuals (model − observed) below; lengths and energies
/// in the units labelled `length` and `energy`.
pub fn fit(result: &crate::study::fit::FitResult, length: &str, energy: &str) -> Figure {
    let uncertainty: Option<Vec<f64>> = result
        .rows
        .iter()
        .map(|r| r.uncertainty)
        .collect::<Option<Vec<f64>>>();
    let (y_name, y_unit) = plot::quantity_parts(&result.quantity.name(), energy);
    Figure::Fit(plot::FitFigure {
        x: result.rows.iter().map(|r| r.value.as_f64()).collect(),
        observed: result.rows.iter().map(|r| r.observed).collect(),
        uncertainty,
        model: result.rows.iter().map(|r| r.model).collect(),
        curve: result.curve.clone(),
        x_name: plot::key_title(&result.key, length, energy),
        x_unit: String::new(),
        y_name,
        y_unit,
    })
}
