//! JCAMP-DX reader and writer for infrared spectra.
//!
//! The open standard is JCAMP-DX 4.24 for infrared spectra (R. S. McDonald and P. A.
//! Wilks, "JCAMP-DX: A Standard Form for Exchange of Infrared Spectra in Computer Readable
//! Form", Applied Spectroscopy 42 (1988) 151–162). Headers of version 5.x are accepted;
//! NTUPLES, which 5.x added for NMR and MS, are not read.
//!
//! # The subset read
//!
//! ```text
//! file-bytes   = file [ eof-run ]
//! eof-run      = 1*( 0x1A | blank | eol )      ; holding at least one 0x1A (DOS end of
//!                                               ; file): set aside with a note
//! file         = preamble 1*block
//! preamble     = *line                          ; anything before the first "##TITLE="
//!                  ; (an audit trail, other records, text): skipped with a note naming
//!                  ; its lines; a file with no "##TITLE=" at all is an error
//! block        = "##TITLE=" text eol *ldr *block "##END=" [text] eol
//!                  ; blocks nest one level inside a LINK block (##BLOCKS=n, ##DATA TYPE=LINK)
//! ldr          = "##" label "=" value *continuation-line
//! label        = printable text; case, spaces, dashes, slashes and underscores are
//!                ignored when labels are compared ("##Data Type=" = "##DATATYPE=")
//! comment      = "$$" text to the end of any line
//!
//! data record  = "##XYDATA=" "(X++(Y..Y))" eol 1*xyy-line
//!              | "##XYPOINTS=" "(XY..XY)" eol 1*xy-line
//!              | "##PEAK TABLE=" ( "(XY..XY)" | "(XYW..XYW)" ) eol 1*xy-line
//! xyy-line     = X-affn 1*Y          ; X, then ordinates in AFFN or any ASDF form
//!                                    ; (PAC, SQZ, DIF, DUP, mixed): see `asdf`
//! xy-line      = 1*( AFFN [sep] )    ; values taken in pairs (triples for XYW)
//! ```
//!
//! Header records used: `TITLE`, `JCAMP-DX` (version), `DATA TYPE`, `XUNITS`, `YUNITS`,
//! `XFACTOR`, `YFACTOR`, `FIRSTX`, `LASTX`, `DELTAX`, `NPOINTS`, `RESOLUTION`; instrument and
//! sample records (`SPECTROMETER/DATA SYSTEM`, `INSTRUMENT PARAMETERS`, `SAMPLING PROCEDURE`,
//! `STATE`, `PATH LENGTH`, `ORIGIN`, `OWNER`, `DATE`, …) are kept for the header summary.
//! Every other record is read and ignored.
//!
//! # Rules and checks
//!
//! * **DIF Y-check.** When the last ordinate of a line is in DIF form, the next line
//!   starts with that ordinate again as an actual value (the standard's Y-value check); it
//!   must agree (relative 10⁻⁹) or the read fails naming the line. It is then dropped.
//! * **Abscissa check.** With `(X++(Y..Y))`, the X at the start of each line, times
//!   XFACTOR, must match FIRSTX + index·Δx for the line's first ordinate within half a point
//!   spacing plus half the last digit written on the line; otherwise an ordinate is missing
//!   or extra. Exception: when NPOINTS is given and equals the ordinates decoded, lines
//!   labelled up to 1.5 spacings off (some writers give the abscissa of the point before
//!   the line's first ordinate) are accepted with a note. Line abscissae must run one way
//!   (non-monotonic X is an error).
//! * **Counts.** NPOINTS, when given, must equal the number of ordinates decoded.
//!   DELTAX, when given, must match (LASTX − FIRSTX)/(NPOINTS − 1) within 1 % (files round
//!   it). The X of point i is FIRSTX + i·(LASTX − FIRSTX)/(NPOINTS − 1): FIRSTX and LASTX
//!   fix the direction, so a DELTAX of the right size and the wrong sign is read with a
//!   note (the line abscissae are still checked against FIRSTX → LASTX).
//! * **Units.** XUNITS 1/CM is kept; MICROMETERS is converted (wavenumber = 10⁴/µm).
//!   YUNITS TRANSMITTANCE is read as percent when its largest value exceeds 1.5, else as a
//!   fraction; ABSORBANCE as is; other units are read as maxima-up with a note.
//! * **Blocks.** The blocks that hold data and whose DATA TYPE says infrared are tried in
//!   file order, then those with no DATA TYPE; the first that reads is taken, and a note
//!   says which when the file has more blocks. A block whose data or units cannot be read
//!   is skipped with a note naming its line, title and problem; only when no infrared block
//!   reads is the file refused, with every block's problem listed.
//! * **Input.** A trailing run of DOS end-of-file bytes (0x1A) is ignored with a note;
//!   elsewhere NUL bytes, control characters and invalid UTF-8 are refused as binary;
//!   a file that ends inside a block is truncated; `?`, `NaN` and `inf` are not numbers.
//!   No input makes the reader panic (a property test and a mutation fuzzer check it).

