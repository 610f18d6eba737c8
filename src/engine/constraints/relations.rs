//! Relations between groups: `excludes` (never together) and `requires_any` (a phenol
//! needs an aromatic ring). Parents count for their subtypes both ways.

use super::super::model::Problem;

/// Checks the relations (`present`: the indices with a non-zero count); returns each
/// violation in words.
pub fn check(problem: &Problem<'_>, counts: &[u32], present: &[usize]) -> Vec<String> {
    let mut out = Vec::new();
    for &i in present {
        let g = problem.groups[i].group;
        for &j in &problem.excludes[i] {
            if j > i && counts[j] > 0 {
                out.push(format!(
                    "{} and {} exclude each other",
                    g.id, problem.groups[j].group.id
                ));
            }
        }
        if !g.requires_any.is_empty() && !problem.requires[i].iter().any(|&j| counts[j] > 0) {
            out.push(format!(
                "{} requires one of: {}",
                g.id,
                g.requires_any.join(", ")
            ));
        }
    }
    out
}
