//! The deduction engine: constraint model, enumeration, scoring, explanation and conflicts.
//! The only module that combines evidence with the rules catalogue; pure (no I/O).
//!
//! Flow of [`solve`]: prepare the problem (per-group band presence, per-band explainers)
//! → formula-level checks (DBE, MS agreement) → enumerate exact compositions over the
//! groups the bands allow → keep those meeting relations, band explanation and bonds →
//! score and rank → explain candidates and ruled-out groups, find near misses → when
//! nothing survives, find a minimal conflict → discriminating checks for the top ones.

pub mod classes;
pub mod collapse;
pub mod conflicts;
pub mod constraints;
pub mod discriminate;
pub mod enumerate;
pub mod evaluate;
pub mod explain;
pub mod from_ms;
#[cfg(feature = "lp-check")]
pub mod lp;
pub mod mixture;
pub mod model;
pub mod outcome;
pub mod salt;
pub mod score;
pub mod structures;
pub mod tails;
#[cfg(test)]
pub mod testkit;

pub use model::EvidenceItem;
pub use outcome::*;

use crate::budget::{self, Meter, Stage, Unmetered};
use crate::case::Case;
use crate::rules::Catalogue;
use constraints::ms;
use enumerate::Flow;
use model::Problem;
use std::collections::BTreeSet;

/// Default band-position tolerance, cm⁻¹: real spectra differ from handbook ranges by
/// sample state, calibration and band picking; 15 cm⁻¹ keeps true candidates of real
/// condensed- and vapour-phase spectra while staying below the gap between neighbouring
/// carbonyl families (common practice, from memory).
pub const DEFAULT_TOLERANCE_CM1: f64 = 15.0;

/// Options of a solve.
#[derive(Clone, Debug, PartialEq)]
pub struct SolveOptions {
    /// Band-position tolerance on each side of a rule's range, cm⁻¹.
    pub tolerance_cm1: f64,
    /// Candidates shown at most.
    pub max_candidates: usize,
    /// Consistent combinations collected at most (beyond it the list is cut and said so).
    pub enumeration_limit: usize,
    /// Compositions examined at most when looking for near misses.
    pub near_miss_budget: u64,
    /// Salt-form groups the organic part must hold; set by [`salt`] for a salt formula,
    /// none by default (a neutral formula admits no salt form).
    pub ionic_sites: constraints::ionic::IonicSites,
}

impl Default for SolveOptions {
    fn default() -> SolveOptions {
        SolveOptions {
            tolerance_cm1: DEFAULT_TOLERANCE_CM1,
            max_candidates: 25,
            enumeration_limit: 10_000,
            near_miss_budget: 3_000,
            ionic_sites: constraints::ionic::IonicSites::default(),
        }
    }
}

/// The cautions that go with every result, in every output (solve's text and JSON and
/// every report format read them from the outcome; the usual cautions of the trade: a lead
/// to confirm, never an identification).
pub const CAUTIONS: [&str; 5] = [
    "this is a screening lead, not an identification",
    "confirm against a reference standard with the laboratory's validated method",
    "combine independent techniques as the laboratory's accreditation requires",
    "treat the unknown as hazardous until it is identified",
    "local regulations and licensed practice prevail",
];

/// The formula-level MS checks with the items not set aside.
pub fn formula_checks(case: &Case, set_aside: &BTreeSet<EvidenceItem>) -> Vec<EvidenceCheck> {
    let mut out = Vec::new();
    let (Some(f), Some(ms_e)) = (&case.formula, &case.ms) else {
        return out;
    };
    if set_aside.contains(&EvidenceItem::Formula) {
        return out;
    }
    if let Some((mz, _)) = &ms_e.molecular_ion {
        if !set_aside.contains(&EvidenceItem::MolecularIon) {
            let c = ms::check_molecular_ion(&f.formula, ms_e, *mz);
            out.push(EvidenceCheck {
                item: EvidenceKind::MolecularIon,
                agrees: c.agrees,
                detail: c.detail,
            });
        }
    }
    let (m1, m2) = ms::isotope_percentages(&f.formula);
    if let Some((v, _)) = &ms_e.m_plus_1 {
        // M+1 is reported, not enforced: it scatters too much at unit resolution to rule
        // out a formula on its own.
        let c = ms::check_isotope(ms::IsotopePeak::MPlus1, *v, m1);
        out.push(EvidenceCheck {
            item: EvidenceKind::MPlus1,
            agrees: true,
            detail: c.detail,
        });
    }
    if let Some((v, _)) = &ms_e.m_plus_2 {
        if !set_aside.contains(&EvidenceItem::MPlus2) {
            let c = ms::check_isotope(ms::IsotopePeak::MPlus2, *v, m2);
            out.push(EvidenceCheck {
                item: EvidenceKind::MPlus2,
                agrees: c.agrees,
                detail: c.detail,
            });
        }
    }
    out
}

