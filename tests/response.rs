//! Static response of the filled levels (`[response]`) against closed forms,
//! an independent finite-field computation and the free-electron scaling.

mod common;

use std::f64::consts::PI;
use std::process::Command;

use serde_json::Value;

use common::{bin, model, solve, t_e};

/// The harmonic well's exact polarizability: each electron gives e²/k
/// (the field only shifts the well by eF/k and lowers the energy by
/// e²F²/2k; Griffiths problem 2.49-style completion of the square), and
/// γ = 0 (the energy is exactly quadratic in F).
#[test]
fn harmonic_well_two_electrons_alpha_is_two_over_k_and_gamma_vanishes() {
    let k = 10.0;
    let sol = solve(&format!(
        "[domain]\nfrom = -8.0\nto = 8.0\n[grid]\npoints = 1600\norder = 8\n\
         [levels]\nelectrons = 2\n[response]\n\
         [[term]]\nshape = \"harmonic\"\ncenter = 0.0\nstiffness = {k}\n"
    ));
    let r = sol.response.as_ref().unwrap();
    let alpha = r.values.alpha;
    assert!((alpha / (2.0 / k) - 1.0).abs() < 1e-6, "alpha {alpha}");
    let gamma = r.values.gamma.unwrap();
    let box_gamma = box_response(2000, 8).gamma.unwrap();
    assert!(
        gamma.abs() < 1e-6 * box_gamma.abs(),
        "gamma {gamma} vs box {box_gamma}"
    );
    // Mirror-symmetric well: beta reported 0.
    assert!(r.values.beta_zero_by_symmetry);
    assert_eq!(r.values.beta, Some(0.0));
}

fn box_response(points: usize, order: u32) -> chainwell::observables::StaticResponse {
    let sol = solve(&format!(
        "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = {points}\norder = {order}\n\
         [levels]\nelectrons = 2\ncount = 12\n[response]\n"
    ));
    sol.response.unwrap().values
}

#[test]
fn ten_angstrom_box_alpha_matches_the_closed_form_sum_over_states() {
    // alpha = 2 electrons * 2 sum_n |<1|x|n>|^2 / (E_n - E_1) with the box's
    // levels E_n = t (n pi / L)^2 (Griffiths eq. 2.30) and dipoles
    // <1|x|n> = -8 L n / (pi^2 (n^2 - 1)^2) for even n, 0 for odd n
    // (the integral (2/L) int_0^L x sin(pi x/L) sin(n pi x/L) dx, by parts;
    // H. Kuhn, J. Chem. Phys. 17, 1198 (1949) uses the same integrals).
    let l = 10.0;
    let t = t_e();
    let e = |n: f64| t * (n * PI / l).powi(2);
    let mut exact = 0.0;
    for n in (2..200_000).step_by(2) {
        let nf = n as f64;
        let d = 8.0 * l * nf / (PI * PI * (nf * nf - 1.0).powi(2));
        exact += 4.0 * d * d / (e(nf) - e(1.0));
    }
    let r = box_response(2000, 8);
    assert!(
        (r.alpha / exact - 1.0).abs() < 1e-6,
        "{} vs {exact}",
        r.alpha
    );
    // gamma against bench/response_finite_field.py (numpy, its own
    // second-order grid, finite fields, h^2-extrapolated; default options):
    // -192.7105 e^4 A^4 / eV^3.
    let gamma = r.gamma.unwrap();
    let reference = FINITE_FIELD_GAMMA;
    assert!(
        (gamma / reference - 1.0).abs() < 5e-3,
        "{gamma} vs {reference}"
    );
}

/// Output of `python3 bench/response_finite_field.py` (10 A box, 2
/// electrons): the extrapolated gamma in e^4 A^4 / eV^3.
const FINITE_FIELD_GAMMA: f64 = -192.7105;

/// Total energy of the filled levels with a field `f` (V/A) added as a
/// linear term, by chainwell's own eigen-solver.
fn energy_in_field(base: &str, f: f64) -> f64 {
    let text = format!("{base}[[term]]\nshape = \"linear\"\nslope = {f}\n");
    let sol = chainwell::pipeline::solve_with(
        &model(&text),
        &chainwell::pipeline::SolveOptions {
            estimate: false,
            ..Default::default()
        },
    )
    .unwrap();
    sol.occupancy.unwrap().total_energy
}