pub mod asdf;
pub mod error;
pub mod ldr;
pub mod write;

pub use error::{JcampError, JcampErrorKind};
pub use ldr::{Block, Ldr};
pub use write::{write_jcamp, JcampForm, WriteSpectrum};

use super::spectrum::{
    extent, guess_ordinate, micrometres_to_wavenumbers, normalise_transmittance, HeaderField,
    HeaderSummary, Ordinate, ReadOptions, ReadSpectrum, SpectrumData, SpectrumFileKind, Trace,
    XUnits, MICROMETRE_NOTE,
};
use asdf::{expand_ordinates, tokenize, Token};

/// Header records shown in the summary, as normalised labels.
const SUMMARY_LABELS: &[&str] = &[
    "ORIGIN",
    "OWNER",
    "DATE",
    "TIME",
    "LONGDATE",
    "SPECTROMETERDATASYSTEM",
    "INSTRUMENTPARAMETERS",
    "SPECTROMETERSETTINGS",
    "SAMPLINGPROCEDURE",
    "STATE",
    "PATHLENGTH",
    "SAMPLEDESCRIPTION",
    "DATAPROCESSING",
    "MOLFORM",
    "CASNAME",
    "CASREGISTRYNO",
    "TEMPERATURE",
    "PRESSURE",
    "SOURCEREFERENCE",
];

/// Kind of data record.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DataKind {
    /// `##XYDATA=(X++(Y..Y))`.
    XyData,
    /// `##XYPOINTS=(XY..XY)`.
    XyPoints,
    /// `##PEAK TABLE=(XY..XY)`.
    PeakTable,
}

/// Decoded data of one block, in file units scaled by XFACTOR and YFACTOR.
#[derive(Clone, Debug, PartialEq)]
pub struct BlockData {
    /// Which record held the data.
    pub kind: DataKind,
    /// Abscissae in file units.
    pub x: Vec<f64>,
    /// Ordinates in file units.
    pub y: Vec<f64>,
    /// 0-based line of the data record's `##`.
    pub line: usize,
    /// What the decoder tolerated (e.g. line abscissae one point off).
    pub notes: Vec<String>,
}

/// The text of a spectrum file and what was set aside to get it.
#[derive(Clone, Debug, PartialEq)]
pub struct DecodedText<'a> {
    /// The text, without a trailing run of DOS end-of-file bytes.
    pub text: &'a str,
    /// Notes on what was set aside (the end-of-file bytes), in order.
    pub notes: Vec<String>,
}

/// The DOS end-of-file byte (Ctrl-Z) that some instrument software writes after the text.
const DOS_EOF: u8 = 0x1a;

/// Checks that `bytes` are text and returns them as `&str`.
///
/// Grammar: `file-bytes = text [ eof-run ]` with `eof-run = 1*( 0x1A | blank | eol )`
/// holding at least one 0x1A: a trailing run of DOS end-of-file bytes (possibly after the
/// last `##END=`, mixed with line ends) is set aside with a note naming its line.
/// Elsewhere, NUL bytes and control characters other than tab, carriage return, line feed
/// and form feed mean binary input; invalid UTF-8 is refused too. The error names the line
/// and column of the first offending byte.
pub fn decode_text(bytes: &[u8]) -> Result<DecodedText<'_>, JcampError> {
    let place = |offset: usize| -> (usize, usize) {
        let before = &bytes[..offset];
        let line = before.iter().filter(|&&b| b == b'\n').count();
        let line_start = before
            .iter()
            .rposition(|&b| b == b'\n')
            .map_or(0, |i| i + 1);
        let column = String::from_utf8_lossy(&bytes[line_start..offset])
            .chars()
            .count();
        (line, column)
    };
    let mut notes = Vec::new();
    let tail_start = bytes
        .iter()
        .rposition(|&b| !matches!(b, DOS_EOF | b' ' | b'\t' | b'\r' | b'\n'))
        .map_or(0, |i| i + 1);
    let body = match bytes[tail_start..].iter().position(|&b| b == DOS_EOF) {
        Some(first_eof) => {
            let cut = tail_start + first_eof;
            let count = bytes[cut..].iter().filter(|&&b| b == DOS_EOF).count();
            let (line, _) = place(cut);
            notes.push(format!(
                "ignored {count} DOS end-of-file byte(s) (0x1A) at the end of the file, from line {}",
                line + 1
            ));
            &bytes[..cut]
        }
        None => bytes,
    };
    if let Some(offset) = body
        .iter()
        .position(|&b| b < 0x20 && !matches!(b, b'\t' | b'\n' | b'\r' | 0x0c) || b == 0x7f)
    {
        let (line, column) = place(offset);
        return Err(JcampError::at(
            line,
            column,
            JcampErrorKind::Binary { byte: body[offset] },
        ));
    }
    match std::str::from_utf8(body) {
        Ok(text) => Ok(DecodedText { text, notes }),
        Err(e) => {
            let (line, column) = place(e.valid_up_to());
            Err(JcampError::at(line, column, JcampErrorKind::InvalidUtf8))
        }
    }
}

