//! Ion types of a molecular ion and the conversion between the neutral molecule's
//! monoisotopic mass M and the ion's m/z, electron mass included.
//!
//! Every ion type here carries one charge, so m/z equals the ion's mass:
//!
//! | ion      | m/z                         | electrons of the ion (neutral M closed-shell) |
//! |----------|-----------------------------|-----------------------------------------------|
//! | M+.      | M − mₑ                      | odd (radical cation, EI)                      |
//! | [M+H]+   | M + m(¹H) − mₑ              | even                                          |
//! | [M+Na]+  | M + m(²³Na) − mₑ            | even                                          |
//! | [M+K]+   | M + m(³⁹K) − mₑ             | even                                          |
//! | [M+NH4]+ | M + m(¹⁴N) + 4 m(¹H) − mₑ   | even                                          |
//! | [M-H]-   | M − m(¹H) + mₑ              | even                                          |
//!
//! (common practice.) Atom masses are those of chem's element table (AME2020) and mₑ is
//! [`crate::chem::ELECTRON_MASS`] (CODATA 2018), so m/z agrees with
//! [`crate::chem::Formula::mz`] of the ion's formula to rounding.
//!
//! Spellings accepted (case files and the command line): the bracketed form with its
//! charge sign (`[M+H]+`), the same without brackets (`M+H`), and for the radical cation
//! `M+.`, `M+•`, `[M]+.`, `M+`. Spaces are ignored.

use crate::chem::elements::element;
use crate::chem::{Formula, ELECTRON_MASS};
use crate::diag::{closest_match, Diagnostic};
use std::fmt;

/// The ion type of a molecular ion peak.
///
/// Serialised as its canonical spelling, the word case files and reports use.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
pub enum IonType {
    /// M+. — the radical cation of electron ionisation.
    #[serde(rename = "M+.")]
    RadicalCation,
    /// [M+H]+ — protonated molecule.
    #[serde(rename = "[M+H]+")]
    Protonated,
    /// [M+Na]+ — sodium adduct.
    #[serde(rename = "[M+Na]+")]
    Sodiated,
    /// [M+K]+ — potassium adduct.
    #[serde(rename = "[M+K]+")]
    Potassiated,
    /// [M+NH4]+ — ammonium adduct.
    #[serde(rename = "[M+NH4]+")]
    Ammoniated,
    /// [M-H]- — deprotonated molecule.
    #[serde(rename = "[M-H]-")]
    Deprotonated,
}

/// An ion-type text that names no known ion type.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("unknown ion type \"{text}\"")]
pub struct IonTypeError {
    /// The text as given.
    pub text: String,
    /// The closest canonical spelling, when the text looks like a typo of one.
    pub suggestion: Option<&'static str>,
}

impl IonTypeError {
    /// The error as a diagnostic in `origin`, with the "did you mean" hint and the list
    /// of accepted spellings.
    pub fn to_diagnostic(&self, origin: &str) -> Diagnostic {
        let known = IonType::ALL
            .iter()
            .map(|i| i.canonical())
            .collect::<Vec<_>>()
            .join(", ");
        let help = match self.suggestion {
            Some(s) => format!("did you mean \"{s}\"? known ion types: {known}"),
            None => format!("known ion types: {known}"),
        };
        Diagnostic::error(origin, self.to_string())
            .at_offset(&self.text, 0)
            .with_help(help)
    }
}

impl IonType {
    /// Every ion type, in the order they are listed to users.
    pub const ALL: [IonType; 6] = [
        IonType::RadicalCation,
        IonType::Protonated,
        IonType::Sodiated,
        IonType::Potassiated,
        IonType::Ammoniated,
        IonType::Deprotonated,
    ];

