//! A solution's levels and filling as plain records in the input's units.
//!
//! These are the `levels` and `occupancy` of `chainwell solve --json` and the
//! rows of sweep documents. They are (de)serialised by serde, so that the
//! rows of a saved sweep read back bit for bit (serde_json's
//! `float_roundtrip`) and a resumed or merged sweep prints the same bytes as
//! an uninterrupted one.

use serde::{Deserialize, Serialize};

use crate::input::Model;
use crate::observables::Occupancy;

use super::Solution;

/// One level, in the input's units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LevelRecord {
    /// Level number, 1 for the lowest.
    pub n: usize,
    /// Energy.
    pub energy: f64,
    /// Sign changes of the wavefunction.
    pub nodes: usize,
    /// The ideal-box level (hard walls only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub box_energy: Option<f64>,
    /// `energy / box_energy`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub box_ratio: Option<f64>,
    /// Estimated absolute discretisation error of `energy`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub error_estimate: Option<f64>,
    /// Richardson-extrapolated energy.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub extrapolated: Option<f64>,
    /// Observed order of convergence.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub observed_order: Option<f64>,
    /// Whether the estimate was widened because Richardson's assumptions
    /// failed (see [`crate::pipeline::accuracy::richardson`]); present
    /// only when true.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub estimate_widened: bool,
}

/// The filling of the levels, in the input's units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct OccupancyRecord {
    /// Electrons filled.
    pub electrons: usize,
    /// Highest occupied level.
    pub homo: usize,
    /// Lowest unoccupied level, when computed.
    pub lumo: Option<usize>,
    /// The level holding a single electron, if any.
    pub singly_occupied: Option<usize>,
    /// HOMO–LUMO gap.
    pub gap: Option<f64>,
    /// `hc / gap`, nm.
    pub wavelength_nm: Option<f64>,
    /// Sum of the occupied levels' energies, electrons counted.
    pub total_energy: f64,
    /// Whether every occupied level was computed (else `total_energy` is
    /// partial).
    pub total_energy_complete: bool,
    /// What set the electron count: `levels.electrons` (written) or `chain`
    /// (the atoms' contributions less the charge).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub electrons_from: Option<String>,
    /// Whether the HOMO's degenerate group is not full (a radical, or a
    /// partly filled degenerate group: then `gap` is null).
    #[serde(default)]
    pub open_shell: bool,
    /// The levels of the HOMO's degenerate group, when it has more than one.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub homo_group: Option<Vec<usize>>,
    /// For an open shell without a gap: the lowest allowed excitation.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lowest_allowed: Option<ExcitationRecord>,
}

/// An excitation, in the input's units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExcitationRecord {
    /// Lower level.
    pub from: usize,
    /// Upper level.
    pub to: usize,
    /// Energy.
    pub energy: f64,
    /// `hc / energy`, nm.
    pub wavelength_nm: f64,
    /// Oscillator strength.
    pub strength: f64,
}

/// The levels of a solution as records.
pub fn level_records(model: &Model, sol: &Solution) -> Vec<LevelRecord> {
    let u = &model.units;
    sol.levels
        .iter()
        .map(|l| LevelRecord {
            n: l.n,
            energy: u.energy_out(l.energy),
            nodes: l.nodes,
            box_energy: l.box_energy.map(|b| u.energy_out(b)),
            box_ratio: l.box_energy.map(|b| l.energy / b),
            error_estimate: l.error_estimate.map(|e| u.energy_out(e)),
            extrapolated: l.extrapolated.map(|e| u.energy_out(e)),
            observed_order: l.observed_order,
            estimate_widened: l.estimate_widened,
        })
        .collect()
}

/// The filling as a record.
pub fn occupancy_record(model: &Model, o: &Occupancy) -> OccupancyRecord {
    let u = &model.units;
    OccupancyRecord {
        electrons: o.electrons,
        homo: o.homo,
        lumo: o.lumo,
        singly_occupied: o.singly_occupied,
        gap: o.gap.map(|g| u.energy_out(g)),
        wavelength_nm: o.wavelength_nm,
        total_energy: u.energy_out(o.total_energy),
        total_energy_complete: o.total_energy_complete,
        electrons_from: Some(electrons_from(model).to_string()),
        open_shell: o.open_shell,
        homo_group: (o.homo_group.len() > 1).then(|| o.homo_group.clone()),
        lowest_allowed: o.lowest_allowed.map(|x| ExcitationRecord {
            from: x.from,
            to: x.to,
            energy: u.energy_out(x.energy),
            wavelength_nm: x.wavelength_nm,
            strength: x.strength,
        }),
    }
}

/// What set a model's electron count: `"levels.electrons"` when written
/// (in the file or by `--set`), `"chain"` when counted from a chain's atoms
/// and charge.
pub fn electrons_from(model: &Model) -> &'static str {
    if model.chain.is_some() && !model.levels.electrons_given {
        "chain"
    } else {
        "levels.electrons"
    }
}
