//! Error estimates that bound the true error, refinement to a tolerance, and
//! jumps in the potential, against closed forms.

mod common;

use std::f64::consts::PI;

use common::{solve, t_e};

/// Checks every level's estimate against the true error: it must bound it,
/// and exceed it at most 100-fold unless both sit at round-off.
fn check_estimates(label: &str, text: &str, exact: impl Fn(usize) -> f64) {
    let sol = solve(text);
    for l in &sol.levels {
        let est = l
            .error_estimate
            .unwrap_or_else(|| panic!("{label}: no estimate"));
        let err = (l.energy - exact(l.n)).abs();
        let at_roundoff = err < 10.0 * sol.roundoff_floor && est < 100.0 * sol.roundoff_floor;
        assert!(
            err <= est,
            "{label} n={}: error {err:e} above estimate {est:e}",
            l.n
        );
        assert!(
            at_roundoff || est <= 100.0 * err,
            "{label} n={}: estimate {est:e} vs error {err:e}",
            l.n
        );
    }
}

#[test]
fn estimates_bound_the_box_error_at_every_order() {
    // E_n = t (n pi / L)^2 (Griffiths eq. 2.30).
    for (order, points) in [(2, 300), (4, 150), (6, 80), (8, 60)] {
        let text = format!(
            "[domain]\nfrom = 0.0\nto = 12.0\n[grid]\npoints = {points}\norder = {order}\n[levels]\ncount = 5\n"
        );
        check_estimates(&format!("box order {order}"), &text, |n| {
            t_e() * (n as f64 * PI / 12.0).powi(2)
        });
    }
}

#[test]
fn estimates_bound_the_oscillator_error_at_every_order() {
    // E_v = hbar omega (v + 1/2), hbar omega = sqrt(2 t k) (Griffiths eq. 2.61).
    let hw = (2.0 * t_e() * 10.0).sqrt();
    for (order, points) in [(2, 800), (4, 300), (6, 200), (8, 160)] {
        let text = format!(
            "[domain]\nfrom = -8.0\nto = 8.0\n[grid]\npoints = {points}\norder = {order}\n[levels]\ncount = 5\n\
             [[term]]\nshape = \"harmonic\"\ncenter = 0.0\nstiffness = 10.0\n"
        );
        check_estimates(&format!("oscillator order {order}"), &text, |n| {
            hw * (n as f64 - 0.5)
        });
    }
}

#[test]
fn estimates_bound_the_morse_error_at_every_order() {
    // E_v = hbar w (v + 1/2) - [hbar w (v + 1/2)]^2 / (4 D), hbar w =
    // sqrt(4 t_mu a^2 D) (P. M. Morse, Phys. Rev. 34, 57 (1929)).
    let (mass, depth, range) = (918.6, 4.75, 1.94);
    let hw = (4.0 * t_e() / mass * range * range * depth).sqrt();
    let exact = |n: usize| {
        let v = n as f64 - 0.5;
        hw * v - (hw * v).powi(2) / (4.0 * depth)
    };
    for (order, points) in [(2, 1500), (4, 600), (6, 400), (8, 300)] {
        let text = format!(
            "[particle]\nmass = {mass}\n[domain]\nfrom = 0.2\nto = 3.0\n[grid]\npoints = {points}\norder = {order}\n\
             [levels]\ncount = 5\n[[term]]\nshape = \"morse\"\ncenter = 0.741\ndepth = {depth}\nrange = {range}\n"
        );
        check_estimates(&format!("Morse order {order}"), &text, exact);
    }
}

#[test]
fn tolerance_reaches_1e_9_on_the_oscillator() {
    // The ten lowest levels within 1e-9 relative of hbar omega (v + 1/2).
    let hw = (2.0 * t_e() * 10.0).sqrt();
    let sol = solve(
        "[domain]\nfrom = -8.0\nto = 8.0\n[grid]\ntolerance = 1e-9\norder = 8\n[levels]\ncount = 10\n\
         [[term]]\nshape = \"harmonic\"\ncenter = 0.0\nstiffness = 10.0\n",
    );
    assert!(sol.refinement.is_some());
    for l in &sol.levels {
        let exact = hw * (l.n as f64 - 0.5);
        let rel = (l.energy / exact - 1.0).abs();
        assert!(
            rel < 1e-9,
            "n = {}: {rel:e} on {} points",
            l.n,
            sol.grid.points
        );
    }
}

#[test]
fn unreachable_tolerance_is_refused_naming_the_limit() {
    let m = common::model(
        "[domain]\nfrom = -8.0\nto = 8.0\n[grid]\ntolerance = 1e-12\norder = 2\nmax_points = 3000\n\
         [levels]\ncount = 3\n[[term]]\nshape = \"harmonic\"\ncenter = 0.0\nstiffness = 10.0\n",
    );
    let e = chainwell::pipeline::solve(&m).unwrap_err().to_string();
    assert!(
        e.contains("grid.tolerance") && (e.contains("max_points") || e.contains("round-off")),
        "{e}"
    );
}

#[test]
fn square_well_extrapolation_beats_the_plain_levels() {
    // Bound levels of |x| < 3, V = -2 eV, from Griffiths sec. 2.6 (even
    // states: tan z = sqrt((z0/z)^2 - 1), odd: -cot z = ...), by bisection.
    let (a, v0) = (3.0, 2.0);
    let z0 = a * (v0 / t_e()).sqrt();
    let root = |even: bool, lo: f64, hi: f64| {
        let f = |z: f64| {
            let r = ((z0 / z).powi(2) - 1.0).sqrt();
            if even {
                z.tan() - r
            } else {
                -1.0 / z.tan() - r
            }
        };
        let (mut lo, mut hi) = (lo, hi);
        for _ in 0..200 {
            let m = 0.5 * (lo + hi);
            if f(lo) * f(m) <= 0.0 {
                hi = m
            } else {
                lo = m
            }
        }
        let z = 0.5 * (lo + hi);
        -v0 + t_e() * (z / a).powi(2)
    };
    // The walls at +-40 A shift the shallow second level by about
    // e^{-2 kappa 37 A} ~ 1e-9 relative: negligible here.
    let exact = [
        root(true, 1e-9, (PI / 2.0).min(z0) - 1e-9),
        root(false, PI / 2.0 + 1e-9, PI.min(z0) - 1e-9),
    ];
    let sol = solve(
        "[domain]\nfrom = -40.0\nto = 40.0\n[grid]\npoints = 2400\norder = 4\n[levels]\ncount = 2\n\
         [[term]]\nshape = \"step\"\nfrom = -3.0\nto = 3.0\nheight = -2.0\n",
    );
    assert!(sol.edges.aligned, "the step edges sit on grid points");
    for (l, e) in sol.levels.iter().zip(exact) {
        let plain = (l.energy - e).abs();
        let extra = (l.extrapolated.unwrap() - e).abs();
        assert!(
            extra < plain,
            "n={}: extrapolated {extra:e} not better than {plain:e}",
            l.n
        );
        assert!(
            plain <= l.error_estimate.unwrap(),
            "n={}: estimate does not bound {plain:e}",
            l.n
        );
    }
}
