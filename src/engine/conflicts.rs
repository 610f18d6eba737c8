//! Conflicts: when no candidate survives, a minimal set of evidence items that cannot
//! hold together, found by a deletion filter: start from all items; for each item in
//! turn, set it aside for good if the rest is still inconsistent. What remains is
//! irreducible — dropping any one of its items makes the evidence consistent.
//!
//! Setting an item aside means not trusting it: without the formula there are no
//! composition or DBE constraints (any groups whose bands fit may be chosen); a band set
//! aside needs no explanation and its region becomes uncertain for presence; an MS item
//! set aside is not compared with the formula.

use super::model::{EvidenceItem, GroupData, Problem};
use super::{formula_checks, SolveOptions};
use crate::case::Case;
use crate::rules::Catalogue;
use std::collections::BTreeSet;

/// Every evidence item of the case, in a fixed order (formula, bands, MS).
pub fn all_items(case: &Case) -> Vec<EvidenceItem> {
    let mut items = Vec::new();
    if case.formula.is_some() {
        items.push(EvidenceItem::Formula);
    }
    for i in 0..case.ir.as_ref().map_or(0, |ir| ir.bands.len()) {
        items.push(EvidenceItem::Band(i));
    }
    if let Some(ms) = &case.ms {
        if ms.molecular_ion.is_some() {
            items.push(EvidenceItem::MolecularIon);
        }
        if ms.m_plus_2.is_some() {
            items.push(EvidenceItem::MPlus2);
        }
    }
    items
}

/// The answer of one consistency test.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Consistency {
    /// Some candidate meets every item not set aside.
    Consistent,
    /// Proven: no candidate meets them.
    Inconsistent,
    /// The test stopped at its limit before it could decide (the words say which limit).
    Undecided(String),
}

/// Whether some candidate meets every item not in `set_aside`.
pub fn consistent(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    set_aside: &BTreeSet<EvidenceItem>,
) -> Consistency {
    let problem = Problem::new(case, catalogue, options, set_aside);
    if problem.formula.is_none() {
        return free_composition_feasible(&problem);
    }
    if problem.formula_dbe.is_none() {
        return Consistency::Inconsistent;
    }
    if formula_checks(case, set_aside).iter().any(|c| !c.agrees) {
        return Consistency::Inconsistent;
    }
    let allowed = problem.allowed_groups();
    let mut answer = Consistency::Inconsistent;
    let mut leaves = 0u64;
    super::enumerate::walk_pruned(&problem, &allowed, |counts, skeleton_c| {
        leaves += 1;
        if leaves > CONSISTENCY_BUDGET {
            answer = Consistency::Undecided(format!(
                "a consistency test stopped after {CONSISTENCY_BUDGET} compositions"
            ));
            return super::enumerate::Flow::Stop;
        }
        if super::evaluate::evaluate(&problem, counts, skeleton_c, false).is_empty() {
            answer = Consistency::Consistent;
            super::enumerate::Flow::Stop
        } else {
            super::enumerate::Flow::Continue
        }
    });
    answer
}

/// Compositions one consistency test may examine before it stops undecided (the
/// deletion filter then keeps the item: the conflict stays true, perhaps not minimal,
/// and says so).
pub const CONSISTENCY_BUDGET: u64 = 200_000;

/// Search steps the free-composition test (no formula) may take before it stops
/// undecided. Its depth needs no limit: every step adds a group not yet chosen.
pub const FREE_SEARCH_BUDGET: u64 = 200_000;

/// Without a formula: can some set of allowed groups explain every demanded band while
/// respecting the relations? (Skeleton carbons can always be added, so `sp3_carbon`
/// holds.) A depth-first search over the bands' explainers, at most
/// [`FREE_SEARCH_BUDGET`] steps.
pub fn free_composition_feasible(problem: &Problem<'_>) -> Consistency {
    free_composition_feasible_within(problem, FREE_SEARCH_BUDGET)
}

