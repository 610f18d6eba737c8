//! Exhaustive enumeration of group counts that meet the composition and DBE equalities.
//!
//! Depth-first over the groups in a fixed order (heteroatom-bearing groups first, in
//! catalogue order; then hydrocarbon groups; `ring`-like atomless groups last), each
//! count from 0 upwards, bounded by the remaining heteroatoms, carbons and DBE. A branch
//! is cut when a remaining heteroatom has no later group to carry it, or the remaining
//! DBE cannot be consumed. The visit order is deterministic. Each leaf (an exact
//! composition) goes to the caller's visitor, which may stop the walk.
//!
//! With `prune` set, checks that can only fail once decided are made as soon as the
//! groups that could satisfy them are all decided (sound: a cut subtree holds no
//! combination that the leaf checks would accept):
//! - a demanded band that only groups can explain, once no later group can;
//! - a group's `requires_any`, once no later group can supply it;
//! - `excludes`, when the second group of a pair is chosen;
//! - the groups' fixed hydrogens, as soon as they exceed the formula's.

use super::model::{GroupSet, Problem};

/// Whether to continue the walk.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Flow {
    /// Keep going.
    Continue,
    /// Stop now.
    Stop,
}

impl Flow {
    /// `Continue` when a metered step went through; otherwise `Stop`, keeping the meter's
    /// stop in `stop` for the caller to return once the walk is over.
    pub fn after_metered<S>(metered: Result<(), S>, stop: &mut Option<S>) -> Flow {
        match metered {
            Ok(()) => Flow::Continue,
            Err(e) => {
                *stop = Some(e);
                Flow::Stop
            }
        }
    }
}

struct Walk<'p, 'c, F> {
    problem: &'p Problem<'c>,
    order: Vec<usize>,
    /// carriers_after[k][e]: some group at position ≥ k of `order` holds element e.
    carriers_after: Vec<Vec<bool>>,
    /// dbe_after[k]: some group at position ≥ k consumes DBE.
    dbe_after: Vec<bool>,
    counts: Vec<u32>,
    hetero_left: Vec<u32>,
    visit: F,
    leaves: u64,
    prune: bool,
    chosen: GroupSet,
    h_fixed: u32,
    /// Bands whose last possible explainer sits just before each position.
    band_expiring: Vec<Vec<usize>>,
    /// Groups whose requirement can last be met just before each position.
    require_expiring: Vec<Vec<usize>>,
}

