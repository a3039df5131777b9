//! The main job checked against closed forms from outside the project:
//! the ideal box, the harmonic oscillator, the Morse oscillator and the
//! finite square well, with each order's convergence rate.

mod common;

use std::f64::consts::PI;

use common::{solve, t_e};

fn box_input(points: usize, order: u32, count: usize) -> String {
    format!(
        "[domain]\nfrom = 0.0\nto = 12.0\n[grid]\npoints = {points}\norder = {order}\n[levels]\ncount = {count}\n"
    )
}

/// E_n = n^2 h^2 / (8 m L^2) = t (n pi / L)^2: the particle in a box
/// (Griffiths, Introduction to Quantum Mechanics, eq. 2.30).
fn box_level(n: usize, length: f64) -> f64 {
    t_e() * (n as f64 * PI / length).powi(2)
}

#[test]
fn ideal_box_order_8_reaches_1e_8_for_ten_levels() {
    let sol = solve(&box_input(1000, 8, 10));
    for l in &sol.levels {
        let exact = box_level(l.n, 12.0);
        let rel = (l.energy / exact - 1.0).abs();
        assert!(rel < 1e-8, "n = {}: relative error {rel:e}", l.n);
        assert_eq!(l.nodes, l.n - 1);
        assert_eq!(l.box_energy, Some(exact));
    }
}

#[test]
fn ideal_chain_is_the_ideal_box() {
    // bonds * bond_length + 2 * end_extension = 7 * 1.4 + 2 * 1.4 = 12.6 Å.
    let sol = solve(
        "[chain]\nbonds = 7\nbond_length = 1.4\nend_extension = 1.4\nalternation = 0.0\n\
         [grid]\npoints = 1000\norder = 8\n[levels]\ncount = 10\n",
    );
    assert!((sol.box_length - 12.6).abs() < 1e-12);
    for l in &sol.levels {
        let rel = (l.energy / box_level(l.n, 12.6) - 1.0).abs();
        assert!(rel < 1e-8, "n = {}: {rel:e}", l.n);
    }
    // One pi electron per atom by default: 8 electrons, HOMO 4, LUMO 5.
    let occ = sol.occupancy.as_ref().unwrap();
    assert_eq!((occ.homo, occ.lumo), (4, Some(5)));
}

#[test]
fn each_order_converges_at_its_rate() {
    // Halving the spacing divides the error of an order-p stencil by about
    // 2^p (common practice, no source). Level 3 on coarse grids, where the
    // error is far above round-off.
    for (order, points) in [(2u32, 60usize), (4, 60), (6, 40), (8, 30)] {
        let err = |pts: usize| {
            let sol = solve(&box_input(pts, order, 3));
            (sol.levels[2].energy - box_level(3, 12.0)).abs()
        };
        // Steps: L / (N + 1); N -> 2N + 1 halves the spacing exactly.
        let ratio = err(points) / err(2 * points + 1);
        let expected = 2f64.powi(order as i32);
        assert!(
            ratio > 0.8 * expected && ratio < 1.25 * expected,
            "order {order}: ratio {ratio}, expected about {expected}"
        );
    }
}

#[test]
fn harmonic_oscillator_matches_hbar_omega_n_plus_half() {
    // E_v = hbar omega (v + 1/2), hbar omega = sqrt(2 t k) for V = k x^2 / 2
    // (Griffiths eq. 2.61).
    let k = 10.0;
    let sol = solve(&format!(
        "[domain]\nfrom = -8.0\nto = 8.0\n[grid]\npoints = 1600\norder = 8\n[levels]\ncount = 6\n\
         [[term]]\nshape = \"harmonic\"\ncenter = 0.0\nstiffness = {k}\n"
    ));
    let hw = (2.0 * t_e() * k).sqrt();
    for l in &sol.levels {
        let exact = hw * (l.n as f64 - 0.5);
        let rel = (l.energy / exact - 1.0).abs();
        assert!(rel < 1e-8, "n = {}: {rel:e}", l.n);
        assert_eq!(l.nodes, l.n - 1);
    }
}