/// Solves a validated case against a catalogue. A case that states no formula but gives a
/// molecular ion is solved over the formulas the ion allows (see [`from_ms`]); a salt or
/// hydrate formula over its organic part (see [`salt`]); when one compound cannot explain
/// the spectrum, a second component is considered (see [`mixture`]).
pub fn solve(case: &Case, catalogue: &Catalogue, options: &SolveOptions) -> Outcome {
    budget::infallible(solve_within(case, catalogue, options, &mut Unmetered))
}

/// Like [`solve`], metered by `meter` (see [`crate::budget`]): a spent budget stops the
/// case with the meter's stop instead of letting it grow without bound.
pub fn solve_within<M: Meter>(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    meter: &mut M,
) -> Result<Outcome, M::Stop>
where
    M::Stop: std::fmt::Display,
{
    let single = solve_single(case, catalogue, options, meter)?;
    Ok(mixture::consider(case, catalogue, options, single))
}

/// [`solve_single`] unmetered (a mixture's residual is one more stated case).
fn budget_free_single(case: &Case, catalogue: &Catalogue, options: &SolveOptions) -> Outcome {
    budget::infallible(solve_single(case, catalogue, options, &mut Unmetered))
}

/// Solves a case as one compound (salt and hydrate readings included).
fn solve_single<M: Meter>(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    meter: &mut M,
) -> Result<Outcome, M::Stop>
where
    M::Stop: std::fmt::Display,
{
    if case.formula.is_none() {
        if let Some(query) = from_ms::mass_query(case) {
            return from_ms::solve_over_formula_leads(case, catalogue, options, &query, meter);
        }
    }
    let readings = salt::readings(case);
    if !readings.is_empty() {
        return salt::solve_readings(case, catalogue, options, &readings, meter);
    }
    solve_stated_within(case, catalogue, options, meter, Stage::Enumeration)
}

/// Estimated bytes one consistent combination holds while a formula is solved: its
/// counts (in the list found, then scored), and its evidence signature in the collapse
/// (kept twice: in the class list and its index).
#[cfg(test)]
fn combination_bytes(problem: &Problem<'_>) -> u64 {
    let counts = std::mem::size_of::<ScoredCombination>() + 4 * problem.groups.len();
    let signature = 3 * std::mem::size_of::<Vec<u32>>()
        + 4 * problem.groups.len()
        + std::mem::size_of::<Option<i64>>() * problem.bands.len();
    (counts + 2 * signature + std::mem::size_of::<(usize, Vec<usize>)>()) as u64
}

/// A consistent combination with its score: (score, concrete group counts, skeleton carbons).
#[cfg(test)]
type ScoredCombination = (f64, Vec<u32>, u32);

