//! Every element-count combination within the ranges whose monoisotopic mass falls in a
//! window (accurate mass) or equals a nominal mass (low-resolution GC-MS).
//!
//! # The fast search (output-sensitive)
//! Elements are visited heaviest first; the lightest element (hydrogen, when ranged) is
//! not looped over but solved last. At each level the partial mass `used` and the
//! smallest and largest mass the elements still to come can add (`suffix_min`,
//! `suffix_max`, from their count ranges, the solved element included) bound the count of
//! the current element to
//!
//! ```text
//! ceil((lo − used − suffix_max) / m)  ≤  n  ≤  floor((hi − used − suffix_min) / m)
//! ```
//!
//! intersected with its range, so no branch is entered that cannot reach the window.
//! The last three elements (nitrogen, carbon and hydrogen with the default ranges) are
//! solved together by an extended residue table ([`solve_tail`]): every (N, H) count pair
//! with its mass modulo m_C, sorted; a binary search finds the pairs whose residue
//! matches what is left of the window, and each fixes the carbon count. (12 C and 12 H
//! differ by 0.094 u, so a narrow window rarely holds more than one completion.) When
//! the window is too wide for that (half-width ≥ m_C / 2, e.g. a huge mDa tolerance),
//! carbon is looped over and hydrogen solved in O(1) from the bounds. The cost is
//! proportional to the combinations of the other elements that can still reach the
//! window — about 10⁵ at m/z 500 over the default ranges — instead of the product of all
//! range sizes (≈ 2.6 × 10¹¹) that nested loops visit.
//!
//! Pruning uses a slack of [`PRUNE_SLACK`] u so that rounding can never cut a true hit;
//! the final decision for every combination is [`mass_of`] (one fixed summation order)
//! against the window, shared with the nested-loop reference, so both return the same set.
//!
//! Nominal mode runs the same recursion on integer nominal masses, exactly.
//!
//! # The reference
//! [`reference_search_mass`] and [`reference_search_nominal`] are the straightforward
//! nested loops over every element's range (an odometer), kept for the tests and the
//! benchmark that compare against them.

use super::ranges::ElementRanges;

/// Slack in u added to the pruning bounds (never to the final decision).
pub const PRUNE_SLACK: f64 = 1e-6;

/// Monoisotopic mass of `counts` (aligned with `ranges.ranges()`), summed in range order.
pub fn mass_of(ranges: &ElementRanges, counts: &[u32]) -> f64 {
    ranges
        .ranges()
        .iter()
        .zip(counts)
        .map(|(r, n)| r.element.monoisotopic_mass() * f64::from(*n))
        .sum()
}

/// Nominal mass of `counts` (aligned with `ranges.ranges()`).
pub fn nominal_mass_of(ranges: &ElementRanges, counts: &[u32]) -> u64 {
    ranges
        .ranges()
        .iter()
        .zip(counts)
        .map(|(r, n)| u64::from(r.element.nominal_mass()) * u64::from(*n))
        .sum()
}

/// Calls `visit` with the counts (aligned with `ranges.ranges()`) of every combination
/// whose [`mass_of`] lies in `lo..=hi`. Output-sensitive; see the module documentation.
pub fn search_mass(ranges: &ElementRanges, lo: f64, hi: f64, mut visit: impl FnMut(&[u32])) {
    let _ = search_mass_while(ranges, lo, hi, |c| {
        visit(c);
        Walk::Continue
    });
}

/// Calls `visit` with every combination whose nominal mass equals `nominal`.
pub fn search_nominal(ranges: &ElementRanges, nominal: u64, mut visit: impl FnMut(&[u32])) {
    let _ = search_nominal_while(ranges, nominal, |c| {
        visit(c);
        Walk::Continue
    });
}

/// Whether a search goes on after a hit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Walk {
    /// Keep searching.
    Continue,
    /// Stop the search now.
    Stop,
}

