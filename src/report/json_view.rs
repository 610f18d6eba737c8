//! The one JSON contract: the document `solve --json` prints and `--report x.json`
//! writes, byte for byte the same. Its own view types, kept apart from the engine's
//! `Outcome` so that an engine change cannot change the contract unnoticed; every field
//! is documented in docs/json-output.md (a test walks the demo cases' documents against
//! that page).
//!
//! Every reason is typed: the catalogue rule it rests on (`RuleCite`: kind, id, index
//! within the group, file and line) and the places in the case (`PlaceRef`), which index
//! into this document's own `evidence` section, so a reader can resolve them without the
//! case file.

use super::view::{round, ConclusionView, FormulaFacts, Provenance};
use crate::case::{Case, Review, Sample};
use crate::engine::{
    self, CaseRef, CheckKind, ConflictWhy, EvidenceItem, EvidenceKind, ExplanationKind, Outcome,
    Reason, ReasonKind, RuleCite, RuleOutKind,
};
use serde::Serialize;
use std::collections::BTreeMap;

/// The name of the contract, the document's `schema` field.
pub const SCHEMA: &str = "quiddity-solve";

/// The version of the contract, the document's `schema_version` field.
///
/// Bump it when a field is removed, renamed or changes type or meaning; adding an
/// optional field (or a new value of an enumerated word that readers are told to expect)
/// does not bump it. docs/json-output.md keeps the history.
pub const SCHEMA_VERSION: u32 = 2;

/// The whole document.
#[derive(Clone, Debug, Serialize)]
pub struct JsonView {
    /// Always [`SCHEMA`].
    pub schema: &'static str,
    /// Always [`SCHEMA_VERSION`].
    pub schema_version: u32,
    /// Case identifier.
    pub case: Option<String>,
    /// Case title.
    pub title: Option<String>,
    /// Sample metadata.
    pub sample: Sample,
    /// Free notes.
    pub notes: Option<String>,
    /// The analyst's conclusion and how it stands against the outcome.
    pub conclusion: Option<ConclusionView>,
    /// The review block.
    pub review: Option<Review>,
    /// The formula solved, Hill order (none when the case states none).
    pub formula: Option<String>,
    /// Masses and DBE of the stated formula.
    pub formula_facts: Option<FormulaFacts>,
    /// The places of the case that references point into.
    pub evidence: CaseEvidence,
    /// Formula-level checks (MS agreement).
    pub evidence_checks: Vec<EvidenceCheckJson>,
    /// Formulas proposed from the molecular ion when the case states none.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub formula_leads: Vec<engine::FormulaLead>,
    /// A salt or hydrate formula: the organic part deduced and what else it holds.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub salt: Option<engine::salt::SaltOutcome>,
    /// One compound could not explain the spectrum: the two-component reading.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mixture: Option<engine::mixture::MixtureOutcome>,
    /// How many consistent candidates were found (indistinguishable splits counted once).
    pub n_consistent: usize,
    /// How many consistent group combinations were found before collapsing.
    pub n_combinations: usize,
    /// True when the enumeration limit stopped the search.
    pub enumeration_truncated: bool,
    /// True when fewer candidates are listed than were found.
    pub list_truncated: bool,
    /// Candidates, best first.
    pub candidates: Vec<CandidateJson>,
    /// Groups ruled out and why.
    pub ruled_out: Vec<RuledOutJson>,
    /// Combinations that failed on one point only.
    pub near_misses: Vec<NearMissJson>,
    /// Minimal sets of evidence that cannot hold together.
    pub conflicts: Vec<ConflictJson>,
    /// Observations that would separate the leading candidates.
    pub discriminating_checks: Vec<DiscriminatingCheckJson>,
    /// The cautions that go with every result.
    pub cautions: Vec<CautionJson>,
    /// Where the document came from.
    pub provenance: Provenance,
    /// The reference-library search and its hits checked against the case.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub library: Option<crate::verdict::LibraryVerdict>,
}

