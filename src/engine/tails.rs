//! Gathering with the hydrocarbon splits factored out of the walk.
//!
//! A loose case has hundreds of thousands of consistent combinations, most of them the
//! same heteroatom groups with the unsaturation split another way between rings, C=C,
//! C≡C and arenes (the *tail*, see `collapse`). Checking and scoring each combination
//! from scratch costs microseconds; here the work is shared:
//! - the walk decides only the other groups (the *head*); for each head, the ways the
//!   tail can take the carbons and DBE left are listed once per (carbons, DBE) and
//!   reused by every head that leaves the same;
//! - what depends only on which groups are present (presence verdicts, relations, the
//!   band explanations, the score's band terms, the evidence signature) is worked out
//!   once per head and tail *pattern* (which tail groups are present, and whether
//!   skeleton carbons remain), from per-band summaries of the head and of the pattern;
//! - what depends on the counts (the bond conditions, H on saturated carbon,
//!   parsimony) is checked per combination from tallies that add up.
//!
//! The combinations, their scores, classes and the order in which they are found are
//! those of checking every leaf of the full walk (the tests compare both paths).

use super::classes::{Gathered, MEMBER_COLUMN_BYTES};
use super::constraints::band_explanation::{h_kind, BRANCH_QUALITY};
use super::constraints::bonds::{self, NeedsSummary, Tally, Verdict};
use super::constraints::ionic;
use super::enumerate::{self, Flow};
use super::model::{GroupSet, Problem};
use super::score::{self, unexplained_penalty, Parts, W_EXPLAINED};
use super::SolveOptions;
use crate::budget::{Meter, Stage};
use std::collections::HashMap;
use std::rc::Rc;

/// Tail groups at most for a factored walk (patterns are kept per subset).
const MAX_TAIL_GROUPS: usize = 10;

/// The tail of a case's walk when the factored gathering applies to it.
pub fn factored_tail(problem: &Problem<'_>, allowed: &[usize]) -> Option<Vec<usize>> {
    if problem.bands.len() > MAX_BANDS {
        return None;
    }
    enumerate::split_tail(problem, allowed).filter(|t| !t.is_empty() && t.len() <= MAX_TAIL_GROUPS)
}

/// A quality that is not there (every quality is ≥ 0, so `max` keeps the best).
const NONE: f64 = f64::NEG_INFINITY;

/// Active bands at most for a factored walk (bands are kept as bits of a word).
const MAX_BANDS: usize = 64;

/// The larger of two qualities or credits (never NaN): `f64::max` without its NaN
/// handling, on the hot path of a loose solve.
fn larger(a: f64, b: f64) -> f64 {
    if a >= b {
        a
    } else {
        b
    }
}

/// Bits of the bands for which `f` holds.
fn band_mask(nb: usize, f: impl Fn(usize) -> bool) -> u64 {
    (0..nb).filter(|&b| f(b)).fold(0, |m, b| m | (1 << b))
}

/// Band-by-band summary of a set of groups (a head's, or a tail pattern's).
#[derive(Clone, Debug, Default)]
struct PartView {
    /// The groups, in index order.
    present: Vec<usize>,
    /// The same as a set.
    set: GroupSet,
    /// Per active band: best quality of the set's band rules and patterns.
    quality: Vec<f64>,
    /// Per active band: best quality of the skeleton rules whose `needs_any` the set
    /// meets.
    skeleton_quality: Vec<f64>,
    /// Per active band: the better of `quality` and `skeleton_quality`.
    best: Vec<f64>,
    /// Per active band: best credit of the set's rules (`score::Parts::credits`).
    credit: Vec<f64>,
    /// Bands some band rule or pattern of the set explains.
    by_groups: u64,
    /// Bands some skeleton rule whose `needs_any` the set meets explains.
    by_skeleton: u64,
    /// Bands at least one group of the set explains.
    shared_once: u64,
    /// Bands at least two groups of the set explain.
    shared_twice: u64,
    /// Per skeleton rule: a group of the set meets its `needs_any`.
    skeleton_need: Vec<bool>,
    /// Some group of the set holds an sp3 C–H of its own.
    sp3: bool,
    /// No group of the set misses a demanded band.
    bands_present: bool,
}

