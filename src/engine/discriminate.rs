//! Discriminating checks: for the top candidates, what to measure next to tell them
//! apart — a band one predicts (a supporting band not yet seen) that the other cannot
//! explain, an MS ion or loss, a simple wet test or an NMR region for the family (the
//! catalogue's `checks:` of the group and its parents).

use super::model::Problem;
use super::outcome::CheckKind;
use super::outcome::DiscriminatingCheck;
use crate::rules::MsClueKind;

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
                // Wet tests and NMR regions of the catalogue: those of g's own family
                // line, where b holds nothing of that family.
                for family in &g.lineage {
                    if b_families.contains(&family) {
                        continue;
                    }
                    let Some(family_group) = problem.catalogue.group(family) else {
                        continue;
                    };
                    for check in &family_group.checks {
                        out.push(DiscriminatingCheck {
                            between: [a_rank.min(b_rank), a_rank.max(b_rank)],
                            observation: format!(
                                "{} — expected for rank {a_rank}, not rank {b_rank}",
                                check.text
                            ),
                            favours: a_rank,
                            kind: match check.kind {
                                crate::rules::CheckKind::WetTest => CheckKind::WetTest,
                                crate::rules::CheckKind::Nmr => CheckKind::Nmr,
                            },
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
