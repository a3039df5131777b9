//! Cross-method tests on the chainwell test matrices and property tests
//! against the dense reference.

use std::f64::consts::PI;

use proptest::prelude::*;

use super::dense::dense_eigen;
use super::*;

/// hbar^2 / (2 m_e) in eV A^2 // common practice value 3.81, as in the task brief
const T_E: f64 = 3.81;

/// Central second-derivative weights c_0..c_p of order 2p // Fornberg, Math. Comp. 51 (1988) 699
fn fd_weights(p: usize) -> Vec<f64> {
    match p {
        1 => vec![-2.0, 1.0],
        2 => vec![-5.0 / 2.0, 4.0 / 3.0, -1.0 / 12.0],
        3 => vec![-49.0 / 18.0, 3.0 / 2.0, -3.0 / 20.0, 1.0 / 90.0],
        _ => vec![
            -205.0 / 72.0,
            8.0 / 5.0,
            -1.0 / 5.0,
            8.0 / 315.0,
            -1.0 / 560.0,
        ],
    }
}

/// H = -t D2/h^2 + diag(V) on x_i = x0 + i h.
fn hamiltonian(
    n: usize,
    h: f64,
    x0: f64,
    t: f64,
    p: usize,
    wrap: bool,
    v: impl Fn(f64) -> f64,
) -> SymBanded {
    let c = fd_weights(p);
    let s = t / (h * h);
    let mut bands = vec![(0..n)
        .map(|i| -s * c[0] + v(x0 + i as f64 * h))
        .collect::<Vec<_>>()];
    for (d, cd) in c.iter().enumerate().skip(1) {
        let len = if wrap { n } else { n - d };
        bands.push(vec![-s * cd; len]);
    }
    SymBanded { n, bands, wrap }
}

fn ripple(n: usize) -> SymBanded {
    ripple_len(n, 2800.0)
}

/// Ripple chain V = cos(2 pi x / 2.8) eV on [0, len] A.
fn ripple_len(n: usize, len: f64) -> SymBanded {
    let h = len / (n as f64 + 1.0);
    hamiltonian(n, h, h, T_E, 1, false, |x| (2.0 * PI * x / 2.8).cos())
}

fn check_ratios(info: &EigenInfo) {
    assert!(
        info.residual_ratio < 30.0,
        "residual ratio {}",
        info.residual_ratio
    );
    assert!(
        info.orthogonality_ratio < 30.0,
        "orthogonality ratio {}",
        info.orthogonality_ratio
    );
}

#[test]
fn box_tridiagonal_matches_closed_form() {
    for (n, first, count) in [(2000, 0, 20), (5000, 990, 20), (400, 399, 1)] {
        let h = 10.0 / (n as f64 + 1.0);
        let a = hamiltonian(n, h, h, T_E, 1, false, |_| 0.0);
        let pr = Problem { a: &a, b: None };
        let (ev, info) = solve(
            &pr,
            &Selection::Index { first, count },
            &EigenParams::default(),
        )
        .unwrap();
        assert_eq!(info.method, Method::Tridiagonal);
        assert_eq!(info.inertia_below, first + count);
        check_ratios(&info);
        let tol = 64.0 * f64::EPSILON * a.norm_one();
        for (j, &e) in ev.values.iter().enumerate() {
            let jj = (first + j + 1) as f64;
            // (2t/h^2)(1 - cos(j pi/(N+1))) // closed form, tridiagonal Toeplitz
            let want = 2.0 * T_E / (h * h) * (1.0 - (jj * PI / (n as f64 + 1.0)).cos());
            assert!((e - want).abs() <= tol, "level {jj}: {e} vs {want}");
        }
    }
}

#[test]
fn ripple_window_agrees_across_methods_and_dense() {
    let a = ripple_len(1200, 280.0);
    let pr = Problem { a: &a, b: None };
    let (vals, _) = dense_eigen(&pr).unwrap();
    let sel = Selection::Index {
        first: 391,
        count: 20,
    };
    let tol = 64.0 * f64::EPSILON * a.norm_one();
    for method in [Method::Tridiagonal, Method::ShiftInvert, Method::Dense] {
        let params = EigenParams {
            method,
            ..Default::default()
        };
        let (ev, info) = solve(&pr, &sel, &params).unwrap();
        check_ratios(&info);
        assert_eq!(info.inertia_below, 411);
        for (j, &e) in ev.values.iter().enumerate() {
            assert!((e - vals[391 + j]).abs() <= tol, "{method:?} level {j}");
        }
    }
}

