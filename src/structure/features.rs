//! Structure-level features an IR spectrum can speak to, derived from one structure:
//! benzene-ring substitution pattern, alkene substitution type, terminal or internal
//! alkyne, carbonyl conjugation, alcohol class — and a simple scoring of those features
//! against observed bands, each check with its explanation.
//!
//! Ring and alkene substitution patterns are read from the rules catalogue's `patterns:`
//! (one source for the engine and the structure ranking): each pattern feature names the
//! catalogue pattern ids it stands for ([`RingPattern::pattern_ids`],
//! [`AlkenePattern::pattern_ids`]), and a test keeps every named id in the shipped
//! catalogue. A feature whose pattern the catalogue lacks has nothing to check. The
//! alkyne, carbonyl and alcohol expectations below are facts of the trade
//! (`common practice`, values `from memory`). All of them support or weaken a structure
//! and never rule one out (most lie in the fingerprint region, where bands support or weaken and alone rule
//! nothing out; see docs/engine.md, evidence semantics 4).

use super::aromatic::aromatic_rings;
use super::molecule::{Bond, Element, Molecule};
use crate::ir::{Band, Strength};
use crate::rules::{ExpectedStrength, PatternRule};
use std::fmt;

/// Substitution pattern of one benzene ring.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum RingPattern {
    /// No substituent (benzene itself).
    Unsubstituted,
    /// One substituent.
    Mono,
    /// 1,2-disubstituted.
    Ortho,
    /// 1,3-disubstituted.
    Meta,
    /// 1,4-disubstituted.
    Para,
    /// 1,2,3-trisubstituted.
    Tri123,
    /// 1,2,4-trisubstituted.
    Tri124,
    /// 1,3,5-trisubstituted.
    Tri135,
    /// 1,2,3,4-tetrasubstituted.
    Tetra1234,
    /// 1,2,3,5-tetrasubstituted.
    Tetra1235,
    /// 1,2,4,5-tetrasubstituted.
    Tetra1245,
    /// Five substituents.
    Penta,
    /// Six substituents.
    Hexa,
}

/// Substitution type of one C=C (heavy-atom substituents on its two carbons).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum AlkenePattern {
    /// H2C=CH2.
    Unsubstituted,
    /// R–CH=CH2 (monosubstituted).
    Vinyl,
    /// R2C=CH2 (1,1-disubstituted).
    Vinylidene,
    /// R–CH=CH–R: cis or trans (not distinguished by the constitution).
    Disubstituted12,
    /// R2C=CH–R.
    Trisubstituted,
    /// R2C=CR2.
    Tetrasubstituted,
}

/// One C≡C.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum AlkynePattern {
    /// ≡C–H present.
    Terminal,
    /// Both carbons substituted.
    Internal,
}

/// What a C=O is conjugated with.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Conjugation {
    /// Neither an aromatic ring nor a C=C next to the carbonyl carbon.
    None,
    /// The carbonyl carbon is bonded to an aromatic ring carbon.
    AromaticRing,
    /// The carbonyl carbon is bonded to a carbon of a C=C.
    Alkene,
}

/// Kind of carbonyl, as far as band positions go.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum CarbonylKind {
    /// Two carbon neighbours.
    Ketone,
    /// At least one hydrogen.
    Aldehyde,
    /// C(=O)OH.
    CarboxylicAcid,
    /// C(=O)O–C (esters and anhydrides).
    Ester,
    /// C(=O)N.
    Amide,
    /// C(=O)X.
    AcylHalide,
    /// Anything else (ureas, carbamates, ...).
    Other,
}

/// One C=O with its kind and conjugation.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Carbonyl {
    /// Kind.
    pub kind: CarbonylKind,
    /// Conjugation partner.
    pub conjugation: Conjugation,
}

/// Class of an alcohol: carbon neighbours of the carbinol carbon (methanol counts primary).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum AlcoholClass {
    /// RCH2OH (and CH3OH).
    Primary,
    /// R2CHOH.
    Secondary,
    /// R3COH.
    Tertiary,
}

