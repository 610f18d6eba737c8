//! Cases that state no formula: the molecular ion (with M+1 / M+2 when given) proposes
//! formulas through `ms`, the engine solves the best few in turn, and the candidates of
//! all of them are pooled into one ranked list, each candidate naming its formula.
//!
//! Why pool rather than pick one formula: at nominal mass several formulas are equally
//! plausible from the MS alone (C8H8O and C7H4O2 both at m/z 120), and it is the IR
//! evidence that tells them apart; an analyst wants to see that competition, not have it
//! settled silently by the mass search.
//!
//! How leads are compared: candidates of different formulas are ranked by their own
//! candidate score (bands, fragments) only; the MS score of the formula decided which
//! formulas were solved and breaks ties. The leads are the first of the MS ranking,
//! found best first ([`ms::best_formulas_within`], exact), so a nominal mass near m/z 800
//! costs forty formulas, not the millions the mass allows. The enumeration limit holds
//! for the pool: each lead collects its share. A lead whose formula no group combination
//! of the catalogue can fit with the demanded bands is cut at the root of the pruned walk
//! (a demanded band with no composable explainer), before any combination is built.
//! The work is metered ([`crate::budget`]).

use super::outcome::EvidenceKind;
use super::{solve_stated_within, FormulaLead, Outcome, SolveOptions};
use crate::budget::{Meter, Stage};
use crate::case::{Case, StatedFormula};
use crate::chem::Formula;
use crate::ms::{self, MassQuery, MeasuredIsotopes, MeasuredMz, Tolerance};
use crate::rules::Catalogue;

/// Formulas from the molecular ion that are always solved (when that many exist).
pub const DEFAULT_FORMULA_LEADS: usize = 5;
/// Formulas solved at most: beyond the first [`DEFAULT_FORMULA_LEADS`], every formula
/// whose MS score is within [`LEAD_SCORE_WINDOW`] of the best is solved too, because at
/// nominal mass many formulas tie on the MS evidence and only the IR can part them.
pub const MAX_FORMULA_LEADS: usize = 40;
/// MS score distance from the best formula within which a formula is still solved.
pub const LEAD_SCORE_WINDOW: f64 = 1.0;
/// Estimated bytes of one explained candidate kept for the pooled list (its band
/// assignments, accounting lines and score terms in words; a few kB in the JSON report).
pub const CANDIDATE_BYTES: u64 = 8_192;

/// The mass query a case's MS evidence asks, or `None` when it has no molecular ion.
/// An m/z written as a whole number is taken as nominal (low-resolution GC-MS); any other
/// value as accurate, with the case's ppm tolerance.
pub fn mass_query(case: &Case) -> Option<MassQuery> {
    let ms_e = case.ms.as_ref()?;
    let (mz, _) = ms_e.molecular_ion.as_ref()?;
    let measured = if mz.fract() == 0.0 && *mz >= 1.0 && *mz <= f64::from(u32::MAX) {
        MeasuredMz::Nominal(*mz as u32)
    } else {
        MeasuredMz::Accurate(*mz)
    };
    let mut query = MassQuery::new(measured, ms_e.ion);
    query.tolerance = Tolerance::Ppm(ms_e.ppm);
    if ms_e.m_plus_1.is_some() || ms_e.m_plus_2.is_some() {
        query.isotopes = Some(MeasuredIsotopes {
            m1: ms_e.m_plus_1.as_ref().map(|(v, _)| *v),
            m2: ms_e.m_plus_2.as_ref().map(|(v, _)| *v),
            error: None,
        });
    }
    Some(query)
}

