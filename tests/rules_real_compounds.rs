//! Does the catalogue keep the truth alive on real spectra? For well-known compounds,
//! with band positions as printed in reference spectra and correlation tables (values
//! recalled: Silverstein, Webster & Kiemle, Spectrometric Identification of Organic
//! Compounds, 7th ed., spectra and ch. 2 tables; Nyquist, Interpreting Infrared, Raman,
//! and NMR Spectra, vol. 1, for the vapour phase — all `from memory`), this test plays the
//! two IR rules of the evidence semantics (docs/engine.md) against the catalogue alone, without the engine:
//! 1. every diagnostic band of each of the compound's groups is seen (unless it may be
//!    absent; one band per `one_of` set suffices);
//! 2. every strong or medium band at or above 1500 cm⁻¹ is covered by a band of its
//!    groups, a skeleton rule whose needs are met, or an artefact of the technique.
//!
//! A failure here means the shipped rules would rule out the right answer.

use quiddity::rules::lookup::effective_range;
use quiddity::rules::{embedded_catalogue, BandRole, BandRule, Catalogue, Technique, SP3_CARBON};
use std::collections::BTreeMap;

/// Strong or medium: bands that must be explained (weak ones need not be).
const S: bool = true;
/// Weak.
const W: bool = false;

struct Compound {
    name: &'static str,
    groups: &'static [&'static str],
    has_skeleton_carbon: bool,
    technique: Technique,
    bands: &'static [(f64, bool)],
}

const fn c(
    name: &'static str,
    groups: &'static [&'static str],
    has_skeleton_carbon: bool,
    technique: Technique,
    bands: &'static [(f64, bool)],
) -> Compound {
    Compound {
        name,
        groups,
        has_skeleton_carbon,
        technique,
        bands,
    }
}

use Technique::{Film, Gas, Kbr, Mull};

