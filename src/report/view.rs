//! Report view types: everything a renderer shows, built once from the validated case, the
//! engine's [`Outcome`] and the provenance the caller collected. Renderers never look at
//! the engine or the case directly, so every format says the same thing.

use super::plot::PlotTrace;
use super::wording::{self, candidate_text, groups_text};
use crate::case::{Case, Review, Sample};
use crate::engine::{Conflict, DiscriminatingCheck, EvidenceCheck, NearMiss, Outcome, RuledOut};
use serde::Serialize;
use std::collections::BTreeMap;

/// How many leading candidates get a column in the band assignment table.
pub const BAND_TABLE_COLUMNS: usize = 3;

/// The version string reports and records carry.
pub const QUIDDITY_VERSION: &str = env!("CARGO_PKG_VERSION");

/// What an input file is to the case (serialised as the lower-case word).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum InputRole {
    /// The case file itself.
    Case,
    /// A spectrum file the case names.
    Spectrum,
    /// The reference library the case names (its digest is the index's).
    Library,
}

impl InputRole {
    /// The word reports and records use.
    pub fn word(self) -> &'static str {
        match self {
            InputRole::Case => "case",
            InputRole::Spectrum => "spectrum",
            InputRole::Library => "library",
        }
    }
}

impl std::fmt::Display for InputRole {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.word())
    }
}

/// One input file and its digest.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct InputFile {
    /// What the file is to the case.
    pub role: InputRole,
    /// The path: the case file as opened, a spectrum as written in the case.
    pub path: String,
    /// Lower-case hex SHA-256 of the file's bytes.
    pub sha256: String,
}

/// Where a report came from.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Provenance {
    /// quiddity's version.
    pub quiddity_version: String,
    /// Digest of the rules catalogue.
    pub rules_digest: String,
    /// Band tolerance used, cm⁻¹.
    pub tolerance_cm1: f64,
    /// Every input with its SHA-256, the case file first.
    pub inputs: Vec<InputFile>,
    /// When the report was made (UTC), only when the caller asked for it.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub generated_at: Option<String>,
}

/// The whole report.
#[derive(Clone, Debug)]
pub struct ReportView {
    /// The JSON document (its own versioned view; `library` is added at render time).
    pub json: super::json_view::JsonView,
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
    /// What evidence the case holds.
    pub evidence: EvidenceSummary,
    /// Masses and DBE of the formula.
    pub formula_facts: Option<FormulaFacts>,
    /// Formula-level checks (MS agreement).
    pub evidence_checks: Vec<EvidenceCheck>,
    /// A salt or hydrate formula: the organic part deduced and what else it holds.
    pub salt: Option<crate::engine::salt::SaltOutcome>,
    /// One compound could not explain the spectrum: the two-component reading.
    pub mixture: Option<crate::engine::mixture::MixtureOutcome>,
    /// Consistent combinations found in all.
    pub n_consistent: usize,
    /// True when the enumeration limit stopped the search.
    pub enumeration_truncated: bool,
    /// True when fewer candidates are listed than were found.
    pub list_truncated: bool,
    /// Ranked candidates.
    pub candidates: Vec<CandidateView>,
    /// Observed bands against the leading candidates.
    pub band_table: BandTable,
    /// Groups ruled out and why.
    pub ruled_out: Vec<RuledOut>,
    /// Combinations that failed on one point.
    pub near_misses: Vec<NearMiss>,
    /// Evidence that cannot hold together.
    pub conflicts: Vec<Conflict>,
    /// Observations that would separate the leading candidates.
    pub discriminating_checks: Vec<DiscriminatingCheck>,
    /// The cautions.
    pub cautions: Vec<String>,
    /// Where the report came from.
    pub provenance: Provenance,
    /// The spectrum trace for plotting (HTML only).
    pub plot: Option<PlotTrace>,
    /// The reference-library search and its hits checked against the case.
    pub library: Option<crate::verdict::LibraryVerdict>,
    /// The unknown and its best hits for the overlay plot (HTML only).
    pub library_overlay: Option<super::plot::LibraryOverlay>,
}

