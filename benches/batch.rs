//! Batch throughput: 1 000 demo-sized cases (band-list demo cases with shifted bands) solved
//! and reported (JSON) on 1 and 2 worker threads, including reading the case files and
//! writing the reports. Criterion reports the rate as elements (cases) per second.

#![allow(missing_docs)] // criterion_group! generates an undocumented function

#[path = "../tests/support/generate.rs"]
#[allow(dead_code)]
mod generate;

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use quiddity::cli::batch::{process, BatchOptions};
use quiddity::cli::casefile::LoadOptions;
use quiddity::engine::SolveOptions;
use quiddity::report::Format;
use quiddity::rules::embedded_catalogue;
use std::path::Path;

const N_CASES: usize = 1000;

fn batch(c: &mut Criterion) {
    let input = tempfile::tempdir().expect("temp dir");
    let out = tempfile::tempdir().expect("temp dir");
    let manifest = Path::new(env!("CARGO_MANIFEST_DIR"));
    generate::write_cases(&manifest.join("cases"), input.path(), N_CASES);
    let catalogue = embedded_catalogue().expect("catalogue");
    let mut group = c.benchmark_group("batch");
    group.sample_size(10);
    group.throughput(Throughput::Elements(N_CASES as u64));
    for threads in [1usize, 2] {
        let options = BatchOptions {
            dir: input.path().to_path_buf(),
            out: out.path().to_path_buf(),
            force: true,
            threads,
            formats: vec![Format::Json],
            load: LoadOptions::default(),
            progress: false,
            budget: quiddity::budget::Budget::default(),
        };
        group.bench_function(format!("{N_CASES}_cases_{threads}_threads"), |b| {
            b.iter(|| {
                let rows = process(&options, &catalogue, &SolveOptions::default()).expect("batch");
                assert_eq!(rows.len(), N_CASES);
                rows
            });
        });
    }
    group.finish();
}

criterion_group!(benches, batch);
criterion_main!(benches);
