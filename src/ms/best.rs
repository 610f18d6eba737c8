//! The best `k` candidate formulas of a query, best first, without scoring every formula
//! the mass allows: output-sensitive ranking.
//!
//! # Why it is exact
//! Every part of a formula's score is ≤ 0 (mass −½(e/σ)², isotopes −½Σd², each broken
//! heuristic a negative penalty), and the heuristics charge
//! [`PER_EXTRA_ELEMENT`] for each element present beyond C, H, N and O. So a formula
//! holding `p` such elements scores at most `p · PER_EXTRA_ELEMENT` (floating-point
//! addition of non-positive terms never rounds above a partial sum).
//!
//! The search is therefore split by *element set*: for each subset of the optional
//! elements beyond CHNO (those whose range starts at 0), a search over the ranges with
//! the subset's elements forced to at least one atom and the others to none. The subsets
//! are visited by increasing size, so their bounds never rise; the best `k` seen so far
//! are kept in a heap ordered exactly like [`super::candidate_formulas`] (score, then
//! fewer atoms, then Hill order). As soon as the heap is full and its worst member scores
//! strictly above the bound of every subset not yet searched, nothing left can enter and
//! the search stops. The `k` kept are then exactly the first `k` of the full ranking
//! (a unit test and a proptest compare both).
//!
//! For the commonest query — a molecular ion of an organic compound, no M+2 pointing at a
//! halogen — the CHNO subset alone fills the heap with formulas scoring 0, and none of the
//! 127 halogen/S/P/Si subsets is searched: the cost follows the answer, not the millions
//! of formulas a nominal mass allows near m/z 800.

use super::formula_search::Walk;
use super::heuristics::PER_EXTRA_ELEMENT;
use super::ranges::ElementRanges;
use super::rank::{
    evaluate, rank_order, search_query_while, validate, FormulaCandidate, MassQuery, QueryError,
    RankError,
};
use crate::budget::{Meter, Stage, Unmetered};
use std::cmp::Ordering;
use std::collections::BinaryHeap;

/// The best candidates of a query and how much was looked at.
#[derive(Clone, Debug, PartialEq)]
pub struct BestFormulas {
    /// The first `k` candidates of the full ranking, best first, ranked 1…k.
    pub best: Vec<FormulaCandidate>,
    /// Candidates scored (passing the filters) on the way.
    pub n_scored: usize,
    /// True when every element set was searched, so `n_scored` is the number of all
    /// candidates; false when the search stopped early (then it is a lower bound).
    pub complete: bool,
}

/// Elements beyond C, H, N and O: the ones the heuristics charge for.
fn is_extra(symbol: &str) -> bool {
    !matches!(symbol, "C" | "H" | "N" | "O")
}

/// A candidate ordered so that the heap's top is the worst kept.
struct Kept(FormulaCandidate);

impl Kept {
    fn cmp_rank(a: &FormulaCandidate, b: &FormulaCandidate) -> Ordering {
        // The full ranking's order: better first.
        rank_order(a, b)
    }
}

impl PartialEq for Kept {
    fn eq(&self, other: &Kept) -> bool {
        Kept::cmp_rank(&self.0, &other.0) == Ordering::Equal
    }
}
impl Eq for Kept {}
impl PartialOrd for Kept {
    fn partial_cmp(&self, other: &Kept) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}
impl Ord for Kept {
    /// Worse is greater (a max-heap keeps the worst on top).
    fn cmp(&self, other: &Kept) -> Ordering {
        Kept::cmp_rank(&self.0, &other.0)
    }
}

/// [`best_formulas_within`] without a budget.
pub fn best_formulas(query: &MassQuery, k: usize) -> Result<BestFormulas, QueryError> {
    best_formulas_within(query, k, &mut Unmetered).map_err(|e| match e {
        RankError::Query(q) => q,
        RankError::Limit(never) => match never {},
    })
}

