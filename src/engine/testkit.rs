//! A small hand-built catalogue for the engine's unit tests (built under `cfg(test)`
//! only), independent of the shipped rules data (so that engine tests do not change when
//! the data does). Values are `common practice`, from memory; they are simplified on
//! purpose and are not the shipped catalogue.

use crate::chem::Composition;
use crate::rules::*;
use std::collections::BTreeMap;

fn at(line: usize) -> RuleRef {
    RuleRef {
        file: "testkit.yaml".into(),
        line,
    }
}

/// A band rule with no overrides.
pub fn band(
    label: &str,
    lo: f64,
    hi: f64,
    strength: ExpectedStrength,
    shape: ExpectedShape,
    role: BandRole,
) -> BandRule {
    BandRule {
        label: label.into(),
        range: Range { lo, hi },
        strength,
        shape,
        role,
        one_of: None,
        may_be_absent: false,
        by_technique: BTreeMap::new(),
        shifts: Vec::new(),
        source: "common practice, from memory".into(),
        defined_at: at(lo as usize),
    }
}

fn with_gas(
    mut b: BandRule,
    lo: f64,
    hi: f64,
    shape: Option<ExpectedShape>,
    strength: Option<ExpectedStrength>,
) -> BandRule {
    b.by_technique.insert(
        Technique::Gas,
        BandOverride {
            range: Some(Range { lo, hi }),
            strength,
            shape,
            may_be_absent: None,
            source: "common practice, from memory".into(),
        },
    );
    b
}

fn one_of(mut b: BandRule, tag: &str) -> BandRule {
    b.one_of = Some(tag.into());
    b
}

fn absent_ok(mut b: BandRule) -> BandRule {
    b.may_be_absent = true;
    b
}

/// A group from its parts.
pub fn group(
    id: &str,
    atoms: &[(&str, u32)],
    dbe: u32,
    bonds: OpenBonds,
    bands: Vec<BandRule>,
) -> Group {
    Group {
        id: id.into(),
        name: id.replace('_', " "),
        atoms: Composition::from_pairs(atoms.iter().copied()),
        dbe,
        ring_closures: 0,
        bonds,
        subtype_of: Vec::new(),
        excludes: Vec::new(),
        requires_any: Vec::new(),
        bands,
        ms: Vec::new(),
        checks: Vec::new(),
        ionic: None,
        salt_of: None,
        note: None,
        source: "common practice, from memory".into(),
        defined_at: at(1),
    }
}

fn hetero(n: u32) -> OpenBonds {
    OpenBonds {
        hetero: n,
        ..OpenBonds::default()
    }
}

fn carbon(n: u32, or_h: u32) -> OpenBonds {
    OpenBonds {
        carbon: n,
        carbon_or_h: or_h,
        ..OpenBonds::default()
    }
}

fn subtype(mut g: Group, parent: &str) -> Group {
    g.subtype_of.push(parent.into());
    g
}

/// The test catalogue: alcohols (primary/secondary subtypes), ether, aldehyde, ketone,
/// carboxylic acid, ester, nitrile, primary amine, chloro, aromatic ring, alkene, internal
/// alkyne, plain ring; sp3/sp2 C–H skeleton rules, CO2 and KBr-moisture artefacts, an ATR
/// effect.
pub fn small_catalogue() -> Catalogue {
    let mut groups = alcohols_and_ether();
    groups.extend(carbonyl_groups());
    groups.extend(nitrogen_and_halogen_groups());
    groups.extend(hydrocarbon_groups());
    Catalogue {
        groups,
        skeleton: skeleton_rules(),
        artefacts: artefact_rules(),
        patterns: Vec::new(),
        technique_effects: technique_effects(),
        hydrate_bands: Vec::new(),
        digest: "testkit".into(),
    }
}