#[test]
fn a_lopsided_well_agrees_with_finite_fields_of_the_total_energy() {
    // E(F) at F = 0, +-f, +-2f, +-3f: the central-difference stencils of the
    // second, third and fourth derivatives (Fornberg, Math. Comp. 51, 699
    // (1988)), whose leading errors are O(f^2).
    let base = "[domain]\nfrom = 0.0\nto = 8.0\n[grid]\npoints = 400\norder = 8\n\
                [levels]\nelectrons = 4\n\
                [[term]]\nshape = \"gauss\"\ncenter = 2.5\nheight = -1.5\nwidth = 0.8\n";
    let sol = solve(&format!("{base}[response]\n"));
    let r = sol.response.unwrap().values;
    assert!(!r.beta_zero_by_symmetry);
    let f = 0.02;
    let e: Vec<f64> = (-3..=3)
        .map(|k| energy_in_field(base, k as f64 * f))
        .collect();
    let (m3, m2, m1, z, p1, p2, p3) = (e[0], e[1], e[2], e[3], e[4], e[5], e[6]);
    // Sixth-order second derivative: (2(p3+m3) - 27(p2+m2) + 270(p1+m1) - 490 z) / (180 f^2).
    let d2 = (2.0 * (p3 + m3) - 27.0 * (p2 + m2) + 270.0 * (p1 + m1) - 490.0 * z) / (180.0 * f * f);
    // Fourth-order third derivative: (-(p3-m3) + 8(p2-m2) - 13(p1-m1)) / (8 f^3).
    let d3 = (-(p3 - m3) + 8.0 * (p2 - m2) - 13.0 * (p1 - m1)) / (8.0 * f.powi(3));
    // Fourth-order fourth derivative: (-(p3+m3) + 12(p2+m2) - 39(p1+m1) + 56 z) / (6 f^4).
    let d4 = (-(p3 + m3) + 12.0 * (p2 + m2) - 39.0 * (p1 + m1) + 56.0 * z) / (6.0 * f.powi(4));
    let close = |got: f64, want: f64, tol: f64, what: &str| {
        assert!(
            (got / want - 1.0).abs() < tol,
            "{what}: {got} vs finite field {want}"
        );
    };
    close(r.alpha, -d2, 1e-6, "alpha");
    close(r.beta.unwrap(), -d3, 1e-3, "beta");
    close(r.gamma.unwrap(), -d4, 1e-2, "gamma");
}

#[test]
fn numerov_and_finite_differences_agree_on_the_response() {
    let text = |scheme: &str| {
        format!(
            "[domain]\nfrom = 0.0\nto = 8.0\n[grid]\npoints = 1200\nscheme = \"{scheme}\"\n\
             [levels]\nelectrons = 3\n[response]\n\
             [[term]]\nshape = \"gauss\"\ncenter = 2.5\nheight = -1.5\nwidth = 0.8\n"
        )
    };
    let fd = solve(&text("finite-difference")).response.unwrap().values;
    let nu = solve(&text("numerov")).response.unwrap().values;
    // Both fourth order on a fine grid: the same numbers to well below 1e-6.
    assert!(
        (nu.alpha / fd.alpha - 1.0).abs() < 1e-6,
        "{} vs {}",
        nu.alpha,
        fd.alpha
    );
    assert!((nu.beta.unwrap() / fd.beta.unwrap() - 1.0).abs() < 1e-5);
    assert!((nu.gamma.unwrap() / fd.gamma.unwrap() - 1.0).abs() < 1e-5);
}

fn scratch_input(name: &str, text: &str) -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("chainwell-response-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    let p = d.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

#[test]
fn a_sweep_of_the_ideal_chain_gives_alpha_growing_as_the_cube_of_its_length() {
    // Free-electron chains: alpha ~ L^3 (K. C. Rustagi and J. Ducuing, Opt.
    // Commun. 10, 258 (1974)).
    let input = scratch_input(
        "chain.toml",
        "[chain]\nbonds = 20\n[grid]\nspacing = 0.02\n[response]\n",
    );
    let out = Command::new(bin())
        .args([
            "sweep",
            input.to_str().unwrap(),
            "--vary",
            "chain.bonds=20,40",
            "--json",
        ])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let doc: Value = serde_json::from_slice(&out.stdout).unwrap();
    let a = doc["response_scaling"]["alpha_exponent"].as_f64().unwrap();
    assert!((a - 3.0).abs() < 0.5, "alpha ~ L^{a}");
    assert!(doc["response_scaling"]["gamma_exponent"].as_f64().unwrap() > a);
    for row in doc["rows"].as_array().unwrap() {
        assert!(row["response"]["alpha"].as_f64().unwrap() > 0.0);
        assert_eq!(row["response"]["beta"], 0.0);
    }
    let csv = Command::new(bin())
        .args([
            "sweep",
            input.to_str().unwrap(),
            "--vary",
            "chain.bonds=20,40",
        ])
        .output()
        .unwrap();
    let table = String::from_utf8_lossy(&csv.stdout);
    assert!(
        table.contains("alpha/A^3") && table.contains("alpha ~ L^"),
        "{table}"
    );
}

#[test]
fn the_solve_document_carries_the_response() {
    let input = scratch_input(
        "box.toml",
        "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 800\norder = 8\n[levels]\nelectrons = 2\n[response]\n",
    );
    let out = Command::new(bin())
        .args(["solve", input.to_str().unwrap(), "--json"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let doc: Value = serde_json::from_slice(&out.stdout).unwrap();
    let r = &doc["response"];
    // alpha in A^3 is 14.3996 times the internal e^2 A^2 / eV (e^2/4 pi eps0
    // = 14.399645 eV A, from memory); the box's about 11.52 e^2 A^2/eV.
    let alpha = r["alpha"].as_f64().unwrap();
    assert!(
        (alpha / (11.519_85 * 14.399_645) - 1.0).abs() < 1e-4,
        "{alpha}"
    );
    assert_eq!(r["beta"], 0.0);
    assert!(r["gamma"].as_f64().unwrap() < 0.0);
    assert!(r["sum_over_states"]["missing_fraction"].as_f64().unwrap() >= 0.0);
    let table = Command::new(bin())
        .args(["solve", input.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&table.stdout).contains("static response along x"));
    // A ring is refused at the [response] table, exit status 2.
    let ring = scratch_input(
        "ring.toml",
        "[domain]\nfrom = 0.0\nto = 10.0\nboundary = \"periodic\"\n[levels]\nelectrons = 2\n[response]\n",
    );
    let out = Command::new(bin())
        .args(["solve", ring.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("ring.toml:7"));
}
