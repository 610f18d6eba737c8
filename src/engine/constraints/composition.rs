//! Composition: every heteroatom of the formula belongs to exactly one group instance;
//! carbon and hydrogen left over form the skeleton (sp3 carbons; their count is
//! C − Σ group C ≥ 0). The enumeration builds only combinations that meet the heteroatom
//! equalities and the carbon bound; this module words the accounting and the reasons a
//! group can never appear.

use super::super::model::Problem;

/// Why group `gi` can never be part of a candidate for this formula, if so.
pub fn impossible(problem: &Problem<'_>, gi: usize) -> Option<String> {
    let g = &problem.groups[gi];
    if let Some(e) = &g.foreign_element {
        return Some(format!("needs {e}, which the formula lacks"));
    }
    if g.c > problem.formula_c {
        return Some(format!(
            "holds {} C, the formula has {}",
            g.c, problem.formula_c
        ));
    }
    for &(e, n) in &g.hetero {
        if n > problem.formula_hetero[e] {
            return Some(format!(
                "holds {n} {}, the formula has {}",
                problem.elements[e], problem.formula_hetero[e]
            ));
        }
    }
    if let Some(dbe) = problem.formula_dbe {
        if g.group.dbe > dbe {
            return Some(format!(
                "consumes DBE {}, the formula has {dbe}",
                g.group.dbe
            ));
        }
    }
    None
}

/// Per element, where its atoms went: `["C 8 = aromatic_ring 6 + ketone 1 + skeleton 1", ...]`.
pub fn accounting(problem: &Problem<'_>, counts: &[u32], skeleton_c: u32) -> Vec<String> {
    let mut lines = Vec::new();
    let mut c_parts = Vec::new();
    for (g, &n) in problem.groups.iter().zip(counts) {
        if n > 0 && g.c > 0 {
            c_parts.push(format!("{} {}", g.group.id, n * g.c));
        }
    }
    if skeleton_c > 0 {
        c_parts.push(format!("skeleton {skeleton_c}"));
    }
    if problem.formula_c > 0 {
        lines.push(format!("C {} = {}", problem.formula_c, c_parts.join(" + ")));
    }
    let mut h_parts = Vec::new();
    let mut h_fixed = 0;
    for (g, &n) in problem.groups.iter().zip(counts) {
        if n > 0 && g.h > 0 {
            h_parts.push(format!("{} {}", g.group.id, n * g.h));
            h_fixed += n * g.h;
        }
    }
    let h_open = problem.formula_h.saturating_sub(h_fixed);
    if h_open > 0 {
        h_parts.push(format!("{h_open} on skeleton carbons and open positions"));
    }
    if problem.formula_h > 0 {
        lines.push(format!("H {} = {}", problem.formula_h, h_parts.join(" + ")));
    }
    for (e, symbol) in problem.elements.iter().enumerate() {
        let parts: Vec<String> = problem
            .groups
            .iter()
            .zip(counts)
            .filter_map(|(g, &n)| {
                let k = g
                    .hetero
                    .iter()
                    .find(|(x, _)| *x == e)
                    .map_or(0, |(_, k)| *k);
                (n > 0 && k > 0).then(|| format!("{} {}", g.group.id, n * k))
            })
            .collect();
        lines.push(format!(
            "{symbol} {} = {}",
            problem.formula_hetero[e],
            parts.join(" + ")
        ));
    }
    lines
}