#[test]
fn ripple_large_window_tridiagonal_vs_shift_invert() {
    let a = ripple(100_000);
    let pr = Problem { a: &a, b: None };
    let sel = Selection::Index {
        first: 990,
        count: 20,
    };
    let (t, ti) = solve(&pr, &sel, &EigenParams::default()).unwrap();
    let params = EigenParams {
        method: Method::ShiftInvert,
        ..Default::default()
    };
    let (s, si) = solve(&pr, &sel, &params).unwrap();
    check_ratios(&ti);
    check_ratios(&si);
    let tol = 64.0 * f64::EPSILON * a.norm_one();
    for (x, y) in t.values.iter().zip(&s.values) {
        assert!((x - y).abs() <= tol);
    }
    // states below the midpoint between two returned levels = count_below
    for j in 0..19 {
        let mid = 0.5 * (t.values[j] + t.values[j + 1]);
        assert_eq!(count_below(&pr, mid).unwrap(), 990 + j + 1);
    }
}

#[test]
fn harmonic_well_order4_matches_oscillator_levels() {
    // E_n = sqrt(2 t k) (n + 1/2) // Griffiths, Introduction to QM, eq. 2.61 with hbar^2 = 2 m t
    let (l, n, k) = (20.0, 4000usize, 2.0);
    let h = l / (n as f64 + 1.0);
    let c = l / 2.0;
    for p in [2usize, 4] {
        let a = hamiltonian(n, h, h, T_E, p, false, |x| 0.5 * k * (x - c) * (x - c));
        let pr = Problem { a: &a, b: None };
        let (ev, info) = solve(
            &pr,
            &Selection::Index { first: 0, count: 8 },
            &EigenParams::default(),
        )
        .unwrap();
        assert_eq!(info.method, Method::ShiftInvert);
        check_ratios(&info);
        let hw = (2.0 * T_E * k).sqrt();
        for (j, &e) in ev.values.iter().enumerate() {
            approx::assert_relative_eq!(e, hw * (j as f64 + 0.5), max_relative = 1e-6);
        }
    }
}

#[test]
fn few_lowest_levels_no_longer_shift_below_the_spectrum() {
    // Regression: 1-3 levels from the ground state at order 4-8 placed the
    // Lanczos shift at the Gershgorin bound far below the spectrum (~666
    // steps instead of ~36). Fewer levels must never take more Lanczos steps
    // than more levels; the values still match the oscillator's.
    // E_n = sqrt(2 t k) (n + 1/2) // Griffiths, Introduction to QM, eq. 2.61 with hbar^2 = 2 m t
    let (l, n, k) = (16.0, 1600usize, 10.0);
    let h = l / (n as f64 + 1.0);
    let hw = (2.0 * T_E * k).sqrt();
    for p in [2usize, 3, 4] {
        let a = hamiltonian(n, h, h - l / 2.0, T_E, p, false, |x| 0.5 * k * x * x);
        for with_b in [false, true] {
            // a Numerov-like metric B = (1, 10, 1)/12 exercises the pencil path
            let bm = SymBanded {
                n,
                bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n - 1]],
                wrap: false,
            };
            let pr = Problem {
                a: &a,
                b: with_b.then_some(&bm),
            };
            let params = EigenParams {
                method: Method::ShiftInvert,
                ..Default::default()
            };
            let steps = |count: usize| {
                let (ev, info) =
                    solve(&pr, &Selection::Index { first: 0, count }, &params).unwrap();
                check_ratios(&info);
                assert_eq!(info.inertia_below, count);
                if !with_b {
                    for (j, &e) in ev.values.iter().enumerate() {
                        approx::assert_relative_eq!(e, hw * (j as f64 + 0.5), max_relative = 1e-4);
                    }
                }
                info.iterations
            };
            let four = steps(4);
            for count in 1..=3 {
                let few = steps(count);
                assert!(
                    few <= four,
                    "p = {p}, B = {with_b}: {count} levels took {few} Lanczos steps, 4 levels {four}"
                );
            }
        }
    }
}

