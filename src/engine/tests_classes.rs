//! The classes gathered as the walk goes (`classes`) against the straightforward path
//! (every consistent combination collected, scored, sorted, then collapsed): the same
//! combinations, classes, ranks, alternatives and explanations, on fixed cases of the
//! shipped catalogue (with and without the enumeration limit cutting the list) and on
//! generated molecules of the test catalogue.

use super::*;
use crate::case::parse;
use crate::engine::testkit::small_catalogue;
use crate::rules::{embedded_catalogue, Catalogue};
use proptest::prelude::*;

/// Everything the ranking decides, in rank order: per class its best member's score,
/// counts and skeleton carbons and the other members' counts; then the number of
/// combinations, which groups occur, whether the list was cut, and the candidates shown
/// as JSON.
type Listing = (
    Vec<(f64, Vec<u32>, u32, Vec<Vec<u32>>)>,
    usize,
    Vec<bool>,
    bool,
    String,
);

fn problem_of<'c>(case: &'c Case, catalogue: &'c Catalogue, options: &SolveOptions) -> Problem<'c> {
    Problem::new(case, catalogue, options, &BTreeSet::new())
}

fn straightforward(case: &Case, catalogue: &Catalogue, options: &SolveOptions) -> Listing {
    let problem = problem_of(case, catalogue, options);
    let parts = score::group_parts(&problem, None, None);
    let found = budget::infallible(find_consistent(
        &problem,
        options,
        &mut Unmetered,
        Stage::Enumeration,
    ));
    let truncated = found.truncated;
    let ranked = Ranked::new(&problem, found.combinations, &parts);
    let classes = ranked
        .classes
        .iter()
        .map(|(best, rest)| {
            let (s, counts, sk) = &ranked.scored[*best];
            let rest = rest.iter().map(|r| ranked.scored[*r].1.clone()).collect();
            (*s, counts.clone(), *sk, rest)
        })
        .collect();
    let shown = ranked.candidates(&problem, options, None, None, &parts);
    (
        classes,
        ranked.scored.len(),
        ranked.groups_in_some_candidate(problem.groups.len()),
        truncated,
        serde_json::to_string(&shown).unwrap_or_else(|e| panic!("{e}")),
    )
}

fn gathered(case: &Case, catalogue: &Catalogue, options: &SolveOptions) -> Listing {
    let problem = problem_of(case, catalogue, options);
    let parts = score::group_parts(&problem, None, None);
    let g = budget::infallible(classes::gather(
        &problem,
        options,
        &parts,
        &mut Unmetered,
        Stage::Enumeration,
    ));
    let truncated = g.truncated;
    let ranked = classes::Ranked::new(g);
    let m = &ranked.members;
    let classes = ranked
        .best
        .iter()
        .zip(ranked.others(usize::MAX))
        .map(|(&b, rest)| {
            let rest = rest.iter().map(|&r| m.counts(r)).collect();
            (m.score(b), m.counts(b), m.skeleton(b), rest)
        })
        .collect();
    let shown = shown_candidates(&problem, &ranked, options, None, None, &parts);
    let in_some = if ranked.in_some_candidate.is_empty() {
        vec![false; problem.groups.len()]
    } else {
        ranked.in_some_candidate.clone()
    };
    (
        classes,
        m.len(),
        in_some,
        truncated,
        serde_json::to_string(&shown).unwrap_or_else(|e| panic!("{e}")),
    )
}

fn case(src: &str) -> Case {
    let (case, d) = parse(src, "t.yaml");
    case.unwrap_or_else(|| panic!("{d:?}"))
}

/// Asserts that both paths list the same; returns the number of classes.
fn assert_same(src: &str, catalogue: &Catalogue, options: &SolveOptions) -> usize {
    let k = case(src);
    let a = straightforward(&k, catalogue, options);
    let b = gathered(&k, catalogue, options);
    assert_eq!(a.1, b.1, "combinations differ for {src}");
    assert_eq!(a.0.len(), b.0.len(), "classes differ for {src}");
    assert_eq!(a.0, b.0, "ranked classes differ for {src}");
    assert_eq!(a.2, b.2, "groups in some candidate differ for {src}");
    assert_eq!(a.3, b.3, "truncation differs for {src}");
    assert_eq!(a.4, b.4, "candidates shown differ for {src}");
    b.0.len()
}

/// An invented 25-heavy-atom, 8-heteroatom case with a loose band list (thousands of
/// consistent combinations), and an invented aryl ketone.
const LOOSE: &str = "formula: C17H17ClN2O4S\nir:\n  technique: KBr\n  bands:\n    - { at: 3280, strength: medium }\n    - { at: 3060, strength: weak }\n    - { at: 2960, strength: medium }\n    - { at: 1735, strength: strong }\n    - { at: 1670, strength: strong }\n    - { at: 1595, strength: medium }\n    - { at: 1340, strength: strong }\n    - { at: 1160, strength: strong }\n    - { at: 830, strength: strong }\n";
const KETONE: &str = "formula: C8H8O\nir:\n  technique: film\n  bands:\n    - { at: 3062, strength: weak }\n    - { at: 1686, strength: strong }\n    - { at: 1598, strength: medium }\n    - { at: 760, strength: strong }\n    - { at: 690, strength: strong }\n";
const UNSATURATED: &str = "formula: C10H12O2\nir:\n  technique: ATR\n  bands:\n    - { at: 3020, strength: weak }\n    - { at: 2930, strength: medium }\n    - { at: 1715, strength: strong }\n    - { at: 1640, strength: medium }\n    - { at: 1250, strength: strong }\n";

