//! The static response of a solution's filled levels to a field along x
//! ([`crate::observables::response`]), when the model's `[response]` asks
//! for it: the pencil rebuilt from the solution's grid and potential, each
//! filled level's vector, the mirror-symmetry rule for β, the sum over the
//! computed states beside the exact α, and the warnings when the numbers
//! could mislead.

use std::time::Instant;

use serde::{Deserialize, Serialize};

use crate::eigen::SymBanded;
use crate::grid::Boundary;
use crate::hamiltonian;
use crate::input::Model;
use crate::observables::response::{
    self, alpha_sum_over_states, mirror_symmetric, units, BandedLu, FieldPencil, FilledLevel,
    ResponseError, StaticResponse,
};

use super::{Solution, SolveError};

/// Relative asymmetry of the sampled potential below which it counts as a
/// mirror image (β reported 0): a few hundred rounding units of its scale
/// (common practice, no source).
pub const MIRROR_TOLERANCE: f64 = 1e-12;
/// Ratio of the summed magnitudes of the levels' parts to the total above
/// which the parts cancel so far that digits are lost, and a warning says
/// so (common practice, no source).
pub const CANCELLATION_WARNING: f64 = 1e6;

/// The response of a solution's filled levels.
#[derive(Debug, Clone, PartialEq)]
pub struct Response {
    /// α, β, γ and each level's part, internal units (e = 1, Å, eV).
    pub values: StaticResponse,
    /// Electrons filled.
    pub electrons: usize,
    /// The singly occupied level of an odd electron count.
    pub singly_occupied: Option<usize>,
    /// α as a sum over the computed states only (internal units), and how
    /// many states it used, when asked for.
    pub sum_over_states: Option<(f64, usize)>,
    /// Wall-clock seconds of the response.
    pub seconds: f64,
}

/// The response's totals as a record in reporting units: α in Å³ and
/// atomic units, β and γ in atomic units and esu; the box length in the
/// input's length unit. Rows of sweeps carry it, and read it back bit for
/// bit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ResponseRecord {
    /// Polarizability volume α / (4 π ε0), Å³.
    pub alpha: f64,
    /// α in atomic units.
    pub alpha_au: f64,
    /// β in atomic units (0 when zero by symmetry).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub beta: Option<f64>,
    /// β in esu.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub beta_esu: Option<f64>,
    /// γ in atomic units.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gamma: Option<f64>,
    /// γ in esu.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub gamma_esu: Option<f64>,
    /// β is 0 because the potential is a mirror image of itself.
    pub beta_zero_by_symmetry: bool,
    /// Length of the box, in the input's length unit.
    pub box_length: f64,
}

impl Response {
    /// The totals in reporting units.
    pub fn record(&self, model: &Model, box_length: f64) -> ResponseRecord {
        let v = &self.values;
        let beta = v.beta.map(units::beta_au);
        let gamma = v.gamma.map(units::gamma_au);
        ResponseRecord {
            alpha: units::alpha_angstrom3(v.alpha),
            alpha_au: units::alpha_au(v.alpha),
            beta,
            beta_esu: beta.map(|b| b * units::esu_per_au_beta()),
            gamma,
            gamma_esu: gamma.map(|g| g * units::esu_per_au_gamma()),
            beta_zero_by_symmetry: v.beta_zero_by_symmetry,
            box_length: model.units.length_out(box_length),
        }
    }
}