/// Per concrete group, what it brings to each active band; a set's summary is the
/// best (or the union) over its groups.
#[derive(Clone, Debug)]
struct GroupBands {
    /// Per group, per active band: best quality of its band rules and of the patterns
    /// that name it.
    quality: Vec<Vec<f64>>,
    /// Per group, per active band: best quality of the skeleton rules whose
    /// `needs_any` it meets.
    skeleton: Vec<Vec<f64>>,
    /// Per group: the skeleton rules whose `needs_any` it meets.
    skeleton_rules: Vec<Vec<usize>>,
    /// Per group: the active bands it explains (`Problem::explained_by_groups`).
    own: Vec<u64>,
}

impl GroupBands {
    fn new(problem: &Problem<'_>) -> Self {
        let (ng, nb) = (problem.groups.len(), problem.bands.len());
        let mut quality = vec![vec![NONE; nb]; ng];
        let mut skeleton = vec![vec![NONE; nb]; ng];
        let mut skeleton_rules = vec![Vec::new(); ng];
        for (si, (gs, _)) in problem.skeleton_needs.iter().enumerate() {
            for &g in gs {
                if !skeleton_rules[g].contains(&si) {
                    skeleton_rules[g].push(si);
                }
            }
        }
        for (b, ex) in problem.explainers.iter().enumerate() {
            for &(g, _, q) in &ex.groups {
                quality[g][b] = quality[g][b].max(q);
            }
            for (_, gs, q) in &ex.patterns {
                for &g in gs {
                    quality[g][b] = quality[g][b].max(*q);
                }
            }
            for &(si, q) in &ex.skeleton {
                for &g in &problem.skeleton_needs[si].0 {
                    skeleton[g][b] = skeleton[g][b].max(q);
                }
            }
        }
        let own = (0..ng)
            .map(|g| band_mask(nb, |b| problem.explained_by_groups[b].contains(g)))
            .collect();
        GroupBands {
            quality,
            skeleton,
            skeleton_rules,
            own,
        }
    }
}

/// Per-band maxima of `rows` (over the groups `present`) into `out`.
fn best_of(rows: &[Vec<f64>], present: &[usize], nb: usize, out: &mut Vec<f64>) {
    out.clear();
    out.resize(nb, NONE);
    for &g in present {
        for (o, q) in out.iter_mut().zip(&rows[g]) {
            *o = o.max(*q);
        }
    }
}

impl PartView {
    /// Summarises the groups `present` (index order).
    fn fill(&mut self, problem: &Problem<'_>, parts: &Parts, gb: &GroupBands, present: &[usize]) {
        let nb = problem.bands.len();
        self.present.clear();
        self.present.extend_from_slice(present);
        self.set.clear();
        present.iter().for_each(|&g| self.set.insert(g));
        best_of(&gb.quality, present, nb, &mut self.quality);
        self.by_groups = band_mask(nb, |b| self.quality[b] != NONE);
        self.skeleton_need.clear();
        self.skeleton_need
            .resize(problem.skeleton_needs.len(), false);
        for &g in present {
            for &si in &gb.skeleton_rules[g] {
                self.skeleton_need[si] = true;
            }
        }
        best_of(&gb.skeleton, present, nb, &mut self.skeleton_quality);
        self.by_skeleton = band_mask(nb, |b| self.skeleton_quality[b] != NONE);
        self.best.clear();
        self.best.extend(
            self.quality
                .iter()
                .zip(&self.skeleton_quality)
                .map(|(q, s)| q.max(*s)),
        );
        let (mut once, mut twice) = (0u64, 0u64);
        for &g in present {
            twice |= once & gb.own[g];
            once |= gb.own[g];
        }
        self.shared_once = once;
        self.shared_twice = twice;
        self.credit.clear();
        self.credit.resize(nb, 0.0);
        for &g in present {
            for &(b, c) in &parts.credits[g] {
                self.credit[b] = self.credit[b].max(c);
            }
        }
        self.sp3 = present.iter().any(|&g| problem.groups[g].sp3_ch);
        self.bands_present = present
            .iter()
            .all(|&g| problem.groups[g].presence.missing.is_empty());
    }
}

/// What a head fixes whatever its tail: per-band qualities and relations.
#[derive(Clone, Debug, Default)]
struct HeadFixed {
    /// Per active band: best of the artefacts, the head's band rules and patterns and
    /// the skeleton rules whose needs the head meets.
    quality: Vec<f64>,
    /// The same with the skeleton rules that need an sp3 carbon (when the combination
    /// has one).
    quality_sp3: Vec<f64>,
    /// Its relations with the tail groups.
    relations: HeadRelations,
}

