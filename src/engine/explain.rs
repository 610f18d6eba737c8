//! Explanations: the per-candidate view (DBE and atom accounting, band table, supporting
//! and weakening evidence) and the ruled-out side (each excluded group with its decisive
//! evidence, families whose every member is excluded, near misses).

use super::constraints::{band_explanation, composition, dbe, diagnostic_bands, ms};
use super::evaluate::Failure;
use super::model::Problem;
use super::outcome::*;
use super::score::round3;
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

/// The full explanation of a consistent candidate: the band table, then the evidence for
/// and against each group present.
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
    let sp3_group = band_explanation::has_sp3_group(problem, counts);
    let mut weakening = Vec::new();
    let bands: Vec<BandAssignment> = (0..problem.bands.len())
        .map(|bi| band_assignment(problem, bi, counts, skeleton_c, sp3_group))
        .collect();
    for b in bands.iter().filter(|b| b.explained_by.is_empty()) {
        weakening.push(Reason {
            kind: ReasonKind::Unexplained,
            text: format!("{} band at {:.0} cm⁻¹ unexplained", b.strength, b.at),
            detail: None,
            rule: None,
            case: vec![CaseRef::Band {
                index: b.band_index,
            }],
        });
    }
    let mut supporting = Vec::new();
    for (g, &n) in problem.groups.iter().zip(counts) {
        if n == 0 {
            continue;
        }
        group_band_evidence(problem, g, &mut supporting, &mut weakening);
        if let Some(ms_e) = ms_evidence {
            supporting.extend(ms_clue_evidence(g.group, ms_e, molecular_nominal));
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

/// One observed band (index `bi` of the active band list) and what explains it in the
/// candidate `counts`, best first.
fn band_assignment(
    problem: &Problem<'_>,
    bi: usize,
    counts: &[u32],
    skeleton_c: u32,
    sp3_group: bool,
) -> BandAssignment {
    let (case_index, ob) = problem.bands[bi];
    let ex = &problem.explainers[bi];
    // Ids of the rules here that expect a sharp band, to say when a band labelled broad
    // was taken as one of them.
    let mut sharp_rules: Vec<&str> = Vec::new();
    let mut list =
        catalogue_explanations(problem, bi, counts, skeleton_c, sp3_group, &mut sharp_rules);
    list.sort_by(|a, b| b.quality.total_cmp(&a.quality));
    if list.is_empty() {
        list.extend(branch_explanation(
            problem, bi, counts, skeleton_c, sp3_group,
        ));
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
    BandAssignment {
        band_index: case_index,
        at: ob.band.at,
        strength: ob.band.strength.word().into(),
        shape: ob.band.shape.map(|s| s.word().into()),
        place: ob.place.display(),
        explained_by: list,
        demanded: ex.demanded,
        treatment,
    }
}

/// An explanation by the catalogue entry `cite`, labelled `label`, of quality `q`.
fn explanation(kind: ExplanationKind, cite: RuleCite, label: &str, q: f64) -> Explanation {
    Explanation {
        kind,
        id: cite.id.clone(),
        rule: label.to_owned(),
        defined_at: match (&cite.file, cite.line) {
            (Some(f), Some(l)) => format!("{f}:{l}"),
            _ => String::new(),
        },
        cite,
        quality: round3(q),
    }
}

/// The catalogue rules (group bands, patterns, skeleton, artefacts) that explain band
/// `bi` in the candidate, unsorted; pushes the ids of those expecting a sharp band.
fn catalogue_explanations<'p>(
    problem: &'p Problem<'_>,
    bi: usize,
    counts: &[u32],
    skeleton_c: u32,
    sp3_group: bool,
    sharp_rules: &mut Vec<&'p str>,
) -> Vec<Explanation> {
    let catalogue = problem.catalogue;
    let ex = &problem.explainers[bi];
    let mut list = Vec::new();
    for (g, r, q) in &ex.groups {
        if counts[*g] > 0 {
            let gd = problem.groups[*g].group;
            let rule = &gd.bands[*r];
            if rule.shape == ExpectedShape::Sharp {
                sharp_rules.push(&gd.id);
            }
            let cite = RuleCite::catalogue(RuleKind::GroupBand, &gd.id, Some(*r), &rule.defined_at);
            list.push(explanation(ExplanationKind::Group, cite, &rule.label, *q));
        }
    }
    for (p, gs, q) in &ex.patterns {
        if gs.iter().any(|&g| counts[g] > 0) {
            let pr = &catalogue.patterns[*p];
            let cite = RuleCite::catalogue(RuleKind::Pattern, &pr.id, None, &pr.defined_at);
            list.push(explanation(ExplanationKind::Pattern, cite, &pr.feature, *q));
        }
    }
    for (s, q) in &ex.skeleton {
        if band_explanation::skeleton_applies(problem, *s, counts, skeleton_c, sp3_group) {
            let sr = &catalogue.skeleton[*s];
            if sr.band.shape == ExpectedShape::Sharp || sr.band.shape == ExpectedShape::Any {
                // Skeleton rules are C–H stretches and bends: sharp by nature (common
                // practice), whatever shape the rule leaves open.
                sharp_rules.push(&sr.id);
            }
            let cite = RuleCite::catalogue(RuleKind::Skeleton, &sr.id, None, &sr.band.defined_at);
            list.push(explanation(
                ExplanationKind::Skeleton,
                cite,
                &sr.band.label,
                *q,
            ));
        }
    }
    for (a, q) in &ex.artefacts {
        let ar = &catalogue.artefacts[*a];
        let cite = RuleCite::catalogue(RuleKind::Artefact, &ar.id, None, &ar.defined_at);
        list.push(explanation(ExplanationKind::Artefact, cite, &ar.label, *q));
    }
    list
}

/// A vapour band no rule explains, taken as the rotational branch of its explained
/// neighbour (a rule of the engine, not of the catalogue).
fn branch_explanation(
    problem: &Problem<'_>,
    bi: usize,
    counts: &[u32],
    skeleton_c: u32,
    sp3_group: bool,
) -> Option<Explanation> {
    let j = problem.explainers[bi].branch_of?;
    let q = super::score::direct_explanation(problem, j, counts, skeleton_c, sp3_group)?;
    Some(Explanation {
        kind: ExplanationKind::Branch,
        id: BRANCH_RULE_ID.into(),
        rule: format!(
            "rotational branch of the {:.0} cm⁻¹ band",
            problem.bands[j].1.band.at
        ),
        defined_at: "src/engine/constraints/band_explanation.rs".into(),
        cite: RuleCite {
            kind: RuleKind::BuiltIn,
            id: BRANCH_RULE_ID.into(),
            index: None,
            file: None,
            line: None,
        },
        quality: round3(band_explanation::BRANCH_QUALITY * q),
    })
}

/// The id of the engine's one built-in band rule: a vapour rotational branch.
pub const BRANCH_RULE_ID: &str = "vapour_rotational_branch";

/// The band evidence of one group present: its rules met by observed bands (for), and
/// its bands allowed absent or strong supporting bands not seen (against).
fn group_band_evidence(
    problem: &Problem<'_>,
    g: &super::model::GroupData<'_>,
    supporting: &mut Vec<Reason>,
    weakening: &mut Vec<Reason>,
) {
    let id = &g.group.id;
    let cite = |r: usize| {
        Some(RuleCite::catalogue(
            RuleKind::GroupBand,
            id,
            Some(r),
            &g.group.bands[r].defined_at,
        ))
    };
    for m in &g.presence.matched {
        let rule = &g.group.bands[m.rule_idx];
        let (case_index, ob) = problem.bands[m.band_idx];
        supporting.push(Reason {
            kind: ReasonKind::BandSeen,
            text: format!(
                "{id}: {} {:.0}–{:.0} cm⁻¹ seen at {:.0} ({}; {})",
                rule.label,
                rule.range.lo,
                rule.range.hi,
                ob.band.at,
                ob.band.strength,
                at(&rule.defined_at)
            ),
            detail: None,
            rule: cite(m.rule_idx),
            case: vec![CaseRef::Band { index: case_index }],
        });
    }
    // A band rule of the group that no observed band meets rests on the band list.
    let not_seen = |kind, r: usize, text| Reason {
        kind,
        text,
        detail: None,
        rule: cite(r),
        case: vec![CaseRef::BandList],
    };
    for &r in &g.presence.absent_exceptions {
        let rule = &g.group.bands[r];
        let text = format!(
            "{id}: {} not seen (allowed absent by symmetry; {})",
            rule.label,
            at(&rule.defined_at)
        );
        weakening.push(not_seen(ReasonKind::AllowedAbsent, r, text));
    }
    for &r in &g.presence.missing_support {
        let rule = &g.group.bands[r];
        let text = format!(
            "{id}: strong {} {:.0}–{:.0} cm⁻¹ not seen ({})",
            rule.label,
            rule.range.lo,
            rule.range.hi,
            at(&rule.defined_at)
        );
        weakening.push(not_seen(ReasonKind::SupportMissing, r, text));
    }
}

/// The MS clues of `group` that an observed fragment meets, each with its clue and the
/// fragment (the words are `ms::matched_clues`', in the same order: clue order, hits
/// only).
fn ms_clue_evidence(
    group: &crate::rules::Group,
    ms_e: &MsEvidence,
    molecular_nominal: Option<f64>,
) -> Vec<Reason> {
    let clues: Vec<(&str, &crate::rules::MsClue)> =
        group.ms.iter().map(|c| (group.id.as_str(), c)).collect();
    let observed: Vec<crate::ms::ObservedFragment> = ms_e
        .fragments
        .iter()
        .map(|((mz, rel), _)| crate::ms::ObservedFragment {
            mz: *mz,
            relative_intensity: *rel,
        })
        .collect();
    let hits =
        crate::ms::match_fragments(&clues, molecular_nominal, &observed, ms::FRAGMENT_TOLERANCE);
    let texts = ms::matched_clues(group, ms_e, molecular_nominal);
    // The clues hit, in clue order: the same filter `matched_clues` applies, so the words
    // and the references pair one to one.
    let located = group.ms.iter().enumerate().filter_map(|(ci, clue)| {
        let hit = hits.iter().find(|m| std::ptr::eq(m.clue, clue))?;
        let fragment = observed.iter().position(|o| {
            o.mz == hit.observed.mz && o.relative_intensity == hit.observed.relative_intensity
        });
        Some((ci, clue, fragment))
    });
    texts
        .into_iter()
        .zip(located)
        .map(|(text, (ci, clue, fragment))| {
            let mut case: Vec<CaseRef> = fragment
                .map(|index| CaseRef::Fragment { index })
                .into_iter()
                .collect();
            if matches!(clue.kind, crate::rules::MsClueKind::Loss { .. }) {
                case.push(CaseRef::MolecularIon);
            }
            Reason {
                kind: ReasonKind::MsClueSeen,
                text: format!("{}: MS {text}", group.id),
                detail: None,
                rule: Some(RuleCite::catalogue(
                    RuleKind::GroupMs,
                    &group.id,
                    Some(ci),
                    &clue.defined_at,
                )),
                case,
            }
        })
        .collect()
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
                cite: Some(RuleCite::catalogue(
                    RuleKind::Group,
                    &g.group.id,
                    None,
                    &g.group.defined_at,
                )),
                case: vec![CaseRef::Formula],
            });
        } else if let Some(rules) = g.presence.missing.first() {
            excluded[gi] = true;
            out.push(missing_band(problem, g, rules[0]));
        } else if enumeration_complete {
            excluded[gi] = true;
            out.push(RuledOut {
                group: g.group.id.clone(),
                family: false,
                kind: RuleOutKind::NoConsistentCombination,
                reason: "no combination holding it meets all the evidence (see near misses)".into(),
                rule: None,
                evidence: Vec::new(),
                cite: None,
                case: Vec::new(),
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
            cite: Some(RuleCite::catalogue(
                RuleKind::Group,
                &parent.id,
                None,
                &parent.defined_at,
            )),
            case: Vec::new(),
        });
    }
    out
}

