//! Near-degenerate levels: a symmetric double well whose two lowest states
//! split by a few 1e-9 eV comes back with both states, orthogonal, in order,
//! with 0 and 1 nodes; and the states below any energy are exactly the
//! inertia count.

mod common;

use chainwell::eigen::{count_below, Problem};
use chainwell::hamiltonian;
use common::{model, solve};

/// A proton (1836.15 electron masses; from memory) in a quartic double well
/// `V = D ((x/a)^2 - 1)^2`, D = 2 eV, minima 1 Å apart: the tunnelling
/// splitting is about 6e-9 eV (measured here; demo values).
const WELLS: &str = "[particle]\nmass = 1836.15\n[domain]\nfrom = -1.5\nto = 1.5\n[grid]\npoints = 1500\norder = 8\n\
                     [levels]\ncount = 4\n[[term]]\nshape = \"formula\"\nexpression = \"D * ((x / a)^2 - 1)^2\"\n\
                     [term.constants]\nD = 2.0\na = 0.5\n";

#[test]
fn a_tunnelling_pair_split_by_1e_8_comes_back_whole() {
    let sol = solve(WELLS);
    let (a, b) = (&sol.levels[0], &sol.levels[1]);
    let split = b.energy - a.energy;
    assert!(split > 0.0 && split < 1e-8, "splitting {split:e}");
    assert_eq!((a.nodes, b.nodes), (0, 1));
    // Orthogonal on the grid: h sum psi_1 psi_2 = 0.
    let h = sol.grid.spacing;
    let overlap: f64 = sol.psi[0]
        .iter()
        .zip(&sol.psi[1])
        .map(|(p, q)| p * q)
        .sum::<f64>()
        * h;
    assert!(overlap.abs() < 1e-8, "overlap {overlap:e}");
    assert!(sol.diagnostics.orthogonality_ratio < 30.0);
    assert!(sol.diagnostics.residual_ratio < 30.0);
    // The pair is the symmetric and the antisymmetric state (the grid is
    // symmetric about x = 0), up to the mixing round-off allows: an angle of
    // about eps ||H|| / splitting ~ 1e-3 here (Davis and Kahan, SIAM J. Numer.
    // Anal. 7, 1 (1970)).
    let n = sol.psi[0].len();
    let max = sol.psi[0].iter().fold(0.0f64, |m, p| m.max(p.abs()));
    for i in 0..n {
        assert!(
            (sol.psi[0][i] - sol.psi[0][n - 1 - i]).abs() < 1e-2 * max,
            "even at {i}"
        );
        assert!(
            (sol.psi[1][i] + sol.psi[1][n - 1 - i]).abs() < 1e-2 * max,
            "odd at {i}"
        );
    }
}

#[test]
fn states_below_any_energy_equal_the_inertia_count() {
    let m = model(WELLS);
    let sol = chainwell::pipeline::solve(&m).unwrap();
    let disc = hamiltonian::build(
        &sol.grid,
        &sol.potential,
        m.kinetic(),
        m.grid.order,
        m.grid.scheme,
    );
    let problem = Problem {
        a: &disc.a,
        b: disc.b.as_ref(),
    };
    let energies: Vec<f64> = sol.levels.iter().map(|l| l.energy).collect();
    // Between and around the returned levels (Sylvester's law of inertia).
    let probes = [
        energies[0] - 1e-3,
        0.5 * (energies[0] + energies[1]),
        0.5 * (energies[1] + energies[2]),
        0.5 * (energies[2] + energies[3]),
    ];
    for (i, &e) in probes.iter().enumerate() {
        assert_eq!(count_below(&problem, e).unwrap(), i, "below {e}");
        assert_eq!(energies.iter().filter(|&&x| x < e).count(), i);
    }
}
