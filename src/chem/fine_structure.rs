//! Fine isotope structure: every isotopologue down to a probability cut-off, merged at a
//! resolving power.
//!
//! Each element's isotopologues are a multinomial over its isotopes; they are generated
//! best-first from the most probable configuration (found by hill climbing) by moving one
//! atom between isotopes, down to the cut-off. Elements are then combined as sparse
//! products, the element with the most configurations last, skipping partial products
//! that cannot reach the cut-off even with the most probable configuration of the
//! elements still to come. Peaks closer than m/R (the full width at half maximum at
//! resolving power R) are merged into their probability-weighted centroid; the last
//! element's products are merged into mass buckets as they are made, so the bulk of the
//! isotopologues is never listed or sorted. The number of isotopologues kept is capped
//! ([`MAX_ELEMENT_CONFIGURATIONS`], [`MAX_FINE_PEAKS`]); only formulas with hundreds of
//! atoms of many-isotope elements (Sn, Hg, Se, Zn) reach the caps.

use super::formula::{Atom, Formula};
use super::isotopes::{IsotopePattern, Peak, DEFAULT_PRUNE_BELOW};

/// Most isotopologues kept per element and for the whole molecule in a fine-structure
/// pattern. Elements with many isotopes in large numbers (Sn, Hg, Se by the hundred)
/// have astronomically many; the most probable ones are kept and the loss shows in
/// [`IsotopePattern::retained_probability`].
pub const MAX_FINE_PEAKS: usize = 200_000;

/// Most configurations generated for one element (bounds the best-first queue too).
pub const MAX_ELEMENT_CONFIGURATIONS: usize = 20_000;

/// Fine-structure pattern at resolving power `resolving_power` (m/Δm, FWHM), keeping
/// isotopologues down to [`DEFAULT_PRUNE_BELOW`] × the most probable one. `None` when the
/// resolving power is not a positive finite number.
pub fn fine_structure_pattern(formula: &Formula, resolving_power: f64) -> Option<IsotopePattern> {
    fine_structure_pattern_pruned(formula, resolving_power, DEFAULT_PRUNE_BELOW)
}

/// Fine-structure pattern keeping isotopologues down to `prune_below` × the most probable
/// one; `None` when the resolving power is not a positive finite number.
pub fn fine_structure_pattern_pruned(
    formula: &Formula,
    resolving_power: f64,
    prune_below: f64,
) -> Option<IsotopePattern> {
    if !(resolving_power.is_finite() && resolving_power > 0.0) {
        return None;
    }
    let (fixed_mass, per_element) = ordered_configurations(formula, prune_below);
    let cut = per_element
        .iter()
        .map(|c| best_probability(c))
        .product::<f64>()
        * prune_below;
    let merged = match per_element.split_last() {
        Some((last, before)) if !before.is_empty() => {
            // The last element's products are merged as they are made, not listed first
            // (they are most of the isotopologues), when the cap cannot cut them.
            let partial = combine(fixed_mass, before, cut / best_probability(last));
            let streamed =
                BucketMerge::around(&partial, last, resolving_power).and_then(|mut b| {
                    for_each_product(&partial, last, cut, MAX_FINE_PEAKS, |p| b.add(p))
                        .then(|| b.merged())
                });
            // Past the cap the listing keeps only the most probable, which needs them all.
            streamed.unwrap_or_else(|| {
                merge_within_resolution(stage(&partial, last, 1.0, cut), resolving_power)
            })
        }
        _ => merge_within_resolution(combine(fixed_mass, &per_element, cut), resolving_power),
    };
    Some(IsotopePattern::from_masses(merged, formula.charge()))
}

/// Isotopologues (mass, probability) with probability ≥ `prune_below` × the most probable
/// one (at most [`MAX_FINE_PEAKS`]), unsorted and unmerged: the same coverage a
/// probability-threshold isotope calculator lists, before the resolving power joins them.
pub fn fine_isotopologues(formula: &Formula, prune_below: f64) -> Vec<Peak> {
    let (fixed_mass, per_element) = ordered_configurations(formula, prune_below);
    let best_total: f64 = per_element.iter().map(|c| best_probability(c)).product();
    combine(fixed_mass, &per_element, best_total * prune_below)
}

