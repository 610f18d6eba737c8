//! Band matching and diagnostic-band presence (docs/engine.md, evidence semantics 2).
//!
//! A band rule is first made *effective* for the case's technique (its `by_technique`
//! override applied; when the technique is unknown every variant counts, which can only
//! keep more candidates). An observed band *matches* an effective rule when
//! - its position lies in the range widened by the tolerance on each side,
//! - its shape is only a hint: a shape word (or a measured width) that disagrees with the
//!   rule lowers the match quality but never refuses the match, because band lists
//!   misreport shape (a liquid's overlapping CH3/CH2 stretches or a vapour's rotational
//!   contour make one C–H band 40–80 cm⁻¹ wide that a picker calls broad; free O–H and N–H
//!   bands sharpen in dilute or vapour samples),
//! - a rule that expects a weak band (an overtone, a combination band) never accounts for
//!   a strong one,
//! - and, for *presence*, its strength is compatible: observed class ≥ expected class − 1
//!   − (technique weakening at that position, e.g. ATR above 2500 cm⁻¹), with `variable`
//!   and `weak` expectations met by any band.
//!
//! A group present needs every diagnostic band whose range lies wholly inside the measured
//! window, unless the band `may_be_absent` (then its absence is a score penalty). Bands
//! sharing a `one_of` tag form a set of which one suffices. A group missing one is excluded
//! before enumeration, and the missing band is the decisive evidence.

use crate::case::ObservedBand;
use crate::ir::{Band, Shape, Strength};
use crate::rules::{
    BandRole, BandRule, Catalogue, ExpectedShape, ExpectedStrength, Range, Technique,
};

/// A band rule as it applies under one technique.
#[derive(Clone, Debug, PartialEq)]
pub struct Effective {
    /// Expected range.
    pub range: Range,
    /// Expected strength.
    pub strength: ExpectedStrength,
    /// Expected shape.
    pub shape: ExpectedShape,
    /// Whether absence is allowed.
    pub may_be_absent: bool,
    /// The technique whose override produced this variant, if any.
    pub via: Option<Technique>,
}

/// The variants of `rule` that apply: the one for `technique`, or, when the technique is
/// unknown, the base rule and every override.
pub fn effective_variants(rule: &BandRule, technique: Option<Technique>) -> Vec<Effective> {
    let base = Effective {
        range: rule.range,
        strength: rule.strength,
        shape: rule.shape,
        may_be_absent: rule.may_be_absent,
        via: None,
    };
    let apply = |t: Technique| {
        rule.by_technique.get(&t).map(|o| Effective {
            range: o.range.unwrap_or(rule.range),
            strength: o.strength.unwrap_or(rule.strength),
            shape: o.shape.unwrap_or(rule.shape),
            may_be_absent: o.may_be_absent.unwrap_or(rule.may_be_absent),
            via: Some(t),
        })
    };
    match technique {
        Some(t) => vec![apply(t).unwrap_or(base)],
        None => std::iter::once(base)
            .chain(rule.by_technique.keys().filter_map(|t| apply(*t)))
            .collect(),
    }
}

/// How many strength classes weaker than expected a band at `at` may appear under the
/// technique (the largest applicable technique effect; all techniques when unknown).
pub fn weakening_at(catalogue: &Catalogue, technique: Option<Technique>, at: f64) -> u8 {
    catalogue
        .technique_effects
        .iter()
        .filter(|e| technique.is_none_or(|t| t == e.technique))
        .filter(|e| e.range.contains_within(at, 0.0))
        .map(|e| e.weaker_by)
        .max()
        .unwrap_or(0)
}

fn class(s: Strength) -> i32 {
    match s {
        Strength::Weak => 0,
        Strength::Medium => 1,
        Strength::Strong => 2,
    }
}

fn expected_class(s: ExpectedStrength) -> Option<i32> {
    match s {
        ExpectedStrength::Weak => Some(0),
        ExpectedStrength::Medium => Some(1),
        ExpectedStrength::Strong => Some(2),
        ExpectedStrength::Variable => None,
    }
}

