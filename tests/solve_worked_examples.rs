//! The worked examples of the trade, solved with the shipped catalogue (the engine's own
//! unit tests use a hand-built one). Each names its source.

use quiddity::case::parse;
use quiddity::engine::{solve, Outcome, SolveOptions};
use quiddity::rules::embedded_catalogue;

fn solve_text(src: &str) -> Outcome {
    let (case, diagnostics) = parse(src, "example.yaml");
    let case = case.unwrap_or_else(|| panic!("invalid example: {diagnostics:?}"));
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("catalogue: {d:?}"));
    let options = SolveOptions {
        max_candidates: 10_000,
        ..SolveOptions::default()
    };
    solve(&case, &catalogue, &options)
}

fn all_have(o: &Outcome, family: &str) -> bool {
    !o.candidates.is_empty() && o.candidates.iter().all(|c| c.families.contains_key(family))
}

fn none_has(o: &Outcome, family: &str) -> bool {
    o.candidates
        .iter()
        .all(|c| !c.families.contains_key(family))
}

fn listing(o: &Outcome) -> Vec<String> {
    o.candidates
        .iter()
        .map(|c| c.groups.keys().cloned().collect::<Vec<_>>().join("+"))
        .collect()
}

#[test]
fn acetone_c3h6o_strong_1715_no_oh_is_a_ketone() {
    // Worked example, common practice (from memory; acetone's liquid-film spectrum as
    // read in Silverstein, Webster & Kiemle, ch. 2): C=O 1715 s, C–H 2965 m, CH3 bend
    // 1365 m, C–C–C 1220 m. Ketone consistent; aldehyde (no C–H pair near 2720/2820),
    // alcohol (no O–H) and alkene ruled out.
    let o = solve_text(
        "formula: C3H6O\nir:\n  technique: film\n  bands:\n    - { at: 3005, strength: weak }\n    - { at: 2965, strength: medium }\n    - { at: 1715, strength: strong }\n    - { at: 1420, strength: medium }\n    - { at: 1365, strength: strong }\n    - { at: 1220, strength: strong }\n",
    );
    assert!(all_have(&o, "ketone"), "{:?}", listing(&o));
    assert!(none_has(&o, "aldehyde"), "{:?}", listing(&o));
    assert!(none_has(&o, "alcohol"), "{:?}", listing(&o));
    assert!(none_has(&o, "alkene"), "{:?}", listing(&o));
    let aldehyde = o
        .ruled_out
        .iter()
        .find(|r| r.group == "aldehyde")
        .map(|r| r.reason.clone());
    assert!(aldehyde.is_some(), "aldehyde family entry in ruled_out");
}

#[test]
fn butanol_c4h10o_broad_3350_is_an_alcohol_not_an_ether() {
    // Worked example, common practice (from memory): 1-butanol, O–H 3350 s broad.
    let o = solve_text(
        "formula: C4H10O\nir:\n  technique: film\n  bands:\n    - { at: 3350, strength: strong, shape: broad }\n    - { at: 2960, strength: strong }\n    - { at: 2875, strength: medium }\n    - { at: 1465, strength: medium }\n    - { at: 1070, strength: strong }\n",
    );
    // A medium band never rules out (a band list may misreport one), so dimethyl ether
    // may stay consistent, but it leaves the free O–H unexplained and ranks below.
    assert!(
        o.candidates[0].families.contains_key("alcohol"),
        "{:?}",
        listing(&o)
    );
    let ether = o
        .candidates
        .iter()
        .find(|c| c.families.contains_key("ether"));
    if let Some(ether) = ether {
        assert!(ether.score < o.candidates[0].score, "{:?}", listing(&o));
        assert!(ether
            .bands
            .iter()
            .any(|b| b.at == 3660.0 && b.explained_by.is_empty() && b.treatment.is_some()));
    }
}

