//! The engine's result: the types renderers consume. Verdicts are typed (kinds as enums;
//! each reason with the catalogue rule it rests on, `RuleCite`, and its places in the
//! case, `CaseRef`). The `solve --json` contract is not these types but their versioned
//! view, `report::json_view` (docs/json-output.md), so they may change with the engine.

use serde::Serialize;
use std::collections::BTreeMap;

/// Everything `solve` concluded about one case.
#[derive(Clone, Debug, Serialize)]
pub struct Outcome {
    /// Case identifier.
    pub case: Option<String>,
    /// Formula in Hill order.
    pub formula: Option<String>,
    /// DBE of the formula.
    pub dbe: Option<f64>,
    /// Technique word, when stated.
    pub technique: Option<String>,
    /// Tolerance used, cm⁻¹.
    pub tolerance_cm1: f64,
    /// Candidates best first (at most `max_candidates`).
    pub candidates: Vec<Candidate>,
    /// How many consistent candidates were found in all (combinations that no band tells
    /// apart counted once, see `engine::collapse`).
    pub n_consistent: usize,
    /// How many consistent group combinations were found before collapsing.
    pub n_combinations: usize,
    /// True when the enumeration limit stopped the search (more may exist).
    pub enumeration_truncated: bool,
    /// True when fewer candidates are shown than were found.
    pub list_truncated: bool,
    /// Groups ruled out and why.
    pub ruled_out: Vec<RuledOut>,
    /// Combinations that failed on exactly one point.
    pub near_misses: Vec<NearMiss>,
    /// Minimal sets of evidence that cannot hold together (empty when candidates exist).
    pub conflicts: Vec<Conflict>,
    /// Observations that would tell the top candidates apart.
    pub discriminating_checks: Vec<DiscriminatingCheck>,
    /// Formula-level checks made (MS agreement), in words.
    pub evidence_checks: Vec<EvidenceCheck>,
    /// The cautions that go with every result.
    pub cautions: Vec<String>,
    /// Digest of the rules catalogue used.
    pub rules_digest: String,
    /// When the case states no formula: the formulas proposed from the molecular ion and
    /// solved in turn, best MS score first (empty otherwise).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub formula_leads: Vec<FormulaLead>,
    /// When the formula is a salt or hydrate: the organic part deduced and the parts
    /// accounted for (absent for one plain molecule).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub salt: Option<super::salt::SaltOutcome>,
    /// When one compound could not explain the spectrum: the two-component reading, or
    /// the bands a second compound would have to explain.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mixture: Option<super::mixture::MixtureOutcome>,
}