/// Like [`search_mass`], stopping as soon as `visit` says [`Walk::Stop`]; returns
/// [`Walk::Stop`] when it was stopped.
pub fn search_mass_while(
    ranges: &ElementRanges,
    lo: f64,
    hi: f64,
    mut visit: impl FnMut(&[u32]) -> Walk,
) -> Walk {
    let plan = Plan::new(ranges, |r| r.element.monoisotopic_mass());
    if plan.order.is_empty() || lo.is_nan() || hi.is_nan() || lo > hi {
        return Walk::Continue;
    }
    let mut counts = vec![0u32; ranges.ranges().len()];
    descend_mass(&plan, ranges, 0, 0.0, lo, hi, &mut counts, &mut visit)
}

/// Like [`search_nominal`], stopping as soon as `visit` says [`Walk::Stop`].
pub fn search_nominal_while(
    ranges: &ElementRanges,
    nominal: u64,
    mut visit: impl FnMut(&[u32]) -> Walk,
) -> Walk {
    let plan = Plan::new(ranges, |r| f64::from(r.element.nominal_mass()));
    if plan.order.is_empty() {
        return Walk::Continue;
    }
    let mut counts = vec![0u32; ranges.ranges().len()];
    descend_nominal(&plan, 0, 0, nominal as i64, &mut counts, &mut visit)
}

/// The elements in visiting order with the bounds the recursion needs.
struct Plan {
    /// Range indices, heaviest first; the last one is the solved element.
    order: Vec<usize>,
    /// Mass (or nominal mass) per visiting position.
    mass: Vec<f64>,
    min: Vec<u32>,
    max: Vec<u32>,
    /// Smallest / largest mass positions `k..` can add.
    suffix_min: Vec<f64>,
    suffix_max: Vec<f64>,
    /// How the last positions are solved together; see [`solve_tail`].
    tail: Option<Tail>,
}

/// The last two or three positions, solved at once by a residue table: the anchor is the
/// second-to-last position (carbon by default); the others are the last position
/// (hydrogen) and, when the table stays small, the third-to-last (nitrogen).
struct Tail {
    /// First position handled by the tail (the recursion hands over there).
    enter_at: usize,
    /// Position of the anchor.
    anchor: usize,
    /// Positions of the other tail elements (one or two).
    others: Vec<usize>,
    /// Every count combination of `others` with its mass's residue modulo the anchor's
    /// mass, sorted by residue.
    table: Vec<(f64, [u32; 2])>,
}

/// Largest residue table built for a three-element tail.
const MAX_TAIL_TABLE: usize = 200_000;

impl Plan {
    fn new(ranges: &ElementRanges, mass: impl Fn(&super::ranges::ElementRange) -> f64) -> Plan {
        let rs = ranges.ranges();
        let mut order: Vec<usize> = (0..rs.len()).collect();
        // Heaviest first; ties by range order so the plan is deterministic.
        order.sort_by(|a, b| mass(&rs[*b]).total_cmp(&mass(&rs[*a])).then(a.cmp(b)));
        let masses: Vec<f64> = order.iter().map(|i| mass(&rs[*i])).collect();
        let min: Vec<u32> = order.iter().map(|i| rs[*i].min).collect();
        let max: Vec<u32> = order.iter().map(|i| rs[*i].max).collect();
        let n = order.len();
        let mut suffix_min = vec![0.0; n + 1];
        let mut suffix_max = vec![0.0; n + 1];
        for k in (0..n).rev() {
            suffix_min[k] = suffix_min[k + 1] + masses[k] * f64::from(min[k]);
            suffix_max[k] = suffix_max[k + 1] + masses[k] * f64::from(max[k]);
        }
        let mut tail = None;
        if n >= 2 {
            let anchor = n - 2;
            let size = |k: usize| (max[k] - min[k] + 1) as usize;
            let others: Vec<usize> = if n >= 3 && size(n - 3) * size(n - 1) <= MAX_TAIL_TABLE {
                vec![n - 3, n - 1]
            } else {
                vec![n - 1]
            };
            let mut table = Vec::new();
            let m_anchor = masses[anchor];
            let first = others[0];
            let second = others.get(1).copied();
            for x in min[first]..=max[first] {
                let ys: Vec<u32> = match second {
                    Some(k) => (min[k]..=max[k]).collect(),
                    None => vec![0],
                };
                for y in ys {
                    let mass = masses[first] * f64::from(x)
                        + second.map_or(0.0, |k| masses[k] * f64::from(y));
                    table.push((mass.rem_euclid(m_anchor), [x, y]));
                }
            }
            table.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
            tail = Some(Tail {
                enter_at: if others.len() == 2 { n - 3 } else { n - 2 },
                anchor,
                others,
                table,
            });
        }
        Plan {
            order,
            mass: masses,
            min,
            max,
            suffix_min,
            suffix_max,
            tail,
        }
    }
}