/// [`element_configurations`] with the elements ordered by how many configurations they
/// have: the cross product materialises every stage but the last in full, so the element
/// with the most configurations goes last and the stages before it stay small.
fn ordered_configurations(formula: &Formula, prune_below: f64) -> (f64, Vec<Vec<Peak>>) {
    let (fixed_mass, mut per_element) = element_configurations(formula, prune_below);
    per_element.sort_by_key(|configs| configs.len());
    (fixed_mass, per_element)
}

/// The probability of the most probable entry of a list that holds it first.
fn best_probability(configs: &[Peak]) -> f64 {
    configs.first().map_or(0.0, |c| c.probability)
}

/// Calls `emit` with every product of a `partial` entry and a `configs` entry whose
/// probability reaches `cut` (both lists most probable first); gives up, returning
/// `false`, once it has emitted more than `limit`.
fn for_each_product(
    partial: &[Peak],
    configs: &[Peak],
    cut: f64,
    limit: usize,
    mut emit: impl FnMut(Peak),
) -> bool {
    let best_config = best_probability(configs);
    let mut emitted = 0usize;
    for a in partial {
        if a.probability * best_config < cut {
            continue;
        }
        for b in configs {
            let p = a.probability * b.probability;
            if p < cut {
                break;
            }
            emit(Peak {
                mz: a.mz + b.mz,
                probability: p,
            });
            emitted += 1;
        }
        if emitted > limit {
            return false;
        }
    }
    true
}

/// The summed mass of the atoms whose isotope is fixed (labelled atoms), and for every
/// natural element the configurations that can still reach `prune_below` × the most
/// probable isotopologue when every other element takes its most probable configuration,
/// most probable first.
fn element_configurations(formula: &Formula, prune_below: f64) -> (f64, Vec<Vec<Peak>>) {
    let mut fixed_mass = 0.0;
    let mut elements: Vec<Multinomial> = Vec::new();
    for (atom, n) in formula.atoms() {
        if atom.mass_number().is_some() {
            fixed_mass += atom.monoisotopic_mass() * f64::from(n);
        } else {
            elements.push(Multinomial::new(atom, n));
        }
    }
    // The molecule's most probable isotopologue combines each element's most probable
    // configuration (the elements are independent).
    let modes: Vec<f64> = elements.iter().map(|e| e.mode().1.exp()).collect();
    let best_total: f64 = modes.iter().product();
    let cut_total = best_total * prune_below;
    let per_element = elements
        .iter()
        .zip(&modes)
        .map(|(element, mode)| {
            let others = best_total / mode;
            element.enumerate(cut_total / others, MAX_ELEMENT_CONFIGURATIONS)
        })
        .collect();
    (fixed_mass, per_element)
}

/// Every combination of one configuration per element whose probability reaches `cut`
/// (at most [`MAX_FINE_PEAKS`]), built element by element from `fixed_mass`.
fn combine(fixed_mass: f64, per_element: &[Vec<Peak>], cut: f64) -> Vec<Peak> {
    // remaining_best[k] = product of the best probabilities of elements k.. .
    let mut remaining_best: Vec<f64> = vec![1.0; per_element.len() + 1];
    for k in (0..per_element.len()).rev() {
        remaining_best[k] = remaining_best[k + 1] * best_probability(&per_element[k]);
    }
    let mut partial = vec![Peak {
        mz: fixed_mass,
        probability: 1.0,
    }];
    for (k, configs) in per_element.iter().enumerate() {
        partial = stage(&partial, configs, remaining_best[k + 1], cut);
    }
    partial
}