/// Solves `case` (which states no formula) over the formulas that `query` allows (the
/// best [`DEFAULT_FORMULA_LEADS`], and up to [`MAX_FORMULA_LEADS`] near the best score), and pools the candidates: best score first, ties broken
/// by the formula's MS rank. Ruled-out groups, near misses, conflicts and discriminating
/// checks are those of the best-placed formula lead, since they are per formula.
pub fn solve_over_formula_leads<M: Meter>(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    query: &MassQuery,
    meter: &mut M,
) -> Result<Outcome, M::Stop>
where
    M::Stop: std::fmt::Display,
{
    // Only the leading formulas can be solved, so only they are looked for (best first:
    // the cost follows them, not every formula the mass allows).
    let found = match ms::best_formulas_within(query, MAX_FORMULA_LEADS, meter) {
        Ok(found) => found.best,
        Err(ms::RankError::Limit(stop)) => return Err(stop),
        Err(ms::RankError::Query(e)) => {
            return without_formula(case, catalogue, options, e.to_string(), meter)
        }
    };
    let Some(place) = case
        .ms
        .as_ref()
        .and_then(|m| m.molecular_ion.as_ref())
        .map(|(_, place)| place.clone())
    else {
        return solve_stated_within(case, catalogue, options, meter, Stage::LeadEnumeration);
    };
    let mut leads = Vec::new();
    let mut solved: Vec<(usize, Outcome)> = Vec::new();
    let mut held = 0u64;
    let best_ms_score = found.first().map_or(0.0, |c| c.score.total);
    let chosen = found.iter().enumerate().take_while(|(i, c)| {
        *i < DEFAULT_FORMULA_LEADS
            || (*i < MAX_FORMULA_LEADS && c.score.total >= best_ms_score - LEAD_SCORE_WINDOW)
    });
    let chosen: Vec<_> = chosen.collect();
    // The enumeration limit holds for the pool as a whole: each lead may collect its
    // share (at least the candidates shown), so forty leads near m/z 800 cost what one
    // formula costs instead of forty times it. A lead that reaches its share says so
    // (`enumeration_truncated`), like a stated formula reaching the limit.
    let lead_options = SolveOptions {
        enumeration_limit: (options.enumeration_limit / chosen.len().max(1))
            .max(options.max_candidates),
        ..options.clone()
    };
    for (_, candidate) in chosen {
        let Some(formula) = Formula::from_composition(&candidate.composition) else {
            continue;
        };
        let mut with_formula = case.clone();
        with_formula.formula = Some(StatedFormula {
            text: candidate.formula.clone(),
            formula,
            composition: candidate.composition.clone(),
            place: place.clone(),
            parts: Vec::new(),
        });
        let outcome = solve_stated_within(
            &with_formula,
            catalogue,
            &lead_options,
            meter,
            Stage::LeadEnumeration,
        )?;
        held += CANDIDATE_BYTES * outcome.candidates.len() as u64;
        meter.hold(
            CANDIDATE_BYTES * outcome.candidates.len() as u64,
            Stage::Pooling,
        )?;
        leads.push(FormulaLead {
            rank: candidate.rank,
            formula: candidate.formula.clone(),
            dbe: candidate.dbe,
            error_ppm: candidate.error_ppm,
            ms_score: candidate.score.total,
            n_consistent: outcome.n_consistent,
        });
        solved.push((candidate.rank, outcome));
    }
    if solved.is_empty() {
        let mz = query.mz.value();
        let detail = format!(
            "no formula within the element ranges fits m/z {mz} as {}",
            query.ion.canonical()
        );
        return without_formula(case, catalogue, options, detail, meter);
    }
    let pooled = pool(solved, leads, options);
    meter.release(held);
    Ok(pooled)
}

/// Pools per-formula outcomes into one.
fn pool(
    mut solved: Vec<(usize, Outcome)>,
    leads: Vec<FormulaLead>,
    options: &SolveOptions,
) -> Outcome {
    let mut candidates = Vec::new();
    let mut n_consistent = 0;
    let mut n_combinations = 0;
    let mut enumeration_truncated = false;
    for (lead_rank, outcome) in &solved {
        n_consistent += outcome.n_consistent;
        n_combinations += outcome.n_combinations;
        enumeration_truncated |= outcome.enumeration_truncated;
        for c in &outcome.candidates {
            let mut c = c.clone();
            c.formula = outcome.formula.clone();
            candidates.push((*lead_rank, c));
        }
    }
    candidates.sort_by(|(ra, a), (rb, b)| b.score.total_cmp(&a.score).then(ra.cmp(rb)));
    let candidates: Vec<_> = candidates
        .into_iter()
        .take(options.max_candidates)
        .enumerate()
        .map(|(i, (_, mut c))| {
            c.rank = i + 1;
            c
        })
        .collect();
    // The per-formula detail comes from the formula of the best candidate, or from the
    // best MS lead when no formula gave a candidate.
    let best_formula = candidates.first().and_then(|c| c.formula.clone());
    let best_index = solved
        .iter()
        .position(|(_, o)| o.formula == best_formula)
        .unwrap_or(0);
    let mut outcome = solved.swap_remove(best_index).1;
    outcome.formula = None;
    outcome.dbe = None;
    outcome.list_truncated = n_consistent > candidates.len();
    outcome.n_consistent = n_consistent;
    outcome.n_combinations = n_combinations;
    outcome.enumeration_truncated = enumeration_truncated;
    outcome.candidates = candidates;
    outcome.formula_leads = leads;
    outcome
}

