//! What a reference spectrum is: name, formula, phase and the rest, from the file's own
//! header (`##TITLE=`, `##MOLFORM=`, `##CAS REGISTRY NO=`, `##STATE=`, `##SAMPLING
//! PROCEDURE=`) and from an optional side file `NAME.yaml` beside `NAME.jdx`, whose fields
//! win. Groups and SMILES are kept as written: this layer does not interpret them.
//!
//! Side file (every key optional, unknown keys refused):
//!
//! ```yaml
//! name: 2-butanone
//! formula: C4H8O
//! phase: vapour            # vapour | condensed
//! technique: gas           # free text; ATR, KBr, film, solution, mull, gas imply the phase
//! cas: 78-93-3
//! smiles: CCC(C)=O
//! groups: { ketone_saturated: 1 }
//! source: where the spectrum came from
//! notes: free text
//! ```

use crate::chem::Formula;
use crate::diag::{closest_match, Diagnostic};
use crate::ir::jcamp::ldr::normalise_label;
use crate::ir::HeaderSummary;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// The sample phase of a spectrum: vapour and condensed-phase spectra of one compound
/// differ (band positions, widths, hydrogen bonding, rotational contours), so they are
/// never compared silently.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Phase {
    /// Gas or vapour (gas cell, GC-IR).
    Vapour,
    /// Liquid, solid or solution (ATR, KBr, film, mull, solution cell).
    Condensed,
    /// Not stated.
    Unknown,
}

impl Phase {
    /// The word used in files and reports.
    pub fn word(self) -> &'static str {
        match self {
            Phase::Vapour => "vapour",
            Phase::Condensed => "condensed",
            Phase::Unknown => "not stated",
        }
    }

    /// The phase a sampling word implies (`gas`, `vapor`, `ATR`, `KBr`, `film`, …).
    pub fn from_word(word: &str) -> Option<Phase> {
        let w = word.trim().to_ascii_lowercase();
        let vapour = ["gas", "vapour", "vapor"];
        let condensed = [
            "condensed",
            "atr",
            "kbr",
            "film",
            "solution",
            "mull",
            "liquid",
            "solid",
        ];
        if vapour.contains(&w.as_str()) {
            Some(Phase::Vapour)
        } else if condensed.contains(&w.as_str()) {
            Some(Phase::Condensed)
        } else {
            None
        }
    }

    /// The phase a JCAMP-DX `##STATE=` or `##SAMPLING PROCEDURE=` text states, when it
    /// says one (`GAS (150 mmHg, N2 ADDED)`, `VAPOR`, `liquid film`, `ATR, diamond`).
    pub fn from_header_text(text: &str) -> Option<Phase> {
        let t = text.to_ascii_lowercase();
        let words: Vec<&str> = t
            .split(|c: char| !c.is_ascii_alphanumeric())
            .filter(|w| !w.is_empty())
            .collect();
        let has = |list: &[&str]| words.iter().any(|w| list.contains(w));
        if has(&["gas", "vapour", "vapor", "gaseous"]) {
            Some(Phase::Vapour)
        } else if has(&[
            "liquid", "solid", "solution", "film", "neat", "atr", "kbr", "pellet", "mull",
            "crystal", "powder", "melt",
        ]) {
            Some(Phase::Condensed)
        } else {
            None
        }
    }
}

/// A side file as written.
#[derive(Clone, Debug, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSide {
    /// Compound name.
    pub name: Option<String>,
    /// Molecular formula.
    pub formula: Option<String>,
    /// `vapour` or `condensed`.
    pub phase: Option<String>,
    /// Sampling technique (free text).
    pub technique: Option<String>,
    /// CAS registry number.
    pub cas: Option<String>,
    /// SMILES.
    pub smiles: Option<String>,
    /// Catalogue group ids with counts.
    pub groups: Option<BTreeMap<String, u32>>,
    /// Where the spectrum came from.
    pub source: Option<String>,
    /// Free notes.
    pub notes: Option<String>,
}