/// One element's stage of [`combine`]: the products of `partial` and `configs` that,
/// completed by `bound_after` (the best probability of every element still to come), could
/// reach `cut`; at most [`MAX_FINE_PEAKS`]. The configurations come most probable first, so
/// the inner loop stops at the first product below the cut-off; when the list outgrows
/// twice the cap it is cut to the cap and the cut-off rises to the least probable
/// survivor, which bounds the work.
fn stage(partial: &[Peak], configs: &[Peak], bound_after: f64, cut: f64) -> Vec<Peak> {
    let mut cut_now = cut;
    let best_config = best_probability(configs);
    let mut next = Vec::with_capacity(partial.len() * 2);
    for a in partial {
        if a.probability * best_config * bound_after < cut_now {
            continue;
        }
        for b in configs {
            let p = a.probability * b.probability;
            if p * bound_after < cut_now {
                break;
            }
            next.push(Peak {
                mz: a.mz + b.mz,
                probability: p,
            });
        }
        if next.len() >= 2 * MAX_FINE_PEAKS {
            keep_most_probable(&mut next, MAX_FINE_PEAKS);
            let least = next
                .iter()
                .map(|p| p.probability)
                .fold(f64::INFINITY, f64::min);
            cut_now = cut_now.max(least * bound_after);
        }
    }
    keep_most_probable(&mut next, MAX_FINE_PEAKS);
    next
}

/// Truncates `peaks` to the `cap` most probable (order not kept).
fn keep_most_probable(peaks: &mut Vec<Peak>, cap: usize) {
    if peaks.len() > cap {
        peaks.select_nth_unstable_by(cap, |a, b| b.probability.total_cmp(&a.probability));
        peaks.truncate(cap);
    }
}

/// Sorts by mass and merges neighbours closer than m/R, chaining (a peak joins the group
/// when its gap to the previous peak is below the resolution width at its mass).
fn merge_within_resolution(peaks: Vec<Peak>, resolving_power: f64) -> Vec<Peak> {
    match merge_by_buckets(&peaks, resolving_power) {
        Some(merged) => merged,
        None => merge_sorted(sorted_by_mass(peaks), resolving_power),
    }
}

/// The chained merge over peaks already sorted by mass.
fn merge_sorted(peaks: Vec<Peak>, resolving_power: f64) -> Vec<Peak> {
    let mut merged: Vec<Peak> = Vec::new();
    let mut last_mass = f64::NEG_INFINITY;
    for p in peaks {
        let width = p.mz / resolving_power;
        match merged.last_mut() {
            Some(group) if p.mz - last_mass < width => {
                let total = group.probability + p.probability;
                group.mz = (group.mz * group.probability + p.mz * p.probability) / total;
                group.probability = total;
            }
            _ => merged.push(p),
        }
        last_mass = p.mz;
    }
    merged
}

/// Most mass buckets [`merge_by_buckets`] uses per peak before it leaves the job to the sort.
const BUCKETS_PER_PEAK: f64 = 4.0;

/// One mass bucket of [`merge_by_buckets`]: its lightest and heaviest peak, and the sums
/// that give the merged peak.
#[derive(Clone, Copy)]
struct Bucket {
    lightest: f64,
    heaviest: f64,
    probability: f64,
    weighted_mass: f64,
}

/// The chained merge without sorting, for peaks added one at a time between two masses
/// known beforehand. The mass axis is cut into buckets narrower than the smallest
/// resolution width (lightest mass / R), so every gap between neighbours inside a bucket is
/// below the width and a bucket always merges whole; buckets then chain when the gap from
/// one's heaviest peak to the next one's lightest is below the width at the lightest, which
/// is the sorted merge's test. One pass over the peaks replaces the sort that was most of
/// the fine-structure time.
struct BucketMerge {
    lightest: f64,
    per_step: f64,
    resolving_power: f64,
    buckets: Vec<Bucket>,
}

