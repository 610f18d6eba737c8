//! Raw case-file types: a mirror of the YAML with no interpretation beyond types, unknown
//! keys refused (`deny_unknown_fields`) so that a typo never passes silently. Words
//! (strength, shape, technique, ion type) stay strings here; `validate` turns them into
//! domain types and reports bad words with a "did you mean" hint.
//!
//! To add a field (sample metadata, review block, ...): add it here as `Option<_>`, then
//! carry it into [`super::Case`] in `validate`.

use serde::Deserialize;
use std::collections::BTreeMap;

/// A case file as written.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawCase {
    /// Case identifier, e.g. `LAB-0001`.
    pub case: Option<String>,
    /// Free text.
    pub title: Option<String>,
    /// Molecular formula.
    pub formula: Option<String>,
    /// Mass-spectrum evidence.
    pub ms: Option<RawMs>,
    /// IR evidence.
    pub ir: Option<RawIr>,
    /// Sample metadata.
    pub sample: Option<RawSample>,
    /// Free notes.
    pub notes: Option<String>,
    /// The analyst's recorded conclusion.
    pub conclusion: Option<RawConclusion>,
    /// The second analyst's review.
    pub review: Option<RawReview>,
    /// Suspected components of a mixture (cutting agents, diluents) with their reference
    /// spectrum or band list.
    pub components: Option<Vec<RawComponent>>,
    /// Folder of reference spectra to search, relative to the case file.
    pub library: Option<String>,
}

/// One item of `components:`.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawComponent {
    /// What the component is (free text, e.g. `mannitol (diluent)`).
    pub name: String,
    /// Its reference spectrum file, relative to the case file.
    pub spectrum: Option<String>,
    /// Its reference band list.
    pub bands: Option<Vec<RawBand>>,
}

/// The `sample:` block: where the unknown came from and who handles it.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSample {
    /// Date received, `YYYY-MM-DD`.
    pub received: Option<String>,
    /// Who asked for the analysis.
    pub requested_by: Option<String>,
    /// What the sample looks like, where it was found.
    pub description: Option<String>,
    /// Techniques used on the sample (free text, e.g. `FTIR-ATR, GC-MS (EI)`).
    pub technique: Option<String>,
    /// The analyst in charge.
    pub analyst: Option<String>,
}

/// The `conclusion:` block: what the analyst accepted.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawConclusion {
    /// The accepted candidate as group id → count.
    pub accepted: Option<BTreeMap<String, u32>>,
    /// Free comments.
    pub comments: Option<String>,
}

/// The `review:` block: the second analyst's check.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawReview {
    /// The reviewer's name or initials.
    pub reviewer: Option<String>,
    /// Date of the review, `YYYY-MM-DD`.
    pub date: Option<String>,
    /// `agreed | returned | pending`.
    pub verdict: Option<String>,
    /// Free comments.
    pub comments: Option<String>,
}

/// The `ms:` block.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawMs {
    /// m/z of the molecular ion (or adduct), nominal or accurate.
    pub molecular_ion: Option<f64>,
    /// Ion type word: `M+.`, `[M+H]+`, `[M+Na]+`, `[M-H]-`.
    pub ion: Option<String>,
    /// Mass tolerance in ppm for an accurate molecular ion.
    pub ppm: Option<f64>,
    /// Isotope peaks in percent of the molecular ion peak, keyed `M+1`, `M+2`.
    pub isotopes: Option<BTreeMap<String, f64>>,
    /// Fragment ions as `[m/z, relative intensity]`.
    pub fragments: Option<Vec<(f64, f64)>>,
}

/// The `ir:` block.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawIr {
    /// Path of a spectrum file, relative to the case file.
    pub spectrum: Option<String>,
    /// Observed bands.
    pub bands: Option<Vec<RawBand>>,
    /// Sampling technique word.
    pub technique: Option<String>,
    /// Measured wavenumber window `[low, high]` in cm⁻¹ (defaults by technique).
    pub window: Option<(f64, f64)>,
    /// Solvent of a solution spectrum (its opaque regions are not observable).
    pub solvent: Option<String>,
    /// Further regions `[[low, high], ...]` where nothing can be observed (cell windows,
    /// a solvent not in the table).
    pub opaque: Option<Vec<(f64, f64)>>,
}

/// One observed band as written.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawBand {
    /// Position, cm⁻¹.
    pub at: f64,
    /// `strong | medium | weak`.
    pub strength: String,
    /// `broad | sharp`.
    pub shape: Option<String>,
    /// Full width at half height, cm⁻¹, when the analyst measured it.
    pub width: Option<f64>,
}

/// Files a case refers to, relative paths as written (the CLI resolves them against the
/// case file's directory and reads them; the library never touches the filesystem).
pub fn referenced_files(raw: &RawCase) -> Vec<String> {
    raw.ir
        .as_ref()
        .and_then(|ir| ir.spectrum.clone())
        .into_iter()
        .chain(
            raw.components
                .iter()
                .flatten()
                .filter_map(|c| c.spectrum.clone()),
        )
        .collect()
}
