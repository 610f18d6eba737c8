//! The demo reference library `cases/reference-library/` and the unknown's spectrum of
//! `cases/lab-0114-library.yaml`: invented, generated here, checked here.
//!
//! `QUIDDITY_UPDATE_SPECTRA=1 cargo test --test library_demo` rewrites the files; without
//! it the test fails when a committed file differs from its recipe. Nothing here is
//! measured data: the band lists are invented patterns of the named group classes
//! (positions common practice, from memory), each file says so.

#![allow(clippy::unwrap_used)] // helpers of an integration test panic on purpose

use quiddity::ir::jcamp::{write_jcamp, JcampForm, WriteSpectrum};
use quiddity::ir::synth::{synthesize, SynthBand};
use std::path::PathBuf;

struct Demo {
    /// Path below cases/.
    file: &'static str,
    title: &'static str,
    molform: Option<&'static str>,
    state: &'static str,
    bands: Vec<SynthBand>,
    /// Lowest wavenumber measured.
    low: f64,
    seed: u64,
    /// Side file text, when the reference has one.
    side: Option<&'static str>,
}

fn l(at: f64, fwhm: f64, h: f64) -> SynthBand {
    SynthBand::lorentzian(at, fwhm, h)
}

/// The unknown's pattern: a saturated ketone-like C4H8O (C=O near 1716, CH3/CH2 bends,
/// C–C(=O)–C stretch near 1170; common practice, from memory).
fn unknown_bands() -> Vec<SynthBand> {
    vec![
        l(2981.0, 20.0, 0.30),
        l(2940.0, 18.0, 0.20),
        l(2884.0, 16.0, 0.10),
        l(1716.0, 18.0, 1.00),
        l(1460.0, 14.0, 0.32),
        l(1415.0, 12.0, 0.28),
        l(1366.0, 12.0, 0.45),
        l(1172.0, 16.0, 0.55),
        l(1088.0, 14.0, 0.18),
        l(946.0, 12.0, 0.14),
        l(762.0, 12.0, 0.12),
    ]
}

fn demos() -> Vec<Demo> {
    vec![
        Demo {
            file: "spectra/lab-0114-unknown.jdx",
            title: "LAB-IR-0114 solvent from a cleaning station, ATR (invented)",
            molform: None,
            state: "liquid, ATR (invented)",
            bands: unknown_bands(),
            low: 650.0,
            seed: 1140,
            side: None,
        },
        Demo {
            // Spectrally the closest: one CH2 fewer, so two fingerprint bands are gone.
            file: "reference-library/ketone-k3.jdx",
            title: "invented ketone standard K-3 (reference library demo)",
            molform: Some("C H3 C O C H3"),
            state: "liquid, ATR (invented)",
            bands: vec![
                l(2981.0, 20.0, 0.30),
                l(2935.0, 18.0, 0.18),
                l(1716.0, 18.0, 1.00),
                l(1458.0, 14.0, 0.30),
                l(1420.0, 12.0, 0.30),
                l(1364.0, 12.0, 0.50),
                l(1170.0, 16.0, 0.55),
                l(1092.0, 14.0, 0.14),
                l(530.0, 14.0, 0.20),
            ],
            low: 450.0,
            seed: 1141,
            side: Some("# invented reference for quiddity demos: not measured data\nphase: condensed\ntechnique: ATR\ngroups: { ketone_saturated: 1 }\nnotes: invented\n"),
        },
        Demo {
            // The unknown's own class and formula, its fingerprint shifted a little.
            file: "reference-library/ketone-k4.jdx",
            title: "invented ketone standard K-4 (reference library demo)",
            molform: Some("C H3 C H2 C O C H3"),
            state: "liquid, ATR (invented)",
            bands: vec![
                l(2979.0, 20.0, 0.34),
                l(2940.0, 18.0, 0.22),
                l(2882.0, 16.0, 0.12),
                l(1714.0, 18.0, 1.00),
                l(1458.0, 14.0, 0.38),
                l(1412.0, 12.0, 0.22),
                l(1364.0, 12.0, 0.40),
                l(1178.0, 16.0, 0.46),
                l(1080.0, 14.0, 0.22),
                l(998.0, 12.0, 0.10),
                l(940.0, 12.0, 0.18),
                l(758.0, 12.0, 0.16),
            ],
            low: 600.0,
            seed: 1142,
            side: Some("# invented reference for quiddity demos: not measured data\nphase: condensed\ntechnique: ATR\ngroups: { ketone_saturated: 1 }\nnotes: invented\n"),
        },
        Demo {
            // Same formula, an aldehyde: the C–H doublet near 2820/2720 the unknown lacks.
            file: "reference-library/aldehyde-a4.jdx",
            title: "invented aldehyde standard A-4 (reference library demo)",
            molform: Some("C H3 C H2 C H2 C H O"),
            state: "liquid, ATR (invented)",
            bands: vec![
                l(2966.0, 20.0, 0.40),
                l(2878.0, 16.0, 0.20),
                l(2822.0, 14.0, 0.14),
                l(2719.0, 14.0, 0.12),
                l(1728.0, 18.0, 1.00),
                l(1460.0, 14.0, 0.30),
                l(1390.0, 12.0, 0.20),
                l(1120.0, 16.0, 0.20),
                l(760.0, 12.0, 0.10),
            ],
            low: 600.0,
            seed: 1143,
            side: Some("# invented reference for quiddity demos: not measured data\nphase: condensed\ntechnique: ATR\ngroups: { aldehyde_saturated: 1 }\nnotes: invented\n"),
        },
        Demo {
            file: "reference-library/ester-e4.jdx",
            title: "invented ester standard E-4 (reference library demo)",
            molform: Some("C H3 C O2 C H2 C H3"),
            state: "liquid, ATR (invented)",
            bands: vec![
                l(2984.0, 20.0, 0.20),
                l(1742.0, 18.0, 1.00),
                l(1446.0, 14.0, 0.20),
                l(1372.0, 12.0, 0.40),
                l(1240.0, 22.0, 0.90),
                l(1047.0, 18.0, 0.50),
                l(938.0, 12.0, 0.14),
                l(848.0, 12.0, 0.12),
            ],
            low: 600.0,
            seed: 1144,
            side: Some("# invented reference for quiddity demos: not measured data\nphase: condensed\ngroups: { ester_saturated: 1 }\nnotes: invented\n"),
        },
        Demo {
            // Formula only in the side file (the header has no ##MOLFORM=).
            file: "reference-library/alcohol-b4.jdx",
            title: "invented alcohol standard B-4 (reference library demo)",
            molform: None,
            state: "liquid, ATR (invented)",
            bands: vec![
                SynthBand::gaussian(3335.0, 280.0, 0.50),
                l(2958.0, 18.0, 0.80),
                l(2931.0, 18.0, 0.60),
                l(2874.0, 16.0, 0.40),
                l(1462.0, 14.0, 0.30),
                l(1378.0, 12.0, 0.16),
                l(1072.0, 26.0, 0.80),
                l(990.0, 20.0, 0.30),
            ],
            low: 600.0,
            seed: 1145,
            side: Some("# invented reference for quiddity demos: not measured data\nname: invented alcohol standard B-4\nformula: C4H10O\nphase: condensed\ngroups: { alcohol_secondary: 1 }\nnotes: invented\n"),
        },
        Demo {
            // The K-4 standard as a vapour: never compared with the condensed-phase unknown.
            file: "reference-library/ketone-k4-vapour.jdx",
            title: "invented ketone standard K-4, vapour (reference library demo)",
            molform: Some("C4 H8 O"),
            state: "gas (invented)",
            bands: vec![
                l(2990.0, 30.0, 0.30),
                l(1742.0, 30.0, 1.00),
                l(1365.0, 20.0, 0.40),
                l(1180.0, 24.0, 0.40),
            ],
            low: 600.0,
            seed: 1146,
            side: None,
        },
    ]
}