/// Group counts in the notation every output uses, `2 × alkene + ketone` (empty for no
/// groups; `report::wording::groups_text` words that case).
pub fn group_counts_notation(groups: &BTreeMap<String, u32>) -> String {
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

/// One formula proposed from the molecular ion, and what solving it gave.
#[derive(Clone, Debug, Serialize)]
pub struct FormulaLead {
    /// 1-based rank among the formula candidates of the MS search.
    pub rank: usize,
    /// Hill formula of the neutral molecule.
    pub formula: String,
    /// Its degree of unsaturation.
    pub dbe: f64,
    /// Mass error of the ion, ppm (accurate m/z only).
    pub error_ppm: Option<f64>,
    /// The MS search's score (0 is perfect; see `ms::rank`).
    pub ms_score: f64,
    /// Consistent group combinations found for this formula.
    pub n_consistent: usize,
}

/// One consistent combination.
#[derive(Clone, Debug, Serialize)]
pub struct Candidate {
    /// 1-based rank.
    pub rank: usize,
    /// The formula this candidate belongs to, when the case stated none and the formula
    /// came from the molecular ion.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub formula: Option<String>,
    /// Concrete group counts.
    pub groups: BTreeMap<String, u32>,
    /// Other splits of the same hydrocarbon unsaturation (rings, C=C, C≡C) that no
    /// observed band tells from this one (see `engine::collapse`), best first.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub alternatives: Vec<BTreeMap<String, u32>>,
    /// Counts rolled up to every ancestor family (required ids included).
    pub families: BTreeMap<String, u32>,
    /// Evidence score (see `score`).
    pub score: f64,
    /// The score's terms.
    pub score_terms: Vec<ScoreTerm>,
    /// Skeleton (sp3) carbons.
    pub skeleton_carbons: u32,
    /// "DBE 5 = aromatic_ring 4 + ketone 1".
    pub dbe_accounting: String,
    /// Per element, where the atoms went.
    pub atom_accounting: Vec<String>,
    /// Observed band → what explains it.
    pub bands: Vec<BandAssignment>,
    /// Evidence in favour, each with its rule and its place in the case.
    pub supporting: Vec<Reason>,
    /// Evidence against (that did not rule it out), each with its rule and place.
    pub weakening: Vec<Reason>,
    /// Constitutional isomers with exactly these groups, when few enough to list
    /// (filled by `engine::structures::attach`).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub structures: Option<StructureSection>,
}

/// The structures of one candidate.
#[derive(Clone, Debug, Serialize)]
pub struct StructureSection {
    /// How many constitutional isomers exist, when counted to the end.
    pub count: Option<usize>,
    /// Why none are listed (too many, formula too large, groups outside the generator).
    pub note: Option<String>,
    /// The isomers, best IR feature score first.
    pub ranked: Vec<RankedStructure>,
}

/// One isomer with its IR feature checks.
#[derive(Clone, Debug, Serialize)]
pub struct RankedStructure {
    /// Canonical SMILES.
    pub smiles: String,
    /// Feature score (+1 a feature's bands seen, −1 not seen).
    pub score: f64,
    /// One sentence per feature check.
    pub checks: Vec<String>,
}

/// One term of a score.
#[derive(Clone, Debug, Serialize)]
pub struct ScoreTerm {
    /// What it is for (borrowed for the fixed wordings, so scoring a candidate allocates
    /// no text).
    pub what: std::borrow::Cow<'static, str>,
    /// Its value.
    pub value: f64,
}

/// One observed band and its explanations in a candidate.
#[derive(Clone, Debug, Serialize)]
pub struct BandAssignment {
    /// Index of the band in the band list of the case solved (written and picked bands,
    /// as the engine read them; for a mixture with a known component subtracted, the
    /// residual band list).
    pub band_index: usize,
    /// Position, cm⁻¹.
    pub at: f64,
    /// Strength word.
    pub strength: String,
    /// Shape word.
    pub shape: Option<String>,
    /// Where it was written (`file:line:col`).
    pub place: String,
    /// Explanations, best first; empty when unexplained.
    pub explained_by: Vec<Explanation>,
    /// True when the band had to be explained (strong, ≥ 1500 cm⁻¹, covered by a rule,
    /// no vapour branch).
    pub demanded: bool,
    /// How a band that was excused or reshaped was taken, in words (a band labelled broad
    /// taken as the C–H stretch envelope, a vapour branch, a medium band left unexplained).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub treatment: Option<String>,
}

/// One explanation of a band.
#[derive(Clone, Debug, Serialize)]
pub struct Explanation {
    /// What kind of rule explains the band.
    pub kind: ExplanationKind,
    /// Group, skeleton, pattern or artefact id.
    pub id: String,
    /// The rule's label.
    pub rule: String,
    /// `file:line` of the rule.
    pub defined_at: String,
    /// The rule, typed.
    pub cite: RuleCite,
    /// Match quality in [0, 1].
    pub quality: f64,
}

/// What kind of rule explains an observed band (serialised as the lower-case word).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ExplanationKind {
    /// A band rule of a group of the candidate.
    Group,
    /// A skeleton (C–H) rule whose needs the candidate meets.
    Skeleton,
    /// A fingerprint pattern of a group of the candidate.
    Pattern,
    /// A sample or instrument artefact.
    Artefact,
    /// A vapour band taken as the rotational branch of an explained neighbour.
    Branch,
}

impl ExplanationKind {
    /// The word reports use.
    pub fn word(self) -> &'static str {
        match self {
            ExplanationKind::Group => "group",
            ExplanationKind::Skeleton => "skeleton",
            ExplanationKind::Pattern => "pattern",
            ExplanationKind::Artefact => "artefact",
            ExplanationKind::Branch => "branch",
        }
    }
}

impl std::fmt::Display for ExplanationKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.word())
    }
}

impl std::fmt::Display for EvidenceKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.word())
    }
}

impl std::fmt::Display for CheckKind {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.word())
    }
}

/// Why a group was ruled out, by kind (the sentence is in `RuledOut::reason`).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum RuleOutKind {
    /// The formula cannot hold it (elements, DBE, hydrogen).
    Composition,
    /// A demanded diagnostic band is missing.
    MissingBand,
    /// Every combination holding it fails some other evidence.
    NoConsistentCombination,
    /// A family whose every member is ruled out.
    Family,
}

