//! The combined verdict: library hits (from [`crate::library`]) checked against the case's
//! formula, its mass-spectrum evidence and the deduction's outcome, read only. A hit that
//! contradicts any of them is shown as such, never as an answer: a library match without a
//! consistency check is a classic misidentification (common practice).
//!
//! Checks per hit, each `agrees`, `contradicts` or `not checked` with its words:
//!
//! - **formula**: the reference's formula against the case's (Hill order, neutral); with
//!   no stated formula, against the formulas the molecular ion allows.
//! - **molecular ion, M+2**: the engine's own formula-level MS checks
//!   ([`crate::engine::formula_checks`]) run on the reference's formula.
//! - **groups** (when the reference names catalogue group ids): a group the deduction
//!   ruled out contradicts; the same combination as a consistent candidate agrees; with
//!   the formula agreeing and the candidate list complete, any other combination
//!   contradicts the deduction.
//! - **phase**: a reference of the other (or an unstated) phase is a caution.

use crate::case::{Case, StatedFormula};
use crate::chem::Formula;
use crate::engine::EvidenceKind;
use crate::engine::Outcome;
use crate::library::search::RegionAgreement;
use crate::library::{Entry, Hit, LibraryIndex, Phase, SearchOutcome};
use crate::rules::Technique;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet};

/// The caution every library result carries.
pub const LIBRARY_CAUTION: &str = "a library match is a lead, not an identification: confirm it with a reference standard measured under the laboratory's validated method";

/// Similarity at or above which a hit is called a close match (our choice: files of one
/// compound from two sources scored 0.91–1.00 on the measured corpus, different compounds
/// at most 0.92).
pub const CLOSE_AT: f64 = 0.95;
/// Similarity at or above which a hit is called similar.
pub const SIMILAR_AT: f64 = 0.85;

/// The words for a similarity.
pub fn quality(score: f64) -> &'static str {
    if score >= CLOSE_AT {
        "close match"
    } else if score >= SIMILAR_AT {
        "similar"
    } else {
        "weak match"
    }
}

/// How one check came out.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CheckStatus {
    /// Consistent.
    Agrees,
    /// Inconsistent: the hit cannot be the unknown as the evidence stands.
    Contradicts,
    /// Not decidable (the reference lacks the data, or a caution).
    NotChecked,
}

impl CheckStatus {
    /// The words reports use.
    pub fn words(self) -> &'static str {
        match self {
            CheckStatus::Agrees => "agrees",
            CheckStatus::Contradicts => "CONTRADICTS",
            CheckStatus::NotChecked => "not checked",
        }
    }
}

/// One check of one hit.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct HitCheck {
    /// What was checked: `formula`, `molecular_ion`, `M+2`, `groups`, `phase`.
    pub item: String,
    /// The result.
    pub status: CheckStatus,
    /// In words.
    pub detail: String,
}

/// A hit with its checks.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CheckedHit {
    /// 1-based rank by similarity.
    pub rank: usize,
    /// Similarity (see `library::search`).
    pub similarity: f64,
    /// `close match`, `similar` or `weak match`.
    pub quality: String,
    /// The reference file, relative to the library folder.
    pub file: String,
    /// The reference's name.
    pub name: String,
    /// Its formula, when stated.
    pub formula: Option<String>,
    /// Its phase.
    pub phase: String,
    /// Groups the reference names (catalogue ids).
    #[serde(skip_serializing_if = "BTreeMap::is_empty")]
    pub groups: BTreeMap<String, u32>,
    /// The range compared, cm⁻¹.
    pub compared_cm1: (f64, f64),
    /// Region by region.
    pub regions: Vec<RegionAgreement>,
    /// The checks.
    pub checks: Vec<HitCheck>,
    /// True when any check contradicts.
    pub contradicts: bool,
    /// In words: how the hit stands against the case.
    pub standing: String,
}

/// The library part of a report.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LibraryVerdict {
    /// The library folder as the case names it.
    pub library: String,
    /// The library's digest.
    pub digest: String,
    /// References in the library.
    pub n_references: usize,
    /// References compared.
    pub n_compared: usize,
    /// The unknown's phase.
    pub phase: String,
    /// What was compared and what was left out, in words.
    pub notes: Vec<String>,
    /// The hits, best similarity first.
    pub hits: Vec<CheckedHit>,
    /// Rank of the best hit that contradicts nothing.
    pub best_consistent: Option<usize>,
    /// The verdict in one sentence.
    pub summary: String,
    /// The caution.
    pub caution: String,
}

/// The phase of a case's IR evidence: gas is vapour, every other technique condensed.
pub fn case_phase(case: &Case) -> Phase {
    match case.ir.as_ref().and_then(|ir| ir.technique) {
        Some(Technique::Gas) => Phase::Vapour,
        Some(_) => Phase::Condensed,
        None => Phase::Unknown,
    }
}

