//! Band picking checked on invented spectra of known composition: Lorentzian and Gaussian
//! bands of known centre, width and height, with noise and a sloping, slightly curved
//! baseline. Every band must come back within 2 cm⁻¹ and 10 % of its width, and the
//! `common practice` shapes must be classified as the trade classifies them.

#![allow(clippy::unwrap_used)] // helpers of an integration test panic on purpose

use quiddity::ir::jcamp::{write_jcamp, JcampForm, WriteSpectrum};
use quiddity::ir::synth::{synthesize, SynthBand, SynthSpectrum};
use quiddity::ir::{
    bands_from_file_contents, BandKind, PickOptions, PickedBand, PickedSpectrum, Shape, Strength,
};

/// Writes an invented absorbance spectrum as JCAMP-DX (DIFDUP, precision 10⁻⁶).
fn as_jcamp(s: &SynthSpectrum, transmittance: bool) -> String {
    let step = s.x[1] - s.x[0];
    let (y, units) = if transmittance {
        (
            s.y.iter().map(|a| 100.0 * 10f64.powf(-a)).collect(),
            "TRANSMITTANCE",
        )
    } else {
        (s.y.clone(), "ABSORBANCE")
    };
    write_jcamp(
        &WriteSpectrum {
            title: "synthetic test spectrum (invented)".to_owned(),
            comments: vec!["invented data for picker tests".to_owned()],
            fields: Vec::new(),
            first_x: s.x[0],
            delta_x: step,
            y,
            y_units: units.to_owned(),
            y_factor: 1e-6,
        },
        JcampForm::DifDup,
    )
}

fn pick(text: &str) -> PickedSpectrum {
    bands_from_file_contents(text.as_bytes(), "synthetic.jdx", &PickOptions::default())
        .unwrap_or_else(|e| panic!("{}", quiddity::diag::render_all(&e)))
}

fn nearest(bands: &[PickedBand], at: f64) -> &PickedBand {
    bands
        .iter()
        .min_by(|a, b| (a.at - at).abs().total_cmp(&(b.at - at).abs()))
        .expect("at least one band")
}

/// Well separated bands of both profiles; widths from 8 to 300 cm⁻¹.
fn known_bands() -> Vec<SynthBand> {
    vec![
        SynthBand::gaussian(3350.0, 300.0, 0.45),
        SynthBand::lorentzian(2955.0, 16.0, 0.50),
        SynthBand::gaussian(2250.0, 12.0, 0.30),
        SynthBand::lorentzian(1715.0, 20.0, 1.00),
        SynthBand::gaussian(1600.0, 8.0, 0.25),
        SynthBand::lorentzian(1450.0, 14.0, 0.35),
        SynthBand::gaussian(1240.0, 40.0, 0.60),
        SynthBand::lorentzian(1050.0, 30.0, 0.70),
        SynthBand::gaussian(820.0, 10.0, 0.40),
        SynthBand::lorentzian(700.0, 12.0, 0.55),
    ]
}

