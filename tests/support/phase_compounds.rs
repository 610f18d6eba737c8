//! Invented condensed-phase and vapour-phase spectra of eleven ordinary compounds, shared
//! by `tests/ir_phase.rs` (the band list) and `tests/ir_phase_cases.rs` (whole cases).
//!
//! Band positions and handbook strength words are the compounds' usual values, recalled
//! (`from memory`) from Silverstein, Webster & Kiemle, Spectrometric Identification of
//! Organic Compounds, 7th ed., ch. 2 (condensed phase) and Nyquist, Interpreting Infrared,
//! Raman, and NMR Spectra, vol. 1 (vapour phase). Widths, contour shapes, noise, baseline,
//! water-vapour line forest and CO2 are invented to look like real measured spectra:
//! condensed bands 8–40 cm⁻¹ wide (hydrogen-bonded O–H / N–H 150–450), vapour bands as P/R
//! contours 14–24 cm⁻¹ apart, some with a sharp Q branch (common practice).
//! Nothing here is measured data.

#![allow(dead_code)]

use quiddity::ir::synth::{self, SynthBand};

/// Handbook strength word of a band.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Word {
    /// strong
    S,
    /// medium
    M,
    /// weak (overtones, combinations, small bands)
    W,
}

/// How an invented band is drawn.
#[derive(Clone, Copy, Debug)]
pub enum Draw {
    /// Lorentzian of this FWHM.
    L(f64),
    /// Gaussian of this FWHM (broad hydrogen-bonded bands, blended vapour C–H).
    G(f64),
    /// Vapour contour: P–R separation, branch FWHM, Q height over the branches (0: none).
    V(f64, f64, f64),
}

/// One invented band: position (handbook), word (handbook), drawing (invented).
#[derive(Clone, Copy, Debug)]
pub struct B(pub f64, pub Word, pub Draw);

/// A compound: name, formula, the groups a correct answer holds (ids of the shipped
/// catalogue, counted), and its two invented spectra.
pub struct Compound {
    pub name: &'static str,
    pub formula: &'static str,
    pub groups: &'static [(&'static str, u32)],
    pub condensed: &'static [B],
    pub vapour: &'static [B],
}

use Draw::{G, L, V};
use Word::{M, S, W};