/// What a head and a tail pattern decide together, whatever the counts.
#[derive(Clone, Debug)]
struct SlotEval {
    /// Presence, relations and band explanation hold.
    holds: bool,
    /// What bands only the skeleton explains ask of the bonds.
    needs: NeedsSummary,
    /// Some group present holds an sp3 C–H of its own.
    sp3_group: bool,
    /// Skeleton carbons remain.
    skeleton_left: bool,
    /// Tail groups present whose bands are seen (bit k: tail group k).
    seen_split: u32,
    /// Its score terms and class, worked out with its first consistent combination.
    priced: Option<Priced>,
}

/// The score terms that depend on presence alone, and the class, of a slot.
#[derive(Clone, Copy, Debug)]
struct Priced {
    /// Sum of the group parts of the groups present (`score::Parts::group`).
    groups: f64,
    /// The candidate terms that depend on presence alone (slots 3 and 5 left empty).
    values: [Option<f64>; 6],
    /// The class of the combinations with this head and pattern.
    class: u32,
}

/// Everything fixed for one solve.
struct Shared<'a, 'c> {
    problem: &'a Problem<'c>,
    parts: &'a Parts,
    tail: &'a [usize],
    /// Per concrete group: its band contributions.
    group_bands: GroupBands,
    /// Per concrete group: the tally of one instance (`Tally::unit`).
    units: Vec<Tally>,
    /// Demanded bands no artefact explains.
    demanded: u64,
    /// Bands a skeleton rule that needs an sp3 carbon explains.
    by_sp3_skeleton: u64,
    /// Per skeleton rule: the H it needs (`band_explanation::h_kind`).
    h_kinds: Vec<Option<bool>>,
    /// Per active band: best artefact quality.
    artefact: Vec<f64>,
    /// Per active band: best quality of the skeleton rules that need an sp3 carbon.
    sp3_skeleton: Vec<f64>,
    /// Per active band: the penalty when nothing explains it (`score::unexplained_penalty`).
    penalty: Vec<f64>,
    /// Per active band: the band it is a branch of (`Explainers::branch_of`), or
    /// `usize::MAX`.
    branch_of: Vec<usize>,
    /// Per tail pattern (bit k: tail group k present): its summary.
    patterns: Vec<PartView>,
    /// Tail groups whose bands are seen (bit k: tail group k).
    seen_split: u32,
    /// Per concrete group: its position in the tail, if it is a tail group.
    tail_pos: Vec<Option<usize>>,
    /// Per tail pattern: no `excludes` between two of its groups.
    pattern_relations_hold: Vec<bool>,
    /// Per tail pattern: its groups whose `requires_any` it does not meet itself.
    pattern_needs_head: Vec<u32>,
    /// Per (carbons, DBE) left by a head: the tail fillings.
    tables: HashMap<(u32, u32), Rc<Vec<TailFill>>>,
}

/// One way the tail takes what a head leaves.
#[derive(Clone, Debug)]
struct TailFill {
    /// Count per tail group.
    counts: Vec<u32>,
    /// Tail groups present (bit k: tail group k).
    pattern: u32,
    /// Skeleton carbons left.
    skeleton_c: u32,
    /// Group instances.
    instances: u32,
    /// Open valences and atoms.
    tally: Tally,
}

