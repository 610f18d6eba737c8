//! Discriminating checks: for the top candidates, what to measure next to tell them
//! apart — a band one predicts (a supporting band not yet seen) that the other cannot
//! explain, an MS ion or loss, a simple wet test or an NMR region for the family (the
//! catalogue's `checks:` of the group and its parents).

use super::model::Problem;
use super::outcome::{CheckBasis, CheckKind, DiscriminatingCheck, RuleCite, RuleKind};

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
            let check = |kind, group: &str, basis, rule| DiscriminatingCheck {
                between: [a_rank.min(b_rank), a_rank.max(b_rank)],
                favours: a_rank,
                against: b_rank,
                kind,
                group: group.to_owned(),
                basis,
                rule,
            };
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
                        out.push(check(
                            CheckKind::Ir,
                            &g.group.id,
                            CheckBasis::Band {
                                label: rule.label.clone(),
                                lo: rule.range.lo,
                                hi: rule.range.hi,
                            },
                            RuleCite::catalogue(
                                RuleKind::GroupBand,
                                &g.group.id,
                                Some(ri),
                                &rule.defined_at,
                            ),
                        ));
                    }
                }
                for (ci, clue) in g.group.ms.iter().enumerate() {
                    out.push(check(
                        CheckKind::Ms,
                        &g.group.id,
                        CheckBasis::Ms {
                            label: clue.label.clone(),
                            clue: clue.kind.clone(),
                        },
                        RuleCite::catalogue(
                            RuleKind::GroupMs,
                            &g.group.id,
                            Some(ci),
                            &clue.defined_at,
                        ),
                    ));
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
                    for (ci, c) in family_group.checks.iter().enumerate() {
                        let kind = match c.kind {
                            crate::rules::CheckKind::WetTest => CheckKind::WetTest,
                            crate::rules::CheckKind::Nmr => CheckKind::Nmr,
                        };
                        out.push(check(
                            kind,
                            &family_group.id,
                            CheckBasis::Catalogue {
                                text: c.text.clone(),
                            },
                            RuleCite::catalogue(
                                RuleKind::GroupCheck,
                                &family_group.id,
                                Some(ci),
                                &c.defined_at,
                            ),
                        ));
                    }
                }
            }
        }
    }
    let mut kept: Vec<DiscriminatingCheck> = Vec::new();
    for c in out {
        if !kept.iter().any(|k| says_the_same(k, &c)) {
            kept.push(c);
        }
    }
    kept.truncate(limit);
    kept
}

/// True when two checks ask for the same observation in the same words: an MS clue
/// supports its group whichever rank it is compared with, so it is listed once.
fn says_the_same(a: &DiscriminatingCheck, b: &DiscriminatingCheck) -> bool {
    let ranks = a.favours == b.favours && a.against == b.against;
    match (&a.basis, &b.basis) {
        (CheckBasis::Ms { .. }, CheckBasis::Ms { .. }) => {
            a.favours == b.favours && a.group == b.group && a.basis == b.basis
        }
        (CheckBasis::Catalogue { text: x }, CheckBasis::Catalogue { text: y }) => ranks && x == y,
        _ => ranks && a.group == b.group && a.basis == b.basis,
    }
}