impl ReportView {
    /// "N consistent combination(s)", with the listing and enumeration limits when they
    /// applied (see [`wording::count`]).
    pub fn count_sentence(&self) -> String {
        wording::count(
            self.n_consistent,
            self.candidates.len(),
            self.list_truncated,
            self.enumeration_truncated,
        )
    }
}

/// The analyst's conclusion in the report.
#[derive(Clone, Debug, Serialize)]
pub struct ConclusionView {
    /// Accepted candidate.
    pub accepted: BTreeMap<String, u32>,
    /// The same in words.
    pub accepted_text: String,
    /// Rank of the listed candidate it matches, if any.
    pub matches_rank: Option<usize>,
    /// How it stands, in words.
    pub standing: String,
    /// Comments.
    pub comments: Option<String>,
}

/// The evidence of the case, summarised.
#[derive(Clone, Debug, Serialize)]
pub struct EvidenceSummary {
    /// Formula as written.
    pub formula_written: Option<String>,
    /// MS lines in words.
    pub ms: Vec<String>,
    /// IR technique word.
    pub ir_technique: Option<String>,
    /// IR window `[low, high]`.
    pub ir_window: Option<(f64, f64)>,
    /// Bands written in the case file.
    pub n_bands_written: usize,
    /// Bands picked from a spectrum file (after written bands replaced their neighbours).
    pub n_bands_picked: usize,
    /// The spectrum file, as written.
    pub spectrum_file: Option<String>,
    /// The spectrum file's title.
    pub spectrum_title: Option<String>,
    /// What reading and picking the spectrum assumed.
    pub spectrum_notes: Vec<String>,
}

/// Masses and DBE of the stated formula.
#[derive(Clone, Debug, Serialize)]
pub struct FormulaFacts {
    /// Hill order.
    pub formula: String,
    /// Monoisotopic mass, u.
    pub monoisotopic_mass: f64,
    /// Average mass, u.
    pub average_mass: f64,
    /// Nominal mass.
    pub nominal_mass: u64,
    /// Double bond equivalents.
    pub dbe: Option<f64>,
}

/// One candidate in the report.
#[derive(Clone, Debug, Serialize)]
pub struct CandidateView {
    /// 1-based rank.
    pub rank: usize,
    /// The candidate's formula when the case stated none (it came from the molecular ion).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub formula: Option<String>,
    /// Group counts.
    pub groups: BTreeMap<String, u32>,
    /// The same in words (prefixed with the formula when it came from the molecular ion).
    pub groups_text: String,
    /// Evidence score.
    pub score: f64,
    /// Skeleton carbons.
    pub skeleton_carbons: u32,
    /// DBE accounting in words.
    pub dbe_accounting: String,
    /// Atom accounting, one line per element.
    pub atom_accounting: Vec<String>,
    /// Evidence in favour.
    pub supporting: Vec<String>,
    /// Evidence against.
    pub weakening: Vec<String>,
    /// Constitutional isomers with these groups, when few enough to list.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub structures: Option<crate::engine::StructureSection>,
}

/// Observed bands against the leading candidates.
#[derive(Clone, Debug, Serialize)]
pub struct BandTable {
    /// Ranks of the candidate columns.
    pub ranks: Vec<usize>,
    /// One row per observed band, highest wavenumber first.
    pub rows: Vec<BandRow>,
    /// How the leading candidate took the bands it excused or reshaped
    /// (`2962 cm⁻¹: 2962, labelled broad, taken as the … envelope`).
    pub treatments: Vec<String>,
}

/// One observed band and what explains it in each leading candidate.
#[derive(Clone, Debug, Serialize)]
pub struct BandRow {
    /// Position, cm⁻¹.
    pub at: f64,
    /// Strength word.
    pub strength: String,
    /// Shape word.
    pub shape: Option<String>,
    /// Where the band came from.
    pub place: String,
    /// True when the band had to be explained.
    pub demanded: bool,
    /// One cell per column of `ranks`.
    pub cells: Vec<BandCell>,
}

/// What kind of rule explains a band in one candidate, or none.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CellKind {
    /// Explained by a rule of this kind.
    Explained(crate::engine::ExplanationKind),
    /// No rule of the candidate explains it.
    Unexplained,
}

