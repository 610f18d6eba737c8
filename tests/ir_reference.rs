//! The IR module against general-purpose reference libraries from PyPI. The tables in
//! `tests/fixtures/ir/reference/` were written by `tests/reference/ir_reference.py` (library
//! versions on their first line): the `jcamp` package's reading of the JCAMP-DX test-suite
//! files, scipy's Savitzky–Golay weights, and scipy's peak prominences and widths at half
//! prominence on an invented noise-free spectrum.

#![allow(clippy::unwrap_used)] // helpers of an integration test panic on purpose

use quiddity::ir::jcamp::{decode_block, read_blocks, read_infrared, JcampErrorKind};
use quiddity::ir::pick::{pick_bands, PickParams};
use quiddity::ir::preprocess::savgol_weights;
use quiddity::ir::synth::{synthesize, SynthBand};
use quiddity::ir::ReadOptions;

const ROOT: &str = env!("CARGO_MANIFEST_DIR");

fn table(name: &str) -> Vec<Vec<String>> {
    let text =
        std::fs::read_to_string(format!("{ROOT}/tests/fixtures/ir/reference/{name}")).unwrap();
    text.lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split('\t').map(str::to_owned).collect())
        .collect()
}

fn close(a: f64, b: f64, relative: f64) -> bool {
    (a - b).abs() <= relative * a.abs().max(b.abs()).max(1e-300)
}

/// Where the `jcamp` package reads a suite file without complaint, our decoding gives the
/// same count, end abscissae and ordinates (first, middle, last). Where it fails or
/// complains, the table records why; the polyethylene file's complaint is the same Y-check
/// failure our reader reports.
#[test]
fn jcamp_suite_files_decode_as_the_jcamp_package_reads_them() {
    let mut agreed = 0;
    for row in table("jcamp_reference.tsv") {
        let (file, status, complaints) = (&row[0], &row[1], &row[2]);
        let src =
            std::fs::read_to_string(format!("{ROOT}/tests/fixtures/ir/jcamp-testsuite/{file}"))
                .unwrap();
        match status.as_str() {
            "ok" => {
                let blocks = read_blocks(&src).unwrap();
                let data = decode_block(&blocks[0]).unwrap();
                let n: usize = row[3].parse().unwrap();
                let numbers: Vec<f64> = row[4..9].iter().map(|v| v.parse().unwrap()).collect();
                assert_eq!(data.y.len(), n, "{file}");
                assert!(close(data.x[0], numbers[0], 1e-12), "{file} x_first");
                assert!(close(data.x[n - 1], numbers[1], 1e-12), "{file} x_last");
                assert!(close(data.y[0], numbers[2], 1e-9), "{file} y_first");
                assert!(close(data.y[n / 2], numbers[3], 1e-9), "{file} y_mid");
                assert!(close(data.y[n - 1], numbers[4], 1e-9), "{file} y_last");
                agreed += 1;
            }
            _ if file == "ir-polyethylene-difdup.dx" => {
                assert!(
                    complaints
                        .contains("Last value of previous line is 26506.0 but first value is 0.0"),
                    "{complaints}"
                );
                let errors = read_infrared(&src, &ReadOptions::default()).unwrap_err();
                assert_eq!(
                    errors[0].kind,
                    JcampErrorKind::DifCheck {
                        expected: 26506.0,
                        found: 0.0
                    }
                );
            }
            // The reference reader stumbles on `$$` comments inside data and on one DIFDUP
            // file that our reader decodes to the counts and extremes its header states
            // (tests/ir_jcamp.rs); nothing to compare there.
            _ => {}
        }
    }
    assert!(agreed >= 6, "only {agreed} files compared");
}