/// What the library knows about one reference.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct Metadata {
    /// Compound name (side file, else the file's title, else the file name).
    pub name: String,
    /// Molecular formula in Hill order, when stated and readable.
    pub formula: Option<String>,
    /// The formula as written (`C H3 C O C H3`), when stated.
    pub formula_written: Option<String>,
    /// Where the formula came from: `side file` or `##MOLFORM=`.
    pub formula_source: Option<String>,
    /// The phase.
    pub phase: Option<Phase>,
    /// Where the phase came from (`##STATE=GAS`, `side file`).
    pub phase_source: Option<String>,
    /// Sampling technique as written in the side file.
    pub technique: Option<String>,
    /// CAS registry number.
    pub cas: Option<String>,
    /// SMILES as written.
    pub smiles: Option<String>,
    /// Catalogue group ids as written (empty: not stated).
    pub groups: BTreeMap<String, u32>,
    /// Where the spectrum came from.
    pub source: Option<String>,
    /// Free notes.
    pub notes: Option<String>,
}

impl Metadata {
    /// The phase, `Unknown` when not stated.
    pub fn phase(&self) -> Phase {
        self.phase.unwrap_or(Phase::Unknown)
    }
}

/// A molecular-formula field as files write it, made readable by the formula parser:
/// leading locants dropped (`1,2-( C H3)2 C6 H4`), bond marks dropped (`C H2: C H C N`),
/// counts joined to their symbol (`C 4 H 8`). Whitespace between units is kept (the
/// parser accepts it).
///
/// ```text
/// molform   := locants? units
/// locants   := digits ("," digits)* "-"
/// units     := anything the formula grammar reads, with ":" and "=" as bond marks and
///              "symbol ws digits" as one unit
/// ```
pub fn normalise_molform(text: &str) -> String {
    let mut t = text.trim();
    // Locants: digits and commas up to a dash.
    if let Some(dash) = t.find('-') {
        let head = &t[..dash];
        if !head.is_empty() && head.chars().all(|c| c.is_ascii_digit() || c == ',') {
            t = &t[dash + 1..];
        }
    }
    let cleaned: String = t
        .chars()
        .map(|c| if c == ':' || c == '=' { ' ' } else { c })
        .collect();
    // Join "C 4" into "C4": a run of digits after whitespace that follows a letter or a
    // closing bracket belongs to it.
    let chars: Vec<char> = cleaned.chars().collect();
    let mut out = String::with_capacity(chars.len());
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        if c.is_whitespace() {
            let mut j = i;
            while j < chars.len() && chars[j].is_whitespace() {
                j += 1;
            }
            let prev = out.chars().last();
            let next = chars.get(j).copied();
            let joins = prev.is_some_and(|p| p.is_ascii_alphabetic() || p == ')' || p == ']')
                && next.is_some_and(|n| n.is_ascii_digit());
            if !joins {
                out.push(' ');
            }
            i = j;
            continue;
        }
        out.push(c);
        i += 1;
    }
    out.trim().to_owned()
}

/// Reads a reference's formula (side file or `##MOLFORM=`), neutral, in Hill order.
pub fn read_formula(text: &str) -> Result<String, String> {
    let normalised = normalise_molform(text);
    let formula = Formula::parse(&normalised).map_err(|e| e.kind.to_string())?;
    if formula.charge() != 0 {
        return Err("the formula is charged; give the neutral molecule".to_owned());
    }
    if formula.is_empty() {
        return Err("the formula is empty".to_owned());
    }
    Ok(formula.to_string())
}

fn header_value<'a>(header: &'a HeaderSummary, label: &str) -> Option<&'a str> {
    header
        .fields
        .iter()
        .find(|f| normalise_label(&f.label) == label)
        .map(|f| f.value.trim())
        .filter(|v| !v.is_empty())
}

