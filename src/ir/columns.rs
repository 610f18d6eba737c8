//! Two-column text spectra: CSV, TSV, semicolon- or white-space-separated exports.
//!
//! Grammar:
//! ```text
//! file     = *( blank | comment | header-line ) 1*data-line *( blank | comment )
//! comment  = ( "#" | "%" | "//" ) text
//! header   = any line before the first data line that is not two numbers
//! data-line= number delim number [ delim *text ]      ; further columns ignored
//! delim    = "," | TAB | ";" | 1*" "                    ; detected once for the file
//! number   = decimal with "." (or, unless the delimiter is a comma, ",") as the decimal
//!            point, optional exponent
//! ```
//! Which column is the wavenumber: the one that is strictly monotonic. When both are, the
//! header decides (a column named like `cm-1`, `wavenumber`, `µm`, `wavelength`), else the
//! first. X units come from the header, else from the values (largest X above 100 means
//! cm⁻¹), else from the option; otherwise the read fails asking for the option. Y units
//! come from the header (`abs…` / `%T`, `trans…`), else the option, else a guess with a note.

use super::spectrum::{
    extent, guess_ordinate, micrometres_to_wavenumbers, normalise_transmittance, HeaderSummary,
    Ordinate, ReadOptions, ReadSpectrum, SpectrumData, SpectrumFileKind, Trace, XUnits,
    MICROMETRE_NOTE,
};
use crate::diag::{Diagnostic, Position};
use thiserror::Error;

/// A problem with a two-column text file, with its 0-based line and column.
#[derive(Clone, Debug, PartialEq, Error)]
#[error("{kind}")]
pub struct ColumnsError {
    /// 0-based line.
    pub line: usize,
    /// 0-based column when one place is meant.
    pub column: Option<usize>,
    /// What went wrong.
    pub kind: ColumnsErrorKind,
}

/// What went wrong in a two-column file.
#[derive(Clone, Debug, PartialEq, Error)]
pub enum ColumnsErrorKind {
    /// No line with two numbers.
    #[error("no data lines; expected lines of two numbers (wavenumber and intensity)")]
    NoData,
    /// A data line that does not hold two numbers.
    #[error("expected two numbers separated by {delimiter}, found {found:?}")]
    BadLine {
        /// The delimiter in use.
        delimiter: &'static str,
        /// The line (shortened).
        found: String,
    },
    /// A value that is not a finite number.
    #[error("{found:?} is not a finite number; expected a number")]
    NotANumber {
        /// The field.
        found: String,
    },
    /// Neither column runs one way.
    #[error("neither column is monotonic (X at {found} after {previous}); expected one column of strictly increasing or decreasing wavenumbers")]
    NonMonotonicX {
        /// Previous X.
        previous: f64,
        /// X found.
        found: f64,
    },
    /// X units cannot be told.
    #[error("cannot tell the x units (largest X is {max}); give them as an option (cm-1 or um)")]
    UnknownXUnits {
        /// Largest X value.
        max: f64,
    },
    /// Too few points.
    #[error("{found} data line(s); expected at least 3")]
    TooFewPoints {
        /// Lines found.
        found: usize,
    },
    /// A non-positive wavelength.
    #[error("wavelength {value} µm; expected positive wavelengths to convert")]
    BadWavelength {
        /// The value.
        value: f64,
    },
}

impl ColumnsError {
    fn on_line(line: usize, kind: ColumnsErrorKind) -> ColumnsError {
        ColumnsError {
            line,
            column: None,
            kind,
        }
    }

    /// The crate diagnostic with origin and source line.
    pub fn to_diagnostic(&self, src: &str, origin: &str) -> Diagnostic {
        let position = Position {
            line: self.line,
            column: self.column.unwrap_or(0),
        };
        Diagnostic::error(origin, self.kind.to_string()).at(src, position)
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Delimiter {
    Comma,
    Tab,
    Semicolon,
    Space,
}

impl Delimiter {
    fn word(self) -> &'static str {
        match self {
            Delimiter::Comma => "commas",
            Delimiter::Tab => "tabs",
            Delimiter::Semicolon => "semicolons",
            Delimiter::Space => "spaces",
        }
    }

    fn describe(self) -> &'static str {
        match self {
            Delimiter::Comma => "comma-separated",
            Delimiter::Tab => "tab-separated",
            Delimiter::Semicolon => "semicolon-separated",
            Delimiter::Space => "white-space-separated",
        }
    }

