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
//! Fine structure lives in [`super::fine_structure`] and is re-exported here.
//!
//! Both report m/z (electron masses removed for ions, divided by |charge|), probabilities
//! that sum to 1 over the retained peaks, and the probability retained before that
//! normalisation (1 minus what pruning and the caps dropped).

use super::elements::ELECTRON_MASS;
use super::formula::{Atom, Formula};

pub use super::fine_structure::{
    fine_isotopologues, fine_structure_pattern, fine_structure_pattern_pruned,
    MAX_ELEMENT_CONFIGURATIONS, MAX_FINE_PEAKS,
};

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

    pub(super) fn from_masses(mut peaks: Vec<Peak>, charge: i32) -> IsotopePattern {
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

#[cfg(test)]
mod tests {
    use super::*;

    fn f(s: &str) -> Formula {
        Formula::parse(s).expect("valid formula")
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