/// What a search compared and left out, in words.
pub fn comparison_notes(o: &SearchOutcome) -> Vec<String> {
    let mut out = Vec::new();
    if o.query_phase == Phase::Unknown {
        out.push(
            "the unknown's phase is not stated: references of every phase were compared (state the technique to keep vapour and condensed spectra apart)"
                .to_owned(),
        );
    }
    if o.n_other_phase > 0 {
        let other = if o.query_phase == Phase::Vapour {
            "condensed"
        } else {
            "vapour"
        };
        out.push(format!(
            "{} {other}-phase reference(s) not compared with this {} spectrum: band positions and shapes differ between phases",
            o.n_other_phase,
            o.query_phase.word()
        ));
    }
    if o.n_unknown_phase > 0 {
        out.push(format!(
            "{} reference(s) of unstated phase compared (their hits say so)",
            o.n_unknown_phase
        ));
    }
    if o.n_too_little_overlap > 0 {
        out.push(format!(
            "{} reference(s) not compared: they share less than 1000 cm⁻¹ or half of the unknown's range",
            o.n_too_little_overlap
        ));
    }
    out
}

fn check_formula(case: &Case, outcome: &Outcome, entry: &Entry) -> Option<HitCheck> {
    let check = |status, detail: String| {
        Some(HitCheck {
            item: "formula".to_owned(),
            status,
            detail,
        })
    };
    let Some(hit) = &entry.meta.formula else {
        return check(
            CheckStatus::NotChecked,
            "the reference states no formula".to_owned(),
        );
    };
    if let Some(f) = &case.formula {
        let stated = f.formula.neutral().to_string();
        return if *hit == stated {
            check(CheckStatus::Agrees, format!("{hit}, as stated in the case"))
        } else {
            check(
                CheckStatus::Contradicts,
                format!("the reference is {hit}, the case states {stated}"),
            )
        };
    }
    if outcome.formula_leads.is_empty() {
        return None;
    }
    match outcome.formula_leads.iter().find(|l| l.formula == *hit) {
        Some(l) => check(
            CheckStatus::Agrees,
            format!("{hit} is formula lead #{} of the molecular ion", l.rank),
        ),
        None => check(
            CheckStatus::Contradicts,
            format!(
                "{hit} is not among the {} formulas the molecular ion allows",
                outcome.formula_leads.len()
            ),
        ),
    }
}

fn check_ms(case: &Case, entry: &Entry) -> Vec<HitCheck> {
    let (Some(text), Some(_)) = (&entry.meta.formula, &case.ms) else {
        return Vec::new();
    };
    let Ok(formula) = Formula::parse(text) else {
        return Vec::new();
    };
    let mut trial = case.clone();
    trial.formula = Some(StatedFormula {
        parts: crate::case::formula_parts(text),
        text: text.clone(),
        composition: formula.composition(),
        formula,
        place: case
            .formula
            .as_ref()
            .map(|f| f.place.clone())
            .unwrap_or_else(|| crate::case::Place {
                origin: entry.path.clone(),
                position: None,
                key_path: "formula".to_owned(),
            }),
    });
    crate::engine::formula_checks(&trial, &BTreeSet::new())
        .into_iter()
        .filter(|c| matches!(c.item, EvidenceKind::MolecularIon | EvidenceKind::MPlus2))
        .map(|c| HitCheck {
            item: c.item.word().to_owned(),
            status: if c.agrees {
                CheckStatus::Agrees
            } else {
                CheckStatus::Contradicts
            },
            detail: c.detail,
        })
        .collect()
}

fn check_groups(
    outcome: &Outcome,
    entry: &Entry,
    formula_agrees: Option<bool>,
) -> Option<HitCheck> {
    let groups = &entry.meta.groups;
    let check = |status, detail: String| {
        Some(HitCheck {
            item: "groups".to_owned(),
            status,
            detail,
        })
    };
    if groups.is_empty() {
        return check(
            CheckStatus::NotChecked,
            "the reference names no groups: not compared with the deduction".to_owned(),
        );
    }
    let text = crate::engine::group_counts_notation(groups);
    // A group ruled out by the band evidence contradicts whatever the formula; one ruled
    // out by the composition only when the formulas agree (else the formula check says it).
    let ruled: Vec<String> = groups
        .keys()
        .filter_map(|id| outcome.ruled_out.iter().find(|r| r.group == *id))
        .filter(|r| {
            formula_agrees != Some(false) || r.kind != crate::engine::RuleOutKind::Composition
        })
        .map(|r| format!("{} ({})", r.group, r.reason))
        .collect();
    if !ruled.is_empty() {
        return check(
            CheckStatus::Contradicts,
            format!(
                "the reference holds {text}; the deduction ruled out {}",
                ruled.join("; ")
            ),
        );
    }
    if formula_agrees == Some(false) {
        return check(
            CheckStatus::NotChecked,
            format!("the reference holds {text}; not compared with the candidates (other formula)"),
        );
    }
    if let Some(c) = outcome.candidates.iter().find(|c| &c.groups == groups) {
        return check(
            CheckStatus::Agrees,
            format!("{text} is the deduction's candidate #{}", c.rank),
        );
    }
    if outcome.list_truncated || outcome.enumeration_truncated {
        return check(
            CheckStatus::NotChecked,
            format!("{text} is not among the listed candidates (the list is cut)"),
        );
    }
    check(
        CheckStatus::Contradicts,
        format!(
            "{text} is not among the {} consistent candidates",
            outcome.n_consistent
        ),
    )
}