/// The evidence of the case as the engine read it: what `PlaceRef`s point to.
#[derive(Clone, Debug, Serialize)]
pub struct CaseEvidence {
    /// The case file's origin name.
    pub origin: String,
    /// The stated formula (`case: {kind: formula}`).
    pub formula: Option<PlacedText>,
    /// The stated molecular ion (`molecular_ion`).
    pub molecular_ion: Option<PlacedValue>,
    /// The stated M+1 percentage of M (`m_plus_1`).
    pub m_plus_1: Option<PlacedValue>,
    /// The stated M+2 percentage of M (`m_plus_2`).
    pub m_plus_2: Option<PlacedValue>,
    /// The stated fragments, by index (`fragment`).
    pub fragments: Vec<FragmentJson>,
    /// IR technique word, when stated.
    pub ir_technique: Option<String>,
    /// IR window `[low, high]`, cm⁻¹.
    pub ir_window: Option<(f64, f64)>,
    /// The spectrum file, as written in the case.
    pub spectrum_file: Option<String>,
    /// What reading and picking the spectrum assumed.
    pub spectrum_notes: Vec<String>,
    /// The band list, written and picked, by index (`band`; `band_list` is all of it).
    pub bands: Vec<BandJson>,
    /// When a known component of a mixture was subtracted: the residual band list the
    /// candidates were solved against, by index (`residual_band`); empty otherwise.
    pub residual_bands: Vec<ResidualBandJson>,
}

/// One band of the residual band list (a mixture with a known component subtracted).
#[derive(Clone, Debug, Serialize)]
pub struct ResidualBandJson {
    /// Index in the residual band list.
    pub index: usize,
    /// Position, cm⁻¹.
    pub at: f64,
    /// Strength word.
    pub strength: String,
    /// Shape word, when known.
    pub shape: Option<String>,
    /// Where it came from: a place of the case, or the residual trace.
    pub place: String,
    /// The same band in `bands`, when it is one of the case's own (none for a band picked
    /// from the residual trace).
    pub case_band: Option<usize>,
}

/// A place in the case (or in the residual band list) a statement rests on; indices point
/// into this document's `evidence` section.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum PlaceRef {
    /// The stated formula (`evidence.formula`).
    Formula,
    /// A band of `evidence.bands`.
    Band {
        /// Index into `evidence.bands`.
        index: usize,
    },
    /// A band of `evidence.residual_bands`.
    ResidualBand {
        /// Index into `evidence.residual_bands`.
        index: usize,
    },
    /// The band list the candidates were solved against, as a whole.
    BandList,
    /// The stated molecular ion.
    MolecularIon,
    /// The stated M+1 percentage.
    #[serde(rename = "m_plus_1")]
    MPlus1,
    /// The stated M+2 percentage.
    #[serde(rename = "m_plus_2")]
    MPlus2,
    /// A fragment of `evidence.fragments`.
    Fragment {
        /// Index into `evidence.fragments`.
        index: usize,
    },
}

/// One statement about a candidate: its kind, words, rule and places.
#[derive(Clone, Debug, Serialize)]
pub struct ReasonJson {
    /// What it says, by kind.
    pub kind: ReasonKind,
    /// The sentence.
    pub text: String,
    /// The catalogue rule it rests on (none for an unexplained band, a relation or the
    /// bond conditions).
    pub rule: Option<RuleCite>,
    /// The places in the case.
    pub case: Vec<PlaceRef>,
}

/// A text of the case with its place.
#[derive(Clone, Debug, Serialize)]
pub struct PlacedText {
    /// As written.
    pub written: String,
    /// `file:line:col`.
    pub place: String,
}

/// A number of the case with its place.
#[derive(Clone, Debug, Serialize)]
pub struct PlacedValue {
    /// The value.
    pub value: f64,
    /// `file:line:col`.
    pub place: String,
}

/// One fragment ion of the case.
#[derive(Clone, Debug, Serialize)]
pub struct FragmentJson {
    /// Index in the case's fragment list.
    pub index: usize,
    /// m/z.
    pub mz: f64,
    /// Intensity relative to the base peak (100).
    pub relative: f64,
    /// `file:line:col`.
    pub place: String,
}

/// One band of the case's band list.
#[derive(Clone, Debug, Serialize)]
pub struct BandJson {
    /// Index in the band list.
    pub index: usize,
    /// Position, cm⁻¹.
    pub at: f64,
    /// Strength word.
    pub strength: String,
    /// Shape word, when known.
    pub shape: Option<String>,
    /// `written` in the case file, or `picked` from the spectrum file.
    pub source: &'static str,
    /// `file:line:col` (a picked band: the spectrum file).
    pub place: String,
}

