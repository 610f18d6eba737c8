//! The validated catalogue: the contract between the rules loader and the engine.
//!
//! Conventions the engine relies on (the loader's validation enforces them):
//! - `Group::atoms` are the atoms the group itself holds, fixed hydrogens included
//!   (aldehyde: C1 H1 O1; alcohol: O1 H1; aromatic ring: C6). Hydrogens that may or may
//!   not sit on the group's open positions are not counted there (they belong to the
//!   skeleton's hydrogen budget).
//! - `Group::dbe` is the rings plus pi bonds inside the group (ketone 1, nitrile 2,
//!   aromatic ring 4, lactone 2 = C=O + its ring). The `ring` group holds no atoms and
//!   consumes DBE 1: a plain carbocyclic ring.
//! - `Group::bonds` counts the group's open valences by where they start and where they
//!   may end. Heteroatom–heteroatom bonds exist only inside a group.
//! - A group that has subtypes (another group names it in `subtype_of`) is abstract: its
//!   subtypes partition it and the engine enumerates the concrete groups only, reporting
//!   the parent family alongside.
//! - Every rule carries `source` (named handbook table or paper, `common practice`, with
//!   `from memory` where recalled) and `defined_at` (file and line) for traceability.

use crate::chem::Composition;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// Where a rule is defined: a file of the catalogue and a 1-based line.
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub struct RuleRef {
    /// Catalogue file, relative to the catalogue root (e.g. `groups/carbonyl.yaml`).
    pub file: String,
    /// 1-based line of the rule's first key.
    pub line: usize,
}

/// Sampling technique of an IR measurement; selects technique-specific band overrides.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
pub enum Technique {
    /// Attenuated total reflection (condensed phase).
    #[serde(rename = "ATR")]
    Atr,
    /// KBr pellet (condensed phase, may show moisture).
    #[serde(rename = "KBr")]
    Kbr,
    /// Neat liquid film between windows (condensed phase).
    #[serde(rename = "film")]
    Film,
    /// Solution in a cell (solvent windows apply).
    #[serde(rename = "solution")]
    Solution,
    /// Vapour phase, e.g. GC-IR: free (not hydrogen-bonded) O–H and N–H, carbonyls higher.
    #[serde(rename = "gas")]
    Gas,
    /// Mull in mineral oil (the oil's C–H bands appear).
    #[serde(rename = "mull")]
    Mull,
}

impl Technique {
    /// Every technique, in declaration order.
    pub const ALL: [Technique; 6] = [
        Technique::Atr,
        Technique::Kbr,
        Technique::Film,
        Technique::Solution,
        Technique::Gas,
        Technique::Mull,
    ];

    /// The word used in case and rules files.
    pub fn word(self) -> &'static str {
        match self {
            Technique::Atr => "ATR",
            Technique::Kbr => "KBr",
            Technique::Film => "film",
            Technique::Solution => "solution",
            Technique::Gas => "gas",
            Technique::Mull => "mull",
        }
    }

    /// True for the condensed-phase techniques (everything but the vapour phase).
    pub fn is_condensed(self) -> bool {
        self != Technique::Gas
    }
}

/// The strength a rule expects of a band.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ExpectedStrength {
    /// Usually weak.
    Weak,
    /// Usually medium.
    Medium,
    /// Usually strong.
    Strong,
    /// Anywhere from weak to strong depending on the molecule.
    Variable,
}

/// The shape a rule expects of a band.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ExpectedShape {
    /// Broad (e.g. hydrogen-bonded O–H).
    Broad,
    /// Sharp.
    Sharp,
    /// No characteristic shape.
    Any,
}

/// Whether a band must be seen when the group is present.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum BandRole {
    /// Must be observed if the group is present (unless `may_be_absent`).
    Diagnostic,
    /// Adds weight when observed; its absence rules nothing out.
    Supporting,
}

/// A wavenumber interval in cm⁻¹, `lo < hi`, inside 400–4000.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Range {
    /// Lower edge, cm⁻¹.
    pub lo: f64,
    /// Upper edge, cm⁻¹.
    pub hi: f64,
}

impl Range {
    /// True when `at` lies within the range widened by `tolerance` on each side.
    pub fn contains_within(&self, at: f64, tolerance: f64) -> bool {
        at >= self.lo - tolerance && at <= self.hi + tolerance
    }

    /// Middle of the range.
    pub fn centre(&self) -> f64 {
        (self.lo + self.hi) / 2.0
    }
}

/// What changes for a band under one technique (fields left `None` stay as they are).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct BandOverride {
    /// Replacement range.
    pub range: Option<Range>,
    /// Replacement expected strength.
    pub strength: Option<ExpectedStrength>,
    /// Replacement expected shape.
    pub shape: Option<ExpectedShape>,
    /// Replacement for `may_be_absent`.
    pub may_be_absent: Option<bool>,
    /// Source of the override.
    pub source: String,
}