/// The eleven compounds. Sources as in the module comment (from memory).
pub const COMPOUNDS: &[Compound] = &[
    Compound {
        name: "acetone",
        formula: "C3H6O",
        groups: &[("ketone", 1)],
        // Liquid: C=O 1715 vs, CH3 deformations 1420/1360, C-C-C 1222; C=O overtone 3412 w.
        condensed: &[
            B(3412.0, W, G(40.0)),
            B(3005.0, W, L(14.0)),
            B(2965.0, W, L(14.0)),
            B(2925.0, W, L(14.0)),
            B(1715.0, S, L(16.0)),
            B(1420.0, M, L(16.0)),
            B(1360.0, S, L(14.0)),
            B(1222.0, S, L(16.0)),
            B(1092.0, W, L(12.0)),
            B(902.0, W, L(12.0)),
            B(530.0, M, L(12.0)),
        ],
        // Vapour: C=O 1738 (higher than in the liquid), 1365 with a Q branch, 1216.
        vapour: &[
            B(3018.0, W, G(25.0)),
            B(2972.0, W, G(25.0)),
            B(1738.0, S, V(20.0, 12.0, 0.0)),
            B(1435.0, M, V(16.0, 10.0, 0.0)),
            B(1365.0, S, V(18.0, 10.0, 1.0)),
            B(1216.0, S, V(20.0, 12.0, 0.0)),
            B(1091.0, W, V(16.0, 10.0, 0.0)),
            B(528.0, M, V(14.0, 8.0, 0.0)),
        ],
    },
    Compound {
        name: "ethanol",
        formula: "C2H6O",
        groups: &[("alcohol", 1)],
        // Liquid: bonded O-H 3340 s broad, C-H 2974/2928/2885, C-O 1088/1048.
        condensed: &[
            B(3340.0, S, G(260.0)),
            B(2974.0, S, L(18.0)),
            B(2928.0, M, L(16.0)),
            B(2885.0, M, L(14.0)),
            B(1453.0, M, L(16.0)),
            B(1380.0, M, L(16.0)),
            B(1330.0, M, G(40.0)),
            B(1088.0, S, L(20.0)),
            B(1048.0, S, L(18.0)),
            B(880.0, M, L(14.0)),
        ],
        // Vapour: free O-H 3676 (sharp, medium), C-O 1066 with Q.
        vapour: &[
            B(3676.0, M, V(22.0, 12.0, 0.8)),
            B(2985.0, S, G(28.0)),
            B(2900.0, M, G(25.0)),
            B(1394.0, W, V(16.0, 10.0, 0.0)),
            B(1241.0, W, V(16.0, 10.0, 0.0)),
            B(1066.0, S, V(18.0, 10.0, 0.6)),
            B(885.0, M, V(16.0, 10.0, 0.0)),
        ],
    },
    Compound {
        name: "ethyl acetate",
        formula: "C4H8O2",
        groups: &[("ester", 1)],
        // Liquid: C=O 1742 s, C-O 1240 vs and 1047; C=O overtone 3460 w.
        condensed: &[
            B(3460.0, W, G(40.0)),
            B(2984.0, M, L(16.0)),
            B(2940.0, W, L(14.0)),
            B(1742.0, S, L(18.0)),
            B(1447.0, M, L(14.0)),
            B(1373.0, S, L(14.0)),
            B(1240.0, S, L(25.0)),
            B(1047.0, S, L(20.0)),
            B(938.0, M, L(14.0)),
            B(847.0, W, L(12.0)),
        ],
        // Vapour: C=O 1762, C-O 1248.
        vapour: &[
            B(2992.0, M, G(30.0)),
            B(1762.0, S, V(20.0, 12.0, 0.0)),
            B(1375.0, M, V(16.0, 10.0, 0.8)),
            B(1248.0, S, V(20.0, 14.0, 0.0)),
            B(1055.0, S, V(18.0, 12.0, 0.0)),
            B(940.0, W, V(16.0, 10.0, 0.0)),
        ],
    },
    Compound {
        name: "acetic acid",
        formula: "C2H4O2",
        groups: &[("carboxylic_acid", 1)],
        // Liquid (dimer): O-H 3300-2500 very broad, C=O 1712 s, C-O 1294, O-H wag 937 broad.
        condensed: &[
            B(3050.0, S, G(450.0)),
            B(2650.0, W, G(90.0)),
            B(1712.0, S, L(30.0)),
            B(1412.0, M, L(20.0)),
            B(1294.0, S, L(24.0)),
            B(1017.0, W, L(14.0)),
            B(937.0, M, G(60.0)),
            B(623.0, M, L(16.0)),
        ],
        // Vapour in a heated light pipe (monomer): free O-H 3583, C=O 1788, C-O 1182.
        vapour: &[
            B(3583.0, M, V(20.0, 12.0, 0.8)),
            B(2995.0, W, G(30.0)),
            B(1788.0, S, V(22.0, 12.0, 0.0)),
            B(1380.0, W, V(16.0, 10.0, 0.0)),
            B(1264.0, M, V(18.0, 10.0, 0.0)),
            B(1182.0, S, V(18.0, 12.0, 0.0)),
            B(642.0, M, V(14.0, 8.0, 0.0)),
        ],
    },
    Compound {
        name: "toluene",
        formula: "C7H8",
        groups: &[("aromatic_ring", 1)],
        // Liquid: aromatic C-H 3087/3062/3028, CH3 2920/2870, overtones 1942/1858/1803 w,
        // ring 1605/1496, out-of-plane 728/694 vs.
        condensed: &[
            B(3087.0, W, L(10.0)),
            B(3062.0, W, L(10.0)),
            B(3028.0, M, L(10.0)),
            B(2920.0, M, L(14.0)),
            B(2870.0, W, L(12.0)),
            B(1942.0, W, G(20.0)),
            B(1858.0, W, G(20.0)),
            B(1803.0, W, G(20.0)),
            B(1605.0, M, L(8.0)),
            B(1585.0, W, L(8.0)),
            B(1496.0, S, L(8.0)),
            B(1460.0, M, L(10.0)),
            B(1030.0, M, L(8.0)),
            B(728.0, S, L(10.0)),
            B(694.0, S, L(8.0)),
        ],
        vapour: &[
            B(3040.0, M, G(30.0)),
            B(2935.0, M, G(25.0)),
            B(1609.0, W, V(14.0, 8.0, 0.5)),
            B(1500.0, M, V(14.0, 8.0, 0.8)),
            B(1042.0, W, V(14.0, 8.0, 0.0)),
            B(729.0, S, V(14.0, 6.0, 2.0)),
            B(695.0, S, V(14.0, 6.0, 1.5)),
        ],
    },
    Compound {
        name: "benzaldehyde",
        formula: "C7H6O",
        groups: &[("aldehyde", 1), ("aromatic_ring", 1)],
        // Liquid: C=O 1703 vs, aldehyde C-H Fermi pair 2820/2738, ring 1597/1584; C=O
        // overtone 3390 w.
        condensed: &[
            B(3390.0, W, G(30.0)),
            B(3063.0, W, L(12.0)),
            B(2820.0, M, L(18.0)),
            B(2738.0, M, L(16.0)),
            B(1703.0, S, L(18.0)),
            B(1597.0, M, L(8.0)),
            B(1584.0, M, L(8.0)),
            B(1455.0, M, L(10.0)),
            B(1311.0, M, L(12.0)),
            B(1204.0, S, L(14.0)),
            B(828.0, M, L(10.0)),
            B(746.0, S, L(10.0)),
            B(688.0, S, L(10.0)),
        ],
        vapour: &[
            B(3075.0, W, G(30.0)),
            B(2810.0, M, G(25.0)),
            B(2730.0, M, G(22.0)),
            B(1720.0, S, V(18.0, 12.0, 0.0)),
            B(1602.0, M, V(12.0, 8.0, 0.5)),
            B(1315.0, W, V(14.0, 8.0, 0.0)),
            B(1200.0, S, V(16.0, 10.0, 0.0)),
            B(740.0, M, V(14.0, 6.0, 1.0)),
            B(685.0, M, V(14.0, 6.0, 1.0)),
        ],
    },
    Compound {
        name: "acetonitrile",
        formula: "C2H3N",
        groups: &[("nitrile", 1)],
        // Liquid: C≡N 2254, combination 2293 w, CH3 1443/1375, C-C 918.
        condensed: &[
            B(3002.0, W, L(12.0)),
            B(2944.0, W, L(12.0)),
            B(2293.0, W, L(10.0)),
            B(2254.0, S, L(8.0)),
            B(1443.0, S, L(14.0)),
            B(1375.0, S, L(12.0)),
            B(1041.0, S, L(10.0)),
            B(918.0, S, L(8.0)),
        ],
        // Vapour: C≡N 2267.
        vapour: &[
            B(3009.0, W, G(30.0)),
            B(2954.0, W, G(20.0)),
            B(2267.0, S, V(22.0, 10.0, 0.0)),
            B(1448.0, S, V(16.0, 10.0, 0.5)),
            B(1389.0, M, V(16.0, 10.0, 0.0)),
            B(1041.0, S, V(16.0, 8.0, 1.0)),
        ],
    },
    Compound {
        name: "triethylamine",
        formula: "C6H15N",
        groups: &[("amine_tertiary", 1)],
        // Liquid: C-H 2970/2933/2873, N-CH2 (Bohlmann) 2800, C-N 1203/1069.
        condensed: &[
            B(2970.0, S, L(20.0)),
            B(2933.0, S, L(18.0)),
            B(2873.0, M, L(16.0)),
            B(2800.0, M, L(20.0)),
            B(1462.0, M, L(14.0)),
            B(1382.0, M, L(14.0)),
            B(1203.0, S, L(16.0)),
            B(1069.0, S, L(16.0)),
            B(735.0, M, L(14.0)),
        ],
        vapour: &[
            B(2980.0, S, G(30.0)),
            B(2880.0, M, G(25.0)),
            B(2810.0, M, G(25.0)),
            B(1470.0, W, V(16.0, 10.0, 0.0)),
            B(1385.0, W, V(16.0, 10.0, 0.0)),
            B(1210.0, M, V(20.0, 12.0, 0.0)),
            B(1070.0, M, V(18.0, 12.0, 0.0)),
        ],
    },
    Compound {
        name: "chlorobenzene",
        formula: "C6H5Cl",
        groups: &[("aromatic_ring", 1), ("chloro", 1)],
        // Liquid: C-H 3068, overtones 1955/1880/1800 w, ring 1584/1478/1446, 1084, 740 vs.
        condensed: &[
            B(3068.0, M, L(12.0)),
            B(1955.0, W, G(20.0)),
            B(1880.0, W, G(20.0)),
            B(1800.0, W, G(20.0)),
            B(1584.0, S, L(8.0)),
            B(1478.0, S, L(8.0)),
            B(1446.0, S, L(8.0)),
            B(1084.0, S, L(10.0)),
            B(1024.0, M, L(8.0)),
            B(740.0, S, L(10.0)),
            B(685.0, S, L(10.0)),
        ],
        vapour: &[
            B(3075.0, W, G(30.0)),
            B(1590.0, M, V(14.0, 8.0, 0.6)),
            B(1484.0, S, V(14.0, 8.0, 1.0)),
            B(1450.0, M, V(14.0, 8.0, 0.0)),
            B(1090.0, M, V(14.0, 8.0, 0.6)),
            B(745.0, S, V(12.0, 6.0, 2.0)),
            B(685.0, M, V(12.0, 6.0, 1.0)),
        ],
    },
    Compound {
        name: "1-hexyne",
        formula: "C6H10",
        groups: &[("alkyne_terminal", 1)],
        // Liquid: ≡C-H 3312 s sharp, C≡C 2120 w, ≡C-H bend 630 s; overtone 1250 w.
        condensed: &[
            B(3312.0, S, L(16.0)),
            B(2960.0, S, L(18.0)),
            B(2935.0, S, L(16.0)),
            B(2875.0, M, L(14.0)),
            B(2120.0, W, L(10.0)),
            B(1466.0, M, L(14.0)),
            B(1380.0, W, L(12.0)),
            B(1250.0, W, L(20.0)),
            B(630.0, S, G(40.0)),
        ],
        // Vapour: ≡C-H 3334 with a strong Q branch.
        vapour: &[
            B(3334.0, M, V(24.0, 10.0, 1.5)),
            B(2970.0, S, G(30.0)),
            B(2885.0, M, G(25.0)),
            B(2140.0, W, V(18.0, 10.0, 0.0)),
            B(1465.0, W, V(16.0, 10.0, 0.0)),
            B(640.0, M, V(14.0, 8.0, 1.5)),
        ],
    },
    Compound {
        name: "N-methylacetamide",
        formula: "C3H7NO",
        groups: &[("amide_secondary", 1)],
        // Liquid: bonded N-H 3300 s broad, amide II overtone 3090 w, amide I 1655 vs,
        // amide II 1565 s.
        condensed: &[
            B(3300.0, S, G(150.0)),
            B(3090.0, W, G(40.0)),
            B(2940.0, W, L(16.0)),
            B(1655.0, S, L(30.0)),
            B(1565.0, S, L(30.0)),
            B(1370.0, M, L(16.0)),
            B(1300.0, M, L(18.0)),
            B(1160.0, W, L(16.0)),
        ],
        // Vapour: free N-H 3495, amide I 1720, amide II 1500.
        vapour: &[
            B(3495.0, M, V(18.0, 10.0, 0.8)),
            B(2960.0, W, G(30.0)),
            B(1720.0, S, V(18.0, 12.0, 0.0)),
            B(1500.0, M, V(16.0, 12.0, 0.0)),
            B(1370.0, M, V(16.0, 10.0, 0.0)),
            B(1260.0, M, V(16.0, 10.0, 0.0)),
        ],
    },
];

