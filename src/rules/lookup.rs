//! "Which rules cover this wavenumber?": the analyst's quick look-up behind `rules at`.
//!
//! A rule covers a position when its range (the technique's override, when a technique
//! is given) contains it. Matches are ordered by how central the position is: the
//! distance from the range centre divided by the half-width (0 at the centre, 1 at an
//! edge), so a narrow range centred on the position beats a wide one that merely touches.

use super::model::{
    BandRole, BandRule, Catalogue, ExpectedShape, ExpectedStrength, Range, RuleRef, Technique,
};
use serde::Serialize;

/// What kind of rule a coverage comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum CoverageKind {
    /// A band of a functional group.
    Group,
    /// A skeleton C–H band.
    Skeleton,
    /// A band of a fingerprint pattern.
    Pattern,
    /// A sample or instrument artefact.
    Artefact,
}

/// One rule band covering the position asked about.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Coverage {
    /// Kind of rule.
    pub kind: CoverageKind,
    /// Group id or rule id.
    pub id: String,
    /// For a group: its id and ancestors, nearest first; for a pattern: the group it
    /// supports; otherwise empty.
    pub lineage: Vec<String>,
    /// What vibrates (or what the artefact is).
    pub label: String,
    /// The range that covers the position (after the technique's override).
    pub range: Range,
    /// Diagnostic or supporting (artefacts: none).
    pub role: Option<BandRole>,
    /// Expected strength (artefacts: none).
    pub strength: Option<ExpectedStrength>,
    /// Expected shape.
    pub shape: ExpectedShape,
    /// |position − centre| / half-width: 0 at the centre, 1 at an edge.
    pub distance: f64,
    /// Source of the range.
    pub source: String,
    /// Where the rule is defined.
    pub defined_at: RuleRef,
}

/// Every rule band whose range contains `at` (cm⁻¹), best match first. With a technique,
/// technique overrides apply and artefacts of other techniques are left out.
pub fn rules_at(catalogue: &Catalogue, at: f64, technique: Option<Technique>) -> Vec<Coverage> {
    let mut out = Vec::new();
    for group in &catalogue.groups {
        for band in &group.bands {
            push_band(
                &mut out,
                CoverageKind::Group,
                &group.id,
                catalogue.lineage(&group.id),
                band,
                at,
                technique,
            );
        }
    }
    for rule in &catalogue.skeleton {
        push_band(
            &mut out,
            CoverageKind::Skeleton,
            &rule.id,
            Vec::new(),
            &rule.band,
            at,
            technique,
        );
    }
    for rule in &catalogue.patterns {
        for band in &rule.bands {
            push_band(
                &mut out,
                CoverageKind::Pattern,
                &rule.id,
                vec![rule.supports.clone()],
                band,
                at,
                technique,
            );
        }
    }
    for rule in &catalogue.artefacts {
        let applies = match technique {
            Some(t) => rule.techniques.is_empty() || rule.techniques.contains(&t),
            None => true,
        };
        if applies && rule.range.contains_within(at, 0.0) {
            out.push(Coverage {
                kind: CoverageKind::Artefact,
                id: rule.id.clone(),
                lineage: Vec::new(),
                label: rule.label.clone(),
                range: rule.range,
                role: None,
                strength: None,
                shape: rule.shape,
                distance: distance(rule.range, at),
                source: rule.source.clone(),
                defined_at: rule.defined_at.clone(),
            });
        }
    }
    out.sort_by(|a, b| {
        a.distance
            .total_cmp(&b.distance)
            .then(a.kind.cmp(&b.kind))
            .then(a.id.cmp(&b.id))
    });
    out
}

/// The band as seen under `technique` (override applied), or as written.
pub fn effective_range(band: &BandRule, technique: Option<Technique>) -> Range {
    technique
        .and_then(|t| band.by_technique.get(&t))
        .and_then(|o| o.range)
        .unwrap_or(band.range)
}

fn push_band(
    out: &mut Vec<Coverage>,
    kind: CoverageKind,
    id: &str,
    lineage: Vec<String>,
    band: &BandRule,
    at: f64,
    technique: Option<Technique>,
) {
    let range = effective_range(band, technique);
    if !range.contains_within(at, 0.0) {
        return;
    }
    let over = technique.and_then(|t| band.by_technique.get(&t));
    out.push(Coverage {
        kind,
        id: id.to_owned(),
        lineage,
        label: band.label.clone(),
        range,
        role: Some(band.role),
        strength: Some(over.and_then(|o| o.strength).unwrap_or(band.strength)),
        shape: over.and_then(|o| o.shape).unwrap_or(band.shape),
        distance: distance(range, at),
        source: over
            .filter(|o| o.range.is_some())
            .map_or(band.source.clone(), |o| o.source.clone()),
        defined_at: band.defined_at.clone(),
    });
}

fn distance(range: Range, at: f64) -> f64 {
    let half = ((range.hi - range.lo) / 2.0).max(f64::EPSILON);
    (at - range.centre()).abs() / half
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rules::load;

    const TEXT: &str = "\
groups:
  - id: wide
    name: wide
    atoms: { O: 1 }
    dbe: 0
    bonds: { hetero: 2 }
    source: s
    bands:
      - { label: wide band, range: [1600, 1800], strength: strong, role: diagnostic, source: s }
  - id: narrow
    name: narrow
    atoms: { O: 1 }
    dbe: 0
    bonds: { hetero: 2 }
    source: s
    bands:
      - label: narrow band
        range: [1710, 1730]
        strength: strong
        role: diagnostic
        source: s
        by_technique:
          gas: { range: [1740, 1760], source: s }
artefacts:
  - { id: moisture, label: water, range: [1600, 1700], techniques: [KBr], source: s }
";

    fn ids(matches: &[Coverage]) -> Vec<&str> {
        matches.iter().map(|m| m.id.as_str()).collect()
    }

    #[test]
    fn the_most_central_range_comes_first() {
        let (catalogue, _) = load([("t.yaml", TEXT)]);
        let m = rules_at(&catalogue, 1720.0, None);
        assert_eq!(ids(&m), ["narrow", "wide"]);
        assert_eq!(m[0].distance, 0.0);
        assert!((m[1].distance - 0.2).abs() < 1e-12);
    }

    #[test]
    fn a_technique_applies_its_ranges_and_its_artefacts() {
        let (catalogue, _) = load([("t.yaml", TEXT)]);
        assert_eq!(
            ids(&rules_at(&catalogue, 1750.0, Some(Technique::Gas))),
            ["narrow", "wide"]
        );
        assert_eq!(
            ids(&rules_at(&catalogue, 1720.0, Some(Technique::Gas))),
            ["wide"]
        );
        assert_eq!(
            ids(&rules_at(&catalogue, 1650.0, Some(Technique::Atr))),
            ["wide"]
        );
        assert_eq!(
            ids(&rules_at(&catalogue, 1650.0, Some(Technique::Kbr))),
            ["moisture", "wide"]
        );
        assert_eq!(
            ids(&rules_at(&catalogue, 1650.0, None)),
            ["moisture", "wide"]
        );
    }

    #[test]
    fn nothing_covers_an_empty_region() {
        let (catalogue, _) = load([("t.yaml", TEXT)]);
        assert!(rules_at(&catalogue, 2500.0, None).is_empty());
    }
}