#[test]
fn savitzky_golay_weights_match_scipy() {
    let rows = table("savgol_reference.tsv");
    assert!(rows.len() >= 6);
    for row in rows {
        let window: usize = row[0].parse().unwrap();
        let order: usize = row[1].parse().unwrap();
        let derivative: usize = row[2].parse().unwrap();
        let want: Vec<f64> = row[3].split(' ').map(|v| v.parse().unwrap()).collect();
        let got = savgol_weights(window / 2, order, derivative, 0.0);
        for (g, w) in got.iter().zip(&want) {
            assert!(
                (g - w).abs() < 1e-10,
                "window {window} order {order} deriv {derivative}: {got:?} vs {want:?}"
            );
        }
    }
}

/// The invented spectrum of `peaks_reference.tsv` (same bands as the Python script).
fn peaks_spectrum() -> (Vec<f64>, Vec<f64>) {
    let bands = [
        SynthBand::gaussian(3300.0, 250.0, 0.5),
        SynthBand::lorentzian(2960.0, 18.0, 0.8),
        SynthBand::lorentzian(2930.0, 18.0, 0.7),
        SynthBand::lorentzian(2870.0, 16.0, 0.4),
        SynthBand::lorentzian(1715.0, 20.0, 1.0),
        SynthBand::lorentzian(1690.0, 14.0, 0.45),
        SynthBand::gaussian(1240.0, 40.0, 0.6),
        SynthBand::lorentzian(760.0, 12.0, 0.55),
    ];
    let s = synthesize(&bands, 400.0, 4000.0, 0.5, 0.0, 0.0, 0.0, 0.0, 1);
    (s.x, s.y)
}

/// On a noise-free trace, with smoothing off, the picker finds scipy's peaks, and its
/// prominences and widths at half prominence equal scipy's (the same definitions: base at
/// the higher of the two minima before a higher point; linear interpolation of the
/// crossings half a prominence below the highest sample).
#[test]
fn prominences_and_widths_match_scipy_on_a_noise_free_spectrum() {
    let (x, y) = peaks_spectrum();
    let params = PickParams {
        smoothing_points: Some(0),
        shoulders: false,
        ..PickParams::default()
    };
    let (bands, _) = pick_bands(&x, &y, &params);
    let rows = table("peaks_reference.tsv");
    assert_eq!(bands.len(), rows.len(), "{bands:?}");
    for row in rows {
        let at: f64 = row[0].parse().unwrap();
        let prominence: f64 = row[2].parse().unwrap();
        let width: f64 = row[3].parse().unwrap();
        let band = bands
            .iter()
            .min_by(|a, b| (a.at - at).abs().total_cmp(&(b.at - at).abs()))
            .unwrap();
        assert!((band.at - at).abs() <= 0.5, "{at}: {band:?}");
        assert!(
            close(band.prominence, prominence, 1e-9),
            "{at}: prominence {} vs {prominence}",
            band.prominence
        );
        let fwhm = band.fwhm.unwrap();
        assert!(close(fwhm, width, 1e-9), "{at}: width {fwhm} vs {width}");
    }
}

/// The asymmetric least squares fit equals pybaselines' `asls` (same penalty, weights and
/// stopping rule) on an invented trace, to 10⁻⁶ of the trace's range.
#[test]
fn asymmetric_least_squares_matches_pybaselines() {
    let rows = table("asls_reference.tsv");
    assert_eq!(rows.len(), 400);
    let y: Vec<f64> = rows.iter().map(|r| r[1].parse().unwrap()).collect();
    let want: Vec<f64> = rows.iter().map(|r| r[2].parse().unwrap()).collect();
    let got = quiddity::ir::preprocess::als_fit(&y, 1e5, 0.01, 50);
    let range =
        y.iter().copied().fold(f64::MIN, f64::max) - y.iter().copied().fold(f64::MAX, f64::min);
    let worst = got
        .iter()
        .zip(&want)
        .map(|(a, b)| (a - b).abs())
        .fold(0.0, f64::max);
    assert!(worst <= 1e-6 * range, "worst difference {worst}");
}
