//! Structures for the best candidates: a candidate's groups are mapped onto the structure
//! generator's group ids, every constitutional isomer with exactly those groups is listed
//! when there are few enough, and the isomers are ranked by their IR features (ring
//! substitution pattern, alkene substitution, terminal or internal alkyne, carbonyl
//! conjugation, alcohol class) against the observed bands.
//!
//! Bounded on purpose: only small formulas and the first few candidates get structures,
//! and the generator stops one structure past the limit, so this step never dominates a
//! solve.

use super::{Outcome, RankedStructure, StructureSection};
use crate::case::Case;
use crate::chem::Formula;
use crate::ir::Band;
use crate::rules::Catalogue;
use crate::structure::{self, GroupCounts, GroupId};
use std::collections::BTreeMap;
use std::ops::ControlFlow;

/// Isomers listed at most per candidate; more than this and only the fact is reported.
pub const STRUCTURE_LIMIT: usize = 200;
/// Candidates (best first) that get a structures section.
pub const CANDIDATES_WITH_STRUCTURES: usize = 3;
/// Largest number of non-hydrogen atoms for which structures are generated in a solve.
pub const MAX_HEAVY_ATOMS_IN_SOLVE: u64 = 12;

/// The structure generator's group counts for a candidate's concrete groups: each group
/// maps to the nearest id in its lineage the generator knows; a group whose own DBE
/// exceeds that id's in the catalogue (a lactone is an ester plus its ring) adds the
/// difference as `ring`. `None` when some group has no counterpart.
pub fn generator_groups(
    catalogue: &Catalogue,
    groups: &BTreeMap<String, u32>,
) -> Option<GroupCounts> {
    let mut counts = GroupCounts::new();
    for (id, &n) in groups {
        let mut lineage = catalogue.lineage(id);
        // A salt form is built as its neutral parent (the free base or free acid).
        if let Some(parent) = catalogue.group(id).and_then(|g| g.salt_of.as_deref()) {
            lineage.extend(catalogue.lineage(parent));
        }
        let target = lineage.iter().find_map(|x| GroupId::from_id(x))?;
        counts.add(target, n);
        // Both DBE values are catalogue facts (the generator's own table is kept equal
        // to them by a test in `structure::groups`).
        let dbe_of = |x: &str| catalogue.group(x).map(|g| g.dbe);
        let (Some(own_dbe), Some(target_dbe)) = (dbe_of(id), dbe_of(target.id())) else {
            return None;
        };
        match own_dbe.checked_sub(target_dbe) {
            Some(extra) => counts.add(GroupId::Ring, extra * n),
            None => return None,
        }
    }
    Some(counts)
}

/// Adds a structures section to the first [`CANDIDATES_WITH_STRUCTURES`] candidates of
/// `outcome` (each candidate's own formula, or the case's).
pub fn attach(outcome: &mut Outcome, case: &Case, catalogue: &Catalogue, tolerance_cm1: f64) {
    let bands: Vec<Band> = case
        .ir
        .as_ref()
        .map(|ir| ir.bands.iter().map(|b| b.band.clone()).collect())
        .unwrap_or_default();
    // A salt's structures are those of its organic part (free base or free acid).
    let case_formula = match &outcome.salt {
        Some(s) => Formula::parse(&s.organic_formula).ok(),
        None => case.formula.as_ref().map(|f| f.formula.neutral()),
    };
    for candidate in outcome
        .candidates
        .iter_mut()
        .take(CANDIDATES_WITH_STRUCTURES)
    {
        let formula = match &candidate.formula {
            Some(text) => Formula::parse(text).ok(),
            None => case_formula.clone(),
        };
        let Some(formula) = formula else { continue };
        candidate.structures = Some(section(
            catalogue,
            &candidate.groups,
            &formula,
            &bands,
            tolerance_cm1,
        ));
    }
}