/// [`free_composition_feasible`] with at most `budget` search steps.
pub fn free_composition_feasible_within(problem: &Problem<'_>, budget: u64) -> Consistency {
    let allowed: Vec<bool> = problem
        .groups
        .iter()
        .map(|g: &GroupData<'_>| g.presence.missing.is_empty())
        .collect();
    let mut chosen = vec![0u32; problem.groups.len()];
    let mut steps = budget;
    match search(problem, &allowed, &mut chosen, &mut steps) {
        Some(true) => Consistency::Consistent,
        Some(false) => Consistency::Inconsistent,
        None => Consistency::Undecided(format!(
            "a consistency test without the formula stopped after {budget} search steps"
        )),
    }
}

/// `Some(found)` when the search finished, `None` when it ran out of steps (`steps` left).
fn search(
    problem: &Problem<'_>,
    allowed: &[bool],
    chosen: &mut Vec<u32>,
    steps: &mut u64,
) -> Option<bool> {
    if *steps == 0 {
        return None;
    }
    *steps -= 1;
    // First band not yet explained (with sp3 skeleton assumed available).
    let pending = problem.explainers.iter().position(|ex| {
        ex.demanded
            && ex.artefacts.is_empty()
            && !ex.groups.iter().any(|(g, _, _)| chosen[*g] > 0)
            && !ex
                .patterns
                .iter()
                .any(|(_, gs, _)| gs.iter().any(|&g| chosen[g] > 0))
            && !ex.skeleton.iter().any(|(s, _)| {
                let (needs, sp3) = &problem.skeleton_needs[*s];
                *sp3 || needs.iter().any(|&g| chosen[g] > 0)
            })
    });
    let Some(bi) = pending else {
        // Every band explained: now the requirements of the chosen groups.
        let unmet = (0..chosen.len()).find(|&g| {
            chosen[g] > 0
                && !problem.groups[g].group.requires_any.is_empty()
                && !problem.requires[g].iter().any(|&j| chosen[j] > 0)
        });
        return match unmet {
            None => Some(true),
            Some(g) => try_each(problem, allowed, chosen, steps, problem.requires[g].clone()),
        };
    };
    let ex = &problem.explainers[bi];
    let mut options: Vec<usize> = ex.groups.iter().map(|(g, _, _)| *g).collect();
    for (_, gs, _) in &ex.patterns {
        options.extend(gs.iter().copied());
    }
    for (s, _) in &ex.skeleton {
        options.extend(problem.skeleton_needs[*s].0.iter().copied());
    }
    options.sort_unstable();
    options.dedup();
    try_each(problem, allowed, chosen, steps, options)
}

/// Adds each of `options` in turn (those allowed and clashing with nothing chosen) and
/// searches on: the first answer other than "not found" wins.
fn try_each(
    problem: &Problem<'_>,
    allowed: &[bool],
    chosen: &mut Vec<u32>,
    steps: &mut u64,
    options: Vec<usize>,
) -> Option<bool> {
    for g in options {
        let clash = problem.excludes[g].iter().any(|&j| chosen[j] > 0);
        if !allowed[g] || clash {
            continue;
        }
        chosen[g] += 1;
        let found = search(problem, allowed, chosen, steps);
        chosen[g] -= 1;
        if found != Some(false) {
            return found;
        }
    }
    Some(false)
}

/// A conflict found by the deletion filter, with the limits its tests stopped at.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ConflictSearch {
    /// The items that cannot hold together.
    pub items: Vec<EvidenceItem>,
    /// One sentence per test that stopped at its limit (empty when every test decided):
    /// the conflict then still holds, but may not be minimal.
    pub limits: Vec<String>,
}