/// Alcohol with its primary and secondary subtypes, phenol, ether.
fn alcohols_and_ether() -> Vec<Group> {
    use BandRole::*;
    use ExpectedShape::*;
    use ExpectedStrength::*;
    let oh = || {
        with_gas(
            band("O–H stretch", 3200.0, 3550.0, Strong, Broad, Diagnostic),
            3600.0,
            3700.0,
            Some(Sharp),
            Some(Medium),
        )
    };
    let alcohol_co = |lo, hi| band("C–O stretch", lo, hi, Strong, Any, Supporting);
    let alcohol = group("alcohol", &[("O", 1), ("H", 1)], 0, hetero(1), vec![oh()]);
    let primary = subtype(
        group(
            "alcohol_primary",
            &[("O", 1), ("H", 1)],
            0,
            hetero(1),
            vec![oh(), alcohol_co(1000.0, 1075.0)],
        ),
        "alcohol",
    );
    let secondary = subtype(
        group(
            "alcohol_secondary",
            &[("O", 1), ("H", 1)],
            0,
            hetero(1),
            vec![oh(), alcohol_co(1075.0, 1150.0)],
        ),
        "alcohol",
    );
    let ether = group(
        "ether",
        &[("O", 1)],
        0,
        hetero(2),
        vec![band(
            "C–O–C stretch",
            1050.0,
            1150.0,
            Strong,
            Any,
            Diagnostic,
        )],
    );
    let mut phenol = group("phenol", &[("O", 1), ("H", 1)], 0, hetero(1), vec![oh()]);
    phenol.requires_any = vec!["aromatic_ring".into()];
    vec![alcohol, primary, secondary, phenol, ether]
}

/// Ketone, aldehyde, carboxylic acid, ester (catalogue order: aldehyde first).
fn carbonyl_groups() -> Vec<Group> {
    use BandRole::*;
    use ExpectedShape::*;
    use ExpectedStrength::*;
    let ketone = group(
        "ketone",
        &[("C", 1), ("O", 1)],
        1,
        carbon(2, 0),
        vec![with_gas(
            band("C=O stretch", 1705.0, 1725.0, Strong, Any, Diagnostic),
            1725.0,
            1750.0,
            None,
            None,
        )],
    );
    let aldehyde = aldehyde();
    let acid = group(
        "carboxylic_acid",
        &[("C", 1), ("O", 2), ("H", 1)],
        1,
        carbon(0, 1),
        vec![
            band(
                "O–H stretch (dimer)",
                2500.0,
                3300.0,
                Strong,
                Broad,
                Diagnostic,
            ),
            band("C=O stretch", 1700.0, 1725.0, Strong, Any, Diagnostic),
        ],
    );
    let ester = group(
        "ester",
        &[("C", 1), ("O", 2)],
        1,
        OpenBonds {
            hetero: 1,
            carbon_or_h: 1,
            ..OpenBonds::default()
        },
        vec![
            band("C=O stretch", 1735.0, 1750.0, Strong, Any, Diagnostic),
            band("C–O stretch", 1150.0, 1300.0, Strong, Any, Supporting),
        ],
    );
    vec![aldehyde, ketone, acid, ester]
}

/// Aldehyde: C=O with the Fermi pair of C–H stretches (either one enough).
fn aldehyde() -> Group {
    use BandRole::*;
    use ExpectedShape::*;
    use ExpectedStrength::*;
    group(
        "aldehyde",
        &[("C", 1), ("H", 1), ("O", 1)],
        1,
        carbon(0, 1),
        vec![
            band("C=O stretch", 1720.0, 1740.0, Strong, Any, Diagnostic),
            one_of(
                band(
                    "C–H stretch (Fermi pair, low)",
                    2695.0,
                    2750.0,
                    Medium,
                    Sharp,
                    Diagnostic,
                ),
                "aldehyde_ch",
            ),
            one_of(
                band(
                    "C–H stretch (Fermi pair, high)",
                    2800.0,
                    2860.0,
                    Medium,
                    Sharp,
                    Diagnostic,
                ),
                "aldehyde_ch",
            ),
        ],
    )
}

/// Nitrile, primary amine, chloro.
fn nitrogen_and_halogen_groups() -> Vec<Group> {
    use BandRole::*;
    use ExpectedShape::*;
    use ExpectedStrength::*;
    let nitrile = group(
        "nitrile",
        &[("C", 1), ("N", 1)],
        2,
        carbon(1, 0),
        vec![band(
            "C≡N stretch",
            2210.0,
            2260.0,
            Medium,
            Sharp,
            Diagnostic,
        )],
    );
    let amine = group(
        "amine_primary",
        &[("N", 1), ("H", 2)],
        0,
        hetero(1),
        vec![band("N–H stretch", 3300.0, 3500.0, Medium, Any, Diagnostic)],
    );
    let chloro = group(
        "chloro",
        &[("Cl", 1)],
        0,
        hetero(1),
        vec![band("C–Cl stretch", 550.0, 850.0, Strong, Any, Diagnostic)],
    );
    vec![nitrile, amine, chloro]
}