impl CellKind {
    /// The word reports use (`none` when unexplained).
    pub fn word(self) -> &'static str {
        match self {
            CellKind::Explained(k) => k.word(),
            CellKind::Unexplained => "none",
        }
    }
}

impl Serialize for CellKind {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.serialize_str(self.word())
    }
}

/// What explains a band in one candidate.
#[derive(Clone, Debug, Serialize)]
pub struct BandCell {
    /// What kind of rule explains it.
    pub kind: CellKind,
    /// The explaining id, or `unexplained`.
    pub id: String,
    /// The rule's label and place, when explained.
    pub rule: Option<String>,
}

impl BandRow {
    /// The label a plot puts on the band: the leading candidate's explanation.
    pub fn label(&self) -> &str {
        self.cells.first().map_or("", |c| c.id.as_str())
    }

    /// The kind of the leading candidate's explanation (unexplained without candidates).
    pub fn cell_kind(&self) -> CellKind {
        self.cells.first().map_or(CellKind::Unexplained, |c| c.kind)
    }
}

/// Builds the report view.
pub fn build(
    case: &Case,
    outcome: &Outcome,
    provenance: Provenance,
    plot: Option<PlotTrace>,
) -> ReportView {
    let formula_facts = formula_facts(case, outcome);
    let evidence = evidence_summary(case);
    let candidates: Vec<CandidateView> = outcome.candidates.iter().map(candidate_view).collect();
    let band_table = band_table(case, outcome);
    let conclusion = conclusion_view(case, outcome);
    let json = super::json_view::build(
        case,
        outcome,
        conclusion.clone(),
        formula_facts.clone(),
        provenance.clone(),
    );
    ReportView {
        json,
        case: case.id.clone(),
        title: case.title.clone(),
        sample: case.sample.clone(),
        notes: case.notes.clone(),
        conclusion,
        review: case.review.clone(),
        evidence,
        formula_facts,
        evidence_checks: outcome.evidence_checks.clone(),
        salt: outcome.salt.clone(),
        mixture: outcome.mixture.clone(),
        n_consistent: outcome.n_consistent,
        enumeration_truncated: outcome.enumeration_truncated,
        list_truncated: outcome.list_truncated,
        candidates,
        band_table,
        ruled_out: outcome.ruled_out.clone(),
        near_misses: outcome.near_misses.clone(),
        conflicts: outcome.conflicts.clone(),
        discriminating_checks: outcome.discriminating_checks.clone(),
        cautions: outcome.cautions.clone(),
        provenance,
        plot,
        library: None,
        library_overlay: None,
    }
}

/// Masses and DBE of the stated formula.
fn formula_facts(case: &Case, outcome: &Outcome) -> Option<FormulaFacts> {
    case.formula.as_ref().map(|f| FormulaFacts {
        formula: outcome
            .formula
            .clone()
            .unwrap_or_else(|| f.composition.to_string()),
        monoisotopic_mass: round(f.formula.monoisotopic_mass(), 6),
        average_mass: round(f.formula.average_mass(), 4),
        nominal_mass: f.formula.nominal_mass(),
        dbe: outcome.dbe,
    })
}

/// What evidence the case holds, in words and counts.
fn evidence_summary(case: &Case) -> EvidenceSummary {
    let (n_written, n_picked) = case.ir.as_ref().map_or((0, 0), |ir| {
        let picked = ir
            .bands
            .iter()
            .filter(|b| {
                ir.spectrum
                    .as_ref()
                    .is_some_and(|s| s.origin == b.place.origin)
            })
            .count();
        (ir.bands.len() - picked, picked)
    });
    let spectrum = case.ir.as_ref().and_then(|ir| ir.spectrum.as_ref());
    EvidenceSummary {
        formula_written: case.formula.as_ref().map(|f| f.text.clone()),
        ms: case
            .ms
            .as_ref()
            .map(wording::ms_evidence)
            .unwrap_or_default(),
        ir_technique: case
            .ir
            .as_ref()
            .and_then(|ir| ir.technique.map(|t| t.word().to_owned())),
        ir_window: case.ir.as_ref().map(|ir| ir.window),
        n_bands_written: n_written,
        n_bands_picked: n_picked,
        spectrum_file: spectrum.map(|s| s.written.clone()),
        spectrum_title: spectrum.and_then(|s| s.title.clone()),
        spectrum_notes: spectrum.map(|s| s.notes.clone()).unwrap_or_default(),
    }
}

