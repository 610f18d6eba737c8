//! Salts, hydrates and mixtures against published band positions of real compounds.
//!
//! Each band list is a recalled reference spectrum (positions in cm⁻¹, strength classes as
//! an analyst reads them); the source is named beside each. The shipped catalogue and the
//! engine must keep the organic part's true groups, read the formula as the salt it is,
//! and, for a powder cut with a diluent, attribute the diluent's bands and deduce the rest.

use quiddity::case::parse;
use quiddity::engine::salt::ReadingKind;
use quiddity::engine::{solve, Outcome, SolveOptions};
use quiddity::rules::embedded_catalogue;
use std::collections::BTreeMap;

fn run(formula: &str, technique: &str, bands: &[(f64, &str, &str)], extra: &str) -> Outcome {
    let mut text =
        format!("case: T\nformula: \"{formula}\"\nir:\n  technique: {technique}\n  bands:\n");
    for (at, strength, shape) in bands {
        let shape = if shape.is_empty() {
            String::new()
        } else {
            format!(", shape: {shape}")
        };
        text.push_str(&format!(
            "    - {{ at: {at}, strength: {strength}{shape} }}\n"
        ));
    }
    text.push_str(extra);
    let (case, d) = parse(&text, "t.yaml");
    let case = case.unwrap_or_else(|| panic!("{d:?}\n{text}"));
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    solve(&case, &catalogue, &SolveOptions::default())
}

fn groups(pairs: &[(&str, u32)]) -> BTreeMap<String, u32> {
    pairs.iter().map(|(g, n)| ((*g).to_owned(), *n)).collect()
}

fn rank_of(o: &Outcome, truth: &BTreeMap<String, u32>) -> Option<usize> {
    o.candidates
        .iter()
        .find(|c| &c.groups == truth)
        .map(|c| c.rank)
}

#[test]
fn sodium_acetate_is_read_as_the_sodium_salt_of_acetic_acid() {
    // Sodium acetate, KBr: COO- asymmetric 1578, symmetric 1414, CH3 bend 1443, C-C 925,
    // OCO bend 646 (Nakamoto, Infrared and Raman Spectra of Inorganic and Coordination
    // Compounds, part B, acetato compounds, from memory).
    let o = run(
        "C2H3NaO2",
        "KBr",
        &[
            (2935.0, "weak", ""),
            (1578.0, "strong", ""),
            (1443.0, "medium", ""),
            (1414.0, "strong", ""),
            (1020.0, "weak", ""),
            (925.0, "medium", ""),
            (646.0, "medium", ""),
        ],
        "",
    );
    let salt = o.salt.as_ref().expect("a salt reading");
    assert_eq!(salt.reading, ReadingKind::Metal);
    assert_eq!(salt.organic_formula, "C2H4O2");
    assert!(salt
        .parts
        .iter()
        .any(|p| p.formula == "Na+" && p.role == quiddity::engine::salt::PartRole::Metal));
    assert_eq!(rank_of(&o, &groups(&[("carboxylate_salt", 1)])), Some(1));
    // The families roll the salt form up to the free acid's group.
    assert_eq!(o.candidates[0].families.get("carboxylic_acid"), Some(&1));
}

#[test]
fn sodium_benzoate_keeps_ring_and_carboxylate() {
    // Sodium benzoate, KBr: 3065, COO- asymmetric 1597 and 1551, symmetric 1413, 845, ring
    // out-of-plane 708 and 678 (Socrates, Infrared and Raman Characteristic Group
    // Frequencies, 3rd ed., carboxylic acid salts, from memory).
    let o = run(
        "C7H5NaO2",
        "KBr",
        &[
            (3065.0, "weak", ""),
            (1597.0, "strong", ""),
            (1551.0, "strong", ""),
            (1413.0, "strong", ""),
            (845.0, "medium", ""),
            (708.0, "strong", ""),
            (678.0, "medium", ""),
        ],
        "",
    );
    assert_eq!(
        rank_of(
            &o,
            &groups(&[("aromatic_ring", 1), ("carboxylate_salt", 1)])
        ),
        Some(1)
    );
    // The free acid would need its C=O near 1700: the check says it is not seen.
    let checks = &o.salt.as_ref().expect("salt").checks;
    assert!(
        checks
            .iter()
            .any(|c| c.contains("C=O stretch") && c.contains("not seen")),
        "{checks:?}"
    );
}