/// Reads the blocks of a JCAMP-DX text (see [`read_blocks_noted`]; the notes are dropped).
pub fn read_blocks(src: &str) -> Result<Vec<Block>, JcampError> {
    read_blocks_noted(src).map(|(blocks, _)| blocks)
}

/// Reads the blocks of a JCAMP-DX text, with a note when lines before the first
/// `##TITLE=` were skipped.
///
/// Grammar: `file = preamble 1*block` — the preamble (an audit trail, other records, free
/// text) is skipped with a note naming its lines; a file with no `##TITLE=` is an error.
pub fn read_blocks_noted(src: &str) -> Result<(Vec<Block>, Vec<String>), JcampError> {
    let preamble = ldr::find_preamble(src)?;
    let mut notes = Vec::new();
    if let (Some(first), Some(last), Some(found)) = (
        preamble.skipped_lines.first(),
        preamble.skipped_lines.last(),
        &preamble.first_skipped,
    ) {
        let lines = if first == last {
            format!("line {}", first + 1)
        } else {
            format!("lines {}-{}", first + 1, last + 1)
        };
        notes.push(format!(
            "skipped {lines} before the first ##TITLE= (line {}), starting {found:?}",
            preamble.title_line + 1
        ));
    }
    let blocks = ldr::split_blocks(ldr::split_records_from(src, preamble.title_line)?)?;
    Ok((blocks, notes))
}

/// Parses a header value as an AFFN number.
fn header_number(block: &Block, label: &str) -> Result<Option<f64>, JcampError> {
    let Some(record) = block.get(label) else {
        return Ok(None);
    };
    let text = record.value.trim();
    if text.is_empty() {
        return Ok(None);
    }
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(Some(v)),
        _ => Err(JcampError::on_line(
            record.line,
            JcampErrorKind::BadNumber {
                label: format!("##{}=", record.raw_label),
                found: text.to_owned(),
            },
        )),
    }
}

/// Strips spaces and upper-cases a variable list such as `(X++(Y..Y))`.
fn normalise_variable_list(value: &str) -> String {
    value
        .chars()
        .filter(|c| !c.is_whitespace())
        .flat_map(char::to_uppercase)
        .collect()
}

/// Number of digits written after the decimal point of the first value on a line (0 when
/// none), used for the abscissa tolerance.
fn decimals_of_first_value(line: &str) -> i32 {
    let first = line
        .trim_start()
        .split(|c: char| c.is_whitespace() || c == ',' || c.is_ascii_alphabetic() && c != 'E')
        .next()
        .unwrap_or("");
    let mantissa = first.split('E').next().unwrap_or("");
    match mantissa.find('.') {
        Some(dot) => {
            let digits = mantissa[dot + 1..]
                .chars()
                .take_while(char::is_ascii_digit)
                .count();
            i32::try_from(digits).unwrap_or(0)
        }
        None => 0,
    }
}

