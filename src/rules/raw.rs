//! Raw serde types mirroring the YAML of `rules/*.yaml`, one struct per kind of list item.
//!
//! Every struct denies unknown keys; no `serde(flatten)` and no untagged enums, so every
//! error keeps its position. Values that validation must check with a position (sources,
//! ranges, ids) are read as written and checked in `load`, not here. A file is a mapping
//! with any of the sections listed in [`SECTIONS`]; each section is a list, and the loader
//! hands each list item to serde on its own so that one bad item does not hide the others.

use super::model::{BandRole, CheckKind, ExpectedShape, ExpectedStrength, Technique};
use serde::Deserialize;
use std::collections::BTreeMap;

/// The top-level keys a rules file may hold.
pub const SECTIONS: [&str; 6] = [
    "groups",
    "skeleton",
    "artefacts",
    "patterns",
    "technique_effects",
    "hydrate_bands",
];

/// A wavenumber interval written `[lo, hi]` (cm⁻¹).
pub type RawRange = [f64; 2];

/// One item of `groups`: a functional group.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawGroup {
    /// Stable snake-case id.
    pub id: String,
    /// Human name.
    pub name: String,
    /// Atoms the group holds, fixed hydrogens included: `{ C: 1, H: 1, O: 1 }`.
    pub atoms: BTreeMap<String, u32>,
    /// Rings plus pi bonds inside the group (a lactone's ring included).
    pub dbe: u32,
    /// Rings the group closes through atoms outside it (lactone, lactam, cyclic ketone: 1).
    /// Already counted in `dbe`; used by the valence check only.
    #[serde(default)]
    pub ring_closures: u32,
    /// Open valences.
    pub bonds: RawBonds,
    /// Parent ids.
    #[serde(default)]
    pub subtype_of: Vec<String>,
    /// Ids that cannot occur together with this group.
    #[serde(default)]
    pub excludes: Vec<String>,
    /// At least one of these must be present too.
    #[serde(default)]
    pub requires_any: Vec<String>,
    /// `cation | anion`: the group as it stands in a salt (a protonated base paired with
    /// an acid's anion, or a deprotonated acid paired with a metal cation). Its atoms are
    /// those of the neutral parent, so the engine deduces the free base or free acid.
    #[serde(default)]
    pub ionic: Option<String>,
    /// The neutral group this is the salt form of (required with `ionic`).
    #[serde(default)]
    pub salt_of: Option<String>,
    /// Free-text note.
    #[serde(default)]
    pub note: Option<String>,
    /// Source for the composition and description.
    #[serde(default)]
    pub source: Option<String>,
    /// IR bands.
    #[serde(default)]
    pub bands: Vec<RawBand>,
    /// MS clues.
    #[serde(default)]
    pub ms: Vec<RawMsClue>,
    /// Checks outside IR and MS (wet tests, NMR regions) that tell the group apart.
    #[serde(default)]
    pub checks: Vec<RawCheck>,
}

/// One item of a group's `checks:` — a wet test or an NMR region for the group.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawCheck {
    /// `wet_test | nmr`.
    pub kind: CheckKind,
    /// What to do and what a positive result looks like.
    pub text: String,
    /// Source.
    #[serde(default)]
    pub source: Option<String>,
}

/// `bonds:` of a group; omitted kinds are 0.
#[derive(Clone, Copy, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawBonds {
    /// From a heteroatom to an outside carbon.
    #[serde(default)]
    pub hetero: u32,
    /// From a heteroatom to an outside carbon or H.
    #[serde(default)]
    pub hetero_or_h: u32,
    /// From a group carbon to an outside atom (never H).
    #[serde(default)]
    pub carbon: u32,
    /// From a group carbon to an outside atom or H.
    #[serde(default)]
    pub carbon_or_h: u32,
}

/// One IR band of a group, skeleton rule or pattern.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawBand {
    /// What vibrates.
    pub label: String,
    /// `[lo, hi]` in cm⁻¹ (condensed phase unless overridden).
    pub range: RawRange,
    /// Expected strength.
    pub strength: ExpectedStrength,
    /// Expected shape (default `any`).
    #[serde(default = "shape_any")]
    pub shape: ExpectedShape,
    /// Diagnostic or supporting.
    pub role: BandRole,
    /// Tag of a set of diagnostic bands of which one suffices.
    #[serde(default)]
    pub one_of: Option<String>,
    /// The band may be weak or absent.
    #[serde(default)]
    pub may_be_absent: bool,
    /// Technique-specific overrides.
    #[serde(default)]
    pub by_technique: BTreeMap<Technique, RawOverride>,
    /// Documented shifts.
    #[serde(default)]
    pub shifts: Vec<RawShift>,
    /// Source of the values.
    #[serde(default)]
    pub source: Option<String>,
}

fn shape_any() -> ExpectedShape {
    ExpectedShape::Any
}

/// One entry of `by_technique`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawOverride {
    /// Replacement range.
    #[serde(default)]
    pub range: Option<RawRange>,
    /// Replacement strength.
    #[serde(default)]
    pub strength: Option<ExpectedStrength>,
    /// Replacement shape.
    #[serde(default)]
    pub shape: Option<ExpectedShape>,
    /// Replacement `may_be_absent`.
    #[serde(default)]
    pub may_be_absent: Option<bool>,
    /// Source of the override.
    #[serde(default)]
    pub source: Option<String>,
}

/// One entry of `shifts`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawShift {
    /// Cause, e.g. `conjugation`.
    pub cause: String,
    /// `[lo, hi]` shift in cm⁻¹ (negative = lower wavenumber).
    pub by: RawRange,
    /// Source.
    #[serde(default)]
    pub source: Option<String>,
}

/// One MS clue: exactly one of `ion` and `loss`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawMsClue {
    /// Characteristic fragment ion, nominal m/z.
    #[serde(default)]
    pub ion: Option<f64>,
    /// Characteristic neutral loss from the molecular ion, u.
    #[serde(default)]
    pub loss: Option<f64>,
    /// What it is.
    pub label: String,
    /// Source.
    #[serde(default)]
    pub source: Option<String>,
}

/// One item of `skeleton`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSkeleton {
    /// Stable id.
    pub id: String,
    /// Group ids (or `sp3_carbon`) of which the candidate needs one.
    pub needs_any: Vec<String>,
    /// The band.
    pub band: RawBand,
}

/// One item of `artefacts`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawArtefact {
    /// Stable id.
    pub id: String,
    /// What it is.
    pub label: String,
    /// `[lo, hi]` cm⁻¹.
    pub range: RawRange,
    /// Techniques it appears under; empty or omitted means any.
    #[serde(default)]
    pub techniques: Vec<Technique>,
    /// Typical shape (default `any`).
    #[serde(default = "shape_any")]
    pub shape: ExpectedShape,
    /// Source.
    #[serde(default)]
    pub source: Option<String>,
}

/// One item of `patterns`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawPattern {
    /// Stable id.
    pub id: String,
    /// Feature it indicates.
    pub feature: String,
    /// Group id it supports.
    pub supports: String,
    /// The bands, expected together.
    pub bands: Vec<RawBand>,
    /// Source.
    #[serde(default)]
    pub source: Option<String>,
}

/// One item of `technique_effects`.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawTechniqueEffect {
    /// Stable id.
    pub id: String,
    /// Technique concerned.
    pub technique: Technique,
    /// `[lo, hi]` cm⁻¹ affected.
    pub range: RawRange,
    /// Strength classes bands there may lose.
    pub weaker_by: u8,
    /// What happens.
    pub label: String,
    /// Source.
    #[serde(default)]
    pub source: Option<String>,
}
