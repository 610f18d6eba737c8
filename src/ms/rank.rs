//! Candidate formulas for a measured molecular ion: search, filters, score, rank.
//!
//! # Filters (a formula failing one is not a candidate)
//! - the neutral molecule M is a closed-shell molecule: even electron count and DBE ≥ 0
//!   (chem's LEWIS check), so its DBE is an integer; the ion's DBE is then an integer for
//!   M+. and a half-integer for the even-electron adducts, as the ion type requires;
//! - SENIOR rules (chem's check) on M;
//! - [M-H]- needs at least one hydrogen;
//! - with `strict_ratios`, every Seven-Golden-Rules ratio inside its extended range.
//!
//! # Score (higher is better; 0 is perfect; parts add up)
//! - `mass`: −½ (error / σ)² with σ = half the tolerance, so a formula at the edge of the
//!   window gets −2; 0 in nominal mode (the mass cannot tell the formulas apart);
//! - `isotopes`: [`super::isotope_fit`]'s score, when M+1 / M+2 are given;
//! - `heuristics`: [`super::heuristics`]'s penalties.
//!
//! All three are log-likelihood-like (a normal error model for mass and isotopes, a fixed
//! penalty per broken heuristic), which is why plain addition is meaningful. Ties keep
//! the simpler formula first (fewer atoms, then Hill order), so output is deterministic.

use super::formula_search::{mass_of, search_mass_while, search_nominal_while, Walk};
use super::heuristics::{assess, HeuristicNote};
use super::ion::IonType;
use super::isotope_fit::{fit, isotope_ratios_of_counts, IsotopeFit, MeasuredIsotopes};
use super::ranges::ElementRanges;
use crate::budget::{Meter, Stage, Unmetered};
use crate::chem::{Composition, Formula};

/// The measured molecular ion: accurate (high resolution) or nominal (integer, GC-MS).
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
#[serde(tag = "kind", content = "mz", rename_all = "lowercase")]
pub enum MeasuredMz {
    /// Accurate m/z.
    Accurate(f64),
    /// Nominal (integer) m/z.
    Nominal(u32),
}

impl MeasuredMz {
    /// The m/z as a number.
    pub fn value(self) -> f64 {
        match self {
            MeasuredMz::Accurate(x) => x,
            MeasuredMz::Nominal(n) => f64::from(n),
        }
    }
}

/// Mass tolerance of an accurate m/z.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
#[serde(tag = "unit", content = "value", rename_all = "lowercase")]
pub enum Tolerance {
    /// Parts per million of the measured m/z.
    Ppm(f64),
    /// Millidalton (mu), absolute.
    Mda(f64),
}

impl Tolerance {
    /// The tolerance in u at `mz`.
    pub fn absolute(self, mz: f64) -> f64 {
        match self {
            Tolerance::Ppm(ppm) => mz * ppm * 1e-6,
            Tolerance::Mda(mda) => mda * 1e-3,
        }
    }
}

/// Everything a formula search needs.
#[derive(Clone, Debug, PartialEq)]
pub struct MassQuery {
    /// The molecular ion's m/z.
    pub mz: MeasuredMz,
    /// Its ion type.
    pub ion: IonType,
    /// Tolerance (ignored in nominal mode).
    pub tolerance: Tolerance,
    /// Element ranges of the neutral molecule.
    pub ranges: ElementRanges,
    /// Measured M+1 / M+2, if any.
    pub isotopes: Option<MeasuredIsotopes>,
    /// Apply the Seven Golden Rules' extended ratio ranges as a filter.
    pub strict_ratios: bool,
}

impl MassQuery {
    /// A query with the default ranges, 5 ppm and no isotopes.
    pub fn new(mz: MeasuredMz, ion: IonType) -> MassQuery {
        MassQuery {
            mz,
            ion,
            tolerance: Tolerance::Ppm(5.0),
            ranges: ElementRanges::default(),
            isotopes: None,
            strict_ratios: false,
        }
    }
}

/// The score of one candidate, by part.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct ScoreParts {
    /// Mass-error part (0 in nominal mode).
    pub mass: f64,
    /// Isotope-fit part (0 when no isotopes were given).
    pub isotopes: f64,
    /// Heuristics part.
    pub heuristics: f64,
    /// Their sum; candidates are ranked by it.
    pub total: f64,
}

