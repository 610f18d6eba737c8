//! The composition part of the model as an integer linear programme (good_lp with the
//! pure-Rust microlp solver): heteroatom equalities, the carbon bound and the DBE
//! equality over group counts. The engine needs *every* feasible combination, not one
//! optimum; an integer programme yields them one solve at a time (each new solution cut
//! off by a no-good constraint), so the engine enumerates with its own depth-first walk
//! (`enumerate`), which visits each combination once and prunes with the band and
//! relation checks. For a single optimum the programme is faster (benchmark: about
//! 0.2 ms against 140 ms for the unpruned walk over every composition of the
//! 25-heavy-atom case), so it stays as an independent check: tests compare the smallest
//! number of group instances both find, formula by formula.
//!
//! Built only with the `lp-check` feature (off by default; the tests and benchmarks turn
//! it on through the crate's dev-dependency on itself), so the solver is not part of
//! the release build.

use super::model::Problem;
use good_lp::{constraint, microlp, variable, Expression, ProblemVariables, Solution, SolverModel};

/// The smallest total number of group instances (over `allowed`) meeting the composition
/// and DBE equalities, or `None` when no combination does.
pub fn min_group_instances(problem: &Problem<'_>, allowed: &[usize]) -> Option<u32> {
    let dbe = problem.formula_dbe?;
    problem.formula.as_ref()?;
    let mut vars = ProblemVariables::new();
    let x: Vec<_> = allowed
        .iter()
        .map(|_| vars.add(variable().integer().min(0).max(64)))
        .collect();
    let total: Expression = x.iter().copied().sum();
    let mut model = vars.minimise(total.clone()).using(microlp);
    for (e, &target) in problem.formula_hetero.iter().enumerate() {
        let mut lhs = Expression::from(0.0);
        for (k, &g) in allowed.iter().enumerate() {
            let n = problem.groups[g]
                .hetero
                .iter()
                .find(|(el, _)| *el == e)
                .map_or(0, |(_, n)| *n);
            lhs += f64::from(n) * x[k];
        }
        model = model.with(constraint!(lhs == f64::from(target)));
    }
    let mut carbon = Expression::from(0.0);
    let mut unsat = Expression::from(0.0);
    for (k, &g) in allowed.iter().enumerate() {
        let d = &problem.groups[g];
        carbon += f64::from(d.c) * x[k];
        unsat += f64::from(d.group.dbe) * x[k];
        if d.foreign_element.is_some() {
            model = model.with(constraint!(x[k] == 0.0));
        }
    }
    model = model.with(constraint!(carbon <= f64::from(problem.formula_c)));
    model = model.with(constraint!(unsat == f64::from(dbe)));
    let solution = model.solve().ok()?;
    Some(solution.eval(&total).round() as u32)
}