/// Count range of position `k` that can still reach `lo..=hi` from `used`.
fn count_bounds(plan: &Plan, k: usize, used: f64, lo: f64, hi: f64) -> Option<(u32, u32)> {
    let m = plan.mass[k];
    let low = ((lo - used - plan.suffix_max[k + 1] - PRUNE_SLACK) / m).ceil();
    let high = ((hi - used - plan.suffix_min[k + 1] + PRUNE_SLACK) / m).floor();
    let low = low.max(f64::from(plan.min[k]));
    let high = high.min(f64::from(plan.max[k]));
    if low > high {
        return None;
    }
    // Both are integers within 0..=MAX_RANGE_COUNT here.
    Some((low as u32, high as u32))
}

#[allow(clippy::too_many_arguments)]
fn descend_mass(
    plan: &Plan,
    ranges: &ElementRanges,
    k: usize,
    used: f64,
    lo: f64,
    hi: f64,
    counts: &mut [u32],
    visit: &mut impl FnMut(&[u32]) -> Walk,
) -> Walk {
    let n_positions = plan.order.len();
    if let Some(tail) = plan.tail.as_ref().filter(|t| t.enter_at == k) {
        let half_width = (hi - lo) / 2.0 + PRUNE_SLACK;
        if half_width < plan.mass[tail.anchor] / 2.0 {
            return solve_tail(plan, tail, ranges, used, lo, hi, counts, visit);
        }
    }
    let Some((first, last)) = count_bounds(plan, k, used, lo, hi) else {
        return Walk::Continue;
    };
    let slot = plan.order[k];
    if k + 1 == n_positions {
        // The solved element: only the counts the bounds allow, usually zero or one.
        for n in first..=last {
            counts[slot] = n;
            let mass = mass_of(ranges, counts);
            if lo <= mass && mass <= hi && visit(counts) == Walk::Stop {
                return Walk::Stop;
            }
        }
        counts[slot] = 0;
        return Walk::Continue;
    }
    for n in first..=last {
        counts[slot] = n;
        if descend_mass(
            plan,
            ranges,
            k + 1,
            used + plan.mass[k] * f64::from(n),
            lo,
            hi,
            counts,
            visit,
        ) == Walk::Stop
        {
            return Walk::Stop;
        }
    }
    counts[slot] = 0;
    Walk::Continue
}