/// The structure-level features of one structure, each list in a deterministic order.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct StructureFeatures {
    /// One entry per benzene ring.
    pub rings: Vec<RingPattern>,
    /// One entry per non-aromatic C=C.
    pub alkenes: Vec<AlkenePattern>,
    /// One entry per C≡C.
    pub alkynes: Vec<AlkynePattern>,
    /// One entry per C=O carbon.
    pub carbonyls: Vec<Carbonyl>,
    /// One entry per alcohol O–H.
    pub alcohols: Vec<AlcoholClass>,
}

macro_rules! words {
    ($t:ty { $($v:ident => $w:literal),* $(,)? }) => {
        impl $t {
            /// The word used in reports and JSON.
            pub fn word(self) -> &'static str {
                match self { $(Self::$v => $w),* }
            }
        }
        impl fmt::Display for $t {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str(self.word())
            }
        }
        impl serde::Serialize for $t {
            fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
                s.serialize_str(self.word())
            }
        }
    };
}

words!(RingPattern {
    Unsubstituted => "unsubstituted", Mono => "mono", Ortho => "ortho", Meta => "meta",
    Para => "para", Tri123 => "1,2,3-tri", Tri124 => "1,2,4-tri", Tri135 => "1,3,5-tri",
    Tetra1234 => "1,2,3,4-tetra", Tetra1235 => "1,2,3,5-tetra", Tetra1245 => "1,2,4,5-tetra",
    Penta => "penta", Hexa => "hexa",
});
words!(AlkenePattern {
    Unsubstituted => "unsubstituted", Vinyl => "vinyl", Vinylidene => "vinylidene",
    Disubstituted12 => "1,2-disubstituted", Trisubstituted => "trisubstituted",
    Tetrasubstituted => "tetrasubstituted",
});
words!(AlkynePattern { Terminal => "terminal", Internal => "internal" });
words!(Conjugation { None => "none", AromaticRing => "aromatic_ring", Alkene => "alkene" });
words!(CarbonylKind {
    Ketone => "ketone", Aldehyde => "aldehyde", CarboxylicAcid => "carboxylic_acid",
    Ester => "ester", Amide => "amide", AcylHalide => "acyl_halide", Other => "other",
});
words!(AlcoholClass { Primary => "primary", Secondary => "secondary", Tertiary => "tertiary" });

impl serde::Serialize for Carbonyl {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Carbonyl", 2)?;
        st.serialize_field("kind", &self.kind)?;
        st.serialize_field("conjugation", &self.conjugation)?;
        st.end()
    }
}

impl serde::Serialize for StructureFeatures {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("StructureFeatures", 5)?;
        st.serialize_field("rings", &self.rings)?;
        st.serialize_field("alkenes", &self.alkenes)?;
        st.serialize_field("alkynes", &self.alkynes)?;
        st.serialize_field("carbonyls", &self.carbonyls)?;
        st.serialize_field("alcohols", &self.alcohols)?;
        st.end()
    }
}

/// Substitution pattern of a benzene ring from its substituted positions (0..6, ring order).
fn ring_pattern(positions: &[usize]) -> RingPattern {
    let gaps = |p: &[usize]| -> Vec<usize> {
        let mut g: Vec<usize> = (0..p.len())
            .map(|k| (p[(k + 1) % p.len()] + 6 - p[k]) % 6)
            .map(|d| if d == 0 { 6 } else { d })
            .collect();
        g.sort_unstable();
        g
    };
    match positions.len() {
        0 => RingPattern::Unsubstituted,
        1 => RingPattern::Mono,
        2 => match gaps(positions)[0] {
            1 => RingPattern::Ortho,
            2 => RingPattern::Meta,
            _ => RingPattern::Para,
        },
        3 => match gaps(positions).as_slice() {
            [1, 1, _] => RingPattern::Tri123,
            [2, 2, 2] => RingPattern::Tri135,
            _ => RingPattern::Tri124,
        },
        4 => {
            let free: Vec<usize> = (0..6).filter(|k| !positions.contains(k)).collect();
            match gaps(&free)[0] {
                1 => RingPattern::Tetra1234,
                2 => RingPattern::Tetra1235,
                _ => RingPattern::Tetra1245,
            }
        }
        5 => RingPattern::Penta,
        _ => RingPattern::Hexa,
    }
}