/// A formula-level check.
#[derive(Clone, Debug, Serialize)]
pub struct EvidenceCheckJson {
    /// The item checked.
    pub item: PlaceRef,
    /// Whether it agrees with the formula.
    pub agrees: bool,
    /// What was compared, in words.
    pub detail: String,
}

/// One candidate.
#[derive(Clone, Debug, Serialize)]
pub struct CandidateJson {
    /// 1-based rank.
    pub rank: usize,
    /// The candidate's formula when the case stated none.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub formula: Option<String>,
    /// Concrete group counts.
    pub groups: BTreeMap<String, u32>,
    /// The same in words (prefixed with the formula when it came from the molecular ion).
    pub groups_text: String,
    /// Other splits of the hydrocarbon unsaturation no band tells apart.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub alternatives: Vec<BTreeMap<String, u32>>,
    /// Counts rolled up to every ancestor family.
    pub families: BTreeMap<String, u32>,
    /// Evidence score, 4 decimals.
    pub score: f64,
    /// The score's terms.
    pub score_terms: Vec<engine::ScoreTerm>,
    /// Skeleton (sp3) carbons.
    pub skeleton_carbons: u32,
    /// DBE accounting in words.
    pub dbe_accounting: String,
    /// Atom accounting, one line per element.
    pub atom_accounting: Vec<String>,
    /// Each observed band and what explains it.
    pub bands: Vec<BandAssignmentJson>,
    /// Evidence in favour.
    pub supporting: Vec<ReasonJson>,
    /// Evidence against that did not rule it out.
    pub weakening: Vec<ReasonJson>,
    /// Constitutional isomers with these groups, when few enough to list.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub structures: Option<engine::StructureSection>,
}

/// One observed band in a candidate.
#[derive(Clone, Debug, Serialize)]
pub struct BandAssignmentJson {
    /// The band (`band`, or `residual_band` for a mixture with a component subtracted).
    pub case: PlaceRef,
    /// Position, cm⁻¹.
    pub at: f64,
    /// True when the band had to be explained.
    pub demanded: bool,
    /// Explanations, best first; empty when unexplained.
    pub explained_by: Vec<ExplanationJson>,
    /// How a band that was excused or reshaped was taken, in words.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub treatment: Option<String>,
}

/// One explanation of a band.
#[derive(Clone, Debug, Serialize)]
pub struct ExplanationJson {
    /// What kind of rule explains it.
    pub kind: ExplanationKind,
    /// The rule's label.
    pub label: String,
    /// Match quality in [0, 1].
    pub quality: f64,
    /// The rule.
    pub rule: RuleCite,
}

/// A group that no candidate holds.
#[derive(Clone, Debug, Serialize)]
pub struct RuledOutJson {
    /// Group id.
    pub group: String,
    /// True for a family whose every member is ruled out.
    pub family: bool,
    /// Why, by kind.
    pub kind: RuleOutKind,
    /// Why, in words.
    pub reason: String,
    /// The rule behind the decision, when one rule decided.
    pub rule: Option<RuleCite>,
    /// The places in the case the decision rests on.
    pub case: Vec<PlaceRef>,
}

/// A combination that failed on one point only.
#[derive(Clone, Debug, Serialize)]
pub struct NearMissJson {
    /// Concrete group counts.
    pub groups: BTreeMap<String, u32>,
    /// What it lacked.
    pub lacked: Vec<ReasonJson>,
}

/// Evidence that cannot hold together.
#[derive(Clone, Debug, Serialize)]
pub struct ConflictJson {
    /// The items.
    pub items: Vec<ConflictItemJson>,
    /// Why they cannot hold together.
    pub explanation: Vec<ConflictExplanationJson>,
    /// Usual causes to check.
    pub suggested_causes: Vec<String>,
    /// Tests of the conflict search that stopped at their limit (the set may then not be
    /// minimal).
    pub search_limits: Vec<String>,
}

/// One statement of why a conflict's items cannot hold together.
#[derive(Clone, Debug, Serialize)]
pub struct ConflictExplanationJson {
    /// What it says, by kind.
    pub kind: ConflictWhy,
    /// The sentence.
    pub text: String,
    /// The places in the case it is about.
    pub case: Vec<PlaceRef>,
    /// The catalogue rules it rests on.
    pub rules: Vec<RuleCite>,
}

