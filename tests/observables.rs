//! Transition dipoles, oscillator strengths, sum rules and spectra through
//! the whole pipeline, against closed forms.

mod common;

use std::f64::consts::PI;

use chainwell::observables::integrated_strength;
use common::{model, solve, t_e};

#[test]
fn box_dipoles_match_the_closed_form() {
    // <n|x|m> = -8 L n m / (pi^2 (n^2 - m^2)^2) for n + m odd, 0 for n + m
    // even, on [0, L] with psi_n = sqrt(2/L) sin(n pi x / L) (P. Atkins and
    // R. Friedman, Molecular Quantum Mechanics, 5th ed., ch. 6 problems; from
    // memory). chainwell's sign rule makes every first lobe positive, as here.
    let sol = solve(
        "[domain]\nfrom = 0.0\nto = 12.0\n[grid]\npoints = 2000\norder = 8\n\
         [levels]\ncount = 8\nelectrons = 8\n",
    );
    let l = 12.0;
    let mut checked = 0;
    for t in &sol.transitions {
        let (n, m) = (t.from as f64, t.to as f64);
        if (t.from + t.to) % 2 == 1 {
            let exact = -8.0 * l * n * m / (PI * PI * (n * n - m * m).powi(2));
            assert!(
                (t.dipole / exact - 1.0).abs() < 1e-8,
                "{}->{}: {} vs {exact}",
                t.from,
                t.to,
                t.dipole
            );
            checked += 1;
        } else {
            assert!(
                t.dipole.abs() < 1e-8 * l,
                "{}->{} should vanish: {}",
                t.from,
                t.to,
                t.dipole
            );
        }
        // The closed-form box dipole is reported beside the computed one.
        let b = t.box_dipole.unwrap();
        assert!(
            (b - t.dipole).abs() < 1e-8 * l,
            "{}->{}: box {b}",
            t.from,
            t.to
        );
    }
    assert!(checked >= 8);
}

fn oscillator() -> chainwell::pipeline::Solution {
    solve(
        "[domain]\nfrom = -8.0\nto = 8.0\n[grid]\npoints = 1600\norder = 8\n\
         [levels]\ncount = 8\n[spectrum]\nall_pairs = true\n\
         [[term]]\nshape = \"harmonic\"\ncenter = 0.0\nstiffness = 10.0\n",
    )
}

#[test]
fn harmonic_oscillator_dipoles_and_selection_rule() {
    // <v|x|v+1> = sqrt((v+1) hbar / (2 m omega)) and every other dipole
    // vanishes (Griffiths eq. 2.69 and problem 2.12). hbar/(2 m omega) =
    // t / (hbar omega) with t = hbar^2/2m, hbar omega = sqrt(2 t k).
    let sol = oscillator();
    let hw = (2.0 * t_e() * 10.0).sqrt();
    let x0 = t_e() / hw;
    for t in &sol.transitions {
        let v = (t.from - 1) as f64;
        if t.to == t.from + 1 {
            let exact = ((v + 1.0) * x0).sqrt();
            assert!(
                (t.dipole.abs() / exact - 1.0).abs() < 1e-8,
                "{}->{}",
                t.from,
                t.to
            );
        } else {
            assert!(
                t.dipole.abs() < 1e-8 * x0.sqrt(),
                "{}->{}: {}",
                t.from,
                t.to,
                t.dipole
            );
        }
    }
}

#[test]
fn thomas_reiche_kuhn_sum_is_one() {
    // (2m/hbar^2) sum_j (E_j - E_1) |<1|x|j>|^2 = 1 (Thomas 1925, Reiche and
    // Kuhn 1925; any quantum mechanics text): for the oscillator only j = 2
    // contributes, so eight computed levels are complete.
    let sol = oscillator();
    let sr = sol.sum_rule.as_ref().unwrap();
    assert!((sr.value - 1.0).abs() < 1e-6, "{}", sr.value);
}

#[test]
fn chain_filling_and_wavelength() {
    // 9 bonds, 10 atoms, 10 pi electrons: HOMO 5, LUMO 6; wavelength = hc/gap
    // with hc = 1239.841 984 eV nm (CODATA 2022, exact).
    let sol = solve("[chain]\nbonds = 9\nalternation = 0.6\n[grid]\npoints = 700\norder = 8\n");
    let occ = sol.occupancy.as_ref().unwrap();
    assert_eq!(occ.electrons, 10);
    assert_eq!(
        (occ.homo, occ.lumo, occ.singly_occupied),
        (5, Some(6), None)
    );
    let gap = sol.levels[5].energy - sol.levels[4].energy;
    assert!((occ.gap.unwrap() - gap).abs() < 1e-12);
    assert!((occ.wavelength_nm.unwrap() * gap / 1_239.841_984 - 1.0).abs() < 1e-9);
    // An odd count leaves the HOMO singly occupied.
    let m = model("[chain]\nbonds = 9\n[levels]\nelectrons = 9\n[grid]\npoints = 300\n");
    let sol = chainwell::pipeline::solve(&m).unwrap();
    let occ = sol.occupancy.unwrap();
    assert_eq!((occ.homo, occ.singly_occupied), (5, Some(5)));
}

#[test]
fn spectrum_integrates_back_to_the_strengths() {
    let m = model(
        "[chain]\nbonds = 7\nalternation = 0.5\n[grid]\npoints = 500\norder = 6\n\
         [spectrum]\nshape = \"gaussian\"\nwidth = 0.25\n",
    );
    let sol = chainwell::pipeline::solve(&m).unwrap();
    let total: f64 = sol.transitions.iter().map(|t| t.strength).sum();
    let sp = chainwell::pipeline::spectrum(&m, &sol);
    let back = integrated_strength(&sp);
    assert!((back / total - 1.0).abs() < 1e-3, "{back} vs {total}");
}

#[test]
fn default_chain_electrons_outside_the_levels_skip_the_filling() {
    // 10 pi electrons by default, but only levels 1..4 asked for: no error,
    // no occupancy, and a warning that says why.
    let sol = solve("[chain]\nbonds = 9\n[grid]\npoints = 200\n[levels]\ncount = 4\n");
    assert!(sol.occupancy.is_none());
    assert!(
        sol.warnings.iter().any(|w| w.contains("no occupancy")),
        "{:?}",
        sol.warnings
    );
}
