//! Read and pick a 7 000-point spectrum (0.5 cm⁻¹ spacing), the size an FTIR export at
//! 4 cm⁻¹ resolution with zero filling writes. Target: well under 5 ms.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use quiddity::ir::jcamp::{write_jcamp, JcampForm, WriteSpectrum};
use quiddity::ir::synth::{synthesize, SynthBand};
use quiddity::ir::{bands_from_file_contents, read_spectrum, PickOptions, SpectrumData};

fn spectrum(form: JcampForm) -> String {
    // Invented: 12 bands, noise and a sloping baseline, 7 001 points from 4000 to 500 cm-1.
    let bands = [
        SynthBand::gaussian(3340.0, 280.0, 0.5),
        SynthBand::lorentzian(2960.0, 18.0, 0.8),
        SynthBand::lorentzian(2930.0, 18.0, 0.7),
        SynthBand::lorentzian(2870.0, 16.0, 0.4),
        SynthBand::lorentzian(1715.0, 18.0, 1.0),
        SynthBand::lorentzian(1600.0, 9.0, 0.3),
        SynthBand::lorentzian(1460.0, 14.0, 0.3),
        SynthBand::lorentzian(1380.0, 12.0, 0.2),
        SynthBand::lorentzian(1240.0, 30.0, 0.6),
        SynthBand::lorentzian(1050.0, 30.0, 0.8),
        SynthBand::lorentzian(760.0, 12.0, 0.5),
        SynthBand::lorentzian(690.0, 12.0, 0.5),
    ];
    let s = synthesize(&bands, 500.0, 4000.0, 0.5, 0.03, 1e-5, 0.02, 0.0015, 1);
    write_jcamp(
        &WriteSpectrum {
            title: "benchmark (invented)".to_owned(),
            comments: vec!["invented".to_owned()],
            fields: Vec::new(),
            first_x: 500.0,
            delta_x: 0.5,
            y: s.y.iter().map(|a| 100.0 * 10f64.powf(-a)).collect(),
            y_units: "TRANSMITTANCE".to_owned(),
            y_factor: 1e-4,
        },
        form,
    )
}

fn bench(c: &mut Criterion) {
    let options = PickOptions::default();
    // The stages on their own, to see where the time goes.
    let text = spectrum(JcampForm::DifDup);
    c.bench_function("read only 7001 points (difdup)", |b| {
        b.iter(|| read_spectrum(black_box(text.as_bytes()), "bench.jdx", &options.read).is_ok())
    });
    let read = read_spectrum(text.as_bytes(), "bench.jdx", &options.read).unwrap_or_else(|_| {
        panic!("the benchmark spectrum reads");
    });
    let SpectrumData::Trace(trace) = read.data else {
        panic!("a trace");
    };
    c.bench_function("prepare (T to A, ALS baseline) 7001 points", |b| {
        b.iter(|| quiddity::ir::prepare_trace(black_box(&trace), true, &mut Vec::new()))
    });
    let prepared = quiddity::ir::prepare_trace(&trace, true, &mut Vec::new());
    c.bench_function("pick only 7001 points", |b| {
        b.iter(|| {
            quiddity::ir::pick::pick_bands(black_box(&prepared.x), &prepared.y, &options.pick)
                .0
                .len()
        })
    });
    // The same trace picked as a vapour (forest search, contour merging, CO2) and an
    // invented vapour spectrum with contours, a water-vapour line forest and CO2.
    let mut vapour = options.pick;
    vapour.phase = quiddity::ir::SamplePhase::Vapour;
    c.bench_function("pick only 7001 points (vapour phase)", |b| {
        b.iter(|| {
            quiddity::ir::pick::pick_bands(black_box(&prepared.x), &prepared.y, &vapour)
                .0
                .len()
        })
    });
    let mut bands = quiddity::ir::synth::contour(1740.0, 0.5, 20.0, 12.0, 0.0, 5.0);
    bands.extend(quiddity::ir::synth::contour(
        1215.0, 0.4, 20.0, 12.0, 0.8, 5.0,
    ));
    bands.push(SynthBand::gaussian(2970.0, 30.0, 0.3));
    bands.extend(quiddity::ir::synth::line_forest(0.04, 5.2, 7));
    bands.extend(quiddity::ir::synth::co2(0.15, 12.0));
    let gas = synthesize(&bands, 500.0, 4000.0, 0.5, 0.02, 1e-5, 0.03, 0.0015, 3);
    c.bench_function("pick only 7001 points (invented vapour spectrum)", |b| {
        b.iter(|| {
            quiddity::ir::pick::pick_bands(black_box(&gas.x), &gas.y, &vapour)
                .0
                .len()
        })
    });
    for (name, form) in [("difdup", JcampForm::DifDup), ("affn", JcampForm::Affn)] {
        let text = spectrum(form);
        c.bench_function(&format!("read+pick 7001 points ({name})"), |b| {
            b.iter(|| {
                let picked =
                    bands_from_file_contents(black_box(text.as_bytes()), "bench.jdx", &options);
                black_box(picked.map(|p| p.bands.len()).unwrap_or(0))
            })
        });
    }
}

// criterion_group! makes an undocumented public function.
#[allow(missing_docs)]
mod group {
    use super::*;
    criterion_group!(benches, bench);
}
use group::benches;
criterion_main!(benches);
