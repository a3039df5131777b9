//! Tests of the pipeline: guards, warnings and the guided path.

use std::path::Path;

use super::guards::residual_ratio;
use super::limits::{GUESS_MIN_POINTS, RESIDUAL_LIMIT};
use super::*;
use crate::eigen::{self, EigenParams, Method};
use crate::hamiltonian;
use crate::input::Model;

fn model(text: &str) -> Model {
    crate::input::load_str("t.toml", text.into(), Path::new("."), &[])
        .unwrap()
        .0
}

fn banded(wrap: bool) -> eigen::SymBanded {
    let n = 7;
    let off = |d: usize| if wrap { n } else { n - d };
    eigen::SymBanded {
        n,
        bands: (0..3)
            .map(|d| (0..off(d)).map(|i| (i * 3 + d) as f64 - 4.5).collect())
            .collect(),
        wrap,
    }
}

#[test]
fn banded_product_and_norm_match_the_dense_matrix() {
    for wrap in [false, true] {
        let m = banded(wrap);
        let dense = m.to_dense();
        let x: Vec<f64> = (0..m.n).map(|i| (i as f64).sin() + 0.3).collect();
        let mut y = vec![0.0; m.n];
        m.mul_vec(&x, &mut y);
        let want = &dense * nalgebra::DVector::from_vec(x.clone());
        for (a, b) in y.iter().zip(want.iter()) {
            assert!((a - b).abs() < 1e-12, "{wrap}: {a} vs {b}");
        }
        let col_max = (0..m.n)
            .map(|j| dense.column(j).iter().map(|v| v.abs()).sum::<f64>())
            .fold(0.0, f64::max);
        assert!((m.norm_one() - col_max).abs() < 1e-12);
    }
}

#[test]
fn a_vector_that_is_not_an_eigenvector_fails_the_residual_limit() {
    let sol = solve(&model(
        "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 60\n[levels]\ncount = 2\n",
    ))
    .unwrap();
    let grid = &sol.grid;
    let disc = hamiltonian::build(
        grid,
        &sol.potential,
        crate::constants::hbar2_over_2me_ev_a2(),
        crate::grid::Order::new(4).unwrap(),
        crate::grid::Scheme::FiniteDifference,
    );
    let z: Vec<f64> = sol.psi[0].iter().map(|p| p * grid.spacing.sqrt()).collect();
    let good = residual_ratio(&disc.a, None, sol.levels[0].energy, &z);
    assert!(good < 30.0, "{good}");
    let bad = residual_ratio(&disc.a, None, sol.levels[0].energy * 1.001, &z);
    assert!(bad > RESIDUAL_LIMIT, "{bad}");
    assert!(residual_ratio(&disc.a, None, f64::NAN, &z).is_nan());
}

#[test]
fn a_potential_far_above_the_kinetic_scale_is_refused() {
    let m = model("[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 50\n[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 10.0\nheight = 1e300\n");
    let e = solve(&m).unwrap_err();
    assert!(matches!(e, SolveError::IllConditioned { .. }), "{e}");
    assert!(!e.is_input_error());
}

#[test]
fn a_deep_well_warns_that_rounding_limits_the_energies() {
    let deep = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 100\n[levels]\ncount = 2\n[[term]]\nshape = \"step\"\nfrom = 4.0\nto = 6.0\nheight = -1e12\n";
    let sol = solve(&model(deep)).unwrap();
    assert!(
        sol.warnings.iter().any(|w| w.contains("rounding limits")),
        "{:?}",
        sol.warnings
    );
    // The same well 1 eV deep has no such warning.
    let shallow = deep.replace("-1e12", "-1.0");
    let sol = solve(&model(&shallow)).unwrap();
    assert!(
        !sol.warnings.iter().any(|w| w.contains("rounding")),
        "{:?}",
        sol.warnings
    );
}

#[test]
fn degenerate_levels_are_flagged_on_walls_but_not_on_a_ring() {
    // Two wells 7 angstrom apart behind a barrier of about 4000 eV: the
    // tunnel splitting is far below rounding.
    let wells = "[domain]\nfrom = -6.0\nto = 6.0\n[grid]\npoints = 200\n[levels]\ncount = 2\n[[term]]\nshape = \"formula\"\nexpression = \"50 * (x^2 - 9)^2\"\n";
    let sol = solve(&model(wells)).unwrap();
    assert!(
        sol.warnings
            .iter()
            .any(|w| w.contains("levels 1 and 2 are degenerate")),
        "{:?}",
        sol.warnings
    );
    // On a free ring levels 2 and 3 are exactly degenerate (k = ±1) by
    // symmetry; that is no warning.
    let ring = "[domain]\nfrom = 0.0\nto = 10.0\nboundary = \"periodic\"\n[grid]\npoints = 60\n[levels]\ncount = 3\n";
    let sol = solve(&model(ring)).unwrap();
    assert!(
        (sol.levels[2].energy - sol.levels[1].energy).abs() < 1e-9,
        "the ring's levels 2 and 3 should be degenerate"
    );
    assert!(sol.warnings.is_empty(), "{:?}", sol.warnings);
}

