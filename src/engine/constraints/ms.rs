//! Mass-spectrum constraints (docs/engine.md, evidence semantics 5): the stated molecular ion
//! must agree with the formula for the stated ion type (electron mass included; within
//! the ppm tolerance for an accurate m/z, exactly for a nominal one, where the nitrogen
//! rule is the usual reading of a parity mismatch); the M+1 and M+2 percentages must
//! agree with the formula's isotope pattern (M+2 is what fixes or bounds Cl, Br and S).
//! Characteristic ions and neutral losses of the catalogue are soft evidence for groups.

use crate::case::{IonType, MsEvidence};
use crate::chem::{aggregated_pattern, Formula};
use crate::rules::{Group, MsClueKind};

/// How far a fragment m/z may sit from a clue's nominal m/z (unit-resolution EI data).
pub const FRAGMENT_TOLERANCE: f64 = 0.5;

/// The ion formula added to (or removed from) M, as (formula text, sign, charge).
fn adduct(ion: IonType) -> (Option<&'static str>, i32, i32) {
    match ion {
        IonType::RadicalCation => (None, 0, 1),
        IonType::Protonated => (Some("H"), 1, 1),
        IonType::Sodiated => (Some("Na"), 1, 1),
        IonType::Potassiated => (Some("K"), 1, 1),
        IonType::Ammoniated => (Some("NH4"), 1, 1),
        IonType::Deprotonated => (Some("H"), -1, -1),
    }
}

/// The monoisotopic m/z and nominal m/z of `formula` as ion type `ion`.
pub fn ion_mz(formula: &Formula, ion: IonType) -> Option<(f64, i64)> {
    let (extra, sign, charge) = adduct(ion);
    let species = match extra {
        None => formula.clone(),
        Some(text) => {
            let a = Formula::parse(text).ok()?;
            if sign > 0 {
                formula.plus(&a).ok()?
            } else {
                formula.minus(&a).ok()?
            }
        }
    };
    let species = species.with_charge(charge);
    Some((species.mz()?, species.nominal_mass() as i64))
}

/// The verdict on one MS item.
#[derive(Clone, Debug, PartialEq)]
pub struct MsCheck {
    /// Whether the item agrees with the formula.
    pub agrees: bool,
    /// Words: what was compared.
    pub detail: String,
}

/// Compares the stated molecular ion with the formula.
pub fn check_molecular_ion(formula: &Formula, ms: &MsEvidence, observed: f64) -> MsCheck {
    let Some((mz, nominal)) = ion_mz(formula, ms.ion) else {
        return MsCheck {
            agrees: false,
            detail: format!("the formula cannot form the ion {}", ms.ion.canonical()),
        };
    };
    let ion = ms.ion.canonical();
    if observed.fract() != 0.0 {
        let ppm = (observed - mz) / mz * 1e6;
        MsCheck {
            agrees: ppm.abs() <= ms.ppm,
            detail: format!(
                "{ion} at m/z {observed} vs {mz:.4} calculated: {ppm:+.1} ppm (tolerance {} ppm)",
                ms.ppm
            ),
        }
    } else {
        let agrees = observed as i64 == nominal;
        let mut detail = format!("{ion} at nominal m/z {observed} vs {nominal} calculated");
        if !agrees && ms.ion == IonType::RadicalCation && (observed as i64 - nominal) % 2 != 0 {
            let n = formula.nitrogen_rule();
            detail.push_str(&format!(
                "; nitrogen rule: an {} nominal mass needs an {} count of N (and P), the formula has {}",
                if observed as i64 % 2 == 1 { "odd" } else { "even" },
                if observed as i64 % 2 == 1 { "odd" } else { "even" },
                n.n_parity_atoms
            ));
        }
        MsCheck { agrees, detail }
    }
}

/// The formula's M+1 and M+2 in percent of M (the monoisotopic peak).
pub fn isotope_percentages(formula: &Formula) -> (f64, f64) {
    let pattern = aggregated_pattern(formula);
    let m = formula.monoisotopic_mass();
    let near = |offset: f64| {
        pattern
            .peaks()
            .iter()
            .find(|p| (p.mz - m - offset).abs() < 0.5)
            .map_or(0.0, |p| p.probability)
    };
    let base = near(0.0);
    if base <= 0.0 {
        return (0.0, 0.0);
    }
    (near(1.0) / base * 100.0, near(2.0) / base * 100.0)
}

