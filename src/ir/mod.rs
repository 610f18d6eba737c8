//! Infrared spectra: file readers (JCAMP-DX, two-column text), preprocessing and band
//! picking. Produces a band list; knows nothing of functional groups.
//!
//! The path from bytes to bands, as [`bands_from_file_contents`] runs it:
//!
//! 1. **Read** — JCAMP-DX when the text starts with `##` (after blanks and `$$` comments),
//!    else two-column text ([`jcamp`], [`columns`]). No filesystem access here: the caller
//!    hands over the bytes and an origin name for diagnostics.
//! 2. **Prepare** — order by ascending wavenumber; resample onto an even grid when the
//!    file's grid is not even (micrometre files, XYPOINTS); transmittance to absorbance
//!    ([`preprocess::transmittance_to_absorbance`]); baseline by asymmetric least squares
//!    ([`preprocess::als_baseline`]).
//! 3. **Pick** — [`pick::pick_bands`]: prominent maxima, FWHM, broad/sharp, strength
//!    classes, shoulders; for a vapour ([`SamplePhase`]) P/R branch contours merged and
//!    water-vapour lines marked; CO2 marked in either phase. A JCAMP-DX peak table skips steps 2–3 except the conversion to
//!    absorbance: its peaks are the bands.
//! 4. **Filter** — region and minimum strength from [`PickOptions`]; strength stays
//!    relative to the strongest band of the whole spectrum.

pub mod band;
pub mod columns;
pub mod jcamp;
pub mod pick;
pub mod preprocess;
pub mod spectrum;
pub mod synth;

pub use band::{Band, Shape, Strength};
pub use pick::{BandKind, PickParams, PickStats, PickedBand, SamplePhase};
pub use spectrum::{
    HeaderField, HeaderSummary, Ordinate, ReadOptions, ReadSpectrum, SpectrumData,
    SpectrumFileKind, XUnits,
};

use crate::diag::Diagnostic;
use preprocess::AlsParams;
use serde::Serialize;

/// What the caller may choose about reading and picking.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PickOptions {
    /// Units to assume when the file does not state them.
    pub read: ReadOptions,
    /// Remove the baseline by asymmetric least squares before picking (default on).
    pub correct_baseline: bool,
    /// Picker settings (smoothing, shoulders).
    pub pick: PickParams,
    /// Keep only bands at least this strong (default weak: keep all).
    pub min_strength: Strength,
    /// Keep only bands within `(low, high)` cm⁻¹, inclusive.
    pub region: Option<(f64, f64)>,
}

impl Default for PickOptions {
    fn default() -> PickOptions {
        PickOptions {
            read: ReadOptions::default(),
            correct_baseline: true,
            pick: PickParams::default(),
            min_strength: Strength::Weak,
            region: None,
        }
    }
}

/// A spectrum file read and picked: header summary, notes, bands with their measurements.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PickedSpectrum {
    /// Plain summary of the file's header.
    pub header: HeaderSummary,
    /// What was assumed, converted or skipped on the way, in order.
    pub notes: Vec<String>,
    /// Picked bands, highest wavenumber first, after the region and strength filters.
    pub bands: Vec<PickedBand>,
    /// Measurements of the picking run (absent for a peak table).
    pub stats: Option<PickStats>,
}

impl PickedSpectrum {
    /// The bands in the shared form that case files and the engine use (positions rounded
    /// to 0.1 cm⁻¹; shape absent when the width is unknown, as for a peak table).
    pub fn bands(&self) -> Vec<Band> {
        self.bands
            .iter()
            .map(|b| Band {
                at: (b.at * 10.0).round() / 10.0,
                strength: b.strength,
                shape: b.shape,
                width: b.fwhm.map(|w| (w * 10.0).round() / 10.0),
            })
            .collect()
    }
}

/// The two kinds of file this module reads.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FileKind {
    /// JCAMP-DX.
    Jcamp,
    /// Two-column text.
    Columns,
}

/// JCAMP-DX when the first line that is not blank or a `$$` comment starts with `##`, or
/// when any line starts with `##TITLE=` (so that stray text at the top of a JCAMP-DX file
/// is reported as such rather than read as columns).
pub fn detect_kind(src: &str) -> FileKind {
    if src
        .lines()
        .any(|l| l.trim_start().to_ascii_uppercase().starts_with("##TITLE"))
    {
        return FileKind::Jcamp;
    }
    for line in src.lines() {
        let t = line.trim();
        if t.is_empty() || t.starts_with("$$") {
            continue;
        }
        return if t.starts_with("##") {
            FileKind::Jcamp
        } else {
            FileKind::Columns
        };
    }
    FileKind::Columns
}

/// Reads a spectrum file's contents (either kind) without picking.
pub fn read_spectrum(
    bytes: &[u8],
    origin: &str,
    options: &ReadOptions,
) -> Result<ReadSpectrum, Vec<Diagnostic>> {
    let decoded = jcamp::decode_text(bytes).map_err(|e| vec![e.to_diagnostic("", origin)])?;
    let src = decoded.text;
    let mut read = match detect_kind(src) {
        FileKind::Jcamp => jcamp::read_infrared(src, options).map_err(|errors| {
            errors
                .iter()
                .map(|e| e.to_diagnostic(src, origin))
                .collect::<Vec<_>>()
        })?,
        FileKind::Columns => {
            columns::read_columns(src, options).map_err(|e| vec![e.to_diagnostic(src, origin)])?
        }
    };
    if !decoded.notes.is_empty() {
        let mut notes = decoded.notes;
        notes.append(&mut read.notes);
        read.notes = notes;
    }
    Ok(read)
}