#[test]
fn heavy_double_well_resolves_tunnel_pair() {
    // the tunnel splitting (~5e-15 eV here) is below eps ||H|| (~3e-13 eV): the two
    // levels are a rounding-level cluster; both must come back, ordered, orthonormal
    let t = T_E / 1836.0 / 10.0;
    let n = 6000;
    let (x0, x1) = (-2.5, 2.5);
    let h = (x1 - x0) / (n as f64 + 1.0);
    let a = hamiltonian(n, h, x0 + h, t, 1, false, |x| (x * x - 1.0).powi(2));
    let pr = Problem { a: &a, b: None };
    let mut lows = Vec::new();
    for method in [Method::Auto, Method::ShiftInvert] {
        let params = EigenParams {
            method,
            ..Default::default()
        };
        let (ev, info) = solve(&pr, &Selection::Index { first: 0, count: 4 }, &params).unwrap();
        check_ratios(&info);
        assert_eq!(info.inertia_below, 4);
        let split = ev.values[1] - ev.values[0];
        assert!((0.0..1e-8).contains(&split), "split {split}");
        assert!(ev.values[2] - ev.values[1] > 1e-3);
        let ov: f64 = ev.vectors[0]
            .iter()
            .zip(&ev.vectors[1])
            .map(|(a, b)| a * b)
            .sum();
        assert!(ov.abs() < 1e-12);
        lows.push(ev.values[0]);
    }
    assert!((lows[0] - lows[1]).abs() <= 64.0 * f64::EPSILON * a.norm_one());
}

#[test]
fn free_ring_degenerate_pairs() {
    for (n, p) in [(400usize, 1usize), (600, 3), (100_000, 2)] {
        let l = 50.0;
        let h = l / n as f64;
        let a = hamiltonian(n, h, 0.0, T_E, p, true, |_| 0.0);
        let pr = Problem { a: &a, b: None };
        let params = EigenParams {
            method: Method::ShiftInvert,
            ..Default::default()
        };
        let (ev, info) = solve(&pr, &Selection::Index { first: 0, count: 7 }, &params).unwrap();
        check_ratios(&info);
        assert_eq!(info.inertia_below, 7);
        let c = fd_weights(p);
        let mut want: Vec<f64> = (0..n)
            .map(|j| {
                // circulant eigenvalues -t/h^2 (c0 + 2 sum_d c_d cos(2 pi j d / n)) // closed form
                let th = 2.0 * PI * j as f64 / n as f64;
                -T_E / (h * h)
                    * (c[0] + 2.0 * (1..=p).map(|d| c[d] * (th * d as f64).cos()).sum::<f64>())
            })
            .collect();
        want.sort_by(|x, y| x.total_cmp(y));
        let tol = 64.0 * f64::EPSILON * a.norm_one();
        for (j, &e) in ev.values.iter().enumerate() {
            assert!(
                (e - want[j]).abs() <= tol,
                "n {n} level {j}: {e} vs {}",
                want[j]
            );
        }
    }
}

#[test]
fn numerov_pencil_box_closed_form() {
    // K = -t D2/h^2, B = (1, 10, 1)/12: E_j = (2t/h^2)(1 - cos th) / ((10 + 2 cos th)/12),
    // th = j pi/(N+1) // closed form (common eigenvectors sin(j pi i/(N+1)))
    let n = 1500;
    let h = 10.0 / (n as f64 + 1.0);
    let k = hamiltonian(n, h, h, T_E, 1, false, |_| 0.0);
    let b = SymBanded {
        n,
        bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n - 1]],
        wrap: false,
    };
    let pr = Problem { a: &k, b: Some(&b) };
    let (ev, info) = solve(
        &pr,
        &Selection::Index { first: 5, count: 6 },
        &EigenParams::default(),
    )
    .unwrap();
    assert_eq!(info.method, Method::ShiftInvert);
    check_ratios(&info);
    let tol = 64.0 * f64::EPSILON * k.norm_one();
    for (j, &e) in ev.values.iter().enumerate() {
        let th = (5 + j + 1) as f64 * PI / (n as f64 + 1.0);
        let want = 2.0 * T_E / (h * h) * (1.0 - th.cos()) / ((10.0 + 2.0 * th.cos()) / 12.0);
        assert!((e - want).abs() <= tol, "{e} vs {want}");
    }
}

