//! Report view types: everything a renderer shows, built once from the validated case, the
//! engine's [`Outcome`] and the provenance the caller collected. Renderers never look at
//! the engine or the case directly, so every format says the same thing.

use super::plot::PlotTrace;
use crate::case::{Case, Review, Sample};
use crate::engine::{Conflict, DiscriminatingCheck, EvidenceCheck, NearMiss, Outcome, RuledOut};
use serde::Serialize;
use std::collections::BTreeMap;

/// How many leading candidates get a column in the band assignment table.
pub const BAND_TABLE_COLUMNS: usize = 3;

/// The version string reports and records carry.
pub const QUIDDITY_VERSION: &str = env!("CARGO_PKG_VERSION");

/// One input file and its digest.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, serde::Deserialize)]
pub struct InputFile {
    /// `case` or `spectrum`.
    pub role: String,
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
    /// applied; the one wording every renderer uses.
    pub fn count_sentence(&self) -> String {
        let mut out = format!("{} consistent combination(s)", self.n_consistent);
        if self.list_truncated {
            out.push_str(&format!(", the first {} listed", self.candidates.len()));
        }
        if self.enumeration_truncated {
            out.push_str("; the enumeration limit was reached, more may exist");
        }
        out
    }
}

/// The salt or hydrate section as lines, the one wording every renderer uses.
pub fn salt_lines(salt: &crate::engine::salt::SaltOutcome) -> Vec<String> {
    let dbe = |d: Option<f64>| d.map_or("not defined".to_owned(), |d| format!("{d}"));
    let mut out = vec![
        format!(
            "organic part deduced: {}{} (DBE {}); stated formula {} (DBE {})",
            if salt.organic_count > 1 {
                format!("{} × ", salt.organic_count)
            } else {
                String::new()
            },
            salt.organic_formula,
            dbe(salt.organic_dbe),
            salt.stated_formula,
            dbe(salt.stated_dbe)
        ),
        format!(
            "read as: {}",
            crate::engine::salt::reading_word(salt.reading)
        ),
    ];
    let parts: Vec<String> = salt
        .parts
        .iter()
        .map(|p| {
            let role = match p.role {
                "acid" => "counter-ion from the acid",
                "metal" => "counter-ion (metal cation)",
                "water" => "water of crystallisation",
                _ => "other part, in the atom balance only",
            };
            format!("{} {}: {role}", p.count, p.formula)
        })
        .collect();
    if !parts.is_empty() {
        out.push(format!("accounted for: {}", parts.join("; ")));
    }
    out.extend(salt.statements.iter().cloned());
    out.extend(salt.checks.iter().cloned());
    out
}

