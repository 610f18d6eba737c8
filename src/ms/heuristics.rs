//! Element-ratio heuristics after the "Seven Golden Rules" (Kind & Fiehn, BMC
//! Bioinformatics 8:105, 2007). All ranges below are `from memory` of that paper.
//!
//! | paper's rule | what quiddity does with it |
//! |---|---|
//! | 1 element counts by mass range | not applied: the user's element ranges play that role |
//! | 2 LEWIS and SENIOR | **filter** (chem's checks, in [`super::rank`]) |
//! | 3 isotope pattern | **score** ([`super::isotope_fit`]) |
//! | 4 H/C ratio | **score**: −1 outside the common range, −3 outside the extended one |
//! | 5 N, O, P, S, F, Cl, Br, Si / C ratios | **score** as rule 4; a filter (extended ranges) only with `strict` |
//! | 6 element probability (several of N, O, P, S at once) | **score**: −2 per broken condition |
//! | 7 TMS (derivatised samples) | not applied |
//! | — (quiddity's own prior, not from the paper) | **score**: −0.5 per element other than C, H, N, O |
//!
//! Why scores and not filters by default: the paper's ranges describe databases of
//! mostly larger molecules; small halogenated solvents — the drum-of-solvent unknowns
//! this tool is for — exceed them (CCl4 has Cl/C = 4 and H/C = 0, CHBr3 Br/C = 3), so as
//! filters they would rule the right answer out. As scores they still push unusual
//! formulas down the list. A formula without carbon gets −2 instead of the ratio checks
//! (ratios to C are undefined).

use crate::chem::Composition;

/// One element/carbon ratio rule: the range covering ~99.7 % of the paper's formulas
/// (common) and the wider one covering nearly all (extended).
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct RatioRule {
    /// Element whose count is divided by the carbon count.
    pub element: &'static str,
    /// Common range (inclusive).
    pub common: (f64, f64),
    /// Extended range (inclusive).
    pub extended: (f64, f64),
}

/// Rules 4 and 5 (Kind & Fiehn 2007, `from memory`).
pub const RATIO_RULES: &[RatioRule] = &[
    RatioRule {
        element: "H",
        common: (0.2, 3.1),
        extended: (0.1, 6.0),
    },
    RatioRule {
        element: "N",
        common: (0.0, 1.3),
        extended: (0.0, 4.0),
    },
    RatioRule {
        element: "O",
        common: (0.0, 1.2),
        extended: (0.0, 3.0),
    },
    RatioRule {
        element: "P",
        common: (0.0, 0.3),
        extended: (0.0, 2.0),
    },
    RatioRule {
        element: "S",
        common: (0.0, 0.8),
        extended: (0.0, 3.0),
    },
    RatioRule {
        element: "F",
        common: (0.0, 1.5),
        extended: (0.0, 6.0),
    },
    RatioRule {
        element: "Cl",
        common: (0.0, 0.8),
        extended: (0.0, 2.0),
    },
    RatioRule {
        element: "Br",
        common: (0.0, 0.8),
        extended: (0.0, 2.0),
    },
    RatioRule {
        element: "Si",
        common: (0.0, 0.5),
        extended: (0.0, 1.0),
    },
];

/// Rule 6: when every listed element exceeds `when_all_above`, each must stay below its
/// limit (Kind & Fiehn 2007, `from memory`).
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct ProbabilityRule {
    /// Elements that must all exceed `when_all_above` for the rule to apply.
    pub elements: &'static [&'static str],
    /// Threshold.
    pub when_all_above: u32,
    /// (element, count must be below this).
    pub limits: &'static [(&'static str, u32)],
}

/// Rule 6 (Kind & Fiehn 2007, `from memory`).
pub const PROBABILITY_RULES: &[ProbabilityRule] = &[
    ProbabilityRule {
        elements: &["N", "O", "P", "S"],
        when_all_above: 1,
        limits: &[("N", 10), ("O", 20), ("P", 4), ("S", 3)],
    },
    ProbabilityRule {
        elements: &["N", "O", "P"],
        when_all_above: 3,
        limits: &[("N", 11), ("O", 22), ("P", 6)],
    },
    ProbabilityRule {
        elements: &["O", "P", "S"],
        when_all_above: 1,
        limits: &[("O", 14), ("P", 3), ("S", 3)],
    },
    ProbabilityRule {
        elements: &["P", "S", "N"],
        when_all_above: 1,
        limits: &[("P", 3), ("S", 3), ("N", 4)],
    },
    ProbabilityRule {
        elements: &["N", "O", "S"],
        when_all_above: 6,
        limits: &[("N", 19), ("O", 14), ("S", 8)],
    },
];

/// Penalty for a ratio outside the common range (inside the extended one).
pub const OUTSIDE_COMMON: f64 = -1.0;
/// Penalty for a ratio outside the extended range.
pub const OUTSIDE_EXTENDED: f64 = -3.0;
/// Penalty per broken rule-6 condition.
pub const IMPROBABLE_COMBINATION: f64 = -2.0;
/// Penalty for a formula without carbon.
pub const NO_CARBON: f64 = -2.0;
/// Penalty per element other than C, H, N, O: quiddity's own prior that, other things
/// equal, a formula drawing on fewer kinds of element is the likelier one (common
/// practice of the trade when reading a candidate list; the value is our choice).
pub const PER_EXTRA_ELEMENT: f64 = -0.5;

