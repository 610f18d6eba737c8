//! Property tests: printing and parsing agree, masses add up, patterns hold all the
//! probability, the DBE formula behaves, and no input makes the parser panic.

use proptest::prelude::*;
use quiddity::chem::{aggregated_pattern, fine_structure_pattern, Formula};

/// Atom spellings the generator draws from (natural elements, labels, deuterium).
const ATOMS: &[&str] = &[
    "C", "H", "N", "O", "S", "P", "F", "Cl", "Br", "I", "Na", "K", "Si", "B", "Se", "Fe", "Cu",
    "Zn", "Sn", "Hg", "Pb", "Mg", "Ca", "As", "[13C]", "D", "[15N]", "[18O]", "[37Cl]",
];

/// Elements with few isotopes, whose fine structure is enumerated completely.
const ORGANIC_ATOMS: &[&str] = &[
    "C", "H", "N", "O", "S", "P", "F", "Cl", "Br", "I", "Si", "B", "Na", "K", "[13C]", "D",
];

/// A formula text: 1–6 atoms with counts, some wrapped in a multiplied group, in random
/// order, with an optional charge.
fn formula_text() -> impl Strategy<Value = String> {
    formula_text_from(ATOMS, 40)
}

fn formula_text_from(
    atoms: &'static [&'static str],
    max_count: u32,
) -> impl Strategy<Value = String> {
    (
        prop::collection::vec((0..atoms.len(), 1..max_count, any::<bool>(), 1u32..4), 1..6),
        -3i32..=3,
        any::<bool>(),
    )
        .prop_map(|(units, charge, radical)| {
            let mut text = String::new();
            for (atom, count, grouped, times) in units {
                if grouped {
                    text.push_str(&format!("({}{count}){times}", atoms[atom]));
                } else {
                    text.push_str(&format!("{}{count}", atoms[atom]));
                }
            }
            match charge {
                0 => {}
                1 => text.push('+'),
                -1 => text.push('-'),
                z if z > 0 => text.push_str(&format!(" {z}+")),
                z => text.push_str(&format!(" {}-", -z)),
            }
            if radical && charge != 0 {
                text.push('.');
            }
            text
        })
}

fn formula() -> impl Strategy<Value = Formula> {
    formula_text().prop_map(|t| Formula::parse(&t).unwrap_or_else(|e| panic!("{t}: {e}")))
}

/// Organic-sized formulas: up to a few dozen of each atom kind.
fn organic_formula() -> impl Strategy<Value = Formula> {
    formula_text_from(ORGANIC_ATOMS, 13)
        .prop_map(|t| Formula::parse(&t).unwrap_or_else(|e| panic!("{t}: {e}")))
}

