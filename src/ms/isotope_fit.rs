//! Isotope fit: a formula's M+1 and M+2 intensities (percent of the monoisotopic peak M)
//! against measured ones, and the bounds on Cl, Br and S counts that the M+2 peak alone
//! allows when no formula is known yet.
//!
//! # Computed M+1 / M+2
//! For an element whose most abundant isotope is also its lightest (every element of the
//! default ranges), write rₖ = a(A₀+k)/a(A₀) for its isotope abundances a. The
//! aggregated pattern of n atoms is the polynomial (1 + r₁x + r₂x² + …)ⁿ, so relative to
//! the monoisotopic peak, exactly (to second order in x, which is all M+2 needs):
//!
//! ```text
//! M+1 / M = S₁ = Σ nₑ r₁ₑ
//! M+2 / M = Σ nₑ r₂ₑ + (S₁² − Σ nₑ r₁ₑ²) / 2
//! ```
//!
//! This agrees with chem's [`aggregated_pattern`] (tested) and costs a few
//! multiplications, so thousands of candidates can be scored. For elements with a lighter
//! minor isotope (Li, B …) chem's pattern is used instead.
//!
//! # Score
//! With measured values mₖ, their error σₖ (stated, or the default
//! [`MeasuredIsotopes::error_for`]: 10 % of the value, at least 0.5 percentage points —
//! quiddity's own default, generous for a quadrupole's ratio accuracy) and computed
//! values cₖ: `score = −½ Σ ((mₖ − cₖ)/σₖ)²` over the peaks given. 0 is a perfect fit;
//! each peak off by 2σ costs 2. It is a log-likelihood under a normal error model, so it
//! adds to the other score parts in [`super::rank`].
//!
//! # Cl / Br / S bounds from M+2 alone
//! [`halogen_bounds_from_m2`]: for every (Cl, Br, S) count combination within the
//! ranges (and the mass budget, when the neutral mass is known), the smallest M+2 the
//! compound can show is that of the Cl/Br/S atoms alone (every other atom only adds:
//! all terms above are non-negative), and the largest adds the most the other ranged
//! elements can contribute (each at the largest count the ranges and mass budget allow,
//! which over-estimates; M+1, when measured, caps their ¹³C-type contribution). A
//! combination is kept when `[min, max]` meets `[m₂ − σ, m₂ + σ]` (and the M+1 of Cl/Br/S
//! alone does not exceed m₁ + σ). Both bounds are conservative, so the true combination is
//! never excluded when the measured value is within its stated error (a proptest checks it).

use super::ranges::ElementRanges;
use crate::chem::elements::Element;
use crate::chem::{aggregated_pattern, Formula};

/// M+1 and M+2 intensities in percent of the monoisotopic peak.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct IsotopeRatios {
    /// M+1, percent of M.
    pub m1: f64,
    /// M+2, percent of M.
    pub m2: f64,
}

/// Measured M+1 / M+2 (percent of M) and their error.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct MeasuredIsotopes {
    /// Measured M+1, percent of M.
    pub m1: Option<f64>,
    /// Measured M+2, percent of M.
    pub m2: Option<f64>,
    /// Stated error in percentage points (one standard deviation); `None` for the default.
    pub error: Option<f64>,
}

/// Default error floor, percentage points.
pub const DEFAULT_MIN_ERROR: f64 = 0.5;
/// Default relative error.
pub const DEFAULT_RELATIVE_ERROR: f64 = 0.10;

impl MeasuredIsotopes {
    /// The error of a measured value `value`: the stated one, or 10 % of the value with a
    /// floor of 0.5 percentage points.
    pub fn error_for(&self, value: f64) -> f64 {
        self.error
            .unwrap_or_else(|| (DEFAULT_RELATIVE_ERROR * value).max(DEFAULT_MIN_ERROR))
    }

    /// True when neither peak is given.
    pub fn is_empty(&self) -> bool {
        self.m1.is_none() && self.m2.is_none()
    }
}

/// How well a formula's computed M+1 / M+2 fit the measured ones.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct IsotopeFit {
    /// Computed values.
    pub computed: IsotopeRatios,
    /// (measured − computed) / error for M+1, when measured.
    pub m1_deviation: Option<f64>,
    /// (measured − computed) / error for M+2, when measured.
    pub m2_deviation: Option<f64>,
    /// −½ Σ deviation²; 0 is perfect.
    pub score: f64,
}