/// The tail positions at once, in O(log |table| + hits): a count combination of the
/// non-anchor tail elements can complete the window only if its mass modulo the anchor's
/// mass lies within the window's half-width of (window centre − used) modulo that mass.
/// The table of those residues is sorted, so the combinations that qualify are found by
/// binary search, and each fixes the anchor's count (unique because the half-width is
/// below half the anchor's mass). Every hit is then confirmed by [`mass_of`]. This is an
/// extended residue table over the light elements (N and H around C by default).
#[allow(clippy::too_many_arguments)]
fn solve_tail(
    plan: &Plan,
    tail: &Tail,
    ranges: &ElementRanges,
    used: f64,
    lo: f64,
    hi: f64,
    counts: &mut [u32],
    visit: &mut impl FnMut(&[u32]) -> Walk,
) -> Walk {
    let m_anchor = plan.mass[tail.anchor];
    let centre = (lo + hi) / 2.0 - used;
    let half_width = (hi - lo) / 2.0 + PRUNE_SLACK;
    if centre + half_width < 0.0 {
        return Walk::Continue;
    }
    let q = centre.rem_euclid(m_anchor);
    let slot_anchor = plan.order[tail.anchor];
    let (min_a, max_a) = (
        f64::from(plan.min[tail.anchor]),
        f64::from(plan.max[tail.anchor]),
    );
    let table = &tail.table;
    let mut visit_range = |from: f64, to: f64| {
        let start = table.partition_point(|(r, _)| *r < from);
        for (_, xs) in table[start..].iter().take_while(|(r, _)| *r <= to) {
            let mut other_mass = 0.0;
            for (position, x) in tail.others.iter().zip(xs) {
                other_mass += plan.mass[*position] * f64::from(*x);
            }
            let a = ((centre - other_mass) / m_anchor).round();
            if a < min_a || a > max_a {
                continue;
            }
            counts[slot_anchor] = a as u32;
            for (position, x) in tail.others.iter().zip(xs) {
                counts[plan.order[*position]] = *x;
            }
            let mass = mass_of(ranges, counts);
            if lo <= mass && mass <= hi && visit(counts) == Walk::Stop {
                return Walk::Stop;
            }
        }
        Walk::Continue
    };
    let mut flow = visit_range(q - half_width, q + half_width);
    if flow == Walk::Continue && q - half_width < 0.0 {
        flow = visit_range(q - half_width + m_anchor, m_anchor);
    }
    if flow == Walk::Continue && q + half_width >= m_anchor {
        flow = visit_range(0.0, q + half_width - m_anchor);
    }
    counts[slot_anchor] = 0;
    for position in &tail.others {
        counts[plan.order[*position]] = 0;
    }
    flow
}

fn descend_nominal(
    plan: &Plan,
    k: usize,
    used: i64,
    target: i64,
    counts: &mut [u32],
    visit: &mut impl FnMut(&[u32]) -> Walk,
) -> Walk {
    let m = plan.mass[k] as i64;
    let rest_min = plan.suffix_min[k + 1] as i64;
    let rest_max = plan.suffix_max[k + 1] as i64;
    let left = target - used;
    // n·m + rest ∈ [rest_min, rest_max] must equal `left`.
    let first = ((left - rest_max).max(0) + m - 1) / m;
    let first = first.max(i64::from(plan.min[k]));
    let last = if left - rest_min < 0 {
        -1
    } else {
        ((left - rest_min) / m).min(i64::from(plan.max[k]))
    };
    let slot = plan.order[k];
    for n in first..=last {
        counts[slot] = n as u32;
        let used_now = used + n * m;
        let flow = if k + 1 == plan.order.len() {
            if used_now == target {
                visit(counts)
            } else {
                Walk::Continue
            }
        } else {
            descend_nominal(plan, k + 1, used_now, target, counts, visit)
        };
        if flow == Walk::Stop {
            return Walk::Stop;
        }
    }
    counts[slot] = 0;
    Walk::Continue
}

/// The nested-loop reference: visits every combination of every range (no pruning) and
/// keeps those whose [`mass_of`] lies in `lo..=hi`.
pub fn reference_search_mass(
    ranges: &ElementRanges,
    lo: f64,
    hi: f64,
    mut visit: impl FnMut(&[u32]),
) {
    odometer(ranges, |counts| {
        let mass = mass_of(ranges, counts);
        if lo <= mass && mass <= hi {
            visit(counts);
        }
    });
}

