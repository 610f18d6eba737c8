//! Discriminating checks: for the top candidates, what to measure next to tell them
//! apart — a band one predicts (a supporting band not yet seen) that the other cannot
//! explain, an MS ion or loss, a simple wet test or an NMR region for the family.

use super::model::Problem;
use super::outcome::CheckKind;
use super::outcome::DiscriminatingCheck;
use crate::rules::MsClueKind;

/// Wet tests and NMR regions by family id (common practice, from memory).
const FAMILY_TESTS: &[(&str, CheckKind, &str)] = &[
    (
        "aldehyde",
        CheckKind::WetTest,
        "Tollens' or Fehling's test positive (aldehyde, not ketone)",
    ),
    (
        "aldehyde",
        CheckKind::Nmr,
        "1H NMR: CHO singlet or triplet near 9.4–10.1 ppm",
    ),
    (
        "ketone",
        CheckKind::WetTest,
        "2,4-DNP precipitate with a negative Tollens' test (ketone)",
    ),
    (
        "carboxylic_acid",
        CheckKind::WetTest,
        "effervescence with aqueous NaHCO3 (acid)",
    ),
    (
        "carboxylic_acid",
        CheckKind::Nmr,
        "1H NMR: exchangeable COOH near 10–13 ppm",
    ),
    ("ester", CheckKind::Nmr, "1H NMR: O–CH near 3.6–4.3 ppm"),
    (
        "alcohol",
        CheckKind::Nmr,
        "1H NMR: exchangeable O–H that vanishes on D2O shake",
    ),
    (
        "alcohol",
        CheckKind::WetTest,
        "ceric ammonium nitrate test colour change (alcohol)",
    ),
    (
        "phenol",
        CheckKind::WetTest,
        "violet colour with FeCl3 (phenol)",
    ),
    (
        "ether",
        CheckKind::Nmr,
        "1H NMR: O–CH near 3.3–4.0 ppm with no exchangeable H",
    ),
    (
        "amine_primary",
        CheckKind::WetTest,
        "Hinsberg test: sulfonamide soluble in base (primary amine)",
    ),
    (
        "amine_secondary",
        CheckKind::WetTest,
        "Hinsberg test: sulfonamide insoluble in base (secondary amine)",
    ),
    (
        "amine_tertiary",
        CheckKind::WetTest,
        "Hinsberg test: no sulfonamide (tertiary amine)",
    ),
    (
        "alkene",
        CheckKind::WetTest,
        "decolourises bromine water or dilute KMnO4 (C=C)",
    ),
    (
        "aromatic_ring",
        CheckKind::Nmr,
        "1H NMR: aromatic H near 6.5–8.5 ppm",
    ),
    (
        "alkyne_terminal",
        CheckKind::Nmr,
        "1H NMR: ≡C–H near 1.8–3.1 ppm",
    ),
];

/// Checks separating the best candidate from each of the next ones (at most `limit`).
pub fn checks(
    problem: &Problem<'_>,
    ranked: &[(Vec<u32>, u32)],
    limit: usize,
) -> Vec<DiscriminatingCheck> {
    let mut out = Vec::new();
    let Some((top, _)) = ranked.first() else {
        return out;
    };
    for (k, (other, _)) in ranked.iter().enumerate().skip(1).take(4) {
        let rank_other = k + 1;
        for (a, a_rank, b, b_rank) in [(top, 1, other, rank_other), (other, rank_other, top, 1)] {
            for (gi, g) in problem.groups.iter().enumerate() {
                if a[gi] == 0 || b[gi] > 0 {
                    continue;
                }
                let b_families: Vec<&String> = problem
                    .groups
                    .iter()
                    .zip(b.iter())
                    .filter(|(_, n)| **n > 0)
                    .flat_map(|(x, _)| x.lineage.iter())
                    .collect();
                // A supporting band of g not yet seen, that no group of b explains by range.
                let matched: Vec<usize> = g.presence.matched.iter().map(|m| m.rule_idx).collect();
                for (ri, rule) in g.group.bands.iter().enumerate() {
                    if matched.contains(&ri) || rule.role != crate::rules::BandRole::Supporting {
                        continue;
                    }
                    let b_has = problem.groups.iter().zip(b.iter()).any(|(x, n)| {
                        *n > 0
                            && x.group.bands.iter().any(|r2| {
                                r2.range.lo <= rule.range.hi && r2.range.hi >= rule.range.lo
                            })
                    });
                    if !b_has {
                        out.push(DiscriminatingCheck {
                            between: [a_rank.min(b_rank), a_rank.max(b_rank)],
                            observation: format!(
                                "IR: {} at {:.0}–{:.0} cm⁻¹ expected for {} (rank {a_rank}), not for rank {b_rank}",
                                rule.label, rule.range.lo, rule.range.hi, g.group.id
                            ),
                            favours: a_rank,
                            kind: CheckKind::Ir,
                        });
                    }
                }
                for clue in &g.group.ms {
                    let what = match clue.kind {
                        MsClueKind::Ion { mz } => format!("m/z {mz}"),
                        MsClueKind::Loss { mass } => format!("loss of {mass} u from M"),
                    };
                    out.push(DiscriminatingCheck {
                        between: [a_rank.min(b_rank), a_rank.max(b_rank)],
                        observation: format!(
                            "MS: {what} ({}) supports {} (rank {a_rank})",
                            clue.label, g.group.id
                        ),
                        favours: a_rank,
                        kind: CheckKind::Ms,
                    });
                }
                for (family, kind, text) in FAMILY_TESTS {
                    if g.lineage.iter().any(|l| l == family)
                        && !b_families.iter().any(|f| f == family)
                    {
                        out.push(DiscriminatingCheck {
                            between: [a_rank.min(b_rank), a_rank.max(b_rank)],
                            observation: format!(
                                "{text} — expected for rank {a_rank}, not rank {b_rank}"
                            ),
                            favours: a_rank,
                            kind: *kind,
                        });
                    }
                }
            }
        }
    }
    let mut seen = std::collections::BTreeSet::new();
    out.retain(|c| seen.insert(c.observation.clone()));
    out.truncate(limit);
    out
}
