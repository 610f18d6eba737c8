//! Structures: from a formula (and optionally a functional-group multiset) to every
//! constitutional isomer, each exactly once, as canonical SMILES with the structure-level
//! features the IR catalogue can check.
//!
//! Entry points: [`enumerate`] (a sorted list, capped), [`count_structures`] (a count),
//! [`for_each_structure`] (streaming) and [`score_features`] (features against bands).
//! Isomers are constitutional: cis/trans and optical isomers are not told apart. See
//! docs/structures.md for the method, the group definitions and the checks
//! against outside sources.

pub mod aromatic;
pub mod canon;
pub mod features;
pub mod generate;
pub mod groups;
pub mod molecule;
pub mod perceive;
pub mod smiles;

pub use features::{features, score_features, FeatureScore, StructureFeatures};
pub use generate::{
    count_structures, for_each_structure, for_each_structure_within, StructureError, Summary,
    BYTES_PER_STRUCTURE_SEEN, MAX_HEAVY_ATOMS,
};
pub use groups::{GroupCounts, GroupId, GroupsError};
pub use molecule::{Atom, Bond, Element, Molecule};
pub use perceive::{perceive, Perception};
pub use smiles::{parse_smiles, to_smiles, SmilesError};

use crate::budget::{infallible, Meter, Unmetered};
use crate::chem::Formula;
use crate::ir::Band;
use crate::rules::PatternRule;
use std::ops::ControlFlow;

/// One generated structure with what the report needs.
#[derive(Clone, Debug, serde::Serialize)]
pub struct Structure {
    /// Canonical SMILES (aromatic rings lower case).
    pub smiles: String,
    /// Perceived groups (`ring` included).
    pub groups: GroupCounts,
    /// Structure-level IR features.
    pub features: StructureFeatures,
    /// The molecular graph (aromatised).
    #[serde(skip)]
    pub molecule: Molecule,
}

impl Structure {
    /// Describes an aromatised molecule.
    pub fn of(molecule: Molecule) -> Structure {
        Structure {
            smiles: to_smiles(&molecule),
            groups: perceive(&molecule).groups,
            features: features(&molecule),
            molecule,
        }
    }

    /// Scores the structure's features against observed bands (tolerance in cm⁻¹), ring
    /// and alkene patterns from the catalogue's `patterns`.
    pub fn score(&self, bands: &[Band], tolerance: f64, patterns: &[PatternRule]) -> FeatureScore {
        score_features(&self.features, bands, tolerance, patterns)
    }
}

/// The result of [`enumerate`].
#[derive(Clone, Debug)]
pub struct Enumeration {
    /// The structures, sorted by SMILES.
    pub structures: Vec<Structure>,
    /// True when more structures exist than the cap let through.
    pub truncated: bool,
    /// Why no structure can exist, when formula and groups disagree.
    pub no_structure_reason: Option<String>,
}

/// Every structure of `formula` (with exactly the groups `groups`, when given), at most
/// `max` of them, sorted by SMILES. See [`for_each_structure`] for the rules.
pub fn enumerate(
    formula: &Formula,
    groups: Option<&GroupCounts>,
    max: Option<usize>,
) -> Result<Enumeration, StructureError> {
    enumerate_within(formula, groups, max, &mut Unmetered, &mut |_| {}).map(infallible)
}

/// [`enumerate`] under a meter (see [`for_each_structure_within`]), calling `progress`
/// with the number found so far after each structure. The outer error is a bad request;
/// the inner one is the meter's stop.
pub fn enumerate_within<M: Meter>(
    formula: &Formula,
    groups: Option<&GroupCounts>,
    max: Option<usize>,
    meter: &mut M,
    progress: &mut dyn FnMut(usize),
) -> Result<Result<Enumeration, M::Stop>, StructureError> {
    let mut structures = Vec::new();
    let mut truncated = false;
    let summary = for_each_structure_within(formula, groups, meter, |m| {
        if max.is_some_and(|cap| structures.len() >= cap) {
            truncated = true;
            return ControlFlow::Break(());
        }
        structures.push(Structure::of(m));
        progress(structures.len());
        ControlFlow::Continue(())
    })?;
    Ok(summary.map(|summary| {
        structures.sort_by(|a, b| a.smiles.cmp(&b.smiles));
        Enumeration {
            structures,
            truncated,
            no_structure_reason: summary.no_structure_reason,
        }
    }))
}

/// Structures ranked best first by the score of their features against `bands`
/// (tolerance in cm⁻¹; ring and alkene patterns from the catalogue's `patterns`); equal
/// scores keep their order (SMILES order from [`enumerate`]).
pub fn rank_by_bands(
    structures: Vec<Structure>,
    bands: &[Band],
    tolerance: f64,
    patterns: &[PatternRule],
) -> Vec<(Structure, FeatureScore)> {
    let mut ranked: Vec<(Structure, FeatureScore)> = structures
        .into_iter()
        .map(|s| {
            let score = s.score(bands, tolerance, patterns);
            (s, score)
        })
        .collect();
    ranked.sort_by(|a, b| b.1.score.total_cmp(&a.1.score));
    ranked
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ir::Strength;
    use features::RingPattern;

    #[test]
    fn bands_rank_the_para_conjugated_ketones_first() {
        // invented band list of an unknown C10H12O: conjugated C=O near 1685 and a strong
        // band near 820 (para-disubstituted ring).
        let bands = [
            Band {
                at: 1685.0,
                strength: Strength::Strong,
                shape: None,
                width: None,
            },
            Band {
                at: 820.0,
                strength: Strength::Strong,
                shape: None,
                width: None,
            },
        ];
        let formula = Formula::parse("C10H12O").expect("formula");
        let groups = GroupCounts::parse("ketone:1,aromatic_ring:1").expect("groups");
        let e = enumerate(&formula, Some(&groups), None).expect("enumerate");
        let catalogue = crate::rules::embedded_catalogue().expect("shipped catalogue");
        let ranked = rank_by_bands(e.structures, &bands, 10.0, &catalogue.patterns);
        let best: Vec<&str> = ranked
            .iter()
            .filter(|(_, score)| score.score == 2.0)
            .map(|(s, _)| s.smiles.as_str())
            .collect();
        // Both para aryl ketones fit both bands; so do rings whose pattern also bends
        // near 820 (1,2,4- and 1,3,5-trisubstituted); ortho, meta and mono rings do not.
        assert!(best.contains(&"CCC(=O)c1ccc(C)cc1") && best.contains(&"CCc1ccc(cc1)C(C)=O"));
        for (s, score) in &ranked {
            let ring = s.features.rings[0];
            if score.score == 2.0 {
                assert!(
                    matches!(
                        ring,
                        RingPattern::Para | RingPattern::Tri124 | RingPattern::Tri135
                    ),
                    "{}",
                    s.smiles
                );
            }
            if matches!(
                ring,
                RingPattern::Ortho | RingPattern::Meta | RingPattern::Mono
            ) {
                assert!(score.score < 2.0, "{}", s.smiles);
            }
        }
    }
}