/// The metadata of one reference: from its header (`None` for two-column text), its file
/// stem, and its side file `(text, origin)` when there is one. Problems come back as
/// diagnostics (a bad side file is an error; a missing or unreadable formula a warning);
/// the metadata is `None` only when the side file cannot be used.
pub fn metadata(
    header: Option<&HeaderSummary>,
    origin: &str,
    stem: &str,
    side: Option<(&str, &str)>,
) -> (Option<Metadata>, Vec<Diagnostic>) {
    let mut diagnostics = Vec::new();
    let raw = match read_side(side) {
        Ok(raw) => raw,
        Err(d) => return (None, vec![*d]),
    };
    let side_origin = side.map_or(origin, |(_, o)| o);
    let mut m = Metadata::default();
    let title = header
        .and_then(|h| h.title.clone())
        .filter(|t| !t.trim().is_empty());
    m.name = raw
        .name
        .clone()
        .or(title)
        .unwrap_or_else(|| stem.to_owned());
    let places = Places {
        origin,
        side_origin,
        stem,
    };
    if let Some(d) = places.fill_formula(&mut m, &raw, header) {
        diagnostics.push(d);
    }
    match phase(&raw, header, side, side_origin) {
        Ok(found) => {
            if let Some((p, from)) = found {
                m.phase = Some(p);
                m.phase_source = Some(from);
            }
        }
        Err(d) => {
            diagnostics.push(*d);
            return (None, diagnostics);
        }
    }
    m.technique = raw.technique;
    m.cas = raw
        .cas
        .or_else(|| header.and_then(|h| header_value(h, "CASREGISTRYNO").map(str::to_owned)));
    m.smiles = raw.smiles;
    m.groups = raw.groups.unwrap_or_default();
    m.source = raw
        .source
        .or_else(|| header.and_then(|h| header_value(h, "ORIGIN").map(str::to_owned)));
    m.notes = raw.notes;
    (Some(m), diagnostics)
}

/// The side file `(text, origin)` read (empty when there is none or it is empty).
fn read_side(side: Option<(&str, &str)>) -> Result<RawSide, Box<Diagnostic>> {
    let Some((src, side_origin)) = side else {
        return Ok(RawSide::default());
    };
    crate::yaml::from_str::<Option<RawSide>>(src, side_origin).map(Option::unwrap_or_default)
}

/// Where a reference's metadata comes from, for diagnostics.
struct Places<'a> {
    /// The spectrum file.
    origin: &'a str,
    /// The side file (the spectrum file when there is none).
    side_origin: &'a str,
    /// The spectrum file's stem.
    stem: &'a str,
}

impl Places<'_> {
    /// Fills the formula fields of `m`: the side file wins over the header's `##MOLFORM=`.
    /// A missing or unreadable formula is a warning.
    fn fill_formula(
        &self,
        m: &mut Metadata,
        raw: &RawSide,
        header: Option<&HeaderSummary>,
    ) -> Option<Diagnostic> {
        let written = match (
            &raw.formula,
            header.and_then(|h| header_value(h, "MOLFORM")),
        ) {
            (Some(f), _) => Some((f.clone(), "side file", self.side_origin)),
            (None, Some(f)) => Some((f.to_owned(), "##MOLFORM=", self.origin)),
            (None, None) => None,
        };
        let Some((text, from, place)) = written else {
            return Some(
                Diagnostic::warning(
                    self.origin,
                    "no formula: the reference is searched but its hits cannot be checked against the case's formula",
                )
                .with_help(format!(
                    "add `formula:` to a side file {}.yaml or a ##MOLFORM= record",
                    self.stem
                )),
            );
        };
        m.formula_written = Some(text.clone());
        m.formula_source = Some(from.to_owned());
        match read_formula(&text) {
            Ok(hill) => {
                m.formula = Some(hill);
                None
            }
            Err(why) => Some(
                Diagnostic::warning(
                    place,
                    format!("the formula \"{text}\" ({from}) cannot be read: {why}"),
                )
                .with_help("write it as e.g. C4H8O"),
            ),
        }
    }
}

/// The reference's phase and where it was found: the side file (phase, then technique),
/// then the header's STATE and SAMPLING PROCEDURE. An unknown side-file phase is an error.
fn phase(
    raw: &RawSide,
    header: Option<&HeaderSummary>,
    side: Option<(&str, &str)>,
    side_origin: &str,
) -> Result<Option<(Phase, String)>, Box<Diagnostic>> {
    if let Some(word) = &raw.phase {
        let Some(p) = Phase::from_word(word) else {
            return Err(Box::new(unknown_phase(word, side, side_origin)));
        };
        return Ok(Some((p, "side file".to_owned())));
    }
    if let Some(p) = raw.technique.as_deref().and_then(Phase::from_word) {
        return Ok(Some((p, "side file technique".to_owned())));
    }
    let Some(h) = header else {
        return Ok(None);
    };
    for label in ["STATE", "SAMPLINGPROCEDURE"] {
        if let Some(v) = header_value(h, label) {
            if let Some(p) = Phase::from_header_text(v) {
                return Ok(Some((p, format!("##{label}={v}"))));
            }
        }
    }
    Ok(None)
}