/// r₁ and r₂ of an element, `None` when a minor isotope is lighter than the major one.
fn element_ratios(e: &Element) -> Option<(f64, f64)> {
    let major = e.most_abundant_isotope();
    if e.isotopes.iter().any(|i| i.mass_number < major.mass_number) {
        return None;
    }
    let at = |k: u16| {
        e.isotopes
            .iter()
            .filter(|i| i.mass_number == major.mass_number + k)
            .map(|i| i.abundance)
            .sum::<f64>()
            / major.abundance
    };
    Some((at(1), at(2)))
}

/// Accumulates Σ n r₁, Σ n r₂, Σ n r₁².
#[derive(Clone, Copy, Debug, Default)]
struct Sums {
    s1: f64,
    s2: f64,
    s11: f64,
}

impl Sums {
    fn add(&mut self, n: f64, (r1, r2): (f64, f64)) {
        self.s1 += n * r1;
        self.s2 += n * r2;
        self.s11 += n * r1 * r1;
    }
    fn ratios(&self) -> IsotopeRatios {
        IsotopeRatios {
            m1: 100.0 * self.s1,
            m2: 100.0 * (self.s2 + (self.s1 * self.s1 - self.s11) / 2.0),
        }
    }
}

/// M+1 / M+2 of the element counts `counts` (aligned with `ranges.ranges()`).
pub fn isotope_ratios_of_counts(ranges: &ElementRanges, counts: &[u32]) -> IsotopeRatios {
    let mut sums = Sums::default();
    for (r, n) in ranges.ranges().iter().zip(counts) {
        match element_ratios(r.element) {
            Some(ratios) => sums.add(f64::from(*n), ratios),
            None if *n > 0 => {
                let composition = ranges.composition(counts);
                return match Formula::from_composition(&composition) {
                    Some(f) => isotope_ratios(&f),
                    None => sums.ratios(),
                };
            }
            None => {}
        }
    }
    sums.ratios()
}

/// M+1 / M+2 of a formula (percent of its monoisotopic peak).
pub fn isotope_ratios(formula: &Formula) -> IsotopeRatios {
    let mut sums = Sums::default();
    for (atom, n) in formula.atoms() {
        // Labelled atoms and elements with a lighter minor isotope go through chem.
        match (atom.mass_number(), element_ratios(atom.element())) {
            (None, Some(ratios)) => sums.add(f64::from(n), ratios),
            _ => return ratios_from_pattern(formula),
        }
    }
    sums.ratios()
}

/// M+1 / M+2 read from chem's aggregated pattern (bins by nominal offset from the
/// monoisotopic mass).
pub fn ratios_from_pattern(formula: &Formula) -> IsotopeRatios {
    let neutral = formula.neutral();
    let pattern = aggregated_pattern(&neutral);
    let m0 = neutral.monoisotopic_mass();
    let bin = |k: f64| {
        pattern
            .peaks()
            .iter()
            .filter(|p| (p.mz - m0 - k).abs() < 0.5)
            .map(|p| p.probability)
            .sum::<f64>()
    };
    let p0 = bin(0.0);
    if p0 <= 0.0 {
        return IsotopeRatios {
            m1: f64::NAN,
            m2: f64::NAN,
        };
    }
    IsotopeRatios {
        m1: 100.0 * bin(1.0) / p0,
        m2: 100.0 * bin(2.0) / p0,
    }
}

/// Scores `computed` against `measured`; see the module documentation.
pub fn fit(measured: &MeasuredIsotopes, computed: IsotopeRatios) -> IsotopeFit {
    let deviation = |m: Option<f64>, c: f64| m.map(|m| (m - c) / measured.error_for(m));
    let m1_deviation = deviation(measured.m1, computed.m1);
    let m2_deviation = deviation(measured.m2, computed.m2);
    // `+ 0.0` turns −0 into 0 for printing.
    let score =
        -0.5 * (m1_deviation.map_or(0.0, |d| d * d) + m2_deviation.map_or(0.0, |d| d * d)) + 0.0;
    IsotopeFit {
        computed,
        m1_deviation,
        m2_deviation,
        score,
    }
}

/// One (Cl, Br, S) combination the M+2 peak allows, with the M+2 range it can produce.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct HalogenCombination {
    /// Chlorine atoms.
    pub cl: u32,
    /// Bromine atoms.
    pub br: u32,
    /// Sulfur atoms.
    pub s: u32,
    /// Smallest M+2 (percent of M) a compound with these atoms can show.
    pub m2_min: f64,
    /// Largest M+2 within the ranges and mass budget.
    pub m2_max: f64,
}