/// Band positions recalled from reference spectra (from memory); `S` = strong or medium.
const COMPOUNDS: &[Compound] = &[
    c(
        "acetone",
        &["ketone_saturated"],
        true,
        Film,
        &[
            (2965.0, S),
            (2925.0, S),
            (1715.0, S),
            (1420.0, S),
            (1360.0, S),
            (1220.0, S),
        ],
    ),
    c(
        "cyclohexanone",
        &["ketone_saturated", "ring"],
        true,
        Film,
        &[(2940.0, S), (2865.0, S), (1715.0, S), (1450.0, S)],
    ),
    c(
        "cyclopentanone",
        &["ketone_strained_ring"],
        true,
        Film,
        &[(2965.0, S), (2880.0, S), (1745.0, S), (1150.0, S)],
    ),
    c(
        "ethanol",
        &["alcohol_primary"],
        true,
        Film,
        &[
            (3340.0, S),
            (2975.0, S),
            (2930.0, S),
            (2880.0, S),
            (1050.0, S),
        ],
    ),
    c(
        "methanol",
        &["alcohol_primary"],
        false,
        Film,
        &[(3330.0, S), (2945.0, S), (2833.0, S), (1030.0, S)],
    ),
    c(
        "2-propanol",
        &["alcohol_secondary"],
        true,
        Film,
        &[(3340.0, S), (2970.0, S), (1130.0, S)],
    ),
    c(
        "tert-butanol",
        &["alcohol_tertiary"],
        true,
        Film,
        &[(3360.0, S), (2970.0, S), (1200.0, S)],
    ),
    c(
        "phenol",
        &["phenol", "aromatic_ring"],
        false,
        Kbr,
        &[
            (3230.0, S),
            (3040.0, S),
            (1595.0, S),
            (1500.0, S),
            (1230.0, S),
        ],
    ),
    c(
        "toluene",
        &["aromatic_ring"],
        true,
        Film,
        &[
            (3030.0, S),
            (2920.0, S),
            (1605.0, S),
            (1496.0, S),
            (730.0, S),
            (695.0, S),
            (1940.0, W),
        ],
    ),
    c(
        "benzaldehyde",
        &["aldehyde_conjugated", "aromatic_ring"],
        false,
        Film,
        &[
            (3065.0, S),
            (2820.0, S),
            (2740.0, S),
            (1703.0, S),
            (1597.0, S),
            (1585.0, S),
            (1455.0, S),
        ],
    ),
    c(
        "acetophenone",
        &["ketone_conjugated", "aromatic_ring"],
        true,
        Film,
        &[
            (3060.0, W),
            (1685.0, S),
            (1600.0, S),
            (1580.0, S),
            (1450.0, S),
            (1360.0, S),
            (1265.0, S),
        ],
    ),
    c(
        "ethyl acetate",
        &["ester_saturated"],
        true,
        Film,
        &[
            (2985.0, S),
            (1742.0, S),
            (1375.0, S),
            (1240.0, S),
            (1047.0, S),
        ],
    ),
    c(
        "methyl benzoate",
        &["ester_conjugated", "aromatic_ring"],
        true,
        Film,
        &[
            (2955.0, S),
            (1724.0, S),
            (1600.0, S),
            (1585.0, S),
            (1450.0, S),
            (1280.0, S),
            (1110.0, S),
        ],
    ),
    c(
        "acetic acid",
        &["carboxylic_acid"],
        true,
        Film,
        &[(3000.0, S), (1710.0, S), (1410.0, S), (1290.0, S)],
    ),
    c(
        "benzoic acid",
        &["carboxylic_acid", "aromatic_ring"],
        false,
        Kbr,
        &[
            (3000.0, S),
            (1685.0, S),
            (1605.0, S),
            (1585.0, S),
            (1455.0, S),
            (1290.0, S),
        ],
    ),
    c(
        "salicylic acid",
        &["carboxylic_acid", "phenol", "aromatic_ring"],
        false,
        Kbr,
        &[
            (3235.0, S),
            (2860.0, S),
            (1660.0, S),
            (1610.0, S),
            (1485.0, S),
            (1295.0, S),
        ],
    ),
    c(
        "acetylsalicylic acid",
        &["carboxylic_acid", "ester_saturated", "aromatic_ring"],
        true,
        Kbr,
        &[
            (2870.0, S),
            (1755.0, S),
            (1690.0, S),
            (1605.0, S),
            (1185.0, S),
        ],
    ),
    c(
        "methyl salicylate",
        &["ester_conjugated", "phenol", "aromatic_ring"],
        true,
        Film,
        &[
            (3190.0, S),
            (1680.0, S),
            (1615.0, S),
            (1585.0, S),
            (1485.0, S),
            (1300.0, S),
            (1215.0, S),
        ],
    ),
    c(
        "acetic anhydride",
        &["anhydride"],
        true,
        Film,
        &[(1825.0, S), (1755.0, S), (1125.0, S)],
    ),
    c(
        "benzoyl chloride",
        &["acyl_chloride", "aromatic_ring"],
        false,
        Film,
        &[
            (1775.0, S),
            (1735.0, S),
            (1595.0, S),
            (1450.0, S),
            (1210.0, S),
        ],
    ),
    c(
        "acetamide",
        &["amide_primary"],
        true,
        Kbr,
        &[
            (3350.0, S),
            (3180.0, S),
            (1670.0, S),
            (1610.0, S),
            (1395.0, S),
        ],
    ),
    c(
        "N-methylacetamide",
        &["amide_secondary_open_chain"],
        true,
        Film,
        &[
            (3290.0, S),
            (3090.0, W),
            (2940.0, S),
            (1655.0, S),
            (1565.0, S),
        ],
    ),
    c(
        "paracetamol",
        &["amide_secondary_open_chain", "phenol", "aromatic_ring"],
        true,
        Kbr,
        &[
            (3325.0, S),
            (3160.0, S),
            (1655.0, S),
            (1610.0, S),
            (1565.0, S),
            (1510.0, S),
        ],
    ),
    c(
        "N,N-dimethylformamide",
        &["amide_tertiary_open_chain"],
        true,
        Film,
        &[
            (2930.0, S),
            (2860.0, S),
            (1675.0, S),
            (1385.0, S),
            (1090.0, S),
        ],
    ),
    c(
        "N-methyl-2-pyrrolidone",
        &["lactam_n_substituted"],
        true,
        Film,
        &[(2950.0, S), (2880.0, S), (1680.0, S), (1400.0, S)],
    ),
    c(
        "caprolactam",
        &["lactam"],
        true,
        Kbr,
        &[(3210.0, S), (3080.0, S), (2930.0, S), (1660.0, S)],
    ),
    c(
        "aniline",
        &["amine_primary", "aromatic_ring"],
        false,
        Film,
        &[
            (3430.0, S),
            (3355.0, S),
            (3210.0, W),
            (3035.0, S),
            (1620.0, S),
            (1600.0, S),
            (1500.0, S),
            (1280.0, S),
            (750.0, S),
        ],
    ),
    c(
        "butylamine",
        &["amine_primary"],
        true,
        Film,
        &[
            (3370.0, S),
            (3290.0, S),
            (2960.0, S),
            (2930.0, S),
            (2870.0, S),
            (1600.0, S),
        ],
    ),
    c(
        "diethylamine",
        &["amine_secondary"],
        true,
        Film,
        &[(3280.0, W), (2965.0, S), (2810.0, S), (1140.0, S)],
    ),
    c(
        "triethylamine",
        &["amine_tertiary"],
        true,
        Film,
        &[(2970.0, S), (2930.0, S), (2800.0, S), (1210.0, S)],
    ),
    c(
        "acetonitrile",
        &["nitrile"],
        true,
        Film,
        &[
            (2940.0, S),
            (2293.0, S),
            (2254.0, S),
            (1440.0, S),
            (1375.0, S),
        ],
    ),
    c(
        "benzonitrile",
        &["nitrile", "aromatic_ring"],
        false,
        Film,
        &[
            (3065.0, S),
            (2230.0, S),
            (1600.0, S),
            (1490.0, S),
            (1450.0, S),
        ],
    ),
    c(
        "nitromethane",
        &["nitro"],
        true,
        Film,
        &[(3045.0, W), (2965.0, W), (1560.0, S), (1380.0, S)],
    ),
    c(
        "nitrobenzene",
        &["nitro", "aromatic_ring"],
        false,
        Film,
        &[(3080.0, W), (1525.0, S), (1480.0, S), (1350.0, S)],
    ),
    c(
        "diethyl ether",
        &["ether_dialkyl"],
        true,
        Film,
        &[(2975.0, S), (2870.0, S), (1120.0, S)],
    ),
    c(
        "tetrahydrofuran",
        &["ether_dialkyl", "ring"],
        true,
        Film,
        &[(2975.0, S), (2860.0, S), (1070.0, S)],
    ),
    c(
        "anisole",
        &["ether_aryl_alkyl", "aromatic_ring"],
        true,
        Film,
        &[
            (3060.0, W),
            (2950.0, S),
            (2835.0, S),
            (1600.0, S),
            (1500.0, S),
            (1245.0, S),
            (1040.0, S),
        ],
    ),
    c(
        "propylene oxide",
        &["epoxide"],
        true,
        Film,
        &[
            (3045.0, S),
            (2990.0, S),
            (2930.0, S),
            (1265.0, S),
            (830.0, S),
        ],
    ),
    c(
        "chloroform",
        &["chloro", "chloro", "chloro"],
        true,
        Film,
        &[(3020.0, S), (1215.0, S), (760.0, S)],
    ),
    c(
        "dichloromethane",
        &["chloro", "chloro"],
        true,
        Film,
        &[(3055.0, W), (2985.0, S), (1265.0, S), (740.0, S)],
    ),
    c(
        "dimethyl sulfoxide",
        &["sulfoxide"],
        true,
        Film,
        &[
            (2995.0, S),
            (2910.0, S),
            (1435.0, S),
            (1310.0, S),
            (1045.0, S),
        ],
    ),
    c(
        "dimethyl sulfone",
        &["sulfone"],
        true,
        Kbr,
        &[(3010.0, S), (2930.0, S), (1300.0, S), (1140.0, S)],
    ),
    c(
        "ethanethiol",
        &["thiol"],
        true,
        Film,
        &[(2960.0, S), (2930.0, S), (2570.0, W), (1450.0, S)],
    ),
    c(
        "phenylacetylene",
        &["alkyne_terminal", "aromatic_ring"],
        false,
        Film,
        &[
            (3295.0, S),
            (3060.0, S),
            (2110.0, W),
            (1600.0, S),
            (1490.0, S),
            (755.0, S),
            (690.0, S),
        ],
    ),
    c(
        "1-hexene",
        &["alkene"],
        true,
        Film,
        &[
            (3080.0, S),
            (2960.0, S),
            (2925.0, S),
            (1640.0, S),
            (1460.0, S),
            (990.0, S),
            (910.0, S),
        ],
    ),
    c(
        "styrene",
        &["alkene", "aromatic_ring"],
        false,
        Film,
        &[
            (3080.0, S),
            (3025.0, S),
            (1630.0, S),
            (1600.0, S),
            (1495.0, S),
            (990.0, S),
            (910.0, S),
        ],
    ),
    c(
        "pyridine",
        &["pyridine_ring"],
        false,
        Film,
        &[
            (3080.0, S),
            (3030.0, S),
            (1583.0, S),
            (1572.0, S),
            (1482.0, S),
            (1439.0, S),
            (750.0, S),
        ],
    ),
    c(
        "phenyl isocyanate",
        &["isocyanate", "aromatic_ring"],
        false,
        Film,
        &[(2265.0, S), (1600.0, S), (1510.0, S)],
    ),
    c(
        "urea",
        &["urea"],
        false,
        Kbr,
        &[
            (3440.0, S),
            (3340.0, S),
            (1680.0, S),
            (1625.0, S),
            (1460.0, S),
        ],
    ),
    c(
        "triethyl phosphate",
        &["phosphate_ester"],
        true,
        Film,
        &[(2985.0, S), (1275.0, S), (1030.0, S)],
    ),
    c(
        "glyceryl trinitrate",
        &["nitrate_ester", "nitrate_ester", "nitrate_ester"],
        true,
        Film,
        &[(2910.0, W), (1640.0, S), (1280.0, S), (860.0, S)],
    ),
    c(
        "isoamyl nitrite",
        &["nitrite_ester"],
        true,
        Film,
        &[(2960.0, S), (1650.0, S), (1610.0, S), (780.0, S)],
    ),
    c(
        "propylene carbonate",
        &["carbonate_ester", "ring"],
        true,
        Film,
        &[(2990.0, S), (1790.0, S), (1180.0, S), (1050.0, S)],
    ),
    c(
        "dimethyl carbonate",
        &["carbonate_ester"],
        true,
        Film,
        &[(2960.0, S), (1755.0, S), (1280.0, S)],
    ),
    c(
        "RDX",
        &["nitramine", "nitramine", "nitramine"],
        true,
        Kbr,
        &[
            (3075.0, S),
            (3000.0, S),
            (1590.0, S),
            (1570.0, S),
            (1530.0, S),
            (1270.0, S),
            (1040.0, S),
        ],
    ),
    c(
        "vanillin",
        &[
            "aldehyde_conjugated",
            "phenol",
            "ether_aryl_alkyl",
            "aromatic_ring",
        ],
        true,
        Kbr,
        &[
            (3170.0, S),
            (2850.0, S),
            (2740.0, W),
            (1665.0, S),
            (1590.0, S),
            (1510.0, S),
            (1265.0, S),
        ],
    ),
    c(
        "coumarin",
        &["lactone", "alkene", "aromatic_ring"],
        false,
        Kbr,
        &[
            (3060.0, W),
            (1720.0, S),
            (1605.0, S),
            (1565.0, S),
            (1455.0, S),
            (1180.0, S),
        ],
    ),
    c(
        "maleic anhydride",
        &["anhydride", "alkene", "ring"],
        false,
        Kbr,
        &[
            (3125.0, S),
            (1850.0, S),
            (1780.0, S),
            (1590.0, W),
            (1060.0, S),
        ],
    ),
    c(
        "ethyl cinnamate",
        &["ester_conjugated", "alkene", "aromatic_ring"],
        true,
        Film,
        &[
            (3060.0, W),
            (2980.0, S),
            (1712.0, S),
            (1638.0, S),
            (1578.0, S),
            (1495.0, S),
            (1170.0, S),
        ],
    ),
    c(
        "benzophenone",
        &["ketone_conjugated", "aromatic_ring", "aromatic_ring"],
        false,
        Kbr,
        &[
            (3060.0, S),
            (1660.0, S),
            (1600.0, S),
            (1580.0, S),
            (1450.0, S),
            (1280.0, S),
        ],
    ),
    // Sample artefacts: a mineral-oil mull and a moist KBr pellet.
    c(
        "benzoic acid (mull)",
        &["carboxylic_acid", "aromatic_ring"],
        false,
        Mull,
        &[
            (2920.0, S),
            (2850.0, S),
            (1685.0, S),
            (1605.0, S),
            (1460.0, S),
            (1375.0, S),
            (1290.0, S),
        ],
    ),
    c(
        "benzophenone (moist KBr)",
        &["ketone_conjugated", "aromatic_ring", "aromatic_ring"],
        false,
        Kbr,
        &[
            (3420.0, S),
            (3060.0, S),
            (1660.0, S),
            (1640.0, S),
            (1600.0, S),
            (1450.0, S),
        ],
    ),
    // Vapour phase (GC-IR), from memory of vapour-phase reference spectra (Nyquist, vol. 1).
    c(
        "acetic acid (vapour)",
        &["carboxylic_acid"],
        true,
        Gas,
        &[(3583.0, S), (1788.0, S), (1182.0, S)],
    ),
    c(
        "ethanol (vapour)",
        &["alcohol_primary"],
        true,
        Gas,
        &[(3676.0, S), (2985.0, S), (2900.0, S), (1065.0, S)],
    ),
    c(
        "acetone (vapour)",
        &["ketone_saturated"],
        true,
        Gas,
        &[(2970.0, W), (1738.0, S), (1365.0, S), (1216.0, S)],
    ),
    c(
        "ethyl acetate (vapour)",
        &["ester_saturated"],
        true,
        Gas,
        &[(2990.0, S), (1762.0, S), (1240.0, S)],
    ),
    c(
        "benzaldehyde (vapour)",
        &["aldehyde_conjugated", "aromatic_ring"],
        false,
        Gas,
        &[(2810.0, S), (2730.0, S), (1715.0, S), (1600.0, S)],
    ),
    c(
        "N,N-dimethylformamide (vapour)",
        &["amide_tertiary_open_chain"],
        true,
        Gas,
        &[(2940.0, S), (1715.0, S)],
    ),
    c(
        "phenol (vapour)",
        &["phenol", "aromatic_ring"],
        false,
        Gas,
        &[
            (3655.0, S),
            (3050.0, S),
            (1605.0, S),
            (1500.0, S),
            (1180.0, S),
        ],
    ),
    c(
        "aniline (vapour)",
        &["amine_primary", "aromatic_ring"],
        false,
        Gas,
        &[
            (3500.0, W),
            (3415.0, W),
            (3050.0, W),
            (1625.0, S),
            (1505.0, S),
        ],
    ),
];