/// A documented shift of a band (conjugation, ring strain, hydrogen bonding, ...).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Shift {
    /// Cause, e.g. `conjugation`, `ring_strain`, `hydrogen_bonding`.
    pub cause: String,
    /// Shift interval in cm⁻¹ (negative = to lower wavenumber).
    pub by: Range,
    /// Source of the figure.
    pub source: String,
}

/// One IR band a rule predicts.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct BandRule {
    /// What vibrates, e.g. `C=O stretch`.
    pub label: String,
    /// Expected position in the condensed phase unless an override says otherwise.
    pub range: Range,
    /// Expected strength.
    pub strength: ExpectedStrength,
    /// Expected shape.
    pub shape: ExpectedShape,
    /// Diagnostic or supporting.
    pub role: BandRole,
    /// Diagnostic bands sharing this tag form a set of which at least one must be seen.
    pub one_of: Option<String>,
    /// The band may be weak or absent (by symmetry or otherwise): absence lowers the
    /// score but never rules out.
    pub may_be_absent: bool,
    /// Technique-specific changes.
    pub by_technique: BTreeMap<Technique, BandOverride>,
    /// Documented shifts, for explanation and for the variants that encode them.
    pub shifts: Vec<Shift>,
    /// Source of the values.
    pub source: String,
    /// Where the band is defined.
    pub defined_at: RuleRef,
}

/// Open valences of a group, by where each starts and where it may end.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize)]
pub struct OpenBonds {
    /// From a heteroatom of the group; must end on a carbon outside the group.
    pub hetero: u32,
    /// From a heteroatom of the group; may end on a carbon outside the group or on H.
    pub hetero_or_h: u32,
    /// From a carbon of the group; must end on an atom outside the group, never H.
    pub carbon: u32,
    /// From a carbon of the group; may end on H or on an atom outside the group.
    pub carbon_or_h: u32,
}

impl OpenBonds {
    /// All open valences.
    pub fn total(&self) -> u32 {
        self.hetero + self.hetero_or_h + self.carbon + self.carbon_or_h
    }
}

/// A characteristic mass-spectrum observation for a group (soft evidence).
#[derive(Clone, Debug, PartialEq, Serialize)]
pub enum MsClueKind {
    /// A characteristic fragment ion at this nominal m/z.
    Ion {
        /// Nominal m/z.
        mz: f64,
    },
    /// A characteristic neutral loss from the molecular ion, in u (nominal).
    Loss {
        /// Mass lost, u.
        mass: f64,
    },
}

/// One MS clue.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct MsClue {
    /// Ion or loss.
    pub kind: MsClueKind,
    /// What it is, e.g. `loss of water`.
    pub label: String,
    /// Source.
    pub source: String,
    /// Where the clue is defined.
    pub defined_at: RuleRef,
}

/// The kind of a check outside IR and MS.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum CheckKind {
    /// A simple wet-chemical test (colour, precipitate, effervescence).
    WetTest,
    /// A region of the NMR spectrum.
    Nmr,
}

impl CheckKind {
    /// The catalogue word (`wet_test`, `nmr`), also used in outcomes.
    pub fn word(self) -> &'static str {
        match self {
            CheckKind::WetTest => "wet_test",
            CheckKind::Nmr => "nmr",
        }
    }
}

/// A check outside IR and MS that tells a group apart (a wet test, an NMR region):
/// offered as a discriminating check when one candidate holds the group and another
/// does not. A subtype inherits the checks of its parents.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct GroupCheck {
    /// Wet test or NMR.
    pub kind: CheckKind,
    /// What to do and what a positive result looks like.
    pub text: String,
    /// Source.
    pub source: String,
    /// Where the check is defined.
    pub defined_at: RuleRef,
}

/// A functional group.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Group {
    /// Stable id (snake case), e.g. `ketone`.
    pub id: String,
    /// Human name.
    pub name: String,
    /// Atoms the group holds, fixed hydrogens included.
    pub atoms: Composition,
    /// Rings plus pi bonds inside the group.
    pub dbe: u32,
    /// Rings the group closes through atoms outside it (lactone, lactam: 1); counted in
    /// `dbe`.
    pub ring_closures: u32,
    /// Open valences.
    pub bonds: OpenBonds,
    /// Parent ids this group refines.
    pub subtype_of: Vec<String>,
    /// Ids that cannot occur in the same candidate.
    pub excludes: Vec<String>,
    /// At least one of these (or a subtype of one) must also be in the candidate
    /// (a phenol needs an aromatic ring; a conjugated ketone needs a C=C or ring).
    pub requires_any: Vec<String>,
    /// IR bands.
    pub bands: Vec<BandRule>,
    /// MS clues.
    pub ms: Vec<MsClue>,
    /// Wet tests and NMR regions for the group (its parents' apply too).
    pub checks: Vec<GroupCheck>,
    /// The group as it stands in a salt, when it is a salt form (its atoms are then the
    /// neutral parent's: the engine deduces the free base or free acid).
    pub ionic: Option<Ionic>,
    /// The neutral group this is the salt form of (set exactly when `ionic` is).
    pub salt_of: Option<String>,
    /// Free-text note for the analyst.
    pub note: Option<String>,
    /// Source for the group's composition and general description.
    pub source: String,
    /// Where the group is defined.
    pub defined_at: RuleRef,
}