/// The outcome when the MS search gave no formula: nothing can be enumerated; the
/// molecular-ion check says why.
fn without_formula<M: Meter>(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    detail: String,
    meter: &mut M,
) -> Result<Outcome, M::Stop> {
    let mut outcome = solve_stated_within(case, catalogue, options, meter, Stage::LeadEnumeration)?;
    outcome.evidence_checks.push(super::EvidenceCheck {
        item: EvidenceKind::MolecularIon,
        agrees: false,
        detail,
    });
    Ok(outcome)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rules::embedded_catalogue;

    fn solve_text(src: &str) -> Outcome {
        let (case, diagnostics) = crate::case::parse(src, "test.yaml");
        let case = case.unwrap_or_else(|| panic!("case did not load: {diagnostics:?}"));
        let catalogue = embedded_catalogue().expect("shipped catalogue loads");
        super::super::solve(&case, &catalogue, &SolveOptions::default())
    }

    /// Acetophenone, C8H8O, monoisotopic mass 120.0575 (common practice; [M+H]+ 121.0648
    /// with the proton mass, from memory), strong conjugated C=O near 1685 and a
    /// monosubstituted benzene ring (Silverstein, Webster & Kiemle, from memory).
    const ACCURATE_MASS_ONLY: &str = "
case: T-MS-1
ms:
  molecular_ion: 121.0648
  ion: \"[M+H]+\"
  ppm: 5
ir:
  technique: film
  bands:
    - { at: 3062, strength: weak }
    - { at: 1686, strength: strong }
    - { at: 1598, strength: medium }
    - { at: 1449, strength: medium }
    - { at: 1265, strength: strong }
    - { at: 760, strength: strong }
    - { at: 690, strength: strong }
";

    #[test]
    fn an_accurate_molecular_ion_alone_leads_to_the_formula_and_its_groups() {
        let outcome = solve_text(ACCURATE_MASS_ONLY);
        assert!(!outcome.formula_leads.is_empty());
        assert!(outcome.formula_leads.iter().any(|l| l.formula == "C8H8O"));
        let top = &outcome.candidates[0];
        assert_eq!(top.formula.as_deref(), Some("C8H8O"));
        assert_eq!(top.families.get("ketone"), Some(&1));
        assert_eq!(top.families.get("aromatic_ring"), Some(&1));
        assert!(outcome.candidates.iter().all(|c| c.formula.is_some()));
    }

    #[test]
    fn a_nominal_molecular_ion_proposes_several_formulas_and_keeps_the_truth() {
        let src = ACCURATE_MASS_ONLY
            .replace("121.0648", "120")
            .replace("\"[M+H]+\"", "\"M+.\"");
        let outcome = solve_text(&src);
        assert!(
            outcome.formula_leads.len() > 1,
            "{:?}",
            outcome.formula_leads
        );
        assert!(outcome
            .candidates
            .iter()
            .any(|c| c.formula.as_deref() == Some("C8H8O")
                && c.families.get("ketone") == Some(&1)
                && c.families.get("aromatic_ring") == Some(&1)));
    }

    #[test]
    fn a_molecular_ion_no_formula_fits_is_reported_not_guessed() {
        // m/z 1.5 as [M+H]+ leaves a neutral mass near 0.5 u: no formula exists.
        let src = ACCURATE_MASS_ONLY.replace("121.0648", "1.5");
        let outcome = solve_text(&src);
        assert!(outcome.candidates.is_empty());
        assert!(outcome
            .evidence_checks
            .iter()
            .any(|c| c.item == EvidenceKind::MolecularIon && !c.agrees));
    }
}