#[test]
fn methylamine_hydrochloride_cannot_be_covalent_and_is_read_as_the_salt() {
    // Methylamine hydrochloride, KBr: NH3+ envelope 3100-2700 with maxima near 3000 and
    // 2960, combination bands near 2510 and 2040, NH3+ bends 1605 and 1500, CH3 rock 1000
    // (Silverstein, Webster & Kiemle, 7th ed., ch. 2, amine salts, from memory). CH6ClN
    // has DBE -1 as one covalent molecule.
    let o = run(
        "CH6ClN",
        "KBr",
        &[
            (3000.0, "strong", "broad"),
            (2960.0, "strong", "broad"),
            (2510.0, "medium", ""),
            (2040.0, "weak", ""),
            (1605.0, "medium", ""),
            (1500.0, "medium", ""),
            (1000.0, "medium", ""),
        ],
        "",
    );
    let salt = o.salt.as_ref().expect("a salt reading");
    assert_eq!(salt.reading, ReadingKind::RequiredHydrohalide);
    assert_eq!(salt.organic_formula, "CH5N");
    assert!(salt.alternatives.is_empty());
    assert_eq!(rank_of(&o, &groups(&[("amine_primary_salt", 1)])), Some(1));
}

#[test]
fn triethylamine_hydrochloride_is_a_tertiary_amine_salt() {
    // Triethylamine hydrochloride, KBr: C-H 2985 and 2945, NH+ envelope 2740-2490 with
    // maxima near 2680 and 2495, CH2/CH3 bends 1475 and 1397, C-N 1170 and 1036
    // (Silverstein, Webster & Kiemle, 7th ed., ch. 2, tertiary amine salts 2700-2250, from
    // memory).
    let o = run(
        "C6H15N·HCl",
        "KBr",
        &[
            (2985.0, "strong", ""),
            (2945.0, "medium", ""),
            (2680.0, "strong", "broad"),
            (2495.0, "strong", "broad"),
            (1475.0, "medium", ""),
            (1397.0, "medium", ""),
            (1170.0, "medium", ""),
            (1036.0, "medium", ""),
        ],
        "",
    );
    assert_eq!(rank_of(&o, &groups(&[("amine_tertiary_salt", 1)])), Some(1));
    let salt = o.salt.as_ref().expect("salt");
    assert_eq!(salt.stated_dbe, Some(-1.0));
    assert_eq!(salt.organic_dbe, Some(0.0));
}

#[test]
fn an_unwritten_hydrochloride_is_chosen_over_the_covalent_reading_by_its_bands() {
    // 2-Phenylethylamine hydrochloride written as one formula C8H12ClN: NH3+ envelope
    // 3100-2800 (maxima near 3020 and 2960), combination band near 2600, NH3+ bends 1605 and
    // 1500, ring 1455, monosubstituted benzene 750 and 700 (Silverstein, Webster & Kiemle,
    // 7th ed., ch. 2, amine salts and benzene derivatives, from memory).
    let o = run(
        "C8H12ClN",
        "KBr",
        &[
            (3020.0, "strong", "broad"),
            (2960.0, "strong", "broad"),
            (2600.0, "medium", ""),
            (1605.0, "medium", ""),
            (1500.0, "medium", ""),
            (1455.0, "medium", ""),
            (750.0, "strong", ""),
            (700.0, "strong", ""),
        ],
        "",
    );
    let salt = o.salt.as_ref().expect("salt");
    assert_eq!(salt.reading, ReadingKind::PossibleHydrohalide);
    assert_eq!(salt.organic_formula, "C8H11N");
    // The covalent reading was solved too and is named.
    assert!(salt
        .alternatives
        .iter()
        .any(|a| a.reading == ReadingKind::Covalent));
    assert_eq!(
        rank_of(
            &o,
            &groups(&[("amine_primary_salt", 1), ("aromatic_ring", 1)])
        ),
        Some(1)
    );
}