/// The height an invented band of this word gets (relative to the strongest band): well
/// inside the class, varied a little by position so that bands differ.
fn height(word: Word, at: f64) -> f64 {
    let jitter = ((at * 7.31).sin() + 1.0) / 2.0; // 0..1, deterministic
    match word {
        S => 0.65 + 0.35 * jitter,
        M => 0.24 + 0.12 * jitter,
        W => 0.03 + 0.05 * jitter,
    }
}

/// The invented bands of one spectrum as generator bands.
fn draw(bands: &[B], scale: f64, resolution: f64) -> Vec<SynthBand> {
    let mut out = Vec::new();
    for &B(at, word, how) in bands {
        let h = scale * height(word, at);
        match how {
            L(w) => out.push(SynthBand::lorentzian(at, w, h)),
            G(w) => out.push(SynthBand::gaussian(at, w, h)),
            V(sep, branch, q) => {
                // Branches broaden with the instrument's line width (root sum of squares).
                let branch = (branch * branch + resolution * resolution).sqrt();
                let q_fwhm = 1.3 * resolution;
                out.extend(synth::contour(at, h, sep, branch, q, q_fwhm));
            }
        }
    }
    out
}

/// The condensed-phase spectrum as two-column %T text: strongest band A ≈ 1, curved
/// sloping baseline, noise σ 0.002 A, a small CO2 doublet from the background, 1 cm⁻¹
/// spacing.
pub fn condensed_text(c: &Compound, seed: u64) -> String {
    let mut bands = draw(c.condensed, 1.0, 4.0);
    bands.extend(synth::co2(0.03, 10.0));
    let s = synth::synthesize(&bands, 450.0, 4000.0, 1.0, 0.04, 2.0e-5, 0.08, 0.002, seed);
    synth::transmittance_text(&s)
}