/// The error for a side-file phase word that names no phase, placed on its value.
fn unknown_phase(word: &str, side: Option<(&str, &str)>, side_origin: &str) -> Diagnostic {
    let help = closest_match(word, ["vapour", "condensed"]).map_or_else(
        || "expected vapour or condensed".to_owned(),
        |w| format!("did you mean \"{w}\"?"),
    );
    let mut d = Diagnostic::error(side_origin, format!("unknown phase \"{word}\""))
        .with_key_path("phase")
        .with_help(help);
    if let Some((src, _)) = side {
        if let Some(at) = crate::yaml::locate_value(src, &crate::yaml::KeyPath::key("phase")) {
            d = d.at_offset(src, at);
        }
    }
    d
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn molecular_formula_fields_as_files_write_them_are_read() {
        // Spellings found in the ##MOLFORM= records of the measured gas-phase corpus
        // (tests/fixtures/ir/measured-gas), each against the compound's formula.
        let table = [
            ("C H3 C O C H3", "C3H6O"),
            ("1,2-( C H3)2 C6 H4", "C8H10"),
            ("C H2: C H C H: C H2", "C4H6"),
            ("( C H3)3 C O C2 H5", "C6H14O"),
            ("C H3 C H( O H) C H3", "C3H8O"),
            ("C 4 H 8", "C4H8"),
            ("H 2 O", "H2O"),
            ("C H3 C O2 C H: C H2", "C4H6O2"),
            ("S F6", "F6S"),
            ("C4H8O", "C4H8O"),
        ];
        for (written, hill) in table {
            assert_eq!(read_formula(written).as_deref(), Ok(hill), "{written}");
        }
        assert!(read_formula("C H3 X").is_err());
        assert!(read_formula("").is_err());
    }

    #[test]
    fn header_states_give_the_phase() {
        for (text, phase) in [
            ("GAS (150 mmHg, N2 ADDED)", Some(Phase::Vapour)),
            ("VAPOR", Some(Phase::Vapour)),
            ("gas", Some(Phase::Vapour)),
            ("liquid film", Some(Phase::Condensed)),
            ("ATR, diamond", Some(Phase::Condensed)),
            ("unknown", None),
        ] {
            assert_eq!(Phase::from_header_text(text), phase, "{text}");
        }
    }

    #[test]
    fn a_side_file_wins_and_a_bad_one_is_an_error_with_its_place() {
        let (m, d) = metadata(
            None,
            "lib/a.csv",
            "a",
            Some((
                "name: acetone\nformula: C3H6O\nphase: condensed\n",
                "lib/a.yaml",
            )),
        );
        let m = m.expect("metadata");
        assert!(d.is_empty(), "{d:?}");
        assert_eq!(m.name, "acetone");
        assert_eq!(m.formula.as_deref(), Some("C3H6O"));
        assert_eq!(m.phase(), Phase::Condensed);
        let (m, d) = metadata(None, "lib/a.csv", "a", Some(("nmae: x\n", "lib/a.yaml")));
        assert!(m.is_none());
        assert!(d[0].to_string().contains("lib/a.yaml:1:1"), "{}", d[0]);
        let (m, d) = metadata(
            None,
            "lib/a.csv",
            "a",
            Some(("phase: vapor-ish\n", "lib/a.yaml")),
        );
        assert!(m.is_none());
        let bad = d.iter().find(|d| d.is_error()).expect("an error");
        assert!(bad.message.contains("unknown phase"), "{bad}");
        assert!(bad.to_string().contains("lib/a.yaml:1:8"), "{bad}");
    }

    #[test]
    fn a_missing_formula_is_a_warning_and_the_reference_stays() {
        let (m, d) = metadata(None, "lib/b.csv", "b", None);
        let m = m.expect("kept");
        assert_eq!(m.name, "b");
        assert!(m.formula.is_none());
        assert!(!d[0].is_error() && d[0].message.starts_with("no formula"));
    }
}