/// Which formula-level evidence a check is about.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum EvidenceKind {
    /// The molecular ion against the formula (or the formulas it allows).
    #[serde(rename = "molecular_ion")]
    MolecularIon,
    /// The M+1 percentage (reported only: carbon count).
    #[serde(rename = "M+1 (reported only)")]
    MPlus1,
    /// The M+2 percentage against the formula's isotope pattern.
    #[serde(rename = "M+2")]
    MPlus2,
}

impl EvidenceKind {
    /// The word reports use.
    pub fn word(self) -> &'static str {
        match self {
            EvidenceKind::MolecularIon => "molecular_ion",
            EvidenceKind::MPlus1 => "M+1 (reported only)",
            EvidenceKind::MPlus2 => "M+2",
        }
    }
}

/// The kind of a discriminating check.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CheckKind {
    /// An IR band to look for.
    Ir,
    /// An MS ion or loss.
    Ms,
    /// A simple wet test.
    WetTest,
    /// An NMR region.
    Nmr,
}

impl CheckKind {
    /// The word reports use.
    pub fn word(self) -> &'static str {
        match self {
            CheckKind::Ir => "ir",
            CheckKind::Ms => "ms",
            CheckKind::WetTest => "wet_test",
            CheckKind::Nmr => "nmr",
        }
    }
}

/// A group that no candidate holds, and why.
#[derive(Clone, Debug, Serialize)]
pub struct RuledOut {
    /// Group id (a concrete group, or a family whose every member is ruled out).
    pub group: String,
    /// True for a family entry.
    pub family: bool,
    /// Why, by kind.
    pub kind: RuleOutKind,
    /// Why, in words.
    pub reason: String,
    /// The rule behind the decision (`id: label (file:line)`), when one rule decided.
    pub rule: Option<String>,
    /// The evidence behind the decision.
    pub evidence: Vec<String>,
    /// The rule behind the decision, typed (`rule` in words).
    pub cite: Option<RuleCite>,
    /// The places in the case the decision rests on.
    pub case: Vec<CaseRef>,
}

/// A combination that failed on one point only.
#[derive(Clone, Debug, Serialize)]
pub struct NearMiss {
    /// Concrete group counts.
    pub groups: BTreeMap<String, u32>,
    /// What it lacked, typed (its sentences: `report::wording::reason`).
    pub reasons: Vec<Reason>,
}

/// The rules of the engine itself that a `RuleKind::BuiltIn` reference may name.
pub const BUILT_IN_RULES: &[&str] = &[
    super::explain::BRANCH_RULE_ID,
    SALT_SITES_RULE_ID,
    BOND_CONDITIONS_RULE_ID,
];

/// The built-in rule that a salt's organic part holds one salt-form group per
/// counter-ion (docs/salts-mixtures.md).
pub const SALT_SITES_RULE_ID: &str = "salt_sites";

/// The built-in rule that the groups and skeleton carbons join into one molecule with
/// the formula's hydrogens (docs/engine.md, `engine::constraints::bonds`).
pub const BOND_CONDITIONS_RULE_ID: &str = "bond_conditions";

/// A relation between groups that does not hold.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum RelationFailure {
    /// Two groups that exclude each other are both held (`group`'s `excludes`).
    Excludes {
        /// The group whose rule says so.
        group: String,
        /// The group it excludes.
        other: String,
    },
    /// A group is held without any of the groups it requires (`requires_any`).
    RequiresAny {
        /// The group whose rule says so.
        group: String,
        /// The groups of which one is required.
        any_of: Vec<String>,
    },
    /// The salt-form groups of one side do not pair with the counter-ions.
    SaltSites {
        /// The side (cation: ammonium with acid anions; anion: carboxylate with metals).
        side: crate::rules::Ionic,
        /// Fewest groups of that side the counter-ions allow.
        fewest: u32,
        /// Most groups of that side the counter-ions allow.
        most: u32,
        /// Groups of that side the combination holds.
        held: u32,
    },
}