#[test]
fn gathering_classes_as_the_walk_goes_ranks_as_sorting_everything_does() {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    for limit in [10_000, 700, 1] {
        let options = SolveOptions {
            enumeration_limit: limit,
            max_candidates: 40,
            ..SolveOptions::default()
        };
        for src in [LOOSE, KETONE, UNSATURATED] {
            assert!(
                assert_same(src, &catalogue, &options) > 0,
                "nothing to compare: {src}"
            );
        }
    }
}

#[test]
fn the_loose_case_is_cut_at_the_limit_the_same_way() {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    let options = SolveOptions {
        enumeration_limit: 700,
        ..SolveOptions::default()
    };
    let k = case(LOOSE);
    let b = gathered(&k, &catalogue, &options);
    assert!(
        b.3,
        "the loose case has more than 700 consistent combinations"
    );
    assert_eq!(b.1, 700);
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 32, .. ProptestConfig::default() })]

    /// Random formulas and band lists on the test catalogue: both paths agree.
    #[test]
    fn both_paths_agree_on_random_cases(
        c in 1u32..9,
        o in 0u32..4,
        n in 0u32..3,
        dbe in 0u32..6,
        bands in proptest::collection::vec((600u32..3700, 0usize..3), 0..7),
        limit in proptest::sample::select(vec![3usize, 50, 10_000]),
    ) {
        let h = 2 * c + 2 + n;
        prop_assume!(h > 2 * dbe);
        let h = h - 2 * dbe;
        let count = |e: &str, k: u32| if k == 0 { String::new() } else { format!("{e}{k}") };
        let mut src = format!("formula: C{c}H{h}{}{}\n", count("N", n), count("O", o));
        if !bands.is_empty() {
            src.push_str("ir:\n  technique: film\n  bands:\n");
            for (at, s) in &bands {
                let s = ["weak", "medium", "strong"][*s];
                src.push_str(&format!("    - {{ at: {at}, strength: {s} }}\n"));
            }
        }
        let options = SolveOptions { enumeration_limit: limit, ..SolveOptions::default() };
        assert_same(&src, &small_catalogue(), &options);
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, .. ProptestConfig::default() })]

    /// Random formulas with N, O, S and Cl, band lists with strengths, shapes and
    /// widths, and every technique (the vapour phase brings rotational branches) on the
    /// shipped catalogue, whose patterns and skeleton rules the test catalogue lacks:
    /// the walk that fills the hydrocarbon splits in afterwards (`tails`) lists what
    /// checking every leaf lists.
    #[test]
    fn both_paths_agree_on_random_cases_of_the_shipped_catalogue(
        c in 2u32..11,
        o in 0u32..4,
        n in 0u32..3,
        s in 0u32..2,
        cl in 0u32..2,
        dbe in 0u32..7,
        technique in proptest::sample::select(vec!["film", "KBr", "ATR", "gas", "solution", "mull"]),
        bands in proptest::collection::vec(
            (600u32..3700, 0usize..3, 0usize..4, proptest::option::of(5u32..300)),
            0..9,
        ),
        limit in proptest::sample::select(vec![5usize, 10_000]),
    ) {
        let h = 2 * c + 2 + n;
        prop_assume!(h > 2 * dbe + cl);
        let h = h - 2 * dbe - cl;
        let count = |e: &str, k: u32| if k == 0 { String::new() } else { format!("{e}{k}") };
        let mut src = format!(
            "formula: C{c}H{h}{}{}{}{}\nir:\n  technique: {technique}\n  bands:\n",
            count("Cl", cl),
            count("N", n),
            count("O", o),
            count("S", s),
        );
        let mut seen_at = std::collections::BTreeSet::new();
        for (at, strength, shape, width) in &bands {
            if !seen_at.insert(*at) {
                continue;
            }
            let strength = ["weak", "medium", "strong"][*strength];
            let shape = ["", ", shape: broad", ", shape: sharp", ""][*shape];
            let width = width.map(|w| format!(", width: {w}")).unwrap_or_default();
            src.push_str(&format!("    - {{ at: {at}, strength: {strength}{shape}{width} }}\n"));
        }
        if bands.is_empty() {
            src = format!("formula: C{c}H{h}{}{}{}{}\n", count("Cl", cl), count("N", n), count("O", o), count("S", s));
        }
        let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
        let options = SolveOptions { enumeration_limit: limit, ..SolveOptions::default() };
        assert_same(&src, &catalogue, &options);
    }
}

#[test]
fn ranking_only_the_classes_shown_ranks_them_as_ranking_every_class_does() {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    let options = SolveOptions::default();
    let k = case(LOOSE);
    let problem = problem_of(&k, &catalogue, &options);
    let parts = score::group_parts(&problem, None, None);
    let gather = || {
        budget::infallible(classes::gather(
            &problem,
            &options,
            &parts,
            &mut Unmetered,
            Stage::Enumeration,
        ))
    };
    let every = classes::Ranked::new(gather());
    assert!(every.best.len() > 100, "the loose case has many classes");
    for shown in [1, 5, 25, 100] {
        let top = classes::Ranked::top(gather(), shown);
        assert_eq!(top.n_classes, every.best.len());
        assert_eq!(top.best, every.best[..shown]);
        assert_eq!(top.others(shown), every.others(shown));
    }
    let all = classes::Ranked::top(gather(), usize::MAX);
    assert_eq!(all.best, every.best);
}