/// Solves a case as stated (its formula, if any, taken as given).
fn solve_stated_within<M: Meter>(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    meter: &mut M,
    stage: Stage,
) -> Result<Outcome, M::Stop> {
    let problem = Problem::new(case, catalogue, options, &BTreeSet::new());
    let evidence_checks = formula_checks(case, &BTreeSet::new());
    let formula_ok = problem.formula_dbe.is_some() && evidence_checks.iter().all(|c| c.agrees);
    let ms_e = case.ms.as_ref();
    let molecular_nominal = case
        .formula
        .as_ref()
        .map(|f| f.formula.nominal_mass() as f64);

    let parts = score::group_parts(&problem, ms_e, molecular_nominal);
    let found = if formula_ok {
        classes::gather(&problem, options, &parts, meter, stage)?
    } else {
        classes::Gathered::default()
    };
    let (truncated, held) = (found.truncated, found.held);
    // The classes shown and the leaders the discriminating checks compare.
    let ranked = classes::Ranked::top(found, options.max_candidates.max(5));
    let candidates = shown_candidates(&problem, &ranked, options, ms_e, molecular_nominal, &parts);
    let near_misses = if formula_ok {
        near_misses(&problem, options, &parts)
    } else {
        Vec::new()
    };
    let in_some_candidate = if ranked.in_some_candidate.is_empty() {
        vec![false; problem.groups.len()]
    } else {
        ranked.in_some_candidate.clone()
    };
    let ruled_out = explain::ruled_out(&problem, &in_some_candidate, formula_ok && !truncated);
    let conflicts = if candidates.is_empty() {
        conflict_report(case, catalogue, options, &problem, &evidence_checks)
    } else {
        Vec::new()
    };
    let leaders: Vec<(Vec<u32>, u32)> = ranked
        .best
        .iter()
        .take(5)
        .map(|&b| (ranked.members.counts(b), ranked.members.skeleton(b)))
        .collect();
    let discriminating_checks = discriminate::checks(&problem, &leaders, 12);

    meter.release(held);
    let n_consistent = ranked.n_classes;
    Ok(Outcome {
        case: case.id.clone(),
        formula: case.formula.as_ref().map(|f| f.composition.to_string()),
        dbe: case.formula.as_ref().and_then(|f| f.composition.dbe()),
        technique: problem.technique.map(|t| t.word().to_owned()),
        tolerance_cm1: options.tolerance_cm1,
        list_truncated: n_consistent > candidates.len(),
        candidates,
        n_consistent,
        n_combinations: ranked.members.len(),
        enumeration_truncated: truncated,
        ruled_out,
        near_misses,
        conflicts,
        discriminating_checks,
        evidence_checks,
        cautions: CAUTIONS.iter().map(|c| (*c).to_owned()).collect(),
        rules_digest: catalogue.digest.clone(),
        formula_leads: Vec::new(),
        salt: None,
        mixture: None,
    })
}

/// The consistent combinations an enumeration found, and what they hold on the meter.
#[cfg(test)]
#[derive(Default)]
struct Found {
    /// Concrete group counts and skeleton carbons of each consistent combination.
    combinations: Vec<(Vec<u32>, u32)>,
    /// Whether the enumeration stopped at the limit.
    truncated: bool,
}

/// Enumerates the compositions over the groups the bands allow and keeps those that
/// meet every constraint, up to the enumeration limit, metering each step.
#[cfg(test)]
fn find_consistent<M: Meter>(
    problem: &Problem<'_>,
    options: &SolveOptions,
    meter: &mut M,
    stage: Stage,
) -> Result<Found, M::Stop> {
    let mut combinations: Vec<(Vec<u32>, u32)> = Vec::new();
    let mut truncated = false;
    let per_combination = combination_bytes(problem);
    let mut stop = None;
    let allowed = problem.allowed_groups();
    enumerate::walk_pruned(problem, &allowed, |counts, skeleton_c| {
        let metered = if evaluate::evaluate(problem, counts, skeleton_c, false).is_empty() {
            if combinations.len() >= options.enumeration_limit {
                truncated = true;
                return Flow::Stop;
            }
            combinations.push((counts.to_vec(), skeleton_c));
            meter.hold(per_combination, stage)
        } else {
            meter.tick(stage)
        };
        Flow::after_metered(metered, &mut stop)
    });
    if let Some(e) = stop {
        return Err(e);
    }
    Ok(Found {
        combinations,
        truncated,
    })
}

/// The consistent combinations scored, best first, and collapsed into classes that the
/// evidence cannot tell apart.
#[cfg(test)]
struct Ranked {
    /// Every consistent combination with its score, best first.
    scored: Vec<ScoredCombination>,
    /// Each class: the index of its best member in `scored` and the others'.
    classes: Vec<(usize, Vec<usize>)>,
}

#[cfg(test)]
impl Ranked {
    /// Score and evidence signature in one pass over the bands; then best score first,
    /// ties to fewer group instances, then catalogue order (the counts compared as a
    /// whole). The instance sums are computed once, not per comparison.
    fn new(problem: &Problem<'_>, found: Vec<(Vec<u32>, u32)>, parts: &score::Parts) -> Self {
        let mut band_quality = Vec::new();
        let mut keyed: Vec<(u32, collapse::Signature, ScoredCombination)> = found
            .into_iter()
            .map(|(counts, sk)| {
                band_quality.clear();
                let s = score::score_noting(problem, &counts, sk, parts, &mut band_quality);
                let sig = collapse::signature(problem, &counts, &band_quality);
                (counts.iter().sum::<u32>(), sig, (s, counts, sk))
            })
            .collect();
        keyed.sort_by(|(na, _, a), (nb, _, b)| {
            b.0.total_cmp(&a.0)
                .then_with(|| na.cmp(nb))
                .then_with(|| b.1.cmp(&a.1))
        });
        let (signatures, scored): (Vec<collapse::Signature>, Vec<ScoredCombination>) =
            keyed.into_iter().map(|(_, sig, x)| (sig, x)).unzip();
        let classes = collapse::collapse(&signatures);
        Self { scored, classes }
    }

