//! Isotope patterns of a formula: the aggregated (nominal-mass) pattern and the fine
//! structure at a given resolving power.
//!
//! Aggregated pattern: each element's single-atom distribution over mass numbers is a
//! polynomial; the molecule's distribution is the product of those polynomials raised to
//! the atom counts. Powers are taken by repeated squaring, and after every product the
//! tails below `prune_below` × the largest coefficient are cut, which keeps the vectors
//! short and loses far less than 1e-9 of the probability for molecular formulas (tested).
//! Each bin also carries Σ p·m so that its peak sits at the probability-weighted mean
//! mass of the isotopologues it holds.
//!
//! Fine structure: each element's isotopologues are a multinomial over its isotopes; they
//! are generated best-first from the most probable configuration (found by hill climbing)
//! by moving one atom between isotopes, down to the cut-off. Elements are then combined
//! as sparse products, skipping partial products that cannot reach the cut-off even with
//! the most probable configuration of the elements still to come. Finally peaks closer
//! than m/R (the full width at half maximum at resolving power R) are merged into their
//! probability-weighted centroid. The number of isotopologues kept is capped
//! ([`MAX_ELEMENT_CONFIGURATIONS`], [`MAX_FINE_PEAKS`]); only formulas with hundreds of
//! atoms of many-isotope elements (Sn, Hg, Se, Zn) reach the caps.
//!
//! Both report m/z (electron masses removed for ions, divided by |charge|), probabilities
//! that sum to 1 over the retained peaks, and the probability retained before that
//! normalisation (1 minus what pruning and the caps dropped).

use super::elements::ELECTRON_MASS;
use super::formula::{Atom, Formula};

/// Default pruning threshold, relative to the most abundant peak.
pub const DEFAULT_PRUNE_BELOW: f64 = 1e-12;

/// One peak of an isotope pattern.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct Peak {
    /// m/z (the mass for a neutral formula).
    pub mz: f64,
    /// Probability; the retained peaks sum to 1.
    pub probability: f64,
}

/// One peak with its intensity relative to the most abundant peak (= 100).
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct RelativePeak {
    /// m/z (the mass for a neutral formula).
    pub mz: f64,
    /// Intensity in percent of the most abundant peak.
    pub relative: f64,
}

/// An isotope pattern: peaks in increasing m/z.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct IsotopePattern {
    peaks: Vec<Peak>,
    retained_probability: f64,
}

impl IsotopePattern {
    /// Peaks in increasing m/z; probabilities sum to 1.
    pub fn peaks(&self) -> &[Peak] {
        &self.peaks
    }

    /// Probability the peaks held before normalisation: 1 minus what pruning dropped.
    pub fn retained_probability(&self) -> f64 {
        self.retained_probability
    }

    /// Sum of the peaks' probabilities (1 up to rounding).
    pub fn total_probability(&self) -> f64 {
        self.peaks.iter().map(|p| p.probability).sum()
    }

    /// The most abundant peak (`None` only for the empty formula's empty pattern).
    pub fn most_abundant(&self) -> Option<Peak> {
        self.peaks
            .iter()
            .copied()
            .max_by(|a, b| a.probability.total_cmp(&b.probability))
    }

    /// Peaks as percent of the most abundant one, keeping those at or above
    /// `min_relative` percent.
    pub fn relative(&self, min_relative: f64) -> Vec<RelativePeak> {
        let Some(top) = self.most_abundant() else {
            return Vec::new();
        };
        self.peaks
            .iter()
            .map(|p| RelativePeak {
                mz: p.mz,
                relative: p.probability / top.probability * 100.0,
            })
            .filter(|p| p.relative >= min_relative)
            .collect()
    }

    fn from_masses(mut peaks: Vec<Peak>, charge: i32) -> IsotopePattern {
        let retained_probability: f64 = peaks.iter().map(|p| p.probability).sum();
        let divisor = f64::from(charge.unsigned_abs().max(1));
        for p in &mut peaks {
            p.mz = (p.mz - f64::from(charge) * ELECTRON_MASS) / divisor;
            if retained_probability > 0.0 {
                p.probability /= retained_probability;
            }
        }
        IsotopePattern {
            peaks,
            retained_probability,
        }
    }
}

/// Aggregated (nominal-mass) pattern with the default pruning threshold.
pub fn aggregated_pattern(formula: &Formula) -> IsotopePattern {
    aggregated_pattern_pruned(formula, DEFAULT_PRUNE_BELOW)
}

/// Aggregated (nominal-mass) pattern, cutting tails below `prune_below` × the largest
/// peak after every product.
pub fn aggregated_pattern_pruned(formula: &Formula, prune_below: f64) -> IsotopePattern {
    let mut total = Distribution::unit();
    for (atom, n) in formula.atoms() {
        let single = Distribution::of_atom(atom);
        let power = single.power(n, prune_below);
        total = total.times(&power, prune_below);
    }
    let peaks = total
        .p
        .iter()
        .zip(&total.pm)
        .filter(|(p, _)| **p > 0.0)
        .map(|(p, pm)| Peak {
            mz: pm / p,
            probability: *p,
        })
        .collect();
    IsotopePattern::from_masses(peaks, formula.charge())
}