/// Compares a stated isotope percentage with the calculated one. Tolerance: the larger of
/// 3 percentage points and a quarter of the calculated value (unit-resolution peak heights
/// of a real spectrum scatter that much; common practice, from memory).
pub fn check_isotope(label: &str, observed: f64, calculated: f64) -> MsCheck {
    let tolerance = (0.25 * calculated).max(3.0);
    let agrees = (observed - calculated).abs() <= tolerance;
    let mut detail =
        format!("{label} {observed}% of M vs {calculated:.1}% calculated (±{tolerance:.1})");
    if !agrees && label == "M+2" {
        detail.push_str(&format!("; {}", m_plus_2_reading(observed)));
    }
    MsCheck { agrees, detail }
}

/// What an M+2 percentage usually means, in words (common practice, from memory: one Cl
/// gives ≈ 32 %, one Br ≈ 97 %, one S ≈ 4.4 %, C/H/N/O alone well under 3 %).
pub fn m_plus_2_reading(observed: f64) -> String {
    if observed >= 80.0 {
        "an M+2 this high points to bromine (one Br ≈ 97 %)".into()
    } else if observed >= 20.0 {
        "an M+2 this high points to chlorine (one Cl ≈ 32 %) or several S".into()
    } else if observed >= 3.5 {
        "an M+2 of a few percent points to sulfur (one S ≈ 4.4 %) or silicon".into()
    } else {
        "an M+2 this low rules out Cl and Br".into()
    }
}

/// MS clues of `group` that the stated fragments match, in words.
pub fn matched_clues(
    group: &Group,
    ms: &MsEvidence,
    molecular_nominal: Option<f64>,
) -> Vec<String> {
    let mut out = Vec::new();
    for clue in &group.ms {
        let hit = match clue.kind {
            MsClueKind::Ion { mz } => ms
                .fragments
                .iter()
                .find(|((f, _), _)| (f - mz).abs() <= FRAGMENT_TOLERANCE)
                .map(|((f, _), _)| format!("m/z {f}")),
            MsClueKind::Loss { mass } => molecular_nominal.and_then(|m| {
                ms.fragments
                    .iter()
                    .find(|((f, _), _)| (m - mass - f).abs() <= FRAGMENT_TOLERANCE)
                    .map(|((f, _), _)| format!("m/z {f} = M − {mass}"))
            }),
        };
        if let Some(h) = hit {
            out.push(format!(
                "{} ({h}; {}:{})",
                clue.label, clue.defined_at.file, clue.defined_at.line
            ));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn f(text: &str) -> Formula {
        Formula::parse(text).unwrap_or_else(|e| panic!("{text}: {e}"))
    }

    #[test]
    fn ion_mz_includes_the_electron_mass() {
        // acetone C3H6O: monoisotopic 58.041865 u (common practice, from memory);
        // M+. is lighter by one electron mass (0.000549 u, CODATA).
        let (mz, nominal) = ion_mz(&f("C3H6O"), IonType::RadicalCation).unwrap_or((0.0, 0));
        assert!((mz - (58.041865 - 0.000549)).abs() < 2e-6, "{mz}");
        assert_eq!(nominal, 58);
        let (mz, _) = ion_mz(&f("C3H6O"), IonType::Protonated).unwrap_or((0.0, 0));
        assert!((mz - 59.049141).abs() < 1e-5, "{mz}");
    }

    #[test]
    fn a_chlorine_m_plus_2_is_about_a_third() {
        // common practice: one Cl gives M+2 ≈ 32 % of M.
        let (_, m2) = isotope_percentages(&f("C2H5Cl"));
        assert!((m2 - 32.0).abs() < 1.5, "{m2}");
        assert!(check_isotope("M+2", 31.0, m2).agrees);
        assert!(!check_isotope("M+2", 1.0, m2).agrees);
    }
}