/// The vapour-phase spectrum as two-column %T text at `resolution` cm⁻¹ (4 or 8): strongest
/// band A ≈ 0.5, water-vapour line forest up to 8 % of it (a fair background ratio), CO2
/// doublet taller than the compound's C–H bands (35 %), sloping baseline, noise σ
/// 0.0015 A, spacing resolution / 2.
pub fn vapour_text(c: &Compound, resolution: f64, seed: u64) -> String {
    vapour_text_with(c, resolution, seed, 0.08, 0.35)
}

/// [`vapour_text`] with the water-vapour forest's tallest line and the CO2 doublet's
/// height chosen, as fractions of the strongest band (a poor background).
pub fn vapour_text_with(c: &Compound, resolution: f64, seed: u64, forest: f64, co2: f64) -> String {
    let scale = 0.5;
    let mut bands = draw(c.vapour, scale, resolution);
    bands.extend(synth::line_forest(
        forest * scale,
        1.3 * resolution,
        seed ^ 0x5eed,
    ));
    bands.extend(synth::co2(co2 * scale, 8.0 + resolution));
    let s = synth::synthesize(
        &bands,
        450.0,
        4000.0,
        resolution / 2.0,
        0.02,
        1.0e-5,
        0.03,
        0.0015,
        seed,
    );
    synth::transmittance_text(&s)
}