fn check_hit(case: &Case, outcome: &Outcome, entry: &Entry, hit: &Hit) -> Vec<HitCheck> {
    let mut checks = Vec::new();
    let formula = check_formula(case, outcome, entry);
    let formula_agrees = formula.as_ref().and_then(|c| match c.status {
        CheckStatus::Agrees => Some(true),
        CheckStatus::Contradicts => Some(false),
        CheckStatus::NotChecked => None,
    });
    checks.extend(formula);
    checks.extend(check_ms(case, entry));
    checks.extend(check_groups(outcome, entry, formula_agrees));
    if let Some(note) = &hit.phase_note {
        checks.push(HitCheck {
            item: "phase".to_owned(),
            status: CheckStatus::NotChecked,
            detail: note.clone(),
        });
    }
    checks
}

fn standing(checks: &[HitCheck]) -> String {
    let against: Vec<&str> = checks
        .iter()
        .filter(|c| c.status == CheckStatus::Contradicts)
        .map(|c| c.item.as_str())
        .collect();
    if !against.is_empty() {
        return format!(
            "contradicts the case ({}): not an answer",
            against.join(", ")
        );
    }
    let agreed: Vec<&str> = checks
        .iter()
        .filter(|c| c.status == CheckStatus::Agrees)
        .map(|c| c.item.as_str())
        .collect();
    if agreed.is_empty() {
        "nothing to check it against: a spectral lead only".to_owned()
    } else {
        format!("consistent with the case ({})", agreed.join(", "))
    }
}

/// Checks every hit of `search` against the case and the outcome.
pub fn check_hits(
    case: &Case,
    outcome: &Outcome,
    library: &str,
    index: &LibraryIndex,
    search: &SearchOutcome,
) -> LibraryVerdict {
    let hits: Vec<CheckedHit> = search
        .hits
        .iter()
        .map(|h| {
            let e = &index.entries()[h.entry];
            let checks = check_hit(case, outcome, e, h);
            let contradicts = checks.iter().any(|c| c.status == CheckStatus::Contradicts);
            CheckedHit {
                rank: h.rank,
                similarity: h.score,
                quality: quality(h.score).to_owned(),
                file: e.path.clone(),
                name: e.meta.name.clone(),
                formula: e.meta.formula.clone(),
                phase: e.meta.phase().word().to_owned(),
                groups: e.meta.groups.clone(),
                compared_cm1: h.compared_cm1,
                regions: h.regions.clone(),
                standing: standing(&checks),
                checks,
                contradicts,
            }
        })
        .collect();
    let best_consistent = hits.iter().find(|h| !h.contradicts).map(|h| h.rank);
    let summary = summary(&hits, best_consistent, search);
    LibraryVerdict {
        library: library.to_owned(),
        digest: index.digest(),
        n_references: search.n_references,
        n_compared: search.n_compared,
        phase: search.query_phase.word().to_owned(),
        notes: comparison_notes(search),
        hits,
        best_consistent,
        summary,
        caution: LIBRARY_CAUTION.to_owned(),
    }
}

/// A verdict with no search (the case has no spectrum file to compare).
pub fn not_searched(library: &str, index: &LibraryIndex, why: &str) -> LibraryVerdict {
    LibraryVerdict {
        library: library.to_owned(),
        digest: index.digest(),
        n_references: index.len(),
        n_compared: 0,
        phase: Phase::Unknown.word().to_owned(),
        notes: vec![why.to_owned()],
        hits: Vec::new(),
        best_consistent: None,
        summary: format!("no library search: {why}"),
        caution: LIBRARY_CAUTION.to_owned(),
    }
}

fn summary(hits: &[CheckedHit], best_consistent: Option<usize>, search: &SearchOutcome) -> String {
    let Some(best) = hits.first() else {
        return if search.n_other_phase > 0 {
            format!(
                "no reference compared: the library's {} reference(s) of the other phase were left out",
                search.n_other_phase
            )
        } else {
            "no reference could be compared".to_owned()
        };
    };
    let describe = |h: &CheckedHit| {
        format!(
            "{} ({}, similarity {:.3}, {})",
            h.name, h.file, h.similarity, h.quality
        )
    };
    if !best.contradicts {
        return format!("the best match, {}, is {}", describe(best), best.standing);
    }
    let mut s = format!("the best match, {}, {}", describe(best), best.standing);
    match best_consistent.and_then(|r| hits.iter().find(|h| h.rank == r)) {
        Some(h) => s.push_str(&format!(
            "; the best match consistent with the case is #{} {}",
            h.rank,
            describe(h)
        )),
        None => s.push_str(&format!(
            "; none of the {} hits shown is consistent with the case",
            hits.len()
        )),
    }
    s
}
