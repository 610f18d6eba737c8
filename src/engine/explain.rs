//! Explanations: the per-candidate view (DBE and atom accounting, band table, supporting
//! and weakening evidence) and the ruled-out side (each excluded group with its decisive
//! evidence, families whose every member is excluded, near misses).

use super::constraints::{band_explanation, composition, dbe, diagnostic_bands, ms};
use super::evaluate::{describe, Failure};
use super::model::Problem;
use super::outcome::*;
use crate::case::MsEvidence;
use crate::rules::{ExpectedShape, RuleRef};
use std::collections::BTreeMap;

fn at(r: &RuleRef) -> String {
    format!("{}:{}", r.file, r.line)
}

/// Concrete group counts by id.
pub fn group_map(problem: &Problem<'_>, counts: &[u32]) -> BTreeMap<String, u32> {
    problem
        .groups
        .iter()
        .zip(counts)
        .filter(|(_, n)| **n > 0)
        .map(|(g, n)| (g.group.id.clone(), *n))
        .collect()
}

/// Counts rolled up to each group's id and every ancestor.
pub fn family_map(problem: &Problem<'_>, counts: &[u32]) -> BTreeMap<String, u32> {
    let mut out = BTreeMap::new();
    for (g, &n) in problem.groups.iter().zip(counts) {
        if n > 0 {
            for id in &g.lineage {
                *out.entry(id.clone()).or_insert(0) += n;
            }
        }
    }
    out
}

