//! Benchmarks of `engine::solve` with the shipped catalogue (one thread per salt
//! reading: the loose case is read covalent and as a hydrochloride, solved at once on
//! a two-core machine):
//! - a 25-heavy-atom, 8-heteroatom case (C17H17ClN2O4S) with 15 bands (target < 50 ms),
//!   with the default enumeration limit and listing every consistent candidate (no
//!   limit; the counts of combinations and of classes after collapsing are printed);
//! - growth with the number of heteroatoms (2, 4, 8, 12, 16) at fixed carbon count and
//!   DBE, same band list; the number of candidates is printed so time per enumerated
//!   candidate can be worked out;
//! - the composition step alone: the depth-first walk against the integer programme.
//!
//! The cases are invented for benchmarking.

// criterion_group! generates an undocumented function.
#![allow(missing_docs)]

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use quiddity::case::{parse, Case};
use quiddity::engine::{enumerate, lp, model::Problem, solve, SolveOptions};
use quiddity::rules::embedded_catalogue;
use std::collections::BTreeSet;

const BANDS: &str = concat!(
    "    - { at: 3280, strength: medium }\n",
    "    - { at: 3060, strength: weak }\n",
    "    - { at: 2960, strength: medium }\n",
    "    - { at: 1735, strength: strong }\n",
    "    - { at: 1670, strength: strong }\n",
    "    - { at: 1595, strength: medium }\n",
    "    - { at: 1540, strength: medium }\n",
    "    - { at: 1490, strength: medium }\n",
    "    - { at: 1340, strength: strong }\n",
    "    - { at: 1240, strength: strong }\n",
    "    - { at: 1160, strength: strong }\n",
    "    - { at: 1090, strength: medium }\n",
    "    - { at: 830, strength: strong }\n",
    "    - { at: 750, strength: medium }\n",
    "    - { at: 690, strength: medium }\n",
);

fn case(formula: &str) -> Case {
    let text = format!(
        "# invented benchmark case\nformula: {formula}\nir:\n  technique: KBr\n  bands:\n{BANDS}"
    );
    let (case, d) = parse(&text, "bench.yaml");
    case.unwrap_or_else(|| panic!("{d:?}"))
}

/// C20 with DBE 6 and `n` heteroatoms, half N (rounded down) and the rest O.
fn scaled_formula(n: u32) -> String {
    let n_n = n / 2;
    let n_o = n - n_n;
    let h = 2 * 20 + 2 + n_n - 2 * 6;
    format!("C20H{h}N{n_n}O{n_o}")
}

fn benches(c: &mut Criterion) {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    let options = SolveOptions::default();

    let main_case = case("C17H17ClN2O4S");
    let o = solve(&main_case, &catalogue, &options);
    eprintln!(
        "C17H17ClN2O4S, 15 bands: {} consistent candidates, {} near misses",
        o.n_consistent,
        o.near_misses.len()
    );
    c.bench_function(
        "solve C17H17ClN2O4S (25 heavy atoms, 8 heteroatoms, 15 bands)",
        |b| b.iter(|| solve(black_box(&main_case), &catalogue, &options)),
    );

    let every = SolveOptions {
        enumeration_limit: usize::MAX,
        ..SolveOptions::default()
    };
    let o = solve(&main_case, &catalogue, &every);
    eprintln!(
        "C17H17ClN2O4S, 15 bands, no limit: {} consistent combinations in {} classes{}",
        o.n_combinations,
        o.n_consistent,
        if o.enumeration_truncated {
            " (limit reached)"
        } else {
            ""
        }
    );
    let mut group = c.benchmark_group("listing every consistent candidate");
    group.sample_size(10);
    group.bench_function("solve C17H17ClN2O4S, no enumeration limit", |b| {
        b.iter(|| solve(black_box(&main_case), &catalogue, &every))
    });
    group.finish();

    let mut group = c.benchmark_group("solve by heteroatom count (C20, DBE 6, 15 bands)");
    group.sample_size(10);
    for n in [2u32, 4, 8, 12, 16] {
        let formula = scaled_formula(n);
        let k = case(&formula);
        let o = solve(&k, &catalogue, &options);
        eprintln!(
            "{formula} ({n} heteroatoms): {} consistent candidates{}",
            o.n_consistent,
            if o.enumeration_truncated {
                " (limit reached)"
            } else {
                ""
            }
        );
        group.bench_function(format!("{n} heteroatoms {formula}"), |b| {
            b.iter(|| solve(black_box(&k), &catalogue, &options))
        });
    }
    group.finish();

    let mut group = c.benchmark_group("composition step: smallest group count");
    let problem = Problem::new(&main_case, &catalogue, &options, &BTreeSet::new());
    let allowed = problem.allowed_groups();
    group.bench_function("depth-first walk", |b| {
        b.iter(|| {
            let mut best = u32::MAX;
            enumerate::walk(&problem, black_box(&allowed), |counts, _| {
                best = best.min(counts.iter().sum());
                enumerate::Flow::Continue
            });
            best
        })
    });
    group.bench_function("integer programme (good_lp + microlp)", |b| {
        b.iter(|| lp::min_group_instances(&problem, black_box(&allowed)))
    });
    group.finish();
}

criterion_group!(solve_benches, benches);
criterion_main!(solve_benches);
