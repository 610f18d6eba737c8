//! Reports: view types built from a case and the engine's outcome ([`view`]), and one
//! renderer per format — plain text, Markdown, JSON (its own versioned view,
//! [`json_view`]) and a self-contained HTML page with an
//! inline SVG plot. Renderers are pure functions of the view, so the same inputs give the
//! same bytes (no clock unless the caller puts a time in the provenance).
//!
//! Every sentence the renderers show comes from [`wording`], the terminal's included.
//!
//! Also here: the record of a solved case and the comparison a review makes
//! ([`record`]), and the spectrum trace prepared for plotting ([`plot`]).

pub mod html;
pub mod json_view;
pub mod library;
pub mod markdown;
pub mod plot;
pub mod record;
pub mod svg;
pub mod text;
pub mod view;
pub mod wording;

pub use view::{build, Provenance, ReportView};

/// A report format, chosen from the output file's extension.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Format {
    /// `.txt`: aligned plain text.
    Text,
    /// `.md`: Markdown.
    Markdown,
    /// `.json`: one JSON document.
    Json,
    /// `.html`: one self-contained page.
    Html,
}

impl Format {
    /// Every format with its file extension.
    pub const ALL: [(Format, &'static str); 4] = [
        (Format::Text, "txt"),
        (Format::Markdown, "md"),
        (Format::Json, "json"),
        (Format::Html, "html"),
    ];

    /// The format of a file extension (without the dot, case-insensitive).
    pub fn from_extension(ext: &str) -> Option<Format> {
        let lower = ext.to_ascii_lowercase();
        Format::ALL
            .iter()
            .find(|(_, e)| *e == lower)
            .map(|(f, _)| *f)
    }

    /// The file extension.
    pub fn extension(self) -> &'static str {
        Format::ALL
            .iter()
            .find(|(f, _)| *f == self)
            .map_or("txt", |(_, e)| e)
    }
}

/// One section of a report: appends itself, in its format, to the page.
pub(crate) type Section = fn(&mut String, &ReportView);

/// The sections of a report in one format. Every format shows the same sections in the
/// order [`Sections::render`] calls them, so the order is written once.
pub(crate) struct Sections {
    /// The title (and, for HTML, the document head) with the cautions in one sentence.
    pub head: Section,
    /// The sample block.
    pub sample: Section,
    /// The evidence the case holds.
    pub evidence: Section,
    /// Formula facts and the formula against the mass spectrum.
    pub formula: Section,
    /// The salt or hydrate reading and the mixture reading.
    pub salt_and_mixture: Section,
    /// The ranked candidates.
    pub candidates: Section,
    /// Observed bands against the leading candidates.
    pub band_assignments: Section,
    /// Ruled out, near misses, conflicts and discriminating checks.
    pub verdicts: Section,
    /// Library search, conclusion, review and notes.
    pub case_record: Section,
    /// Provenance and the cautions in full (and, for HTML, the end of the page).
    pub provenance: Section,
}

impl Sections {
    /// The page: every section, in order.
    pub fn render(&self, v: &ReportView) -> String {
        let mut s = String::new();
        for section in [
            self.head,
            self.sample,
            self.evidence,
            self.formula,
            self.salt_and_mixture,
            self.candidates,
            self.band_assignments,
            self.verdicts,
            self.case_record,
            self.provenance,
        ] {
            section(&mut s, v);
        }
        s
    }
}

/// The [`Sections`] of the renderer module that calls it: its section functions bear the
/// field names (`head` is named by the caller).
macro_rules! module_sections {
    ($head:ident) => {
        super::Sections {
            head: $head,
            sample,
            evidence,
            formula,
            salt_and_mixture,
            candidates,
            band_assignments,
            verdicts,
            case_record,
            provenance,
        }
    };
}
use module_sections;

/// Renders `view` in `format`.
pub fn render(view: &ReportView, format: Format) -> String {
    match format {
        Format::Text => text::render(view),
        Format::Markdown => markdown::render(view),
        Format::Json => {
            let mut doc = view.json.clone();
            doc.library = view.library.clone();
            json_view::render(&doc)
        }
        Format::Html => html::render(view),
    }
}

#[cfg(test)]
mod tests;