/// Walks every exact composition using only the groups in `allowed`; calls `visit` with
/// the counts (indexed like `problem.groups`) and the skeleton carbon count.
/// Returns the number of leaves visited. Without an active formula nothing is walked.
pub fn walk<F>(problem: &Problem<'_>, allowed: &[usize], visit: F) -> u64
where
    F: FnMut(&[u32], u32) -> Flow,
{
    walk_with(problem, allowed, false, visit)
}

/// Like [`walk`], cutting subtrees that the leaf checks would reject (module doc).
pub fn walk_pruned<F>(problem: &Problem<'_>, allowed: &[usize], visit: F) -> u64
where
    F: FnMut(&[u32], u32) -> Flow,
{
    walk_with(problem, allowed, true, visit)
}

fn walk_with<F>(problem: &Problem<'_>, allowed: &[usize], prune: bool, visit: F) -> u64
where
    F: FnMut(&[u32], u32) -> Flow,
{
    let Some(dbe) = problem.formula_dbe else {
        return 0;
    };
    if problem.formula.is_none() {
        return 0;
    }
    let mut order: Vec<usize> = allowed
        .iter()
        .copied()
        .filter(|&g| super::constraints::composition::impossible(problem, g).is_none())
        .collect();
    let rank = |g: usize| {
        let d = &problem.groups[g];
        if !d.hetero.is_empty() {
            0
        } else if d.has_atoms {
            1
        } else {
            2
        }
    };
    order.sort_by_key(|&g| (rank(g), g));
    let n_el = problem.elements.len();
    let mut carriers_after = vec![vec![false; n_el]; order.len() + 1];
    let mut dbe_after = vec![false; order.len() + 1];
    for k in (0..order.len()).rev() {
        carriers_after[k] = carriers_after[k + 1].clone();
        for &(e, n) in &problem.groups[order[k]].hetero {
            if n > 0 {
                carriers_after[k][e] = true;
            }
        }
        dbe_after[k] = dbe_after[k + 1] || problem.groups[order[k]].group.dbe > 0;
    }
    // Expiry positions: the check for band b runs at position (last explainer) + 1.
    let position: Vec<Option<usize>> = {
        let mut p = vec![None; problem.groups.len()];
        for (k, &g) in order.iter().enumerate() {
            p[g] = Some(k);
        }
        p
    };
    let mut band_expiring = vec![Vec::new(); order.len() + 1];
    for (b, needs) in problem.band_needs.iter().enumerate() {
        if let Some(set) = needs {
            let last = (0..problem.groups.len())
                .filter(|&g| set.contains(g))
                .filter_map(|g| position[g])
                .max();
            band_expiring[last.map_or(0, |l| l + 1)].push(b);
        }
    }
    let mut require_expiring = vec![Vec::new(); order.len() + 1];
    for (k, &g) in order.iter().enumerate() {
        if problem.groups[g].group.requires_any.is_empty() {
            continue;
        }
        let last = problem.requires[g]
            .iter()
            .filter_map(|&j| position[j])
            .max();
        let at = last.map_or(k, |l| l.max(k)) + 1;
        require_expiring[at].push(g);
    }
    let mut w = Walk {
        problem,
        prune,
        chosen: GroupSet::default(),
        h_fixed: 0,
        band_expiring,
        require_expiring,
        order,
        carriers_after,
        dbe_after,
        counts: vec![0; problem.groups.len()],
        hetero_left: problem.formula_hetero.clone(),
        visit,
        leaves: 0,
    };
    w.step(0, problem.formula_c, dbe);
    w.leaves
}

impl<F> Walk<'_, '_, F>
where
    F: FnMut(&[u32], u32) -> Flow,
{
    fn step(&mut self, k: usize, c_left: u32, dbe_left: u32) -> Flow {
        if self.prune {
            for &b in &self.band_expiring[k] {
                if let Some(set) = &self.problem.band_needs[b] {
                    if !self.chosen.intersects(set) {
                        return Flow::Continue;
                    }
                }
            }
            for &g in &self.require_expiring[k] {
                if self.counts[g] > 0 && !self.chosen.intersects(&self.problem.require_sets[g]) {
                    return Flow::Continue;
                }
            }
        }
        // Prune: every remaining heteroatom needs a later carrier; DBE needs a consumer.
        for (e, &left) in self.hetero_left.iter().enumerate() {
            if left > 0 && !self.carriers_after[k][e] {
                return Flow::Continue;
            }
        }
        if dbe_left > 0 && !self.dbe_after[k] {
            return Flow::Continue;
        }
        if k == self.order.len() {
            self.leaves += 1;
            return (self.visit)(&self.counts, c_left);
        }
        let g = self.order[k];
        let d = &self.problem.groups[g];
        let mut max = u32::MAX;
        for &(e, n) in &d.hetero {
            max = max.min(self.hetero_left[e] / n);
        }
        if let Some(m) = c_left.checked_div(d.c) {
            max = max.min(m);
        }
        if let Some(m) = dbe_left.checked_div(d.group.dbe) {
            max = max.min(m);
        }
        if max == u32::MAX {
            // A group with no heteroatom, no carbon and no DBE cannot be counted.
            max = 0;
        }
        if self.prune && self.chosen.intersects(&self.problem.exclude_sets[g]) {
            max = 0;
        }
        for n in 0..=max {
            if self.prune && n > 0 {
                let h = self.h_fixed + n * d.h;
                if h > self.problem.formula_h {
                    break;
                }
            }
            for &(e, per) in &d.hetero {
                self.hetero_left[e] -= n * per;
            }
            self.counts[g] = n;
            if n > 0 {
                self.chosen.insert(g);
            }
            self.h_fixed += n * d.h;
            let flow = self.step(k + 1, c_left - n * d.c, dbe_left - n * d.group.dbe);
            self.h_fixed -= n * d.h;
            self.chosen.remove(g);
            self.counts[g] = 0;
            for &(e, per) in &d.hetero {
                self.hetero_left[e] += n * per;
            }
            if flow == Flow::Stop {
                return Flow::Stop;
            }
        }
        Flow::Continue
    }
}
