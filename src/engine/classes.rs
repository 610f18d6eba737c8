//! Consistent combinations gathered straight into their classes (see [`super::collapse`])
//! as the depth-first walk finds them, and the classes ranked.
//!
//! Each consistent combination is checked, scored and given its evidence signature at
//! once, with buffers reused from one combination to the next (no allocation per
//! combination); its signature is looked up as one flat key, so only a new class stores
//! a key. Members are kept in flat columns. Ranking then needs no sort of every
//! combination: the best member of each class is found in one pass, the classes are
//! sorted by their best members, and only the members of the classes shown are sorted.
//! The order is the one of sorting every combination (best score first, ties to fewer
//! group instances, then the counts compared as a whole, larger first) and collapsing
//! in that order: the key is total (no two combinations have the same counts), so a
//! class's rank is its best member's and its members keep their relative order.

use super::enumerate::{self, Flow};
use super::model::Problem;
use super::{collapse, evaluate, score, SolveOptions};
use crate::budget::{Meter, Stage};
use std::cmp::Ordering;

/// The consistent combinations of a solve in flat columns, in the order found.
///
/// Counts are kept in *blocks* and *tails*: a block holds the counts of every group, a
/// member points to one block and holds its own counts of the tail groups (those
/// [`super::tails`] fills in), which overwrite the block's. Members of one head share
/// its block; with no tail groups every member has a block of its own.
#[derive(Debug, Default)]
pub struct Members {
    /// Concrete groups per combination (the stride of `blocks`).
    n_groups: usize,
    /// Per concrete group: its position among the tail groups, if it is one.
    tail_pos: Vec<Option<usize>>,
    /// Tail groups (the stride of `tails`).
    n_tail: usize,
    /// The tail positions in the order of their groups' indices.
    tail_order: Vec<usize>,
    /// Group counts, `n_groups` per block.
    blocks: Columns,
    /// Blocks started.
    n_blocks: u32,
    /// Per member: its block.
    block: Vec<u32>,
    /// Tail group counts, `n_tail` per member.
    tails: Columns,
    /// Skeleton carbons.
    skeleton: Vec<u32>,
    /// Score (`score::score`).
    score: Vec<f64>,
    /// Group instances.
    instances: Vec<u32>,
    /// Class index, in the order the classes were first met.
    class: Vec<u32>,
}

impl Members {
    /// No member yet, for `n_groups` concrete groups of which `tail` are filled in per
    /// member.
    pub(super) fn new(n_groups: usize, tail: &[usize]) -> Self {
        let mut tail_pos = vec![None; n_groups];
        for (k, &g) in tail.iter().enumerate() {
            tail_pos[g] = Some(k);
        }
        let mut tail_order: Vec<usize> = (0..tail.len()).collect();
        tail_order.sort_unstable_by_key(|&k| tail[k]);
        Members {
            n_groups,
            tail_pos,
            n_tail: tail.len(),
            tail_order,
            ..Members::default()
        }
    }

    /// How many combinations are held.
    pub fn len(&self) -> usize {
        self.score.len()
    }

    /// True when none is held.
    pub fn is_empty(&self) -> bool {
        self.score.is_empty()
    }

    /// The count of group `g` in combination `i`.
    fn count(&self, i: usize, g: usize) -> u32 {
        match self.tail_pos[g] {
            Some(k) => self.tails.get(i * self.n_tail + k),
            None => self.blocks.get(self.block[i] as usize * self.n_groups + g),
        }
    }

    /// The group counts of combination `i`.
    pub fn counts(&self, i: usize) -> Vec<u32> {
        (0..self.n_groups).map(|g| self.count(i, g)).collect()
    }

    /// Starts a block holding `counts` (the members pushed next refer to it).
    pub(super) fn start_block(&mut self, counts: &[u32]) {
        self.blocks.push(counts);
        self.n_blocks += 1;
    }

    /// Adds one combination with its score, group instances and class: its tail counts
    /// over the last block started.
    pub(super) fn push_over_block(
        &mut self,
        tail_counts: &[u32],
        skeleton: u32,
        score: f64,
        instances: u32,
        class: u32,
    ) {
        self.block.push(self.n_blocks.saturating_sub(1));
        self.tails.push(tail_counts);
        self.skeleton.push(skeleton);
        self.score.push(score);
        self.instances.push(instances);
        self.class.push(class);
    }

    /// Adds one combination with its score, group instances and class (in a block of
    /// its own).
    fn push(&mut self, counts: &[u32], skeleton: u32, score: f64, instances: u32, class: u32) {
        self.start_block(counts);
        self.push_over_block(&[], skeleton, score, instances, class);
    }