/// The full explanation of a consistent candidate.
#[allow(clippy::too_many_arguments)]
pub fn candidate(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    rank: usize,
    score: f64,
    score_terms: Vec<ScoreTerm>,
    ms_evidence: Option<&MsEvidence>,
    molecular_nominal: Option<f64>,
) -> Candidate {
    let catalogue = problem.catalogue;
    let mut bands = Vec::new();
    let mut weakening = Vec::new();
    let sp3_group = band_explanation::has_sp3_group(problem, counts);
    for (bi, (_, ob)) in problem.bands.iter().enumerate() {
        let ex = &problem.explainers[bi];
        let mut list: Vec<Explanation> = Vec::new();
        // Ids of the rules here that expect a sharp band, to say when a band labelled
        // broad was taken as one of them.
        let mut sharp_rules: Vec<&str> = Vec::new();
        for (g, r, q) in &ex.groups {
            if counts[*g] > 0 {
                let gd = problem.groups[*g].group;
                let rule = &gd.bands[*r];
                if rule.shape == crate::rules::ExpectedShape::Sharp {
                    sharp_rules.push(&gd.id);
                }
                list.push(Explanation {
                    kind: ExplanationKind::Group,
                    id: gd.id.clone(),
                    rule: rule.label.clone(),
                    defined_at: at(&rule.defined_at),
                    quality: round3(*q),
                });
            }
        }
        for (p, gs, q) in &ex.patterns {
            if gs.iter().any(|&g| counts[g] > 0) {
                let pr = &catalogue.patterns[*p];
                list.push(Explanation {
                    kind: ExplanationKind::Pattern,
                    id: pr.id.clone(),
                    rule: pr.feature.clone(),
                    defined_at: at(&pr.defined_at),
                    quality: round3(*q),
                });
            }
        }
        for (s, q) in &ex.skeleton {
            if band_explanation::skeleton_applies(problem, *s, counts, skeleton_c, sp3_group) {
                let sr = &catalogue.skeleton[*s];
                if sr.band.shape == crate::rules::ExpectedShape::Sharp
                    || sr.band.shape == crate::rules::ExpectedShape::Any
                {
                    // Skeleton rules are C–H stretches and bends: sharp by nature
                    // (common practice), whatever shape the rule leaves open.
                    sharp_rules.push(&sr.id);
                }
                list.push(Explanation {
                    kind: ExplanationKind::Skeleton,
                    id: sr.id.clone(),
                    rule: sr.band.label.clone(),
                    defined_at: at(&sr.band.defined_at),
                    quality: round3(*q),
                });
            }
        }
        for (a, q) in &ex.artefacts {
            let ar = &catalogue.artefacts[*a];
            list.push(Explanation {
                kind: ExplanationKind::Artefact,
                id: ar.id.clone(),
                rule: ar.label.clone(),
                defined_at: at(&ar.defined_at),
                quality: round3(*q),
            });
        }
        list.sort_by(|a, b| b.quality.total_cmp(&a.quality));
        if list.is_empty() {
            if let Some(j) = ex.branch_of {
                if let Some(q) =
                    super::score::direct_explanation(problem, j, counts, skeleton_c, sp3_group)
                {
                    list.push(Explanation {
                        kind: ExplanationKind::Branch,
                        id: "vapour_rotational_branch".into(),
                        rule: format!(
                            "rotational branch of the {:.0} cm⁻¹ band",
                            problem.bands[j].1.band.at
                        ),
                        defined_at: "src/engine/constraints/band_explanation.rs".into(),
                        quality: round3(band_explanation::BRANCH_QUALITY * q),
                    });
                }
            }
        }
        let treatment = match list.first() {
            // A branch whose neighbour is itself unexplained excuses nothing.
            None => band_explanation::treatment_of_unexplained(&ob.band, ex, None),
            Some(best) if best.kind == ExplanationKind::Branch => {
                band_explanation::treatment_of_unexplained(
                    &ob.band,
                    ex,
                    ex.branch_of.map(|j| &problem.bands[j].1.band),
                )
            }
            Some(best)
                if diagnostic_bands::broad_taken_as_sharp(&ob.band, ExpectedShape::Sharp)
                    && sharp_rules.contains(&best.id.as_str()) =>
            {
                Some(format!(
                    "{:.0}, labelled broad{}, taken as the {} envelope",
                    ob.band.at,
                    ob.band
                        .width
                        .map(|w| format!(" ({w:.0} cm⁻¹ wide)"))
                        .unwrap_or_default(),
                    best.rule
                ))
            }
            Some(_) => None,
        };
        if list.is_empty() {
            weakening.push(format!(
                "{} band at {:.0} cm⁻¹ unexplained",
                ob.band.strength, ob.band.at
            ));
        }
        bands.push(BandAssignment {
            at: ob.band.at,
            strength: ob.band.strength.word().into(),
            shape: ob.band.shape.map(|s| s.word().into()),
            place: ob.place.display(),
            explained_by: list,
            demanded: ex.demanded,
            treatment,
        });
    }
    let mut supporting = Vec::new();
    for (g, &n) in problem.groups.iter().zip(counts) {
        if n == 0 {
            continue;
        }
        for m in &g.presence.matched {
            let rule = &g.group.bands[m.rule_idx];
            let b = &problem.bands[m.band_idx].1.band;
            supporting.push(format!(
                "{}: {} {:.0}–{:.0} cm⁻¹ seen at {:.0} ({}; {})",
                g.group.id,
                rule.label,
                rule.range.lo,
                rule.range.hi,
                b.at,
                b.strength,
                at(&rule.defined_at)
            ));
        }
        for &r in &g.presence.absent_exceptions {
            let rule = &g.group.bands[r];
            weakening.push(format!(
                "{}: {} not seen (allowed absent by symmetry; {})",
                g.group.id,
                rule.label,
                at(&rule.defined_at)
            ));
        }
        for &r in &g.presence.missing_support {
            let rule = &g.group.bands[r];
            weakening.push(format!(
                "{}: strong {} {:.0}–{:.0} cm⁻¹ not seen ({})",
                g.group.id,
                rule.label,
                rule.range.lo,
                rule.range.hi,
                at(&rule.defined_at)
            ));
        }
        if let Some(ms_e) = ms_evidence {
            for clue in ms::matched_clues(g.group, ms_e, molecular_nominal) {
                supporting.push(format!("{}: MS {clue}", g.group.id));
            }
        }
    }
    Candidate {
        rank,
        formula: None,
        groups: group_map(problem, counts),
        alternatives: Vec::new(),
        families: family_map(problem, counts),
        score,
        score_terms,
        skeleton_carbons: skeleton_c,
        dbe_accounting: dbe::accounting(problem, counts),
        atom_accounting: composition::accounting(problem, counts, skeleton_c),
        bands,
        supporting,
        weakening,
        structures: None,
    }
}