impl<'a, 'c> Shared<'a, 'c> {
    fn new(problem: &'a Problem<'c>, parts: &'a Parts, tail: &'a [usize]) -> Self {
        let nb = problem.bands.len();
        let group_bands = GroupBands::new(problem);
        let units = (0..problem.groups.len())
            .map(|g| Tally::unit(problem, g))
            .collect();
        let demanded = band_mask(nb, |b| {
            let ex = &problem.explainers[b];
            ex.demanded && ex.artefacts.is_empty()
        });
        let h_kinds = (0..problem.skeleton_needs.len())
            .map(|si| h_kind(problem, si))
            .collect();
        let artefact = problem
            .explainers
            .iter()
            .map(|ex| ex.artefacts.iter().map(|(_, q)| *q).fold(NONE, f64::max))
            .collect();
        let sp3_skeleton = problem
            .explainers
            .iter()
            .map(|ex| {
                ex.skeleton
                    .iter()
                    .filter(|(si, _)| problem.skeleton_needs[*si].1)
                    .map(|(_, q)| *q)
                    .fold(NONE, f64::max)
            })
            .collect::<Vec<f64>>();
        let by_sp3_skeleton = band_mask(nb, |b| sp3_skeleton[b] != NONE);
        let penalty = problem
            .bands
            .iter()
            .map(|(_, b)| unexplained_penalty(b.band.at, b.band.strength))
            .collect();
        let branch_of = problem
            .explainers
            .iter()
            .map(|ex| ex.branch_of.unwrap_or(usize::MAX))
            .collect();
        // Tail positions present in a pattern.
        let members = |pattern: u32| (0..tail.len()).filter(move |k| pattern & (1 << k) != 0);
        let patterns = (0..1u32 << tail.len())
            .map(|pattern| {
                let mut present: Vec<usize> = members(pattern).map(|k| tail[k]).collect();
                present.sort_unstable();
                let mut v = PartView::default();
                v.fill(problem, parts, &group_bands, &present);
                v
            })
            .collect();
        let mut tail_pos = vec![None; problem.groups.len()];
        for (k, &g) in tail.iter().enumerate() {
            tail_pos[g] = Some(k);
        }
        let in_pattern =
            |pattern: u32, g: usize| tail_pos[g].is_some_and(|k| pattern & (1 << k) != 0);
        let pattern_relations_hold = (0..1u32 << tail.len())
            .map(|pattern| {
                members(pattern).all(|k| {
                    let t = tail[k];
                    !problem.excludes[t]
                        .iter()
                        .any(|&j| j > t && in_pattern(pattern, j))
                })
            })
            .collect();
        let pattern_needs_head = (0..1u32 << tail.len())
            .map(|pattern| {
                members(pattern)
                    .filter(|&k| {
                        let t = tail[k];
                        !problem.groups[t].group.requires_any.is_empty()
                            && !problem.requires[t].iter().any(|&j| in_pattern(pattern, j))
                    })
                    .fold(0u32, |m, k| m | (1 << k))
            })
            .collect();
        let seen_split = (0..tail.len())
            .filter(|&k| !problem.groups[tail[k]].presence.matched.is_empty())
            .fold(0u32, |m, k| m | (1 << k));
        Shared {
            problem,
            parts,
            tail,
            seen_split,
            tail_pos,
            pattern_relations_hold,
            pattern_needs_head,
            group_bands,
            units,
            demanded,
            by_sp3_skeleton,
            h_kinds,
            artefact,
            sp3_skeleton,
            penalty,
            branch_of,
            patterns,
            tables: HashMap::new(),
        }
    }

    /// The tail fillings of (carbons, DBE) left, listed on first use.
    fn fills(&mut self, c_left: u32, dbe_left: u32) -> Rc<Vec<TailFill>> {
        let (problem, tail, patterns, units) =
            (self.problem, self.tail, &self.patterns, &self.units);
        let table = self.tables.entry((c_left, dbe_left)).or_insert_with(|| {
            let mut full = vec![0u32; problem.groups.len()];
            enumerate::tails(problem, tail, c_left, dbe_left)
                .into_iter()
                .map(|counts| {
                    let mut pattern = 0u32;
                    let mut carbons = 0;
                    for (k, &n) in counts.iter().enumerate() {
                        full[tail[k]] = n;
                        if n > 0 {
                            pattern |= 1 << k;
                            carbons += n * problem.groups[tail[k]].c;
                        }
                    }
                    let tally = Tally::of_units(units, &full, &patterns[pattern as usize].present);
                    tail.iter().for_each(|&g| full[g] = 0);
                    TailFill {
                        instances: counts.iter().sum(),
                        counts,
                        pattern,
                        skeleton_c: c_left - carbons,
                        tally,
                    }
                })
                .collect::<Vec<_>>()
                .into()
        });
        Rc::clone(table)
    }
}

/// The relations (`excludes`, `requires_any`) of a head with the tail groups, as bit
/// masks over the tail (bit k: tail group k); with [`Shared`]'s per-pattern masks a
/// slot's relations are a few bit operations (the same verdict as `relations::check`
/// on the union).
#[derive(Clone, Debug, Default)]
struct HeadRelations {
    /// The head's groups meet every relation among themselves, and each requirement the
    /// head leaves unmet has a tail group that would meet it.
    holds: bool,
    /// Tail groups an `excludes` between them and a head group keeps out.
    forbidden: u32,
    /// Per requirement of a head group that the head leaves unmet: the tail groups
    /// that would meet it.
    unmet: Vec<u32>,
    /// Tail groups whose requirement some head group meets.
    met_by_head: u32,
}