    /// The counts of `a` and `b` compared as a whole.
    fn counts_cmp(&self, a: usize, b: usize) -> Ordering {
        if self.n_tail == 0 {
            let (ra, rb) = (self.block[a] as usize, self.block[b] as usize);
            return self
                .blocks
                .cmp_runs(ra * self.n_groups, rb * self.n_groups, self.n_groups);
        }
        if self.block[a] == self.block[b] {
            // One head: only the tail counts differ (members of one class always share
            // their head).
            let (ta, tb) = (a * self.n_tail, b * self.n_tail);
            return self
                .tail_order
                .iter()
                .map(|&k| self.tails.get(ta + k).cmp(&self.tails.get(tb + k)))
                .find(|o| o.is_ne())
                .unwrap_or(Ordering::Equal);
        }
        (0..self.n_groups)
            .map(|g| self.count(a, g).cmp(&self.count(b, g)))
            .find(|o| o.is_ne())
            .unwrap_or(Ordering::Equal)
    }

    /// The skeleton carbons of combination `i`.
    pub fn skeleton(&self, i: usize) -> u32 {
        self.skeleton[i]
    }

    /// The score of combination `i`.
    pub fn score(&self, i: usize) -> f64 {
        self.score[i]
    }

    /// Rank order of two combinations: `Less` when `a` ranks before `b`.
    pub fn rank_cmp(&self, a: usize, b: usize) -> Ordering {
        self.score[b]
            .total_cmp(&self.score[a])
            .then_with(|| self.instances[a].cmp(&self.instances[b]))
            .then_with(|| self.counts_cmp(b, a))
    }
}

/// Counts in a column: one byte per count while every count fits (a quarter of the
/// memory for the hundreds of thousands of combinations of a loose case), four bytes
/// once one does not. Bytes compare as the counts they hold.
#[derive(Debug)]
enum Columns {
    /// One byte per count.
    Narrow(Vec<u8>),
    /// Four bytes per count.
    Wide(Vec<u32>),
}

impl Default for Columns {
    fn default() -> Self {
        Columns::Narrow(Vec::new())
    }
}

impl Columns {
    /// The count at `i`.
    fn get(&self, i: usize) -> u32 {
        match self {
            Columns::Narrow(c) => u32::from(c[i]),
            Columns::Wide(c) => c[i],
        }
    }

    /// Adds `counts`.
    fn push(&mut self, counts: &[u32]) {
        if let Columns::Narrow(c) = self {
            if counts.iter().all(|&n| n <= u32::from(u8::MAX)) {
                c.extend(counts.iter().map(|&n| n as u8));
                return;
            }
            // A count past one byte: every column widens (never met with formulas of
            // up to 255 atoms of each element).
            *self = Columns::Wide(c.iter().map(|&n| u32::from(n)).collect());
        }
        if let Columns::Wide(c) = self {
            c.extend_from_slice(counts);
        }
    }

    /// The runs of `len` counts at `a` and at `b` compared.
    fn cmp_runs(&self, a: usize, b: usize, len: usize) -> Ordering {
        match self {
            Columns::Narrow(c) => c[a..a + len].cmp(&c[b..b + len]),
            Columns::Wide(c) => c[a..a + len].cmp(&c[b..b + len]),
        }
    }
}

/// What the walk gathered.
#[derive(Debug, Default)]
pub struct Gathered {
    /// Every consistent combination found (up to the enumeration limit).
    pub members: Members,
    /// Classes met.
    pub n_classes: usize,
    /// Per concrete group: present in some consistent combination.
    pub in_some_candidate: Vec<bool>,
    /// Whether the enumeration stopped at the limit.
    pub truncated: bool,
    /// Bytes held on the meter for them.
    pub held: u64,
}

impl Gathered {
    /// Nothing gathered yet, for the groups of `problem` of which `tail` are filled in
    /// per member.
    pub(super) fn empty(problem: &Problem<'_>, tail: &[usize]) -> Self {
        Gathered {
            members: Members::new(problem.groups.len(), tail),
            in_some_candidate: vec![false; problem.groups.len()],
            ..Gathered::default()
        }
    }
}

/// Estimated bytes one member holds (its columns, counts one byte each).
fn member_bytes(problem: &Problem<'_>) -> u64 {
    problem.groups.len() as u64 + MEMBER_COLUMN_BYTES
}

/// Bytes a member holds besides its counts: block, skeleton, score, instances, class.
pub(super) const MEMBER_COLUMN_BYTES: u64 = 4 + 4 + 8 + 4 + 4;

/// Estimated bytes a new class holds: its key (in the index) and its entries.
fn class_bytes(key_len: usize) -> u64 {
    (8 * key_len + std::mem::size_of::<(Box<[i64]>, u32)>() + 8) as u64
}