/// Which bond condition (`engine::constraints::bonds`) a combination fails.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum BondFailure {
    /// A plain ring needs three atoms that bond twice.
    RingAtoms {
        /// Atoms that bond twice.
        have: u64,
    },
    /// The groups hold more H than the formula.
    GroupHydrogens {
        /// H the groups hold.
        held: u64,
        /// H of the formula.
        formula: u64,
    },
    /// More free H than open positions that may carry H.
    OpenPositions {
        /// H left for open positions.
        free: u64,
        /// Positions that may carry H.
        positions: u64,
    },
    /// The hydrogen count leaves an odd number of bond ends.
    OddEnds,
    /// No atoms besides hydrogen.
    NoHeavyAtoms,
    /// Too few bonds to join the parts into one molecule.
    TooFewBonds {
        /// Parts (group instances and skeleton carbons).
        parts: u64,
        /// Bonds the hydrogen count leaves.
        bonds: u64,
    },
    /// More bonds than single atoms can take without multiple bonds outside the groups.
    TooManyBonds {
        /// Parts.
        parts: u64,
        /// Bonds the hydrogen count leaves.
        bonds: u64,
    },
    /// The open ends cannot be paired (heteroatoms bond only to carbon between groups).
    Unpaired {
        /// Heteroatom-borne ends.
        hetero: u64,
        /// Carbon-borne ends.
        carbon: u64,
        /// Bonds between parts.
        bonds: u64,
    },
    /// A band needs sp3 C–H and there is no saturated carbon.
    NoSaturatedCarbon,
    /// A band needs an sp2 C–H and no sp2 carbon can carry H.
    NoSp2Hydrogen,
    /// A group needs more distinct atoms outside it than the candidate has.
    DistinctAtoms {
        /// The group.
        group: String,
        /// Bonds to distinct atoms it needs.
        need: u64,
        /// Atoms outside it.
        outside: u64,
    },
    /// A group needs more distinct carbons for its heteroatom bonds than are offered.
    DistinctCarbons {
        /// The group.
        group: String,
        /// Carbons it needs.
        need: u64,
        /// Carbons offered.
        offered: u64,
    },
}

/// A statement whose sentence the report makes from its typed fields.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ReasonDetail {
    /// A relation that does not hold.
    Relation(RelationFailure),
    /// A bond condition that fails.
    Bonds(BondFailure),
}

/// A minimal set of evidence items that cannot hold together.
#[derive(Clone, Debug, Serialize)]
pub struct Conflict {
    /// The items, in words with their places.
    pub items: Vec<String>,
    /// The same items, typed (`items[i]` words `evidence[i]`).
    pub evidence: Vec<super::model::EvidenceItem>,
    /// Why they cannot hold together, each with the places and rules it rests on.
    pub explanation: Vec<ConflictExplanation>,
    /// Usual causes to check.
    pub suggested_causes: Vec<String>,
    /// Tests of the conflict search that stopped at their limit, in words (empty when
    /// every test decided). Non-empty means: the items cannot hold together, but the set
    /// may not be minimal.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub search_limits: Vec<String>,
}

/// One statement of why a conflict's items cannot hold together.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ConflictExplanation {
    /// What it says, by kind.
    pub kind: ConflictWhy,
    /// The sentence (the constraint's wording: an evidence check's detail, the formula's
    /// DBE, the groups that could explain a band and why each cannot).
    pub text: String,
    /// The places in the case it is about.
    pub case: Vec<CaseRef>,
    /// The catalogue rules it rests on: for a band, the band rules that would explain it
    /// and the rules that keep their groups out (composition, a missing band).
    pub rules: Vec<RuleCite>,
}

/// What a conflict explanation says, by kind.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ConflictWhy {
    /// The formula's DBE is not a whole non-negative number.
    FormulaDbe,
    /// A band must be explained and no rule of the catalogue covers it.
    BandUncovered,
    /// A band must be explained, and only groups that cannot be present would.
    BandOnlyBy,
    /// A band is demanded by a group's diagnostic rule.
    BandDemanded,
    /// An MS check disagrees with the formula.
    MsCheck,
}

/// An observation that would separate two candidates (its sentence:
/// `report::wording::observation`).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct DiscriminatingCheck {
    /// Ranks compared.
    pub between: [usize; 2],
    /// Rank whose group predicts it.
    pub favours: usize,
    /// The other rank, which does not predict it.
    pub against: usize,
    /// Kind of observation.
    pub kind: CheckKind,
    /// The group (or family) of the favoured rank that predicts it.
    pub group: String,
    /// What to look for, typed.
    pub basis: CheckBasis,
    /// The catalogue entry that predicts it: a band rule, an MS clue or a check of the
    /// group.
    pub rule: RuleCite,
}

