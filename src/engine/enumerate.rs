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
pub fn walk<F>(problem: &Problem<'_>, allowed: &[usize], mut visit: F) -> u64
where
    F: FnMut(&[u32], u32) -> Flow,
{
    walk_with(problem, allowed, false, &[], |counts, sk, _| {
        visit(counts, sk)
    })
}

/// Like [`walk`], cutting subtrees that the leaf checks would reject (module doc).
pub fn walk_pruned<F>(problem: &Problem<'_>, allowed: &[usize], mut visit: F) -> u64
where
    F: FnMut(&[u32], u32) -> Flow,
{
    walk_with(problem, allowed, true, &[], |counts, sk, _| {
        visit(counts, sk)
    })
}

/// The order in which the walk decides the groups of `allowed` (module doc); groups the
/// formula cannot hold are left out.
fn walk_order(problem: &Problem<'_>, allowed: &[usize]) -> Vec<usize> {
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
    order
}

/// The hydrocarbon-unsaturation groups (see `collapse::is_split_group`) the walk decides
/// last, in walk order, when every such group of `allowed` comes after every other
/// group and none of them is a salt form; `None` otherwise. A walk over the other groups
/// ([`walk_heads`]) then leaves these to be filled in ([`tails`]).
pub fn split_tail(problem: &Problem<'_>, allowed: &[usize]) -> Option<Vec<usize>> {
    let order = walk_order(problem, allowed);
    let is_tail = |g: usize| problem.split_group[g] && problem.groups[g].group.ionic.is_none();
    let start = order
        .iter()
        .position(|&g| problem.split_group[g])
        .unwrap_or(order.len());
    order[start..]
        .iter()
        .all(|&g| is_tail(g))
        .then(|| order[start..].to_vec())
}

/// Like [`walk_pruned`] over every group of `allowed` but the `tail` of [`split_tail`]:
/// at each assignment of the others, `visit` gets the counts (tail groups at zero), the
/// carbons and the DBE left for the tail to consume (and the skeleton to take).
pub fn walk_heads<F>(problem: &Problem<'_>, allowed: &[usize], tail: &[usize], mut visit: F) -> u64
where
    F: FnMut(&[u32], u32, u32) -> Flow,
{
    let heads: Vec<usize> = allowed
        .iter()
        .copied()
        .filter(|g| !tail.contains(g))
        .collect();
    walk_with(problem, &heads, true, tail, &mut visit)
}

/// Every way the `tail` groups (in walk order) consume `dbe_left` exactly within
/// `c_left` carbons, in the order the walk would reach them: per way, the count of each
/// tail group.
pub fn tails(problem: &Problem<'_>, tail: &[usize], c_left: u32, dbe_left: u32) -> Vec<Vec<u32>> {
    fn go(
        problem: &Problem<'_>,
        tail: &[usize],
        k: usize,
        c_left: u32,
        dbe_left: u32,
        counts: &mut Vec<u32>,
        out: &mut Vec<Vec<u32>>,
    ) {
        if k == tail.len() {
            if dbe_left == 0 {
                out.push(counts.clone());
            }
            return;
        }
        let g = &problem.groups[tail[k]];
        let mut max = dbe_left.checked_div(g.group.dbe).unwrap_or(0);
        if let Some(m) = c_left.checked_div(g.c) {
            max = max.min(m);
        }
        for n in 0..=max {
            counts[k] = n;
            go(
                problem,
                tail,
                k + 1,
                c_left - n * g.c,
                dbe_left - n * g.group.dbe,
                counts,
                out,
            );
        }
        counts[k] = 0;
    }
    let mut out = Vec::new();
    go(
        problem,
        tail,
        0,
        c_left,
        dbe_left,
        &mut vec![0; tail.len()],
        &mut out,
    );
    out
}

fn walk_with<F>(
    problem: &Problem<'_>,
    allowed: &[usize],
    prune: bool,
    tail: &[usize],
    visit: F,
) -> u64
where
    F: FnMut(&[u32], u32, u32) -> Flow,
{
    let Some(dbe) = problem.formula_dbe else {
        return 0;
    };
    if problem.formula.is_none() {
        return 0;
    }
    let order = walk_order(problem, allowed);
    let n_el = problem.elements.len();
    let mut carriers_after = vec![vec![false; n_el]; order.len() + 1];
    let mut dbe_after = vec![false; order.len() + 1];
    // The tail left to the caller consumes DBE after the last position.
    dbe_after[order.len()] = tail.iter().any(|&g| problem.groups[g].group.dbe > 0);
    for k in (0..order.len()).rev() {
        carriers_after[k] = carriers_after[k + 1].clone();
        for &(e, n) in &problem.groups[order[k]].hetero {
            if n > 0 {
                carriers_after[k][e] = true;
            }
        }
        dbe_after[k] = dbe_after[k + 1] || problem.groups[order[k]].group.dbe > 0;
    }
    // Expiry positions: the check for band b runs at position (last explainer) + 1. The
    // tail left to the caller is decided after every position, so a check that a tail
    // group may satisfy never runs in the walk (its slot lies past the last position).
    let position: Vec<Option<usize>> = {
        let mut p = vec![None; problem.groups.len()];
        for (k, &g) in order.iter().enumerate() {
            p[g] = Some(k);
        }
        for &g in tail {
            p[g] = Some(order.len());
        }
        p
    };
    let mut band_expiring = vec![Vec::new(); order.len() + 2];
    for (b, needs) in problem.band_needs.iter().enumerate() {
        if let Some(set) = needs {
            let last = (0..problem.groups.len())
                .filter(|&g| set.contains(g))
                .filter_map(|g| position[g])
                .max();
            band_expiring[last.map_or(0, |l| l + 1)].push(b);
        }
    }
    let mut require_expiring = vec![Vec::new(); order.len() + 2];
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
    F: FnMut(&[u32], u32, u32) -> Flow,
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
            return (self.visit)(&self.counts, c_left, dbe_left);
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