/// Walks the compositions over the groups the bands allow and gathers those that meet
/// every constraint into their classes, up to the enumeration limit, metering each step.
pub fn gather<M: Meter>(
    problem: &Problem<'_>,
    options: &SolveOptions,
    parts: &score::Parts,
    meter: &mut M,
    stage: Stage,
) -> Result<Gathered, M::Stop> {
    let allowed = problem.allowed_groups();
    if let Some(tail) = super::tails::factored_tail(problem, &allowed) {
        return super::tails::gather(problem, options, parts, &tail, meter, stage);
    }
    let mut out = Gathered::empty(problem, &[]);
    let per_member = member_bytes(problem);
    let mut index: foldhash::HashMap<Box<[i64]>, u32> = foldhash::HashMap::default();
    let (mut present, mut band_quality, mut key) = (Vec::new(), Vec::new(), Vec::new());
    let mut scratch = score::Scratch::default();
    let mut stop = None;
    enumerate::walk_pruned(problem, &allowed, |counts, sk| {
        let metered = if evaluate::consistent(problem, counts, sk, &mut present) {
            if out.members.len() >= options.enumeration_limit {
                out.truncated = true;
                return Flow::Stop;
            }
            band_quality.clear();
            let s = score::score_with(problem, counts, sk, parts, &mut band_quality, &mut scratch);
            collapse::signature_key(problem, counts, &band_quality, &mut key);
            let mut bytes = per_member;
            let class = match index.get(&key[..]) {
                Some(&c) => c,
                None => {
                    let c = index.len() as u32;
                    index.insert(key.as_slice().into(), c);
                    bytes += class_bytes(key.len());
                    c
                }
            };
            out.members.push(counts, sk, s, counts.iter().sum(), class);
            present
                .iter()
                .for_each(|&g| out.in_some_candidate[g] = true);
            out.held += bytes;
            meter.hold(bytes, stage)
        } else {
            meter.tick(stage)
        };
        Flow::after_metered(metered, &mut stop)
    });
    if let Some(e) = stop {
        return Err(e);
    }
    out.n_classes = index.len();
    Ok(out)
}

/// The classes of the gathered combinations, best first.
#[derive(Debug, Default)]
pub struct Ranked {
    /// The combinations.
    pub members: Members,
    /// Per class, best first: its best member (the first classes only, when ranked
    /// with [`Ranked::top`]).
    pub best: Vec<usize>,
    /// Classes in all.
    pub n_classes: usize,
    /// Per concrete group: present in some consistent combination.
    pub in_some_candidate: Vec<bool>,
}

impl Ranked {
    /// Ranks the classes of `gathered` by their best members.
    pub fn new(gathered: Gathered) -> Self {
        Self::top(gathered, usize::MAX)
    }

    /// Ranks the first `k` classes of `gathered` by their best members; the others are
    /// counted, not ranked (a solve shows a few dozen of tens of thousands).
    pub fn top(gathered: Gathered, k: usize) -> Self {
        let members = gathered.members;
        let mut best: Vec<Option<usize>> = vec![None; gathered.n_classes];
        for (i, &c) in members.class.iter().enumerate() {
            let b = &mut best[c as usize];
            if b.is_none_or(|b| members.rank_cmp(i, b) == Ordering::Less) {
                *b = Some(i);
            }
        }
        let mut best: Vec<usize> = best.into_iter().flatten().collect();
        let n_classes = best.len();
        if k < best.len() {
            // The key is total (see the module doc), so the first k are the same as in
            // a full sort.
            best.select_nth_unstable_by(k, |&a, &b| members.rank_cmp(a, b));
            best.truncate(k);
        }
        best.sort_unstable_by(|&a, &b| members.rank_cmp(a, b));
        Self {
            members,
            best,
            n_classes,
            in_some_candidate: gathered.in_some_candidate,
        }
    }

    /// The members other than the best of each of the first `n` classes, best first.
    pub fn others(&self, n: usize) -> Vec<Vec<usize>> {
        let n = n.min(self.best.len());
        let mut slot = vec![u32::MAX; self.n_classes];
        for (k, &b) in self.best.iter().take(n).enumerate() {
            slot[self.members.class[b] as usize] = k as u32;
        }
        let mut out = vec![Vec::new(); n];
        for (i, &c) in self.members.class.iter().enumerate() {
            let k = slot[c as usize];
            if k != u32::MAX && i != self.best[k as usize] {
                out[k as usize].push(i);
            }
        }
        for list in &mut out {
            list.sort_unstable_by(|&a, &b| self.members.rank_cmp(a, b));
        }
        out
    }
}