    fn split(self, line: &str) -> Vec<&str> {
        match self {
            Delimiter::Comma => line.split(',').map(str::trim).collect(),
            Delimiter::Tab => line.split('\t').map(str::trim).collect(),
            Delimiter::Semicolon => line.split(';').map(str::trim).collect(),
            Delimiter::Space => line.split_whitespace().collect(),
        }
    }
}

fn is_comment(line: &str) -> bool {
    let t = line.trim_start();
    t.starts_with('#') || t.starts_with('%') || t.starts_with("//")
}

/// A decimal number; a decimal comma is accepted when the delimiter is not a comma (a
/// field with one comma and no point, as European exports with semicolons or tabs write).
fn number(field: &str) -> Option<f64> {
    let field = field.trim_matches('"');
    match field.parse::<f64>() {
        Ok(v) => Some(v).filter(|v| v.is_finite()),
        Err(_) if field.matches(',').count() == 1 && !field.contains('.') => field
            .replace(',', ".")
            .parse::<f64>()
            .ok()
            .filter(|v| v.is_finite()),
        Err(_) => None,
    }
}

fn is_nan_word(field: &str) -> bool {
    let w = field
        .trim_matches('"')
        .trim_start_matches(['+', '-'])
        .to_ascii_lowercase();
    matches!(w.as_str(), "nan" | "inf" | "infinity" | "?" | "na")
}

/// Two numbers from the first two fields of `line` split by `delimiter`.
fn pair(line: &str, delimiter: Delimiter) -> Option<(f64, f64)> {
    let fields = delimiter.split(line);
    if fields.len() < 2 {
        return None;
    }
    Some((number(fields[0])?, number(fields[1])?))
}

/// Picks the delimiter that reads the most lines as pairs.
fn detect_delimiter(lines: &[(usize, &str)]) -> Delimiter {
    let candidates = [
        Delimiter::Tab,
        Delimiter::Comma,
        Delimiter::Semicolon,
        Delimiter::Space,
    ];
    let sample: Vec<&str> = lines.iter().take(200).map(|(_, l)| *l).collect();
    let mut best = (Delimiter::Space, 0usize);
    for d in candidates {
        let count = sample.iter().filter(|l| pair(l, d).is_some()).count();
        if count > best.1 {
            best = (d, count);
        }
    }
    best.0
}

fn strictly_monotonic(v: &[f64]) -> Result<(), (usize, f64, f64)> {
    if v.len() < 2 {
        return Ok(());
    }
    let rising = v[1] > v[0];
    for i in 1..v.len() {
        let ok = if rising {
            v[i] > v[i - 1]
        } else {
            v[i] < v[i - 1]
        };
        if !ok {
            return Err((i, v[i - 1], v[i]));
        }
    }
    Ok(())
}

fn header_x_units(header: &str) -> Option<XUnits> {
    let h = header.to_lowercase();
    if h.contains("cm-1") || h.contains("cm^-1") || h.contains("1/cm") || h.contains("wavenumber") {
        Some(XUnits::Wavenumber)
    } else if h.contains("µm")
        || h.contains("μm")
        || h.contains("micron")
        || h.contains("micromet")
        || h.contains("wavelength")
    {
        Some(XUnits::Micrometre)
    } else {
        None
    }
}

fn header_ordinate(header: &str) -> Option<Ordinate> {
    let h = header.to_lowercase();
    if h.contains("absorb") {
        Some(Ordinate::Absorbance)
    } else if h.contains("%t") || h.contains("transm") {
        Some(Ordinate::Transmittance)
    } else {
        None
    }
}