/// One candidate as the reports show it.
fn candidate_view(c: &crate::engine::Candidate) -> CandidateView {
    CandidateView {
        rank: c.rank,
        formula: c.formula.clone(),
        groups: c.groups.clone(),
        groups_text: candidate_text(c),
        score: round(c.score, 4),
        skeleton_carbons: c.skeleton_carbons,
        dbe_accounting: c.dbe_accounting.clone(),
        atom_accounting: c.atom_accounting.clone(),
        supporting: c.supporting.iter().map(|r| r.text.clone()).collect(),
        weakening: c.weakening.iter().map(|r| r.text.clone()).collect(),
        structures: c.structures.clone(),
    }
}

/// The analyst's conclusion and how it stands against the outcome.
fn conclusion_view(case: &Case, outcome: &Outcome) -> Option<ConclusionView> {
    case.conclusion.as_ref().map(|c| {
        let matches_rank = outcome
            .candidates
            .iter()
            .find(|cand| cand.groups == c.accepted)
            .map(|cand| cand.rank);
        ConclusionView {
            accepted: c.accepted.clone(),
            accepted_text: groups_text(&c.accepted),
            matches_rank,
            standing: wording::standing(
                c.accepted.is_empty(),
                matches_rank,
                outcome.list_truncated || outcome.enumeration_truncated,
            ),
            comments: c.comments.clone(),
        }
    })
}

fn band_table(case: &Case, outcome: &Outcome) -> BandTable {
    let leading: Vec<_> = outcome.candidates.iter().take(BAND_TABLE_COLUMNS).collect();
    let ranks = leading.iter().map(|c| c.rank).collect();
    let rows = match leading.first() {
        // Every candidate lists the case's bands in the same order (the engine's active
        // band list), so a row pairs the candidates' assignments by index.
        Some(first) => first
            .bands
            .iter()
            .enumerate()
            .map(|(band_idx, b)| BandRow {
                at: b.at,
                strength: b.strength.clone(),
                shape: b.shape.clone(),
                place: b.place.clone(),
                demanded: b.demanded,
                cells: leading
                    .iter()
                    .map(|c| {
                        let same = c.bands.get(band_idx);
                        match same.and_then(|x| x.explained_by.first()) {
                            Some(e) => BandCell {
                                kind: CellKind::Explained(e.kind),
                                id: e.id.clone(),
                                rule: Some(wording::cell_rule(e)),
                            },
                            None => BandCell {
                                kind: CellKind::Unexplained,
                                id: "unexplained".into(),
                                rule: None,
                            },
                        }
                    })
                    .collect(),
            })
            .collect(),
        None => case
            .ir
            .iter()
            .flat_map(|ir| ir.bands.iter())
            .map(|b| BandRow {
                at: b.band.at,
                strength: b.band.strength.word().to_owned(),
                shape: b.band.shape.map(|s| s.word().to_owned()),
                place: b.place.display(),
                demanded: b.band.strength != crate::ir::Strength::Weak
                    && b.band.in_diagnostic_region(),
                cells: Vec::new(),
            })
            .collect(),
    };
    let treatments = leading
        .first()
        .map(|c| {
            c.bands
                .iter()
                .filter_map(|b| {
                    b.treatment
                        .as_ref()
                        .map(|t| wording::treatment(b.at, &b.strength, &b.place, t))
                })
                .collect()
        })
        .unwrap_or_default();
    BandTable {
        ranks,
        rows,
        treatments,
    }
}

/// Rounds to `decimals` places so that reports do not carry float noise.
pub fn round(v: f64, decimals: i32) -> f64 {
    let f = 10f64.powi(decimals);
    (v * f).round() / f
}
