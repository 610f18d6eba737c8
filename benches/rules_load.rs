//! How long loading and validating the shipped catalogue takes (every `solve` pays it
//! once), and how long one `rules at` look-up takes.

// criterion_group! and criterion_main! generate undocumented public items.
#![allow(missing_docs)]

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use quiddity::rules::{embedded_catalogue, load, rules_at, EMBEDDED_FILES};

fn bench_load(c: &mut Criterion) {
    c.bench_function("load and validate the shipped catalogue", |b| {
        b.iter(|| load(black_box(EMBEDDED_FILES.iter().copied())))
    });
    let catalogue = embedded_catalogue().expect("the shipped catalogue validates");
    c.bench_function("rules at 1715", |b| {
        b.iter(|| rules_at(black_box(&catalogue), black_box(1715.0), None))
    });
}

criterion_group!(benches, bench_load);
criterion_main!(benches);