/// The deletion filter: a minimal inconsistent subset of the case's evidence, or `None`
/// when the whole evidence is proven consistent. A test that stops undecided keeps its
/// item (the conflict stays true) and is named in [`ConflictSearch::limits`].
pub fn minimal_conflict(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
) -> Option<ConflictSearch> {
    let items = all_items(case);
    let mut limits = Vec::new();
    match consistent(case, catalogue, options, &BTreeSet::new()) {
        Consistency::Consistent => return None,
        Consistency::Inconsistent => {}
        Consistency::Undecided(why) => limits.push(format!("{why} on the whole evidence")),
    }
    let mut keep: Vec<EvidenceItem> = items.clone();
    for item in items {
        let trial: Vec<EvidenceItem> = keep.iter().copied().filter(|i| *i != item).collect();
        let set_aside: BTreeSet<EvidenceItem> = all_items(case)
            .into_iter()
            .filter(|i| !trial.contains(i))
            .collect();
        match consistent(case, catalogue, options, &set_aside) {
            Consistency::Inconsistent => keep = trial,
            Consistency::Consistent => {}
            Consistency::Undecided(why) => limits.push(format!(
                "{why} with {} set aside; it was kept",
                describe_item(case, item)
            )),
        }
    }
    Some(ConflictSearch {
        items: keep,
        limits,
    })
}

/// Words for an item, with its place.
pub fn describe_item(case: &Case, item: EvidenceItem) -> String {
    match item {
        EvidenceItem::Formula => case.formula.as_ref().map_or_else(
            || "formula".into(),
            |f| {
                let dbe = f
                    .composition
                    .dbe()
                    .map(|d| format!(", DBE {d}"))
                    .unwrap_or_default();
                format!("formula {}{dbe} ({})", f.composition, f.place.display())
            },
        ),
        EvidenceItem::Band(i) => case.ir.as_ref().and_then(|ir| ir.bands.get(i)).map_or_else(
            || format!("ir.bands[{i}]"),
            |b| {
                let shape = b.band.shape.map(|s| format!(" {s}")).unwrap_or_default();
                format!(
                    "band at {:.0} cm⁻¹, {}{shape} ({}, {})",
                    b.band.at,
                    b.band.strength,
                    b.place.key_path,
                    b.place.display()
                )
            },
        ),
        EvidenceItem::MolecularIon => case
            .ms
            .as_ref()
            .and_then(|m| {
                m.molecular_ion.as_ref().map(|(mz, p)| {
                    format!(
                        "molecular ion m/z {mz} as {} ({})",
                        m.ion.canonical(),
                        p.display()
                    )
                })
            })
            .unwrap_or_else(|| "molecular ion".into()),
        EvidenceItem::MPlus2 => case
            .ms
            .as_ref()
            .and_then(|m| {
                m.m_plus_2
                    .as_ref()
                    .map(|(v, p)| format!("M+2 at {v}% of M ({})", p.display()))
            })
            .unwrap_or_else(|| "M+2".into()),
    }
}

/// The usual causes worth checking for a conflict of these items.
pub fn suggested_causes(case: &Case, items: &[EvidenceItem]) -> Vec<String> {
    let mut out = Vec::new();
    let bands: Vec<&crate::case::ObservedBand> = items
        .iter()
        .filter_map(|i| match i {
            EvidenceItem::Band(b) => case.ir.as_ref().and_then(|ir| ir.bands.get(*b)),
            _ => None,
        })
        .collect();
    let has_formula = items.contains(&EvidenceItem::Formula);
    let has_ms = items
        .iter()
        .any(|i| matches!(i, EvidenceItem::MolecularIon | EvidenceItem::MPlus2));
    if has_formula {
        out.push(
            "wrong formula: re-check the elemental analysis or the molecular-ion assignment"
                .to_owned(),
        );
    }
    if bands.iter().any(|b| {
        (b.band.at >= 3200.0 && b.band.at <= 3600.0) || (b.band.at >= 1600.0 && b.band.at <= 1660.0)
    }) {
        out.push(
            "wet sample: water absorbs near 3400 (broad) and 1640 cm⁻¹; dry the sample or the KBr"
                .to_owned(),
        );
    }
    if !bands.is_empty() {
        out.push("mixture: bands of a second compound, a solvent or a reagent residue".to_owned());
        out.push(
            "miscalibrated wavenumber axis: check against a polystyrene film reference".to_owned(),
        );
    }
    if has_ms {
        out.push(
            "wrong ion type or mass calibration: check the adduct assignment and the lock mass"
                .to_owned(),
        );
    }
    out
}