/// Aromatic ring, alkene, internal alkyne, plain ring.
fn hydrocarbon_groups() -> Vec<Group> {
    use BandRole::*;
    use ExpectedShape::*;
    use ExpectedStrength::*;
    let aromatic = group(
        "aromatic_ring",
        &[("C", 6)],
        4,
        carbon(0, 6),
        vec![
            one_of(
                band(
                    "ring C=C stretch",
                    1580.0,
                    1620.0,
                    Variable,
                    Any,
                    Diagnostic,
                ),
                "ring_cc",
            ),
            one_of(
                band(
                    "ring C=C stretch",
                    1450.0,
                    1510.0,
                    Variable,
                    Any,
                    Diagnostic,
                ),
                "ring_cc",
            ),
        ],
    );
    let alkene = group(
        "alkene",
        &[("C", 2)],
        1,
        carbon(0, 4),
        vec![absent_ok(band(
            "C=C stretch",
            1620.0,
            1680.0,
            Variable,
            Any,
            Diagnostic,
        ))],
    );
    let alkyne = group(
        "alkyne_internal",
        &[("C", 2)],
        2,
        carbon(2, 0),
        vec![absent_ok(band(
            "C≡C stretch",
            2190.0,
            2260.0,
            Weak,
            Sharp,
            Diagnostic,
        ))],
    );
    let ring = group("ring", &[], 1, OpenBonds::default(), Vec::new());
    vec![aromatic, alkene, alkyne, ring]
}

/// sp3 and sp2 C–H stretches and the CH2/CH3 bend.
fn skeleton_rules() -> Vec<SkeletonRule> {
    use BandRole::*;
    use ExpectedShape::*;
    use ExpectedStrength::*;
    vec![
        SkeletonRule {
            id: "ch_sp3_stretch".into(),
            band: band("sp3 C–H stretch", 2850.0, 2970.0, Strong, Any, Supporting),
            needs_any: vec!["sp3_carbon".into()],
        },
        SkeletonRule {
            id: "ch_sp2_stretch".into(),
            band: band("sp2 C–H stretch", 3000.0, 3100.0, Medium, Any, Supporting),
            needs_any: vec!["aromatic_ring".into(), "alkene".into()],
        },
        SkeletonRule {
            id: "ch2_ch3_bend".into(),
            band: band("CH2/CH3 bend", 1350.0, 1470.0, Medium, Any, Supporting),
            needs_any: vec!["sp3_carbon".into()],
        },
    ]
}

/// Atmospheric CO2 and moisture in KBr.
fn artefact_rules() -> Vec<ArtefactRule> {
    use ExpectedShape::*;
    vec![
        ArtefactRule {
            id: "atmospheric_co2".into(),
            label: "atmospheric CO2".into(),
            range: Range {
                lo: 2330.0,
                hi: 2370.0,
            },
            techniques: Vec::new(),
            shape: Any,
            source: "common practice".into(),
            defined_at: at(900),
        },
        ArtefactRule {
            id: "kbr_moisture".into(),
            label: "moisture in KBr".into(),
            range: Range {
                lo: 3300.0,
                hi: 3500.0,
            },
            techniques: vec![Technique::Kbr],
            shape: Broad,
            source: "common practice".into(),
            defined_at: at(901),
        },
    ]
}

/// ATR penetration depth.
fn technique_effects() -> Vec<TechniqueEffect> {
    vec![TechniqueEffect {
        id: "atr_high_wavenumber".into(),
        technique: Technique::Atr,
        range: Range {
            lo: 2500.0,
            hi: 4000.0,
        },
        weaker_by: 1,
        label: "ATR penetration depth falls with wavenumber".into(),
        source: "common practice".into(),
        defined_at: at(950),
    }]
}