/// One heuristic that a formula does not meet.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct HeuristicNote {
    /// Which rule: `ratio.H/C`, `probability.NOPS`, `no_carbon`.
    pub rule: String,
    /// What is unusual, in words.
    pub message: String,
    /// Score change (negative).
    pub penalty: f64,
}

/// The heuristics' verdict on one formula.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct HeuristicVerdict {
    /// Sum of the penalties (0 when every heuristic is met).
    pub score: f64,
    /// Every heuristic not met.
    pub notes: Vec<HeuristicNote>,
    /// Every ratio within its extended range (what the `strict` filter requires).
    pub within_extended_ranges: bool,
}

/// Applies rules 4, 5 and 6 to `composition`.
pub fn assess(composition: &Composition) -> HeuristicVerdict {
    let mut notes = Vec::new();
    let mut within_extended_ranges = true;
    let c = composition.count("C");
    if c == 0 {
        notes.push(HeuristicNote {
            rule: "no_carbon".into(),
            message: "no carbon: element ratios to C do not apply".into(),
            penalty: NO_CARBON,
        });
    } else {
        for rule in RATIO_RULES {
            let ratio = f64::from(composition.count(rule.element)) / f64::from(c);
            let inside = |(lo, hi): (f64, f64)| lo <= ratio && ratio <= hi;
            if inside(rule.common) {
                continue;
            }
            let (penalty, which, range) = if inside(rule.extended) {
                (OUTSIDE_COMMON, "common", rule.common)
            } else {
                within_extended_ranges = false;
                (OUTSIDE_EXTENDED, "extended", rule.extended)
            };
            notes.push(HeuristicNote {
                rule: format!("ratio.{}/C", rule.element),
                message: format!(
                    "{}/C = {ratio:.2} outside the {which} range {}–{}",
                    rule.element, range.0, range.1
                ),
                penalty,
            });
        }
    }
    for rule in PROBABILITY_RULES {
        if !rule
            .elements
            .iter()
            .all(|e| composition.count(e) > rule.when_all_above)
        {
            continue;
        }
        for (e, below) in rule.limits {
            let n = composition.count(e);
            if n >= *below {
                notes.push(HeuristicNote {
                    rule: format!("probability.{}", rule.elements.concat()),
                    message: format!(
                        "{e} = {n} with {} all above {}: expected fewer than {below}",
                        rule.elements.join(", "),
                        rule.when_all_above
                    ),
                    penalty: IMPROBABLE_COMBINATION,
                });
            }
        }
    }
    let extra: Vec<&str> = composition
        .iter()
        .filter(|(s, n)| *n > 0 && !matches!(*s, "C" | "H" | "N" | "O"))
        .map(|(s, _)| s)
        .collect();
    if !extra.is_empty() {
        notes.push(HeuristicNote {
            rule: "extra_elements".into(),
            message: format!("elements beyond C, H, N, O: {}", extra.join(", ")),
            penalty: PER_EXTRA_ELEMENT * extra.len() as f64,
        });
    }
    HeuristicVerdict {
        score: notes.iter().map(|n| n.penalty).sum::<f64>() + 0.0,
        notes,
        within_extended_ranges,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::Formula;

    fn verdict(text: &str) -> HeuristicVerdict {
        assess(&Formula::parse(text).unwrap().composition())
    }

    #[test]
    fn ordinary_drugs_meet_every_heuristic() {
        // Caffeine, paracetamol (C8H9NO2), ibuprofen (C13H18O2): public formulas.
        for f in ["C8H10N4O2", "C8H9NO2", "C13H18O2"] {
            let v = verdict(f);
            assert_eq!(v.score, 0.0, "{f}: {:?}", v.notes);
        }
    }

    #[test]
    fn the_papers_ranges_are_applied_as_written() {
        // H/C common range 0.2-3.1, extended 0.1-6 (Kind & Fiehn 2007, from memory).
        let methane = verdict("CH4"); // H/C 4: outside common, inside extended
        assert_eq!(methane.score, OUTSIDE_COMMON);
        assert!(methane.within_extended_ranges);
        let v = verdict("C10H70"); // H/C 7: outside extended
        assert_eq!(v.score, OUTSIDE_EXTENDED);
        assert!(!v.within_extended_ranges);
        // N/C 1.3 is the edge of the common range: C10N13 ratio 1.3 is inside.
        assert_eq!(verdict("C10H10N13").notes.len(), 0);
    }

    #[test]
    fn small_halogenated_solvents_break_the_extended_ranges() {
        // Why the ratio rules are scores: CCl4 (Cl/C = 4, H/C = 0) is a real solvent.
        let v = verdict("CCl4");
        assert!(!v.within_extended_ranges);
        assert!(v.notes.iter().any(|n| n.rule == "extra_elements"));
        assert!(v.notes.iter().any(|n| n.rule == "ratio.Cl/C"));
    }

    #[test]
    fn rule_six_flags_many_heteroatoms_at_once() {
        // N, O, P, S all above 1 with S = 3: expected S below 3.
        let v = verdict("C20H30N2O4P2S3");
        assert!(
            v.notes.iter().any(|n| n.rule == "probability.NOPS"),
            "{v:?}"
        );
        assert!(verdict("C20H30N2O4P2S2")
            .notes
            .iter()
            .all(|n| !n.rule.starts_with("prob")));
    }
}