impl BucketMerge {
    /// Buckets for peaks between `lightest` and `heaviest` (inclusive, positive and
    /// finite) of which there are at most `peaks`; `None` when the range needs more than
    /// [`BUCKETS_PER_PEAK`] buckets a peak (very high resolving power on a wide pattern),
    /// where sorting is cheaper.
    fn new(lightest: f64, heaviest: f64, peaks: usize, resolving_power: f64) -> Option<Self> {
        if !(lightest.is_finite() && heaviest.is_finite() && lightest > 0.0) {
            return None;
        }
        // A little under the smallest width, so rounding cannot put a gap of exactly the
        // width inside one bucket.
        let step = lightest / resolving_power * 0.999;
        let count = ((heaviest - lightest) / step).floor() + 1.0;
        if !(step > 0.0 && count >= 1.0 && count <= BUCKETS_PER_PEAK * peaks as f64 + 64.0) {
            return None;
        }
        let empty = Bucket {
            lightest: f64::INFINITY,
            heaviest: f64::NEG_INFINITY,
            probability: 0.0,
            weighted_mass: 0.0,
        };
        Some(BucketMerge {
            lightest,
            per_step: 1.0 / step,
            resolving_power,
            buckets: vec![empty; count as usize],
        })
    }

    /// Buckets for the products of `partial` and `configs` (mass bounds from their
    /// lightest and heaviest entries).
    fn around(partial: &[Peak], configs: &[Peak], resolving_power: f64) -> Option<Self> {
        let bounds = |peaks: &[Peak]| {
            peaks
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), p| {
                    (lo.min(p.mz), hi.max(p.mz))
                })
        };
        let (a_lo, a_hi) = bounds(partial);
        let (b_lo, b_hi) = bounds(configs);
        let count = partial.len().saturating_mul(configs.len());
        BucketMerge::new(a_lo + b_lo, a_hi + b_hi, count, resolving_power)
    }

    /// Adds one peak whose mass lies within the bounds given to [`BucketMerge::new`].
    fn add(&mut self, p: Peak) {
        let last = self.buckets.len() - 1;
        let index = (((p.mz - self.lightest) * self.per_step) as usize).min(last);
        let b = &mut self.buckets[index];
        // Masses are finite here, so plain selects (branch-free) replace NaN-aware min and
        // max; the products arrive in no order, so a branch would be mispredicted often.
        b.lightest = if p.mz < b.lightest { p.mz } else { b.lightest };
        b.heaviest = if p.mz > b.heaviest { p.mz } else { b.heaviest };
        b.probability += p.probability;
        b.weighted_mass += p.mz * p.probability;
    }

    /// The merged peaks in order of mass.
    fn merged(self) -> Vec<Peak> {
        let mut merged: Vec<Peak> = Vec::new();
        let mut open: Option<Bucket> = None;
        for b in self.buckets.into_iter().filter(|b| b.lightest.is_finite()) {
            open = Some(match open {
                Some(group) if b.lightest - group.heaviest < b.lightest / self.resolving_power => {
                    Bucket {
                        lightest: group.lightest,
                        heaviest: b.heaviest,
                        probability: group.probability + b.probability,
                        weighted_mass: group.weighted_mass + b.weighted_mass,
                    }
                }
                Some(group) => {
                    merged.push(group.peak());
                    b
                }
                None => b,
            });
        }
        merged.extend(open.map(|g| g.peak()));
        merged
    }
}

/// [`BucketMerge`] over a list of peaks; `None` (sort instead) when a mass is not a
/// positive finite number or the buckets would be too many.
fn merge_by_buckets(peaks: &[Peak], resolving_power: f64) -> Option<Vec<Peak>> {
    if peaks.is_empty() {
        return Some(Vec::new());
    }
    let (lightest, heaviest) = peaks
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), p| {
            (lo.min(p.mz), hi.max(p.mz))
        });
    if peaks.iter().any(|p| !(p.mz.is_finite() && p.mz > 0.0)) {
        return None;
    }
    let mut buckets = BucketMerge::new(lightest, heaviest, peaks.len(), resolving_power)?;
    for p in peaks {
        buckets.add(*p);
    }
    Some(buckets.merged())
}

impl Bucket {
    /// The merged peak: probability-weighted mean mass, summed probability.
    fn peak(&self) -> Peak {
        let mz = if self.probability > 0.0 {
            self.weighted_mass / self.probability
        } else {
            self.lightest
        };
        Peak {
            mz,
            probability: self.probability,
        }
    }
}

