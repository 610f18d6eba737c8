//! The evidence score that ranks consistent candidates. Every term is reported with the
//! candidate so a reader can recompute it by hand.
//!
//! ```text
//! score = Σ_observed bands: the best credit any group of the candidate earns on it,
//!           1.0 × q for a diagnostic rule, 0.5 × q for a supporting rule
//!           (q = match quality in [0, 1]; a band counts once however many groups match)
//!       + Σ_groups present (once per distinct group):
//!           − 1.0       per demanded band allowed absent (symmetry) and not seen
//!           − 0.3       per supporting band expected strong, inside the window, not seen
//!           + 0.5       per MS clue (ion or loss) matched by a stated fragment
//!       + Σ_bands explained: 0.2 × best q among the candidate's explanations
//!                            (a vapour band taken as the branch of an explained
//!                            neighbour: q = 0.3 × the neighbour's q)
//!       − Σ_bands unexplained: ≥ 1500 cm⁻¹ 1.0 strong (not covered by any rule),
//!                              0.4 medium, 0.15 weak; below 1500 cm⁻¹ 0.3 strong,
//!                              0.15 medium, 0.05 weak
//!       − 1.0 per distinct group whose every observed band is also explained by
//!             another group of the candidate (no band of its own: a second group that
//!             the evidence does not ask for)
//!       − 1.0 when the candidate must hold H on a saturated carbon (more H than its
//!             unsaturated and hetero positions can carry, or a group with its own
//!             sp3 C–H) and no band lies in the sp3 C–H stretch range (2840–3000,
//!             common practice: those stretches are never missing)
//!       − 0.5 × (group instances − 1)           (parsimony; `ring` counts)
//! q = 0.5·position + 0.3·strength + 0.2·shape   (see constraints::diagnostic_bands::quality)
//! ```
//! Ties: fewer group instances first, then the group ids in catalogue order.

use super::constraints::band_explanation::{has_sp3_group, skeleton_applies, BRANCH_QUALITY};
use super::constraints::ms::matched_clues;
use super::model::Problem;
use super::outcome::ScoreTerm;
use crate::case::MsEvidence;
use crate::ir::Strength;

/// Weight of a satisfied diagnostic rule.
pub const W_DIAGNOSTIC: f64 = 1.0;
/// Weight of a satisfied supporting rule.
pub const W_SUPPORTING: f64 = 0.5;
/// Penalty for a symmetric-absence exception.
pub const P_ABSENT_EXCEPTION: f64 = 1.0;
/// Penalty for a missing strong supporting band.
pub const P_MISSING_SUPPORT: f64 = 0.3;
/// Reward per matched MS clue.
pub const W_MS_CLUE: f64 = 0.5;
/// Weight of each explained band's best quality.
pub const W_EXPLAINED: f64 = 0.2;
/// Penalty for a candidate that must hold sp3 C–H when no sp3 C–H stretch is observed.
pub const P_NO_SP3_CH_STRETCH: f64 = 1.0;
/// Penalty for a group with no band of its own in the candidate.
pub const P_NO_OWN_BAND: f64 = 1.0;
/// Parsimony penalty per group instance beyond the first.
pub const P_PER_EXTRA_INSTANCE: f64 = 0.5;

/// Penalty for an unexplained band (a demanded band never reaches it: it rules out). A
/// medium band above 1500 cm⁻¹ costs more than a strong fingerprint band: the diagnostic
/// region is where groups show themselves (docs/engine.md, evidence semantics 3 and 4).
pub fn unexplained_penalty(at: f64, strength: Strength) -> f64 {
    if at >= crate::ir::band::FINGERPRINT_BELOW_CM1 {
        match strength {
            Strength::Strong => 1.0,
            Strength::Medium => 0.4,
            Strength::Weak => 0.15,
        }
    } else {
        match strength {
            Strength::Strong => 0.3,
            Strength::Medium => 0.15,
            Strength::Weak => 0.05,
        }
    }
}

/// Best explanation quality of active band `bi` in the candidate, if any; a vapour band
/// without a rule of its own counts through the neighbour it may be a branch of.
pub fn best_explanation(
    problem: &Problem<'_>,
    bi: usize,
    counts: &[u32],
    skeleton_c: u32,
    sp3_group: bool,
) -> Option<f64> {
    direct_explanation(problem, bi, counts, skeleton_c, sp3_group).or_else(|| {
        let j = problem.explainers[bi].branch_of?;
        direct_explanation(problem, j, counts, skeleton_c, sp3_group).map(|q| BRANCH_QUALITY * q)
    })
}