/// The structures section of one candidate.
fn section(
    catalogue: &Catalogue,
    groups: &BTreeMap<String, u32>,
    formula: &Formula,
    bands: &[Band],
    tolerance_cm1: f64,
) -> StructureSection {
    let note = |text: String| StructureSection {
        count: None,
        note: Some(text),
        ranked: Vec::new(),
    };
    let heavy = formula.n_atoms() - u64::from(formula.element_count("H"));
    if heavy > MAX_HEAVY_ATOMS_IN_SOLVE {
        return note(format!(
            "not generated: {heavy} non-hydrogen atoms (structures are listed up to {MAX_HEAVY_ATOMS_IN_SOLVE}; use `quiddity isomers`)"
        ));
    }
    let Some(counts) = generator_groups(catalogue, groups) else {
        return note("not generated: a group of this candidate has no structure template".into());
    };
    let mut found = Vec::new();
    let result = structure::for_each_structure(formula, Some(&counts), |molecule| {
        if found.len() > STRUCTURE_LIMIT {
            return ControlFlow::Break(());
        }
        found.push(structure::Structure::of(molecule));
        ControlFlow::Continue(())
    });
    match result {
        Err(e) => note(format!("not generated: {e}")),
        Ok(_) if found.len() > STRUCTURE_LIMIT => note(format!(
            "more than {STRUCTURE_LIMIT} isomers: not listed (use `quiddity isomers --count`)"
        )),
        Ok(summary) => {
            let count = found.len();
            let ranked = structure::rank_by_bands(found, bands, tolerance_cm1, &catalogue.patterns)
                .into_iter()
                .map(|(s, score)| RankedStructure {
                    smiles: s.smiles,
                    score: score.score,
                    checks: score.checks.into_iter().map(|c| c.explanation).collect(),
                })
                .collect();
            StructureSection {
                count: Some(count),
                note: summary.no_structure_reason,
                ranked,
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::{solve, SolveOptions};
    use crate::rules::embedded_catalogue;

    #[test]
    fn subtypes_map_to_their_family_and_cyclic_variants_add_their_ring() {
        let catalogue = embedded_catalogue().expect("shipped catalogue loads");
        let groups = BTreeMap::from([("alcohol_primary".to_owned(), 1)]);
        let counts = generator_groups(&catalogue, &groups).expect("alcohol maps");
        assert_eq!(counts.count(GroupId::Alcohol), 1);
        assert_eq!(counts.count(GroupId::Ring), 0);
        let lactone = catalogue
            .groups
            .iter()
            .find(|g| {
                g.ring_closures > 0
                    && catalogue.is_a(&g.id, "ester")
                    && !catalogue.has_subtypes(&g.id)
            })
            .expect("a concrete ester that closes a ring (a lactone)");
        let groups = BTreeMap::from([(lactone.id.clone(), 1)]);
        let counts = generator_groups(&catalogue, &groups).expect("lactone maps");
        assert_eq!(counts.count(GroupId::Ester), 1);
        assert_eq!(counts.count(GroupId::Ring), 1);
    }

    /// Butan-1-ol and its isomers (common practice: C4H10O has 4 alcohols and 3 ethers).
    #[test]
    fn a_small_alcohol_case_lists_the_four_butanols() {
        let src = "
case: T-STRUCT-1
formula: C4H10O
ir:
  technique: film
  bands:
    - { at: 3330, strength: strong, shape: broad }
    - { at: 2960, strength: strong }
    - { at: 2930, strength: strong }
    - { at: 2875, strength: medium }
    - { at: 1465, strength: medium }
    - { at: 1380, strength: medium }
    - { at: 1050, strength: strong }
";
        let (case, diagnostics) = crate::case::parse(src, "t.yaml");
        let case = case.unwrap_or_else(|| panic!("{diagnostics:?}"));
        let catalogue = embedded_catalogue().expect("shipped catalogue loads");
        let mut outcome = solve(&case, &catalogue, &SolveOptions::default());
        attach(&mut outcome, &case, &catalogue, 15.0);
        let mut all = std::collections::BTreeSet::new();
        for c in outcome.candidates.iter().take(CANDIDATES_WITH_STRUCTURES) {
            let s = c.structures.as_ref().expect("section attached");
            assert!(s.note.is_none(), "{:?}", s.note);
            for r in &s.ranked {
                all.insert(r.smiles.clone());
            }
        }
        assert_eq!(all.len(), 4, "{all:?}");
    }
}
