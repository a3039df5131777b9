//! `chainwell bands` through the built binary, and the ring degeneracy
//! summary of `chainwell solve`.

mod common;

use std::f64::consts::PI;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use chainwell::bands::solve_k;
use chainwell::pipeline::cell::cell_from_model;
use common::{bin, t_e};
use proptest::prelude::*;
use serde_json::Value;

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("chainwell-bands-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn write_input(name: &str, text: &str) -> PathBuf {
    let p = scratch(name).join("input.toml");
    std::fs::write(&p, text).unwrap();
    p
}

fn run(args: &[&str]) -> Output {
    Command::new(bin()).args(args).output().unwrap()
}

fn json_of(out: &Output) -> Value {
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

fn floats(v: &Value) -> Vec<f64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

/// The lowest `n` folded free-particle energies `t (k + 2 pi j / a)^2`
/// (closed form: the empty lattice, Ashcroft & Mermin ch. 9).
fn folded_parabolas(t: f64, a: f64, k: f64, n: usize) -> Vec<f64> {
    let mut e: Vec<f64> = (-(n as i64)..=(n as i64))
        .map(|j| t * (k + 2.0 * PI * j as f64 / a).powi(2))
        .collect();
    e.sort_by(f64::total_cmp);
    e.truncate(n);
    e
}

const FREE_CELL: &str = "\
title = \"empty lattice\"
[domain]
from = -0.7
to = 2.1
[grid]
points = 96
order = 8
[levels]
count = 6
";

#[test]
fn free_particle_bands_are_folded_parabolas() {
    let input = write_input("free", FREE_CELL);
    let doc = json_of(&run(&[
        "bands",
        input.to_str().unwrap(),
        "--kpoints",
        "17",
        "--json",
        "--no-timing",
    ]));
    assert_eq!(doc["format"], "chainwell.bands/1");
    assert_eq!(doc["units"]["energy"], "eV");
    assert_eq!(doc["units"]["length"], "angstrom");
    assert_eq!(doc["cell"]["points"], 96);
    assert!(doc.get("timing").is_none());
    let a = 2.8;
    let k = floats(&doc["k"]);
    assert_eq!(k.len(), 17);
    assert_eq!(k[0], 0.0);
    assert!((k[16] - PI / a).abs() < 1e-15, "{}", k[16]);
    let bands: Vec<Vec<f64>> = doc["bands"]
        .as_array()
        .unwrap()
        .iter()
        .map(floats)
        .collect();
    assert_eq!(bands.len(), 6);
    let mut worst: f64 = 0.0;
    for (i, &kk) in k.iter().enumerate() {
        let exact = folded_parabolas(t_e(), a, kk, 6);
        for (b, &ex) in exact.iter().enumerate() {
            let e = bands[b][i];
            if ex == 0.0 {
                assert!(e.abs() < 1e-10, "band 1 at k = 0: {e}");
            } else {
                let rel = (e - ex).abs() / ex;
                worst = worst.max(rel);
                assert!(rel < 1e-8, "band {} at k = {kk}: {e} vs {ex}", b + 1);
            }
        }
    }
    eprintln!("free bands: worst relative error {worst:e}");
    // The folded parabolas touch at k = 0 and pi/a: no gaps.
    assert_eq!(doc["gaps"].as_array().unwrap().len(), 0, "{}", doc["gaps"]);
    // Band 1's bottom is a free electron: m* = 1 (closed form).
    let m = doc["edges"][0]["bottom"]["effective_mass"]
        .as_f64()
        .unwrap();
    assert!((m - 1.0).abs() < 1e-5, "m* = {m}");
    assert_eq!(doc["edges"][0]["bottom"]["k"], 0.0);
}

#[test]
fn wavevectors_follow_the_length_unit() {
    // The same cell in nm: k in 1/nm is 10 times k in 1/angstrom.
    let input = write_input(
        "nm",
        "[units]\nlength = \"nm\"\n[domain]\nfrom = 0.0\nto = 0.28\n[grid]\npoints = 40\n[levels]\ncount = 2\n",
    );
    let doc = json_of(&run(&[
        "bands",
        input.to_str().unwrap(),
        "--json",
        "--kpoints",
        "3",
    ]));
    assert_eq!(doc["units"]["wavevector"], "1/nm");
    let k = floats(&doc["k"]);
    assert!((k[2] - 10.0 * PI / 2.8).abs() < 1e-12, "{}", k[2]);
}

const ALTERNATING: &str = "\
[chain]
bonds = 11
bond_length = 1.40
end_extension = 1.40
alternation = 3.0
[grid]
spacing = 0.1
order = 8
[levels]
count = 3
";

/// A chain with a site and a term, so the cell is not symmetric about its
/// centre.
const LOPSIDED: &str = "\
[chain]
bonds = 7
alternation = 0.8
[[chain.site]]
atom = 2
height = -1.0
[[term]]
shape = \"ripple\"
amplitude = 0.4
period = 2.8
phase = 0.3
[grid]
spacing = 0.07
order = 6
[levels]
count = 4
";

fn lopsided_cell() -> chainwell::pipeline::cell::Cell {
    let (model, _) =
        chainwell::input::load_str("lopsided.toml", LOPSIDED.into(), Path::new("."), &[])
            .unwrap_or_else(|e| panic!("{}", e.render()));
    let cell = cell_from_model(&model).unwrap();
    assert!(cell.warnings.iter().any(|w| w.contains("site")));
    cell
}

#[test]
fn command_bands_agree_with_the_cell_solved_at_minus_k_and_shifted_k() {
    let input = write_input("lopsided", LOPSIDED);
    let out = run(&["bands", input.to_str().unwrap(), "--json", "--kpoints", "5"]);
    let doc = json_of(&out);
    // The site is left out, and the user is told.
    let warnings = doc["warnings"].as_array().unwrap();
    assert!(warnings
        .iter()
        .any(|w| w.as_str().unwrap().contains("site")));
    assert!(String::from_utf8_lossy(&out.stderr).contains("site"));
    let cell = lopsided_cell();
    let problem = cell.problem();
    let g = 2.0 * PI / cell.period;
    let k = floats(&doc["k"]);
    for (i, &kk) in k.iter().enumerate() {
        for kq in [-kk, kk + g, -kk - 2.0 * g] {
            let e = solve_k(&problem, kq, 4).unwrap();
            for b in 0..4 {
                let got = doc["bands"][b][i].as_f64().unwrap();
                // Bloch's theorem: even in k, periodic in 2 pi / a (Ashcroft & Mermin ch. 8).
                assert!(
                    (got - e[b]).abs() < 1e-9 * (1.0 + got.abs()),
                    "band {} k {kk} vs {kq}: {got} vs {}",
                    b + 1,
                    e[b]
                );
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(12))]

    // Bloch's theorem (Ashcroft & Mermin ch. 8): bands of a cell built from a
    // chain input are even in k and periodic with 2 pi / a.
    #[test]
    fn chain_cell_bands_are_even_and_periodic(frac in -1.0f64..1.0, shift in -2i32..3) {
        let cell = lopsided_cell();
        let p = cell.problem();
        let k = frac * PI / cell.period;
        let e = solve_k(&p, k, 4).unwrap();
        let em = solve_k(&p, -k, 4).unwrap();
        let es = solve_k(&p, k + shift as f64 * 2.0 * PI / cell.period, 4).unwrap();
        for b in 0..4 {
            prop_assert!((e[b] - em[b]).abs() < 1e-9 * (1.0 + e[b].abs()));
            prop_assert!((e[b] - es[b]).abs() < 1e-9 * (1.0 + e[b].abs()));
        }
    }
}

#[test]
fn zone_edge_gap_is_the_limit_of_long_finite_chains() {
    let input = write_input("alternating", ALTERNATING);
    let doc = json_of(&run(&[
        "bands",
        input.to_str().unwrap(),
        "--json",
        "--kpoints",
        "9",
        "--finite",
        "5:53:8",
    ]));
    // The gap between bands 1 and 2 sits at the zone edge (direct).
    let gap = &doc["gaps"][0];
    assert_eq!(gap["below"], 1);
    assert_eq!(gap["above"], 2);
    assert_eq!(gap["direct"], true);
    let edge = PI / 2.8;
    assert!((gap["lower_edge"]["k"].as_f64().unwrap() - edge).abs() < 1e-12);
    assert!((gap["upper_edge"]["k"].as_f64().unwrap() - edge).abs() < 1e-12);
    let band_gap = gap["size"].as_f64().unwrap();
    // Nearly-free-electron estimate: gap = 2 |V_G| = the ripple amplitude,
    // 3 eV (Kittel ch. 7), up to higher orders in V / (hbar^2 G^2 / 8m).
    assert!((band_gap - 3.0).abs() < 0.1, "band gap {band_gap}");
    assert_eq!(doc["filling"]["filled_bands"], 1);
    assert_eq!(doc["filling"]["gap"].as_f64().unwrap(), band_gap);
    let chains = doc["finite"]["chains"].as_array().unwrap();
    assert_eq!(chains.len(), 7);
    let mut previous = f64::INFINITY;
    let mut rows = Vec::new();
    for c in chains {
        let bonds = c["bonds"].as_u64().unwrap();
        let g = c["gap"].as_f64().unwrap();
        let excess = g - band_gap;
        assert!(
            (c["gap_minus_band_gap"].as_f64().unwrap() - excess).abs() < 1e-12,
            "{c}"
        );
        assert_eq!(c["homo"].as_u64().unwrap(), (bonds + 2) / 2);
        // Finite chains approach the band gap from above, ever closer.
        assert!(excess > 0.0 && excess < previous, "{bonds} bonds: {excess}");
        previous = excess;
        rows.push((c["box_length"].as_f64().unwrap(), g));
        eprintln!("{bonds:>3} bonds: gap {g:.6} eV, excess {excess:.6} eV");
    }
    // Within a few percent at the longest chain (53 bonds)...
    assert!(previous / band_gap < 0.03, "{previous} of {band_gap}");
    // ... and the excess falls as 1/L^2 (effective-mass argument: the frontier
    // levels sit about pi/L from the zone edge, where E - E_edge grows as
    // (k - pi/a)^2; from memory), so the two longest chains extrapolate to
    // the band gap much more closely.
    let (l1, g1) = rows[rows.len() - 2];
    let (l2, g2) = rows[rows.len() - 1];
    let limit = (g2 * l2 * l2 - g1 * l1 * l1) / (l2 * l2 - l1 * l1);
    eprintln!("extrapolated {limit:.6} eV vs band gap {band_gap:.6} eV");
    assert!((limit - band_gap).abs() / band_gap < 0.005, "{limit}");
}

#[test]
fn table_and_csv_show_the_same_bands() {
    let input = write_input("csv", FREE_CELL);
    let csv = scratch("csv").join("bands.csv");
    let out = run(&[
        "bands",
        input.to_str().unwrap(),
        "--kpoints",
        "4",
        "--csv",
        csv.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let table = String::from_utf8(out.stdout).unwrap();
    assert!(table.contains("band edges"), "{table}");
    assert!(table.contains("empty lattice"), "{table}");
    let text = std::fs::read_to_string(&csv).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines[0], "k (1/angstrom),band,energy (eV)");
    assert_eq!(lines.len(), 1 + 4 * 6);
    // Row 2 (k = 0, band 2) is t (2 pi / a)^2 (closed form).
    let fields: Vec<f64> = lines[2].split(',').map(|f| f.parse().unwrap()).collect();
    assert_eq!(fields[0], 0.0);
    assert_eq!(fields[1], 2.0);
    let exact = t_e() * (2.0 * PI / 2.8_f64).powi(2);
    assert!((fields[2] - exact).abs() / exact < 1e-8, "{}", fields[2]);
}

#[test]
fn usage_and_input_faults_exit_with_2() {
    let input = write_input("faults", FREE_CELL);
    let path = input.to_str().unwrap();
    // --finite needs a chain.
    let out = run(&["bands", path, "--finite", "3:9:2"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("[chain]"));
    let out = run(&["bands", path, "--kpoints", "1"]);
    assert_eq!(out.status.code(), Some(2));
    let chain = write_input("faults-chain", ALTERNATING);
    let out = run(&["bands", chain.to_str().unwrap(), "--finite", "9:3"]);
    assert_eq!(out.status.code(), Some(2));
    // A cell of 6 points cannot carry an order-8 stencil: the message names
    // the key and the file.
    let coarse = write_input(
        "faults-coarse",
        &FREE_CELL.replace("points = 96", "points = 6"),
    );
    let out = run(&["bands", coarse.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("grid.points") && err.contains("input.toml"),
        "{err}"
    );
    // More bands than cell points.
    let out = run(&["bands", path, "--set", "levels.count=97"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("levels.count"));
    // Nothing on stdout on failure.
    assert!(out.stdout.is_empty());
}

const FREE_RING: &str = "\
[domain]
from = 0.0
to = 25.2
boundary = \"periodic\"
[grid]
points = 600
order = 8
[levels]
count = 11
";

#[test]
fn free_ring_levels_come_in_degenerate_pairs() {
    let input = write_input("ring", FREE_RING);
    let doc = json_of(&run(&["solve", input.to_str().unwrap(), "--json"]));
    let levels = doc["levels"].as_array().unwrap();
    assert_eq!(levels.len(), 11);
    let l = 25.2;
    for (i, lv) in levels.iter().enumerate() {
        // E = hbar^2 (2 pi j / L)^2 / 2m, j = 0, +-1, +-2, ... (closed form).
        let j = i.div_ceil(2) as f64;
        let exact = t_e() * (2.0 * PI * j / l).powi(2);
        let e = lv["energy"].as_f64().unwrap();
        if j == 0.0 {
            assert!(e.abs() < 1e-10, "{e}");
        } else {
            assert!(
                (e - exact).abs() / exact < 1e-8,
                "level {}: {e} vs {exact}",
                i + 1
            );
        }
    }
    let groups = doc["degeneracies"].as_array().unwrap();
    let sizes: Vec<usize> = groups
        .iter()
        .map(|g| g["levels"].as_array().unwrap().len())
        .collect();
    assert_eq!(sizes, vec![1, 2, 2, 2, 2, 2]); // closed form: j = 0 alone, then +-j
    assert_eq!(groups[1]["levels"], serde_json::json!([2, 3]));
    let e1 = t_e() * (2.0 * PI / l).powi(2);
    assert!((groups[1]["energy"].as_f64().unwrap() - e1).abs() / e1 < 1e-8);
    // The table says so in words.
    let out = run(&["solve", input.to_str().unwrap()]);
    let table = String::from_utf8(out.stdout).unwrap();
    assert!(table.contains("levels 2, 3"), "{table}");
    assert!(table.contains("degenerate"), "{table}");
}

#[test]
fn a_ring_with_one_bump_is_not_degenerate_and_walls_have_no_summary() {
    // A Gaussian bump breaks the rotation symmetry but keeps a mirror, so the
    // pairs split into cos-like and sin-like states (perturbation theory,
    // from memory).
    let bumped = format!(
        "{FREE_RING}[[term]]\nshape = \"gauss\"\ncenter = 12.6\nheight = 0.5\nwidth = 1.0\n"
    );
    let input = write_input("bumped", &bumped);
    let doc = json_of(&run(&["solve", input.to_str().unwrap(), "--json"]));
    let groups = doc["degeneracies"].as_array().unwrap();
    assert_eq!(groups.len(), 11, "{groups:?}");
    let walls = write_input("walls", &FREE_RING.replace("periodic", "walls"));
    let doc = json_of(&run(&["solve", walls.to_str().unwrap(), "--json"]));
    assert!(doc.get("degeneracies").is_none());
}

#[test]
fn curated_polymer_cell_runs() {
    let p = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("potentials")
        .join("polymer_cell.toml");
    let doc = json_of(&run(&[
        "bands",
        p.to_str().unwrap(),
        "--json",
        "--kpoints",
        "5",
    ]));
    assert_eq!(doc["cell"]["source"], "chain");
    let g = doc["filling"]["gap"].as_f64().unwrap();
    // Nearly-free-electron estimate: gap close to the alternation amplitude,
    // 1.2 eV (Kittel ch. 7).
    assert!((g - 1.2).abs() < 0.05, "{g}");
}
