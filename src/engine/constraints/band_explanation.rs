//! Explanation of observed bands (docs/engine.md, evidence semantics 3 and 4), graded by how
//! far a band list can be trusted.
//!
//! What a band list may misreport — shape words, widths, rotational wings, overtones,
//! traces, weak or medium extra bands — lowers a candidate's score and is said in the
//! report; it never rules the candidate out. Only a *strong* band in the diagnostic region
//! (at or above 1500 cm⁻¹) is *demanded*, and only when the catalogue has rules for that
//! position (a group band, a skeleton band or a fingerprint pattern): a candidate none of
//! whose groups, skeleton or artefacts explains it is ruled out, because the band stands
//! in a window that only groups absent from the candidate can explain. A strong band that
//! no rule covers at all is reported and penalised, never decisive.
//!
//! Explaining checks position; shape and strength only grade the match (a band labelled
//! broad is taken as the C–H stretch envelope with a lower quality, and the report says
//! so), except that a rule expecting a weak band never explains a strong one.
//!
//! Vapour phase: the P and R branches of a band stand 20–60 cm⁻¹ either side of its centre
//! (common practice; Herzberg, Infrared and Raman Spectra, ch. IV, from memory), so a band
//! within [`BRANCH_MAX_CM1`] of an at least as strong band that the catalogue covers may
//! be its branch: it is never demanded, and it counts as explained (at a low quality)
//! when its neighbour is.

use super::super::model::{GroupData, Problem};
use super::diagnostic_bands::explains;
use crate::ir::{Band, Strength};
use crate::rules::{Catalogue, ExpectedShape, Technique};

/// Width above which a sharp artefact is read as a forest of weak lines, cm⁻¹.
pub const LINE_FOREST_CM1: f64 = 150.0;

/// Observed bands inside a line-forest artefact's range that show the forest is there.
pub const FOREST_MIN_BANDS: usize = 4;

/// Farthest a vapour-phase band may stand from a band whose rotational branch it may
/// be, cm⁻¹ (P–R separations of small molecules reach 60–100 cm⁻¹; half of that either
/// side, plus the contour's own width).
pub const BRANCH_MAX_CM1: f64 = 60.0;

/// Widest band the skeleton's C–H rules explain, cm⁻¹: overlapping CH3/CH2 stretches of a
/// liquid or a vapour contour make one band 40–80 cm⁻¹ wide, a picker merging the whole
/// C–H region up to about 200; hydrogen-bonded O–H envelopes span 200–800 (common
/// practice).
pub const CH_ENVELOPE_MAX_CM1: f64 = 250.0;

/// Quality factor of a band explained only as the branch of its neighbour.
pub const BRANCH_QUALITY: f64 = 0.3;

/// Everything that could explain one observed band, found once per band.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct BandExplainers {
    /// The band must be explained: strong, in the diagnostic region, covered by some rule
    /// of the catalogue, and not a possible vapour branch of a neighbour.
    pub demanded: bool,
    /// Some group, skeleton or pattern rule of the catalogue covers the position.
    pub covered: bool,
    /// Vapour phase: the active band (index) whose rotational branch this one may be.
    pub branch_of: Option<usize>,
    /// Artefact rules (index, quality).
    pub artefacts: Vec<(usize, f64)>,
    /// Group band rules (concrete group index, rule index, quality).
    pub groups: Vec<(usize, usize, f64)>,
    /// Skeleton rules (index, quality).
    pub skeleton: Vec<(usize, f64)>,
    /// Pattern bands (pattern index, concrete groups it supports, quality).
    pub patterns: Vec<(usize, Vec<usize>, f64)>,
}

/// True when a band of this strength and position must be explained, if the catalogue
/// covers its position (see the module doc).
pub fn is_demanded(band: &Band) -> bool {
    band.in_diagnostic_region() && band.strength == Strength::Strong
}