/// One candidate formula for the measured ion.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct FormulaCandidate {
    /// 1-based rank.
    pub rank: usize,
    /// The neutral molecule M in Hill order.
    pub formula: String,
    /// Monoisotopic mass of M.
    pub neutral_mass: f64,
    /// Nominal mass of M.
    pub nominal_mass: u64,
    /// m/z of the ion of M of the query's ion type.
    pub ion_mz: f64,
    /// (measured − computed) / computed × 10⁶; `None` in nominal mode.
    pub error_ppm: Option<f64>,
    /// measured − computed, mDa; `None` in nominal mode.
    pub error_mda: Option<f64>,
    /// DBE of M (an integer).
    pub dbe: f64,
    /// DBE of the ion (half-integer for even-electron adducts).
    pub ion_dbe: f64,
    /// Computed M+1 / M+2 and, when measured, the fit.
    pub isotope_fit: IsotopeFit,
    /// Heuristics not met.
    pub heuristic_notes: Vec<HeuristicNote>,
    /// Score by part.
    pub score: ScoreParts,
    /// Element counts of M.
    #[serde(skip)]
    pub composition: Composition,
}

/// Why a query cannot run.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum QueryError {
    /// m/z not a positive finite number, or beyond [`MAX_MZ`].
    #[error("m/z must be a positive number up to {MAX_MZ}, got {0}")]
    BadMz(f64),
    /// Tolerance not positive, or absurdly wide.
    #[error("tolerance must be positive and at most {MAX_PPM} ppm or {MAX_MDA} mDa")]
    BadTolerance,
    /// Isotope percentages negative or not finite, or error not positive.
    #[error("isotope percentages must be finite and non-negative, and the error positive")]
    BadIsotopes,
}

/// Largest m/z accepted.
pub const MAX_MZ: f64 = 5000.0;
/// Widest ppm tolerance accepted.
pub const MAX_PPM: f64 = 1000.0;
/// Widest mDa tolerance accepted.
pub const MAX_MDA: f64 = 500.0;

/// Checks the numbers of a query.
pub fn validate(query: &MassQuery) -> Result<(), QueryError> {
    let mz = query.mz.value();
    if !(mz.is_finite() && mz > 0.0 && mz <= MAX_MZ) {
        return Err(QueryError::BadMz(mz));
    }
    let ok_tolerance = match query.tolerance {
        Tolerance::Ppm(p) => p.is_finite() && p > 0.0 && p <= MAX_PPM,
        Tolerance::Mda(m) => m.is_finite() && m > 0.0 && m <= MAX_MDA,
    };
    if !ok_tolerance {
        return Err(QueryError::BadTolerance);
    }
    if let Some(iso) = &query.isotopes {
        let ok = |v: Option<f64>| v.is_none_or(|x| x.is_finite() && x >= 0.0);
        if !ok(iso.m1) || !ok(iso.m2) || iso.error.is_some_and(|e| !(e.is_finite() && e > 0.0)) {
            return Err(QueryError::BadIsotopes);
        }
    }
    Ok(())
}

/// Every candidate formula for `query`, best first (see the module documentation).
pub fn candidate_formulas(query: &MassQuery) -> Result<Vec<FormulaCandidate>, QueryError> {
    candidate_formulas_within(query, &mut Unmetered).map_err(|e| match e {
        RankError::Query(q) => q,
        RankError::Limit(never) => match never {},
    })
}

/// Why a metered query gave no list.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum RankError<S> {
    /// The query's numbers are wrong.
    #[error(transparent)]
    Query(QueryError),
    /// The meter stopped the search (a budget was spent).
    #[error("{0}")]
    Limit(S),
}

/// Like [`candidate_formulas`], metered: every raw hit of the search is a tick, every
/// candidate kept is held (its [`FormulaCandidate::bytes_held`]) until the list is
/// returned, so a budget stops a query that would hold millions of formulas.
pub fn candidate_formulas_within<M: Meter>(
    query: &MassQuery,
    meter: &mut M,
) -> Result<Vec<FormulaCandidate>, RankError<M::Stop>>
where
    M::Stop: std::fmt::Display,
{
    validate(query).map_err(RankError::Query)?;
    let ranges = &query.ranges;
    let mut out = Vec::new();
    let mut held = 0u64;
    let mut stop = None;
    let mut consider = |counts: &[u32]| {
        let kept = match evaluate(query, counts) {
            Some(c) => {
                let bytes = c.bytes_held();
                out.push(c);
                held += bytes;
                meter.hold(bytes, Stage::FormulaSearch)
            }
            None => meter.tick(Stage::FormulaSearch),
        };
        match kept {
            Ok(()) => Walk::Continue,
            Err(e) => {
                stop = Some(e);
                Walk::Stop
            }
        }
    };
    search_query_while(query, ranges, &mut consider);
    meter.release(held);
    if let Some(e) = stop {
        return Err(RankError::Limit(e));
    }
    out.sort_by(rank_order);
    for (i, c) in out.iter_mut().enumerate() {
        c.rank = i + 1;
    }
    Ok(out)
}