proptest! {
    #[test]
    fn printing_then_parsing_gives_the_same_formula(f in formula()) {
        let printed = f.to_string();
        let reparsed = Formula::parse(&printed);
        prop_assert_eq!(reparsed, Ok(f), "{}", printed);
    }

    #[test]
    fn masses_add_over_formula_sums(a in formula(), b in formula()) {
        let sum = a.plus(&b).expect("within limits");
        let close = |x: f64, y: f64| (x - y).abs() <= 1e-9 * y.abs().max(1.0);
        prop_assert!(close(sum.monoisotopic_mass(), a.monoisotopic_mass() + b.monoisotopic_mass()));
        prop_assert!(close(sum.average_mass(), a.average_mass() + b.average_mass()));
        prop_assert_eq!(sum.nominal_mass(), a.nominal_mass() + b.nominal_mass());
        prop_assert_eq!(sum.charge(), a.charge() + b.charge());
        prop_assert_eq!(sum.minus(&b).expect("b is part of the sum").neutral(), a.neutral());
    }

    #[test]
    fn aggregated_patterns_keep_all_probability(f in formula()) {
        let pattern = aggregated_pattern(&f);
        prop_assert!((pattern.retained_probability() - 1.0).abs() < 1e-9,
            "{}: {}", f, pattern.retained_probability());
        prop_assert!((pattern.total_probability() - 1.0).abs() < 1e-12);
        let top = pattern.relative(0.0).iter().map(|p| p.relative).fold(0.0, f64::max);
        prop_assert_eq!(top, 100.0);
    }

    #[test]
    fn fine_structure_merged_at_low_resolution_equals_the_aggregated_pattern(
        f in organic_formula(),
    ) {
        // With a peak width of a quarter of the 1/|z| spacing, every nominal-mass cluster
        // (isotopologues a few mDa apart) merges into one peak, apart from its neighbours.
        // m/z divided by R = 4 m gives a width of 1/(4|z|) in m/z.
        let resolving_power = 4.0 * f.monoisotopic_mass();
        let fine = fine_structure_pattern(&f, resolving_power).expect("valid R");
        prop_assert!((fine.total_probability() - 1.0).abs() < 1e-12);
        let lost = 1.0 - fine.retained_probability();
        prop_assert!(lost < 1e-5, "{}: lost {}", f, lost);
        let aggregated = aggregated_pattern(&f);
        let big: Vec<_> = aggregated.peaks().iter().filter(|p| p.probability > 1e-6).collect();
        for peak in big {
            let matched = fine.peaks().iter().find(|q| (q.mz - peak.mz).abs() < 0.05);
            prop_assert!(matched.is_some(), "{}: no fine peak near {}", f, peak.mz);
            let q = matched.map_or(0.0, |q| q.probability);
            prop_assert!((q - peak.probability).abs() < 1e-6 + 1e-4 * peak.probability + 2.0 * lost,
                "{}: {} vs {}", f, q, peak.probability);
        }
    }

    #[test]
    fn saturated_acyclic_alkanes_have_dbe_zero(n in 1u32..5000) {
        let alkane = Formula::parse(&format!("C{n}H{}", 2 * n + 2)).expect("valid");
        prop_assert_eq!(alkane.dbe(), 0.0);
    }

    #[test]
    fn random_bytes_never_panic_the_parser(bytes in prop::collection::vec(any::<u8>(), 0..64)) {
        let text = String::from_utf8_lossy(&bytes);
        if let Err(e) = Formula::parse(&text) {
            prop_assert!(e.offset <= text.len());
            let _ = e.to_diagnostic("<fuzz>").render();
        }
    }

    #[test]
    fn formula_like_noise_never_panics_the_parser(text in "[A-Za-z0-9()\\[\\]·.•+\\-^ ]{0,40}") {
        if let Err(e) = Formula::parse(&text) {
            prop_assert!(e.offset <= text.len());
            prop_assert!(text.is_char_boundary(e.offset));
            let message = e.to_string();
            prop_assert!(message.chars().next().is_some_and(|c| !c.is_uppercase()), "{}", message);
        }
    }
}

#[test]
fn huge_and_deep_inputs_are_refused_not_crashed() {
    assert!(Formula::parse("C1000000000000").is_err());
    assert!(Formula::parse("C99999999999999999999999999999").is_err());
    assert!(Formula::parse(&"(".repeat(10_000)).is_err());
    let deep = format!("{}C{}", "(".repeat(100), ")2".repeat(100));
    assert!(Formula::parse(&deep).is_err());
    let wide = format!("{}C", "((C)1000)".repeat(2000));
    assert!(
        Formula::parse(&wide).is_err(),
        "a million-atom total is the limit"
    );
}

#[test]
fn fine_structure_of_many_heavy_atoms_is_truncated_and_says_so() {
    // 100 tin atoms (ten isotopes) have far more isotopologues than are kept: the most
    // probable ones are returned and the loss is reported, never hidden.
    let tin = Formula::parse("Sn100").expect("valid");
    let fine = fine_structure_pattern(&tin, 100_000.0).expect("valid R");
    assert!(fine.retained_probability() < 0.5);
    assert!((fine.total_probability() - 1.0).abs() < 1e-12);
    // The aggregated pattern has no such limit.
    assert!((aggregated_pattern(&tin).retained_probability() - 1.0).abs() < 1e-9);
}
