//! Degree of unsaturation: the formula's DBE must equal the DBE the groups consume, plain
//! rings (`ring`) included; alkene, alkyne and aromatic ring are groups like any other.

use super::super::model::Problem;
use crate::chem::Composition;

/// The DBE of `formula` when it is a whole number ≥ 0 (a neutral closed-shell molecule).
pub fn whole_dbe(formula: &Composition) -> Option<u32> {
    let dbe = formula.dbe()?;
    (dbe >= 0.0 && dbe.fract() == 0.0).then_some(dbe as u32)
}

/// Words for a formula whose DBE no candidate can meet.
pub fn describe_formula_dbe(formula: &Composition) -> String {
    match formula.dbe() {
        Some(d) if d < 0.0 => format!("formula {formula} has DBE {d}: no molecule has fewer than zero rings plus double bonds"),
        Some(d) => format!("formula {formula} has DBE {d}: a neutral molecule needs a whole number"),
        None => format!("formula {formula} holds an element without a standard valence"),
    }
}

/// "DBE 5 = aromatic_ring 4 + ketone 1" for a candidate.
pub fn accounting(problem: &Problem<'_>, counts: &[u32]) -> String {
    let mut parts = Vec::new();
    for (g, &n) in problem.groups.iter().zip(counts) {
        if n > 0 && g.group.dbe > 0 {
            let id = &g.group.id;
            let total = n * g.group.dbe;
            parts.push(if n > 1 {
                format!("{n} × {id} {total}")
            } else {
                format!("{id} {total}")
            });
        }
    }
    let dbe = problem.formula_dbe.unwrap_or(0);
    if parts.is_empty() {
        format!("DBE {dbe} = no rings or multiple bonds")
    } else {
        format!("DBE {dbe} = {}", parts.join(" + "))
    }
}