/// A distribution over consecutive mass numbers starting at `start`: probabilities and
/// probability-weighted masses.
#[derive(Clone, Debug)]
struct Distribution {
    start: u64,
    p: Vec<f64>,
    pm: Vec<f64>,
}

impl Distribution {
    fn unit() -> Distribution {
        Distribution {
            start: 0,
            p: vec![1.0],
            pm: vec![0.0],
        }
    }

    fn of_atom(atom: Atom) -> Distribution {
        let element = atom.element();
        let isotopes: Vec<(u16, f64, f64)> = match atom.mass_number() {
            Some(n) => element
                .isotope(n)
                .map(|i| vec![(i.mass_number, i.mass, 1.0)])
                .unwrap_or_default(),
            None => element
                .isotopes
                .iter()
                .map(|i| (i.mass_number, i.mass, i.abundance))
                .collect(),
        };
        let first = isotopes.first().map_or(0, |i| i.0);
        let last = isotopes.last().map_or(0, |i| i.0);
        let width = usize::from(last - first) + 1;
        let mut d = Distribution {
            start: u64::from(first),
            p: vec![0.0; width],
            pm: vec![0.0; width],
        };
        for (mass_number, mass, abundance) in isotopes {
            let k = usize::from(mass_number - first);
            d.p[k] = abundance;
            d.pm[k] = abundance * mass;
        }
        d
    }

    fn times(&self, other: &Distribution, prune_below: f64) -> Distribution {
        let len = self.p.len() + other.p.len() - 1;
        let mut p = vec![0.0; len];
        let mut pm = vec![0.0; len];
        for (i, (pa, pma)) in self.p.iter().zip(&self.pm).enumerate() {
            if *pa == 0.0 {
                continue;
            }
            for (j, (pb, pmb)) in other.p.iter().zip(&other.pm).enumerate() {
                p[i + j] += pa * pb;
                pm[i + j] += pa * pmb + pma * pb;
            }
        }
        let mut d = Distribution {
            start: self.start + other.start,
            p,
            pm,
        };
        d.prune(prune_below);
        d
    }

    fn power(&self, mut n: u32, prune_below: f64) -> Distribution {
        let mut result = Distribution::unit();
        let mut base = self.clone();
        while n > 0 {
            if n & 1 == 1 {
                result = result.times(&base, prune_below);
            }
            n >>= 1;
            if n > 0 {
                base = base.times(&base, prune_below);
            }
        }
        result
    }

    /// Cuts both tails below `prune_below` × the largest probability.
    fn prune(&mut self, prune_below: f64) {
        let max = self.p.iter().copied().fold(0.0, f64::max);
        let cut = max * prune_below;
        let keep_from = self.p.iter().position(|p| *p >= cut).unwrap_or(0);
        let keep_to = self
            .p
            .iter()
            .rposition(|p| *p >= cut)
            .map_or(self.p.len(), |i| i + 1);
        self.p.truncate(keep_to);
        self.pm.truncate(keep_to);
        self.p.drain(..keep_from);
        self.pm.drain(..keep_from);
        self.start += keep_from as u64;
    }
}

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
    let peaks = isotopologues(formula, prune_below);
    let merged = merge_within_resolution(peaks, resolving_power);
    Some(IsotopePattern::from_masses(merged, formula.charge()))
}

