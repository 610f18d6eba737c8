//! The spectrum as read from a file, before preprocessing: wavenumbers, ordinates and what
//! the ordinates mean, plus a plain summary of the file's header.

use serde::Serialize;

/// Units of the abscissa in a file.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum XUnits {
    /// Wavenumber, cm⁻¹.
    Wavenumber,
    /// Wavelength, µm (converted: wavenumber = 10⁴ / µm).
    Micrometre,
}

impl XUnits {
    /// Parses an option word: `cm-1` (also `1/cm`, `wavenumber`) or `um` (also `micrometers`).
    pub fn from_word(word: &str) -> Option<XUnits> {
        let w: String = word
            .chars()
            .filter(|c| !c.is_whitespace())
            .flat_map(char::to_lowercase)
            .collect();
        match w.as_str() {
            "cm-1" | "1/cm" | "cm^-1" | "cm⁻¹" | "wavenumber" | "wavenumbers" => {
                Some(XUnits::Wavenumber)
            }
            "um" | "µm" | "μm" | "micrometer" | "micrometers" | "micrometre" | "micrometres"
            | "micron" | "microns" => Some(XUnits::Micrometre),
            _ => None,
        }
    }

    /// Converts a value in these units to cm⁻¹.
    pub fn to_wavenumber(self, value: f64) -> f64 {
        match self {
            XUnits::Wavenumber => value,
            XUnits::Micrometre => 1.0e4 / value,
        }
    }
}

/// What a reader may be told when the file does not say.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct ReadOptions {
    /// X units to use when the file does not state them (two-column text, or a JCAMP-DX
    /// file without `##XUNITS=`). Units stated in a file win.
    pub x_units: Option<XUnits>,
    /// Ordinate kind to use when the file does not state it. Units stated in a file win.
    pub ordinate: Option<Ordinate>,
}

/// What the ordinates are.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Ordinate {
    /// Absorbance (decadic), or an absorbance-like quantity where bands are maxima.
    Absorbance,
    /// Transmittance as a fraction 0–1 (percent values are divided by 100 on reading).
    Transmittance,
}

impl Ordinate {
    /// Parses an option word: `absorbance` or `transmittance`.
    pub fn from_word(word: &str) -> Option<Ordinate> {
        match word.trim().to_lowercase().as_str() {
            "a" | "abs" | "absorbance" => Some(Ordinate::Absorbance),
            "t" | "%t" | "transmittance" => Some(Ordinate::Transmittance),
            _ => None,
        }
    }

    /// Lower-case word.
    pub fn word(self) -> &'static str {
        match self {
            Ordinate::Absorbance => "absorbance",
            Ordinate::Transmittance => "transmittance",
        }
    }
}

/// A transmittance trace whose largest value exceeds this is read as percent. Fractional
/// transmittance rarely exceeds 1.05 (a slight over-range after ratioing), and a percent
/// trace whose brightest point is under 1.5 %T carries no usable spectrum.
pub const PERCENT_TRANSMITTANCE_ABOVE: f64 = 1.5;

/// Spectral data as read: a continuous trace or a table of peaks.
#[derive(Clone, Debug, PartialEq)]
pub enum SpectrumData {
    /// A trace: one ordinate per wavenumber, wavenumbers strictly monotonic.
    Trace(Trace),
    /// A peak table (JCAMP-DX `##PEAK TABLE=`): positions and heights, no trace.
    PeakTable(Trace),
}

/// Wavenumbers and ordinates of equal length.
#[derive(Clone, Debug, PartialEq)]
pub struct Trace {
    /// Wavenumbers in cm⁻¹, in file order.
    pub wavenumber: Vec<f64>,
    /// Ordinates in file order (transmittance as a fraction).
    pub y: Vec<f64>,
    /// What the ordinates are.
    pub ordinate: Ordinate,
}