fn round3(x: f64) -> f64 {
    (x * 1000.0).round() / 1000.0
}

/// Every concrete group that no candidate holds, with the decisive evidence, plus family
/// entries for abstract groups whose every member is ruled out.
pub fn ruled_out(
    problem: &Problem<'_>,
    in_some_candidate: &[bool],
    enumeration_complete: bool,
) -> Vec<RuledOut> {
    let mut out = Vec::new();
    let mut excluded = vec![false; problem.groups.len()];
    for (gi, g) in problem.groups.iter().enumerate() {
        if in_some_candidate[gi] {
            continue;
        }
        if let Some(reason) = composition::impossible(problem, gi) {
            excluded[gi] = true;
            out.push(RuledOut {
                group: g.group.id.clone(),
                family: false,
                kind: RuleOutKind::Composition,
                reason: format!("composition: {reason}"),
                rule: Some(format!("{} ({})", g.group.id, at(&g.group.defined_at))),
                evidence: vec!["formula".into()],
            });
        } else if let Some(rules) = g.presence.missing.first() {
            excluded[gi] = true;
            let rule = &g.group.bands[rules[0]];
            let nearest = problem.bands.iter().map(|(_, b)| b).min_by(|a, b| {
                (a.band.at - rule.range.centre())
                    .abs()
                    .total_cmp(&(b.band.at - rule.range.centre()).abs())
            });
            let mut evidence = vec!["ir.bands".to_owned()];
            if let Some(n) = nearest {
                evidence.push(format!(
                    "nearest observed band: {:.0} cm⁻¹ {} ({})",
                    n.band.at,
                    n.band.strength,
                    n.place.display()
                ));
            }
            out.push(RuledOut {
                group: g.group.id.clone(),
                family: false,
                kind: RuleOutKind::MissingBand,
                reason: diagnostic_bands::describe_missing(
                    rule,
                    problem.technique,
                    problem.tolerance,
                ),
                rule: Some(format!(
                    "{}: {} ({})",
                    g.group.id,
                    rule.label,
                    at(&rule.defined_at)
                )),
                evidence,
            });
        } else if enumeration_complete {
            excluded[gi] = true;
            out.push(RuledOut {
                group: g.group.id.clone(),
                family: false,
                kind: RuleOutKind::NoConsistentCombination,
                reason: "no combination holding it meets all the evidence (see near misses)".into(),
                rule: None,
                evidence: Vec::new(),
            });
        }
    }
    // Families: abstract groups all of whose concrete members are excluded.
    for parent in &problem.catalogue.groups {
        if !problem.catalogue.has_subtypes(&parent.id) {
            continue;
        }
        let members: Vec<usize> = (0..problem.groups.len())
            .filter(|&i| {
                problem.groups[i]
                    .lineage
                    .iter()
                    .skip(1)
                    .any(|l| *l == parent.id)
            })
            .collect();
        if members.is_empty() || !members.iter().all(|&i| excluded[i]) {
            continue;
        }
        let mut reasons: Vec<String> = members
            .iter()
            .filter_map(|&i| out.iter().find(|r| r.group == problem.groups[i].group.id))
            .map(|r| r.reason.clone())
            .collect();
        reasons.sort();
        reasons.dedup();
        let reason = if reasons.len() == 1 {
            format!("{}: every {} ruled out", reasons[0], parent.id)
        } else {
            format!(
                "every {} ruled out ({} members, see each)",
                parent.id,
                members.len()
            )
        };
        out.push(RuledOut {
            group: parent.id.clone(),
            family: true,
            kind: RuleOutKind::Family,
            reason,
            rule: None,
            evidence: Vec::new(),
        });
    }
    out
}

/// Words for the failures of a near miss.
pub fn near_miss(problem: &Problem<'_>, counts: &[u32], failures: &[Failure]) -> NearMiss {
    NearMiss {
        groups: group_map(problem, counts),
        lacked: failures.iter().map(|f| describe(problem, f)).collect(),
    }
}