/// Reads a two-column text spectrum. `src` is already checked to be text.
///
/// Grammar: see the module documentation.
pub fn read_columns(src: &str, options: &ReadOptions) -> Result<ReadSpectrum, ColumnsError> {
    let lines = content_lines(src);
    let delimiter = detect_delimiter(&lines);
    let first_data = lines
        .iter()
        .position(|(_, l)| pair(l, delimiter).is_some())
        .ok_or(ColumnsError::on_line(0, ColumnsErrorKind::NoData))?;
    let columns = Columns::read(&lines[first_data..], delimiter)?;
    let header_fields: Vec<&str> = lines[..first_data]
        .last()
        .map(|(_, l)| delimiter.split(l))
        .unwrap_or_default();
    let swapped = columns.second_is_x(&header_fields)?;
    let mut notes = Vec::new();
    let Columns {
        first,
        second,
        line_of,
    } = columns;
    let (mut x, mut y) = if swapped {
        notes.push("the second column is the monotonic one: read it as X".to_owned());
        (second, first)
    } else {
        (first, second)
    };
    let (x_header, y_header) = axis_headers(&lines[..first_data], &header_fields, swapped);
    let x_units = x_units_of(&x_header, &x, options, &line_of)?;
    if x_units == XUnits::Micrometre {
        micrometres_to_wavenumbers(&mut x).map_err(|i| {
            ColumnsError::on_line(line_of[i], ColumnsErrorKind::BadWavelength { value: x[i] })
        })?;
        notes.push(MICROMETRE_NOTE.to_owned());
    }
    let ordinate = ordinate_of(&y_header, &y, options, &mut notes);
    if ordinate == Ordinate::Transmittance {
        if let Some(note) = normalise_transmittance(&mut y) {
            notes.push(note);
        }
    }
    Ok(ReadSpectrum {
        header: summary(delimiter, &x, x_units, ordinate),
        data: SpectrumData::Trace(Trace {
            wavenumber: x,
            y,
            ordinate,
        }),
        notes,
    })
}

/// The lines that hold something (not blank, not a comment), with their 0-based index.
fn content_lines(src: &str) -> Vec<(usize, &str)> {
    src.split('\n')
        .map(|l| l.strip_suffix('\r').unwrap_or(l))
        .enumerate()
        .filter(|(_, l)| !l.trim().is_empty() && !is_comment(l))
        .collect()
}

/// The first two columns of the data lines, as written.
struct Columns {
    /// The first column.
    first: Vec<f64>,
    /// The second column.
    second: Vec<f64>,
    /// The 0-based line of each row.
    line_of: Vec<usize>,
}

impl Columns {
    /// Reads every data line as a pair of numbers; at least three rows.
    fn read(data_lines: &[(usize, &str)], delimiter: Delimiter) -> Result<Self, ColumnsError> {
        let mut columns = Self {
            first: Vec::new(),
            second: Vec::new(),
            line_of: Vec::new(),
        };
        for &(line_idx, line) in data_lines {
            let fields = delimiter.split(line);
            if let Some(bad) = fields.iter().take(2).find(|f| is_nan_word(f)) {
                let column = line.find(bad).map_or(0, |o| line[..o].chars().count());
                return Err(ColumnsError {
                    line: line_idx,
                    column: Some(column),
                    kind: ColumnsErrorKind::NotANumber {
                        found: (*bad).to_owned(),
                    },
                });
            }
            let Some((x, y)) = pair(line, delimiter) else {
                return Err(ColumnsError::on_line(
                    line_idx,
                    ColumnsErrorKind::BadLine {
                        delimiter: delimiter.word(),
                        found: line.chars().take(60).collect(),
                    },
                ));
            };
            columns.first.push(x);
            columns.second.push(y);
            columns.line_of.push(line_idx);
        }
        if columns.first.len() < 3 {
            return Err(ColumnsError::on_line(
                columns.line_of.last().copied().unwrap_or(0),
                ColumnsErrorKind::TooFewPoints {
                    found: columns.first.len(),
                },
            ));
        }
        Ok(columns)
    }

    /// Whether the second column is X: the strictly monotonic one; when both are, the
    /// header decides (the second named like a wavenumber or wavelength, the first not).
    fn second_is_x(&self, header_fields: &[&str]) -> Result<bool, ColumnsError> {
        match (
            strictly_monotonic(&self.first),
            strictly_monotonic(&self.second),
        ) {
            (Ok(()), Err(_)) => Ok(false),
            (Err(_), Ok(())) => Ok(true),
            (Ok(()), Ok(())) => Ok(header_fields.len() >= 2
                && header_x_units(header_fields[0]).is_none()
                && header_x_units(header_fields[1]).is_some()),
            (Err((i, previous, found)), Err(_)) => Err(ColumnsError::on_line(
                self.line_of[i],
                ColumnsErrorKind::NonMonotonicX { previous, found },
            )),
        }
    }
}