/// Best quality among the rules of the candidate (and artefacts) that explain band `bi`.
pub fn direct_explanation(
    problem: &Problem<'_>,
    bi: usize,
    counts: &[u32],
    skeleton_c: u32,
    sp3_group: bool,
) -> Option<f64> {
    let ex = &problem.explainers[bi];
    let mut best: Option<f64> = None;
    let mut take = |q: f64| best = Some(best.map_or(q, |b: f64| b.max(q)));
    ex.artefacts.iter().for_each(|(_, q)| take(*q));
    ex.groups
        .iter()
        .filter(|(g, _, _)| counts[*g] > 0)
        .for_each(|(_, _, q)| take(*q));
    ex.patterns
        .iter()
        .filter(|(_, gs, _)| gs.iter().any(|&g| counts[g] > 0))
        .for_each(|(_, _, q)| take(*q));
    ex.skeleton
        .iter()
        .filter(|(s, _)| skeleton_applies(problem, *s, counts, skeleton_c, sp3_group))
        .for_each(|(_, q)| take(*q));
    best
}

/// The score terms a group contributes whatever else the candidate holds (absences,
/// MS clues), each rounded to 3 decimals. Bands seen are credited per observed band in
/// [`candidate_terms`], so that two groups matching the same band earn it once.
pub fn group_terms(
    problem: &Problem<'_>,
    gi: usize,
    ms: Option<&MsEvidence>,
    molecular_nominal: Option<f64>,
) -> Vec<ScoreTerm> {
    let mut terms = Vec::new();
    let g = &problem.groups[gi];
    let absent = g.presence.absent_exceptions.len() as f64;
    if absent > 0.0 {
        terms.push(ScoreTerm {
            what: format!("{}: band allowed absent, not seen", g.group.id).into(),
            value: -P_ABSENT_EXCEPTION * absent,
        });
    }
    let missing = g.presence.missing_support.len() as f64;
    if missing > 0.0 {
        terms.push(ScoreTerm {
            what: format!("{}: strong supporting band not seen", g.group.id).into(),
            value: -P_MISSING_SUPPORT * missing,
        });
    }
    if let Some(ms) = ms {
        let clues = matched_clues(g.group, ms, molecular_nominal).len() as f64;
        if clues > 0.0 {
            terms.push(ScoreTerm {
                what: format!("{}: MS clues matched", g.group.id).into(),
                value: W_MS_CLUE * clues,
            });
        }
    }
    for t in &mut terms {
        t.value = round3(t.value);
    }
    terms
}

/// `x` rounded to 3 decimals, as every score term is.
pub fn round3(x: f64) -> f64 {
    round_half_away(x * 1000.0) / 1000.0
}

/// `y` rounded to the nearest integer, halves away from zero: bit for bit what
/// `f64::round` gives, without a call into the C library (a loose solve rounds
/// millions of terms).
pub fn round_half_away(y: f64) -> f64 {
    // Below 2^52 in magnitude the truncation fits an i64 and the fraction is exact;
    // beyond (and for NaN) the standard library decides.
    if y.is_nan() || y.abs() >= 4_503_599_627_370_496.0 {
        return y.round();
    }
    let t = y as i64 as f64;
    let f = y - t;
    let r = if f >= 0.5 {
        t + 1.0
    } else if f <= -0.5 {
        t - 1.0
    } else {
        t
    };
    // A zero result keeps the sign of `y`, as `f64::round` does.
    r.copysign(y)
}

/// The score from the sum of the group parts and the candidate terms' values (in
/// display order, see `candidate_values`), rounded to 2 decimals.
pub fn total(groups: f64, values: &[Option<f64>; 6]) -> f64 {
    let rest: f64 = values.iter().flatten().sum();
    round_half_away((groups + rest) * 100.0) / 100.0
}