/// What a discriminating check looks for.
#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum CheckBasis {
    /// A supporting band of the group not yet seen, which the other candidate cannot
    /// explain.
    Band {
        /// The band rule's label.
        label: String,
        /// Low end of its range, cm⁻¹.
        lo: f64,
        /// High end of its range, cm⁻¹.
        hi: f64,
    },
    /// An MS clue of the group.
    Ms {
        /// The clue's label.
        label: String,
        /// The ion or loss.
        clue: crate::rules::MsClueKind,
    },
    /// A wet test or NMR region of the group's family line, in the catalogue's words.
    Catalogue {
        /// The catalogue's text of the check.
        text: String,
    },
}

/// A formula-level check (MS agreement).
#[derive(Clone, Debug, Serialize)]
pub struct EvidenceCheck {
    /// The item.
    pub item: EvidenceKind,
    /// Whether it agrees.
    pub agrees: bool,
    /// Words.
    pub detail: String,
}

/// The kind of catalogue entry a statement rests on.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum RuleKind {
    /// A group as a whole (its atoms, DBE and bonds).
    Group,
    /// One band rule of a group (`index` into the group's bands).
    GroupBand,
    /// One MS clue of a group (`index` into the group's MS clues).
    GroupMs,
    /// A skeleton (C–H) rule.
    Skeleton,
    /// A fingerprint pattern.
    Pattern,
    /// A sample or instrument artefact (water of crystallisation included).
    Artefact,
    /// One wet test or NMR check of a group (`index` into the group's checks).
    GroupCheck,
    /// A rule of the engine itself, not of the catalogue (the vapour rotational branch,
    /// the salt sites, the bond conditions: [`BUILT_IN_RULES`]).
    BuiltIn,
}

/// The rule a verdict rests on: which catalogue entry, and where it is written.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct RuleCite {
    /// What kind of entry.
    pub kind: RuleKind,
    /// Group, skeleton, pattern or artefact id.
    pub id: String,
    /// Index of the band rule, MS clue or check within the group, for those kinds.
    pub index: Option<usize>,
    /// Catalogue file (relative to the catalogue root); none for a built-in rule.
    pub file: Option<String>,
    /// 1-based line of the entry in `file`.
    pub line: Option<usize>,
}

impl RuleCite {
    /// A catalogue entry at `at`.
    pub fn catalogue(
        kind: RuleKind,
        id: &str,
        index: Option<usize>,
        at: &crate::rules::RuleRef,
    ) -> RuleCite {
        RuleCite {
            kind,
            id: id.to_owned(),
            index,
            file: Some(at.file.clone()),
            line: Some(at.line),
        }
    }
}

/// A place in the case a verdict rests on.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum CaseRef {
    /// The stated formula.
    Formula,
    /// One band of the case's band list, by index.
    Band {
        /// Index into the case's band list.
        index: usize,
    },
    /// The band list as a whole (a band looked for and not found in it).
    BandList,
    /// The stated molecular ion.
    MolecularIon,
    /// The stated M+1 percentage.
    #[serde(rename = "m_plus_1")]
    MPlus1,
    /// The stated M+2 percentage.
    #[serde(rename = "m_plus_2")]
    MPlus2,
    /// One fragment ion, by index in the case's fragment list.
    Fragment {
        /// Index into `ms.fragments`.
        index: usize,
    },
}

/// What a reason says, by kind (the sentence is in `Reason::text`).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ReasonKind {
    /// A band rule of the group is met by an observed band.
    BandSeen,
    /// An MS clue of the group is met by an observed fragment.
    MsClueSeen,
    /// A band of the group is not seen, which symmetry allows.
    AllowedAbsent,
    /// A strong supporting band of the group is not seen.
    SupportMissing,
    /// An observed band no rule of the candidate explains.
    Unexplained,
    /// A demanded band of the group is missing.
    MissingBand,
    /// A relation between bands or groups does not hold.
    Relation,
    /// The bond conditions of the groups cannot be met.
    Bonds,
}

/// One statement about a candidate: what kind, in words, the rule it rests on and the
/// places in the case.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Reason {
    /// What it says, by kind.
    pub kind: ReasonKind,
    /// The engine's sentence; empty when `detail` carries the statement (every
    /// renderer words a reason through `report::wording::reason`).
    pub text: String,
    /// The statement, typed, for the kinds the report words (relations, bonds).
    pub detail: Option<ReasonDetail>,
    /// The catalogue rule it rests on (none for an unexplained band: no single rule).
    pub rule: Option<RuleCite>,
    /// The places in the case.
    pub case: Vec<CaseRef>,
}
