//! Mass-spectrum constraints (docs/engine.md, evidence semantics 5): the stated molecular ion
//! must agree with the formula for the stated ion type (electron mass included; within
//! the ppm tolerance for an accurate m/z, exactly for a nominal one, where the nitrogen
//! rule is the usual reading of a parity mismatch); the M+1 and M+2 percentages must
//! agree with the formula's isotope pattern (M+2 is what fixes or bounds Cl, Br and S).
//! Characteristic ions and neutral losses of the catalogue are soft evidence for groups.

use crate::case::{IonType, MsEvidence};
use crate::chem::Formula;
use crate::ms::{match_fragments, ObservedFragment};
use crate::rules::{Group, MsClue, MsClueKind};

/// How far a fragment m/z may sit from a clue's nominal m/z (unit-resolution EI data):
/// the MS layer's own tolerance.
pub const FRAGMENT_TOLERANCE: f64 = crate::ms::DEFAULT_FRAGMENT_TOLERANCE;

/// The monoisotopic m/z and nominal m/z of `formula` as ion type `ion`: the m/z of the
/// ion's formula as [`IonType::ion_formula`] builds it (electron mass included).
pub fn ion_mz(formula: &Formula, ion: IonType) -> Option<(f64, i64)> {
    let species = ion.ion_formula(formula)?;
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

/// The formula's M+1 and M+2 in percent of M (the monoisotopic peak), as the MS layer
/// computes them ([`crate::ms::isotope_ratios`]).
pub fn isotope_percentages(formula: &Formula) -> (f64, f64) {
    let ratios = crate::ms::isotope_ratios(formula);
    (ratios.m1, ratios.m2)
}

/// The isotope peak a stated percentage belongs to.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum IsotopePeak {
    /// M+1, one mass unit above the monoisotopic peak.
    MPlus1,
    /// M+2, two mass units above.
    MPlus2,
}

impl IsotopePeak {
    /// The peak's usual name.
    pub fn label(self) -> &'static str {
        match self {
            IsotopePeak::MPlus1 => "M+1",
            IsotopePeak::MPlus2 => "M+2",
        }
    }
}

/// Compares a stated isotope percentage with the calculated one. Tolerance: the larger of
/// 3 percentage points and a quarter of the calculated value (unit-resolution peak heights
/// of a real spectrum scatter that much; common practice, from memory).
pub fn check_isotope(peak: IsotopePeak, observed: f64, calculated: f64) -> MsCheck {
    let tolerance = (0.25 * calculated).max(3.0);
    let agrees = (observed - calculated).abs() <= tolerance;
    let label = peak.label();
    let mut detail =
        format!("{label} {observed}% of M vs {calculated:.1}% calculated (±{tolerance:.1})");
    if !agrees && peak == IsotopePeak::MPlus2 {
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

/// MS clues of `group` that the stated fragments match, in words: the MS layer's
/// [`match_fragments`] (losses from the nominal molecular ion), the most intense matching
/// fragment per clue.
pub fn matched_clues(
    group: &Group,
    ms: &MsEvidence,
    molecular_nominal: Option<f64>,
) -> Vec<String> {
    let clues: Vec<(&str, &MsClue)> = group.ms.iter().map(|c| (group.id.as_str(), c)).collect();
    let observed: Vec<ObservedFragment> = ms
        .fragments
        .iter()
        .map(|((mz, relative_intensity), _)| ObservedFragment {
            mz: *mz,
            relative_intensity: *relative_intensity,
        })
        .collect();
    let matches = match_fragments(&clues, molecular_nominal, &observed, FRAGMENT_TOLERANCE);
    let mut out = Vec::new();
    for clue in &group.ms {
        let Some(hit) = matches.iter().find(|m| std::ptr::eq(m.clue, clue)) else {
            continue;
        };
        let f = hit.observed.mz;
        let what = match clue.kind {
            MsClueKind::Ion { .. } => format!("m/z {f}"),
            MsClueKind::Loss { mass } => format!("m/z {f} = M − {mass}"),
        };
        out.push(format!(
            "{} ({what}; {}:{})",
            clue.label, clue.defined_at.file, clue.defined_at.line
        ));
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
        assert!(check_isotope(IsotopePeak::MPlus2, 31.0, m2).agrees);
        assert!(!check_isotope(IsotopePeak::MPlus2, 1.0, m2).agrees);
    }
}