/// Derives the features of `m` (aromatised).
pub fn features(m: &Molecule) -> StructureFeatures {
    let mut f = StructureFeatures {
        rings: benzene_rings(m),
        alkenes: Vec::new(),
        alkynes: Vec::new(),
        carbonyls: (0..m.n_atoms()).filter_map(|c| carbonyl(m, c)).collect(),
        alcohols: (0..m.n_atoms()).filter_map(|o| alcohol(m, o)).collect(),
    };
    for (a, b, bond) in m.bonds() {
        match carbon_carbon_multiple(m, a, b, bond) {
            Some(CarbonCarbon::Alkene(p)) => f.alkenes.push(p),
            Some(CarbonCarbon::Alkyne(p)) => f.alkynes.push(p),
            None => {}
        }
    }
    f.rings.sort();
    f.alkenes.sort();
    f.alkynes.sort();
    f.carbonyls.sort();
    f.alcohols.sort();
    f
}

/// Multiple bonds an atom takes part in.
fn n_multiple(m: &Molecule, i: usize) -> usize {
    m.neighbours(i)
        .filter(|(_, b)| matches!(b, Bond::Double | Bond::Triple))
        .count()
}

/// True when atom `i` is a carbon doubly bonded to a carbon.
fn is_alkene_carbon(m: &Molecule, i: usize) -> bool {
    m.atom(i).element == Element::C
        && m.neighbours(i)
            .any(|(j, b)| b == Bond::Double && m.atom(j).element == Element::C)
}

/// The substitution pattern of each aromatic ring of six carbons.
fn benzene_rings(m: &Molecule) -> Vec<RingPattern> {
    aromatic_rings(m)
        .into_iter()
        .filter(|ring| ring.iter().all(|&a| m.atom(a).element == Element::C))
        .map(|ring| {
            let positions: Vec<usize> = (0..6)
                .filter(|&k| m.neighbours(ring[k]).any(|(j, _)| !ring.contains(&j)))
                .collect();
            ring_pattern(&positions)
        })
        .collect()
}

/// An isolated C=C or C≡C with its substitution.
enum CarbonCarbon {
    /// A C=C.
    Alkene(AlkenePattern),
    /// A C≡C.
    Alkyne(AlkynePattern),
}

/// The bond `a`–`b` read as an isolated carbon–carbon multiple bond (neither carbon in
/// another multiple bond), with its substitution by the carbons' other neighbours.
fn carbon_carbon_multiple(m: &Molecule, a: usize, b: usize, bond: Bond) -> Option<CarbonCarbon> {
    if m.atom(a).element != Element::C || m.atom(b).element != Element::C {
        return None;
    }
    if n_multiple(m, a) != 1 || n_multiple(m, b) != 1 {
        return None;
    }
    let (sa, sb) = (m.degree(a) - 1, m.degree(b) - 1);
    match bond {
        Bond::Double => Some(CarbonCarbon::Alkene(match (sa + sb, sa.max(sb)) {
            (0, _) => AlkenePattern::Unsubstituted,
            (1, _) => AlkenePattern::Vinyl,
            (2, 2) => AlkenePattern::Vinylidene,
            (2, _) => AlkenePattern::Disubstituted12,
            (3, _) => AlkenePattern::Trisubstituted,
            _ => AlkenePattern::Tetrasubstituted,
        })),
        Bond::Triple => Some(CarbonCarbon::Alkyne(if sa == 0 || sb == 0 {
            AlkynePattern::Terminal
        } else {
            AlkynePattern::Internal
        })),
        _ => None,
    }
}