fn cases_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("cases")
}

fn render(demo: &Demo) -> String {
    let s = synthesize(
        &demo.bands,
        demo.low,
        4000.0,
        2.0,
        0.02,
        0.0,
        0.01,
        0.001,
        demo.seed,
    );
    let mut fields = vec![
        ("ORIGIN".to_owned(), "invented (quiddity demo)".to_owned()),
        ("OWNER".to_owned(), "public domain".to_owned()),
        ("STATE".to_owned(), demo.state.to_owned()),
        ("RESOLUTION".to_owned(), "4".to_owned()),
    ];
    if let Some(m) = demo.molform {
        fields.push(("MOLFORM".to_owned(), m.to_owned()));
    }
    write_jcamp(
        &WriteSpectrum {
            title: demo.title.to_owned(),
            comments: vec![
                "invented spectrum for quiddity demos: not measured data".to_owned(),
                "generated by tests/library_demo.rs (QUIDDITY_UPDATE_SPECTRA=1 rewrites it)"
                    .to_owned(),
            ],
            fields,
            first_x: 4000.0,
            delta_x: -2.0,
            y: s.y.iter().rev().copied().collect(),
            y_units: "ABSORBANCE".to_owned(),
            y_factor: 1e-5,
        },
        JcampForm::DifDup,
    )
}

#[test]
fn committed_demo_library_matches_its_generator() {
    let update = std::env::var_os("QUIDDITY_UPDATE_SPECTRA").is_some();
    let mut checked = 0;
    for demo in demos() {
        let path = cases_dir().join(demo.file);
        let side_path = path.with_extension("yaml");
        let text = render(&demo);
        if update {
            std::fs::create_dir_all(path.parent().unwrap()).unwrap();
            std::fs::write(&path, &text).unwrap();
            if let Some(side) = demo.side {
                std::fs::write(&side_path, side).unwrap();
            }
        }
        let committed = std::fs::read_to_string(&path).unwrap_or_else(|e| {
            panic!(
                "{}: {e} (run with QUIDDITY_UPDATE_SPECTRA=1)",
                path.display()
            )
        });
        assert_eq!(
            committed,
            text,
            "{} differs from its recipe",
            path.display()
        );
        if let Some(side) = demo.side {
            assert_eq!(std::fs::read_to_string(&side_path).unwrap(), side);
        }
        checked += 1;
    }
    assert_eq!(checked, 7);
}