/// Per-group score parts, computed once per solve: the sum of [`group_terms`].
pub fn group_parts(
    problem: &Problem<'_>,
    ms: Option<&MsEvidence>,
    molecular_nominal: Option<f64>,
) -> Parts {
    let group = (0..problem.groups.len())
        .map(|g| {
            group_terms(problem, g, ms, molecular_nominal)
                .iter()
                .map(|t| t.value)
                .sum()
        })
        .collect();
    let credits = problem
        .groups
        .iter()
        .map(|g| {
            let mut by_band: Vec<(usize, f64)> = Vec::new();
            for m in &g.presence.matched {
                let w = match g.group.bands[m.rule_idx].role {
                    crate::rules::BandRole::Diagnostic => W_DIAGNOSTIC,
                    crate::rules::BandRole::Supporting => W_SUPPORTING,
                };
                let credit = w * m.quality;
                match by_band.iter_mut().find(|(b, _)| *b == m.band_idx) {
                    Some(entry) => entry.1 = entry.1.max(credit),
                    None => by_band.push((m.band_idx, credit)),
                }
            }
            by_band
        })
        .collect();
    Parts { group, credits }
}

/// Score parts computed once per solve.
#[derive(Clone, Debug, Default)]
pub struct Parts {
    /// Per group: the sum of [`group_terms`].
    pub group: Vec<f64>,
    /// Per group: (active band index, credit w·q) for each band one of its rules is
    /// satisfied by (best rule per band).
    pub credits: Vec<Vec<(usize, f64)>>,
}

/// The terms that depend on the whole candidate: bands explained, bands unexplained,
/// parsimony (each rounded to 3 decimals).
pub fn candidate_terms(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    parts: &Parts,
) -> Vec<ScoreTerm> {
    candidate_terms_noting(problem, counts, skeleton_c, parts, &mut Vec::new())
}

/// Buffers that scoring reuses from one candidate to the next, so that scoring the
/// hundreds of thousands of combinations of a loose case allocates nothing per candidate.
#[derive(Clone, Debug, Default)]
pub struct Scratch {
    /// Per active band: the best credit among the candidate's groups.
    best: Vec<f64>,
    /// The candidate's groups present, in index order.
    present: Vec<usize>,
    /// The same as a set.
    present_set: super::model::GroupSet,
    /// Per active band: how many distinct groups of the candidate explain it.
    shared: Vec<u32>,
    /// Groups of the candidate without a band of their own.
    borrowed: Vec<usize>,
}

/// The candidate terms' values in display order (`None`: the term does not apply), as
/// [`candidate_terms`] words them: bands seen, bands explained, bands unexplained, no
/// sp3 C–H stretch, no band of its own (the groups in `scratch.borrowed`), parsimony.
fn candidate_values(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    parts: &Parts,
    band_quality: &mut Vec<Option<f64>>,
    scratch: &mut Scratch,
) -> [Option<f64>; 6] {
    let sp3_group = has_sp3_group(problem, counts);
    let mut values = [None; 6];
    let best = &mut scratch.best;
    best.clear();
    best.resize(problem.bands.len(), 0.0);
    for (g, n) in counts.iter().enumerate() {
        if *n > 0 {
            for &(b, c) in &parts.credits[g] {
                best[b] = best[b].max(c);
            }
        }
    }
    let seen: f64 = best.iter().sum();
    if seen != 0.0 {
        values[0] = Some(round3(seen));
    }
    let mut explained = 0.0;
    let mut unexplained = 0.0;
    for (bi, (_, b)) in problem.bands.iter().enumerate() {
        let q = best_explanation(problem, bi, counts, skeleton_c, sp3_group);
        band_quality.push(q);
        match q {
            Some(q) => explained += W_EXPLAINED * q,
            None => unexplained += unexplained_penalty(b.band.at, b.band.strength),
        }
    }
    if explained != 0.0 {
        values[1] = Some(round3(explained));
    }
    if unexplained != 0.0 {
        values[2] = Some(round3(-unexplained));
    }
    values[3] = no_sp3_stretch_term(problem, || must_hold_sp3_ch(problem, counts, skeleton_c));
    borrowed_into(problem, counts, scratch);
    if !scratch.borrowed.is_empty() {
        values[4] = Some(round3(-P_NO_OWN_BAND * scratch.borrowed.len() as f64));
    }
    values[5] = parsimony_term(counts.iter().sum());
    values
}

/// The "no sp3 C–H stretch seen" term: it applies when the case has IR, no band lies in
/// the sp3 C–H stretch range, and the candidate must hold sp3 C–H (`required`, asked
/// only then).
pub fn no_sp3_stretch_term(problem: &Problem<'_>, required: impl FnOnce() -> bool) -> Option<f64> {
    (problem.has_ir && !problem.sp3_ch_stretch_seen && required()).then_some(-P_NO_SP3_CH_STRETCH)
}