#[test]
fn large_higher_order_grids_take_order2_guesses_and_agree_with_shift_invert() {
    // invented test potential: a cosine ripple in a 40 angstrom box
    let text = "[domain]\nfrom = 0.0\nto = 40.0\n[grid]\npoints = 8000\nSCHEME\n[levels]\nfirst = 31\ncount = 6\n[[term]]\nshape = \"formula\"\nexpression = \"0.7 * cos(0.9 * x)\"\n";
    for scheme in ["order = 8", "order = 4", "scheme = \"numerov\""] {
        let m = model(&text.replace("SCHEME", scheme));
        let grid = grid_for(&m);
        assert!(grid.points > GUESS_MIN_POINTS);
        let guided = solve_on(&m, &grid, &EigenParams::default()).unwrap();
        assert_eq!(guided.diagnostics.method, "guided", "{scheme}");
        let plain = EigenParams {
            method: Method::ShiftInvert,
            ..Default::default()
        };
        let reference = solve_on(&m, &grid, &plain).unwrap();
        assert_eq!(reference.diagnostics.method, "shift-invert");
        let tol = 64.0 * guided.roundoff_floor;
        for (a, b) in guided.levels.iter().zip(&reference.levels) {
            assert_eq!(a.n, b.n);
            assert!(
                (a.energy - b.energy).abs() <= tol,
                "{scheme} level {}: {} vs {}",
                a.n,
                a.energy,
                b.energy
            );
        }
        let e = energies_on(&m, &grid, 30, 6, &EigenParams::default()).unwrap();
        for (a, b) in e.iter().zip(&reference.levels) {
            assert!((a - b.energy).abs() <= tol, "{scheme}: {a} vs {}", b.energy);
        }
    }
}

#[test]
fn order8_window_high_in_a_long_chain_stays_on_the_guided_path() {
    // Regression (the order-8 cliff): on a 2800 angstrom ripple chain with
    // 10^5 points, levels 991..1010, the raw order-2 values sat several level
    // spacings off their order-8 levels, the guided path failed and Lanczos
    // took over at 20x the cost. Corrected to first order (the Rayleigh
    // quotient of each order-2 vector in the order-8 matrix) they lead to a
    // proven window. Invented test potential, a cosine ripple of period 2.8 A.
    let text = "[domain]\nfrom = 0.0\nto = 2800.0\n[grid]\npoints = 100000\norder = 8\n[levels]\nfirst = 991\ncount = 20\n[[term]]\nshape = \"formula\"\nexpression = \"cos(2 * pi * x / 2.8)\"\n";
    let m = model(text);
    let grid = grid_for(&m);
    let guided = solve_on(&m, &grid, &EigenParams::default()).unwrap();
    assert_eq!(guided.diagnostics.method, "guided");
    // the window agrees with shift-invert Lanczos on the same matrix
    let plain = EigenParams {
        method: Method::ShiftInvert,
        ..Default::default()
    };
    let e = energies_on(&m, &grid, 990, 20, &plain).unwrap();
    let tol = 64.0 * roundoff_floor(&super::discretise::discretise(&m, &grid).unwrap());
    for (a, b) in guided.levels.iter().zip(&e) {
        assert!(
            (a.energy - b).abs() <= tol,
            "level {}: {} vs {b}",
            a.n,
            a.energy
        );
    }
}

#[test]
fn a_solve_above_the_memory_limit_says_what_fits_in_gb() {
    // 10^6 points with 2000 levels at order 2: 16 GB of level vectors alone
    let text =
        "[domain]\nfrom = 0.0\nto = 100.0\n[grid]\npoints = 1000000\n[levels]\ncount = 2000\n";
    let m = model(text);
    let params = EigenParams {
        memory_limit: 4 << 30,
        ..Default::default()
    };
    let e = solve_on(&m, &grid_for(&m), &params).unwrap_err();
    let SolveError::TooLarge {
        bytes,
        limit,
        max_levels,
        max_points,
        ..
    } = &e
    else {
        panic!("{e}");
    };
    assert!(*bytes > 16e9 && *limit == (4u64 << 30) as f64);
    // 8 bytes per point and level: a 4.29 GB limit holds about 500 levels
    // of 10^6 points, or 2000 levels of about 250 000 points
    assert!((480..=536).contains(max_levels), "{max_levels}");
    assert!((240_000..=268_000).contains(max_points), "{max_points}");
    let text = e.to_string();
    assert!(text.contains(" GB") && text.contains("levels.count") && text.contains("grid.points"));
    assert!(!e.is_input_error());
}
