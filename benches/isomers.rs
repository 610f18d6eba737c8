//! Structure-generator benchmarks (criterion). Published isomer counts are printed next
//! to each size: alkanes CnH2n+2 from OEIS A000602 (n = 8..12 as published; 13 and 14
//! `from memory`). Run with `cargo bench --bench isomers`; structures per second are the
//! "thrpt" lines (criterion's elements per second).

// criterion's macros generate undocumented public functions.
#![allow(missing_docs)]

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion, Throughput};
use quiddity::chem::Formula;
use quiddity::structure::{count_structures, enumerate, GroupCounts};
use std::hint::black_box;

/// OEIS A000602: alkanes CnH2n+2 for n = 8..=14.
const ALKANES: [(u32, u64); 7] = [
    (8, 18),
    (9, 35),
    (10, 75),
    (11, 159),
    (12, 355),
    (13, 802),
    (14, 1858),
];

fn formula(text: &str) -> Formula {
    Formula::parse(text).expect("benchmark formula")
}

/// All 355 C12H26 isomers, listed as canonical SMILES with their features.
fn dodecanes(c: &mut Criterion) {
    let f = formula("C12H26");
    let mut group = c.benchmark_group("list");
    group.sample_size(20);
    group.throughput(Throughput::Elements(355));
    group.bench_function("C12H26 all 355 isomers as SMILES", |b| {
        b.iter(|| {
            let e = enumerate(black_box(&f), None, None).expect("enumerate");
            assert_eq!(e.structures.len(), 355);
            e
        })
    });
    let f = formula("C10H12O");
    let g = GroupCounts::parse("ketone:1,aromatic_ring:1").expect("groups");
    let n = count_structures(&f, Some(&g)).expect("count");
    group.throughput(Throughput::Elements(n));
    group.bench_function(
        format!("C10H12O ketone+aromatic_ring ({n} isomers) as SMILES"),
        |b| b.iter(|| enumerate(black_box(&f), Some(&g), None).expect("enumerate")),
    );
    group.finish();
}

/// Growth with size: counting alkanes C8..C14.
fn alkane_growth(c: &mut Criterion) {
    let mut group = c.benchmark_group("alkanes count");
    group.sample_size(10);
    for (n, published) in ALKANES {
        let f = formula(&format!("C{n}H{}", 2 * n + 2));
        let counted = count_structures(&f, None).expect("count");
        assert_eq!(counted, published, "C{n}");
        group.throughput(Throughput::Elements(counted));
        group.bench_with_input(
            BenchmarkId::from_parameter(format!("C{n} ({published} published)")),
            &f,
            |b, f| b.iter(|| count_structures(black_box(f), None).expect("count")),
        );
    }
    group.finish();
}

criterion_group!(benches, dodecanes, alkane_growth);
criterion_main!(benches);
