//! Properties of the formula search and the M+2 bounds, over random inputs:
//! - any combination within the ranges is found by the fast search from its own mass;
//! - the fast search returns exactly the nested-loop reference's set, in accurate and
//!   nominal mode, on random small ranges and targets;
//! - the best-first ranking (`ms::best_formulas`) returns exactly the first k of the
//!   full ranking, with and without a measured M+2;
//! - the Cl / Br / S bounds from M+2 never exclude the counts of the formula whose
//!   computed M+1 / M+2 (perturbed within the stated error) they are given.

use proptest::prelude::*;
use quiddity::chem::elements::element;
use quiddity::ms::formula_search::{
    mass_of, nominal_mass_of, reference_search_mass, reference_search_nominal, search_mass,
    search_nominal,
};
use quiddity::ms::isotope_fit::isotope_ratios_of_counts;
use quiddity::ms::{
    best_formulas, candidate_formulas, halogen_bounds_from_m2, ElementRange, ElementRanges,
    IonType, MassQuery, MeasuredIsotopes, MeasuredMz, Tolerance,
};

const SYMBOLS: [&str; 11] = ["C", "H", "N", "O", "S", "P", "F", "Cl", "Br", "I", "Si"];

fn ranges_from(maxima: &[u32]) -> ElementRanges {
    let ranges = SYMBOLS
        .iter()
        .zip(maxima)
        .filter(|(_, m)| **m > 0)
        .map(|(s, m)| ElementRange {
            element: element(s).expect("known element"),
            min: 0,
            max: *m,
        })
        .collect();
    ElementRanges::from_ranges(ranges).expect("valid ranges")
}

fn sorted(mut v: Vec<Vec<u32>>) -> Vec<Vec<u32>> {
    v.sort();
    v
}

/// Small random ranges (so nested loops stay quick): C up to 12, H up to 24, and up to
/// four of the other nine elements with at most 3 atoms each.
fn small_ranges() -> impl Strategy<Value = ElementRanges> {
    (
        1u32..=12,
        0u32..=24,
        prop::sample::subsequence((2..11).collect::<Vec<usize>>(), 0..=4),
        prop::collection::vec(1u32..=3, 4),
    )
        .prop_map(|(c, h, chosen, maxima_of_chosen)| {
            let mut maxima = vec![0u32; 11];
            maxima[0] = c;
            maxima[1] = h;
            for (slot, max) in chosen.iter().zip(maxima_of_chosen) {
                maxima[*slot] = max;
            }
            ranges_from(&maxima)
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(32))]

    #[test]
    fn any_formula_in_range_is_found_from_its_own_mass(
        c in 0u32..=40,
        h in 0u32..=80,
        hetero in prop::collection::vec(0u32..=2, 9),
        ppm in 0.5f64..10.0,
    ) {
        // Default ranges (C H N O S P F Cl Br I Si); counts within them. The time of one
        // search grows with the mass, so formulas stay below m/z 800.
        let ranges = ElementRanges::default();
        let mut counts = vec![c, h];
        counts.extend(hetero);
        let m = mass_of(&ranges, &counts);
        prop_assume!(m > 0.0 && m < 800.0);
        let tol = m * ppm * 1e-6;
        let mut found = false;
        search_mass(&ranges, m - tol, m + tol, |c| found |= c == counts.as_slice());
        prop_assert!(found, "{counts:?} at {m}");
    }

    #[test]
    fn any_formula_in_small_ranges_is_found_from_its_nominal_mass(
        counts in prop::collection::vec(0u32..=3, 11),
    ) {
        // Nominal mode lists every formula at that integer mass (millions over the default
        // ranges at high mass), so this property runs on small ranges.
        let ranges = ranges_from(&[8, 16, 3, 3, 3, 3, 3, 3, 3, 3, 3]);
        let counts: Vec<u32> = ranges
            .ranges()
            .iter()
            .zip(&counts)
            .map(|(r, n)| (*n).min(r.max))
            .collect();
        prop_assume!(counts.iter().any(|n| *n > 0));
        let mut found = false;
        search_nominal(&ranges, nominal_mass_of(&ranges, &counts), |c| {
            found |= c == counts.as_slice()
        });
        prop_assert!(found, "{counts:?}");
    }

    #[test]
    fn fast_search_equals_nested_loops(
        ranges in small_ranges(),
        target in 20.0f64..300.0,
        window in 1e-4f64..0.05,
    ) {
        let mut fast = Vec::new();
        search_mass(&ranges, target - window, target + window, |c| fast.push(c.to_vec()));
        let mut slow = Vec::new();
        reference_search_mass(&ranges, target - window, target + window, |c| {
            slow.push(c.to_vec())
        });
        prop_assert_eq!(sorted(fast), sorted(slow));
    }

    #[test]
    fn best_first_ranking_is_the_prefix_of_the_full_ranking(
        ranges in small_ranges(),
        nominal in 30u32..300,
        accurate in proptest::bool::ANY,
        k in 1usize..12,
        m2 in proptest::option::of(0.0f64..120.0),
    ) {
        let mz = if accurate {
            MeasuredMz::Accurate(f64::from(nominal) + 0.02)
        } else {
            MeasuredMz::Nominal(nominal)
        };
        let mut q = MassQuery::new(mz, IonType::RadicalCation);
        q.ranges = ranges;
        q.tolerance = Tolerance::Mda(30.0);
        q.isotopes = m2.map(|m2| MeasuredIsotopes { m1: None, m2: Some(m2), error: None });
        let all = candidate_formulas(&q).expect("valid query");
        let best = best_formulas(&q, k).expect("valid query");
        prop_assert_eq!(&best.best[..], &all[..all.len().min(k)]);
        if best.complete {
            prop_assert_eq!(best.n_scored, all.len());
        }
    }

    #[test]
    fn nominal_search_equals_nested_loops(ranges in small_ranges(), nominal in 12u64..300) {
        let mut fast = Vec::new();
        search_nominal(&ranges, nominal, |c| fast.push(c.to_vec()));
        let mut slow = Vec::new();
        reference_search_nominal(&ranges, nominal, |c| slow.push(c.to_vec()));
        prop_assert_eq!(sorted(fast), sorted(slow));
    }

    #[test]
    fn m2_bounds_never_exclude_the_truth(
        counts in prop::collection::vec(0u32..=6, 11),
        noise1 in -1.0f64..1.0,
        noise2 in -1.0f64..1.0,
    ) {
        let ranges = ElementRanges::default();
        let counts: Vec<u32> = ranges
            .ranges()
            .iter()
            .zip(&counts)
            .map(|(r, n)| (*n).min(r.max))
            .collect();
        prop_assume!(counts.iter().any(|n| *n > 0));
        let ratios = isotope_ratios_of_counts(&ranges, &counts);
        let error = 1.0;
        // Measured within the stated error of the computed value.
        let measured = MeasuredIsotopes {
            m1: Some((ratios.m1 + noise1 * error).max(0.0)),
            m2: Some((ratios.m2 + noise2 * error).max(0.0)),
            error: Some(error),
        };
        let neutral = mass_of(&ranges, &counts);
        let bounds = halogen_bounds_from_m2(&measured, Some(neutral), &ranges);
        let count = |s: &str| {
            ranges
                .ranges()
                .iter()
                .position(|r| r.element.symbol == s)
                .map_or(0, |i| counts[i])
        };
        prop_assert!(
            bounds.allows(count("Cl"), count("Br"), count("S")),
            "{counts:?}: M+1 {} M+2 {}",
            ratios.m1,
            ratios.m2
        );
    }
}