impl HeadRelations {
    /// The relations of the head `view` with the tail groups.
    fn fill(&mut self, sh: &Shared<'_, '_>, view: &PartView) {
        let problem = sh.problem;
        let tail_bits = |gs: &[usize]| {
            gs.iter()
                .filter_map(|&g| sh.tail_pos[g])
                .fold(0u32, |m, k| m | (1 << k))
        };
        self.holds = true;
        self.forbidden = 0;
        self.unmet.clear();
        self.met_by_head = 0;
        for &i in &view.present {
            for &j in problem.excludes[i].iter().filter(|&&j| j > i) {
                if view.set.contains(j) {
                    self.holds = false;
                }
                if let Some(k) = sh.tail_pos[j] {
                    self.forbidden |= 1 << k;
                }
            }
            if !problem.groups[i].group.requires_any.is_empty()
                && !problem.requires[i].iter().any(|&j| view.set.contains(j))
            {
                let by_tail = tail_bits(&problem.requires[i]);
                if by_tail == 0 {
                    self.holds = false;
                }
                self.unmet.push(by_tail);
            }
        }
        for (k, &t) in sh.tail.iter().enumerate() {
            if problem.excludes[t]
                .iter()
                .any(|&j| j > t && view.set.contains(j))
            {
                self.forbidden |= 1 << k;
            }
            if problem.requires[t].iter().any(|&j| view.set.contains(j)) {
                self.met_by_head |= 1 << k;
            }
        }
    }

    /// True when the head with tail `pattern` meets every relation.
    fn hold_with(&self, sh: &Shared<'_, '_>, pattern: u32) -> bool {
        self.holds
            && pattern & self.forbidden == 0
            && self.unmet.iter().all(|&m| pattern & m != 0)
            && sh.pattern_relations_hold[pattern as usize]
            && sh.pattern_needs_head[pattern as usize] & !self.met_by_head == 0
    }
}

/// Buffers reused from one slot to the next.
#[derive(Debug, Default)]
struct Scratch {
    /// Per active band: best direct explanation quality.
    direct: Vec<f64>,
    /// Per active band: best explanation quality.
    band_quality: Vec<f64>,
    /// The groups present, in index order.
    present: Vec<usize>,
    /// The class key of a slot (`band_key`).
    key: Vec<i64>,
}

/// Judges a head with a tail pattern, with or without skeleton carbons left: what
/// presence, relations and band explanation decide (the score terms wait for a
/// consistent combination, see [`price_slot`]).
fn judge_slot(
    sh: &Shared<'_, '_>,
    head: &PartView,
    head_fixed: &HeadFixed,
    tail: &PartView,
    pattern: u32,
    skeleton_left: bool,
) -> SlotEval {
    let sp3_group = head.sp3 || tail.sp3;
    let sp3_ok = skeleton_left || sp3_group;
    let by_skeleton =
        head.by_skeleton | tail.by_skeleton | if sp3_ok { sh.by_sp3_skeleton } else { 0 };
    // As band_explanation::check: a demanded band no group explains needs the skeleton.
    let skeleton_only = sh.demanded & !(head.by_groups | tail.by_groups);
    let holds = head.bands_present
        && tail.bands_present
        && skeleton_only & !by_skeleton == 0
        && head_fixed.relations.hold_with(sh, pattern);
    let mut needs = NeedsSummary::default();
    if holds && skeleton_only != 0 {
        needs = skeleton_needs(sh, head, tail, skeleton_only, sp3_ok);
    }
    SlotEval {
        holds,
        needs,
        sp3_group,
        skeleton_left,
        seen_split: pattern & sh.seen_split,
        priced: None,
    }
}