impl FormulaCandidate {
    /// Estimated bytes this candidate holds (its size plus its heap parts), for a
    /// [`Meter`].
    pub fn bytes_held(&self) -> u64 {
        let notes: usize = self
            .heuristic_notes
            .iter()
            .map(|n| {
                std::mem::size_of::<HeuristicNote>() + n.rule.capacity() + n.message.capacity()
            })
            .sum();
        // A B-tree entry of the composition: the symbol's String, its count and the
        // node's share (about 32 bytes per entry, from the standard library's node layout,
        // from memory).
        let composition =
            self.composition.iter().count() * (std::mem::size_of::<String>() + 4 + 2 + 32);
        (std::mem::size_of::<FormulaCandidate>() + self.formula.capacity() + notes + composition)
            as u64
    }
}

/// Walks the formulas of `ranges` that fit the query's m/z (accurate within its
/// tolerance, or at its nominal mass), stopping when `visit` says so.
pub(super) fn search_query_while(
    query: &MassQuery,
    ranges: &ElementRanges,
    visit: impl FnMut(&[u32]) -> Walk,
) -> Walk {
    match query.mz {
        MeasuredMz::Accurate(mz) => {
            let neutral = query.ion.neutral_mass_of_mz(mz);
            let tol = query.tolerance.absolute(mz);
            search_mass_while(ranges, neutral - tol, neutral + tol, visit)
        }
        MeasuredMz::Nominal(n) => match query.ion.neutral_nominal_mass(n) {
            Some(nominal) => search_nominal_while(ranges, u64::from(nominal), visit),
            None => Walk::Continue,
        },
    }
}

/// The ranking order: better score first, then fewer atoms, then the formula text.
pub(super) fn rank_order(a: &FormulaCandidate, b: &FormulaCandidate) -> std::cmp::Ordering {
    b.score
        .total
        .total_cmp(&a.score.total)
        .then(a.composition.n_atoms().cmp(&b.composition.n_atoms()))
        .then(a.formula.cmp(&b.formula))
}

/// Filters and scores one combination; `None` when a filter rejects it.
pub fn evaluate(query: &MassQuery, counts: &[u32]) -> Option<FormulaCandidate> {
    let ranges = &query.ranges;
    if !passes_lewis_and_senior(ranges, counts) {
        return None;
    }
    let composition = ranges.composition(counts);
    if composition.n_atoms() == 0 {
        return None;
    }
    let formula = Formula::from_composition(&composition)?;
    if !formula.lewis().passes() || !formula.senior().passes() {
        return None;
    }
    let ion_formula = query.ion.ion_formula(&formula)?;
    let heuristics = assess(&composition);
    if query.strict_ratios && !heuristics.within_extended_ranges {
        return None;
    }
    let neutral_mass = mass_of(ranges, counts);
    let ion_mz = query.ion.mz_of_neutral(neutral_mass);
    let (error_ppm, error_mda, mass_score) = match query.mz {
        MeasuredMz::Accurate(mz) => {
            let error = mz - ion_mz;
            let sigma = query.tolerance.absolute(mz) / 2.0;
            (
                Some(error / ion_mz * 1e6),
                Some(error * 1e3),
                -0.5 * (error / sigma).powi(2) + 0.0,
            )
        }
        MeasuredMz::Nominal(_) => (None, None, 0.0),
    };
    let computed = isotope_ratios_of_counts(ranges, counts);
    let no_isotopes = MeasuredIsotopes {
        m1: None,
        m2: None,
        error: None,
    };
    let isotope_fit = fit(query.isotopes.as_ref().unwrap_or(&no_isotopes), computed);
    let score = ScoreParts {
        mass: mass_score,
        isotopes: isotope_fit.score,
        heuristics: heuristics.score,
        total: mass_score + isotope_fit.score + heuristics.score + 0.0,
    };
    Some(FormulaCandidate {
        rank: 0,
        formula: formula.to_string(),
        neutral_mass,
        nominal_mass: formula.nominal_mass(),
        ion_mz,
        error_ppm,
        error_mda,
        dbe: formula.dbe(),
        ion_dbe: ion_formula.dbe(),
        isotope_fit,
        heuristic_notes: heuristics.notes,
        score,
        composition,
    })
}