/// What the M+2 (and M+1) peak says about Cl, Br and S.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct HalogenBounds {
    /// Every allowed combination, in increasing (Cl, Br, S).
    pub combinations: Vec<HalogenCombination>,
    /// Smallest and largest Cl count over the allowed combinations.
    pub cl: Option<(u32, u32)>,
    /// Same for Br.
    pub br: Option<(u32, u32)>,
    /// Same for S.
    pub s: Option<(u32, u32)>,
}

impl HalogenBounds {
    /// True when (cl, br, s) is among the allowed combinations.
    pub fn allows(&self, cl: u32, br: u32, s: u32) -> bool {
        self.combinations
            .iter()
            .any(|c| (c.cl, c.br, c.s) == (cl, br, s))
    }
}

/// Allowed (Cl, Br, S) counts from a measured M+2 (and optionally M+1) without a formula.
///
/// `measured` gives the peaks and their error (`error_for`); `neutral_mass`, when known
/// (accurate or nominal), limits the atoms by mass; `ranges` limits every count. Sound:
/// see the module documentation.
pub fn halogen_bounds_from_m2(
    measured: &MeasuredIsotopes,
    neutral_mass: Option<f64>,
    ranges: &ElementRanges,
) -> HalogenBounds {
    let mut combinations = Vec::new();
    let Some(m2) = measured.m2 else {
        return summarise(combinations);
    };
    let m2_error = measured.error_for(m2);
    let one = |symbol: &str| -> (u32, u32, f64, (f64, f64)) {
        match ranges.get(symbol) {
            Some(r) => (
                r.min,
                r.max,
                r.element.monoisotopic_mass(),
                element_ratios(r.element).unwrap_or((0.0, 0.0)),
            ),
            None => (0, 0, 0.0, (0.0, 0.0)),
        }
    };
    let (cl_min, cl_max, cl_mass, cl_r) = one("Cl");
    let (br_min, br_max, br_mass, br_r) = one("Br");
    let (s_min, s_max, s_mass, s_r) = one("S");
    // Slack so that a mass given as nominal never excludes the true atoms.
    let budget = neutral_mass.map(|m| m + 1.0);
    for cl in cl_min..=cl_max {
        for br in br_min..=br_max {
            for s in s_min..=s_max {
                let x_mass =
                    f64::from(cl) * cl_mass + f64::from(br) * br_mass + f64::from(s) * s_mass;
                if budget.is_some_and(|b| x_mass > b) {
                    continue;
                }
                let mut x = Sums::default();
                x.add(f64::from(cl), cl_r);
                x.add(f64::from(br), br_r);
                x.add(f64::from(s), s_r);
                let x_ratios = x.ratios();
                if let Some(m1) = measured.m1 {
                    if x_ratios.m1 > m1 + measured.error_for(m1) {
                        continue;
                    }
                }
                // The rest: every other ranged element at its largest allowed count.
                let mut rest_s1 = 0.0;
                let mut rest_s2 = 0.0;
                for r in ranges.ranges() {
                    if matches!(r.element.symbol, "Cl" | "Br" | "S") {
                        continue;
                    }
                    let by_mass = budget.map_or(f64::from(r.max), |b| {
                        ((b - x_mass).max(0.0) / r.element.monoisotopic_mass()).floor()
                    });
                    let n = f64::from(r.max).min(by_mass);
                    // Elements with a lighter minor isotope: bound r₁, r₂ by the
                    // abundance of all minor isotopes over the major one.
                    let (r1, r2) = element_ratios(r.element).unwrap_or_else(|| {
                        let major = r.element.most_abundant_isotope().abundance;
                        let minor = 1.0 - major;
                        (minor / major, minor / major)
                    });
                    rest_s1 += n * r1;
                    rest_s2 += n * r2;
                }
                if let Some(m1) = measured.m1 {
                    let cap = (m1 + measured.error_for(m1)) / 100.0 - x.s1;
                    rest_s1 = rest_s1.min(cap.max(0.0));
                }
                let m2_min = x_ratios.m2;
                let m2_max =
                    x_ratios.m2 + 100.0 * (rest_s2 + x.s1 * rest_s1 + rest_s1 * rest_s1 / 2.0);
                if m2_min <= m2 + m2_error && m2_max >= m2 - m2_error {
                    combinations.push(HalogenCombination {
                        cl,
                        br,
                        s,
                        m2_min,
                        m2_max,
                    });
                }
            }
        }
    }
    summarise(combinations)
}