/// The per-band best explanation qualities of a head with a tail pattern (into
/// `scratch.band_quality`), and the score terms that depend on presence alone (as
/// `score::candidate_values` computes them; slots 3 and 5 are left to the counts) with
/// the sum of the group parts.
fn price_slot(
    sh: &Shared<'_, '_>,
    head: &PartView,
    head_fixed: &HeadFixed,
    tail: &PartView,
    sp3_ok: bool,
    scratch: &mut Scratch,
) -> ([Option<f64>; 6], f64) {
    let nb = sh.problem.bands.len();
    let base = if sp3_ok {
        &head_fixed.quality_sp3[..nb]
    } else {
        &head_fixed.quality[..nb]
    };
    let tail_best = &tail.best[..nb];
    scratch.direct.resize(nb, NONE);
    let direct = &mut scratch.direct[..nb];
    for ((d, h), t) in direct.iter_mut().zip(base).zip(tail_best) {
        *d = larger(*h, *t);
    }
    let direct = &scratch.direct[..nb];
    scratch.band_quality.resize(nb, NONE);
    let band_quality = &mut scratch.band_quality[..nb];
    let (mut seen, mut explained, mut unexplained) = (0.0, 0.0, 0.0);
    let (head_credit, tail_credit) = (&head.credit[..nb], &tail.credit[..nb]);
    let (branch_of, penalty) = (&sh.branch_of[..nb], &sh.penalty[..nb]);
    for b in 0..nb {
        let mut q = direct[b];
        if q == NONE && branch_of[b] != usize::MAX {
            q = BRANCH_QUALITY * direct[branch_of[b]];
        }
        band_quality[b] = q;
        if q != NONE {
            explained += W_EXPLAINED * q;
        } else {
            unexplained += penalty[b];
        }
        seen += larger(head_credit[b], tail_credit[b]);
    }
    let mut values = [None; 6];
    if seen != 0.0 {
        values[0] = Some(score::round3(seen));
    }
    if explained != 0.0 {
        values[1] = Some(score::round3(explained));
    }
    if unexplained != 0.0 {
        values[2] = Some(score::round3(-unexplained));
    }
    let present = &mut scratch.present;
    merge_into(&head.present, &tail.present, present);
    if present.len() >= 2 {
        let twice = head.shared_twice | tail.shared_twice | (head.shared_once & tail.shared_once);
        let borrowed = present
            .iter()
            .filter(|&&g| {
                let own = sh.group_bands.own[g];
                own != 0 && own & !twice == 0
            })
            .count();
        if borrowed > 0 {
            values[4] = Some(score::round3(-score::P_NO_OWN_BAND * borrowed as f64));
        }
    }
    let groups: f64 = present.iter().map(|&g| sh.parts.group[g]).sum();
    (values, groups)
}

/// What the demanded bands in `bands` (explained by no group, each by some skeleton
/// rule) ask of the bonds, as `band_explanation::check` words it.
fn skeleton_needs(
    sh: &Shared<'_, '_>,
    head: &PartView,
    tail: &PartView,
    bands: u64,
    sp3_ok: bool,
) -> NeedsSummary {
    let problem = sh.problem;
    let mut needs = NeedsSummary::default();
    let applies = |si: usize| {
        (problem.skeleton_needs[si].1 && sp3_ok) || head.skeleton_need[si] || tail.skeleton_need[si]
    };
    for b in (0..problem.bands.len()).filter(|b| bands & (1 << b) != 0) {
        let ex = &problem.explainers[b];
        let applicable = || {
            ex.skeleton
                .iter()
                .map(|(si, _)| *si)
                .filter(|&si| applies(si))
        };
        if applicable().all(|si| sh.h_kinds[si] == Some(true)) {
            needs.sp3_h = true;
        } else if applicable().all(|si| sh.h_kinds[si] == Some(false)) {
            let offered = applicable().any(|si| {
                problem.skeleton_needs[si].0.iter().any(|&g| {
                    (head.set.contains(g) || tail.set.contains(g))
                        && problem.groups[g].group.bonds.carbon_or_h > 0
                })
            });
            needs.sp2_h = Some(offered);
        }
    }
    needs
}

/// Two lists of distinct groups in index order merged, in index order, into `out`.
fn merge_into(a: &[usize], b: &[usize], out: &mut Vec<usize>) {
    out.clear();
    let (mut i, mut j) = (0, 0);
    while i < a.len() && j < b.len() {
        if a[i] < b[j] {
            out.push(a[i]);
            i += 1;
        } else {
            out.push(b[j]);
            j += 1;
        }
    }
    out.extend_from_slice(&a[i..]);
    out.extend_from_slice(&b[j..]);
}

/// The per-band part of a class signature (as `collapse::signature_key` rounds it),
/// one entry per band, `i64::MIN` for a band nothing explains, into `key`.
fn band_key(band_quality: &[f64], key: &mut Vec<i64>) {
    key.clear();
    key.extend(band_quality.iter().map(|&q| {
        if q != NONE {
            score::round_half_away(q * 1000.0) as i64
        } else {
            i64::MIN
        }
    }));
}

/// The class among a head's `classes` with `seen` split groups whose row of
/// `rows` (one per class, one after the other) is `row`.
fn class_with<T: PartialEq>(
    classes: &[(u32, u32)],
    rows: &[T],
    seen: u32,
    row: &[T],
) -> Option<u32> {
    let n = row.len();
    classes
        .iter()
        .enumerate()
        .find(|(i, (s, _))| *s == seen && rows[i * n..(i + 1) * n] == *row)
        .map(|(_, (_, c))| *c)
}

