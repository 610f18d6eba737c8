//! Library search on one thread: synthetic libraries of 1 000, 10 000 and 100 000 invented
//! spectra (random Lorentzian bands on the library grid, `ir::synth`), one query each.
//! Targets: 10 000 in under 20 ms, 100 000 in under 200 ms, linear growth. The memory of
//! each index is printed (bytes a reference) before timing.

use criterion::{black_box, criterion_main, BenchmarkId, Criterion};
use quiddity::ir::synth::{synthesize, Noise, SynthBand};
use quiddity::library::grid::grid_from_trace;
use quiddity::library::index::{index_from_parts, synthetic_entry};
use quiddity::library::{search, LibraryIndex, Metadata, Phase, Query, SearchOptions};

/// An invented spectrum: 6–15 bands at random places, widths and heights.
fn spectrum(rng: &mut Noise, seed: u64) -> quiddity::library::GridSpectrum {
    let n = 6 + (rng.uniform() * 10.0) as usize;
    let bands: Vec<SynthBand> = (0..n)
        .map(|_| {
            SynthBand::lorentzian(
                500.0 + 3400.0 * rng.uniform(),
                8.0 + 30.0 * rng.uniform(),
                0.05 + rng.uniform(),
            )
        })
        .collect();
    let s = synthesize(&bands, 440.0, 4010.0, 4.0, 0.0, 0.0, 0.0, 0.002, seed);
    grid_from_trace(&s.x, &s.y).expect("an invented spectrum has bands")
}

fn library(n: usize) -> LibraryIndex {
    let mut rng = Noise::new(n as u64);
    let parts = (0..n)
        .map(|i| {
            let g = spectrum(&mut rng, i as u64 + 1);
            let meta = Metadata {
                name: format!("invented reference {i}"),
                formula: Some("C8H8O".to_owned()),
                phase: Some(Phase::Condensed),
                ..Metadata::default()
            };
            let sig = g.signature.clone();
            (synthetic_entry(&format!("ref-{i:06}.jdx"), meta, &g), sig)
        })
        .collect();
    index_from_parts(parts)
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("library_search");
    let query = {
        let mut rng = Noise::new(7);
        Query::new(spectrum(&mut rng, 7), Phase::Condensed)
    };
    for n in [1_000usize, 10_000, 100_000] {
        let index = library(n);
        let bytes = index.memory_bytes();
        eprintln!(
            "library of {n}: {:.1} MB in memory, {} bytes a reference ({} of them the signature)",
            bytes as f64 / 1e6,
            bytes / n,
            index.signatures().len() * 2 / n
        );
        if n >= 100_000 {
            group.sample_size(20);
        }
        let options = SearchOptions {
            top: 10,
            ..SearchOptions::default()
        };
        group.bench_with_input(BenchmarkId::from_parameter(n), &index, |b, index| {
            b.iter(|| search(black_box(index), black_box(&query), &options))
        });
    }
    group.finish();
}

#[allow(missing_docs)]
mod group {
    criterion::criterion_group!(benches, super::bench);
}
use group::benches;
criterion_main!(benches);