/// The carbonyl at carbon `c` (a C=O with a terminal O, the carbon in no other multiple
/// bond), its kind and conjugation.
fn carbonyl(m: &Molecule, c: usize) -> Option<Carbonyl> {
    if m.atom(c).element != Element::C {
        return None;
    }
    let (o, _) = m
        .neighbours(c)
        .find(|&(j, b)| b == Bond::Double && m.atom(j).element == Element::O && m.degree(j) == 1)?;
    if n_multiple(m, c) != 1 {
        return None;
    }
    let others: Vec<usize> = m
        .neighbours(c)
        .map(|(j, _)| j)
        .filter(|&j| j != o)
        .collect();
    let conjugation = if others.iter().any(|&j| m.atom(j).aromatic) {
        Conjugation::AromaticRing
    } else if others
        .iter()
        .any(|&j| is_alkene_carbon(m, j) && n_multiple(m, j) == 1)
    {
        Conjugation::Alkene
    } else {
        Conjugation::None
    };
    Some(Carbonyl {
        kind: carbonyl_kind(m, &others),
        conjugation,
    })
}

/// A carbonyl's kind from the carbonyl carbon's other neighbours.
fn carbonyl_kind(m: &Molecule, others: &[usize]) -> CarbonylKind {
    let el = |j: usize| m.atom(j).element;
    if others.iter().any(|&j| el(j).is_halogen()) {
        CarbonylKind::AcylHalide
    } else if others.iter().filter(|&&j| el(j) != Element::C).count() > 1 {
        CarbonylKind::Other
    } else if others.iter().any(|&j| el(j) == Element::N) {
        CarbonylKind::Amide
    } else if let Some(&x) = others.iter().find(|&&j| el(j) == Element::O) {
        if m.atom(x).hydrogens == 1 {
            CarbonylKind::CarboxylicAcid
        } else {
            CarbonylKind::Ester
        }
    } else if others.iter().any(|&j| el(j) != Element::C) {
        CarbonylKind::Other
    } else if others.len() == 2 {
        CarbonylKind::Ketone
    } else {
        CarbonylKind::Aldehyde
    }
}

/// The alcohol at oxygen `o` (an uncharged OH on a saturated, non-aromatic carbon), its
/// class by the carbons on that carbon.
fn alcohol(m: &Molecule, o: usize) -> Option<AlcoholClass> {
    let a = m.atom(o);
    if a.element != Element::O || a.hydrogens != 1 || m.degree(o) != 1 || a.charge != 0 {
        return None;
    }
    let Some((c, Bond::Single)) = m.neighbours(o).next() else {
        return None;
    };
    let ca = m.atom(c);
    if ca.element != Element::C || ca.aromatic || m.neighbours(c).any(|(_, b)| b != Bond::Single) {
        return None;
    }
    let carbons = m
        .neighbours(c)
        .filter(|&(j, _)| m.atom(j).element == Element::C)
        .count();
    Some(match carbons {
        0 | 1 => AlcoholClass::Primary,
        2 => AlcoholClass::Secondary,
        _ => AlcoholClass::Tertiary,
    })
}

/// Where bands are expected for one feature: every range should hold a band (of at
/// least `min_strength`), or, with `any_of`, one of them.
#[derive(Clone, Debug, PartialEq)]
pub struct Expectation {
    /// Ranges in cm⁻¹, `(low, high)`.
    pub ranges: Vec<(f64, f64)>,
    /// One range is enough (cis or trans C=C).
    pub any_of: bool,
    /// Weakest band strength that counts.
    pub min_strength: Strength,
    /// What the bands are (and, for a catalogue pattern, its id).
    pub assignment: String,
}

fn expect(ranges: &[(f64, f64)], min_strength: Strength, assignment: &str) -> Option<Expectation> {
    Some(Expectation {
        ranges: ranges.to_vec(),
        any_of: false,
        min_strength,
        assignment: assignment.to_owned(),
    })
}

