//! Isotope-pattern speed on a large, heteroatom-rich formula (C100H150N20O30S5Cl2,
//! about 2.3 kDa). Targets: aggregated pattern well under 1 ms, fine structure at
//! R = 100 000 in a few ms. `tests/reference/isotope_side_by_side.py` times IsoSpecPy and
//! quiddity in one run on the same formula and checks that they agree (docs/chemistry.md,
//! "Speed").

#![allow(missing_docs)] // criterion_group! and criterion_main! generate undocumented items

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use quiddity::chem::{aggregated_pattern, fine_structure_pattern, Formula};

const FORMULA: &str = "C100H150N20O30S5Cl2";

fn isotope_patterns(c: &mut Criterion) {
    let formula = Formula::parse(FORMULA).expect("valid formula");
    c.bench_function("parse C100H150N20O30S5Cl2", |b| {
        b.iter(|| Formula::parse(black_box(FORMULA)))
    });
    c.bench_function("aggregated pattern C100H150N20O30S5Cl2", |b| {
        b.iter(|| aggregated_pattern(black_box(&formula)))
    });
    c.bench_function("fine structure R=100000 C100H150N20O30S5Cl2", |b| {
        b.iter(|| fine_structure_pattern(black_box(&formula), 100_000.0))
    });
}

criterion_group!(benches, isotope_patterns);
criterion_main!(benches);
