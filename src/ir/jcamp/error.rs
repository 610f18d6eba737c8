//! Typed errors of the JCAMP-DX reader. Every error carries the 0-based line (and column
//! where one helps) and says what was expected there; [`JcampError::to_diagnostic`] turns
//! it into the crate's [`Diagnostic`] with the file origin.

use crate::diag::{Diagnostic, Position};
use thiserror::Error;

/// One problem that stops a JCAMP-DX file from being read.
#[derive(Clone, Debug, PartialEq, Error)]
#[error("{kind}")]
pub struct JcampError {
    /// 0-based line of the problem.
    pub line: usize,
    /// 0-based column (characters) when a single place on the line is meant.
    pub column: Option<usize>,
    /// What went wrong.
    pub kind: JcampErrorKind,
}

/// What went wrong, with the values involved. Messages are lower case without a trailing
/// period, as everywhere in the crate.
#[derive(Clone, Debug, PartialEq, Error)]
pub enum JcampErrorKind {
    /// A NUL byte or another control character: not a text file.
    #[error("binary data (byte 0x{byte:02x}); expected a text spectrum file (JCAMP-DX or two-column text)")]
    Binary {
        /// The offending byte.
        byte: u8,
    },
    /// Bytes that are not UTF-8 text.
    #[error("invalid UTF-8; expected a text spectrum file (JCAMP-DX is printable ASCII)")]
    InvalidUtf8,
    /// Nothing but white space and comments.
    #[error("empty file; expected ##TITLE= to start a JCAMP-DX block")]
    EmptyFile,
    /// Text before the first `##TITLE=` that is not a comment.
    #[error("expected ##TITLE= to start a JCAMP-DX block, found {found:?}")]
    NotJcamp {
        /// The start of the offending line.
        found: String,
    },
    /// A file with no `##TITLE=` record at all.
    #[error("no ##TITLE= in the file; expected ##TITLE= to start a JCAMP-DX block, found {found:?} first")]
    NoTitle {
        /// The start of the first line that is not blank or a comment.
        found: String,
    },
    /// Several infrared blocks, none of which could be read; the errors that follow it
    /// name each block's problem.
    #[error("none of the {tried} infrared blocks could be read (each block's problem follows); expected at least one readable block")]
    NoReadableBlock {
        /// How many infrared blocks were tried.
        tried: usize,
    },
    /// The problem of one block in a file of several, naming the block.
    #[error("block {index} {title:?} (opened on line {opened_line}): {inner}")]
    InBlock {
        /// 1-based position of the block in the file.
        index: usize,
        /// Title of the block.
        title: String,
        /// 1-based line of its `##TITLE=` (for people).
        opened_line: usize,
        /// What went wrong inside it.
        inner: Box<JcampErrorKind>,
    },
    /// A `##` line without `=`.
    #[error("labelled data record without '='; expected ##LABEL=value")]
    MissingEquals,
    /// The file ends inside a block.
    #[error("file ends inside block {title:?} opened on line {opened_line}; expected ##END=")]
    Truncated {
        /// Title of the open block.
        title: String,
        /// 1-based line of its `##TITLE=` (for people).
        opened_line: usize,
    },
    /// `##END=` with no block open.
    #[error("##END= without an open block")]
    UnmatchedEnd,
    /// A block with no spectral data.
    #[error(
        "block {title:?} holds no ##XYDATA=, ##XYPOINTS= or ##PEAK TABLE=; expected spectral data"
    )]
    EmptyBlock {
        /// Title of the empty block.
        title: String,
    },
    /// No infrared block among blocks that all carry another DATA TYPE.
    #[error("no infrared spectrum in the file (data types found: {found}); expected DATA TYPE=INFRARED SPECTRUM")]
    NoInfraredBlock {
        /// The data types seen.
        found: String,
    },
    /// A data record with no lines.
    #[error("{label} has no data lines; expected at least one line of numbers")]
    NoData {
        /// The data label.
        label: String,
    },
    /// A variable list this reader does not decode.
    #[error("unsupported variable list {found:?} after {label}; expected (X++(Y..Y)) or (XY..XY)")]
    UnsupportedVariableList {
        /// The data label.
        label: String,
        /// The variable list found.
        found: String,
    },
    /// A character that is neither AFFN nor an ASDF pseudo-digit.
    #[error("unexpected character {found:?}; expected a number or an ASDF pseudo-digit")]
    UnexpectedCharacter {
        /// The character.
        found: char,
    },
    /// A missing or not-a-number value (`?`, `NaN`, `inf`).
    #[error("missing or not-a-number value {found:?}; expected a finite number")]
    NotANumber {
        /// The token.
        found: String,
    },
    /// A DIF or DUP token with no ordinate before it on the line.
    #[error("{what} with no ordinate before it; expected the line to start with X and an actual Y value")]
    NoPrecedingOrdinate {
        /// `DIF value` or `DUP count`.
        what: &'static str,
    },
    /// DUP count of zero.
    #[error("DUP count of 0; expected a count of at least 1")]
    ZeroDup,
    /// The DIF Y-value check failed.
    #[error("DIF Y-check failed: line starts with Y = {found}, expected {expected} (the last Y of the line before)")]
    DifCheck {
        /// Last Y of the previous line.
        expected: f64,
        /// First Y of this line.
        found: f64,
    },
    /// X values that do not run one way.
    #[error("non-monotonic X: {found} after {previous}; expected X to keep running {direction}")]
    NonMonotonicX {
        /// The previous X.
        previous: f64,
        /// The X found.
        found: f64,
        /// `up` or `down`.
        direction: &'static str,
    },
    /// A line abscissa that does not match its ordinate count.
    #[error("line abscissa {found} does not match point {index} (expected {expected} from FIRSTX and DELTAX within {tolerance}); an ordinate is missing or extra")]
    AbscissaMismatch {
        /// 0-based point index of the line's first ordinate.
        index: usize,
        /// The X computed for that index.
        expected: f64,
        /// The X on the line (scaled by XFACTOR).
        found: f64,
        /// The tolerance allowed.
        tolerance: f64,
    },
    /// A data line that does not start with its abscissa.
    #[error("line starts with an ASDF ordinate; expected the abscissa X in AFFN form first")]
    MissingAbscissa,
    /// A difference or duplicate form where only plain values are allowed.
    #[error("ASDF {what} in {label}; expected plain X,Y values")]
    CompressedPairs {
        /// `DIF value` or `DUP count`.
        what: &'static str,
        /// The data label.
        label: String,
    },
    /// A line with X but no Y values.
    #[error("line has X but no Y; expected X followed by ordinates")]
    NoOrdinates,
    /// XY pairs with an odd count.
    #[error("unpaired value {value}; expected X,Y pairs")]
    UnpairedValue {
        /// The lone value.
        value: f64,
    },
    /// A required header record is missing.
    #[error("{label} is missing; expected it with {needed_by}")]
    MissingLabel {
        /// Label, e.g. `##FIRSTX=`.
        label: &'static str,
        /// What needs it.
        needed_by: &'static str,
    },
    /// A header value that should be a number.
    #[error("{label} is {found:?}; expected a number")]
    BadNumber {
        /// The label.
        label: String,
        /// The text found.
        found: String,
    },
    /// NPOINTS disagrees with the ordinates found.
    #[error("NPOINTS={declared} but {found} ordinates were found; expected them to agree")]
    PointCount {
        /// Declared NPOINTS.
        declared: usize,
        /// Ordinates decoded.
        found: usize,
    },
    /// DELTAX disagrees with FIRSTX, LASTX and the point count.
    #[error("DELTAX={declared} disagrees with (LASTX-FIRSTX)/(NPOINTS-1) = {computed}; expected agreement within 1 %")]
    DeltaX {
        /// Declared DELTAX.
        declared: f64,
        /// Computed spacing.
        computed: f64,
    },
    /// Too few points for a spectrum.
    #[error("{found} point(s); expected at least {needed}")]
    TooFewPoints {
        /// Points found.
        found: usize,
        /// Points needed.
        needed: usize,
    },
    /// X units that cannot be turned into wavenumbers.
    #[error("XUNITS={found:?}; expected 1/CM or MICROMETERS")]
    UnsupportedXUnits {
        /// The units given.
        found: String,
    },
    /// X units missing and not given by option.
    #[error(
        "##XUNITS= is missing; expected 1/CM or MICROMETERS (or give the x units as an option)"
    )]
    MissingXUnits,
    /// A value out of range, e.g. a zero wavelength.
    #[error("{what}")]
    OutOfRange {
        /// What is out of range.
        what: String,
    },
}

impl JcampError {
    /// An error on `line` with no column.
    pub fn on_line(line: usize, kind: JcampErrorKind) -> JcampError {
        JcampError {
            line,
            column: None,
            kind,
        }
    }

    /// An error at `line`, `column`.
    pub fn at(line: usize, column: usize, kind: JcampErrorKind) -> JcampError {
        JcampError {
            line,
            column: Some(column),
            kind,
        }
    }

    /// The crate diagnostic: origin, 1-based `line:column` when printed, the source line.
    /// `src` is the decoded text (empty when the file was not text).
    pub fn to_diagnostic(&self, src: &str, origin: &str) -> Diagnostic {
        let position = Position {
            line: self.line,
            column: self.column.unwrap_or(0),
        };
        let d = Diagnostic::error(origin, self.kind.to_string());
        if src.is_empty() {
            d.at_position(position)
        } else {
            d.at(src, position)
        }
    }
}
