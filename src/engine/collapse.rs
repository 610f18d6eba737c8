//! Collapsing candidates that the evidence cannot tell apart: combinations that differ
//! only in how hydrocarbon unsaturation is split between plain rings, C=C and C≡C, where
//! no observed band tells the splits apart, become one candidate listing the alternatives
//! (a C8H8O aryl ketone would otherwise list a dozen cyclic trienes beside the benzene
//! ring, each as "consistent" as the next).
//!
//! A group takes part in a split when it holds no heteroatom and consumes DBE (the
//! catalogue's plain `ring`, alkenes, alkynes, arenes). Two combinations collapse when
//! - they hold the same counts of every other group,
//! - the same split groups have a band of their own seen (a C=C stretch observed for
//!   one and not the other tells them apart), and
//! - every observed band has the same best explanation quality in both (or none).
//!
//! The best-scored combination of a class stands for it; the others are its alternatives.

use super::constraints::band_explanation::has_sp3_group;
use super::model::Problem;
use super::score::best_explanation;

/// True when concrete group `gi` is hydrocarbon unsaturation (no heteroatom, DBE > 0).
pub fn is_split_group(problem: &Problem<'_>, gi: usize) -> bool {
    let g = &problem.groups[gi];
    g.group.dbe > 0
        && g.hetero.is_empty()
        && g.foreign_element.is_none()
        && g.group.atoms.iter().all(|(s, _)| s == "C" || s == "H")
}

/// What the evidence sees of a combination; equal signatures collapse.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Signature {
    /// (group, count) of the groups present that take no part in a split.
    fixed: Vec<(u32, u32)>,
    /// Split groups present whose bands are seen.
    seen_split: Vec<usize>,
    /// Per active band, best explanation quality in thousandths (None: unexplained).
    bands: Vec<Option<i64>>,
}

/// The signature of a combination.
pub fn signature(problem: &Problem<'_>, counts: &[u32], skeleton_c: u32) -> Signature {
    let sp3_group = has_sp3_group(problem, counts);
    let fixed = counts
        .iter()
        .enumerate()
        .filter(|(g, &n)| n > 0 && !problem.split_group[*g])
        .map(|(g, &n)| (g as u32, n))
        .collect();
    let seen_split = (0..counts.len())
        .filter(|&g| counts[g] > 0 && problem.split_group[g])
        .filter(|&g| !problem.groups[g].presence.matched.is_empty())
        .collect();
    let bands = (0..problem.bands.len())
        .map(|bi| {
            best_explanation(problem, bi, counts, skeleton_c, sp3_group)
                .map(|q| (q * 1000.0).round() as i64)
        })
        .collect();
    Signature {
        fixed,
        seen_split,
        bands,
    }
}

/// Collapses `ranked` (best first) into classes: each entry is the index of the class's
/// best member and the indices of the others, in rank order.
pub fn collapse<T>(
    problem: &Problem<'_>,
    ranked: &[T],
    combination: impl Fn(&T) -> (&[u32], u32),
) -> Vec<(usize, Vec<usize>)> {
    let mut classes: Vec<(Signature, usize, Vec<usize>)> = Vec::new();
    let mut index: std::collections::HashMap<Signature, usize> = std::collections::HashMap::new();
    for (i, item) in ranked.iter().enumerate() {
        let (counts, sk) = combination(item);
        let sig = signature(problem, counts, sk);
        match index.get(&sig) {
            Some(&c) => classes[c].2.push(i),
            None => {
                index.insert(sig.clone(), classes.len());
                classes.push((sig, i, Vec::new()));
            }
        }
    }
    classes
        .into_iter()
        .map(|(_, best, rest)| (best, rest))
        .collect()
}