/// The parsimony term of a candidate of `instances` group instances.
pub fn parsimony_term(instances: u32) -> Option<f64> {
    (instances > 1).then(|| round3(-P_PER_EXTRA_INSTANCE * f64::from(instances - 1)))
}

/// [`candidate_terms`], also noting each active band's best explanation quality in
/// `band_quality` (the collapse of equivalent splits compares them).
fn candidate_terms_noting(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    parts: &Parts,
    band_quality: &mut Vec<Option<f64>>,
) -> Vec<ScoreTerm> {
    let mut scratch = Scratch::default();
    let values = candidate_values(
        problem,
        counts,
        skeleton_c,
        parts,
        band_quality,
        &mut scratch,
    );
    let mut terms = Vec::new();
    for (slot, value) in values.into_iter().enumerate() {
        let Some(value) = value else { continue };
        let what = match slot {
            0 => "bands seen by the groups' rules (each band once)".into(),
            1 => "bands explained".into(),
            2 => "bands unexplained".into(),
            3 => "H on saturated carbon required, no sp3 C-H stretch seen".into(),
            4 => format!(
                "no band of its own (every band also explained by another group): {}",
                scratch
                    .borrowed
                    .iter()
                    .map(|&g| problem.groups[g].group.id.as_str())
                    .collect::<Vec<_>>()
                    .join(", ")
            )
            .into(),
            _ => "parsimony".into(),
        };
        terms.push(ScoreTerm { what, value });
    }
    terms
}

/// True when the candidate cannot place all the formula's hydrogen on unsaturated and
/// hetero positions (so some sits on a saturated skeleton carbon), or holds a group with
/// a saturated C–H of its own.
pub fn must_hold_sp3_ch(problem: &Problem<'_>, counts: &[u32], skeleton_c: u32) -> bool {
    let held_and_open = || {
        counts
            .iter()
            .zip(&problem.groups)
            .filter(|(n, _)| **n > 0)
            .map(|(n, g)| {
                let b = g.group.bonds;
                u64::from(n * (g.h + b.carbon_or_h + b.hetero_or_h))
            })
            .sum()
    };
    sp3_ch_required(
        problem,
        has_sp3_group(problem, counts),
        skeleton_c,
        held_and_open,
    )
}

/// [`must_hold_sp3_ch`] from what it depends on: whether a group holds sp3 C–H of its
/// own, the skeleton carbons, and the hydrogens the groups hold plus their open
/// positions that may carry H (`held_and_open`, asked only when it matters).
pub fn sp3_ch_required(
    problem: &Problem<'_>,
    sp3_group: bool,
    skeleton_c: u32,
    held_and_open: impl FnOnce() -> u64,
) -> bool {
    sp3_group
        || (skeleton_c > 0
            && problem.formula.is_some()
            && u64::from(problem.formula_h) > held_and_open())
}

/// True when an observed band lies inside the range of a skeleton C–H stretch rule that
/// needs a saturated carbon (the rule's own range, no tolerance: an sp2 C–H just above
/// 3000 is not an sp3 one).
pub fn sp3_ch_stretch_seen(problem: &Problem<'_>) -> bool {
    let ranges: Vec<crate::rules::Range> = problem
        .catalogue
        .skeleton
        .iter()
        .zip(&problem.skeleton_needs)
        .filter(|(s, (_, sp3))| *sp3 && s.band.range.lo >= 2500.0)
        .map(|(s, _)| s.band.range)
        .collect();
    problem
        .bands
        .iter()
        .any(|(_, b)| ranges.iter().any(|r| r.contains_within(b.band.at, 0.0)))
}

/// Distinct groups of the candidate that explain at least one observed band, each of
/// which another distinct group of the candidate explains too.
pub fn groups_without_own_band(problem: &Problem<'_>, counts: &[u32]) -> Vec<usize> {
    let mut scratch = Scratch::default();
    borrowed_into(problem, counts, &mut scratch);
    scratch.borrowed
}