/// `peaks` sorted by increasing m/z. Masses here are finite and non-negative, and for
/// such numbers the order of the IEEE 754 bit patterns read as unsigned integers is the
/// numeric order, so a least-significant-digit radix sort on the bits (8 passes of one
/// byte, skipping a pass where every key has the same byte, as the exponent and leading
/// mantissa bytes of a narrow mass range do) replaces the comparison sort: for the tens of
/// thousands of isotopologues of a large molecule this was most of the fine-structure
/// time. Falls back to the comparison sort if a mass is negative or not finite.
fn sorted_by_mass(mut peaks: Vec<Peak>) -> Vec<Peak> {
    if peaks.len() < 256 || peaks.iter().any(|p| !(p.mz.is_finite() && p.mz >= 0.0)) {
        peaks.sort_unstable_by(|a, b| a.mz.total_cmp(&b.mz));
        return peaks;
    }
    let mut from = peaks;
    let mut to = from.clone();
    for pass in 0..8 {
        let shift = 8 * pass;
        let mut counts = [0usize; 256];
        for p in &from {
            counts[((p.mz.to_bits() >> shift) & 0xff) as usize] += 1;
        }
        if counts.contains(&from.len()) {
            continue;
        }
        let mut start = [0usize; 256];
        let mut sum = 0;
        for (digit, c) in counts.iter().enumerate() {
            start[digit] = sum;
            sum += c;
        }
        for p in &from {
            let digit = ((p.mz.to_bits() >> shift) & 0xff) as usize;
            to[start[digit]] = *p;
            start[digit] += 1;
        }
        std::mem::swap(&mut from, &mut to);
    }
    from
}

/// The isotopologues of `n` atoms of one natural element: a multinomial over its
/// isotopes.
struct Multinomial {
    n: u32,
    isotopes: Vec<(f64, f64)>, // (mass, abundance)
    /// ln of each isotope's abundance.
    ln_abundance: Vec<f64>,
    /// ln k for k = 0 ..= min(n + 1, [`LN_TABLE_MAX`]) (entry 0 unused): the best-first
    /// walk takes these logarithms for every neighbour it looks at.
    ln_count: Vec<f64>,
}

/// Largest count whose logarithm [`Multinomial`] keeps in a table.
const LN_TABLE_MAX: u32 = 1 << 16;

/// A configuration in the best-first queue, ordered by log-probability.
struct Queued {
    ln_p: f64,
    counts: Vec<u32>,
}

impl PartialEq for Queued {
    fn eq(&self, other: &Queued) -> bool {
        self.ln_p.total_cmp(&other.ln_p).is_eq()
    }
}
impl Eq for Queued {}
impl PartialOrd for Queued {
    fn partial_cmp(&self, other: &Queued) -> Option<std::cmp::Ordering> {
        Some(self.cmp(other))
    }
}
impl Ord for Queued {
    fn cmp(&self, other: &Queued) -> std::cmp::Ordering {
        self.ln_p.total_cmp(&other.ln_p)
    }
}

impl Multinomial {
    fn new(atom: Atom, n: u32) -> Multinomial {
        let isotopes: Vec<(f64, f64)> = atom
            .element()
            .isotopes
            .iter()
            .map(|i| (i.mass, i.abundance))
            .collect();
        let ln_abundance = isotopes.iter().map(|(_, p)| p.ln()).collect();
        let ln_count = (0..=n.saturating_add(1).min(LN_TABLE_MAX))
            .map(|k| f64::from(k).ln())
            .collect();
        Multinomial {
            n,
            isotopes,
            ln_abundance,
            ln_count,
        }
    }

    /// ln k, from the table where it reaches.
    fn ln(&self, k: u32) -> f64 {
        match self.ln_count.get(k as usize) {
            Some(v) => *v,
            None => f64::from(k).ln(),
        }
    }