#[test]
fn below_returns_exactly_count_below() {
    let a = ripple(3000);
    let pr = Problem { a: &a, b: None };
    for energy in [0.0, 0.01, 0.03] {
        let c = count_below(&pr, energy).unwrap();
        let (ev, info) = solve(&pr, &Selection::Below { energy }, &EigenParams::default()).unwrap();
        assert_eq!(ev.values.len(), c);
        assert!(ev.values.iter().all(|&v| v < energy));
        check_ratios(&info);
    }
}

#[test]
fn errors_carry_data() {
    let a = ripple(50);
    let pr = Problem { a: &a, b: None };
    assert_eq!(
        solve(
            &pr,
            &Selection::Index {
                first: 45,
                count: 6
            },
            &EigenParams::default()
        )
        .unwrap_err(),
        EigenError::SelectionOutOfRange {
            first: 45,
            count: 6,
            n: 50
        }
    );
    let bad_b = SymBanded {
        n: 50,
        bands: vec![vec![-1.0; 50]],
        wrap: false,
    };
    let pg = Problem {
        a: &a,
        b: Some(&bad_b),
    };
    assert_eq!(
        count_below(&pg, 0.0).unwrap_err(),
        EigenError::NotPositiveDefinite
    );
    let params = EigenParams {
        memory_limit: 1000,
        ..Default::default()
    };
    assert!(matches!(
        solve(&pr, &Selection::Index { first: 0, count: 2 }, &params),
        Err(EigenError::TooLarge { limit: 1000, .. })
    ));
    let tri = EigenParams {
        method: Method::Tridiagonal,
        ..Default::default()
    };
    let a4 = hamiltonian(50, 0.1, 0.0, T_E, 2, false, |_| 0.0);
    assert!(matches!(
        solve(
            &Problem { a: &a4, b: None },
            &Selection::Index { first: 0, count: 2 },
            &tri
        ),
        Err(EigenError::Shape { .. })
    ));
}

fn arb_case() -> impl Strategy<
    Value = (
        usize,
        usize,
        bool,
        bool,
        Vec<f64>,
        usize,
        usize,
        Method,
        f64,
    ),
> {
    (
        10usize..=200,
        1usize..=4,
        any::<bool>(),
        any::<bool>(),
        any::<u64>(),
    )
        .prop_flat_map(|(n, p, wrap, gen, _)| {
            let p = if wrap && n <= 2 * p { 1 } else { p };
            (
                Just(n),
                Just(p),
                Just(wrap),
                Just(gen),
                prop::collection::vec(-3.0f64..3.0, n),
                0usize..n,
                1usize..=8,
                prop::sample::select(vec![Method::ShiftInvert, Method::Tridiagonal, Method::Auto]),
                0.0f64..1.0,
            )
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]
    #[test]
    fn agrees_with_dense((n, p, wrap, gen, v, first, count, method, frac) in arb_case()) {
        let h = 0.2;
        let mut a = hamiltonian(n, h, 0.0, T_E, p, wrap, |_| 0.0);
        for (d, vi) in a.bands[0].iter_mut().zip(&v) {
            *d += vi;
        }
        let b = SymBanded {
            n,
            bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; if wrap { n } else { n - 1 }]],
            wrap,
        };
        let pr = Problem { a: &a, b: if gen { Some(&b) } else { None } };
        let count = count.min(n - first);
        let method = if method == Method::Tridiagonal && (p != 1 || gen || wrap) {
            Method::ShiftInvert
        } else {
            method
        };
        let params = EigenParams { method, ..Default::default() };
        let (ev, info) = solve(&pr, &Selection::Index { first, count }, &params).unwrap();
        let (vals, _) = dense_eigen(&pr).unwrap();
        let tol = 64.0 * f64::EPSILON * a.norm_one();
        prop_assert_eq!(ev.values.len(), count);
        for (j, &e) in ev.values.iter().enumerate() {
            prop_assert!((e - vals[first + j]).abs() <= tol, "level {} {} vs {}", first + j, e, vals[first + j]);
        }
        prop_assert!(info.residual_ratio < 30.0, "res {}", info.residual_ratio);
        prop_assert!(info.orthogonality_ratio < 30.0, "orth {}", info.orthogonality_ratio);
        prop_assert_eq!(info.inertia_below, first + count);
        // count_below at a random sigma inside the spectrum range
        let sigma = vals[0] - 1.0 + frac * (vals[n - 1] - vals[0] + 2.0);
        let want = vals.iter().filter(|&&x| x < sigma).count();
        // skip sigmas within rounding of an eigenvalue
        if vals.iter().all(|&x| (x - sigma).abs() > 1e3 * tol) {
            prop_assert_eq!(count_below(&pr, sigma).unwrap(), want);
            let below = ev.values.iter().filter(|&&x| x < sigma).count();
            let expect_in_window = want.saturating_sub(first).min(count);
            prop_assert_eq!(below, expect_in_window);
        }
    }
}

