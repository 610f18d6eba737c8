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
    /// `origin:line:col` (1-based); without a position, the origin and the key path
    /// (`spectra/a.jdx (picked band 3)`), or just the origin.
    pub fn display(&self) -> String {
        match self.position {
            Some(p) => format!("{}:{}:{}", self.origin, p.line + 1, p.column + 1),
            None if self.key_path.is_empty() => self.origin.clone(),
            None => format!("{} ({})", self.origin, self.key_path),
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
    /// The dot-separated parts as written (one part when the formula has no dot).
    pub parts: Vec<FormulaPart>,
}

/// One dot-separated part of a stated formula (`HCl` in `C10H15N·HCl`, `2H2O`).
#[derive(Clone, Debug, PartialEq)]
pub struct FormulaPart {
    /// The part as written, multiplier included.
    pub text: String,
    /// Byte offset of the part inside the formula text.
    pub offset: usize,
    /// Leading multiplier (`2H2O`) or trailing count of a wrapped part (`(C9H13N)2`); 1 otherwise.
    pub multiplier: u32,
    /// Element counts of one unit of the part (the multiplier taken out).
    pub composition: Composition,
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
    /// Regions inside the window where nothing can be observed (the solvent's opaque
    /// regions and any stated ones): a band rule reaching into one is not demanded.
    pub opaque: Vec<(f64, f64)>,
    /// The solvent word, when the case names one.
    pub solvent: Option<String>,
    /// The spectrum file the bands were picked from, when the case names one.
    pub spectrum: Option<SpectrumSource>,
    /// That file's baseline-corrected absorbance (for fitting a known component).
    pub absorbance: Option<crate::ir::PreparedTrace>,
}

/// A suspected component of a mixture with its reference evidence.
#[derive(Clone, Debug, PartialEq)]
pub struct KnownComponent {
    /// What it is, as written.
    pub name: String,
    /// Where it was written.
    pub place: Place,
    /// Its reference spectrum file as written, when it has one.
    pub spectrum: Option<String>,
    /// Its bands (written, or picked from the reference spectrum).
    pub bands: Vec<ObservedBand>,
    /// The reference spectrum's baseline-corrected absorbance.
    pub trace: Option<crate::ir::PreparedTrace>,
}

/// A spectrum file named by a case and what picking it gave.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SpectrumSource {
    /// The path as written in the case (relative to the case file).
    pub written: String,
    /// The name diagnostics and band places use (the path as the CLI opened it).
    pub origin: String,
    /// Bands picked from the file (before written bands override any of them).
    pub n_picked: usize,
    /// Picked bands replaced by a written band within [`OVERRIDE_CM1`].
    pub n_overridden: usize,
    /// The file's title, when it has one.
    pub title: Option<String>,
    /// What the reader and picker assumed or converted.
    pub notes: Vec<String>,
}

/// A written band replaces a picked band closer than this, cm⁻¹: the analyst's reading of
/// the same feature wins over the picker's (about one resolution element of a routine
/// 4 cm⁻¹ FTIR scan; common practice, from memory).
pub const OVERRIDE_CM1: f64 = 5.0;

/// A file the case refers to, read by the caller.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ReferencedFile {
    /// The path as written in the case.
    pub written: String,
    /// The name diagnostics use (the path as opened).
    pub origin: String,
    /// The file's bytes.
    pub bytes: Vec<u8>,
}

/// Where the sample came from and who handles it (all free text but the date).
#[derive(Clone, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct Sample {
    /// Date received, `YYYY-MM-DD`.
    pub received: Option<String>,
    /// Who asked for the analysis.
    pub requested_by: Option<String>,
    /// Description of the sample.
    pub description: Option<String>,
    /// Techniques used.
    pub technique: Option<String>,
    /// Analyst in charge.
    pub analyst: Option<String>,
}

/// The analyst's recorded conclusion.
#[derive(Clone, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct Conclusion {
    /// Accepted candidate: group id → count (empty when none was written).
    pub accepted: std::collections::BTreeMap<String, u32>,
    /// Where `accepted` was written.
    #[serde(skip)]
    pub accepted_place: Option<Place>,
    /// Comments.
    pub comments: Option<String>,
}

/// The second analyst's verdict.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Verdict {
    /// The reviewer agrees with the conclusion.
    Agreed,
    /// The reviewer sent the case back.
    Returned,
    /// The review is not finished.
    Pending,
}

impl Verdict {
    /// Every verdict with its case-file word.
    pub const ALL: [(Verdict, &'static str); 3] = [
        (Verdict::Agreed, "agreed"),
        (Verdict::Returned, "returned"),
        (Verdict::Pending, "pending"),
    ];

    /// The case-file word.
    pub fn word(self) -> &'static str {
        Verdict::ALL
            .iter()
            .find(|(v, _)| *v == self)
            .map_or("?", |(_, w)| w)
    }
}

/// The review block.
#[derive(Clone, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct Review {
    /// Reviewer.
    pub reviewer: Option<String>,
    /// Date, `YYYY-MM-DD`.
    pub date: Option<String>,
    /// Verdict.
    pub verdict: Option<Verdict>,
    /// Comments.
    pub comments: Option<String>,
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

/// Ion type of the stated molecular ion: the one `ms` defines (case-file words are its
/// canonical spellings).
pub use crate::ms::IonType;

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
    /// Sample metadata.
    pub sample: Sample,
    /// Free notes.
    pub notes: Option<String>,
    /// The analyst's conclusion, when written.
    pub conclusion: Option<Conclusion>,
    /// The review block, when written.
    pub review: Option<Review>,
    /// Suspected components of a mixture, in the order written.
    pub components: Vec<KnownComponent>,
    /// The reference library the case names, when it names one.
    pub library: Option<LibraryRef>,
}

/// A reference library folder named by a case (`library:`).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct LibraryRef {
    /// The path as written (relative to the case file).
    pub written: String,
    /// Where it was written.
    pub place: Place,
}