#[test]
fn water_of_crystallisation_is_accounted_and_its_bands_are_seen() {
    // Sodium acetate trihydrate, KBr: lattice water O-H 3450 (broad) and 3250, H-O-H bend
    // near 1660, COO- 1565 and 1410 (Nakamoto, part B, acetates; lattice water part A, from
    // memory).
    let o = run(
        "C2H3NaO2·3H2O",
        "KBr",
        &[
            (3450.0, "strong", "broad"),
            (3250.0, "medium", "broad"),
            (1660.0, "medium", ""),
            (1565.0, "strong", ""),
            (1410.0, "strong", ""),
            (925.0, "medium", ""),
        ],
        "",
    );
    let salt = o.salt.as_ref().expect("salt");
    assert!(salt
        .parts
        .iter()
        .any(|p| p.role == quiddity::engine::salt::PartRole::Water && p.count == 3));
    assert!(
        salt.checks
            .iter()
            .any(|c| c.starts_with("hydrate:") && c.contains("seen: 3450")),
        "{:?}",
        salt.checks
    );
    assert_eq!(rank_of(&o, &groups(&[("carboxylate_salt", 1)])), Some(1));
}

/// Acetophenone, liquid film: 3060, C=O 1686, ring 1599 and 1583, 1450, CH3 1360, C-C(=O)
/// 1266, out-of-plane 760 and 691 (Silverstein, Webster & Kiemle, 7th ed., ch. 2, from
/// memory).
const ACETOPHENONE: [(f64, &str, &str); 9] = [
    (3060.0, "weak", ""),
    (1686.0, "strong", ""),
    (1599.0, "medium", ""),
    (1583.0, "medium", ""),
    (1450.0, "medium", ""),
    (1360.0, "strong", ""),
    (1266.0, "strong", ""),
    (760.0, "strong", ""),
    (691.0, "strong", ""),
];

fn mixture_case(diluent: &[(f64, &str, &str)], name: &str) -> Outcome {
    let mut observed: Vec<(f64, &str, &str)> = ACETOPHENONE.to_vec();
    observed.extend_from_slice(diluent);
    observed.sort_by(|a, b| b.0.total_cmp(&a.0));
    let mut extra = format!("components:\n  - name: {name}\n    bands:\n");
    for (at, strength, shape) in diluent {
        let shape = if shape.is_empty() {
            String::new()
        } else {
            format!(", shape: {shape}")
        };
        extra.push_str(&format!(
            "      - {{ at: {at}, strength: {strength}{shape} }}\n"
        ));
    }
    run("C8H8O", "ATR", &observed, &extra)
}

#[test]
fn a_powder_cut_with_mannitol_gives_the_diluent_and_the_ketone() {
    // D-Mannitol, KBr: O-H 3395 and 3290 (broad), C-H 2947, 1420, C-O 1080 and 1020
    // (Pharmaceutical excipient monographs, sugar alcohols, common practice, from memory).
    let mannitol = [
        (3395.0, "strong", "broad"),
        (3290.0, "strong", "broad"),
        (2947.0, "medium", ""),
        (1420.0, "medium", ""),
        (1080.0, "strong", ""),
        (1020.0, "strong", ""),
    ];
    let o = mixture_case(&mannitol, "mannitol");
    let m = o.mixture.as_ref().expect("a mixture reading");
    let c = m.component.as_ref().expect("the component taken");
    assert_eq!(c.name, "mannitol");
    let mut attributed = c.attributed_bands.clone();
    attributed.sort_by(f64::total_cmp);
    assert_eq!(
        attributed,
        vec![1020.0, 1080.0, 1420.0, 2947.0, 3290.0, 3395.0]
    );
    assert_eq!(m.residual_bands.len(), ACETOPHENONE.len());
    assert_eq!(
        rank_of(
            &o,
            &groups(&[("aromatic_ring", 1), ("ketone_conjugated", 1)])
        ),
        Some(1)
    );
}