/// Computes the response the model asks for and stores it in the solution
/// (with its warnings). Nothing happens without `[response]`.
pub fn attach(model: &Model, sol: &mut Solution) -> Result<(), SolveError> {
    let Some(spec) = model.response else {
        return Ok(());
    };
    let start = Instant::now();
    let occupancy = sol
        .occupancy
        .as_ref()
        .ok_or(SolveError::ResponseNeedsFilling)?;
    // The checked input keeps the levels from 1 and rings out.
    if occupancy.first_level != 1 || sol.grid.boundary != Boundary::Walls {
        return Err(SolveError::ResponseNeedsFilling);
    }
    let disc = hamiltonian::build(
        &sol.grid,
        &sol.potential,
        model.kinetic(),
        model.grid.order,
        model.grid.scheme,
    );
    let to_pencil = PencilVectors::new(disc.to_psi.as_ref());
    let vectors: Vec<(usize, f64, Vec<f64>)> = sol
        .levels
        .iter()
        .zip(&sol.psi)
        .zip(&occupancy.occupations)
        .filter(|(_, &f)| f > 0.0)
        .map(|((l, psi), &f)| (l.n, f, to_pencil.vector(psi)))
        .collect();
    let filled: Vec<FilledLevel> = vectors
        .iter()
        .map(|(n, f, z)| FilledLevel {
            n: *n,
            electrons: *f,
            vector: z,
        })
        .collect();
    let pencil = FieldPencil {
        a: &disc.a,
        m: disc.b.as_ref(),
        b: disc.to_psi.as_ref(),
        x: &sol.x,
    };
    let scale = sol.potential.iter().fold(0.0f64, |m, v| m.max(v.abs()))
        + sol.levels.iter().fold(0.0f64, |m, l| m.max(l.energy.abs()));
    let symmetric = mirror_symmetric(&sol.potential, MIRROR_TOLERANCE * scale);
    let values =
        response::static_response(&pencil, &filled, spec.hyperpolarizabilities, symmetric)?;
    let sum_over_states = spec.sum_over_states.then(|| {
        let energies: Vec<f64> = sol.levels.iter().map(|l| l.energy).collect();
        let a = alpha_sum_over_states(
            &sol.x,
            &sol.psi,
            &energies,
            &occupancy.occupations,
            sol.grid.spacing,
        );
        (a, sol.levels.len())
    });
    sol.warnings.extend(cancellation_warnings(&values));
    sol.response = Some(Response {
        values,
        electrons: occupancy.electrons,
        singly_occupied: occupancy.singly_occupied,
        sum_over_states,
        seconds: start.elapsed().as_secs_f64(),
    });
    Ok(())
}

/// From a solution's `psi` to the pencil's vector: `psi` itself for finite
/// differences, `B^-1 psi` for Numerov (`psi = B phi`).
struct PencilVectors {
    b: Option<BandedLu>,
}

impl PencilVectors {
    fn new(b: Option<&SymBanded>) -> Self {
        Self {
            b: b.map(|b| BandedLu::factor(b.n, b.half_bandwidth(), |i, j| b.get(i, j), 0.0)),
        }
    }

    fn vector(&self, psi: &[f64]) -> Vec<f64> {
        let mut z = psi.to_vec();
        if let Some(lu) = &self.b {
            lu.solve(&mut z);
        }
        z
    }
}

/// Warnings when the filled levels' parts of α or γ cancel so far that
/// digits are lost (nearly degenerate filled levels, as in a double well).
fn cancellation_warnings(r: &StaticResponse) -> Vec<String> {
    let mut out = Vec::new();
    let mut check = |name: &str, total: Option<f64>, parts: Vec<Option<f64>>| {
        let Some(total) = total else { return };
        let sum: f64 = parts.iter().flatten().map(|p| p.abs()).sum();
        if sum > CANCELLATION_WARNING * total.abs() {
            out.push(format!(
                "response: the filled levels' parts of {name} cancel to 1 part in {:.0e} of their size, so {name} has lost about {:.0} digits (nearly degenerate filled levels)",
                sum / total.abs().max(f64::MIN_POSITIVE),
                (sum / total.abs().max(f64::MIN_POSITIVE)).log10()
            ));
        }
    };
    check(
        "alpha",
        Some(r.alpha),
        r.levels.iter().map(|l| Some(l.alpha)).collect(),
    );
    check("gamma", r.gamma, r.levels.iter().map(|l| l.gamma).collect());
    out
}

impl From<ResponseError> for SolveError {
    fn from(e: ResponseError) -> Self {
        SolveError::Response(e)
    }
}