    /// The spelling used in output and case files.
    pub fn canonical(self) -> &'static str {
        match self {
            IonType::RadicalCation => "M+.",
            IonType::Protonated => "[M+H]+",
            IonType::Sodiated => "[M+Na]+",
            IonType::Potassiated => "[M+K]+",
            IonType::Ammoniated => "[M+NH4]+",
            IonType::Deprotonated => "[M-H]-",
        }
    }

    /// Parses a case-file or command-line spelling; see the module documentation.
    pub fn parse(text: &str) -> Result<IonType, IonTypeError> {
        let squeezed: String = text.chars().filter(|c| !c.is_whitespace()).collect();
        let found = match squeezed.as_str() {
            "M+." | "M+•" | "M.+" | "M•+" | "[M]+." | "[M]+•" | "[M]•+" | "M+" | "[M]+" => {
                Some(IonType::RadicalCation)
            }
            "[M+H]+" | "M+H" | "[M+H]" | "(M+H)+" => Some(IonType::Protonated),
            "[M+Na]+" | "M+Na" | "[M+Na]" | "(M+Na)+" => Some(IonType::Sodiated),
            "[M+K]+" | "M+K" | "[M+K]" | "(M+K)+" => Some(IonType::Potassiated),
            "[M+NH4]+" | "M+NH4" | "[M+NH4]" | "(M+NH4)+" => Some(IonType::Ammoniated),
            "[M-H]-" | "M-H" | "[M-H]" | "(M-H)-" => Some(IonType::Deprotonated),
            _ => None,
        };
        found.ok_or_else(|| IonTypeError {
            text: text.to_owned(),
            suggestion: closest_match(&squeezed, IonType::ALL.iter().map(|i| i.canonical())),
        })
    }

    /// Charge of the ion in elementary charges (+1 or −1 for every type here).
    pub fn charge(self) -> i32 {
        match self {
            IonType::Deprotonated => -1,
            _ => 1,
        }
    }

    /// True when the ion of a closed-shell molecule has an odd number of electrons
    /// (only M+.); the others are even-electron ions.
    pub fn is_odd_electron(self) -> bool {
        self == IonType::RadicalCation
    }

    /// Atoms added to (positive) or removed from (negative) the neutral molecule, as
    /// `(symbol, count)`.
    pub fn adduct_atoms(self) -> &'static [(&'static str, i32)] {
        match self {
            IonType::RadicalCation => &[],
            IonType::Protonated => &[("H", 1)],
            IonType::Sodiated => &[("Na", 1)],
            IonType::Potassiated => &[("K", 1)],
            IonType::Ammoniated => &[("N", 1), ("H", 4)],
            IonType::Deprotonated => &[("H", -1)],
        }
    }

    /// Monoisotopic mass of the atoms added (negative when removed), electrons excluded.
    pub fn adduct_mass(self) -> f64 {
        self.adduct_atoms()
            .iter()
            .map(|(symbol, n)| {
                // The symbols above are all in chem's element table (tested below).
                let m = element(symbol).map_or(f64::NAN, |e| e.monoisotopic_mass());
                f64::from(*n) * m
            })
            .sum()
    }

    /// Nominal mass of the atoms added (negative when removed).
    pub fn adduct_nominal_mass(self) -> i64 {
        self.adduct_atoms()
            .iter()
            .map(|(symbol, n)| {
                let m = element(symbol).map_or(0, |e| i64::from(e.nominal_mass()));
                i64::from(*n) * m
            })
            .sum()
    }

    /// m/z of this ion of a neutral molecule of monoisotopic mass `neutral_mass`:
    /// (M + adduct − z·mₑ) / |z|.
    pub fn mz_of_neutral(self, neutral_mass: f64) -> f64 {
        let z = self.charge();
        (neutral_mass + self.adduct_mass() - f64::from(z) * ELECTRON_MASS)
            / f64::from(z.unsigned_abs())
    }

    /// Monoisotopic mass of the neutral molecule whose ion of this type has `mz`.
    pub fn neutral_mass_of_mz(self, mz: f64) -> f64 {
        let z = self.charge();
        mz * f64::from(z.unsigned_abs()) + f64::from(z) * ELECTRON_MASS - self.adduct_mass()
    }

    /// Nominal mass of the neutral molecule whose ion of this type has nominal m/z
    /// `nominal_mz` (`None` when that would not be positive).
    pub fn neutral_nominal_mass(self, nominal_mz: u32) -> Option<u32> {
        let m = i64::from(nominal_mz) - self.adduct_nominal_mass();
        u32::try_from(m).ok().filter(|m| *m > 0)
    }

    /// The ion's formula (charge and radical mark set) for the neutral molecule `neutral`;
    /// `None` when the molecule has no hydrogen to lose for [M-H]-.
    pub fn ion_formula(self, neutral: &Formula) -> Option<Formula> {
        let mut ion = neutral.neutral();
        for (symbol, n) in self.adduct_atoms() {
            let one = Formula::parse(symbol).ok()?;
            let delta = one.times(n.unsigned_abs()).ok()?;
            ion = if *n > 0 {
                ion.plus(&delta).ok()?
            } else {
                ion.minus(&delta).ok()?
            };
        }
        Some(
            ion.with_charge(self.charge())
                .with_radical(self.is_odd_electron()),
        )
    }
}