/// Which side of a salt a salt-form group stands on.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Ionic {
    /// A protonated base (ammonium), paired with the anion of an acid (Cl⁻, HSO₄⁻ ...).
    Cation,
    /// A deprotonated acid (carboxylate), paired with a metal cation (Na⁺, K⁺ ...).
    Anion,
}

impl Ionic {
    /// Every value with its catalogue word.
    pub const ALL: [(Ionic, &'static str); 2] =
        [(Ionic::Cation, "cation"), (Ionic::Anion, "anion")];

    /// The catalogue word.
    pub fn word(self) -> &'static str {
        match self {
            Ionic::Cation => "cation",
            Ionic::Anion => "anion",
        }
    }
}

/// A band from the hydrocarbon skeleton (C–H stretches and bends), usable when the
/// candidate has what the rule needs.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SkeletonRule {
    /// Stable id, e.g. `ch_sp3_stretch`.
    pub id: String,
    /// The band.
    pub band: BandRule,
    /// The rule applies when the candidate holds any of these group ids (a subtype
    /// counts for its parent) or the reserved condition `sp3_carbon` (at least one
    /// skeleton carbon).
    pub needs_any: Vec<String>,
}

/// A band that comes from the sample or the instrument, not the compound.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ArtefactRule {
    /// Stable id, e.g. `atmospheric_co2`.
    pub id: String,
    /// What it is.
    pub label: String,
    /// Where it appears.
    pub range: Range,
    /// Techniques under which it appears; empty means any.
    pub techniques: Vec<Technique>,
    /// Typical shape.
    pub shape: ExpectedShape,
    /// Source.
    pub source: String,
    /// Where the rule is defined.
    pub defined_at: RuleRef,
}

/// A fingerprint-region pattern (ring substitution, alkene substitution) that supports a
/// group and names a structural feature; soft evidence only.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PatternRule {
    /// Stable id, e.g. `benzene_monosubstituted_oop`.
    pub id: String,
    /// Feature it indicates, e.g. `monosubstituted benzene`.
    pub feature: String,
    /// Group id it supports.
    pub supports: String,
    /// The bands of the pattern (all expected together).
    pub bands: Vec<BandRule>,
    /// Source.
    pub source: String,
    /// Where the rule is defined.
    pub defined_at: RuleRef,
}

/// A technique-wide effect, e.g. ATR weakening high-wavenumber bands.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct TechniqueEffect {
    /// Stable id.
    pub id: String,
    /// Technique concerned.
    pub technique: Technique,
    /// Wavenumber range affected.
    pub range: Range,
    /// Observed bands there may appear this many strength classes weaker than expected.
    pub weaker_by: u8,
    /// What happens, for the explanation.
    pub label: String,
    /// Source.
    pub source: String,
    /// Where the rule is defined.
    pub defined_at: RuleRef,
}

/// The whole validated catalogue.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct Catalogue {
    /// Groups in load order (file order, then position in file).
    pub groups: Vec<Group>,
    /// Skeleton rules.
    pub skeleton: Vec<SkeletonRule>,
    /// Artefact rules.
    pub artefacts: Vec<ArtefactRule>,
    /// Fingerprint patterns.
    pub patterns: Vec<PatternRule>,
    /// Technique-wide effects.
    pub technique_effects: Vec<TechniqueEffect>,
    /// Bands of water of crystallisation: they explain bands only when the stated formula
    /// holds a water part (`·nH2O`), so they are kept apart from the artefacts.
    pub hydrate_bands: Vec<ArtefactRule>,
    /// SHA-256 (hex) over the catalogue's files, in path order, for provenance.
    pub digest: String,
}

impl Catalogue {
    /// The group with `id`.
    pub fn group(&self, id: &str) -> Option<&Group> {
        self.groups.iter().find(|g| g.id == id)
    }

    /// True when some group names `id` as its parent.
    pub fn has_subtypes(&self, id: &str) -> bool {
        self.groups
            .iter()
            .any(|g| g.subtype_of.iter().any(|p| p == id))
    }

    /// Groups the engine enumerates: those without subtypes.
    pub fn concrete_groups(&self) -> impl Iterator<Item = &Group> + '_ {
        self.groups.iter().filter(|g| !self.has_subtypes(&g.id))
    }

    /// `id` and all its ancestors through `subtype_of`, nearest first, without repeats.
    pub fn lineage(&self, id: &str) -> Vec<String> {
        let mut out = vec![id.to_owned()];
        let mut i = 0;
        while i < out.len() {
            if let Some(g) = self.group(&out[i]) {
                for parent in &g.subtype_of {
                    if !out.contains(parent) {
                        out.push(parent.clone());
                    }
                }
            }
            i += 1;
        }
        out
    }

    /// True when `id` is `ancestor` or refines it.
    pub fn is_a(&self, id: &str, ancestor: &str) -> bool {
        self.lineage(id).iter().any(|x| x == ancestor)
    }
}