    /// The most probable configuration and its log-probability. The multinomial is
    /// log-concave in its counts, so a hill climb that moves one atom between two isotopes
    /// while that raises the probability, started from the expected counts, ends at the
    /// mode.
    fn mode(&self) -> (Vec<u32>, f64) {
        let k = self.isotopes.len();
        let mut counts: Vec<u32> = self
            .isotopes
            .iter()
            .map(|(_, p)| (f64::from(self.n) * p).floor() as u32)
            .collect();
        let assigned: u32 = counts.iter().sum();
        let (major, _) = self
            .isotopes
            .iter()
            .enumerate()
            .max_by(|a, b| a.1 .1.total_cmp(&b.1 .1))
            .unwrap_or((0, &(0.0, 0.0)));
        counts[major] += self.n - assigned.min(self.n);
        let mut ln_p = self.ln_probability(&counts);
        loop {
            let mut improved = false;
            for from in 0..k {
                for to in 0..k {
                    if from == to || counts[from] == 0 {
                        continue;
                    }
                    let candidate = ln_p + self.ln_move_ratio(&counts, from, to);
                    if candidate > ln_p + 1e-12 {
                        counts[from] -= 1;
                        counts[to] += 1;
                        ln_p = candidate;
                        improved = true;
                    }
                }
            }
            if !improved {
                return (counts, ln_p);
            }
        }
    }

    fn ln_probability(&self, counts: &[u32]) -> f64 {
        let mut ln_p = ln_factorial(self.n);
        for (c, (_, p)) in counts.iter().zip(&self.isotopes) {
            ln_p += ln_pow(*p, *c) - ln_factorial(*c);
        }
        ln_p
    }

    /// ln P(after) − ln P(before) for moving one atom from isotope `from` to `to`.
    fn ln_move_ratio(&self, counts: &[u32], from: usize, to: usize) -> f64 {
        self.ln(counts[from]) - self.ln(counts[to] + 1) + self.ln_abundance[to]
            - self.ln_abundance[from]
    }

    fn mass(&self, counts: &[u32]) -> f64 {
        counts
            .iter()
            .zip(&self.isotopes)
            .map(|(c, (m, _))| m * f64::from(*c))
            .sum()
    }

    /// Configurations with probability ≥ `cut`, most probable first, at most `cap`, as
    /// (mass, probability). Best-first from the mode over single-atom moves: the
    /// superlevel sets of a log-concave distribution are connected under those moves, so
    /// nothing above the cut is missed.
    fn enumerate(&self, cut: f64, cap: usize) -> Vec<Peak> {
        let k = self.isotopes.len();
        if k == 1 || self.n == 0 {
            return vec![Peak {
                mz: self.isotopes[0].0 * f64::from(self.n),
                probability: 1.0,
            }];
        }
        let ln_cut = if cut > 0.0 {
            cut.ln()
        } else {
            f64::NEG_INFINITY
        };
        let (start, ln_start) = self.mode();
        let mut seen: foldhash::HashSet<Vec<u32>> = foldhash::HashSet::default();
        let mut queue = std::collections::BinaryHeap::new();
        seen.insert(start.clone());
        queue.push(Queued {
            ln_p: ln_start,
            counts: start,
        });
        let mut out = Vec::new();
        while let Some(Queued { ln_p, counts }) = queue.pop() {
            if ln_p < ln_cut || out.len() >= cap {
                break;
            }
            out.push(Peak {
                mz: self.mass(&counts),
                probability: ln_p.exp(),
            });
            for from in 0..k {
                if counts[from] == 0 {
                    continue;
                }
                for to in 0..k {
                    if to == from {
                        continue;
                    }
                    let ln_next = ln_p + self.ln_move_ratio(&counts, from, to);
                    if ln_next < ln_cut {
                        continue;
                    }
                    let mut next = counts.clone();
                    next[from] -= 1;
                    next[to] += 1;
                    if seen.insert(next.clone()) {
                        queue.push(Queued {
                            ln_p: ln_next,
                            counts: next,
                        });
                    }
                }
            }
        }
        out
    }
}

/// c · ln p, with 0 · ln 0 = 0.
fn ln_pow(p: f64, c: u32) -> f64 {
    if c == 0 {
        0.0
    } else {
        f64::from(c) * p.ln()
    }
}