/// Isotopologues (mass, probability) with probability ≥ `prune_below` × the most probable
/// one (at most [`MAX_FINE_PEAKS`], the most probable first), unsorted.
fn isotopologues(formula: &Formula, prune_below: f64) -> Vec<Peak> {
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
    // remaining_best[k] = product of the modes of elements k.. .
    let mut remaining_best: Vec<f64> = vec![1.0; modes.len() + 1];
    for k in (0..modes.len()).rev() {
        remaining_best[k] = remaining_best[k + 1] * modes[k];
    }
    let mut partial = vec![Peak {
        mz: fixed_mass,
        probability: 1.0,
    }];
    for (k, element) in elements.iter().enumerate() {
        // A configuration of this element is useful only if, with the best of every other
        // element, it reaches the cut-off.
        let others = best_total / modes[k];
        let configs = element.enumerate(cut_total / others, MAX_ELEMENT_CONFIGURATIONS);
        // A partial product is kept only if, completed by the most probable configuration
        // of every element still to come, it could reach the cut-off. The configurations
        // come most probable first, so the inner loop stops at the first product below
        // it; when the list outgrows twice the cap it is cut to the cap and the cut-off
        // rises to the least probable survivor, which bounds the work.
        let bound_after = remaining_best[k + 1];
        let mut cut_now = cut_total;
        let best_config = configs.first().map_or(0.0, |c| c.probability);
        let mut next = Vec::new();
        for a in &partial {
            if a.probability * best_config * bound_after < cut_now {
                continue;
            }
            for b in &configs {
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
        partial = next;
    }
    partial
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
    let peaks = sorted_by_mass(peaks);
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
}

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
        let isotopes = atom
            .element()
            .isotopes
            .iter()
            .map(|i| (i.mass, i.abundance))
            .collect();
        Multinomial { n, isotopes }
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
        f64::from(counts[from]).ln() - f64::from(counts[to] + 1).ln() + self.isotopes[to].1.ln()
            - self.isotopes[from].1.ln()
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
        let mut seen: std::collections::HashSet<Vec<u32>> = std::collections::HashSet::new();
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

    use super::*;

    fn f(s: &str) -> Formula {
        Formula::parse(s).expect("valid formula")
    }

    #[test]
    fn ln_factorial_is_continuous_at_the_switch() {
        let exact: f64 = (2..=256u32).map(|k| f64::from(k).ln()).sum();
        assert!((ln_factorial(256) - exact).abs() < 1e-9);
        assert_eq!(ln_factorial(0), 0.0);
        assert_eq!(ln_factorial(1), 0.0);
    }

    #[test]
    fn chlorine_gives_an_m_plus_2_of_about_a_third() {
        // common practice: one Cl gives M+2 ≈ 32 % of M (35Cl:37Cl ≈ 3:1).
        let p = aggregated_pattern(&f("CH3Cl")).relative(0.0);
        assert_eq!(p[0].mz.round(), 50.0);
        let m2 = p.iter().find(|q| q.mz.round() == 52.0).expect("M+2");
        assert!((m2.relative - 32.0).abs() < 1.0, "{}", m2.relative);
    }

    #[test]
    fn fine_structure_separates_13c_from_15n_only_at_high_resolution() {
        // 13C − 12C = 1.003355 u, 15N − 14N = 0.997035 u: 6.3 mu apart at m ≈ 29.
        let hcn = f("C2H5N"); // nominal 43
        let high = fine_structure_pattern(&hcn, 1e6).expect("valid R");
        let low = fine_structure_pattern(&hcn, 1000.0).expect("valid R");
        let near_44 =
            |p: &IsotopePattern| p.peaks().iter().filter(|q| q.mz.round() == 44.0).count();
        assert!(near_44(&high) >= 2);
        assert_eq!(near_44(&low), 1);
        // Merging keeps the probability: the merged M+1 equals the aggregated M+1.
        let agg = aggregated_pattern(&hcn);
        let agg_m1 = agg
            .peaks()
            .iter()
            .find(|q| q.mz.round() == 44.0)
            .expect("M+1");
        let fine_m1 = low
            .peaks()
            .iter()
            .find(|q| q.mz.round() == 44.0)
            .expect("M+1");
        assert!((agg_m1.probability - fine_m1.probability).abs() < 1e-9);
        assert!((agg_m1.mz - fine_m1.mz).abs() < 1e-6);
    }

    #[test]
    fn probabilities_sum_to_one() {
        for s in ["C8H10N4O2", "C100H150N20O30S5Cl2", "SnCl4", "HgBr2", "H2O"] {
            let formula = f(s);
            let agg = aggregated_pattern(&formula);
            assert!((agg.retained_probability() - 1.0).abs() < 1e-9, "{s}");
            let fine = fine_structure_pattern(&formula, 100_000.0).expect("valid R");
            assert!((fine.total_probability() - 1.0).abs() < 1e-12, "{s}");
            assert!((fine.retained_probability() - 1.0).abs() < 1e-6, "{s}");
        }
    }

    #[test]
    fn labelled_atoms_shift_without_spreading() {
        let plain = aggregated_pattern(&f("CH4"));
        let labelled = aggregated_pattern(&f("[13C]H4"));
        // M+1 of CH4 is mostly 13C (about 1.1 %); with the carbon fixed as 13C only the
        // four H can add a neutron (4 × 0.0115 % ≈ 0.046 %).
        let m1 = |p: &IsotopePattern| p.relative(0.0)[1].relative;
        assert!((m1(&plain) - 1.13).abs() < 0.05, "{}", m1(&plain));
        assert!((m1(&labelled) - 0.046).abs() < 0.002, "{}", m1(&labelled));
        let top = labelled.most_abundant().expect("peak");
        assert!((top.mz - (13.003_354_835_07 + 4.0 * 1.007_825_032_23)).abs() < 1e-9);
    }

    #[test]
    fn ions_report_mz() {
        let ion = f("C8H11N4O2+");
        let top = aggregated_pattern(&ion).peaks()[0];
        assert!((top.mz - ion.mz().expect("charged")).abs() < 1e-4);
        let doubly = f("C8H12N4O2^2+");
        let peaks = aggregated_pattern(&doubly);
        let gap = peaks.peaks()[1].mz - peaks.peaks()[0].mz;
        assert!((gap - 0.5).abs() < 0.01);
    }

    #[test]
    fn bad_resolving_power_is_refused() {
        assert!(fine_structure_pattern(&f("CH4"), 0.0).is_none());
        assert!(fine_structure_pattern(&f("CH4"), f64::NAN).is_none());
        assert!(fine_structure_pattern(&f("CH4"), -5.0).is_none());
    }
}