/// Decodes the data of `block`: the first XYDATA, XYPOINTS or PEAK TABLE record, scaled
/// by XFACTOR and YFACTOR, with NPOINTS checked.
///
/// Grammar:
/// ```text
/// data record = "##XYDATA=" "(X++(Y..Y))" 1*xyy-line
///             | ( "##XYDATA=" | "##XYPOINTS=" ) "(XY..XY)" 1*xy-line
///             | "##PEAK TABLE=" ( "(XY..XY)" | "(XYW..XYW)" ) 1*xy-line
/// ```
pub fn decode_block(block: &Block) -> Result<BlockData, JcampError> {
    let Some(record) = block
        .records
        .iter()
        .find(|r| matches!(r.label.as_str(), "XYDATA" | "XYPOINTS" | "PEAKTABLE"))
    else {
        return Err(JcampError::on_line(
            block.title_line,
            JcampErrorKind::EmptyBlock {
                title: block.title.clone(),
            },
        ));
    };
    let label = format!("##{}=", record.raw_label);
    let xfactor = header_number(block, "XFACTOR")?.unwrap_or(1.0);
    let yfactor = header_number(block, "YFACTOR")?.unwrap_or(1.0);
    let npoints = header_number(block, "NPOINTS")?;
    if record.continuation.is_empty() {
        return Err(JcampError::on_line(
            record.line,
            JcampErrorKind::NoData { label },
        ));
    }
    let list = normalise_variable_list(&record.value);
    let mut notes = Vec::new();
    let (kind, data) = match (record.label.as_str(), list.as_str()) {
        ("XYDATA", "(X++(Y..Y))") => (
            DataKind::XyData,
            decode_xyy(block, record, xfactor, yfactor, &mut notes)?,
        ),
        ("XYDATA" | "XYPOINTS", "(XY..XY)") => (
            DataKind::XyPoints,
            decode_pairs(record, &label, 2, xfactor, yfactor, true)?,
        ),
        ("PEAKTABLE", "(XY..XY)") => (
            DataKind::PeakTable,
            decode_pairs(record, &label, 2, xfactor, yfactor, false)?,
        ),
        ("PEAKTABLE", "(XYW..XYW)") => (
            DataKind::PeakTable,
            decode_pairs(record, &label, 3, xfactor, yfactor, false)?,
        ),
        _ => {
            return Err(JcampError::on_line(
                record.line,
                JcampErrorKind::UnsupportedVariableList {
                    label,
                    found: record.value.clone(),
                },
            ))
        }
    };
    let (x, y) = data;
    let last_line = record.continuation.last().map_or(record.line, |(l, _)| *l);
    if let Some(declared) = npoints {
        let declared_count = declared.round();
        if declared_count < 0.0 || (declared_count - y.len() as f64).abs() > 0.0 {
            return Err(JcampError::on_line(
                last_line,
                JcampErrorKind::PointCount {
                    declared: declared_count.max(0.0) as usize,
                    found: y.len(),
                },
            ));
        }
    }
    if y.iter().chain(x.iter()).any(|v| !v.is_finite()) {
        return Err(JcampError::on_line(
            record.line,
            JcampErrorKind::NotANumber {
                found: "a value that overflows after XFACTOR/YFACTOR".to_owned(),
            },
        ));
    }
    Ok(BlockData {
        kind,
        x,
        y,
        line: record.line,
        notes,
    })
}

/// Decodes `(X++(Y..Y))` lines.
///
/// Grammar: `xyy-line = X-affn 1*Y` — X in AFFN, then ordinates in any ASDF form; when the
/// previous line ended in DIF form this line's first Y is the Y-check value.
fn decode_xyy(
    block: &Block,
    record: &Ldr,
    xfactor: f64,
    yfactor: f64,
    notes: &mut Vec<String>,
) -> Result<(Vec<f64>, Vec<f64>), JcampError> {
    let firstx = xyy_header_number(block, record, "FIRSTX", "##FIRSTX=")?;
    let lastx = xyy_header_number(block, record, "LASTX", "##LASTX=")?;
    let lines = XyyLines::read(record, xfactor)?;
    let n = lines.ys.len();
    let npoints_declared = check_point_count(block, record, n)?;
    let dx = point_spacing(block, record, (firstx, lastx), n, notes)?;
    let grid = Grid {
        firstx,
        dx,
        xfactor,
        count_confirmed: npoints_declared.is_some(),
    };
    grid.check_line_abscissae(&lines.abscissae, notes)?;
    let x: Vec<f64> = (0..n)
        .map(|i| {
            if i + 1 == n {
                lastx
            } else {
                firstx + i as f64 * dx
            }
        })
        .collect();
    let y: Vec<f64> = lines.ys.into_iter().map(|v| v * yfactor).collect();
    Ok((x, y))
}

/// A header number that `(X++(Y..Y))` data cannot do without.
fn xyy_header_number(
    block: &Block,
    record: &Ldr,
    name: &str,
    label: &'static str,
) -> Result<f64, JcampError> {
    header_number(block, name)?.ok_or(JcampError::on_line(
        record.line,
        JcampErrorKind::MissingLabel {
            label,
            needed_by: "##XYDATA=(X++(Y..Y))",
        },
    ))
}

/// The abscissa written at the start of one data line.
struct LineAbscissa {
    /// 0-based line.
    line: usize,
    /// X as written times XFACTOR.
    x: f64,
    /// Index of the line's first ordinate.
    first_index: usize,
    /// Decimals written in the X value.
    decimals: i32,
}

/// The ordinates of an `(X++(Y..Y))` record and each line's abscissa, as written.
struct XyyLines {
    /// The ordinates (before YFACTOR), Y-check values counted once.
    ys: Vec<f64>,
    /// Each data line's abscissa.
    abscissae: Vec<LineAbscissa>,
}

