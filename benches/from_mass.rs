//! Formula search speed: all formulas for m/z 500.2000 at 5 ppm over the default element
//! ranges (target < 50 ms), against the straightforward nested-loop enumeration, and how
//! the time grows with m/z.
//!
//! The nested loops over the default ranges visit 61·121·11·21·5·4·11·7·5·4·5 ≈ 2.6 × 10¹¹
//! combinations — hours of work — so they are timed here on reduced ranges
//! (C0-60 H0-120 N0-10 O0-20, 1.7 × 10⁶ combinations) in the same run, and the default-range
//! time is extrapolated from the measured cost per combination (printed at the end). The
//! fast search is timed on the same reduced ranges too, for a like-for-like ratio.
//!
//! Run: `cargo bench --bench from_mass`.

// criterion's macros generate undocumented functions.
#![allow(missing_docs)]

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use quiddity::ms::formula_search::{reference_search_mass, search_mass};
use quiddity::ms::{
    best_formulas, candidate_formulas, ElementRanges, IonType, MassQuery, MeasuredMz,
};
use std::time::{Duration, Instant};

const REDUCED: &str = "C0-60H0-120N0-10O0-20";

fn window(mz: f64, ppm: f64) -> (f64, f64) {
    let neutral = IonType::RadicalCation.neutral_mass_of_mz(mz);
    let tol = mz * ppm * 1e-6;
    (neutral - tol, neutral + tol)
}

fn count_fast(ranges: &ElementRanges, mz: f64) -> usize {
    let (lo, hi) = window(mz, 5.0);
    let mut n = 0;
    search_mass(ranges, lo, hi, |_| n += 1);
    n
}

fn count_nested(ranges: &ElementRanges, mz: f64) -> usize {
    let (lo, hi) = window(mz, 5.0);
    let mut n = 0;
    reference_search_mass(ranges, lo, hi, |_| n += 1);
    n
}

fn query(mz: f64) -> MassQuery {
    MassQuery::new(MeasuredMz::Accurate(mz), IonType::RadicalCation)
}

fn benches(c: &mut Criterion) {
    let default = ElementRanges::default();
    let reduced = ElementRanges::parse(REDUCED).expect("reduced ranges parse");

    let mut g = c.benchmark_group("mz500_5ppm_default_ranges");
    g.sample_size(20).measurement_time(Duration::from_secs(8));
    g.bench_function("fast_search_all_combinations", |b| {
        b.iter(|| count_fast(&default, black_box(500.2)))
    });
    g.bench_function("candidate_formulas_filtered_ranked", |b| {
        b.iter(|| candidate_formulas(&query(black_box(500.2))).map(|l| l.len()))
    });
    g.finish();

    let mut g = c.benchmark_group("mz500_5ppm_reduced_ranges");
    g.sample_size(10).measurement_time(Duration::from_secs(8));
    g.bench_function("fast_search", |b| {
        b.iter(|| count_fast(&reduced, black_box(500.2)))
    });
    g.bench_function("nested_loops", |b| {
        b.iter(|| count_nested(&reduced, black_box(500.2)))
    });
    g.finish();

    let mut g = c.benchmark_group("growth_with_mz_default_ranges");
    g.sample_size(10).measurement_time(Duration::from_secs(6));
    for mz in [100.0, 300.0, 500.0, 800.0] {
        g.bench_function(format!("fast_search_mz{mz}"), |b| {
            b.iter(|| count_fast(&default, black_box(mz)))
        });
        g.bench_function(format!("candidate_formulas_mz{mz}"), |b| {
            b.iter(|| candidate_formulas(&query(black_box(mz))).map(|l| l.len()))
        });
        // What `from-mass --max 20` runs: the best 20, best first.
        g.bench_function(format!("best_formulas_top20_mz{mz}"), |b| {
            b.iter(|| best_formulas(&query(black_box(mz)), 20).map(|l| l.best.len()))
        });
    }
    g.finish();

    // Facts for the report: hit counts, and the extrapolation of the nested loops.
    for mz in [100.0, 300.0, 500.0, 800.0] {
        let raw = count_fast(&default, mz);
        let kept = candidate_formulas(&query(mz)).map_or(0, |l| l.len());
        println!("m/z {mz}: {raw} combinations in the 5 ppm window, {kept} candidate formulas after filters");
    }
    assert_eq!(count_fast(&reduced, 500.2), count_nested(&reduced, 500.2));
    let runs = 3;
    let start = Instant::now();
    for _ in 0..runs {
        black_box(count_nested(&reduced, 500.2));
    }
    let per_run = start.elapsed().as_secs_f64() / f64::from(runs);
    let per_combination = per_run / reduced.n_combinations();
    let extrapolated = per_combination * default.n_combinations();
    println!(
        "nested loops: {:.1} ms over {:.3e} reduced-range combinations = {:.2} ns each; \
         the default ranges' {:.3e} combinations would take ≈ {:.0} s (extrapolated, not run)",
        per_run * 1e3,
        reduced.n_combinations(),
        per_combination * 1e9,
        default.n_combinations(),
        extrapolated
    );
}

criterion_group!(from_mass, benches);
criterion_main!(from_mass);