/// An evenly spaced, ascending absorbance trace ready for picking, with notes.
#[derive(Clone, Debug, PartialEq)]
pub struct PreparedTrace {
    /// Wavenumbers, ascending, evenly spaced.
    pub x: Vec<f64>,
    /// Absorbance (baseline removed when asked).
    pub y: Vec<f64>,
}

/// Orders, resamples, converts to absorbance and (optionally) removes the baseline.
pub fn prepare_trace(
    trace: &spectrum::Trace,
    correct_baseline: bool,
    notes: &mut Vec<String>,
) -> PreparedTrace {
    let mut x = trace.wavenumber.clone();
    let mut y = trace.y.clone();
    if x.len() >= 2 && x[0] > x[x.len() - 1] {
        x.reverse();
        y.reverse();
    }
    if !preprocess::is_uniform(&x) {
        // The median step, but never more than four grid points per point read, so that
        // one tiny step cannot blow the grid up.
        let range = x[x.len() - 1] - x[0];
        let step = preprocess::median_step(&x).max(range / (4.0 * x.len() as f64));
        let (gx, gy) = preprocess::resample_uniform(&x, &y, step);
        notes.push(format!(
            "uneven point spacing: resampled to an even {step:.4} cm-1 grid by linear interpolation"
        ));
        x = gx;
        y = gy;
    }
    if trace.ordinate == Ordinate::Transmittance {
        let clamped = preprocess::transmittance_to_absorbance(&mut y);
        notes.push("transmittance converted to absorbance (A = -log10 T)".to_owned());
        if clamped > 0 {
            notes.push(format!(
                "{clamped} point(s) with T below {} clamped (A capped at 4)",
                preprocess::TRANSMITTANCE_FLOOR
            ));
        }
    }
    if correct_baseline && x.len() >= 4 {
        let baseline = preprocess::als_baseline(&x, &y, &AlsParams::default());
        for (v, b) in y.iter_mut().zip(&baseline) {
            *v -= b;
        }
        notes.push("baseline removed by asymmetric least squares".to_owned());
    }
    PreparedTrace { x, y }
}

/// Reads a spectrum file's contents, preprocesses and picks its bands.
///
/// `bytes` is the whole file, `origin` the name diagnostics show (a path). JCAMP-DX or
/// two-column text is detected from the contents. Errors are diagnostics with the line
/// (and column) of the problem.
pub fn bands_from_file_contents(
    bytes: &[u8],
    origin: &str,
    options: &PickOptions,
) -> Result<PickedSpectrum, Vec<Diagnostic>> {
    let read = read_spectrum(bytes, origin, &options.read)?;
    let mut notes = read.notes;
    let (mut bands, stats) = match &read.data {
        SpectrumData::Trace(trace) => {
            let prepared = prepare_trace(trace, options.correct_baseline, &mut notes);
            let (bands, stats, pick_notes) =
                pick::pick_bands_noted(&prepared.x, &prepared.y, &options.pick);
            notes.extend(pick_notes);
            (bands, Some(stats))
        }
        SpectrumData::PeakTable(table) => {
            let mut y = table.y.clone();
            if table.ordinate == Ordinate::Transmittance {
                preprocess::transmittance_to_absorbance(&mut y);
                notes.push("peak heights converted to absorbance (A = -log10 T)".to_owned());
            }
            notes.push("bands taken from the file's peak table; widths unknown".to_owned());
            let max = y.iter().copied().fold(0.0f64, f64::max);
            let mut bands: Vec<PickedBand> = table
                .wavenumber
                .iter()
                .zip(&y)
                .map(|(&at, &height)| {
                    let relative = if max > 0.0 { height / max } else { 0.0 };
                    PickedBand {
                        at,
                        height,
                        relative_height: relative,
                        prominence: height,
                        fwhm: None,
                        strength: pick::classify_strength(relative),
                        shape: None,
                        kind: BandKind::Peak,
                    }
                })
                .collect();
            bands.sort_by(|a, b| b.at.total_cmp(&a.at));
            (bands, None)
        }
    };
    let before = bands.len();
    if let Some((low, high)) = options.region {
        bands.retain(|b| b.at >= low && b.at <= high);
    }
    bands.retain(|b| b.strength >= options.min_strength);
    if bands.len() < before {
        notes.push(format!(
            "{} of {before} band(s) kept after the region and strength filters",
            bands.len()
        ));
    }
    Ok(PickedSpectrum {
        header: read.header,
        notes,
        bands,
        stats,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kinds_are_told_apart_by_their_first_meaningful_line() {
        assert_eq!(detect_kind("$$ note\n\n##TITLE=a\n"), FileKind::Jcamp);
        assert_eq!(detect_kind("junk\n##TITLE=a\n"), FileKind::Jcamp);
        assert_eq!(detect_kind("# comment\n4000,0.1\n"), FileKind::Columns);
        assert_eq!(detect_kind(""), FileKind::Columns);
    }

    #[test]
    fn control_characters_are_binary_input_with_their_place() {
        let errors = bands_from_file_contents(
            b"4000,0.1\n39\x0199,0.2\n",
            "x.csv",
            &PickOptions::default(),
        )
        .unwrap_err();
        assert_eq!(
            errors[0].to_string(),
            "error: x.csv:2:3: binary data (byte 0x01); expected a text spectrum file (JCAMP-DX or two-column text)"
        );
    }
}