impl RingPattern {
    /// The catalogue pattern ids (`patterns:` in `rules/patterns.yaml`) this ring
    /// pattern stands for; empty when the catalogue has none for it.
    pub fn pattern_ids(self) -> &'static [&'static str] {
        match self {
            RingPattern::Mono => &["benzene_monosubstituted_oop"],
            RingPattern::Ortho => &["benzene_ortho_oop"],
            RingPattern::Meta => &["benzene_meta_oop"],
            RingPattern::Para => &["benzene_para_oop"],
            _ => &[],
        }
    }
}

impl AlkenePattern {
    /// The catalogue pattern ids this alkene pattern stands for (a 1,2-disubstituted C=C
    /// is cis or trans, which the constitution does not tell: either pattern will do).
    pub fn pattern_ids(self) -> &'static [&'static str] {
        match self {
            AlkenePattern::Vinyl => &["alkene_vinyl_oop"],
            AlkenePattern::Vinylidene => &["alkene_vinylidene_oop"],
            AlkenePattern::Disubstituted12 => &["alkene_cis_oop", "alkene_trans_oop"],
            AlkenePattern::Trisubstituted => &["alkene_trisubstituted_oop"],
            AlkenePattern::Unsubstituted | AlkenePattern::Tetrasubstituted => &[],
        }
    }
}

/// The weakest observed strength that stands for an expected one: one class weaker (the
/// engine's rule without technique weakening, `engine::constraints::diagnostic_bands`).
fn weakest_for(expected: ExpectedStrength) -> Strength {
    match expected {
        ExpectedStrength::Strong => Strength::Medium,
        ExpectedStrength::Medium | ExpectedStrength::Weak | ExpectedStrength::Variable => {
            Strength::Weak
        }
    }
}

/// The band expectation of catalogue patterns `ids` (the bands of one pattern all
/// expected together; with several ids, one pattern's bands are enough): `None` when the
/// catalogue lacks every id.
pub fn pattern_expectation(ids: &[&str], patterns: &[PatternRule]) -> Option<Expectation> {
    let found: Vec<&PatternRule> = ids
        .iter()
        .filter_map(|id| patterns.iter().find(|p| p.id == *id))
        .collect();
    let any_of = found.len() > 1;
    let mut ranges = Vec::new();
    let mut min_strength = Strength::Strong;
    let mut words = Vec::new();
    for p in &found {
        // With several patterns, each contributes its first band (one of them suffices).
        let bands = if any_of {
            &p.bands[..1.min(p.bands.len())]
        } else {
            &p.bands[..]
        };
        for b in bands {
            ranges.push((b.range.lo, b.range.hi));
            min_strength = min_strength.min(weakest_for(b.strength));
        }
        words.push(format!(
            "{} ({}:{})",
            p.id, p.defined_at.file, p.defined_at.line
        ));
    }
    if ranges.is_empty() {
        return None;
    }
    Some(Expectation {
        ranges,
        any_of,
        min_strength,
        assignment: format!("catalogue pattern {}", words.join(" or ")),
    })
}

/// The band expectation of an alkyne (`common practice`, `from memory`).
pub fn alkyne_expectation(p: AlkynePattern) -> Option<Expectation> {
    match p {
        AlkynePattern::Terminal => expect(
            &[(3260.0, 3320.0), (2100.0, 2140.0)],
            Strength::Weak,
            "≡C-H stretch and C≡C stretch",
        ),
        // weak or absent by symmetry: nothing to require
        AlkynePattern::Internal => None,
    }
}

/// The C=O stretch range of a carbonyl (`common practice`, `from memory`): conjugation
/// with a ring or C=C lowers it by some 20–30 cm⁻¹.
pub fn carbonyl_expectation(c: Carbonyl) -> Option<Expectation> {
    use CarbonylKind as K;
    let conjugated = c.conjugation != Conjugation::None;
    let range = match (c.kind, conjugated) {
        (K::Ketone, false) => (1705.0, 1725.0),
        (K::Ketone, true) => (1665.0, 1700.0),
        (K::Aldehyde, false) => (1720.0, 1740.0),
        (K::Aldehyde, true) => (1685.0, 1710.0),
        (K::Ester, false) => (1735.0, 1750.0),
        (K::Ester, true) => (1715.0, 1730.0),
        (K::CarboxylicAcid, false) => (1700.0, 1725.0),
        (K::CarboxylicAcid, true) => (1680.0, 1710.0),
        (K::Amide, _) => (1630.0, 1690.0),
        (K::AcylHalide, false) => (1785.0, 1815.0),
        (K::AcylHalide, true) => (1750.0, 1790.0),
        (K::Other, _) => return None,
    };
    expect(&[range], Strength::Strong, "C=O stretch")
}