/// True when an observed strength can stand for the expected one (see the module doc).
pub fn strength_compatible(observed: Strength, expected: ExpectedStrength, weakening: u8) -> bool {
    match expected_class(expected) {
        None => true,
        Some(e) => class(observed) >= e - 1 - i32::from(weakening),
    }
}

/// True unless an observed broad band meets an artefact expecting a sharp one (artefacts
/// are the explanation of last resort, so for them the shape word is held to).
pub fn shape_compatible(observed: Option<Shape>, expected: ExpectedShape) -> bool {
    !(observed == Some(Shape::Broad) && expected == ExpectedShape::Sharp)
}

/// Match quality in [0, 1] of a band against an effective rule whose position and shape
/// are compatible, else `None`. Quality = 0.5·position + 0.3·strength + 0.2·shape, where
/// position = 1 − |at − centre| / (half-width + tolerance), strength = 1 when the class
/// agrees (or the rule says variable), 0.7 one class stronger, 0.5 one class weaker,
/// 0.4 two stronger, 0 otherwise, and shape = 1 agreeing, 0.75 rule says any,
/// 0.5 not observed, 0.3 sharp for broad.
pub fn quality(band: &Band, eff: &Effective, tolerance: f64) -> Option<f64> {
    if !eff.range.contains_within(band.at, tolerance) {
        return None;
    }
    if eff.strength == ExpectedStrength::Weak && band.strength == Strength::Strong {
        return None;
    }
    let half = (eff.range.hi - eff.range.lo) / 2.0;
    let position =
        (1.0 - (band.at - eff.range.centre()).abs() / (half + tolerance)).clamp(0.0, 1.0);
    let strength = match expected_class(eff.strength) {
        None => 1.0,
        Some(e) => match class(band.strength) - e {
            0 => 1.0,
            1 => 0.7,
            2 => 0.4,
            -1 => 0.5,
            _ => 0.0,
        },
    };
    let shape = match (observed_shape(band), eff.shape) {
        (None, _) => 0.5,
        (Some(_), ExpectedShape::Any) => 0.75,
        (Some(Shape::Broad), ExpectedShape::Broad) | (Some(Shape::Sharp), ExpectedShape::Sharp) => {
            1.0
        }
        (Some(Shape::Sharp), ExpectedShape::Broad) => 0.3,
        (Some(_), _) => 0.1,
    };
    Some(0.5 * position + 0.3 * strength + 0.2 * shape)
}

/// Measured width from which a band's height understates its intensity by a class, cm⁻¹.
pub const VERY_BROAD_CM1: f64 = 200.0;

/// The shape a band shows: its measured width decides when known (broad from
/// [`crate::ir::band::BROAD_FROM_CM1`]), else the shape word, which is a hint.
pub fn observed_shape(band: &Band) -> Option<Shape> {
    band.width.map(Shape::from_width).or(band.shape)
}

/// True when the band reads as broad (by width or word) where the rule expects a sharp
/// band: the match stands, and the report says how the band was taken.
pub fn broad_taken_as_sharp(band: &Band, expected: ExpectedShape) -> bool {
    observed_shape(band) == Some(Shape::Broad) && expected == ExpectedShape::Sharp
}

/// Best quality with which `band` is *explained* by `rule` (position; shape and strength
/// only lower the quality, except that a weak-band rule never explains a strong band).
pub fn explains(
    band: &Band,
    rule: &BandRule,
    technique: Option<Technique>,
    tolerance: f64,
) -> Option<f64> {
    effective_variants(rule, technique)
        .iter()
        .filter_map(|e| quality(band, e, tolerance))
        .fold(None, |best: Option<f64>, q| {
            Some(best.map_or(q, |b| b.max(q)))
        })
}