#[test]
fn benzonitrile_c7h5n_sharp_2230_is_an_aromatic_nitrile() {
    // Worked example, common practice (from memory): benzonitrile, C≡N 2230 sharp,
    // aromatic C–H 3065, ring 1600/1490, out-of-plane 760/690.
    let o = solve_text(
        "formula: C7H5N\nir:\n  technique: film\n  bands:\n    - { at: 3065, strength: medium }\n    - { at: 2230, strength: strong, shape: sharp }\n    - { at: 1600, strength: medium }\n    - { at: 1490, strength: medium }\n    - { at: 1448, strength: medium }\n    - { at: 758, strength: strong }\n    - { at: 688, strength: strong }\n",
    );
    let top = &o.candidates[0];
    assert!(top.families.contains_key("nitrile"), "{:?}", listing(&o));
    assert!(
        top.families.contains_key("aromatic_ring"),
        "{:?}",
        listing(&o)
    );
}

#[test]
fn acetic_acid_c2h4o2_very_broad_oh_and_1710_is_an_acid_not_an_ester() {
    // Worked example, common practice (from memory): acetic acid, O–H 2500–3300 very
    // broad (centred near 3000), C=O 1710 s, C–O 1290 s.
    let o = solve_text(
        "formula: C2H4O2\nir:\n  technique: film\n  bands:\n    - { at: 3000, strength: strong, shape: broad }\n    - { at: 1710, strength: strong }\n    - { at: 1410, strength: medium }\n    - { at: 1290, strength: strong }\n    - { at: 935, strength: medium, shape: broad }\n",
    );
    // The shape word alone is a hint (a broad band near 3000 could be a C–H envelope), so
    // an ester may stay consistent, but the acid ranks first.
    assert!(
        o.candidates[0].families.contains_key("carboxylic_acid"),
        "{:?}",
        listing(&o)
    );
    // With the width measured (acid O–H envelopes span about 2500–3300, common practice)
    // the band is no C–H envelope and only an acid explains it.
    let o = solve_text(
        "formula: C2H4O2\nir:\n  technique: film\n  bands:\n    - { at: 3000, strength: strong, shape: broad, width: 500 }\n    - { at: 1710, strength: strong }\n    - { at: 1410, strength: medium }\n    - { at: 1290, strength: strong }\n    - { at: 935, strength: medium, shape: broad }\n",
    );
    assert!(all_have(&o, "carboxylic_acid"), "{:?}", listing(&o));
    assert!(none_has(&o, "ester"), "{:?}", listing(&o));
}

#[test]
fn vapour_phase_acetone_keeps_its_ketone() {
    // common practice (from memory): in the vapour phase the acetone C=O sits near
    // 1735-1740, some 20 cm⁻¹ above the liquid value.
    let o = solve_text(
        "formula: C3H6O\nir:\n  technique: gas\n  bands:\n    - { at: 2972, strength: medium }\n    - { at: 1738, strength: strong }\n    - { at: 1365, strength: strong }\n    - { at: 1217, strength: strong }\n",
    );
    assert!(
        o.candidates
            .iter()
            .any(|c| c.families.contains_key("ketone")),
        "{:?}",
        listing(&o)
    );
}

#[test]
fn vapour_phase_ethanol_free_oh_is_an_alcohol() {
    // common practice (from memory): ethanol vapour shows a sharp free O–H near 3660.
    let o = solve_text(
        "formula: C2H6O\nir:\n  technique: gas\n  bands:\n    - { at: 3660, strength: medium, shape: sharp }\n    - { at: 2985, strength: strong }\n    - { at: 2900, strength: medium }\n    - { at: 1395, strength: medium }\n    - { at: 1065, strength: strong }\n",
    );
    // A medium band never rules out (a band list may misreport one), so dimethyl ether
    // may stay consistent, but it leaves the free O–H unexplained and ranks below.
    assert!(
        o.candidates[0].families.contains_key("alcohol"),
        "{:?}",
        listing(&o)
    );
    let ether = o
        .candidates
        .iter()
        .find(|c| c.families.contains_key("ether"));
    if let Some(ether) = ether {
        assert!(ether.score < o.candidates[0].score, "{:?}", listing(&o));
        assert!(ether
            .bands
            .iter()
            .any(|b| b.at == 3660.0 && b.explained_by.is_empty() && b.treatment.is_some()));
    }
}