/// The C–O stretch range of an alcohol class (`common practice`, `from memory`).
pub fn alcohol_expectation(c: AlcoholClass) -> Option<Expectation> {
    let range = match c {
        AlcoholClass::Primary => (1000.0, 1075.0),
        AlcoholClass::Secondary => (1075.0, 1150.0),
        AlcoholClass::Tertiary => (1100.0, 1210.0),
    };
    expect(&[range], Strength::Medium, "C-O stretch")
}

/// Verdict of one feature check.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FeatureVerdict {
    /// Every expected band was found.
    Supported,
    /// Some but not all expected bands were found.
    PartlySupported,
    /// No expected band was found (weakens, never rules out).
    NotSeen,
    /// The feature predicts no band that can be checked.
    NoExpectation,
}

/// One feature checked against the bands.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct FeatureCheck {
    /// The feature, e.g. `benzene ring: para`.
    pub feature: String,
    /// Verdict.
    pub verdict: FeatureVerdict,
    /// Contribution to the score.
    pub weight: f64,
    /// Bands that matched, one per expected range (None where none did).
    pub matched: Vec<Option<f64>>,
    /// Sentence a second analyst can check by hand.
    pub explanation: String,
}

/// The score of one structure and the checks behind it.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct FeatureScore {
    /// Σ weights: +1 supported, +0.5 partly, −1 not seen, 0 nothing to check.
    pub score: f64,
    /// One check per feature.
    pub checks: Vec<FeatureCheck>,
}