/// The header text for X and for Y: the last header line's two fields when it has two,
/// else the whole header for both.
fn axis_headers(
    header_lines: &[(usize, &str)],
    header_fields: &[&str],
    swapped: bool,
) -> (String, String) {
    if header_fields.len() >= 2 {
        let (xh, yh) = if swapped {
            (header_fields[1], header_fields[0])
        } else {
            (header_fields[0], header_fields[1])
        };
        (xh.to_owned(), yh.to_owned())
    } else {
        let header_text: String = header_lines
            .iter()
            .map(|(_, l)| *l)
            .collect::<Vec<_>>()
            .join("\n");
        (header_text.clone(), header_text)
    }
}

/// X units: from the header, else from the values (largest X above 100 means cm⁻¹),
/// else from the option; otherwise an error asking for it.
fn x_units_of(
    x_header: &str,
    x: &[f64],
    options: &ReadOptions,
    line_of: &[usize],
) -> Result<XUnits, ColumnsError> {
    let max_x = x.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    match header_x_units(x_header) {
        Some(u) => Ok(u),
        None if max_x > 100.0 => Ok(XUnits::Wavenumber),
        None => options.x_units.ok_or_else(|| {
            ColumnsError::on_line(line_of[0], ColumnsErrorKind::UnknownXUnits { max: max_x })
        }),
    }
}

/// Y units: from the header, else the option, else a guess said in a note.
fn ordinate_of(
    y_header: &str,
    y: &[f64],
    options: &ReadOptions,
    notes: &mut Vec<String>,
) -> Ordinate {
    match (header_ordinate(y_header), options.ordinate) {
        (Some(o), _) | (None, Some(o)) => o,
        (None, None) => {
            let o = guess_ordinate(y);
            notes.push(format!(
                "the file does not name its intensity units; read as {} (guessed from where most points lie)",
                o.word()
            ));
            o
        }
    }
}

/// What the header says of a two-column file as read.
fn summary(delimiter: Delimiter, x: &[f64], x_units: XUnits, ordinate: Ordinate) -> HeaderSummary {
    let (lo, hi) = extent(x);
    HeaderSummary {
        kind: SpectrumFileKind::Columns,
        format: format!("two-column text ({})", delimiter.describe()),
        title: None,
        data_type: None,
        fields: Vec::new(),
        resolution: None,
        n_points: x.len(),
        range_cm1: Some((lo, hi)),
        x_units: match x_units {
            XUnits::Wavenumber => "cm-1".to_owned(),
            XUnits::Micrometre => "µm".to_owned(),
        },
        y_units: ordinate.word().to_owned(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn csv_with_header_reads_either_column_order() {
        let src = "absorbance,wavenumber (cm-1)\n0.1,4000\n0.2,3999\n0.15,3998\n";
        let read = read_columns(src, &ReadOptions::default()).unwrap();
        let SpectrumData::Trace(t) = read.data else {
            panic!("trace expected")
        };
        assert_eq!(t.wavenumber, vec![4000.0, 3999.0, 3998.0]);
        assert_eq!(t.ordinate, Ordinate::Absorbance);
        assert_eq!(read.header.format, "two-column text (comma-separated)");
    }

    #[test]
    fn small_x_without_units_asks_for_the_option() {
        let src = "2.5 0.1\n2.6 0.2\n2.7 0.1\n";
        let err = read_columns(src, &ReadOptions::default()).unwrap_err();
        assert!(matches!(err.kind, ColumnsErrorKind::UnknownXUnits { .. }));
        let options = ReadOptions {
            x_units: Some(XUnits::Micrometre),
            ordinate: Some(Ordinate::Absorbance),
        };
        let read = read_columns(src, &options).unwrap();
        let SpectrumData::Trace(t) = read.data else {
            panic!("trace expected")
        };
        assert!((t.wavenumber[0] - 4000.0).abs() < 1e-9);
    }

    #[test]
    fn a_nan_field_names_its_line_and_column() {
        let src = "4000\t0.1\n3999\tNaN\n3998\t0.1\n";
        let err = read_columns(src, &ReadOptions::default()).unwrap_err();
        assert_eq!((err.line, err.column), (1, Some(5)));
    }
}
