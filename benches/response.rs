//! What the static response costs beside the solve it follows: one solve
//! of an alternating chain without `[response]`, the same with α only, and
//! with α, β and γ (error estimates off, so that each solve is one
//! eigen-solve). Run with `cargo bench --bench response`; the ratio of the
//! times is the response's cost in solves.
//!
//! Inputs: chains of 20 and 40 bonds with a 0.9 eV alternation ripple (demo
//! values), order 6, spacing 0.01 Å.

use std::path::Path;

use chainwell::input;
use chainwell::pipeline::{self, SolveOptions};
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};

fn chain(bonds: usize, response: &str) -> input::Model {
    let text = format!(
        "[chain]\nbonds = {bonds}\nalternation = 0.9\n[grid]\nspacing = 0.01\norder = 6\n{response}"
    );
    input::load_str("bench.toml", text, Path::new("."), &[])
        .unwrap()
        .0
}

fn response(c: &mut Criterion) {
    let opts = SolveOptions {
        estimate: false,
        ..Default::default()
    };
    let mut group = c.benchmark_group("response");
    group.sample_size(10);
    for bonds in [20usize, 40] {
        for (name, table) in [
            ("solve only", ""),
            (
                "with alpha",
                "[response]\nhyperpolarizabilities = false\nsum_over_states = false\n",
            ),
            (
                "with alpha beta gamma",
                "[response]\nsum_over_states = false\n",
            ),
        ] {
            let model = chain(bonds, table);
            group.bench_with_input(BenchmarkId::new(name, bonds), &model, |b, m| {
                b.iter(|| pipeline::solve_with(m, &opts).unwrap())
            });
        }
    }
    group.finish();
}

criterion_group!(benches, response);
criterion_main!(benches);
