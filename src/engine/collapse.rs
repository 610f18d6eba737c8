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

use super::model::Problem;

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

/// The signature of a combination, from its per-band best explanation qualities (as
/// `score::score_noting` notes them, one per active band).
pub fn signature(problem: &Problem<'_>, counts: &[u32], band_quality: &[Option<f64>]) -> Signature {
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
    let bands = band_quality
        .iter()
        .map(|q| q.map(|q| super::score::round_half_away(q * 1000.0) as i64))
        .collect();
    Signature {
        fixed,
        seen_split,
        bands,
    }
}

/// The signature of a combination written as one flat key into `key` (a buffer reused
/// from one combination to the next): equal keys exactly when [`signature`]s are equal.
/// Each list is preceded by its length; each band is a (seen, quality) pair.
pub fn signature_key(
    problem: &Problem<'_>,
    counts: &[u32],
    band_quality: &[Option<f64>],
    key: &mut Vec<i64>,
) {
    key.clear();
    let fixed = |g: &usize| counts[*g] > 0 && !problem.split_group[*g];
    let seen_split = |g: &usize| {
        counts[*g] > 0 && problem.split_group[*g] && !problem.groups[*g].presence.matched.is_empty()
    };
    key.push((0..counts.len()).filter(fixed).count() as i64);
    for g in (0..counts.len()).filter(fixed) {
        key.extend([g as i64, i64::from(counts[g])]);
    }
    key.push((0..counts.len()).filter(seen_split).count() as i64);
    key.extend((0..counts.len()).filter(seen_split).map(|g| g as i64));
    for q in band_quality {
        match q {
            Some(q) => key.extend([1, super::score::round_half_away(q * 1000.0) as i64]),
            None => key.extend([0, 0]),
        }
    }
}

/// Collapses combinations (best first) by their signatures: each entry is the index of a
/// class's best member and the indices of the others, in rank order.
pub fn collapse(signatures: &[Signature]) -> Vec<(usize, Vec<usize>)> {
    let mut classes: Vec<(usize, Vec<usize>)> = Vec::new();
    // Signatures are hashed once per combination (thousands of them): a fast,
    // non-cryptographic hash suits keys the program builds itself.
    let mut index: foldhash::HashMap<&Signature, usize> = foldhash::HashMap::default();
    for (i, sig) in signatures.iter().enumerate() {
        match index.get(sig) {
            Some(&c) => classes[c].1.push(i),
            None => {
                index.insert(sig, classes.len());
                classes.push((i, Vec::new()));
            }
        }
    }
    classes
}