/// Monoisotopic mass of the neutral molecule behind an ion of type `ion` at `mz`
/// (the engine's entry point; same as [`IonType::neutral_mass_of_mz`]).
pub fn ion_neutral_mass(ion: IonType, mz: f64) -> f64 {
    ion.neutral_mass_of_mz(mz)
}

impl fmt::Display for IonType {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.canonical())
    }
}

impl std::str::FromStr for IonType {
    type Err = IonTypeError;
    fn from_str(s: &str) -> Result<IonType, IonTypeError> {
        IonType::parse(s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn every_canonical_spelling_parses_back() {
        for ion in IonType::ALL {
            assert_eq!(IonType::parse(ion.canonical()), Ok(ion));
        }
    }

    #[test]
    fn common_variant_spellings_parse() {
        assert_eq!(IonType::parse("M+•"), Ok(IonType::RadicalCation));
        assert_eq!(IonType::parse("[M]+."), Ok(IonType::RadicalCation));
        assert_eq!(IonType::parse(" [M + H]+ "), Ok(IonType::Protonated));
        assert_eq!(IonType::parse("M-H"), Ok(IonType::Deprotonated));
    }

    #[test]
    fn typo_gets_a_suggestion() {
        let e = IonType::parse("[M+Hh]+").unwrap_err();
        assert_eq!(e.suggestion, Some("[M+H]+"));
        let d = e.to_diagnostic("--ion");
        assert!(d
            .help
            .unwrap_or_default()
            .contains("did you mean \"[M+H]+\""));
        let far = IonType::parse("banana").unwrap_err();
        assert_eq!(far.suggestion, None);
    }

    #[test]
    fn mz_agrees_with_the_ion_formula_from_chem() {
        // Caffeine, C8H10N4O2, monoisotopic mass 194.080376 (published value, common
        // practice); every ion's m/z must equal chem's m/z of the ion's own formula.
        let caffeine = Formula::parse("C8H10N4O2").unwrap();
        for ion in IonType::ALL {
            let by_mass = ion.mz_of_neutral(caffeine.monoisotopic_mass());
            let by_formula = ion.ion_formula(&caffeine).unwrap().mz().unwrap();
            assert_abs_diff_eq!(by_mass, by_formula, epsilon = 1e-9);
            assert_abs_diff_eq!(
                ion.neutral_mass_of_mz(by_mass),
                caffeine.monoisotopic_mass(),
                epsilon = 1e-9
            );
        }
    }

    #[test]
    fn protonated_caffeine_is_at_the_published_mz() {
        // [M+H]+ of caffeine: 195.0877 (widely tabulated; common practice).
        let m = Formula::parse("C8H10N4O2").unwrap().monoisotopic_mass();
        assert_abs_diff_eq!(
            IonType::Protonated.mz_of_neutral(m),
            195.0877,
            epsilon = 5e-5
        );
    }

    #[test]
    fn electron_mass_moves_the_radical_cation_below_the_neutral_mass() {
        let m = 100.0;
        assert_abs_diff_eq!(
            IonType::RadicalCation.mz_of_neutral(m),
            m - ELECTRON_MASS,
            epsilon = 1e-12
        );
        // [M-H]- gains an electron: M − m(H) + mₑ.
        assert_abs_diff_eq!(
            IonType::Deprotonated.mz_of_neutral(m),
            m - 1.007_825_032_23 + ELECTRON_MASS,
            epsilon = 1e-9
        );
    }

    #[test]
    fn electron_parity_follows_the_ion_type() {
        let caffeine = Formula::parse("C8H10N4O2").unwrap();
        for ion in IonType::ALL {
            let f = ion.ion_formula(&caffeine).unwrap();
            assert_eq!(f.is_odd_electron(), ion.is_odd_electron(), "{ion}");
        }
    }

    #[test]
    fn nominal_masses_of_adducts() {
        assert_eq!(IonType::Protonated.neutral_nominal_mass(195), Some(194));
        assert_eq!(IonType::Ammoniated.neutral_nominal_mass(212), Some(194));
        assert_eq!(IonType::Deprotonated.neutral_nominal_mass(193), Some(194));
        assert_eq!(IonType::Sodiated.neutral_nominal_mass(20), None);
    }
}