/// One item of a conflict.
#[derive(Clone, Debug, Serialize)]
pub struct ConflictItemJson {
    /// The item in words, with its place.
    pub text: String,
    /// The item.
    pub case: PlaceRef,
}

/// An observation that would separate two candidates.
#[derive(Clone, Debug, Serialize)]
pub struct DiscriminatingCheckJson {
    /// Ranks compared.
    pub between: [usize; 2],
    /// What to look for.
    pub observation: String,
    /// Rank whose group predicts it.
    pub favours: usize,
    /// Kind of observation.
    pub kind: CheckKind,
    /// The catalogue entry that predicts it.
    pub rule: RuleCite,
}

/// What a caution asks, by kind.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CautionKind {
    /// A result is a screening lead, not an identification.
    ScreeningLead,
    /// Confirm with a reference standard under the laboratory's validated method.
    ConfirmWithReference,
    /// Combine independent techniques.
    IndependentTechniques,
    /// Treat the unknown as hazardous.
    TreatAsHazardous,
    /// Local regulations and licensed practice prevail.
    LocalRegulations,
}

/// The kinds of `engine::CAUTIONS`, in its order (the array length ties them together).
const CAUTION_KINDS: [CautionKind; engine::CAUTIONS.len()] = [
    CautionKind::ScreeningLead,
    CautionKind::ConfirmWithReference,
    CautionKind::IndependentTechniques,
    CautionKind::TreatAsHazardous,
    CautionKind::LocalRegulations,
];

/// One caution.
#[derive(Clone, Debug, Serialize)]
pub struct CautionJson {
    /// What it asks.
    pub kind: CautionKind,
    /// In words.
    pub text: &'static str,
}

/// How the engine's references read in this document.
struct Placer {
    /// The case states a formula (otherwise the formula solved came from the molecular
    /// ion, and references to it point there).
    formula_stated: bool,
    /// Band indices are those of the residual band list (a mixture with a known
    /// component subtracted).
    residual: bool,
}

impl Placer {
    fn new(case: &Case, outcome: &Outcome) -> Placer {
        Placer {
            formula_stated: case.formula.is_some(),
            residual: outcome
                .mixture
                .as_ref()
                .is_some_and(|m| m.component.is_some()),
        }
    }

    fn place(&self, r: CaseRef) -> PlaceRef {
        match r {
            CaseRef::Formula if self.formula_stated => PlaceRef::Formula,
            CaseRef::Formula => PlaceRef::MolecularIon,
            CaseRef::Band { index } if self.residual => PlaceRef::ResidualBand { index },
            CaseRef::Band { index } => PlaceRef::Band { index },
            CaseRef::BandList => PlaceRef::BandList,
            CaseRef::MolecularIon => PlaceRef::MolecularIon,
            CaseRef::MPlus1 => PlaceRef::MPlus1,
            CaseRef::MPlus2 => PlaceRef::MPlus2,
            CaseRef::Fragment { index } => PlaceRef::Fragment { index },
        }
    }

    fn places(&self, list: &[CaseRef]) -> Vec<PlaceRef> {
        list.iter().map(|r| self.place(*r)).collect()
    }

    fn reasons(&self, list: &[Reason]) -> Vec<ReasonJson> {
        list.iter()
            .map(|r| ReasonJson {
                kind: r.kind,
                text: super::wording::reason(r),
                rule: r.rule.clone(),
                case: self.places(&r.case),
            })
            .collect()
    }

    /// The place of a conflict's evidence item.
    fn item(&self, item: EvidenceItem) -> PlaceRef {
        self.place(match item {
            EvidenceItem::Formula => CaseRef::Formula,
            EvidenceItem::Band(index) => CaseRef::Band { index },
            EvidenceItem::MolecularIon => CaseRef::MolecularIon,
            EvidenceItem::MPlus2 => CaseRef::MPlus2,
        })
    }

    /// The place of a formula-level evidence kind.
    fn evidence_kind(&self, kind: EvidenceKind) -> PlaceRef {
        self.place(match kind {
            EvidenceKind::MolecularIon => CaseRef::MolecularIon,
            EvidenceKind::MPlus1 => CaseRef::MPlus1,
            EvidenceKind::MPlus2 => CaseRef::MPlus2,
        })
    }
}

