//! Checking one input many times, as a study does: a fresh read of the
//! file and its table for every model (`input::load`) beside one
//! `input::Document` checked again and again (`Document::model`), and the
//! part of a model that is reading the held text into a tree
//! (`Document::raw`). Run with `cargo bench --bench input`.
//!
//! Inputs: the shipped `potentials/tabulated_profile.toml` (a 30-row table)
//! and the same input pointed at a 20 000-row table of an invented smooth
//! profile (demo data, made up for timing), written to a temporary folder.

use std::path::{Path, PathBuf};

use chainwell::input::{self, Document, Override};
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};

/// The shipped table input, and a copy reading a large invented table.
fn inputs() -> Vec<(&'static str, PathBuf)> {
    let shipped = Path::new(env!("CARGO_MANIFEST_DIR")).join("potentials/tabulated_profile.toml");
    let dir = std::env::temp_dir().join(format!("chainwell-bench-input-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let rows = 20_000;
    let mut csv = String::from("x,V\n");
    for i in 0..rows {
        // Invented demo profile: a shallow cosine dip over 14 angstrom.
        let x = 14.0 * i as f64 / (rows - 1) as f64;
        let v = -0.3 * (std::f64::consts::PI * x / 14.0).sin();
        csv.push_str(&format!("{x},{v}\n"));
    }
    std::fs::write(dir.join("large.csv"), csv).unwrap();
    let text = std::fs::read_to_string(&shipped)
        .unwrap()
        .replace("tabulated_profile.csv", "large.csv");
    let large = dir.join("large.toml");
    std::fs::write(&large, text).unwrap();
    vec![("30 rows", shipped), ("20000 rows", large)]
}

fn models(c: &mut Criterion) {
    let mut group = c.benchmark_group("input");
    group.sample_size(20);
    let sets = [Override::parse("levels.count=4").unwrap()];
    for (name, path) in inputs() {
        group.bench_with_input(BenchmarkId::new("load", name), &path, |b, p| {
            b.iter(|| input::load(p, &sets).unwrap())
        });
        let doc = Document::open(&path).unwrap();
        group.bench_with_input(BenchmarkId::new("document_model", name), &doc, |b, d| {
            b.iter(|| d.model(&sets).unwrap())
        });
        let source = doc.source(&sets);
        group.bench_with_input(BenchmarkId::new("document_raw", name), &doc, |b, d| {
            b.iter(|| d.raw(&source, &sets).unwrap())
        });
    }
    group.finish();
    let _ = std::fs::remove_dir_all(
        std::env::temp_dir().join(format!("chainwell-bench-input-{}", std::process::id())),
    );
}

criterion_group!(benches, models);
criterion_main!(benches);