/// [`groups_without_own_band`] into `scratch.borrowed`, with the scratch's buffers.
fn borrowed_into(problem: &Problem<'_>, counts: &[u32], scratch: &mut Scratch) {
    let Scratch {
        present,
        present_set,
        shared,
        borrowed,
        ..
    } = scratch;
    borrowed.clear();
    present.clear();
    present.extend((0..counts.len()).filter(|&g| counts[g] > 0));
    if present.len() < 2 {
        return;
    }
    present_set.clear();
    present.iter().for_each(|&g| present_set.insert(g));
    // Per band: how many distinct groups of the candidate explain it (a band rule or a
    // pattern).
    shared.clear();
    shared.extend(
        problem
            .explained_by_groups
            .iter()
            .map(|set| set.intersection_count(present_set)),
    );
    borrowed.extend(present.iter().copied().filter(|&g| {
        let mut own = problem
            .explained_by_groups
            .iter()
            .zip(shared.iter())
            .filter(|(set, _)| set.contains(g))
            .peekable();
        own.peek().is_some() && own.all(|(_, n)| *n > 1)
    }));
}

/// The score of a consistent candidate: Σ group parts of its groups + its candidate
/// terms, rounded to 2 decimals. `parts` comes from [`group_parts`].
pub fn score(problem: &Problem<'_>, counts: &[u32], skeleton_c: u32, parts: &Parts) -> f64 {
    score_noting(problem, counts, skeleton_c, parts, &mut Vec::new())
}

/// [`score`], also noting each active band's best explanation quality (see
/// `engine::collapse`), so that scoring and collapsing share one pass over the bands.
pub fn score_noting(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    parts: &Parts,
    band_quality: &mut Vec<Option<f64>>,
) -> f64 {
    score_with(
        problem,
        counts,
        skeleton_c,
        parts,
        band_quality,
        &mut Scratch::default(),
    )
}

/// [`score_noting`] with reusable buffers: the same value, no allocation per candidate.
pub fn score_with(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    parts: &Parts,
    band_quality: &mut Vec<Option<f64>>,
    scratch: &mut Scratch,
) -> f64 {
    let groups: f64 = counts
        .iter()
        .zip(&parts.group)
        .filter(|(n, _)| **n > 0)
        .map(|(_, p)| *p)
        .sum();
    let values = candidate_values(problem, counts, skeleton_c, parts, band_quality, scratch);
    total(groups, &values)
}

/// Every term of a candidate's score, for display.
pub fn terms(
    problem: &Problem<'_>,
    counts: &[u32],
    skeleton_c: u32,
    ms: Option<&MsEvidence>,
    molecular_nominal: Option<f64>,
    parts: &Parts,
) -> Vec<ScoreTerm> {
    let mut out: Vec<ScoreTerm> = counts
        .iter()
        .enumerate()
        .filter(|(_, n)| **n > 0)
        .flat_map(|(g, _)| group_terms(problem, g, ms, molecular_nominal))
        .collect();
    out.extend(candidate_terms(problem, counts, skeleton_c, parts));
    out
}

#[cfg(test)]
mod tests {
    use super::round_half_away;
    use proptest::prelude::*;

    /// Bit for bit the standard library's rounding (sign of zero included).
    fn agrees(y: f64) -> bool {
        round_half_away(y).to_bits() == y.round().to_bits()
    }

    #[test]
    fn rounding_agrees_with_the_standard_library_at_the_edges() {
        let edges = [
            0.0,
            -0.0,
            0.5,
            -0.5,
            0.49999999999999994,
            -0.49999999999999994,
            1.5,
            2.5,
            -2.5,
            0.3,
            -0.3,
            4_503_599_627_370_495.5,
            4_503_599_627_370_496.0,
            -4_503_599_627_370_497.0,
            1e300,
            f64::MIN_POSITIVE,
            f64::INFINITY,
            f64::NEG_INFINITY,
        ];
        for y in edges {
            assert!(agrees(y), "{y}");
        }
        assert!(round_half_away(f64::NAN).is_nan());
    }

    proptest! {
        #[test]
        fn rounding_agrees_with_the_standard_library(bits in any::<u64>()) {
            let y = f64::from_bits(bits);
            prop_assume!(!y.is_nan());
            prop_assert!(agrees(y));
        }

        #[test]
        fn rounding_agrees_on_scores_and_qualities(y in -1.0e6f64..1.0e6) {
            prop_assert!(agrees(y));
            prop_assert!(agrees(y * 1000.0));
        }
    }
}