/// A group ruled out by a missing demanded band (rule `rule_idx` of the group), with the
/// nearest observed band for the analyst to check.
fn missing_band(
    problem: &Problem<'_>,
    g: &super::model::GroupData<'_>,
    rule_idx: usize,
) -> RuledOut {
    let rule = &g.group.bands[rule_idx];
    let nearest = problem.bands.iter().min_by(|(_, a), (_, b)| {
        (a.band.at - rule.range.centre())
            .abs()
            .total_cmp(&(b.band.at - rule.range.centre()).abs())
    });
    let mut evidence = vec!["ir.bands".to_owned()];
    let mut case = vec![CaseRef::BandList];
    if let Some((index, n)) = nearest {
        evidence.push(format!(
            "nearest observed band: {:.0} cm⁻¹ {} ({})",
            n.band.at,
            n.band.strength,
            n.place.display()
        ));
        case.push(CaseRef::Band { index: *index });
    }
    RuledOut {
        group: g.group.id.clone(),
        family: false,
        kind: RuleOutKind::MissingBand,
        reason: diagnostic_bands::describe_missing(rule, problem.technique, problem.tolerance),
        rule: Some(format!(
            "{}: {} ({})",
            g.group.id,
            rule.label,
            at(&rule.defined_at)
        )),
        evidence,
        cite: Some(RuleCite::catalogue(
            RuleKind::GroupBand,
            &g.group.id,
            Some(rule_idx),
            &rule.defined_at,
        )),
        case,
    }
}

