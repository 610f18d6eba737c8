//! Benchmarks of mass-only cases (no formula; a nominal molecular ion from EI GC-MS and one
//! strong band at 1715 cm⁻¹, ATR): the growth table from m/z 200 to 1000, solved as the
//! `solve` command does (default options, default budget, metered), single thread.
//! For each m/z it prints the formula leads solved, the consistent candidates pooled and
//! the meter's peak estimate of bytes held; peak memory of the whole process is measured
//! separately with GNU time on the release binary (DEVELOPERS.md).
//!
//! The cases are invented for benchmarking.

// criterion_group! generates an undocumented function.
#![allow(missing_docs)]

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use quiddity::budget::{Budget, Metered};
use quiddity::case::{parse, Case};
use quiddity::engine::{solve_within, SolveOptions};
use quiddity::rules::embedded_catalogue;
use std::time::Duration;

fn case(mz: u32) -> Case {
    let text = format!(
        "# invented benchmark case\ncase: BENCH-MASS-{mz}\nms: {{ molecular_ion: {mz}, ion: \"M+.\" }}\n\
         ir:\n  technique: ATR\n  bands:\n    - {{ at: 1715, strength: strong }}\n"
    );
    let (case, d) = parse(&text, "bench.yaml");
    case.unwrap_or_else(|| panic!("{d:?}"))
}

fn benches(c: &mut Criterion) {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    let options = SolveOptions::default();
    let mut g = c.benchmark_group("mass_only_nominal_1715");
    g.sample_size(10).measurement_time(Duration::from_secs(4));
    for mz in (200..=1000).step_by(100) {
        let k = case(mz);
        let mut meter = Metered::new(Budget::default());
        match solve_within(&k, &catalogue, &options, &mut meter) {
            Ok(o) => eprintln!(
                "m/z {mz}: {} formula leads solved, {} consistent candidates ({} combinations{}), \
                 meter peak {:.1} MB held",
                o.formula_leads.len(),
                o.n_consistent,
                o.n_combinations,
                if o.enumeration_truncated {
                    ", a lead reached its share of the limit"
                } else {
                    ""
                },
                meter.peak() as f64 / 1e6
            ),
            Err(stop) => eprintln!("m/z {mz}: stopped: {stop}"),
        }
        g.bench_function(format!("mz{mz}"), |b| {
            b.iter(|| {
                let mut meter = Metered::new(Budget::default());
                solve_within(black_box(&k), &catalogue, &options, &mut meter)
                    .map(|o| o.n_consistent)
            })
        });
    }
    g.finish();
}

criterion_group!(mass_only, benches);
criterion_main!(mass_only);