impl XyyLines {
    /// Reads every data line: X, then ordinates, checking each Y-check value.
    fn read(record: &Ldr, xfactor: f64) -> Result<Self, JcampError> {
        let mut ys: Vec<f64> = Vec::with_capacity(record.continuation.len() * 16);
        let mut line_buf: Vec<f64> = Vec::with_capacity(32);
        let mut pending_check: Option<f64> = None;
        let mut abscissae = Vec::new();
        for (line_idx, text) in &record.continuation {
            let line_idx = *line_idx;
            let tokens = tokenize(text, line_idx)?;
            let Some(first) = tokens.first() else {
                continue;
            };
            let Token::Actual(x_raw) = first.token else {
                return Err(JcampError::at(
                    line_idx,
                    first.column,
                    JcampErrorKind::MissingAbscissa,
                ));
            };
            let ordinates = &tokens[1..];
            let Some(first_ordinate) = ordinates.first() else {
                return Err(JcampError::on_line(line_idx, JcampErrorKind::NoOrdinates));
            };
            line_buf.clear();
            let ends_in_dif = expand_ordinates(ordinates, line_idx, &mut line_buf)?;
            let mut first_index = ys.len();
            let mut new_values = &line_buf[..];
            if let Some(expected) = pending_check {
                let found = line_buf[0];
                if (found - expected).abs() > 1e-9 * expected.abs().max(1.0) {
                    return Err(JcampError::at(
                        line_idx,
                        first_ordinate.column,
                        JcampErrorKind::DifCheck { expected, found },
                    ));
                }
                new_values = &line_buf[1..];
                first_index -= 1;
            }
            ys.extend_from_slice(new_values);
            pending_check = if ends_in_dif {
                line_buf.last().copied()
            } else {
                None
            };
            abscissae.push(LineAbscissa {
                line: line_idx,
                x: x_raw * xfactor,
                first_index,
                decimals: decimals_of_first_value(text),
            });
            if ys.len() > asdf::MAX_ORDINATES {
                return Err(JcampError::on_line(
                    line_idx,
                    JcampErrorKind::OutOfRange {
                        what: format!(
                            "more than {} ordinates; expected a spectrum",
                            asdf::MAX_ORDINATES
                        ),
                    },
                ));
            }
        }
        Ok(Self { ys, abscissae })
    }
}

/// At least two points, and as many as NPOINTS declares; returns the declared count.
fn check_point_count(block: &Block, record: &Ldr, n: usize) -> Result<Option<f64>, JcampError> {
    let last_line = record.continuation.last().map_or(record.line, |(l, _)| *l);
    if n < 2 {
        return Err(JcampError::on_line(
            last_line,
            JcampErrorKind::TooFewPoints {
                found: n,
                needed: 2,
            },
        ));
    }
    let npoints_declared = header_number(block, "NPOINTS")?;
    if let Some(declared) = npoints_declared {
        if declared.round() < 0.0 || declared.round() != n as f64 {
            return Err(JcampError::on_line(
                last_line,
                JcampErrorKind::PointCount {
                    declared: declared.round().max(0.0) as usize,
                    found: n,
                },
            ));
        }
    }
    Ok(npoints_declared)
}

/// The spacing of `n` points from FIRSTX to LASTX, checked against DELTAX when given.
fn point_spacing(
    block: &Block,
    record: &Ldr,
    (firstx, lastx): (f64, f64),
    n: usize,
    notes: &mut Vec<String>,
) -> Result<f64, JcampError> {
    let dx = (lastx - firstx) / (n - 1) as f64;
    if dx == 0.0 || !dx.is_finite() {
        return Err(JcampError::on_line(
            record.line,
            JcampErrorKind::OutOfRange {
                what: format!("FIRSTX = LASTX = {firstx}; expected a range of abscissae"),
            },
        ));
    }
    let Some(declared) = header_number(block, "DELTAX")? else {
        return Ok(dx);
    };
    let line = block.get("DELTAX").map_or(record.line, |r| r.line);
    // FIRSTX and LASTX fix the direction; DELTAX only checks the spacing. A DELTAX of
    // the right size but the wrong sign is noted, not refused.
    if declared.signum() != dx.signum() && (declared.abs() - dx.abs()).abs() <= 0.01 * dx.abs() {
        notes.push(format!(
            "DELTAX={declared} on line {} runs opposite to FIRSTX={firstx} -> LASTX={lastx}; the direction is taken from FIRSTX and LASTX",
            line + 1
        ));
    } else if (declared - dx).abs() > 0.01 * dx.abs() {
        return Err(JcampError::on_line(
            line,
            JcampErrorKind::DeltaX {
                declared,
                computed: dx,
            },
        ));
    }
    Ok(dx)
}

/// The abscissa grid of an `(X++(Y..Y))` record.
struct Grid {
    /// FIRSTX.
    firstx: f64,
    /// The point spacing (signed).
    dx: f64,
    /// XFACTOR.
    xfactor: f64,
    /// True when NPOINTS confirms the point count.
    count_confirmed: bool,
}