/// Finds every rule that can explain `band`.
pub fn explainers_of(
    band: &Band,
    all_positions: &[f64],
    catalogue: &Catalogue,
    groups: &[GroupData<'_>],
    technique: Option<Technique>,
    tolerance: f64,
) -> BandExplainers {
    let mut out = BandExplainers {
        demanded: is_demanded(band),
        ..BandExplainers::default()
    };
    for (i, a) in catalogue.artefacts.iter().enumerate() {
        // A technique-specific artefact (moisture in KBr) applies only when the case states
        // that technique: otherwise a broad 3400 band would always be excusable and an
        // alcohol could never be told from an ether.
        let technique_ok =
            a.techniques.is_empty() || technique.is_some_and(|t| a.techniques.contains(&t));
        let shape_ok = super::diagnostic_bands::shape_compatible(band.shape, a.shape);
        // A sharp artefact spread over more than LINE_FOREST_CM1 (water-vapour lines) is a
        // forest of narrow lines: it may excuse weak and medium bands, never a strong one,
        // or a strong carbonyl could be waved away as water vapour.
        // A medium band is excused by a forest only when the band list shows the forest
        // (at least FOREST_MIN_BANDS observed bands inside its range): an isolated
        // medium band such as a free O–H near 3650 is not water vapour.
        let forest = a.shape == ExpectedShape::Sharp && a.range.hi - a.range.lo > LINE_FOREST_CM1;
        let forest_seen = all_positions
            .iter()
            .filter(|at| a.range.contains_within(**at, tolerance))
            .count()
            >= FOREST_MIN_BANDS;
        let strength_ok = !forest
            || band.strength == Strength::Weak
            || (band.strength == Strength::Medium && forest_seen);
        if technique_ok && shape_ok && strength_ok && a.range.contains_within(band.at, tolerance) {
            let half = (a.range.hi - a.range.lo) / 2.0;
            let q = 1.0 - (band.at - a.range.centre()).abs() / (half + tolerance);
            // Half weight: an artefact is the explanation of last resort.
            out.artefacts.push((i, 0.5 * q.clamp(0.0, 1.0)));
        }
    }
    for (gi, g) in groups.iter().enumerate() {
        for (ri, rule) in g.group.bands.iter().enumerate() {
            if let Some(q) = explains(band, rule, technique, tolerance) {
                out.groups.push((gi, ri, q));
            }
        }
    }
    for (si, s) in catalogue.skeleton.iter().enumerate() {
        // A C–H envelope is at most a few overlapping stretches wide; a band measured
        // wider than that (an acid's or alcohol's hydrogen-bonded O–H) is no C–H band.
        if band.width.is_some_and(|w| w > CH_ENVELOPE_MAX_CM1) {
            continue;
        }
        if let Some(q) = explains(band, &s.band, technique, tolerance) {
            out.skeleton.push((si, q));
        }
    }
    for (pi, p) in catalogue.patterns.iter().enumerate() {
        let supported: Vec<usize> = (0..groups.len())
            .filter(|&j| groups[j].lineage.contains(&p.supports))
            .collect();
        let best = p
            .bands
            .iter()
            .filter_map(|r| explains(band, r, technique, tolerance))
            .fold(None, |acc: Option<f64>, q| {
                Some(acc.map_or(q, |a| a.max(q)))
            });
        if let Some(q) = best {
            out.patterns.push((pi, supported, q));
        }
    }
    out.covered = !out.groups.is_empty() || !out.skeleton.is_empty() || !out.patterns.is_empty();
    out.demanded &= out.covered;
    out
}

/// Vapour phase: marks each band that may be a rotational branch of a neighbour (within
/// [`BRANCH_MAX_CM1`], at least as strong, covered by the catalogue, itself no branch);
/// such a band is no longer demanded. The nearest neighbour wins.
pub fn mark_branches(bands: &[&Band], explainers: &mut [BandExplainers]) {
    let mut marks = vec![None; bands.len()];
    for (i, b) in bands.iter().enumerate() {
        if !explainers[i].artefacts.is_empty() {
            continue;
        }
        marks[i] = bands
            .iter()
            .enumerate()
            .filter(|(j, n)| {
                *j != i
                    && explainers[*j].covered
                    && n.strength >= b.strength
                    && (n.at - b.at).abs() <= BRANCH_MAX_CM1
                    && (n.at - b.at).abs() > 0.0
            })
            .min_by(|x, y| (x.1.at - b.at).abs().total_cmp(&(y.1.at - b.at).abs()))
            .map(|(j, _)| j);
    }
    for (i, mark) in marks.into_iter().enumerate() {
        if let Some(j) = mark {
            explainers[i].branch_of = Some(j);
            explainers[i].demanded = false;
        }
    }
}

/// What the candidate's hydrogens must provide for a band that only the skeleton
/// explains.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct HydrogenNeeds {
    /// At least one H on a saturated carbon (skeleton, or a group holding sp3 C–H).
    pub sp3_h: bool,
    /// At least one H on an open `carbon_or_h` position of one of these groups (sp2 C–H).
    pub h_on_groups: Option<Vec<usize>>,
}

/// True when a group of the candidate holds a saturated C–H of its own.
pub fn has_sp3_group(problem: &Problem<'_>, counts: &[u32]) -> bool {
    counts
        .iter()
        .zip(&problem.groups)
        .any(|(n, g)| *n > 0 && g.sp3_ch)
}