    /// Which groups appear in at least one consistent combination.
    fn groups_in_some_candidate(&self, n_groups: usize) -> Vec<bool> {
        let mut in_some_candidate = vec![false; n_groups];
        for (_, counts, _) in &self.scored {
            for (i, &n) in counts.iter().enumerate() {
                if n > 0 {
                    in_some_candidate[i] = true;
                }
            }
        }
        in_some_candidate
    }

    /// The classes shown, explained: one candidate per class, the other members as its
    /// alternatives.
    fn candidates(
        &self,
        problem: &Problem<'_>,
        options: &SolveOptions,
        ms_e: Option<&crate::case::MsEvidence>,
        molecular_nominal: Option<f64>,
        parts: &score::Parts,
    ) -> Vec<Candidate> {
        self.classes
            .iter()
            .take(options.max_candidates)
            .enumerate()
            .map(|(i, (best, rest))| {
                let (s, counts, sk) = &self.scored[*best];
                let terms = score::terms(problem, counts, *sk, ms_e, molecular_nominal, parts);
                let mut c = explain::candidate(
                    problem,
                    counts,
                    *sk,
                    i + 1,
                    *s,
                    terms,
                    ms_e,
                    molecular_nominal,
                );
                c.alternatives = rest
                    .iter()
                    .map(|r| explain::group_map(problem, &self.scored[*r].1))
                    .collect();
                c
            })
            .collect()
    }
}

/// The classes shown, explained: one candidate per class, the other members as its
/// alternatives.
fn shown_candidates(
    problem: &Problem<'_>,
    ranked: &classes::Ranked,
    options: &SolveOptions,
    ms_e: Option<&crate::case::MsEvidence>,
    molecular_nominal: Option<f64>,
    parts: &score::Parts,
) -> Vec<Candidate> {
    let m = &ranked.members;
    let others = ranked.others(options.max_candidates);
    ranked
        .best
        .iter()
        .zip(others)
        .enumerate()
        .map(|(i, (&best, rest))| {
            let (counts, sk) = (m.counts(best), m.skeleton(best));
            let terms = score::terms(problem, &counts, sk, ms_e, molecular_nominal, parts);
            let mut c = explain::candidate(
                problem,
                &counts,
                sk,
                i + 1,
                m.score(best),
                terms,
                ms_e,
                molecular_nominal,
            );
            c.alternatives = rest
                .iter()
                .map(|&r| explain::group_map(problem, &m.counts(r)))
                .collect();
            c
        })
        .collect()
}

/// Near misses: compositions over every composable group that fail on one point, best
/// score first, at most eight.
fn near_misses(
    problem: &Problem<'_>,
    options: &SolveOptions,
    parts: &score::Parts,
) -> Vec<NearMiss> {
    let mut near: Vec<(usize, f64, Vec<u32>, Vec<evaluate::Failure>)> = Vec::new();
    let composable = problem.composable_groups();
    let mut budget = options.near_miss_budget;
    enumerate::walk(problem, &composable, |counts, sk| {
        if budget == 0 {
            return Flow::Stop;
        }
        budget -= 1;
        let failures = evaluate::evaluate(problem, counts, sk, true);
        if failures.len() == 1 {
            let s = score::score(problem, counts, sk, parts);
            near.push((failures.len(), s, counts.to_vec(), failures));
        }
        Flow::Continue
    });
    near.sort_by(|a, b| {
        a.0.cmp(&b.0)
            .then(b.1.total_cmp(&a.1))
            .then_with(|| b.2.cmp(&a.2))
    });
    near.iter()
        .take(8)
        .map(|(_, _, counts, failures)| explain::near_miss(problem, counts, failures))
        .collect()
}