fn present(catalogue: &Catalogue, compound: &Compound, id: &str) -> bool {
    (id == SP3_CARBON && compound.has_skeleton_carbon)
        || compound.groups.iter().any(|g| catalogue.is_a(g, id))
}

fn seen(band: &BandRule, compound: &Compound) -> bool {
    let r = effective_range(band, Some(compound.technique));
    compound
        .bands
        .iter()
        .any(|(at, _)| r.contains_within(*at, 0.0))
}

fn may_be_absent(band: &BandRule, technique: Technique) -> bool {
    band.by_technique
        .get(&technique)
        .and_then(|o| o.may_be_absent)
        .unwrap_or(band.may_be_absent)
}

/// Rule 1: the diagnostic bands each group needs.
fn missing_diagnostics(catalogue: &Catalogue, compound: &Compound) -> Vec<String> {
    let mut missing = Vec::new();
    for id in compound.groups {
        let group = catalogue
            .group(id)
            .unwrap_or_else(|| panic!("{}: no group {id}", compound.name));
        let mut sets: BTreeMap<&str, bool> = BTreeMap::new();
        for band in group
            .bands
            .iter()
            .filter(|b| b.role == BandRole::Diagnostic)
        {
            let ok = seen(band, compound) || may_be_absent(band, compound.technique);
            match &band.one_of {
                Some(tag) => *sets.entry(tag.as_str()).or_insert(false) |= ok,
                None if !ok => missing.push(format!("{id}: {}", band.label)),
                None => {}
            }
        }
        missing.extend(
            sets.into_iter()
                .filter(|(_, ok)| !ok)
                .map(|(tag, _)| format!("{id}: one of {tag}")),
        );
    }
    missing
}