impl Grid {
    /// Each line's abscissa runs the grid's way and lies on the grid at its first
    /// ordinate, within half a spacing and half the written precision.
    fn check_line_abscissae(
        &self,
        abscissae: &[LineAbscissa],
        notes: &mut Vec<String>,
    ) -> Result<(), JcampError> {
        let dx = self.dx;
        let direction = if dx > 0.0 { "up" } else { "down" };
        let mut previous: Option<f64> = None;
        let mut lagging_noted = false;
        for a in abscissae {
            if let Some(p) = previous {
                if (a.x - p) * dx.signum() <= 0.0 && a.first_index > 0 {
                    return Err(JcampError::at(
                        a.line,
                        0,
                        JcampErrorKind::NonMonotonicX {
                            previous: p,
                            found: a.x,
                            direction,
                        },
                    ));
                }
            }
            previous = Some(a.x);
            let expected = self.firstx + a.first_index as f64 * dx;
            let granularity = 10f64.powi(-a.decimals) * self.xfactor.abs();
            let tolerance = 0.5 * dx.abs() + 0.5 * granularity;
            let off_by = (a.x - expected).abs();
            // Some writers label each line with the abscissa of the point before its first
            // ordinate. When NPOINTS confirms the count, an offset of up to one and a half
            // point spacings is that labelling habit, not a lost ordinate: note it once.
            if off_by > tolerance
                && self.count_confirmed
                && off_by <= 1.5 * dx.abs() + 0.5 * granularity
            {
                if !lagging_noted {
                    notes.push(format!(
                        "line abscissae are up to one point off their first ordinate (first on line {}); NPOINTS confirms the count, so X is taken from FIRSTX, LASTX and NPOINTS",
                        a.line + 1
                    ));
                    lagging_noted = true;
                }
                continue;
            }
            if off_by > tolerance {
                return Err(JcampError::at(
                    a.line,
                    0,
                    JcampErrorKind::AbscissaMismatch {
                        index: a.first_index,
                        expected,
                        found: a.x,
                        tolerance,
                    },
                ));
            }
        }
        Ok(())
    }
}

/// Decodes `(XY..XY)` (or `(XYW..XYW)` with `width` 3) lines.
///
/// Grammar: `xy-line = 1*( AFFN [sep] )`, values taken in groups of `width` across lines.
fn decode_pairs(
    record: &Ldr,
    label: &str,
    width: usize,
    xfactor: f64,
    yfactor: f64,
    monotonic: bool,
) -> Result<(Vec<f64>, Vec<f64>), JcampError> {
    let mut values: Vec<(f64, usize, usize)> = Vec::new();
    for (line_idx, text) in &record.continuation {
        for located in tokenize(text, *line_idx)? {
            match located.token {
                Token::Actual(v) => values.push((v, *line_idx, located.column)),
                Token::Dif(_) | Token::Dup(_) => {
                    return Err(JcampError::at(
                        *line_idx,
                        located.column,
                        JcampErrorKind::CompressedPairs {
                            what: if matches!(located.token, Token::Dif(_)) {
                                "DIF value"
                            } else {
                                "DUP count"
                            },
                            label: label.to_owned(),
                        },
                    ))
                }
            }
        }
    }
    if values.len() % width != 0 {
        let (value, line, column) = values[values.len() - values.len() % width];
        return Err(JcampError::at(
            line,
            column,
            JcampErrorKind::UnpairedValue { value },
        ));
    }
    let mut x = Vec::with_capacity(values.len() / width);
    let mut y = Vec::with_capacity(values.len() / width);
    for group in values.chunks(width) {
        let (xv, line, column) = group[0];
        let xv = xv * xfactor;
        if monotonic && !x.is_empty() {
            let previous: f64 = x[x.len() - 1];
            let rising = if x.len() >= 2 {
                x[1] > x[0]
            } else {
                xv > previous
            };
            if (rising && xv <= previous) || (!rising && xv >= previous) {
                return Err(JcampError::at(
                    line,
                    column,
                    JcampErrorKind::NonMonotonicX {
                        previous,
                        found: xv,
                        direction: if rising { "up" } else { "down" },
                    },
                ));
            }
        }
        x.push(xv);
        y.push(group[1].0 * yfactor);
    }
    Ok((x, y))
}

/// True when a DATA TYPE names an infrared spectrum.
fn is_infrared(data_type: &str) -> bool {
    let t = data_type.to_uppercase();
    t.contains("INFRARED") || t.split_whitespace().next() == Some("IR")
}