/// The failures of a near miss, typed.
pub fn near_miss(problem: &Problem<'_>, counts: &[u32], failures: &[Failure]) -> NearMiss {
    NearMiss {
        groups: group_map(problem, counts),
        reasons: failures
            .iter()
            .map(|f| failure_reason(problem, f))
            .collect(),
    }
}

/// A built-in rule of the engine.
fn built_in(id: &str) -> RuleCite {
    RuleCite {
        kind: RuleKind::BuiltIn,
        id: id.to_owned(),
        index: None,
        file: None,
        line: None,
    }
}

/// One failure of a near miss, typed: its words (or typed statement), the rule and the
/// place in the case.
fn failure_reason(problem: &Problem<'_>, failure: &Failure) -> Reason {
    match failure {
        Failure::MissingBand { group, rules } => {
            let g = problem.groups[*group].group;
            let rule = &g.bands[rules[0]];
            let missing =
                diagnostic_bands::describe_missing(rule, problem.technique, problem.tolerance);
            Reason {
                kind: ReasonKind::MissingBand,
                text: format!("{}: {missing}", g.id),
                detail: None,
                rule: Some(RuleCite::catalogue(
                    RuleKind::GroupBand,
                    &g.id,
                    Some(rules[0]),
                    &rule.defined_at,
                )),
                case: vec![CaseRef::BandList],
            }
        }
        Failure::Relation(r) => {
            let rule = match r {
                RelationFailure::Excludes { group, .. }
                | RelationFailure::RequiresAny { group, .. } => problem
                    .catalogue
                    .group(group)
                    .map(|g| RuleCite::catalogue(RuleKind::Group, &g.id, None, &g.defined_at)),
                RelationFailure::SaltSites { .. } => Some(built_in(SALT_SITES_RULE_ID)),
            };
            Reason {
                kind: ReasonKind::Relation,
                text: String::new(),
                detail: Some(ReasonDetail::Relation(r.clone())),
                rule,
                case: Vec::new(),
            }
        }
        Failure::Unexplained(b) => Reason {
            kind: ReasonKind::Unexplained,
            text: band_explanation::describe_unexplained(&problem.bands[*b].1.band),
            detail: None,
            rule: None,
            case: vec![CaseRef::Band {
                index: problem.bands[*b].0,
            }],
        },
        Failure::Bonds(b) => Reason {
            kind: ReasonKind::Bonds,
            text: String::new(),
            detail: Some(ReasonDetail::Bonds(b.clone())),
            rule: Some(built_in(BOND_CONDITIONS_RULE_ID)),
            case: vec![CaseRef::Formula],
        },
    }
}