/// The first `k` (≥ 1) candidates of [`super::candidate_formulas`]'s ranking, found best
/// first (module documentation); metered like
/// [`super::candidate_formulas_within`]: a tick per raw hit, the kept candidates held.
pub fn best_formulas_within<M: Meter>(
    query: &MassQuery,
    k: usize,
    meter: &mut M,
) -> Result<BestFormulas, RankError<M::Stop>> {
    validate(query).map_err(RankError::Query)?;
    let k = k.max(1);
    let base = query.ranges.ranges();
    let forced = base
        .iter()
        .filter(|r| is_extra(r.element.symbol) && r.min > 0)
        .count();
    let optional: Vec<usize> = (0..base.len())
        .filter(|&i| is_extra(base[i].element.symbol) && base[i].min == 0 && base[i].max > 0)
        .collect();
    // Subsets of the optional elements by size, then bit pattern (deterministic).
    let mut subsets: Vec<u64> = (0..1u64 << optional.len()).collect();
    subsets.sort_by_key(|m| (m.count_ones(), *m));

    let mut heap: BinaryHeap<Kept> = BinaryHeap::with_capacity(k + 1);
    let mut held = 0u64;
    let mut n_scored = 0usize;
    let mut stop = None;
    let mut complete = true;
    for mask in subsets {
        let bound = PER_EXTRA_ELEMENT * (forced + mask.count_ones() as usize) as f64;
        if heap.len() == k && heap.peek().is_some_and(|w| w.0.score.total > bound) {
            complete = false;
            break;
        }
        let mut sub = base.to_vec();
        for (bit, &i) in optional.iter().enumerate() {
            if mask & (1 << bit) != 0 {
                sub[i].min = 1;
            } else {
                sub[i].max = 0;
            }
        }
        let Some(ranges) = ElementRanges::from_ranges(sub) else {
            continue;
        };
        let mut consider = |counts: &[u32]| {
            let step = match evaluate(query, counts) {
                Some(c) => {
                    n_scored += 1;
                    let enters = heap.len() < k
                        || heap
                            .peek()
                            .is_some_and(|w| Kept::cmp_rank(&c, &w.0) == Ordering::Less);
                    if enters {
                        let bytes = c.bytes_held();
                        heap.push(Kept(c));
                        held += bytes;
                        let mut r = meter.hold(bytes, Stage::FormulaSearch);
                        if heap.len() > k {
                            if let Some(out) = heap.pop() {
                                let b = out.0.bytes_held();
                                held -= b;
                                meter.release(b);
                            }
                        }
                        if r.is_ok() {
                            r = meter.tick(Stage::FormulaSearch);
                        }
                        r
                    } else {
                        meter.tick(Stage::FormulaSearch)
                    }
                }
                None => meter.tick(Stage::FormulaSearch),
            };
            match step {
                Ok(()) => Walk::Continue,
                Err(e) => {
                    stop = Some(e);
                    Walk::Stop
                }
            }
        };
        // `evaluate` reads counts aligned with the query's ranges: `sub` keeps the same
        // elements in the same order, only their bounds differ.
        search_query_while(query, &ranges, &mut consider);
        if stop.is_some() {
            break;
        }
    }
    meter.release(held);
    if let Some(e) = stop {
        return Err(RankError::Limit(e));
    }
    let mut best: Vec<FormulaCandidate> = heap.into_iter().map(|k| k.0).collect();
    best.sort_by(Kept::cmp_rank);
    for (i, c) in best.iter_mut().enumerate() {
        c.rank = i + 1;
    }
    Ok(BestFormulas {
        best,
        n_scored,
        complete,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ms::{candidate_formulas, IonType, MeasuredIsotopes, MeasuredMz, Tolerance};

    fn same_prefix(q: &MassQuery, k: usize) -> BestFormulas {
        let all = candidate_formulas(q).unwrap_or_else(|e| panic!("{e}"));
        let best = best_formulas(q, k).unwrap_or_else(|e| panic!("{e}"));
        let names =
            |v: &[FormulaCandidate]| v.iter().map(|c| c.formula.clone()).collect::<Vec<_>>();
        assert_eq!(
            names(&best.best),
            names(&all[..all.len().min(k)]),
            "{q:?} k={k}"
        );
        assert_eq!(best.best, all[..all.len().min(k)].to_vec());
        if best.complete {
            assert_eq!(best.n_scored, all.len());
        } else {
            assert!(best.n_scored <= all.len());
        }
        best
    }

    #[test]
    fn the_best_k_are_the_first_k_of_the_full_ranking() {
        // Caffeine [M+H]+ 195.0877 (common practice value), nominal M+. 194, and a
        // chlorinated case pulled by its M+2 (one Cl ≈ 32 % of M, common practice).
        let mut queries = vec![
            MassQuery::new(MeasuredMz::Accurate(195.0877), IonType::Protonated),
            MassQuery::new(MeasuredMz::Nominal(194), IonType::RadicalCation),
            MassQuery::new(MeasuredMz::Nominal(250), IonType::RadicalCation),
            MassQuery::new(MeasuredMz::Accurate(301.1), IonType::Sodiated),
        ];
        let mut cl = MassQuery::new(MeasuredMz::Accurate(154.0185), IonType::RadicalCation);
        cl.tolerance = Tolerance::Ppm(10.0);
        cl.isotopes = Some(MeasuredIsotopes {
            m1: Some(8.9),
            m2: Some(32.5),
            error: None,
        });
        queries.push(cl);
        let mut stopped_early = 0;
        for q in &queries {
            for k in [1, 5, 40] {
                if !same_prefix(q, k).complete {
                    stopped_early += 1;
                }
            }
        }
        // The point of the search: most of these stop before the halogen subsets.
        assert!(stopped_early >= 6, "{stopped_early}");
    }

    #[test]
    fn a_chlorine_pattern_makes_the_search_go_past_chno() {
        // C6H5Cl (chlorobenzene): monoisotopic 112.0080 u, M+. at m/z 112.0074 after the
        // electron mass (from memory), M+2 at 32 % of M (one Cl, common practice).
        let mut q = MassQuery::new(MeasuredMz::Accurate(112.0074), IonType::RadicalCation);
        q.isotopes = Some(MeasuredIsotopes {
            m1: Some(6.6),
            m2: Some(32.0),
            error: None,
        });
        let best = same_prefix(&q, 3);
        assert_eq!(best.best[0].formula, "C6H5Cl", "{:?}", best.best);
    }
}