/// One header field as the file writes it.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct HeaderField {
    /// The label as written (e.g. `SPECTROMETER/DATA SYSTEM`).
    pub label: String,
    /// The value, continuation lines joined by spaces.
    pub value: String,
}

/// Which reader a spectrum file went through.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum SpectrumFileKind {
    /// A JCAMP-DX file.
    #[default]
    Jcamp,
    /// A two-column text file.
    Columns,
}

/// A plain summary of the file's header for people and reports.
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct HeaderSummary {
    /// The reader the file went through (what code decides on; `format` is for people).
    #[serde(skip)]
    pub kind: SpectrumFileKind,
    /// File format, e.g. `JCAMP-DX 4.24` or `two-column text (comma-separated)`.
    pub format: String,
    /// Title, if the file has one.
    pub title: Option<String>,
    /// DATA TYPE, if given.
    pub data_type: Option<String>,
    /// Other header fields worth showing (instrument, sampling, date, origin…), in file
    /// order.
    pub fields: Vec<HeaderField>,
    /// Spectral resolution as given in the file.
    pub resolution: Option<String>,
    /// Number of points (or peaks) read.
    pub n_points: usize,
    /// Lowest and highest wavenumber read, cm⁻¹.
    pub range_cm1: Option<(f64, f64)>,
    /// X units as given in the file (or by option).
    pub x_units: String,
    /// Y units as given in the file (or by option or detection).
    pub y_units: String,
}

/// A spectrum file as read: header summary, data, and notes on every assumption made.
#[derive(Clone, Debug, PartialEq)]
pub struct ReadSpectrum {
    /// Header summary.
    pub header: HeaderSummary,
    /// The data.
    pub data: SpectrumData,
    /// What the reader assumed or skipped (e.g. "read block 1 of 3").
    pub notes: Vec<String>,
}

/// Resolves the ordinate kind of transmittance given as percent or fraction: returns the
/// values as a fraction and a note when they were percent.
pub fn normalise_transmittance(y: &mut [f64]) -> Option<String> {
    let max = y.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if max > PERCENT_TRANSMITTANCE_ABOVE {
        for v in y.iter_mut() {
            *v /= 100.0;
        }
        Some(format!(
            "transmittance read as percent (largest value {max:.4} > {PERCENT_TRANSMITTANCE_ABOVE})"
        ))
    } else {
        None
    }
}

/// Guesses whether a trace with unknown units is transmittance: a transmittance trace
/// spends most of its points near its top (baseline near 100 %), an absorbance trace
/// near its bottom. Uses the median's place between min and max.
pub fn guess_ordinate(y: &[f64]) -> Ordinate {
    if y.is_empty() {
        return Ordinate::Absorbance;
    }
    let mut sorted = y.to_vec();
    sorted.sort_by(f64::total_cmp);
    let min = sorted[0];
    let max = sorted[sorted.len() - 1];
    let median = sorted[sorted.len() / 2];
    if max > min && (median - min) / (max - min) > 0.5 {
        Ordinate::Transmittance
    } else {
        Ordinate::Absorbance
    }
}

/// The note a reader adds when it converts wavelengths to wavenumbers.
pub const MICROMETRE_NOTE: &str = "X converted from micrometres to wavenumbers (10^4 / µm)";

/// Converts wavelengths in µm to wavenumbers in cm⁻¹ in place (10⁴ / µm); `Err` holds the
/// index of the first wavelength not above zero (nothing is converted then).
pub fn micrometres_to_wavenumbers(x: &mut [f64]) -> Result<(), usize> {
    if let Some(i) = x.iter().position(|v| *v <= 0.0) {
        return Err(i);
    }
    for v in x {
        *v = 1.0e4 / *v;
    }
    Ok(())
}

/// The smallest and largest of `x` (`(∞, −∞)` when empty).
pub fn extent(x: &[f64]) -> (f64, f64) {
    x.iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| {
            (lo.min(v), hi.max(v))
        })
}
