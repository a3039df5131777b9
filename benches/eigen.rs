//! Timings of the eigen module on the chainwell test chains (criterion,
//! 10 samples each). Run with `cargo bench --bench eigen`; set
//! `EIGEN_BENCH_LARGE=1` to add the N = 1e6 banded and Numerov cases.

use std::f64::consts::PI;
use std::time::Duration;

use chainwell::eigen::{solve, EigenParams, Method, Problem, Selection, SymBanded};
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};

/// hbar^2/(2 m_e) in eV A^2 // value given in the task brief
const T_E: f64 = 3.81;

/// Central second-derivative weights of order 2p // Fornberg, Math. Comp. 51 (1988) 699
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

/// Ripple chain V = cos(2 pi x / 2.8) eV on [0, 2800] A, order 2p.
fn ripple(n: usize, p: usize) -> SymBanded {
    let h = 2800.0 / (n as f64 + 1.0);
    let c = fd_weights(p);
    let s = T_E / (h * h);
    let mut bands = vec![(0..n)
        .map(|i| -s * c[0] + (2.0 * PI * (i + 1) as f64 * h / 2.8).cos())
        .collect::<Vec<_>>()];
    for (d, cd) in c.iter().enumerate().skip(1) {
        bands.push(vec![-s * cd; n - d]);
    }
    SymBanded {
        n,
        bands,
        wrap: false,
    }
}

/// Gaussian well V = -5 exp(-x^2 / 2) eV on [-10, 10] A, order 2p (demo data).
fn gaussian_well(n: usize, p: usize) -> SymBanded {
    let h = 20.0 / (n as f64 + 1.0);
    let c = fd_weights(p);
    let s = T_E / (h * h);
    let mut bands = vec![(0..n)
        .map(|i| {
            let x = -10.0 + (i + 1) as f64 * h;
            -s * c[0] - 5.0 * (-0.5 * x * x).exp()
        })
        .collect::<Vec<_>>()];
    for (d, cd) in c.iter().enumerate().skip(1) {
        bands.push(vec![-s * cd; n - d]);
    }
    SymBanded {
        n,
        bands,
        wrap: false,
    }
}

fn run(c: &mut Criterion) {
    let mut g = c.benchmark_group("eigen");
    g.sample_size(10);
    g.warm_up_time(Duration::from_millis(500));
    g.measurement_time(Duration::from_secs(3));
    let auto = EigenParams::default();
    let lowest = Selection::Index {
        first: 0,
        count: 20,
    };
    let window = Selection::Index {
        first: 990,
        count: 20,
    };
    for n in [10_000usize, 100_000, 1_000_000] {
        let a = ripple(n, 1);
        let pr = Problem { a: &a, b: None };
        g.bench_with_input(BenchmarkId::new("tri_lowest20", n), &n, |b, _| {
            b.iter(|| solve(&pr, &lowest, &auto).unwrap())
        });
        g.bench_with_input(BenchmarkId::new("tri_window991", n), &n, |b, _| {
            b.iter(|| solve(&pr, &window, &auto).unwrap())
        });
        if n <= 10_000 {
            let si = EigenParams {
                method: Method::ShiftInvert,
                ..Default::default()
            };
            g.bench_with_input(
                BenchmarkId::new("order2_lanczos_lowest20", n),
                &n,
                |b, _| b.iter(|| solve(&pr, &lowest, &si).unwrap()),
            );
        }
    }
    // the N = 1e6 banded cases take seconds per sample: opt in with EIGEN_BENCH_LARGE=1
    let large = std::env::var("EIGEN_BENCH_LARGE").is_ok();
    let sizes: &[usize] = if large {
        &[100_000, 1_000_000]
    } else {
        &[100_000]
    };
    for &n in sizes {
        for p in [2usize, 4] {
            let a = ripple(n, p);
            let pr = Problem { a: &a, b: None };
            g.bench_with_input(
                BenchmarkId::new(format!("order{}_lowest20", 2 * p), n),
                &n,
                |b, _| b.iter(|| solve(&pr, &lowest, &auto).unwrap()),
            );
        }
        // Numerov pencil K x = E B x, B = (1, 10, 1)/12
        let k = ripple(n, 1);
        let bm = SymBanded {
            n,
            bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n - 1]],
            wrap: false,
        };
        let pr = Problem {
            a: &k,
            b: Some(&bm),
        };
        g.bench_with_input(BenchmarkId::new("numerov_lowest20", n), &n, |b, _| {
            b.iter(|| solve(&pr, &lowest, &auto).unwrap())
        });
    }
    // a few levels from the ground state at order 4: one level must cost no
    // more than three times four levels (Gaussian well, 2000 points)
    let a = gaussian_well(2000, 2);
    let pr = Problem { a: &a, b: None };
    for count in [1usize, 4] {
        let sel = Selection::Index { first: 0, count };
        g.bench_with_input(
            BenchmarkId::new("gauss_order4_lowest", count),
            &count,
            |b, _| b.iter(|| solve(&pr, &sel, &auto).unwrap()),
        );
    }
    // dense baseline
    let a = ripple(1000, 1);
    let pr = Problem { a: &a, b: None };
    let dense = EigenParams {
        method: Method::Dense,
        ..Default::default()
    };
    g.bench_function("dense_lowest20_n1000", |b| {
        b.iter(|| solve(&pr, &lowest, &dense).unwrap())
    });
    let tri = EigenParams {
        method: Method::Tridiagonal,
        ..Default::default()
    };
    g.bench_function("tri_lowest20_n1000", |b| {
        b.iter(|| solve(&pr, &lowest, &tri).unwrap())
    });
    g.finish();
}

criterion_group!(benches, run);
criterion_main!(benches);