/// Best quality with which `band` *satisfies* `rule` (position, shape and strength).
pub fn satisfies(
    band: &Band,
    rule: &BandRule,
    catalogue: &Catalogue,
    technique: Option<Technique>,
    tolerance: f64,
) -> Option<f64> {
    let weakening = weakening_at(catalogue, technique, band.at);
    // Strength classes compare heights, but a hydrogen-bonded envelope spreads its area
    // over hundreds of cm⁻¹: a very broad O–H of a solid phenol or diol looks weak beside
    // sharp bands of the same intensity (common practice). A band measured at least
    // VERY_BROAD_CM1 wide meeting a rule that expects a broad band may therefore look one
    // class weaker still (a shape word alone is not enough: a weak broad hump of absorbed
    // water must not pass for an alcohol's O–H).
    let broad = band.width.is_some_and(|w| w >= VERY_BROAD_CM1);
    effective_variants(rule, technique)
        .iter()
        .filter(|e| {
            let spread = u8::from(broad && e.shape == ExpectedShape::Broad);
            strength_compatible(band.strength, e.strength, weakening + spread)
        })
        .filter_map(|e| quality(band, e, tolerance))
        .fold(None, |best: Option<f64>, q| {
            Some(best.map_or(q, |b| b.max(q)))
        })
}

/// Where a spectrum can be observed: the measured window less the regions where the
/// solvent or cell is opaque.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Observable<'a> {
    /// Measured window `(low, high)`, cm⁻¹.
    pub window: (f64, f64),
    /// Opaque regions inside it.
    pub opaque: &'a [(f64, f64)],
}

impl Observable<'_> {
    /// True when every point of `lo..=hi` can be observed.
    pub fn covers(&self, lo: f64, hi: f64) -> bool {
        lo >= self.window.0
            && hi <= self.window.1
            && !self.opaque.iter().any(|&(a, b)| lo < b && hi > a)
    }
}