fn conflict_report(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    problem: &Problem<'_>,
    evidence_checks: &[EvidenceCheck],
) -> Vec<Conflict> {
    let Some(conflicts::ConflictSearch { items, limits }) =
        conflicts::minimal_conflict(case, catalogue, options)
    else {
        return Vec::new();
    };
    let mut explanation = Vec::new();
    for item in &items {
        match item {
            EvidenceItem::Formula => {
                if let Some(f) = &problem.formula {
                    if problem.formula_dbe.is_none() {
                        explanation.push(ConflictExplanation {
                            kind: ConflictWhy::FormulaDbe,
                            text: constraints::dbe::describe_formula_dbe(f),
                            case: vec![CaseRef::Formula],
                            rules: Vec::new(),
                        });
                    }
                }
            }
            EvidenceItem::Band(i) => explanation.extend(band_conflict(problem, *i)),
            EvidenceItem::MolecularIon | EvidenceItem::MPlus2 => {
                let (key, place) = if *item == EvidenceItem::MPlus2 {
                    (EvidenceKind::MPlus2, CaseRef::MPlus2)
                } else {
                    (EvidenceKind::MolecularIon, CaseRef::MolecularIon)
                };
                for c in evidence_checks.iter().filter(|c| c.item == key) {
                    explanation.push(ConflictExplanation {
                        kind: ConflictWhy::MsCheck,
                        text: c.detail.clone(),
                        case: vec![place],
                        rules: Vec::new(),
                    });
                }
            }
        }
    }
    vec![Conflict {
        items: items
            .iter()
            .map(|i| conflicts::describe_item(case, *i))
            .collect(),
        evidence: items.to_vec(),
        explanation,
        suggested_causes: conflicts::suggested_causes(case, &items),
        search_limits: limits,
    }]
}

/// Why a band of a conflict cannot be explained: the groups whose band rules would
/// explain it, grouped by why each is unavailable, with those rules and the rules that
/// block them.
fn band_conflict(problem: &Problem<'_>, case_band: usize) -> Option<ConflictExplanation> {
    let bi = problem
        .bands
        .iter()
        .position(|(orig, _)| *orig == case_band)?;
    let ex = &problem.explainers[bi];
    let band = &problem.bands[bi].1.band;
    let mut by_reason: Vec<(String, Vec<String>)> = Vec::new();
    let mut rules: Vec<RuleCite> = Vec::new();
    let mut cite = |c: RuleCite| {
        if !rules.contains(&c) {
            rules.push(c);
        }
    };
    for &(g, ri, _) in &ex.groups {
        let gd = &problem.groups[g];
        let group = gd.group;
        cite(RuleCite::catalogue(
            RuleKind::GroupBand,
            &group.id,
            Some(ri),
            &group.bands[ri].defined_at,
        ));
        let why = if let Some(why) = constraints::composition::impossible(problem, g) {
            cite(RuleCite::catalogue(
                RuleKind::Group,
                &group.id,
                None,
                &group.defined_at,
            ));
            why
        } else if let Some(r) = gd.presence.missing.first() {
            let rule = &group.bands[r[0]];
            cite(RuleCite::catalogue(
                RuleKind::GroupBand,
                &group.id,
                Some(r[0]),
                &rule.defined_at,
            ));
            constraints::diagnostic_bands::describe_missing(
                rule,
                problem.technique,
                problem.tolerance,
            )
        } else {
            "no consistent combination holds it".to_owned()
        };
        match by_reason.iter_mut().find(|(w, _)| *w == why) {
            Some((_, ids)) => {
                if !ids.contains(&group.id) {
                    ids.push(group.id.clone());
                }
            }
            None => by_reason.push((why, vec![group.id.clone()])),
        }
    }
    let ids: Vec<String> = by_reason
        .iter()
        .map(|(why, ids)| format!("{} ({why})", ids.join(", ")))
        .collect();
    let (kind, text) = if !ex.demanded {
        (
            ConflictWhy::BandDemanded,
            format!(
                "the band at {:.0} cm⁻¹ is demanded by a group's diagnostic rule",
                band.at
            ),
        )
    } else if ids.is_empty() {
        (
            ConflictWhy::BandUncovered,
            format!(
                "the band at {:.0} cm⁻¹ must be explained and no rule covers it",
                band.at
            ),
        )
    } else {
        (
            ConflictWhy::BandOnlyBy,
            format!(
                "the band at {:.0} cm⁻¹ must be explained, only by: {}",
                band.at,
                ids.join("; ")
            ),
        )
    };
    Some(ConflictExplanation {
        kind,
        text,
        case: vec![CaseRef::Band { index: case_band }],
        rules,
    })
}

#[cfg(test)]
mod tests;
#[cfg(test)]
mod tests_classes;