#[test]
fn morse_oscillator_matches_its_closed_form() {
    // E_v = hbar w (v + 1/2) - [hbar w (v + 1/2)]^2 / (4 D), with
    // hbar w = sqrt(4 t_mu a^2 D) (P. M. Morse, Phys. Rev. 34, 57 (1929)).
    // Mass 918.6 m_e (about half a hydrogen atom), D = 4.75 eV, a = 1.94 / Å.
    let (mass, depth, range) = (918.6, 4.75, 1.94);
    let sol = solve(&format!(
        "[particle]\nmass = {mass}\n[domain]\nfrom = 0.2\nto = 3.0\n[grid]\npoints = 2000\norder = 8\n\
         [levels]\ncount = 6\n[[term]]\nshape = \"morse\"\ncenter = 0.741\ndepth = {depth}\nrange = {range}\n"
    ));
    let t = t_e() / mass;
    let hw = (4.0 * t * range * range * depth).sqrt();
    for l in &sol.levels {
        let v = l.n as f64 - 0.5;
        let exact = hw * v - (hw * v).powi(2) / (4.0 * depth);
        let rel = (l.energy / exact - 1.0).abs();
        assert!(rel < 1e-8, "n = {}: {rel:e}", l.n);
    }
}

/// Bound levels of the finite square well |x| < a, V = -V0, by bisection on
/// Griffiths' eqs. 2.155-2.156 (section 2.6): with z = l a,
/// z0 = a sqrt(V0 / t), even states tan z = sqrt((z0/z)^2 - 1), odd states
/// -cot z = sqrt((z0/z)^2 - 1); E = -V0 + t (z/a)^2.
fn square_well_levels(a: f64, v0: f64) -> Vec<f64> {
    let t = t_e();
    let z0 = a * (v0 / t).sqrt();
    let rhs = |z: f64| ((z0 / z).powi(2) - 1.0).sqrt();
    let mut out = Vec::new();
    let mut j = 0;
    loop {
        // Branch j: z in (j pi/2, (j+1) pi/2); even states on even j.
        let lo = j as f64 * PI / 2.0 + 1e-12;
        let hi = ((j + 1) as f64 * PI / 2.0 - 1e-12).min(z0 - 1e-12);
        if lo >= hi {
            break;
        }
        let f = |z: f64| {
            if j % 2 == 0 {
                z.tan() - rhs(z)
            } else {
                -1.0 / z.tan() - rhs(z)
            }
        };
        let (mut a_, mut b_) = (lo, hi);
        if f(a_) * f(b_) > 0.0 {
            break;
        }
        for _ in 0..200 {
            let m = 0.5 * (a_ + b_);
            if f(a_) * f(m) <= 0.0 {
                b_ = m;
            } else {
                a_ = m;
            }
        }
        let z = 0.5 * (a_ + b_);
        out.push(-v0 + t * (z / a).powi(2));
        j += 1;
    }
    out
}

#[test]
fn finite_square_well_matches_transcendental_roots_to_step_accuracy() {
    // A step edge limits finite differences to low and erratic order: at
    // 2000 points the error is about 1e-3 relative (common practice, no
    // source), so this test asks for 2e-3 of the level's kinetic energy
    // E + V0.
    let sol = solve(
        "[domain]\nfrom = -15.0\nto = 15.0\n[grid]\npoints = 2000\norder = 4\n[levels]\ncount = 2\n\
         [[term]]\nshape = \"step\"\nfrom = -3.0\nto = 3.0\nheight = -2.0\n",
    );
    let exact = square_well_levels(3.0, 2.0);
    assert!(exact.len() >= 2, "{exact:?}");
    for (l, e) in sol.levels.iter().zip(&exact) {
        let rel = ((l.energy - e) / (e + 2.0)).abs();
        assert!(rel < 2e-3, "n = {}: {} vs {e}: {rel:e}", l.n, l.energy);
    }
}
