//! Relations between groups: `excludes` (never together) and `requires_any` (a phenol
//! needs an aromatic ring). Parents count for their subtypes both ways.

use super::super::model::Problem;
use super::super::outcome::RelationFailure;

/// Checks the relations (`present`: the indices with a non-zero count); returns each
/// violation, typed (worded by `report::wording::relation`).
pub fn check(problem: &Problem<'_>, counts: &[u32], present: &[usize]) -> Vec<RelationFailure> {
    let mut out = Vec::new();
    for &i in present {
        let g = problem.groups[i].group;
        for &j in &problem.excludes[i] {
            if j > i && counts[j] > 0 {
                out.push(RelationFailure::Excludes {
                    group: g.id.clone(),
                    other: problem.groups[j].group.id.clone(),
                });
            }
        }
        if !g.requires_any.is_empty() && !problem.requires[i].iter().any(|&j| counts[j] > 0) {
            out.push(RelationFailure::RequiresAny {
                group: g.id.clone(),
                any_of: g.requires_any.clone(),
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::parse;
    use crate::engine::testkit::small_catalogue;
    use crate::engine::SolveOptions;
    use std::collections::BTreeSet;

    #[test]
    fn a_phenol_needs_an_aromatic_ring() {
        // common practice: a phenol is an O–H on an aromatic ring carbon.
        let (case, _) = parse("formula: C6H6O\n", "t.yaml");
        let case = case.unwrap_or_else(|| panic!("case"));
        let cat = small_catalogue();
        let problem = Problem::new(&case, &cat, &SolveOptions::default(), &BTreeSet::new());
        let idx = |id: &str| {
            problem
                .groups
                .iter()
                .position(|g| g.group.id == id)
                .unwrap_or_else(|| panic!("{id}"))
        };
        let mut counts = vec![0u32; problem.groups.len()];
        counts[idx("phenol")] = 1;
        let present = vec![idx("phenol")];
        assert_eq!(
            check(&problem, &counts, &present),
            vec![RelationFailure::RequiresAny {
                group: "phenol".to_owned(),
                any_of: vec!["aromatic_ring".to_owned()]
            }]
        );
        counts[idx("aromatic_ring")] = 1;
        let present = vec![idx("phenol"), idx("aromatic_ring")];
        assert!(check(&problem, &counts, &present).is_empty());
    }
}