/// [`super::classes::gather`] for a case whose walk ends with the split groups `tail`.
pub fn gather<M: Meter>(
    problem: &Problem<'_>,
    options: &SolveOptions,
    parts: &Parts,
    tail: &[usize],
    meter: &mut M,
    stage: Stage,
) -> Result<Gathered, M::Stop> {
    let mut g = Gatherer {
        sh: Shared::new(problem, parts, tail),
        limit: options.enumeration_limit,
        meter,
        stage,
        out: Gathered::empty(problem, tail),
        per_member: tail.len() as u64 + MEMBER_COLUMN_BYTES,
        head: HeadState::default(),
        slots: Vec::new(),
        slot_of: vec![u32::MAX; 2 << tail.len()],
        n_classes: 0,
        stop: None,
    };
    let allowed = problem.allowed_groups();
    enumerate::walk_heads(problem, &allowed, tail, |counts, c_left, dbe_left| {
        g.visit_head(counts, c_left, dbe_left)
    });
    if let Some(e) = g.stop {
        return Err(e);
    }
    g.out.n_classes = g.n_classes as usize;
    Ok(g.out)
}

/// What is known of the head being filled in.
#[derive(Debug, Default)]
struct HeadState {
    /// Its groups, in index order.
    present: Vec<usize>,
    /// Their band summary.
    view: PartView,
    /// Its per-band qualities and relations that no tail changes.
    fixed: HeadFixed,
    /// Its open valences and atoms.
    tally: Tally,
    /// Its group instances.
    instances: u32,
    /// Its classes: (seen split groups, class), in the order met.
    classes: Vec<(u32, u32)>,
    /// Their band keys (`band_key`), one after the other.
    class_keys: Vec<i64>,
    /// The band qualities their keys were made from, one after the other.
    class_qualities: Vec<f64>,
    /// Its counts (tail groups at zero).
    counts: Vec<u32>,
    /// Whether its counts are held as a block of the members (from its first member).
    block_started: bool,
    /// Buffers of the slot evaluations.
    scratch: Scratch,
}

/// The state of a factored gathering.
struct Gatherer<'a, 'c, M: Meter> {
    sh: Shared<'a, 'c>,
    limit: usize,
    meter: &'a mut M,
    stage: Stage,
    out: Gathered,
    per_member: u64,
    head: HeadState,
    /// The slots of the current head, in the order met.
    slots: Vec<SlotEval>,
    /// Per (pattern, skeleton carbons left): index into `slots`, `u32::MAX` if not met.
    slot_of: Vec<u32>,
    n_classes: u32,
    stop: Option<M::Stop>,
}

impl<M: Meter> Gatherer<'_, '_, M> {
    /// Keeps a metered step's stop; `Stop` when there is one.
    fn metered(&mut self, step: Result<(), M::Stop>) -> Flow {
        Flow::after_metered(step, &mut self.stop)
    }

    /// Fills in every tail of one head.
    fn visit_head(&mut self, counts: &[u32], c_left: u32, dbe_left: u32) -> Flow {
        let tick = self.meter.tick(self.stage);
        if self.metered(tick) == Flow::Stop {
            return Flow::Stop;
        }
        let problem = self.sh.problem;
        if !ionic::check(problem, counts).is_empty() {
            return Flow::Continue;
        }
        self.prepare_head(counts);
        let fills = self.sh.fills(c_left, dbe_left);
        for fill in fills.iter() {
            if self.visit_fill(fill) == Flow::Stop {
                return Flow::Stop;
            }
        }
        Flow::Continue
    }

    /// Summarises a new head and forgets the slots of the last.
    fn prepare_head(&mut self, counts: &[u32]) {
        let (problem, sh, h) = (self.sh.problem, &self.sh, &mut self.head);
        h.present.clear();
        h.present
            .extend((0..counts.len()).filter(|&g| counts[g] > 0));
        h.view.fill(problem, sh.parts, &sh.group_bands, &h.present);
        let view = &h.view;
        h.fixed.quality.clear();
        h.fixed
            .quality
            .extend(sh.artefact.iter().zip(&view.best).map(|(a, v)| a.max(*v)));
        h.fixed.quality_sp3.clear();
        h.fixed.quality_sp3.extend(
            h.fixed
                .quality
                .iter()
                .zip(&sh.sp3_skeleton)
                .map(|(q, s)| q.max(*s)),
        );
        h.fixed.relations.fill(sh, &h.view);
        h.tally = Tally::of_units(&sh.units, counts, &h.present);
        h.instances = counts.iter().sum();
        h.classes.clear();
        h.class_keys.clear();
        h.class_qualities.clear();
        h.counts.clear();
        h.counts.extend_from_slice(counts);
        h.block_started = false;
        self.slots.clear();
        self.slot_of.iter_mut().for_each(|s| *s = u32::MAX);
    }