#[test]
fn a_powder_cut_with_lactose_monohydrate_gives_the_diluent_and_the_ketone() {
    // alpha-Lactose monohydrate, KBr: O-H 3525 (sharper, water of crystallisation) and
    // 3380 (broad), C-H 2900, water bend 1655, C-O 1090 and 1030, 895 (pharmaceutical
    // excipient references, common practice, from memory).
    let lactose = [
        (3525.0, "strong", ""),
        (3380.0, "strong", "broad"),
        (2900.0, "medium", ""),
        (1655.0, "weak", ""),
        (1090.0, "strong", ""),
        (1030.0, "strong", ""),
        (895.0, "medium", ""),
    ];
    let o = mixture_case(&lactose, "lactose monohydrate");
    let m = o.mixture.as_ref().expect("a mixture reading");
    assert!(m.component.is_some());
    assert_eq!(
        rank_of(
            &o,
            &groups(&[("aromatic_ring", 1), ("ketone_conjugated", 1)])
        ),
        Some(1)
    );
}

#[test]
fn a_conflict_names_a_mixture_with_the_bands_a_second_compound_must_explain() {
    // A saturated alcohol formula cannot hold a carbonyl: C=O 1716 from a second compound.
    let o = run(
        "C4H10O",
        "film",
        &[
            (3340.0, "strong", "broad"),
            (2960.0, "strong", ""),
            (1716.0, "strong", ""),
            (1465.0, "medium", ""),
            (1050.0, "strong", ""),
        ],
        "",
    );
    assert!(o.candidates.is_empty());
    let m = o.mixture.as_ref().expect("mixture considered");
    assert!(m.unexplained_bands.contains(&1716.0), "{m:?}");
    assert!(o.conflicts.iter().any(|c| c
        .suggested_causes
        .iter()
        .any(|s| s.contains("mixture") && s.contains("1716"))));
}

#[test]
fn a_plain_compound_gets_no_salt_and_no_mixture_section() {
    let o = run("C8H8O", "film", &ACETOPHENONE, "");
    assert!(o.salt.is_none());
    assert!(o.mixture.is_none());
}

#[test]
fn a_component_with_both_or_neither_source_is_an_error_with_its_place() {
    let text = "case: T\nformula: C8H8O\nir:\n  bands:\n    - { at: 1686, strength: strong }\ncomponents:\n  - name: diluent\n    spectrum: spectra/x.jdx\n    bands: [{ at: 1080, strength: strong }]\n  - name: other\n";
    let (case, d) = parse(text, "t.yaml");
    assert!(case.is_none());
    let messages: Vec<String> = d.iter().map(ToString::to_string).collect();
    assert!(
        messages.iter().any(|m| m.contains("t.yaml:7:")
            && m.contains("components[0]")
            && m.contains("exactly one of `spectrum` and `bands`")),
        "{messages:#?}"
    );
    assert!(
        messages.iter().any(|m| m.contains("components[1]")),
        "{messages:#?}"
    );
    // An unknown key in a component is refused like any other (deny_unknown_fields).
    let typo = "case: T\nformula: C8H8O\nir:\n  bands:\n    - { at: 1686, strength: strong }\ncomponents:\n  - name: d\n    band: []\n";
    let (case, d) = parse(typo, "t.yaml");
    assert!(case.is_none());
    assert!(d.iter().any(|m| m.to_string().contains("band")), "{d:?}");
}