/// The nested-loop reference for nominal mode.
pub fn reference_search_nominal(
    ranges: &ElementRanges,
    nominal: u64,
    mut visit: impl FnMut(&[u32]),
) {
    odometer(ranges, |counts| {
        if nominal_mass_of(ranges, counts) == nominal {
            visit(counts);
        }
    });
}

/// Nested loops over every range, written as an odometer so that the number of elements
/// is not fixed at compile time.
fn odometer(ranges: &ElementRanges, mut each: impl FnMut(&[u32])) {
    let rs = ranges.ranges();
    if rs.is_empty() {
        return;
    }
    let mut counts: Vec<u32> = rs.iter().map(|r| r.min).collect();
    loop {
        each(&counts);
        let mut i = rs.len();
        loop {
            if i == 0 {
                return;
            }
            i -= 1;
            if counts[i] < rs[i].max {
                counts[i] += 1;
                break;
            }
            counts[i] = rs[i].min;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::Formula;

    fn collect(f: impl FnOnce(&mut dyn FnMut(&[u32]))) -> Vec<Vec<u32>> {
        let mut out = Vec::new();
        f(&mut |c: &[u32]| out.push(c.to_vec()));
        out.sort();
        out
    }

    #[test]
    fn caffeine_is_found_from_its_own_mass() {
        let ranges = ElementRanges::parse("C0-20H0-40N0-6O0-6").unwrap();
        let m = Formula::parse("C8H10N4O2").unwrap().monoisotopic_mass();
        let tol = m * 3e-6;
        let hits = collect(|v| search_mass(&ranges, m - tol, m + tol, v));
        assert!(hits.contains(&vec![8, 10, 4, 2]), "{hits:?}");
    }

    #[test]
    fn fast_search_equals_nested_loops_on_a_small_range() {
        let ranges = ElementRanges::parse("C0-12H0-25N0-4O0-5S0-2Cl0-3").unwrap();
        for target in [78.0470, 122.0368, 180.0634, 250.9812] {
            let (lo, hi) = (target - 0.01, target + 0.01);
            let fast = collect(|v| search_mass(&ranges, lo, hi, v));
            let slow = collect(|v| reference_search_mass(&ranges, lo, hi, v));
            assert_eq!(fast, slow, "target {target}");
        }
    }

    #[test]
    fn wide_windows_fall_back_to_loops_and_still_equal_nested_loops() {
        // Half-width ≥ m(C)/2 disables the residue table: carbon is looped over instead.
        let ranges = ElementRanges::parse("C0-8H0-18N0-2O0-3Cl0-1").unwrap();
        for (lo, hi) in [(90.0, 104.0), (0.0, 30.0), (150.0, 150.5)] {
            let fast = collect(|v| search_mass(&ranges, lo, hi, v));
            let slow = collect(|v| reference_search_mass(&ranges, lo, hi, v));
            assert!(!slow.is_empty());
            assert_eq!(fast, slow, "{lo}..{hi}");
        }
    }

    #[test]
    fn nominal_search_equals_nested_loops() {
        let ranges = ElementRanges::parse("C0-10H0-22N0-3O0-4Cl0-2").unwrap();
        for nominal in [28, 78, 120, 151] {
            let fast = collect(|v| search_nominal(&ranges, nominal, v));
            let slow = collect(|v| reference_search_nominal(&ranges, nominal, v));
            assert!(!slow.is_empty());
            assert_eq!(fast, slow, "nominal {nominal}");
        }
    }

    #[test]
    fn an_empty_window_finds_nothing() {
        let ranges = ElementRanges::parse("C0-10H0-22").unwrap();
        // With at most 22 H, the CxHy nearest above benzene (78.047) is C5H18 at 78.141;
        // nothing lies between 78.2 and 78.3.
        let hits = collect(|v| search_mass(&ranges, 78.2, 78.3, v));
        assert!(hits.is_empty());
    }
}