/// Whether a rule is demanded: diagnostic, not allowed to be absent under every variant
/// that applies, and with every variant's range wholly observable (inside the measured
/// window, clear of opaque regions: a band that cannot be seen is "not observable",
/// never "absent").
fn demand(rule: &BandRule, technique: Option<Technique>, observable: Observable<'_>) -> Demand {
    if rule.role != BandRole::Diagnostic {
        return Demand::No;
    }
    let variants = effective_variants(rule, technique);
    let outside = variants
        .iter()
        .any(|e| !observable.covers(e.range.lo, e.range.hi));
    if outside {
        Demand::No
    } else if variants.iter().any(|e| e.may_be_absent) {
        Demand::Soft
    } else {
        Demand::Hard
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Demand {
    No,
    Soft,
    Hard,
}

/// One band rule of a group and the observed band that satisfied it best.
#[derive(Clone, Debug, PartialEq)]
pub struct RuleMatch {
    /// Index of the rule in `Group::bands`.
    pub rule_idx: usize,
    /// Index of the observed band in the active band list.
    pub band_idx: usize,
    /// Match quality.
    pub quality: f64,
}

/// The verdict on one group from the observed bands alone.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Presence {
    /// Rules (diagnostic or supporting) satisfied by an observed band.
    pub matched: Vec<RuleMatch>,
    /// Demanded diagnostic rules that may be absent and were not seen (score penalty).
    pub absent_exceptions: Vec<usize>,
    /// Supporting rules expected strong, inside the window, not seen (score penalty).
    pub missing_support: Vec<usize>,
    /// Demanded rules (or `one_of` sets, by their first rule) that no band satisfies:
    /// the group is ruled out.
    pub missing: Vec<Vec<usize>>,
}

/// Evaluates the presence of every band rule of `rules` against `bands`. `set_aside`
/// bands are observations the caller does not trust (a conflict search sets them aside):
/// the region they sit in is uncertain, so any rule whose range covers one counts as
/// possibly present — setting evidence aside can only keep more groups.
pub fn presence(
    rules: &[BandRule],
    bands: &[&ObservedBand],
    set_aside: &[&ObservedBand],
    catalogue: &Catalogue,
    technique: Option<Technique>,
    observable: Observable<'_>,
    tolerance: f64,
) -> Presence {
    let mut out = Presence {
        matched: Vec::new(),
        absent_exceptions: Vec::new(),
        missing_support: Vec::new(),
        missing: Vec::new(),
    };
    let mut seen = vec![false; rules.len()];
    for (rule_idx, rule) in rules.iter().enumerate() {
        let best = bands
            .iter()
            .enumerate()
            .filter_map(|(band_idx, b)| {
                satisfies(&b.band, rule, catalogue, technique, tolerance).map(|q| (band_idx, q))
            })
            .max_by(|a, b| a.1.total_cmp(&b.1));
        let uncertain = set_aside.iter().any(|b| {
            effective_variants(rule, technique)
                .iter()
                .any(|e| e.range.contains_within(b.band.at, tolerance))
        });
        if uncertain {
            seen[rule_idx] = true;
        }
        if let Some((band_idx, quality)) = best {
            seen[rule_idx] = true;
            out.matched.push(RuleMatch {
                rule_idx,
                band_idx,
                quality,
            });
        }
    }
    // Diagnostic demands, one_of sets grouped by tag in order of first appearance.
    let mut handled_tags: Vec<&str> = Vec::new();
    for (rule_idx, rule) in rules.iter().enumerate() {
        match &rule.one_of {
            Some(tag) => {
                if handled_tags.contains(&tag.as_str()) {
                    continue;
                }
                handled_tags.push(tag);
                let members: Vec<usize> = (0..rules.len())
                    .filter(|i| rules[*i].one_of.as_deref() == Some(tag.as_str()))
                    .collect();
                let demands: Vec<Demand> = members
                    .iter()
                    .map(|i| demand(&rules[*i], technique, observable))
                    .collect();
                // A member that is not demanded (outside the window, or not diagnostic)
                // could be the one present: the set asks for nothing.
                if demands.contains(&Demand::No) || members.iter().any(|i| seen[*i]) {
                    continue;
                }
                if demands.iter().all(|d| *d == Demand::Hard) {
                    out.missing.push(members);
                } else {
                    out.absent_exceptions.push(members[0]);
                }
            }
            None => match demand(rule, technique, observable) {
                Demand::Hard if !seen[rule_idx] => out.missing.push(vec![rule_idx]),
                Demand::Soft if !seen[rule_idx] => out.absent_exceptions.push(rule_idx),
                Demand::No
                    if rule.role == BandRole::Supporting
                        && !seen[rule_idx]
                        && rule.strength == ExpectedStrength::Strong
                        && observable.covers(rule.range.lo, rule.range.hi) =>
                {
                    out.missing_support.push(rule_idx)
                }
                _ => {}
            },
        }
    }
    out
}

/// Words for a demanded band, e.g. `no band at 1705–1725 cm⁻¹ (±15) of medium or stronger`.
pub fn describe_missing(rule: &BandRule, technique: Option<Technique>, tolerance: f64) -> String {
    let variants = effective_variants(rule, technique);
    let ranges: Vec<String> = variants
        .iter()
        .map(|e| format!("{:.0}–{:.0}", e.range.lo, e.range.hi))
        .collect();
    let mut ranges_dedup = ranges.clone();
    ranges_dedup.dedup();
    let strength = match variants.first().map(|e| e.strength) {
        Some(ExpectedStrength::Strong) => " of medium or stronger",
        Some(ExpectedStrength::Medium) => " of weak or stronger",
        _ => "",
    };
    let shape = match variants.first().map(|e| e.shape) {
        Some(ExpectedShape::Sharp) => ", not broad",
        _ => "",
    };
    format!(
        "no band at {} cm⁻¹ (±{tolerance:.0}){strength}{shape} for the {}",
        ranges_dedup.join(" or "),
        rule.label
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::testkit::small_catalogue;

    fn b(at: f64, strength: Strength, shape: Option<Shape>) -> Band {
        Band::new(at, strength).with_shape(shape)
    }

    fn effective(lo: f64, hi: f64, strength: ExpectedStrength, shape: ExpectedShape) -> Effective {
        Effective {
            range: Range { lo, hi },
            strength,
            shape,
            may_be_absent: false,
            via: None,
        }
    }

    #[test]
    fn a_band_labelled_broad_still_matches_a_sharp_rule_but_scores_lower() {
        // common practice: a liquid's CH3/CH2 stretches overlap into one band 40–80 cm⁻¹
        // wide that a picker may call broad; the C–H rule must still account for it.
        let ch = effective(
            2840.0,
            3000.0,
            ExpectedStrength::Variable,
            ExpectedShape::Sharp,
        );
        let sharp = quality(&b(2962.0, Strength::Strong, Some(Shape::Sharp)), &ch, 15.0);
        let broad = quality(&b(2962.0, Strength::Strong, Some(Shape::Broad)), &ch, 15.0);
        assert!(matches!((sharp, broad), (Some(s), Some(w)) if s > w && w > 0.0));
        assert!(broad_taken_as_sharp(
            &b(2962.0, Strength::Strong, Some(Shape::Broad)),
            ExpectedShape::Sharp
        ));
    }

    #[test]
    fn a_measured_width_outranks_the_shape_word() {
        let word_broad = b(2962.0, Strength::Strong, Some(Shape::Broad)).with_width(Some(45.0));
        assert_eq!(observed_shape(&word_broad), Some(Shape::Sharp));
        let wide = b(3340.0, Strength::Strong, None).with_width(Some(250.0));
        assert_eq!(observed_shape(&wide), Some(Shape::Broad));
    }

    #[test]
    fn a_weak_band_rule_never_accounts_for_a_strong_band() {
        // common practice: overtone and combination bands are weak; a strong band in
        // their window is a fundamental that a group must explain.
        let overtone = effective(1660.0, 2000.0, ExpectedStrength::Weak, ExpectedShape::Any);
        assert!(quality(&b(1715.0, Strength::Strong, None), &overtone, 15.0).is_none());
        assert!(quality(&b(1715.0, Strength::Medium, None), &overtone, 15.0).is_some());
        assert!(quality(&b(1715.0, Strength::Weak, None), &overtone, 15.0).is_some());
    }

    #[test]
    fn strength_may_be_one_class_weaker_and_more_under_atr() {
        assert!(strength_compatible(
            Strength::Medium,
            ExpectedStrength::Strong,
            0
        ));
        assert!(!strength_compatible(
            Strength::Weak,
            ExpectedStrength::Strong,
            0
        ));
        assert!(strength_compatible(
            Strength::Weak,
            ExpectedStrength::Strong,
            1
        ));
        assert!(strength_compatible(
            Strength::Weak,
            ExpectedStrength::Variable,
            0
        ));
    }

    #[test]
    fn a_broad_band_is_never_a_sharp_one() {
        assert!(!shape_compatible(Some(Shape::Broad), ExpectedShape::Sharp));
        assert!(shape_compatible(Some(Shape::Sharp), ExpectedShape::Broad));
        assert!(shape_compatible(None, ExpectedShape::Sharp));
    }

    #[test]
    fn vapour_phase_override_moves_the_alcohol_band() {
        // common practice (from memory): free O–H of an alcohol vapour sits near 3650, sharp.
        let cat = small_catalogue();
        let rule = &cat
            .group("alcohol_primary")
            .map(|g| g.bands[0].clone())
            .unwrap_or_else(|| panic!("rule"));
        let free = b(3650.0, Strength::Medium, Some(Shape::Sharp));
        assert!(satisfies(&free, rule, &cat, Some(Technique::Gas), 15.0).is_some());
        assert!(satisfies(&free, rule, &cat, Some(Technique::Film), 15.0).is_none());
        // technique unknown: either variant may apply
        assert!(satisfies(&free, rule, &cat, None, 15.0).is_some());
    }

    #[test]
    fn quality_is_highest_at_the_centre() {
        let eff = Effective {
            range: Range {
                lo: 1700.0,
                hi: 1720.0,
            },
            strength: ExpectedStrength::Strong,
            shape: ExpectedShape::Any,
            may_be_absent: false,
            via: None,
        };
        let centre = quality(&b(1710.0, Strength::Strong, None), &eff, 10.0).unwrap_or(0.0);
        let edge = quality(&b(1725.0, Strength::Strong, None), &eff, 10.0).unwrap_or(0.0);
        assert!(centre > edge && edge > 0.0);
        assert!(quality(&b(1731.0, Strength::Strong, None), &eff, 10.0).is_none());
    }
}