/// The residual band list the candidates were solved against, when a known component
/// was subtracted (every candidate lists the same bands; empty otherwise).
fn residual_bands(case: &Case, outcome: &Outcome, placer: &Placer) -> Vec<ResidualBandJson> {
    let Some(first) = outcome.candidates.first().filter(|_| placer.residual) else {
        return Vec::new();
    };
    let own = |place: &str, at: f64| {
        case.ir
            .iter()
            .flat_map(|ir| ir.bands.iter())
            .position(|b| b.band.at == at && b.place.display() == place)
    };
    first
        .bands
        .iter()
        .map(|b| ResidualBandJson {
            index: b.band_index,
            at: b.at,
            strength: b.strength.clone(),
            shape: b.shape.clone(),
            place: b.place.clone(),
            case_band: own(&b.place, b.at),
        })
        .collect()
}

/// The case's evidence, by the indices references use.
fn case_evidence(case: &Case, residual_bands: Vec<ResidualBandJson>) -> CaseEvidence {
    let ms = case.ms.as_ref();
    let placed = |v: &Option<(f64, crate::case::Place)>| {
        v.as_ref().map(|(value, place)| PlacedValue {
            value: *value,
            place: place.display(),
        })
    };
    let spectrum = case.ir.as_ref().and_then(|ir| ir.spectrum.as_ref());
    CaseEvidence {
        origin: case.origin.clone(),
        formula: case.formula.as_ref().map(|f| PlacedText {
            written: f.text.clone(),
            place: f.place.display(),
        }),
        molecular_ion: ms.and_then(|m| placed(&m.molecular_ion)),
        m_plus_1: ms.and_then(|m| placed(&m.m_plus_1)),
        m_plus_2: ms.and_then(|m| placed(&m.m_plus_2)),
        fragments: ms
            .iter()
            .flat_map(|m| m.fragments.iter().enumerate())
            .map(|(index, ((mz, relative), place))| FragmentJson {
                index,
                mz: *mz,
                relative: *relative,
                place: place.display(),
            })
            .collect(),
        ir_technique: case
            .ir
            .as_ref()
            .and_then(|ir| ir.technique.map(|t| t.word().to_owned())),
        ir_window: case.ir.as_ref().map(|ir| ir.window),
        spectrum_file: spectrum.map(|s| s.written.clone()),
        spectrum_notes: spectrum.map(|s| s.notes.clone()).unwrap_or_default(),
        bands: case
            .ir
            .iter()
            .flat_map(|ir| ir.bands.iter().enumerate())
            .map(|(index, b)| BandJson {
                index,
                at: b.band.at,
                strength: b.band.strength.word().to_owned(),
                shape: b.band.shape.map(|s| s.word().to_owned()),
                source: if spectrum.is_some_and(|s| s.origin == b.place.origin) {
                    "picked"
                } else {
                    "written"
                },
                place: b.place.display(),
            })
            .collect(),
        residual_bands,
    }
}

/// One candidate of the outcome.
fn candidate(c: &engine::Candidate, placer: &Placer) -> CandidateJson {
    CandidateJson {
        rank: c.rank,
        formula: c.formula.clone(),
        groups: c.groups.clone(),
        groups_text: super::wording::candidate_text(c),
        alternatives: c.alternatives.clone(),
        families: c.families.clone(),
        score: round(c.score, 4),
        score_terms: c.score_terms.clone(),
        skeleton_carbons: c.skeleton_carbons,
        dbe_accounting: c.dbe_accounting.clone(),
        atom_accounting: c.atom_accounting.clone(),
        bands: c
            .bands
            .iter()
            .map(|b| BandAssignmentJson {
                case: placer.place(CaseRef::Band {
                    index: b.band_index,
                }),
                at: b.at,
                demanded: b.demanded,
                explained_by: b
                    .explained_by
                    .iter()
                    .map(|e| ExplanationJson {
                        kind: e.kind,
                        label: e.rule.clone(),
                        quality: e.quality,
                        rule: e.cite.clone(),
                    })
                    .collect(),
                treatment: b.treatment.clone(),
            })
            .collect(),
        supporting: placer.reasons(&c.supporting),
        weakening: placer.reasons(&c.weakening),
        structures: c.structures.clone(),
    }
}