/// A discretisation of -t d2/dx2 + V on `n` unknowns between walls at 0 and
/// `len` A: finite differences of `order` (2, 4, 6, 8), or Numerov for order 0.
fn walls_problem(
    n: usize,
    len: f64,
    order: u32,
    v: impl Fn(f64) -> f64,
) -> crate::hamiltonian::Discretisation {
    use crate::grid::{Boundary, Scheme};
    let grid = crate::grid::Grid {
        from: 0.0,
        spacing: len / (n as f64 + 1.0),
        points: n,
        boundary: Boundary::Walls,
    };
    let vs: Vec<f64> = grid.positions().iter().map(|&x| v(x)).collect();
    let (o, scheme) = if order == 0 {
        (2, Scheme::Numerov)
    } else {
        (order, Scheme::FiniteDifference)
    };
    crate::hamiltonian::build(&grid, &vs, T_E, crate::grid::Order::new(o).unwrap(), scheme)
}

/// Order-2 eigenvalues of the same potential on the same grid.
fn order2_values(
    n: usize,
    len: f64,
    first: usize,
    count: usize,
    v: impl Fn(f64) -> f64,
) -> Vec<f64> {
    let d2 = walls_problem(n, len, 2, v);
    let (ev, _) = solve(
        &Problem { a: &d2.a, b: None },
        &Selection::Index { first, count },
        &EigenParams {
            method: Method::Tridiagonal,
            ..Default::default()
        },
    )
    .unwrap();
    ev.values
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]
    #[test]
    fn guided_from_order2_guesses_agrees_with_dense(
        n in 200usize..=600,
        order in prop::sample::select(vec![4u32, 6, 8, 0]),
        amp in 0.0f64..1.5,
        waves in 1usize..=2,
        phase in 0.0f64..6.0,
        first_frac in 0.0f64..1.0,
        count in 1usize..=8,
    ) {
        // well-resolved low levels: the order-2 error (k h)^2 / 12 relative is
        // far below the level spacing ~ 2 / j relative for j <= n / 20
        let len = 20.0;
        let first = (first_frac * (n / 20 - count) as f64) as usize;
        let pot = |x: f64| amp * (2.0 * PI * waves as f64 * x / len + phase).cos();
        let disc = walls_problem(n, len, order, pot);
        let pr = Problem { a: &disc.a, b: disc.b.as_ref() };
        let params = EigenParams {
            method: Method::Guided,
            guided: GuidedParams {
                guesses: Some(order2_values(n, len, first, count, pot)),
            },
            ..Default::default()
        };
        let (ev, info) = solve(&pr, &Selection::Index { first, count }, &params).unwrap();
        let (vals, _) = dense_eigen(&pr).unwrap();
        let tol = 64.0 * f64::EPSILON * disc.a.norm_one();
        prop_assert_eq!(info.method, Method::Guided);
        prop_assert_eq!(info.inertia_below, first + count);
        prop_assert_eq!(ev.first, first);
        prop_assert_eq!(ev.values.len(), count);
        for (j, &e) in ev.values.iter().enumerate() {
            prop_assert!((e - vals[first + j]).abs() <= tol, "level {} {} vs {}", first + j, e, vals[first + j]);
        }
        prop_assert!(info.residual_ratio < 30.0, "res {}", info.residual_ratio);
        prop_assert!(info.orthogonality_ratio < 30.0, "orth {}", info.orthogonality_ratio);
    }
}