/// chem's LEWIS and SENIOR checks of the neutral molecule, computed on the counts
/// without building a formula (most combinations in a window fail here, so this keeps
/// the evaluation cheap). Same conditions as [`crate::chem::LewisCheck`] and
/// [`crate::chem::SeniorCheck`]; chem's own checks still run on the survivors, and a test
/// compares the two on random counts.
pub fn passes_lewis_and_senior(ranges: &ElementRanges, counts: &[u32]) -> bool {
    let mut electrons = 0u64;
    let mut twice_dbe = 2i64;
    let mut valence_sum = 0u64;
    let mut max_valence = 0u64;
    let mut n_atoms = 0u64;
    for (r, n) in ranges.ranges().iter().zip(counts) {
        if *n == 0 {
            continue;
        }
        let n = u64::from(*n);
        let v = u64::from(r.element.valence);
        electrons += n * u64::from(r.element.atomic_number);
        twice_dbe += n as i64 * (v as i64 - 2);
        valence_sum += n * v;
        max_valence = max_valence.max(v);
        n_atoms += n;
    }
    electrons % 2 == 0
        && twice_dbe >= 0
        && valence_sum % 2 == 0
        && valence_sum >= 2 * max_valence
        && valence_sum + 2 >= 2 * n_atoms
}

#[cfg(test)]
mod tests {
    use super::*;

    fn caffeine_query() -> MassQuery {
        MassQuery::new(MeasuredMz::Accurate(195.0877), IonType::Protonated)
    }

    #[test]
    fn protonated_caffeine_lists_its_formula() {
        // Caffeine [M+H]+ at m/z 195.0877 (common practice value); formula C8H10N4O2.
        let list = candidate_formulas(&caffeine_query()).unwrap();
        let hit = list.iter().find(|c| c.formula == "C8H10N4O2").unwrap();
        assert!(hit.error_ppm.unwrap().abs() < 1.0);
        assert_eq!(hit.dbe, 6.0);
        assert_eq!(hit.ion_dbe, 5.5);
    }

    #[test]
    fn every_candidate_is_a_closed_shell_molecule_within_the_window() {
        let list = candidate_formulas(&caffeine_query()).unwrap();
        assert!(list.len() > 3);
        for c in &list {
            assert!(c.error_ppm.unwrap().abs() <= 5.0 + 1e-9, "{}", c.formula);
            assert_eq!(c.dbe.fract(), 0.0, "{}", c.formula);
            assert!(c.dbe >= 0.0);
            // [M+H]+ adds one H: the ion's DBE is half a unit below M's.
            assert_eq!(c.dbe - c.ion_dbe, 0.5, "{}", c.formula);
        }
        // Best first.
        assert!(list
            .windows(2)
            .all(|w| w[0].score.total >= w[1].score.total));
    }

    #[test]
    fn isotopes_pull_the_true_formula_to_the_top() {
        // Caffeine's M+1 10.3 % and M+2 0.89 % of M (IsoSpecPy values in
        // tests/reference/formula_table.tsv).
        let mut q = caffeine_query();
        q.isotopes = Some(MeasuredIsotopes {
            m1: Some(10.3),
            m2: Some(0.89),
            error: None,
        });
        let list = candidate_formulas(&q).unwrap();
        assert_eq!(list[0].formula, "C8H10N4O2", "{:?}", &list[..3]);
    }

    #[test]
    fn nominal_mode_keeps_the_nitrogen_rule() {
        // Nominal M+. at m/z 194 (caffeine): every candidate has an even number of N
        // (nitrogen rule, common practice: even nominal mass, even N count).
        let mut q = MassQuery::new(MeasuredMz::Nominal(194), IonType::RadicalCation);
        q.ranges = ElementRanges::parse("C0-20H0-40N0-6O0-6").unwrap();
        let list = candidate_formulas(&q).unwrap();
        assert!(list.iter().any(|c| c.formula == "C8H10N4O2"));
        for c in &list {
            assert_eq!(c.composition.count("N") % 2, 0, "{}", c.formula);
            assert_eq!(c.nominal_mass, 194);
        }
    }

    #[test]
    fn count_level_checks_agree_with_chem() {
        let ranges = ElementRanges::parse("C0-4H0-9N0-2O0-2S0-1P0-1Cl0-2Si0-1").unwrap();
        let mut checked = 0;
        for nominal in 1..=160 {
            crate::ms::formula_search::search_nominal(&ranges, nominal, |counts| {
                let composition = ranges.composition(counts);
                let f = Formula::from_composition(&composition).unwrap();
                let chem = f.lewis().passes() && f.senior().passes();
                assert_eq!(passes_lewis_and_senior(&ranges, counts), chem, "{f}");
                checked += 1;
            });
        }
        assert!(checked > 5_000, "{checked}");
    }

    #[test]
    fn absurd_numbers_are_refused() {
        let mut q = caffeine_query();
        q.mz = MeasuredMz::Accurate(-5.0);
        assert!(matches!(candidate_formulas(&q), Err(QueryError::BadMz(_))));
        q.mz = MeasuredMz::Accurate(1e9);
        assert!(matches!(candidate_formulas(&q), Err(QueryError::BadMz(_))));
        let mut q = caffeine_query();
        q.tolerance = Tolerance::Ppm(0.0);
        assert_eq!(candidate_formulas(&q), Err(QueryError::BadTolerance));
    }
}
