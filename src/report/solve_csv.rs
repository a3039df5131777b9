//! CSV files of a solve, for pandas or any plotting tool: `levels.csv`,
//! `wavefunctions.csv`, `transitions.csv` and `spectrum.csv`, with units in
//! the column headers in one style, `name (unit)` (`energy (eV)`,
//! `x (angstrom)`; a column without a unit is a count or a pure number),
//! and the input's units throughout.

use std::fmt::Write;
use std::path::Path;

use crate::input::Model;
use crate::observables::Spectrum;
use crate::pipeline::Solution;

/// The names of the four files, in the order [`solve_files`] gives them.
pub const FILE_NAMES: [&str; 4] = [
    "levels.csv",
    "wavefunctions.csv",
    "transitions.csv",
    "spectrum.csv",
];

/// The four files' contents, by file name.
pub fn solve_files(
    model: &Model,
    sol: &Solution,
    spectrum: &Spectrum,
) -> Vec<(&'static str, String)> {
    let u = &model.units;
    let (e, l) = (u.energy.label(), u.length.label());
    let mut levels = format!(
        "n,energy ({e}),nodes,box_energy ({e}),error_estimate ({e}),mean_x ({l}),spread ({l}),effective_length ({l})\n"
    );
    for (lv, st) in sol.levels.iter().zip(&sol.states) {
        let _ = writeln!(
            levels,
            "{},{},{},{},{},{},{},{}",
            lv.n,
            num(u.energy_out(lv.energy)),
            lv.nodes,
            opt(lv.box_energy.map(|b| u.energy_out(b))),
            opt(lv.error_estimate.map(|b| u.energy_out(b))),
            num(u.length_out(st.mean_x)),
            num(u.length_out(st.spread)),
            opt(lv.effective_length.map(|x| u.length_out(x))),
        );
    }
    // Wavefunctions in 1/sqrt(length unit): psi_input = psi_A * sqrt(A per unit).
    let scale = u.length.in_angstrom().sqrt();
    let mut wf = format!("x ({l}),V ({e})");
    for lv in &sol.levels {
        let _ = write!(wf, ",psi_{} ({l}^-1/2)", lv.n);
    }
    wf.push('\n');
    for (i, x) in sol.x.iter().enumerate() {
        let _ = write!(
            wf,
            "{},{}",
            num(u.length_out(*x)),
            num(u.energy_out(sol.potential[i]))
        );
        for psi in &sol.psi {
            let _ = write!(wf, ",{}", num(psi[i] * scale));
        }
        wf.push('\n');
    }
    let mut tr = format!(
        "from,to,energy ({e}),wavelength (nm),dipole (e {l}),dipole (D),strength,occupancy_factor,box_dipole (e {l})\n"
    );
    for t in &sol.transitions {
        let _ = writeln!(
            tr,
            "{},{},{},{},{},{},{},{},{}",
            t.from,
            t.to,
            num(u.energy_out(t.energy)),
            num(t.wavelength_nm),
            num(u.dipole_out(t.dipole)),
            num(t.dipole_debye),
            num(t.strength),
            t.occupancy_factor,
            opt(t.box_dipole.map(|d| u.dipole_out(d)))
        );
    }
    let mut sp = String::from("wavelength (nm),epsilon (L mol-1 cm-1)\n");
    for (w, eps) in spectrum.wavelength_nm.iter().zip(&spectrum.epsilon) {
        let _ = writeln!(sp, "{},{}", num(*w), num(*eps));
    }
    vec![
        (FILE_NAMES[0], levels),
        (FILE_NAMES[1], wf),
        (FILE_NAMES[2], tr),
        (FILE_NAMES[3], sp),
    ]
}

fn opt(x: Option<f64>) -> String {
    x.map(num).unwrap_or_default()
}

/// A number as the shortest text that reads back exactly, in exponent form
/// when it is very small or very large.
pub fn num(x: f64) -> String {
    // A negative zero prints as 0.
    let x = if x == 0.0 { 0.0 } else { x };
    let a = x.abs();
    if x == 0.0 || (1e-4..1e9).contains(&a) || !x.is_finite() {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

/// Writes the files into `dir` (created if missing) as one set: the old
/// set stays whole until every new file is complete
/// ([`crate::output::write_set`]).
pub fn write_solve_files(dir: &Path, files: &[(&str, String)]) -> std::io::Result<()> {
    let set: Vec<(&str, &[u8])> = files.iter().map(|(n, t)| (*n, t.as_bytes())).collect();
    crate::output::write_set(dir, &set)
}
