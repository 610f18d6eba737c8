//! Diagnostics: where in an input a problem sits, what it is, and how to show it.
//!
//! Positions are stored 0-based and converted to the 1-based `line:column` that people
//! read in exactly one place, [`Diagnostic`]'s rendering. Messages are lower case with no
//! trailing period. Every parser in the crate reports through these types so that a
//! formula typed on the command line, a rules file and a case file all point at the
//! problem the same way.

mod suggest;

pub use suggest::{closest_match, edit_distance};

use std::fmt;

/// A 0-based line and column (in characters) inside one input text.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
pub struct Position {
    /// 0-based line index.
    pub line: usize,
    /// 0-based column, counted in Unicode scalar values.
    pub column: usize,
}

impl Position {
    /// The position of byte offset `byte_offset` in `src` (clamped to the end of `src`).
    pub fn of_offset(src: &str, byte_offset: usize) -> Position {
        let mut offset = byte_offset.min(src.len());
        while !src.is_char_boundary(offset) {
            offset -= 1;
        }
        let before = &src[..offset];
        let line = before.matches('\n').count();
        let line_start = before.rfind('\n').map_or(0, |i| i + 1);
        let column = src[line_start..offset].chars().count();
        Position { line, column }
    }
}

/// How bad a diagnostic is.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    /// The input cannot be used as it is.
    Error,
    /// The input is usable but probably not what was meant.
    Warning,
}

/// One problem found in one input, with its place.
#[derive(Clone, Debug, PartialEq, Eq, serde::Serialize)]
pub struct Diagnostic {
    /// Error or warning.
    pub severity: Severity,
    /// Where the input came from: a file path, `<argument>`, `<embedded>/groups.yaml`.
    pub origin: String,
    /// 0-based place inside the input, when known.
    pub position: Option<Position>,
    /// Key path inside a structured file, e.g. `groups[3].bands[0].range`.
    pub key_path: Option<String>,
    /// Lower-case message without a trailing period.
    pub message: String,
    /// A hint such as `did you mean "ketone"?`.
    pub help: Option<String>,
    /// The source line the position points into, kept for caret rendering.
    pub source_line: Option<String>,
}

impl Diagnostic {
    /// An error in `origin` with no place yet.
    pub fn error(origin: impl Into<String>, message: impl Into<String>) -> Diagnostic {
        Diagnostic {
            severity: Severity::Error,
            origin: origin.into(),
            position: None,
            key_path: None,
            message: message.into(),
            help: None,
            source_line: None,
        }
    }

    /// A warning in `origin` with no place yet.
    pub fn warning(origin: impl Into<String>, message: impl Into<String>) -> Diagnostic {
        Diagnostic {
            severity: Severity::Warning,
            ..Diagnostic::error(origin, message)
        }
    }

    /// Places the diagnostic at byte offset `byte_offset` of `src` and keeps that line.
    pub fn at_offset(self, src: &str, byte_offset: usize) -> Diagnostic {
        let position = Position::of_offset(src, byte_offset);
        self.at(src, position)
    }

    /// Places the diagnostic at `position` of `src` and keeps that line.
    pub fn at(mut self, src: &str, position: Position) -> Diagnostic {
        self.source_line = src.lines().nth(position.line).map(str::to_owned);
        self.position = Some(position);
        self
    }

    /// Places the diagnostic at `position` without keeping a source line.
    pub fn at_position(mut self, position: Position) -> Diagnostic {
        self.position = Some(position);
        self
    }

    /// Adds the key path inside a structured file.
    pub fn with_key_path(mut self, key_path: impl Into<String>) -> Diagnostic {
        self.key_path = Some(key_path.into());
        self
    }

    /// Adds a hint.
    pub fn with_help(mut self, help: impl Into<String>) -> Diagnostic {
        self.help = Some(help.into());
        self
    }

    /// True for errors, false for warnings.
    pub fn is_error(&self) -> bool {
        self.severity == Severity::Error
    }

    /// `origin:line:column` with 1-based numbers, or just the origin when no place is known.
    pub fn place(&self) -> String {
        match self.position {
            Some(p) => format!("{}:{}:{}", self.origin, p.line + 1, p.column + 1),
            None => self.origin.clone(),
        }
    }

    /// Multi-line rendering: the headline, the source line with a caret, and the hint.
    pub fn render(&self) -> String {
        let mut out = self.to_string();
        if let (Some(line), Some(p)) = (&self.source_line, self.position) {
            let number = (p.line + 1).to_string();
            let gutter = " ".repeat(number.len());
            out.push_str(&format!("\n{gutter} |\n{number} | {line}\n{gutter} | "));
            out.push_str(&" ".repeat(p.column));
            out.push('^');
        }
        if let Some(help) = &self.help {
            out.push_str(&format!("\n  = help: {help}"));
        }
        out
    }
}

impl fmt::Display for Diagnostic {
    /// One line: `error: FILE:LINE:COL: key.path: message`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let severity = match self.severity {
            Severity::Error => "error",
            Severity::Warning => "warning",
        };
        write!(f, "{severity}: {}: ", self.place())?;
        if let Some(key_path) = &self.key_path {
            write!(f, "{key_path}: ")?;
        }
        write!(f, "{}", self.message)
    }
}

impl std::error::Error for Diagnostic {}

/// Renders every diagnostic, blank line between, for printing on stderr.
pub fn render_all(diagnostics: &[Diagnostic]) -> String {
    diagnostics
        .iter()
        .map(Diagnostic::render)
        .collect::<Vec<_>>()
        .join("\n\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn offsets_become_zero_based_positions_and_print_one_based() {
        let src = "case: A\nformula: C6H1x\n";
        let offset = src.find('x').unwrap();
        let d = Diagnostic::error("a.yaml", "unknown element symbol \"x\"").at_offset(src, offset);
        assert_eq!(
            d.position,
            Some(Position {
                line: 1,
                column: 13
            })
        );
        assert_eq!(
            d.to_string(),
            "error: a.yaml:2:14: unknown element symbol \"x\""
        );
    }

    #[test]
    fn rendering_shows_the_line_a_caret_and_the_hint() {
        let src = "formula: C6H1x";
        let d = Diagnostic::error("<argument>", "bad")
            .at_offset(src, 13)
            .with_key_path("formula")
            .with_help("did you mean \"Xe\"?");
        assert_eq!(
            d.render(),
            "error: <argument>:1:14: formula: bad\n  |\n1 | formula: C6H1x\n  |              ^\n  = help: did you mean \"Xe\"?"
        );
    }

    #[test]
    fn columns_count_characters_not_bytes() {
        let src = "C2H6O·H2O x";
        let offset = src.find('x').unwrap();
        assert_eq!(Position::of_offset(src, offset).column, 10);
    }
}