fn check_recovery(picked: &PickedSpectrum, bands: &[SynthBand], label: &str) {
    let mut failures = Vec::new();
    for want in bands {
        let got = nearest(&picked.bands, want.centre);
        let fwhm = got.fwhm.unwrap_or(f64::NAN);
        let position_ok = (got.at - want.centre).abs() <= 2.0;
        let width_ok = (fwhm - want.fwhm).abs() <= 0.10 * want.fwhm;
        if !(position_ok && width_ok) {
            failures.push(format!(
                "{label}: band {} (FWHM {}) came back at {:.2} with FWHM {fwhm:.2}",
                want.centre, want.fwhm, got.at
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn every_band_is_recovered_within_2_cm1_and_10_percent_width() {
    // Invented data: noise σ = 0.002 A, baseline 0.05 A rising 0.1 A over the range with
    // a 0.03 A bow, on 0.5 and 1 and 2 cm⁻¹ grids.
    for step in [0.5, 1.0, 2.0] {
        for seed in 1..=6 {
            let s = synthesize(
                &known_bands(),
                400.0,
                4000.0,
                step,
                0.05,
                0.1 / 3600.0,
                0.03,
                0.002,
                seed,
            );
            let picked = pick(&as_jcamp(&s, false));
            check_recovery(
                &picked,
                &known_bands(),
                &format!("absorbance, {step} cm-1, seed {seed}"),
            );
        }
    }
}

#[test]
fn the_same_spectrum_as_percent_transmittance_gives_the_same_bands() {
    let s = synthesize(
        &known_bands(),
        400.0,
        4000.0,
        1.0,
        0.05,
        0.1 / 3600.0,
        0.03,
        0.002,
        11,
    );
    let picked = pick(&as_jcamp(&s, true));
    assert!(picked.notes.iter().any(|n| n.contains("percent")));
    check_recovery(&picked, &known_bands(), "percent transmittance");
}

#[test]
fn the_same_spectrum_as_csv_gives_the_same_bands() {
    let s = synthesize(
        &known_bands(),
        400.0,
        4000.0,
        1.0,
        0.05,
        0.1 / 3600.0,
        0.03,
        0.002,
        13,
    );
    let mut csv = String::from("wavenumber (cm-1),absorbance\n");
    for (x, y) in s.x.iter().zip(&s.y).rev() {
        csv.push_str(&format!("{x},{y:.6}\n"));
    }
    let picked =
        bands_from_file_contents(csv.as_bytes(), "s.csv", &PickOptions::default()).unwrap();
    check_recovery(&picked, &known_bands(), "csv");
}

/// `common practice`: hydrogen-bonded O–H near 3300 is broad; C≡N near 2250 is sharp; the
/// sp3 C–H stretches just below 3000 are separate sharp bands.
#[test]
fn common_practice_shapes_are_classified_right() {
    let bands = vec![
        SynthBand::gaussian(3320.0, 250.0, 0.55),
        SynthBand::lorentzian(2962.0, 18.0, 0.80),
        SynthBand::lorentzian(2931.0, 18.0, 0.70),
        SynthBand::lorentzian(2872.0, 16.0, 0.45),
        SynthBand::lorentzian(2252.0, 10.0, 0.40),
        SynthBand::lorentzian(1460.0, 14.0, 0.30),
    ];
    let s = synthesize(&bands, 400.0, 4000.0, 1.0, 0.02, 0.0, 0.0, 0.002, 3);
    let picked = pick(&as_jcamp(&s, false));
    let oh = nearest(&picked.bands, 3320.0);
    assert!(
        (oh.at - 3320.0).abs() < 10.0 && oh.shape == Some(Shape::Broad),
        "{oh:?}"
    );
    let cn = nearest(&picked.bands, 2252.0);
    assert!(
        (cn.at - 2252.0).abs() < 2.0 && cn.shape == Some(Shape::Sharp),
        "{cn:?}"
    );
    for at in [2962.0, 2931.0, 2872.0] {
        let ch = nearest(&picked.bands, at);
        assert!((ch.at - at).abs() < 2.0, "C-H {at}: {ch:?}");
        assert_eq!(ch.shape, Some(Shape::Sharp), "C-H {at}");
    }
    let below_3000 = picked
        .bands
        .iter()
        .filter(|b| (2850.0..3000.0).contains(&b.at))
        .count();
    assert_eq!(below_3000, 3, "{:?}", picked.bands);
}

#[test]
fn strength_classes_follow_height_relative_to_the_strongest_band() {
    let bands = vec![
        SynthBand::lorentzian(1700.0, 15.0, 1.00),
        SynthBand::lorentzian(1500.0, 15.0, 0.60),
        SynthBand::lorentzian(1300.0, 15.0, 0.30),
        SynthBand::lorentzian(1100.0, 15.0, 0.08),
    ];
    let s = synthesize(&bands, 400.0, 4000.0, 1.0, 0.0, 0.0, 0.0, 0.001, 5);
    let picked = pick(&as_jcamp(&s, false));
    let classes: Vec<Strength> = [1700.0, 1500.0, 1300.0, 1100.0]
        .iter()
        .map(|&at| nearest(&picked.bands, at).strength)
        .collect();
    assert_eq!(
        classes,
        vec![
            Strength::Strong,
            Strength::Strong,
            Strength::Medium,
            Strength::Weak
        ]
    );
}

#[test]
fn a_resolved_doublet_stays_two_bands() {
    let bands = vec![
        SynthBand::lorentzian(1600.0, 8.0, 0.50),
        SynthBand::lorentzian(1582.0, 8.0, 0.35),
    ];
    let s = synthesize(&bands, 400.0, 4000.0, 0.5, 0.0, 0.0, 0.0, 0.001, 9);
    let picked = pick(&as_jcamp(&s, false));
    let near: Vec<f64> = picked
        .bands
        .iter()
        .filter(|b| (1570.0..1610.0).contains(&b.at))
        .map(|b| b.at)
        .collect();
    assert_eq!(near.len(), 2, "{near:?}");
    assert!(
        (near[0] - 1600.0).abs() < 1.0 && (near[1] - 1582.0).abs() < 1.0,
        "{near:?}"
    );
}

#[test]
fn a_shoulder_on_a_strong_band_is_reported_as_a_shoulder() {
    let bands = vec![
        SynthBand::lorentzian(1715.0, 18.0, 1.00),
        SynthBand::lorentzian(1697.0, 14.0, 0.30),
    ];
    let s = synthesize(&bands, 400.0, 4000.0, 0.5, 0.0, 0.0, 0.0, 0.001, 21);
    let picked = pick(&as_jcamp(&s, false));
    let shoulders: Vec<&PickedBand> = picked
        .bands
        .iter()
        .filter(|b| b.kind == BandKind::Shoulder)
        .collect();
    assert_eq!(shoulders.len(), 1, "{:?}", picked.bands);
    assert!((shoulders[0].at - 1697.0).abs() < 4.0, "{:?}", shoulders[0]);
    let peaks = picked
        .bands
        .iter()
        .filter(|b| b.kind == BandKind::Peak)
        .count();
    assert_eq!(peaks, 1, "{:?}", picked.bands);
}

#[test]
fn noise_and_baseline_alone_give_no_bands() {
    let s = synthesize(&[], 400.0, 4000.0, 1.0, 0.1, 0.2 / 3600.0, 0.05, 0.002, 17);
    let picked = pick(&as_jcamp(&s, false));
    assert!(picked.bands.is_empty(), "{:?}", picked.bands);
}

#[test]
fn region_and_minimum_strength_filter_the_list_but_not_the_classes() {
    let s = synthesize(&known_bands(), 400.0, 4000.0, 1.0, 0.05, 0.0, 0.0, 0.002, 7);
    let text = as_jcamp(&s, false);
    let options = PickOptions {
        region: Some((1500.0, 4000.0)),
        min_strength: Strength::Medium,
        ..PickOptions::default()
    };
    let picked = bands_from_file_contents(text.as_bytes(), "s.jdx", &options).unwrap();
    let at: Vec<f64> = picked.bands().iter().map(|b| b.at).collect();
    // 1600 (0.25 of the 1715 band) is medium; 2250 (0.30) medium; 3350 broad (0.45) strong;
    // everything below 1500 is outside the region.
    let expected = [3350.0, 2955.0, 2250.0, 1715.0, 1600.0];
    assert_eq!(at.len(), expected.len(), "{at:?}");
    for (got, want) in at.iter().zip(expected) {
        assert!((got - want).abs() < 3.0, "{at:?}");
    }
}

// --- Real spectra of the JCAMP-DX test suite (origin: tests/fixtures/ir/SOURCES.md) -------

fn suite(name: &str) -> PickedSpectrum {
    let path = format!(
        "{}/tests/fixtures/ir/jcamp-testsuite/{name}",
        env!("CARGO_MANIFEST_DIR")
    );
    let bytes = std::fs::read(&path).unwrap();
    bands_from_file_contents(&bytes, name, &PickOptions::default()).unwrap()
}

/// The suite's AFFN file is titled 2,2'-BIPYRIDINE. What the trade expects of such a
/// spectrum (common practice, from memory): the strongest band is the C–H out-of-plane
/// bend of the 2-substituted pyridine rings near 750–770 cm⁻¹; several ring stretches of
/// at least medium strength between 1400 and 1600; aromatic C–H stretches above 3000 weak;
/// no carbonyl (nothing above weak between 1650 and 1800).
#[test]
fn suite_bipyridine_spectrum_shows_the_bands_the_trade_expects() {
    let picked = suite("ir-transmittance-affn.dx");
    assert_eq!(picked.header.title.as_deref(), Some("2,2'-BIPYRIDINE"));
    let strongest = picked
        .bands
        .iter()
        .max_by(|a, b| a.height.total_cmp(&b.height))
        .unwrap();
    assert!((740.0..780.0).contains(&strongest.at), "{strongest:?}");
    let ring = picked
        .bands
        .iter()
        .filter(|b| (1400.0..1600.0).contains(&b.at) && b.strength >= Strength::Medium)
        .count();
    assert!(ring >= 3, "{:?}", picked.bands);
    assert!(picked
        .bands
        .iter()
        .filter(|b| b.at > 3000.0)
        .all(|b| b.strength == Strength::Weak));
    assert!(picked
        .bands
        .iter()
        .filter(|b| (1650.0..1800.0).contains(&b.at))
        .all(|b| b.strength == Strength::Weak));
}

/// One sample of the suite stored as percent transmittance and as absorbance: after
/// conversion both must give the same bands (positions within 0.5 cm⁻¹) — every band at
/// least 0.08 absorbance high (weaker ones sit near the 1 % floor, which depends on the clipped
/// strongest band). Relative heights differ: the two files clip the saturated
/// strongest band differently, at A = 5 and at T = 10⁻⁴.
#[test]
fn suite_sample_as_transmittance_and_as_absorbance_gives_the_same_bands() {
    let positions = |p: &PickedSpectrum| -> Vec<f64> {
        p.bands
            .iter()
            .filter(|b| b.height >= 0.08 && b.kind == BandKind::Peak)
            .map(|b| b.at)
            .collect()
    };
    let t = positions(&suite("ir-transmittance-difdup.jcm"));
    let a = positions(&suite("ir-absorbance-difdup.jcm"));
    assert!(t.len() >= 5, "{t:?}");
    assert_eq!(t.len(), a.len(), "{t:?} vs {a:?}");
    for (x, y) in t.iter().zip(&a) {
        assert!((x - y).abs() <= 0.5, "{t:?} vs {a:?}");
    }
}