#[test]
fn guided_with_wrong_guesses_still_returns_the_window() {
    let (n, len) = (500, 20.0);
    let pot = |x: f64| 0.8 * (2.0 * PI * x / len).cos();
    for order in [4u32, 8, 0] {
        let disc = walls_problem(n, len, order, pot);
        let pr = Problem {
            a: &disc.a,
            b: disc.b.as_ref(),
        };
        let (vals, _) = dense_eigen(&pr).unwrap();
        let tol = 64.0 * f64::EPSILON * disc.a.norm_one();
        let (first, count) = (6, 5);
        let right = order2_values(n, len, first, count, pot);
        let shifted_up = order2_values(n, len, first + 1, count, pot);
        let shifted_down = order2_values(n, len, first - 1, count, pot);
        let mut doubled = right.clone();
        doubled[2] = doubled[1]; // level first + 2 missing, first + 1 twice
        let mut lost = right.clone();
        lost[count - 1] = 1e6; // far above the spectrum of interest
        for (case, guesses, want) in [
            ("right", right, Method::Guided),
            ("up", shifted_up, Method::ShiftInvert),
            ("down", shifted_down, Method::ShiftInvert),
            ("doubled", doubled, Method::ShiftInvert),
            ("lost", lost, Method::ShiftInvert),
        ] {
            let params = EigenParams {
                method: Method::Guided,
                guided: GuidedParams {
                    guesses: Some(guesses),
                },
                ..Default::default()
            };
            let (ev, info) = solve(&pr, &Selection::Index { first, count }, &params).unwrap();
            assert_eq!(info.method, want, "order {order} {case}");
            assert_eq!(info.inertia_below, first + count);
            check_ratios(&info);
            for (j, &e) in ev.values.iter().enumerate() {
                assert!(
                    (e - vals[first + j]).abs() <= tol,
                    "order {order} {case} level {j}: {e} vs {}",
                    vals[first + j]
                );
            }
        }
    }
}

#[test]
fn guided_auto_choice_and_errors() {
    let (n, len) = (400, 20.0);
    let pot = |x: f64| 0.5 * (2.0 * PI * x / len).sin();
    let disc = walls_problem(n, len, 6, pot);
    let pr = Problem {
        a: &disc.a,
        b: None,
    };
    let sel = Selection::Index { first: 2, count: 3 };
    let guesses = order2_values(n, len, 2, 3, pot);
    // Auto with guesses above the dense limit takes the guided path
    let auto = EigenParams {
        guided: GuidedParams {
            guesses: Some(guesses.clone()),
        },
        dense: DenseParams { limit: 100 },
        ..Default::default()
    };
    assert_eq!(solve(&pr, &sel, &auto).unwrap().1.method, Method::Guided);
    // guided without guesses, with a wrong number of them, or for Below: refused
    for (guesses, selection) in [
        (None, sel),
        (Some(guesses[..2].to_vec()), sel),
        (Some(guesses.clone()), Selection::Below { energy: 1.0 }),
    ] {
        let params = EigenParams {
            method: Method::Guided,
            guided: GuidedParams { guesses },
            ..Default::default()
        };
        assert!(matches!(
            solve(&pr, &selection, &params),
            Err(EigenError::Shape { .. })
        ));
    }
}

#[test]
fn guided_result_does_not_depend_on_thread_count() {
    let (n, len) = (3000, 40.0);
    let pot = |x: f64| (2.0 * PI * 3.0 * x / len).cos();
    let disc = walls_problem(n, len, 8, pot);
    let pr = Problem {
        a: &disc.a,
        b: None,
    };
    let sel = Selection::Index {
        first: 30,
        count: 6,
    };
    let params = EigenParams {
        guided: GuidedParams {
            guesses: Some(order2_values(n, len, 30, 6, pot)),
        },
        ..Default::default()
    };
    let run = |threads: usize| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(|| solve(&pr, &sel, &params).unwrap())
    };
    let (one, info) = run(1);
    assert_eq!(info.method, Method::Guided);
    let (three, _) = run(3);
    assert_eq!(one, three);
}