/// Reads the first readable infrared spectrum of a JCAMP-DX text: picks the block, decodes
/// its data, converts X to wavenumbers and normalises the ordinates, and summarises the
/// header.
///
/// Grammar: `file = preamble 1*block` with `block = "##TITLE=" ... "##END="` (see the
/// module documentation). The blocks tried are those that hold data and whose DATA TYPE
/// contains INFRARED (or is IR…), in file order, then those without a DATA TYPE. A block
/// whose data or units cannot be read is skipped with a note naming its line and title,
/// and the next is tried. Errors: one, when the file has a single infrared block (its
/// own problem) or a problem of the whole file; when several infrared blocks all fail, a
/// [`JcampErrorKind::NoReadableBlock`] followed by one [`JcampErrorKind::InBlock`] per
/// block.
pub fn read_infrared(src: &str, options: &ReadOptions) -> Result<ReadSpectrum, Vec<JcampError>> {
    let (blocks, mut notes) = read_blocks_noted(src).map_err(|e| vec![e])?;
    let data_blocks: Vec<(usize, &Block)> = blocks
        .iter()
        .enumerate()
        .filter(|(_, b)| b.has_data())
        .collect();
    if data_blocks.is_empty() {
        let block = blocks
            .iter()
            .find(|b| b.data_type().is_none_or(|t| t != "LINK"))
            .unwrap_or(&blocks[0]);
        return Err(vec![JcampError::on_line(
            block.title_line,
            JcampErrorKind::EmptyBlock {
                title: block.title.clone(),
            },
        )]);
    }
    let candidates: Vec<(usize, &Block)> = data_blocks
        .iter()
        .filter(|(_, b)| b.data_type().is_some_and(|t| is_infrared(&t)))
        .chain(data_blocks.iter().filter(|(_, b)| b.data_type().is_none()))
        .copied()
        .collect();
    if candidates.is_empty() {
        let mut found: Vec<String> = data_blocks
            .iter()
            .filter_map(|(_, b)| b.data_type())
            .collect();
        found.dedup();
        return Err(vec![JcampError::on_line(
            data_blocks[0].1.title_line,
            JcampErrorKind::NoInfraredBlock {
                found: found.join(", "),
            },
        )]);
    }
    let version = blocks[0]
        .value("JCAMPDX")
        .map(|v| v.split_whitespace().next().unwrap_or(v).to_owned());
    let mut failures: Vec<(usize, &Block, JcampError)> = Vec::new();
    for &(index, block) in &candidates {
        match read_block(block, version.as_deref(), options) {
            Ok(mut read) => {
                for (failed_index, failed, error) in &failures {
                    notes.push(format!(
                        "block {} ({:?}, line {}) skipped: line {}: {}",
                        failed_index + 1,
                        failed.title,
                        failed.title_line + 1,
                        error.line + 1,
                        error.kind
                    ));
                }
                if blocks.len() > 1 {
                    notes.push(format!(
                        "the file holds {} blocks; read block {} ({:?}, line {}), the first {}infrared spectrum with data",
                        blocks.len(),
                        index + 1,
                        block.title,
                        block.title_line + 1,
                        if failures.is_empty() { "" } else { "readable " }
                    ));
                }
                notes.append(&mut read.notes);
                read.notes = notes;
                return Ok(read);
            }
            Err(error) => failures.push((index, block, error)),
        }
    }
    if failures.len() == 1 {
        return Err(failures.into_iter().map(|(_, _, e)| e).collect());
    }
    let mut errors = vec![JcampError::on_line(
        candidates[0].1.title_line,
        JcampErrorKind::NoReadableBlock {
            tried: failures.len(),
        },
    )];
    errors.extend(
        failures
            .into_iter()
            .map(|(index, block, error)| JcampError {
                line: error.line,
                column: error.column,
                kind: JcampErrorKind::InBlock {
                    index: index + 1,
                    title: block.title.clone(),
                    opened_line: block.title_line + 1,
                    inner: Box::new(error.kind),
                },
            }),
    );
    Err(errors)
}

/// Reads one block as an infrared spectrum: data, units, ordinates, header summary.
/// `version` is the JCAMP-DX version of the file's first block (a LINK block gives it for
/// all).
fn read_block(
    block: &Block,
    version: Option<&str>,
    options: &ReadOptions,
) -> Result<ReadSpectrum, JcampError> {
    let mut notes = Vec::new();
    if block.data_type().is_none() {
        notes.push("the block gives no DATA TYPE; read as an infrared spectrum".to_owned());
    }
    let data = decode_block(block)?;
    notes.extend(data.notes.iter().cloned());
    let x_units = block_x_units(block, options, &mut notes)?;
    let mut wavenumber = data.x;
    if x_units == XUnits::Micrometre {
        micrometres_to_wavenumbers(&mut wavenumber).map_err(|i| {
            JcampError::on_line(
                data.line,
                JcampErrorKind::OutOfRange {
                    what: format!(
                        "wavelength {} µm; expected positive wavelengths to convert",
                        wavenumber[i]
                    ),
                },
            )
        })?;
        notes.push(MICROMETRE_NOTE.to_owned());
    }
    let mut y = data.y;
    let ordinate = block_ordinate(block, &y, options, &mut notes);
    if ordinate == Ordinate::Transmittance {
        if let Some(note) = normalise_transmittance(&mut y) {
            notes.push(note);
        }
    }
    let header = block_summary(block, version, &wavenumber, x_units, ordinate);
    let trace = Trace {
        wavenumber,
        y,
        ordinate,
    };
    let data = match data.kind {
        DataKind::PeakTable => SpectrumData::PeakTable(trace),
        DataKind::XyData | DataKind::XyPoints => SpectrumData::Trace(trace),
    };
    Ok(ReadSpectrum {
        header,
        data,
        notes,
    })
}