/// Rule 2: strong and medium bands in the diagnostic region need an explanation.
fn unexplained(catalogue: &Catalogue, compound: &Compound) -> Vec<f64> {
    let t = Some(compound.technique);
    let covers = |band: &BandRule, at: f64| effective_range(band, t).contains_within(at, 0.0);
    compound
        .bands
        .iter()
        .filter(|(at, strong_or_medium)| *strong_or_medium && *at >= 1500.0)
        .map(|(at, _)| *at)
        .filter(|at| {
            let by_group = compound.groups.iter().any(|id| {
                catalogue
                    .group(id)
                    .is_some_and(|g| g.bands.iter().any(|b| covers(b, *at)))
            });
            let by_skeleton = catalogue.skeleton.iter().any(|r| {
                r.needs_any.iter().any(|n| present(catalogue, compound, n)) && covers(&r.band, *at)
            });
            let by_pattern = catalogue.patterns.iter().any(|p| {
                present(catalogue, compound, &p.supports) && p.bands.iter().any(|b| covers(b, *at))
            });
            let by_artefact = catalogue.artefacts.iter().any(|a| {
                (a.techniques.is_empty() || a.techniques.contains(&compound.technique))
                    && a.range.contains_within(*at, 0.0)
            });
            !(by_group || by_skeleton || by_pattern || by_artefact)
        })
        .collect()
}