fn summarise(combinations: Vec<HalogenCombination>) -> HalogenBounds {
    let span = |f: fn(&HalogenCombination) -> u32| {
        let lo = combinations.iter().map(f).min()?;
        let hi = combinations.iter().map(f).max()?;
        Some((lo, hi))
    };
    HalogenBounds {
        cl: span(|c| c.cl),
        br: span(|c| c.br),
        s: span(|c| c.s),
        combinations,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn analytic_ratios_equal_chems_aggregated_pattern() {
        for text in [
            "C8H10N4O2",
            "CCl4",
            "CHBr3",
            "C6H5Cl",
            "C2H6OS",
            "C8HF15O2",
            "C12H4Cl4O2",
            "Si4C8H24O4",
            "C3H9O4P",
            "CH3I",
        ] {
            let f = Formula::parse(text).unwrap();
            let fast = isotope_ratios(&f);
            let slow = ratios_from_pattern(&f);
            assert_abs_diff_eq!(fast.m1, slow.m1, epsilon = 1e-6);
            assert_abs_diff_eq!(fast.m2, slow.m2, epsilon = 1e-6);
        }
    }

    #[test]
    fn halogen_patterns_of_common_practice() {
        // common practice: one Cl gives M+2 ≈ 32 % of M, one Br ≈ 97-98 %, one S ≈ 4.4 %.
        let cl = isotope_ratios(&Formula::parse("CH3Cl").unwrap());
        assert!((cl.m2 - 32.0).abs() < 1.0, "{cl:?}");
        let br = isotope_ratios(&Formula::parse("CH3Br").unwrap());
        assert!((br.m2 - 97.5).abs() < 1.0, "{br:?}");
        let s = isotope_ratios(&Formula::parse("CH4S").unwrap());
        assert!((s.m2 - 4.5).abs() < 0.3, "{s:?}");
    }

    #[test]
    fn m2_of_32_percent_means_one_chlorine() {
        // Chlorobenzene, C6H5Cl: M+1 6.5 %, M+2 32.2 % of M (IsoSpecPy values in
        // tests/reference/formula_table.tsv; common practice: one Cl).
        let measured = MeasuredIsotopes {
            m1: Some(6.6),
            m2: Some(32.2),
            error: Some(1.5),
        };
        let b = halogen_bounds_from_m2(&measured, Some(112.0), &ElementRanges::default());
        assert_eq!(b.cl, Some((1, 1)), "{b:?}");
        assert_eq!(b.br, Some((0, 0)));
        assert!(b.allows(1, 0, 0));
    }

    #[test]
    fn m2_near_97_percent_allows_one_bromine_or_three_chlorines() {
        // common practice: ≈ 97 % is one Br; Cl3 (≈ 96 %) is the classic look-alike.
        let measured = MeasuredIsotopes {
            m1: None,
            m2: Some(97.0),
            error: Some(3.0),
        };
        let b = halogen_bounds_from_m2(&measured, Some(160.0), &ElementRanges::default());
        assert!(b.allows(0, 1, 0));
        assert!(b.allows(3, 0, 0));
        assert!(!b.allows(0, 0, 0));
        assert!(!b.allows(1, 0, 0));
        assert!(!b.allows(0, 2, 0));
    }

    #[test]
    fn m2_of_4_percent_allows_one_sulfur_but_no_chlorine() {
        let measured = MeasuredIsotopes {
            m1: Some(3.1),
            m2: Some(4.7),
            error: Some(0.5),
        };
        // Dimethyl sulfoxide, C2H6OS: M+1 3.1 %, M+2 4.7 % (common practice values).
        let b = halogen_bounds_from_m2(&measured, Some(78.0), &ElementRanges::default());
        assert!(b.allows(0, 0, 1));
        assert_eq!(b.cl, Some((0, 0)));
        assert_eq!(b.br, Some((0, 0)));
    }

    #[test]
    fn score_is_zero_for_a_perfect_fit_and_worse_when_off() {
        let computed = IsotopeRatios { m1: 10.0, m2: 1.0 };
        let exact = MeasuredIsotopes {
            m1: Some(10.0),
            m2: Some(1.0),
            error: Some(1.0),
        };
        assert_eq!(fit(&exact, computed).score, 0.0);
        let off = MeasuredIsotopes {
            m2: Some(3.0),
            ..exact
        };
        assert_abs_diff_eq!(fit(&off, computed).score, -2.0, epsilon = 1e-12);
    }
}
