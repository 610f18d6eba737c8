//! The validated case: domain types built from the raw case file, every value checked,
//! every evidence item keeping the place it came from so that the engine's verdicts can
//! point back at the file.

use crate::chem::Composition;
use crate::diag::Position;
use crate::ir::Band;
use crate::rules::Technique;

/// Where an evidence item was written: the case file, a 0-based position and a key path.
#[derive(Clone, Debug, PartialEq, Eq, serde::Serialize)]
pub struct Place {
    /// The case file's origin name.
    pub origin: String,
    /// 0-based position, when the locator found it.
    pub position: Option<Position>,
    /// Key path, e.g. `ir.bands[2]`.
    pub key_path: String,
}

impl Place {
    /// `origin:line:col` (1-based) or just the origin.
    pub fn display(&self) -> String {
        match self.position {
            Some(p) => format!("{}:{}:{}", self.origin, p.line + 1, p.column + 1),
            None => self.origin.clone(),
        }
    }
}

/// A molecular formula as stated in the case.
#[derive(Clone, Debug, PartialEq)]
pub struct StatedFormula {
    /// The text as written.
    pub text: String,
    /// The parsed formula (masses, isotope pattern).
    pub formula: crate::chem::Formula,
    /// Element counts.
    pub composition: Composition,
    /// Where it was written.
    pub place: Place,
}

/// An observed IR band with the place it was written.
#[derive(Clone, Debug, PartialEq)]
pub struct ObservedBand {
    /// The band.
    pub band: Band,
    /// Where it was written.
    pub place: Place,
}

/// The IR evidence of a case.
#[derive(Clone, Debug, PartialEq)]
pub struct IrEvidence {
    /// Sampling technique, when stated.
    pub technique: Option<Technique>,
    /// Observed bands in the order written.
    pub bands: Vec<ObservedBand>,
    /// Measured window `(low, high)` in cm⁻¹: a band rule lying partly outside it is not
    /// demanded. Default by technique (see [`default_window`]).
    pub window: (f64, f64),
}

/// The wavenumber window assumed when the case does not state one. Source: common
/// practice, from memory — mid-IR instruments with KBr optics reach 400 cm⁻¹, ATR crystals
/// and most routine set-ups stop near 650 cm⁻¹, and vapour-phase (GC-IR) flow cells with
/// MCT detectors near 700 cm⁻¹. A band rule whose range is not wholly inside the window
/// is never demanded, so a generous default only costs sharpness, never soundness.
pub fn default_window(technique: Option<Technique>) -> (f64, f64) {
    match technique {
        Some(Technique::Kbr) => (400.0, 4000.0),
        Some(Technique::Gas) => (700.0, 4000.0),
        _ => (650.0, 4000.0),
    }
}

/// Ion type of the stated molecular ion.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
pub enum IonType {
    /// Radical cation from electron ionisation, `M+.`.
    #[serde(rename = "M+.")]
    RadicalCation,
    /// Protonated molecule, `[M+H]+`.
    #[serde(rename = "[M+H]+")]
    Protonated,
    /// Sodium adduct, `[M+Na]+`.
    #[serde(rename = "[M+Na]+")]
    SodiumAdduct,
    /// Potassium adduct, `[M+K]+`.
    #[serde(rename = "[M+K]+")]
    PotassiumAdduct,
    /// Ammonium adduct, `[M+NH4]+`.
    #[serde(rename = "[M+NH4]+")]
    AmmoniumAdduct,
    /// Deprotonated molecule, `[M-H]-`.
    #[serde(rename = "[M-H]-")]
    Deprotonated,
}

impl IonType {
    /// Every ion type with its case-file word.
    pub const ALL: [(IonType, &'static str); 6] = [
        (IonType::RadicalCation, "M+."),
        (IonType::Protonated, "[M+H]+"),
        (IonType::SodiumAdduct, "[M+Na]+"),
        (IonType::PotassiumAdduct, "[M+K]+"),
        (IonType::AmmoniumAdduct, "[M+NH4]+"),
        (IonType::Deprotonated, "[M-H]-"),
    ];

    /// The case-file word.
    pub fn word(self) -> &'static str {
        IonType::ALL
            .iter()
            .find(|(t, _)| *t == self)
            .map_or("?", |(_, w)| w)
    }
}

/// The mass-spectrum evidence of a case.
#[derive(Clone, Debug, PartialEq)]
pub struct MsEvidence {
    /// The molecular ion (or adduct) m/z with its place.
    pub molecular_ion: Option<(f64, Place)>,
    /// Ion type (default `M+.`).
    pub ion: IonType,
    /// Tolerance for an accurate m/z, ppm (default 5).
    pub ppm: f64,
    /// M+1 in percent of M.
    pub m_plus_1: Option<(f64, Place)>,
    /// M+2 in percent of M.
    pub m_plus_2: Option<(f64, Place)>,
    /// Fragment ions `(m/z, relative intensity)` with their places.
    pub fragments: Vec<((f64, f64), Place)>,
}

/// A validated case, ready for the engine.
#[derive(Clone, Debug, PartialEq)]
pub struct Case {
    /// Identifier, when given.
    pub id: Option<String>,
    /// Title, when given.
    pub title: Option<String>,
    /// The origin name of the case file.
    pub origin: String,
    /// The stated formula.
    pub formula: Option<StatedFormula>,
    /// MS evidence.
    pub ms: Option<MsEvidence>,
    /// IR evidence (no `ir:` block means no IR constraints at all).
    pub ir: Option<IrEvidence>,
}