/// The rest of the outcome: what no candidate holds, what failed, what would decide.
fn verdicts(outcome: &Outcome, placer: &Placer) -> Verdicts {
    Verdicts {
        ruled_out: outcome
            .ruled_out
            .iter()
            .map(|r| RuledOutJson {
                group: r.group.clone(),
                family: r.family,
                kind: r.kind,
                reason: r.reason.clone(),
                rule: r.cite.clone(),
                case: placer.places(&r.case),
            })
            .collect(),
        near_misses: outcome
            .near_misses
            .iter()
            .map(|n| NearMissJson {
                groups: n.groups.clone(),
                lacked: placer.reasons(&n.reasons),
            })
            .collect(),
        conflicts: outcome
            .conflicts
            .iter()
            .map(|c| ConflictJson {
                items: c
                    .items
                    .iter()
                    .zip(&c.evidence)
                    .map(|(text, item)| ConflictItemJson {
                        text: text.clone(),
                        case: placer.item(*item),
                    })
                    .collect(),
                explanation: c
                    .explanation
                    .iter()
                    .map(|e| ConflictExplanationJson {
                        kind: e.kind,
                        text: e.text.clone(),
                        case: placer.places(&e.case),
                        rules: e.rules.clone(),
                    })
                    .collect(),
                suggested_causes: c.suggested_causes.clone(),
                search_limits: c.search_limits.clone(),
            })
            .collect(),
        discriminating_checks: outcome
            .discriminating_checks
            .iter()
            .map(|d| DiscriminatingCheckJson {
                between: d.between,
                observation: super::wording::observation(d),
                rule: d.rule.clone(),
                favours: d.favours,
                kind: d.kind,
            })
            .collect(),
    }
}

/// The verdict sections of the document, built together.
struct Verdicts {
    ruled_out: Vec<RuledOutJson>,
    near_misses: Vec<NearMissJson>,
    conflicts: Vec<ConflictJson>,
    discriminating_checks: Vec<DiscriminatingCheckJson>,
}

/// Builds the document (without the library section, which the caller adds when the
/// case names a library).
pub fn build(
    case: &Case,
    outcome: &Outcome,
    conclusion: Option<ConclusionView>,
    formula_facts: Option<FormulaFacts>,
    provenance: Provenance,
) -> JsonView {
    let placer = Placer::new(case, outcome);
    let v = verdicts(outcome, &placer);
    JsonView {
        schema: SCHEMA,
        schema_version: SCHEMA_VERSION,
        case: case.id.clone(),
        title: case.title.clone(),
        sample: case.sample.clone(),
        notes: case.notes.clone(),
        conclusion,
        review: case.review.clone(),
        formula: outcome.formula.clone(),
        formula_facts,
        evidence: case_evidence(case, residual_bands(case, outcome, &placer)),
        evidence_checks: outcome
            .evidence_checks
            .iter()
            .map(|c| EvidenceCheckJson {
                item: placer.evidence_kind(c.item),
                agrees: c.agrees,
                detail: c.detail.clone(),
            })
            .collect(),
        formula_leads: outcome.formula_leads.clone(),
        salt: outcome.salt.clone(),
        mixture: outcome.mixture.clone(),
        n_consistent: outcome.n_consistent,
        n_combinations: outcome.n_combinations,
        enumeration_truncated: outcome.enumeration_truncated,
        list_truncated: outcome.list_truncated,
        candidates: outcome
            .candidates
            .iter()
            .map(|c| candidate(c, &placer))
            .collect(),
        ruled_out: v.ruled_out,
        near_misses: v.near_misses,
        conflicts: v.conflicts,
        discriminating_checks: v.discriminating_checks,
        cautions: CAUTION_KINDS
            .iter()
            .zip(engine::CAUTIONS)
            .map(|(kind, text)| CautionJson { kind: *kind, text })
            .collect(),
        provenance,
        library: None,
    }
}

/// Renders the document, ending with a newline.
pub fn render(v: &JsonView) -> String {
    // The view holds only strings, numbers, maps with string keys and finite floats, so
    // encoding cannot fail; should it ever, the error text is the document.
    let mut s = serde_json::to_string_pretty(v)
        .unwrap_or_else(|e| format!("{{\"error\": \"cannot encode the document: {e}\"}}"));
    s.push('\n');
    s
}
