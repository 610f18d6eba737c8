//! Internal consistency of the structure generator: the group-restricted mode, which
//! builds structures from group fragments, must give exactly the plain-mode isomers whose
//! perceived groups equal the requested multiset; canonical augmentation alone must
//! produce no duplicate (apart from Kekulé forms of aromatic rings, merged afterwards);
//! every fully classified structure's DBE must equal the DBE its groups account for.

use quiddity::chem::Formula;
use quiddity::structure::{
    enumerate, for_each_structure, perceive, to_smiles, GroupCounts, GroupId,
};
use std::collections::BTreeMap;
use std::ops::ControlFlow;

/// Formulas whose plain enumeration is small enough for a debug-build test, covering
/// every element and most groups (carbonyls, amides, ureas, sulfur and phosphorus oxides,
/// halides, nitriles, benzene and pyridine rings, alkenes, alkynes, rings).
const FORMULAS: &[&str] = &[
    "C4H8O", "C3H6O2", "C4H6O", "C5H8", "C3H7NO", "C2H6OS", "C3H5Cl", "C2H4O2", "C4H8O2", "C4H9N",
    "C3H3N", "C3H4O2", "C6H6", "C2H3NO", "C2H5NO2", "CH4N2O", "C2H6O2S", "C2H3ClO", "C7H8",
    "C6H5Cl", "C5H5N", "C3H6S", "C4H6O2", "C3H9O4P",
];

#[test]
fn group_mode_equals_plain_mode_filtered_by_perception() {
    let mut multisets_checked = 0;
    for &f in FORMULAS {
        let formula = Formula::parse(f).expect("formula");
        let mut by_groups: BTreeMap<GroupCounts, Vec<String>> = BTreeMap::new();
        for s in enumerate(&formula, None, None).expect("plain").structures {
            let p = perceive(&s.molecule);
            if p.is_fully_classified() {
                by_groups.entry(p.groups).or_default().push(s.smiles);
            }
        }
        assert!(!by_groups.is_empty(), "{f}: no classified structure");
        for (groups, mut expected) in by_groups {
            expected.sort();
            let got: Vec<String> = enumerate(&formula, Some(&groups), None)
                .expect("group mode")
                .structures
                .into_iter()
                .map(|s| s.smiles)
                .collect();
            assert_eq!(got, expected, "{f} with {groups}");
            multisets_checked += 1;
        }
    }
    assert!(
        multisets_checked > 150,
        "only {multisets_checked} multisets"
    );
}

#[test]
fn canonical_augmentation_alone_produces_no_duplicates() {
    for f in [
        "C10H22", "C6H12", "C4H8O2", "C3H7NO", "C5H8", "C2H6O2S", "C3H9O4P",
    ] {
        let summary = for_each_structure(&Formula::parse(f).expect("formula"), None, |_| {
            ControlFlow::Continue(())
        })
        .expect("generation");
        assert!(summary.emitted > 0);
        assert_eq!(summary.duplicates_merged, 0, "{f}");
    }
    // Ortho-disubstituted benzene rings (o-xylene) come as two Kekulé forms that are not
    // isomorphic as labelled graphs; they are merged after aromatisation.
    let summary = for_each_structure(&Formula::parse("C8H10").expect("formula"), None, |_| {
        ControlFlow::Continue(())
    })
    .expect("generation");
    assert!(summary.duplicates_merged > 0);
}

#[test]
fn dbe_equals_the_dbe_the_groups_account_for() {
    // common practice: DBE = rings + π bonds; each group id carries its share
    // (GroupId::dbe). Fused aromatic rings share atoms and are left out.
    let mut checked = 0;
    for &f in FORMULAS {
        let formula = Formula::parse(f).expect("formula");
        let dbe = formula.dbe();
        for s in enumerate(&formula, None, None).expect("plain").structures {
            let p = perceive(&s.molecule);
            if !p.is_fully_classified() {
                continue;
            }
            let aromatic =
                p.groups.count(GroupId::AromaticRing) + p.groups.count(GroupId::PyridineRing);
            if aromatic > 1 {
                continue;
            }
            assert_eq!(
                f64::from(p.groups.dbe()),
                dbe,
                "{f}: {}",
                to_smiles(&s.molecule)
            );
            checked += 1;
        }
    }
    assert!(checked > 500, "only {checked} structures");
}