/// The mixture section as lines, the one wording every renderer uses.
pub fn mixture_lines(m: &crate::engine::mixture::MixtureOutcome) -> Vec<String> {
    let at = |v: &[f64]| {
        v.iter()
            .map(|a| format!("{a:.0}"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let mut out = vec![format!("considered because {}", m.trigger)];
    if let Some(c) = &m.component {
        out.push(format!(
            "conclusion: a mixture of {} ({}) and the compound deduced below",
            c.name, c.place
        ));
        out.push(match (c.factor, c.absorbance_share) {
            (Some(f), Some(s)) => format!(
                "fraction: {:.0} % of the integrated absorbance (reference factor {f}; a spectral share, not a mass fraction)",
                s * 100.0
            ),
            _ => "fraction: not estimated (band lists only)".to_owned(),
        });
        out.push(format!(
            "bands attributed to it: {}",
            at(&c.attributed_bands)
        ));
        out.push(format!("residual bands deduced: {}", at(&m.residual_bands)));
    }
    if !m.unexplained_bands.is_empty() && m.component.is_none() {
        out.push(format!(
            "a second compound would have to explain: {} cm⁻¹",
            at(&m.unexplained_bands)
        ));
    }
    out.extend(m.evidence.iter().map(|e| format!("evidence: {e}")));
    out.extend(m.tried.iter().map(|t| format!("tried: {t}")));
    out
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

    /// The kind of the leading candidate's explanation (`none` without candidates).
    pub fn kind(&self) -> &str {
        self.cells.first().map_or("none", |c| c.kind.word())
    }
}

/// A candidate in words: its groups, prefixed with its formula when the formula came from
/// the molecular ion (`C4H8O2: ester_saturated`).
pub fn candidate_text(c: &crate::engine::Candidate) -> String {
    match &c.formula {
        Some(f) => format!("{f}: {}", groups_text(&c.groups)),
        None => groups_text(&c.groups),
    }
}

/// Group counts in words: `2 × alkene + ketone`.
pub fn groups_text(groups: &BTreeMap<String, u32>) -> String {
    if groups.is_empty() {
        return "(hydrocarbon skeleton only)".into();
    }
    groups
        .iter()
        .map(|(k, v)| {
            if *v > 1 {
                format!("{v} × {k}")
            } else {
                k.clone()
            }
        })
        .collect::<Vec<_>>()
        .join(" + ")
}

/// Builds the report view.
pub fn build(
    case: &Case,
    outcome: &Outcome,
    provenance: Provenance,
    plot: Option<PlotTrace>,
) -> ReportView {
    let formula_facts = case.formula.as_ref().map(|f| FormulaFacts {
        formula: outcome
            .formula
            .clone()
            .unwrap_or_else(|| f.composition.to_string()),
        monoisotopic_mass: round(f.formula.monoisotopic_mass(), 6),
        average_mass: round(f.formula.average_mass(), 4),
        nominal_mass: f.formula.nominal_mass(),
        dbe: outcome.dbe,
    });
    let mut ms = Vec::new();
    if let Some(m) = &case.ms {
        if let Some((mz, _)) = &m.molecular_ion {
            ms.push(format!(
                "molecular ion m/z {mz} as {} (tolerance {} ppm when accurate)",
                m.ion.canonical(),
                m.ppm
            ));
        }
        if let Some((v, _)) = &m.m_plus_1 {
            ms.push(format!("M+1 {v} % of M"));
        }
        if let Some((v, _)) = &m.m_plus_2 {
            ms.push(format!("M+2 {v} % of M"));
        }
        if !m.fragments.is_empty() {
            let list: Vec<String> = m
                .fragments
                .iter()
                .map(|((mz, rel), _)| format!("{mz} ({rel})"))
                .collect();
            ms.push(format!(
                "fragments m/z (relative intensity): {}",
                list.join(", ")
            ));
        }
    }
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
    let evidence = EvidenceSummary {
        formula_written: case.formula.as_ref().map(|f| f.text.clone()),
        ms,
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
    };
    let candidates: Vec<CandidateView> = outcome
        .candidates
        .iter()
        .map(|c| CandidateView {
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
        })
        .collect();
    let band_table = band_table(case, outcome);
    let conclusion = case.conclusion.as_ref().map(|c| {
        let matches_rank = outcome
            .candidates
            .iter()
            .find(|cand| cand.groups == c.accepted)
            .map(|cand| cand.rank);
        let standing = if c.accepted.is_empty() {
            "no candidate accepted yet".to_owned()
        } else {
            match matches_rank {
                Some(1) => "the accepted candidate is the leading candidate".to_owned(),
                Some(r) => format!("the accepted candidate is consistent, ranked {r}"),
                None if outcome.list_truncated || outcome.enumeration_truncated => {
                    "the accepted candidate is not among the listed candidates (the list is cut)"
                        .to_owned()
                }
                None => "the accepted candidate is not among the consistent candidates".to_owned(),
            }
        };
        ConclusionView {
            accepted: c.accepted.clone(),
            accepted_text: groups_text(&c.accepted),
            matches_rank,
            standing,
            comments: c.comments.clone(),
        }
    });
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
                                rule: Some(format!("{} ({})", e.rule, e.defined_at)),
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
                        .map(|t| format!("{:.0} cm⁻¹ ({} {}): {t}", b.at, b.strength, b.place))
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