/// Whether skeleton rule `si` applies to the candidate (`sp3_group`: see
/// [`has_sp3_group`], computed once per candidate).
pub fn skeleton_applies(
    problem: &Problem<'_>,
    si: usize,
    counts: &[u32],
    skeleton_c: u32,
    sp3_group: bool,
) -> bool {
    let (needs, sp3) = &problem.skeleton_needs[si];
    (*sp3 && (skeleton_c > 0 || sp3_group)) || needs.iter().any(|&j| counts[j] > 0)
}

/// The hydrogen a skeleton rule needs: `Some(true)` an sp3 C–H (the rule names
/// `sp3_carbon`), `Some(false)` an H on an open position of an unsaturated hydrocarbon
/// group (every group it names holds DBE, carbon-borne open bonds that may carry H, and
/// no heteroatom: an sp2 C–H rule), `None` when nothing can be said (e.g. C–H next to O).
pub fn h_kind(problem: &Problem<'_>, si: usize) -> Option<bool> {
    let (groups, sp3) = &problem.skeleton_needs[si];
    if *sp3 {
        return Some(true);
    }
    let all_sp2 = !groups.is_empty()
        && groups.iter().all(|&g| {
            let d = &problem.groups[g];
            d.group.dbe > 0
                && d.group.bonds.carbon_or_h > 0
                && d.hetero.is_empty()
                && d.foreign_element.is_none()
        });
    all_sp2.then_some(false)
}

/// Checks every demanded band; returns the unexplained ones (active band indices) and
/// the hydrogen needs of bands only the skeleton explains.
pub fn check(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
) -> (Vec<usize>, HydrogenNeeds) {
    let mut unexplained = Vec::new();
    let mut needs = HydrogenNeeds::default();
    let sp3_group = has_sp3_group(problem, counts);
    for (bi, ex) in problem.explainers.iter().enumerate() {
        if !ex.demanded || !ex.artefacts.is_empty() {
            continue;
        }
        if ex.groups.iter().any(|(g, _, _)| counts[*g] > 0)
            || ex
                .patterns
                .iter()
                .any(|(_, gs, _)| gs.iter().any(|&g| counts[g] > 0))
        {
            continue;
        }
        let applicable: Vec<usize> = ex
            .skeleton
            .iter()
            .map(|(si, _)| *si)
            .filter(|&si| skeleton_applies(problem, si, counts, skeleton_c, sp3_group))
            .collect();
        if applicable.is_empty() {
            unexplained.push(bi);
            continue;
        }
        // The H each applicable rule needs; a band asks only what all of them agree on.
        let kinds: Vec<Option<bool>> = applicable.iter().map(|&si| h_kind(problem, si)).collect();
        if kinds.iter().all(|k| *k == Some(true)) {
            needs.sp3_h = true;
        } else if kinds.iter().all(|k| *k == Some(false)) {
            let carriers: Vec<usize> = applicable
                .iter()
                .flat_map(|&si| problem.skeleton_needs[si].0.iter().copied())
                .filter(|&g| counts[g] > 0)
                .collect();
            needs.h_on_groups = Some(carriers);
        }
    }
    (unexplained, needs)
}

/// How the report words an excused band: one the candidate leaves without a rule of its
/// own although it stands in the diagnostic region and is not weak (a medium band, a strong
/// band no rule covers, a vapour branch). Weak and fingerprint bands never decide anything
/// and get no sentence; a demanded band left unexplained rules the candidate out and is
/// worded by [`describe_unexplained`].
pub fn treatment_of_unexplained(
    band: &Band,
    ex: &BandExplainers,
    neighbour: Option<&Band>,
) -> Option<String> {
    if let (Some(_), Some(n)) = (ex.branch_of, neighbour) {
        return Some(format!(
            "taken as a rotational branch of the {:.0} cm⁻¹ band (vapour phase): not decisive, scored low",
            n.at
        ));
    }
    if !band.in_diagnostic_region() || ex.demanded {
        return None;
    }
    if ex.branch_of.is_some() && band.strength == Strength::Strong {
        return Some(
            "strong, standing beside a band whose rotational branch it may be (vapour phase), and that band is unexplained too: lowers the score, rules nothing out"
                .into(),
        );
    }
    match band.strength {
        Strength::Strong => Some(
            "strong, but no rule of the catalogue covers this position: lowers the score, rules nothing out"
                .into(),
        ),
        Strength::Medium => Some(
            "medium band left unexplained (a band list may hold overtones, traces or wings): lowers the score, rules nothing out"
                .into(),
        ),
        Strength::Weak => None,
    }
}

/// Words for an unexplained band.
pub fn describe_unexplained(band: &Band) -> String {
    let shape = band.shape.map(|s| format!(" {s}")).unwrap_or_default();
    format!(
        "the {}{shape} band at {:.0} cm⁻¹ is left unexplained (no group, skeleton or artefact rule covers it)",
        band.strength, band.at
    )
}