    /// Checks one tail filling of the current head and keeps it when consistent.
    fn visit_fill(&mut self, fill: &TailFill) -> Flow {
        let problem = self.sh.problem;
        let sk = fill.skeleton_c;
        let slot_idx = (fill.pattern as usize) << 1 | usize::from(sk > 0);
        if self.slot_of[slot_idx] == u32::MAX {
            let h = &self.head;
            let tail_view = &self.sh.patterns[fill.pattern as usize];
            self.slot_of[slot_idx] = self.slots.len() as u32;
            self.slots.push(judge_slot(
                &self.sh,
                &h.view,
                &h.fixed,
                tail_view,
                fill.pattern,
                sk > 0,
            ));
        }
        let slot_at = self.slot_of[slot_idx] as usize;
        let slot = &self.slots[slot_at];
        let tally = self.head.tally.plus(&fill.tally);
        if !slot.holds || bonds::verdict(problem, &tally, sk, &slot.needs) != Verdict::Holds {
            let tick = self.meter.tick(self.stage);
            return self.metered(tick);
        }
        if self.out.members.len() >= self.limit {
            self.out.truncated = true;
            return Flow::Stop;
        }
        let sp3_group = slot.sp3_group;
        let (priced, class_bytes) = self.priced(slot_at, fill.pattern);
        let mut values = priced.values;
        values[3] = score::no_sp3_stretch_term(problem, || {
            score::sp3_ch_required(problem, sp3_group, sk, || tally.h_held_and_open())
        });
        let instances = self.head.instances + fill.instances;
        values[5] = score::parsimony_term(instances);
        let s = score::total(priced.groups, &values);
        let class = priced.class;
        let h = &mut self.head;
        let mut bytes = self.per_member + class_bytes;
        if !h.block_started {
            self.out.members.start_block(&h.counts);
            h.block_started = true;
            bytes += h.counts.len() as u64;
        }
        self.out
            .members
            .push_over_block(&fill.counts, sk, s, instances, class);
        self.out.held += bytes;
        let hold = self.meter.hold(bytes, self.stage);
        self.metered(hold)
    }

    /// The score terms and class of slot `slot_at` (worked out now, with its first
    /// consistent combination, or earlier) and the bytes a new class holds (its key
    /// lives only while its head is filled in; ranking keeps its best member); a slot's
    /// first member marks its groups as in some candidate.
    fn priced(&mut self, slot_at: usize, pattern: u32) -> (Priced, u64) {
        if let Some(p) = self.slots[slot_at].priced {
            return (p, 0);
        }
        let h = &mut self.head;
        let slot = &mut self.slots[slot_at];
        let tail_view = &self.sh.patterns[pattern as usize];
        let sp3_ok = slot.skeleton_left || slot.sp3_group;
        let (values, groups) = price_slot(
            &self.sh,
            &h.view,
            &h.fixed,
            tail_view,
            sp3_ok,
            &mut h.scratch,
        );
        let qualities = &h.scratch.band_quality;
        let seen = slot.seen_split;
        // The same qualities make the same key; the keys of a head's classes differ, so
        // the class with the same qualities is the one with the same key.
        let same_qualities = class_with(&h.classes, &h.class_qualities, seen, qualities);
        let mut bytes = 0;
        let class = same_qualities.unwrap_or_else(|| {
            let key = &mut h.scratch.key;
            band_key(qualities, key);
            let same_key = class_with(&h.classes, &h.class_keys, seen, key);
            same_key.unwrap_or_else(|| {
                let c = self.n_classes;
                self.n_classes += 1;
                bytes = std::mem::size_of::<Option<usize>>() as u64;
                h.classes.push((seen, c));
                h.class_keys.extend_from_slice(key);
                h.class_qualities.extend_from_slice(qualities);
                c
            })
        });
        let priced = Priced {
            groups,
            values,
            class,
        };
        slot.priced = Some(priced);
        for &g in h.present.iter().chain(&tail_view.present) {
            self.out.in_some_candidate[g] = true;
        }
        (priced, bytes)
    }
}
