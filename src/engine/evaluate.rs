//! The per-candidate verdict: a composition from the enumeration is checked against the
//! relations, the band explanation and the bond conditions (presence was settled per
//! group before enumeration, or is re-checked here when excluded groups are let in to
//! find near misses).

use super::constraints::{band_explanation, bonds, ionic, relations};
use super::model::Problem;
use super::outcome::{BondFailure, RelationFailure};

/// One reason a combination fails.
#[derive(Clone, Debug, PartialEq)]
pub enum Failure {
    /// A group's demanded band (or `one_of` set) is missing.
    MissingBand {
        /// Concrete group index.
        group: usize,
        /// Rule indices of the set.
        rules: Vec<usize>,
    },
    /// A relation is violated.
    Relation(RelationFailure),
    /// An active band (index) is unexplained.
    Unexplained(usize),
    /// The bond conditions fail.
    Bonds(BondFailure),
}

/// Checks a combination; with `all` false, stops at the first failure.
pub fn evaluate(problem: &Problem<'_>, counts: &[u32], skeleton_c: u32, all: bool) -> Vec<Failure> {
    let present: Vec<usize> = (0..counts.len()).filter(|&g| counts[g] > 0).collect();
    evaluate_present(problem, counts, &present, skeleton_c, all)
}

/// True when a combination meets every constraint: `evaluate(.., false)` is empty. The
/// groups present go into `present` (a buffer reused from one combination to the next,
/// so that a consistent combination costs no allocation).
pub fn consistent(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    present: &mut Vec<usize>,
) -> bool {
    present.clear();
    present.extend((0..counts.len()).filter(|&g| counts[g] > 0));
    evaluate_present(problem, counts, present, skeleton_c, false).is_empty()
}

/// [`evaluate`] with the groups present (`counts` above zero, in index order) given.
fn evaluate_present(
    problem: &Problem<'_>,
    counts: &[u32],
    present: &[usize],
    skeleton_c: u32,
    all: bool,
) -> Vec<Failure> {
    let mut out = Vec::new();
    for &gi in present {
        {
            for rules in &problem.groups[gi].presence.missing {
                out.push(Failure::MissingBand {
                    group: gi,
                    rules: rules.clone(),
                });
                if !all {
                    return out;
                }
            }
        }
    }
    for r in relations::check(problem, counts, present)
        .into_iter()
        .chain(ionic::check(problem, counts))
    {
        out.push(Failure::Relation(r));
        if !all {
            return out;
        }
    }
    let (unexplained, needs) = band_explanation::check(problem, counts, skeleton_c);
    for b in unexplained {
        out.push(Failure::Unexplained(b));
        if !all {
            return out;
        }
    }
    if let Err(reason) = bonds::check(problem, counts, present, skeleton_c, &needs) {
        out.push(Failure::Bonds(reason));
    }
    out
}