/// The block's X units: from XUNITS, else the option (noted); an unknown XUNITS, or none
/// and no option, is an error.
fn block_x_units(
    block: &Block,
    options: &ReadOptions,
    notes: &mut Vec<String>,
) -> Result<XUnits, JcampError> {
    let Some(raw) = block.value("XUNITS") else {
        let Some(u) = options.x_units else {
            return Err(JcampError::on_line(
                block.title_line,
                JcampErrorKind::MissingXUnits,
            ));
        };
        notes.push("the file gives no XUNITS; used the units given as an option".into());
        return Ok(u);
    };
    let w: String = raw
        .chars()
        .filter(|c| !c.is_whitespace())
        .flat_map(char::to_uppercase)
        .collect();
    match w.as_str() {
        "1/CM" | "CM-1" | "CM^-1" | "CM**-1" | "WAVENUMBERS" | "WAVENUMBER" => {
            Ok(XUnits::Wavenumber)
        }
        "MICROMETERS" | "MICROMETER" | "MICROMETRES" | "MICRONS" | "MICRON" | "UM" => {
            Ok(XUnits::Micrometre)
        }
        _ => {
            let line = block.get("XUNITS").map_or(block.title_line, |r| r.line);
            Err(JcampError::on_line(
                line,
                JcampErrorKind::UnsupportedXUnits {
                    found: raw.to_owned(),
                },
            ))
        }
    }
}

/// What the block's ordinates are: from YUNITS (reflectance read like transmittance), else
/// the option, else a guess; every assumption noted.
fn block_ordinate(
    block: &Block,
    y: &[f64],
    options: &ReadOptions,
    notes: &mut Vec<String>,
) -> Ordinate {
    let Some(raw) = block.value("YUNITS") else {
        let ordinate = match options.ordinate {
            Some(o) => o,
            None => guess_ordinate(y),
        };
        notes.push(format!(
            "the file gives no YUNITS; read as {} ({})",
            ordinate.word(),
            if options.ordinate.is_some() {
                "given as an option"
            } else {
                "guessed from where most points lie"
            }
        ));
        return ordinate;
    };
    let u = raw.to_uppercase();
    if u.contains("TRANSMITTANCE") || u.trim() == "%T" || u.contains("REFLECTANCE") {
        if u.contains("REFLECTANCE") {
            notes.push(format!(
                "YUNITS={raw}: read like transmittance (bands as minima)"
            ));
        }
        Ordinate::Transmittance
    } else if u.contains("ABSORBANCE") {
        Ordinate::Absorbance
    } else {
        let ordinate = options.ordinate.unwrap_or(Ordinate::Absorbance);
        notes.push(format!(
            "YUNITS={raw} is neither TRANSMITTANCE nor ABSORBANCE; read as {}",
            ordinate.word()
        ));
        ordinate
    }
}

/// The header summary of a block as read.
fn block_summary(
    block: &Block,
    version: Option<&str>,
    wavenumber: &[f64],
    x_units: XUnits,
    ordinate: Ordinate,
) -> HeaderSummary {
    let n_points = wavenumber.len();
    let (lo, hi) = extent(wavenumber);
    let version = version.map(str::to_owned).or_else(|| {
        block
            .value("JCAMPDX")
            .map(|v| v.split_whitespace().next().unwrap_or(v).to_owned())
    });
    let fields = block
        .records
        .iter()
        .filter(|r| SUMMARY_LABELS.contains(&r.label.as_str()))
        .filter(|r| !r.full_value().trim().is_empty())
        .map(|r| HeaderField {
            label: r.raw_label.clone(),
            value: r.full_value(),
        })
        .collect();
    HeaderSummary {
        kind: SpectrumFileKind::Jcamp,
        format: match version {
            Some(v) => format!("JCAMP-DX {v}"),
            None => "JCAMP-DX".to_owned(),
        },
        title: Some(block.title.clone()).filter(|t| !t.is_empty()),
        data_type: block.value("DATATYPE").map(str::to_owned),
        fields,
        resolution: block.value("RESOLUTION").map(str::to_owned),
        n_points,
        range_cm1: (n_points > 0).then_some((lo, hi)),
        x_units: block.value("XUNITS").map_or_else(
            || match x_units {
                XUnits::Wavenumber => "1/CM (option)".to_owned(),
                XUnits::Micrometre => "MICROMETERS (option)".to_owned(),
            },
            str::to_owned,
        ),
        y_units: block
            .value("YUNITS")
            .map_or_else(|| format!("{} (assumed)", ordinate.word()), str::to_owned),
    }
}