/// ln n!: exact sum below 256, Stirling's series above (error < 1e-16 relative there).
fn ln_factorial(n: u32) -> f64 {
    if n < 256 {
        (2..=n).map(|k| f64::from(k).ln()).sum()
    } else {
        let x = f64::from(n);
        x * x.ln() - x + 0.5 * (2.0 * std::f64::consts::PI * x).ln() + 1.0 / (12.0 * x)
            - 1.0 / (360.0 * x.powi(3))
            + 1.0 / (1260.0 * x.powi(5))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_radix_sort_orders_masses_like_the_comparison_sort() {
        // Pseudo-random masses over a narrow and a wide range, with repeats.
        let mut x: u64 = 0x9E37_79B9_7F4A_7C15;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        for (lo, width, n) in [
            (2430.0, 12.0, 5_000),
            (0.0, 5_000.0, 3_000),
            (100.0, 0.0, 400),
        ] {
            let peaks: Vec<Peak> = (0..n)
                .map(|i| Peak {
                    mz: lo + width * next(),
                    probability: f64::from(i),
                })
                .collect();
            let mut expected: Vec<f64> = peaks.iter().map(|p| p.mz).collect();
            expected.sort_unstable_by(f64::total_cmp);
            let got: Vec<f64> = sorted_by_mass(peaks).iter().map(|p| p.mz).collect();
            assert_eq!(got, expected);
        }
    }

    #[test]
    fn ln_factorial_is_continuous_at_the_switch() {
        let exact: f64 = (2..=256u32).map(|k| f64::from(k).ln()).sum();
        assert!((ln_factorial(256) - exact).abs() < 1e-9);
        assert_eq!(ln_factorial(0), 0.0);
        assert_eq!(ln_factorial(1), 0.0);
    }

    fn f(s: &str) -> Formula {
        Formula::parse(s).expect("valid formula")
    }

    fn close(a: &[Peak], b: &[Peak]) -> bool {
        a.len() == b.len()
            && a.iter().zip(b).all(|(x, y)| {
                (x.mz - y.mz).abs() <= 1e-9 * x.mz.max(1.0)
                    && (x.probability - y.probability).abs() <= 1e-12
            })
    }

    #[test]
    fn the_bucket_merge_gives_the_sorted_merge() {
        // Pseudo-random isotopologue-like masses (clusters a nominal unit apart with small
        // mass defects), merged at low, medium and high resolving power.
        let mut x: u64 = 0x2545_F491_4F6C_DD1D;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        let peaks: Vec<Peak> = (0..4_000)
            .map(|_| Peak {
                mz: 812.0 + (next() * 9.0).floor() + 0.05 * next(),
                probability: next() * 1e-3,
            })
            .collect();
        for r in [500.0, 20_000.0, 100_000.0, 1e6] {
            let bucketed = merge_by_buckets(&peaks, r).expect("few buckets suffice");
            let sorted = merge_sorted(sorted_by_mass(peaks.clone()), r);
            assert!(close(&bucketed, &sorted), "R = {r}");
        }
    }

    #[test]
    fn too_many_buckets_fall_back_to_the_sort() {
        let peaks = vec![
            Peak {
                mz: 1.0,
                probability: 0.5,
            },
            Peak {
                mz: 1000.0,
                probability: 0.5,
            },
        ];
        assert!(merge_by_buckets(&peaks, 1e9).is_none());
        assert_eq!(merge_within_resolution(peaks, 1e9).len(), 2);
    }

    #[test]
    fn merging_while_combining_equals_merging_the_listing() {
        for (text, r) in [
            ("C100H150N20O30S5Cl2", 100_000.0),
            ("C60H122N2O12SBr2", 30_000.0),
            ("C8H10N4O2", 1e6),
            ("SnCl4", 50_000.0),
        ] {
            let formula = f(text);
            let streamed = fine_structure_pattern(&formula, r).expect("valid R");
            let listed = merge_sorted(
                sorted_by_mass(fine_isotopologues(&formula, DEFAULT_PRUNE_BELOW)),
                r,
            );
            let listed = IsotopePattern::from_masses(listed, formula.charge());
            assert!(close(streamed.peaks(), listed.peaks()), "{text} at R = {r}");
        }
    }
}