#[test]
fn the_truth_survives_on_reference_spectra() {
    let catalogue = embedded_catalogue().expect("shipped catalogue validates");
    assert!(COMPOUNDS.len() >= 50, "only {} compounds", COMPOUNDS.len());
    let mut problems = Vec::new();
    for compound in COMPOUNDS {
        for m in missing_diagnostics(&catalogue, compound) {
            problems.push(format!("{}: diagnostic band not seen: {m}", compound.name));
        }
        for at in unexplained(&catalogue, compound) {
            problems.push(format!("{}: band at {at} unexplained", compound.name));
        }
    }
    assert!(problems.is_empty(), "{}", problems.join("\n"));
}

#[test]
fn the_checks_can_fail() {
    // The same checks reject wrong answers: acetone's spectrum does not fit an alcohol
    // (no O-H) or an aldehyde (no aldehyde C-H pair), and toluene's spectrum leaves 3030
    // unexplained without an aromatic ring. (By positions alone acetone also fits an ester
    // or an acid; the formula's one O and the shape of the acid's O-H rule those out.)
    let catalogue = embedded_catalogue().expect("shipped catalogue validates");
    let acetone_bands = COMPOUNDS[0].bands;
    let as_alcohol = c(
        "acetone as alcohol",
        &["alcohol_secondary"],
        true,
        Film,
        acetone_bands,
    );
    assert!(!missing_diagnostics(&catalogue, &as_alcohol).is_empty());
    let as_aldehyde = c(
        "acetone as aldehyde",
        &["aldehyde_saturated"],
        true,
        Film,
        acetone_bands,
    );
    assert_eq!(
        missing_diagnostics(&catalogue, &as_aldehyde),
        vec!["aldehyde_saturated: one of aldehyde_ch".to_owned()]
    );
    let toluene_bands = COMPOUNDS
        .iter()
        .find(|c| c.name == "toluene")
        .expect("toluene")
        .bands;
    let as_alkane = c("toluene as ring", &["ring"], true, Film, toluene_bands);
    assert!(unexplained(&catalogue, &as_alkane).contains(&3030.0));
    // Mull oil explains its C-H bands only when the technique is a mull.
    let mull = COMPOUNDS
        .iter()
        .find(|c| c.name == "benzoic acid (mull)")
        .expect("mull case");
    let as_film = c(
        "benzoic acid mull read as film",
        &["aromatic_ring"],
        false,
        Film,
        mull.bands,
    );
    assert!(unexplained(&catalogue, &as_film).contains(&2920.0));
}