/// Scores `f` against `bands`, ring and alkene patterns from the catalogue's `patterns`;
/// a band matches a range when it lies within `tolerance` cm⁻¹ of it and is at least the
/// expected strength.
pub fn score_features(
    f: &StructureFeatures,
    bands: &[Band],
    tolerance: f64,
    patterns: &[PatternRule],
) -> FeatureScore {
    let mut items: Vec<(String, Option<Expectation>)> = Vec::new();
    items.extend(f.rings.iter().map(|&p| {
        let e = pattern_expectation(p.pattern_ids(), patterns);
        (format!("benzene ring: {p}"), e)
    }));
    items.extend(f.alkenes.iter().map(|&p| {
        let e = pattern_expectation(p.pattern_ids(), patterns);
        (format!("C=C: {p}"), e)
    }));
    items.extend(
        f.alkynes
            .iter()
            .map(|&p| (format!("C≡C: {p}"), alkyne_expectation(p))),
    );
    items.extend(f.carbonyls.iter().map(|&c| {
        (
            format!("C=O: {}, conjugated with {}", c.kind, c.conjugation),
            carbonyl_expectation(c),
        )
    }));
    items.extend(
        f.alcohols
            .iter()
            .map(|&c| (format!("alcohol: {c}"), alcohol_expectation(c))),
    );
    let mut checks = Vec::new();
    for (feature, expectation) in items {
        let Some(e) = expectation else {
            checks.push(FeatureCheck {
                explanation: format!("{feature}: no band position to check"),
                feature,
                verdict: FeatureVerdict::NoExpectation,
                weight: 0.0,
                matched: Vec::new(),
            });
            continue;
        };
        let matched: Vec<Option<f64>> = e
            .ranges
            .iter()
            .map(|&(lo, hi)| {
                bands
                    .iter()
                    .filter(|b| {
                        b.strength >= e.min_strength
                            && b.at >= lo - tolerance
                            && b.at <= hi + tolerance
                    })
                    .max_by(|a, b| a.strength.cmp(&b.strength))
                    .map(|b| b.at)
            })
            .collect();
        let n_found = matched.iter().flatten().count();
        let (verdict, weight) = if n_found == matched.len() || (e.any_of && n_found > 0) {
            (FeatureVerdict::Supported, 1.0)
        } else if n_found > 0 {
            (FeatureVerdict::PartlySupported, 0.5)
        } else {
            (FeatureVerdict::NotSeen, -1.0)
        };
        let ranges: Vec<String> = e
            .ranges
            .iter()
            .map(|(lo, hi)| format!("{hi:.0}-{lo:.0}"))
            .collect();
        let found: Vec<String> = matched
            .iter()
            .zip(&e.ranges)
            .map(|(m, (lo, hi))| match m {
                Some(at) => format!("{at:.0} in {hi:.0}-{lo:.0}"),
                None => format!("none in {hi:.0}-{lo:.0}"),
            })
            .collect();
        let joiner = if e.any_of { " or " } else { " and " };
        let explanation = format!(
            "{feature}: expects {} ({}, at least {}) within ±{tolerance:.0} cm-1; found {}",
            ranges.join(joiner),
            e.assignment,
            e.min_strength,
            found.join(", ")
        );
        checks.push(FeatureCheck {
            feature,
            verdict,
            weight,
            matched,
            explanation,
        });
    }
    FeatureScore {
        score: checks.iter().map(|c| c.weight).sum(),
        checks,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::aromatic::aromatise;
    use crate::structure::smiles::parse_smiles;

    fn of(smiles: &str) -> StructureFeatures {
        features(&aromatise(&parse_smiles(smiles).unwrap()))
    }

    #[test]
    fn ring_patterns_of_the_xylenes_and_friends() {
        // common practice: o-, m-, p-xylene; toluene; mesitylene; pseudocumene.
        assert_eq!(of("Cc1ccccc1C").rings, [RingPattern::Ortho]);
        assert_eq!(of("Cc1cccc(C)c1").rings, [RingPattern::Meta]);
        assert_eq!(of("Cc1ccc(C)cc1").rings, [RingPattern::Para]);
        assert_eq!(of("Cc1ccccc1").rings, [RingPattern::Mono]);
        assert_eq!(of("Cc1cc(C)cc(C)c1").rings, [RingPattern::Tri135]);
        assert_eq!(of("Cc1ccc(C)c(C)c1").rings, [RingPattern::Tri124]);
        assert_eq!(of("Cc1cccc(C)c1C").rings, [RingPattern::Tri123]);
        assert_eq!(of("Cc1cc(C)c(C)cc1C").rings, [RingPattern::Tetra1245]);
        assert_eq!(of("c1ccccc1").rings, [RingPattern::Unsubstituted]);
    }

    #[test]
    fn alkene_alkyne_carbonyl_and_alcohol_features() {
        assert_eq!(of("C=CC").alkenes, [AlkenePattern::Vinyl]);
        assert_eq!(of("C=C(C)C").alkenes, [AlkenePattern::Vinylidene]);
        assert_eq!(of("CC=CC").alkenes, [AlkenePattern::Disubstituted12]);
        assert_eq!(of("CC=C(C)C").alkenes, [AlkenePattern::Trisubstituted]);
        assert_eq!(of("CC(C)=C(C)C").alkenes, [AlkenePattern::Tetrasubstituted]);
        assert_eq!(of("C#CC").alkynes, [AlkynePattern::Terminal]);
        assert_eq!(of("CC#CC").alkynes, [AlkynePattern::Internal]);
        let k = of("CC(=O)c1ccccc1").carbonyls;
        assert_eq!(
            k,
            [Carbonyl {
                kind: CarbonylKind::Ketone,
                conjugation: Conjugation::AromaticRing
            }]
        );
        let k = of("C=CC(C)=O").carbonyls;
        assert_eq!(
            k,
            [Carbonyl {
                kind: CarbonylKind::Ketone,
                conjugation: Conjugation::Alkene
            }]
        );
        let k = of("CCC(C)=O").carbonyls;
        assert_eq!(
            k,
            [Carbonyl {
                kind: CarbonylKind::Ketone,
                conjugation: Conjugation::None
            }]
        );
        assert_eq!(of("CCCO").alcohols, [AlcoholClass::Primary]);
        assert_eq!(of("CC(C)O").alcohols, [AlcoholClass::Secondary]);
        assert_eq!(of("CC(C)(C)O").alcohols, [AlcoholClass::Tertiary]);
        assert!(of("Oc1ccccc1").alcohols.is_empty());
    }

    #[test]
    fn bands_support_or_weaken_features_with_an_explanation() {
        let band = |at: f64, strength: Strength| Band {
            at,
            strength,
            shape: None,
            width: None,
        };
        // invented band list of a para-disubstituted aryl ketone
        let bands = [
            band(1684.0, Strength::Strong),
            band(820.0, Strength::Strong),
        ];
        let patterns = crate::rules::embedded_catalogue()
            .expect("shipped catalogue")
            .patterns;
        let para = of("CC(=O)c1ccc(C)cc1");
        let s = score_features(&para, &bands, 10.0, &patterns);
        assert_eq!(s.score, 2.0);
        assert!(s
            .checks
            .iter()
            .all(|c| c.verdict == FeatureVerdict::Supported));
        assert!(
            s.checks[0].explanation.contains("820 in 860-800"),
            "{}",
            s.checks[0].explanation
        );
        // the ortho isomer expects 770-735: not seen, so it scores lower
        let ortho = of("CC(=O)c1ccccc1C");
        let t = score_features(&ortho, &bands, 10.0, &patterns);
        assert_eq!(t.score, 0.0);
        assert!(t
            .checks
            .iter()
            .any(|c| c.verdict == FeatureVerdict::NotSeen));
        // an unconjugated ketone expects 1725-1705: the 1684 band is outside
        let plain = of("CCCCCC(C)=O");
        let u = score_features(&plain, &bands, 10.0, &patterns);
        assert_eq!(u.checks[0].verdict, FeatureVerdict::NotSeen);
    }

    #[test]
    fn every_pattern_the_structure_code_names_is_a_catalogue_pattern_of_its_group() {
        // One source: the ring and alkene checks read the catalogue's patterns, so every
        // id they name must exist there and support the group the feature belongs to.
        let catalogue = crate::rules::embedded_catalogue().expect("shipped catalogue");
        use AlkenePattern as A;
        use RingPattern as R;
        let rings = [
            R::Unsubstituted,
            R::Mono,
            R::Ortho,
            R::Meta,
            R::Para,
            R::Tri123,
            R::Tri124,
            R::Tri135,
            R::Tetra1234,
            R::Tetra1235,
            R::Tetra1245,
            R::Penta,
            R::Hexa,
        ];
        let alkenes = [
            A::Unsubstituted,
            A::Vinyl,
            A::Vinylidene,
            A::Disubstituted12,
            A::Trisubstituted,
            A::Tetrasubstituted,
        ];
        let named: Vec<(&str, &str)> = rings
            .iter()
            .flat_map(|p| p.pattern_ids().iter().map(|id| (*id, "aromatic_ring")))
            .chain(
                alkenes
                    .iter()
                    .flat_map(|p| p.pattern_ids().iter().map(|id| (*id, "alkene"))),
            )
            .collect();
        assert!(named.len() >= 9, "{named:?}");
        for (id, group) in named {
            let p = catalogue.patterns.iter().find(|p| p.id == id);
            let p = p.unwrap_or_else(|| panic!("pattern {id} is not in the catalogue"));
            assert_eq!(p.supports, group, "{id}");
        }
        // and every catalogue pattern is used by the structure ranking
        for p in &catalogue.patterns {
            let used = rings
                .iter()
                .any(|r| r.pattern_ids().contains(&p.id.as_str()))
                || alkenes
                    .iter()
                    .any(|a| a.pattern_ids().contains(&p.id.as_str()));
            assert!(
                used,
                "catalogue pattern {} is not checked on structures",
                p.id
            );
        }
    }
}
