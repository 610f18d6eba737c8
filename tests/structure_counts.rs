//! Isomer counts of the structure generator against published integer sequences and
//! facts of the trade. Constitutional isomers only: cis/trans and optical isomers are not
//! distinguished (but-2-ene counts once; 2-butanol counts once).

use quiddity::chem::Formula;
use quiddity::structure::{count_structures, enumerate, GroupCounts};

fn count(formula: &str) -> u64 {
    count_structures(&Formula::parse(formula).expect("formula"), None).expect("generation")
}

fn count_with(formula: &str, groups: &str) -> u64 {
    let g = GroupCounts::parse(groups).expect("groups");
    count_structures(&Formula::parse(formula).expect("formula"), Some(&g)).expect("generation")
}

fn smiles_with(formula: &str, groups: &str) -> Vec<String> {
    let g = GroupCounts::parse(groups).expect("groups");
    let e =
        enumerate(&Formula::parse(formula).expect("formula"), Some(&g), None).expect("generation");
    e.structures.into_iter().map(|s| s.smiles).collect()
}

#[test]
fn alkanes_match_oeis_a000602() {
    // OEIS A000602, number of n-node unrooted quartic trees = alkanes CnH2n+2 (n = 1..12):
    // 1, 1, 1, 2, 3, 5, 9, 18, 35, 75, 159, 355.
    let published = [1, 1, 1, 2, 3, 5, 9, 18, 35, 75, 159, 355];
    for (k, &expected) in published.iter().enumerate() {
        let n = k + 1;
        let formula = format!("C{n}H{}", 2 * n + 2);
        assert_eq!(count(&formula), expected, "{formula}");
    }
}

#[test]
fn alcohols_match_oeis_a000598() {
    // OEIS A000598, rooted quartic trees = alkyl radicals = alcohols CnH2n+1OH (n = 1..8):
    // 1, 1, 2, 4, 8, 17, 39, 89.
    let published = [1, 1, 2, 4, 8, 17, 39, 89];
    for (k, &expected) in published.iter().enumerate() {
        let n = k + 1;
        let formula = format!("C{n}H{}O", 2 * n + 2);
        assert_eq!(count_with(&formula, "alcohol:1"), expected, "{formula}");
    }
}

#[test]
fn small_formulas_have_their_textbook_isomer_counts() {
    // common practice: C4H10O has 7 constitutional isomers, 4 alcohols and 3 ethers.
    assert_eq!(count("C4H10O"), 7);
    assert_eq!(count_with("C4H10O", "alcohol:1"), 4);
    assert_eq!(count_with("C4H10O", "ether:1"), 3);
    // common practice: C4H8 has 5 (but-1-ene, but-2-ene, 2-methylpropene, cyclobutane,
    // methylcyclopropane), cis/trans but-2-ene counted once.
    assert_eq!(count("C4H8"), 5);
    // common practice: C5H10 has 10, 5 alkenes and 5 cycloalkanes.
    assert_eq!(count("C5H10"), 10);
    assert_eq!(count_with("C5H10", "alkene:1"), 5);
    assert_eq!(count_with("C5H10", "ring:1"), 5);
    // common practice: C2H6O is ethanol or dimethyl ether; C3H8O 3; C6H14 5.
    assert_eq!(count("C2H6O"), 2);
    assert_eq!(count("C3H8O"), 3);
    assert_eq!(count("C6H14"), 5);
}

#[test]
fn group_restricted_lists_are_the_expected_molecules() {
    // common practice: C8H8O with a ketone and a benzene ring is acetophenone only.
    assert_eq!(
        smiles_with("C8H8O", "ketone:1,aromatic_ring:1"),
        ["CC(=O)c1ccccc1"]
    );
    // common practice: C7H7Cl with a benzene ring: 2-, 3-, 4-chlorotoluene, benzyl chloride.
    assert_eq!(count_with("C7H7Cl", "aromatic_ring:1,chloro:1"), 4);
    // common practice: dichlorobenzenes: ortho, meta, para.
    assert_eq!(count_with("C6H4Cl2", "aromatic_ring:1,chloro:2"), 3);
    // common practice: xylenes (3) and ethylbenzene: C8H10 with one benzene ring.
    assert_eq!(count_with("C8H10", "aromatic_ring:1"), 4);
    // common practice: C3H6O2 esters: methyl acetate, ethyl formate.
    assert_eq!(count_with("C3H6O2", "ester:1"), 2);
    // common practice: C4H8O2 carboxylic acids: butanoic, 2-methylpropanoic.
    assert_eq!(count_with("C4H8O2", "carboxylic_acid:1"), 2);
    // common practice: nitrobenzene; benzonitrile; the three cresols.
    assert_eq!(
        smiles_with("C6H5NO2", "nitro:1,aromatic_ring:1"),
        ["[O-][N+](=O)c1ccccc1"]
    );
    assert_eq!(count_with("C7H5N", "nitrile:1,aromatic_ring:1"), 1);
    assert_eq!(count_with("C7H8O", "phenol:1,aromatic_ring:1"), 3);
    // common practice: C7H8O with a benzene ring: 3 cresols, benzyl alcohol, anisole.
    assert_eq!(count_with("C7H8O", "alcohol:1,aromatic_ring:1"), 1);
    assert_eq!(count_with("C7H8O", "ether:1,aromatic_ring:1"), 1);
}

#[test]
fn formula_and_groups_that_disagree_give_no_structure_and_a_reason() {
    let g = GroupCounts::parse("ketone:1").unwrap();
    let e = enumerate(&Formula::parse("C4H10O").unwrap(), Some(&g), None).unwrap();
    assert!(e.structures.is_empty());
    assert!(e.no_structure_reason.is_some());
    let g = GroupCounts::parse("alcohol:1").unwrap();
    let e = enumerate(&Formula::parse("C4H10O2").unwrap(), Some(&g), None).unwrap();
    assert!(e.no_structure_reason.unwrap().contains("every heteroatom"));
}
