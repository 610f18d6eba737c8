//! The only module that touches YAML libraries (both are kept here so that a later swap is
//! cheap; `serde_yaml` is archived).
//!
//! Two readers, each for what it does best:
//! - `serde_yaml` turns text (a whole case file, or one rules-file list item) into a raw
//!   serde struct with `deny_unknown_fields` and says where it failed ([`from_str`],
//!   [`deserialize_item`]);
//! - a *marked tree* built from `yaml_rust2`'s event parser ([`tree`]) knows the byte
//!   offset of every key and value, so that semantic problems found after deserialising
//!   can be reported at `file:line:column`.
//!
//! [`locate`] finds a [`KeyPath`] in case-file text for the same purpose;
//! [`from_str_every_error`] reports every schema error of a document, not only the first.

mod every_error;
mod locate;
pub(crate) mod tree;

pub use every_error::from_str_every_error;
pub use locate::{locate, locate_value, KeyPath};
pub(crate) use tree::{offset_of, parse_tree, Node, NodeKind};

use crate::diag::{closest_match, Diagnostic, Position};
use serde::de::DeserializeOwned;

/// One step of a key path: a mapping key or a sequence index.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Step {
    /// A mapping key.
    Key(String),
    /// A 0-based sequence index.
    Index(usize),
}

/// Deserialises `src` into `T`; a failure becomes one diagnostic with its place, the key
/// path serde_yaml reports, and a "did you mean" hint for unknown fields.
pub fn from_str<T: DeserializeOwned>(src: &str, origin: &str) -> Result<T, Box<Diagnostic>> {
    serde_yaml::from_str::<T>(src).map_err(|e| Box::new(translate_error(&e, src, origin)))
}

fn translate_error(e: &serde_yaml::Error, src: &str, origin: &str) -> Diagnostic {
    let (key_path, message) = split_serde_message(&e.to_string());
    let mut d = Diagnostic::error(origin, message.clone());
    if let Some(location) = e.location() {
        d = d.at_offset(src, location.index());
    }
    if let Some(path) = key_path {
        d = d.with_key_path(path);
    }
    if let Some(help) = unknown_field_hint(&message) {
        d = d.with_help(help);
    }
    d
}

/// From `unknown field "strenght", expected one of "at", "strength"`, the hint
/// `did you mean "strength"?`.
fn unknown_field_hint(message: &str) -> Option<String> {
    let rest = message.strip_prefix("unknown field \"")?;
    let (field, rest) = rest.split_once('"')?;
    let expected: Vec<&str> = rest.split('"').skip(1).step_by(2).collect();
    let best = closest_match(field, expected.iter().copied())?;
    Some(format!("did you mean \"{best}\"?"))
}

/// Lower-cases the first letter of a library message, per the diagnostics convention.
fn lower_first(message: &str) -> String {
    let mut chars = message.chars();
    match chars.next() {
        Some(c) => c.to_lowercase().chain(chars).collect(),
        None => String::new(),
    }
}

/// A failure to turn one item's text into its raw type.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct ItemError {
    /// 0-based place in the whole file, when known.
    pub position: Option<Position>,
    /// Key path inside the item as `serde_yaml` names it (e.g. `bands[0].range`), if any.
    pub inner_path: Option<String>,
    /// Lower-case message without position or path.
    pub message: String,
}

/// Deserializes the list item `node` of `text` into `T`.
///
/// The item's text is cut out of the file and re-indented so that it is a YAML document on
/// its own; error positions are mapped back into the whole file. Doing this per item lets
/// the loader report a problem in every item, not just the first of the file.
pub(crate) fn deserialize_item<T: DeserializeOwned>(
    text: &str,
    node: &Node,
) -> Result<T, ItemError> {
    let start = node.offset;
    let end = node.end.min(text.len()).max(start);
    let line_start = text[..start].rfind('\n').map_or(0, |i| i + 1);
    // Replace everything on the first line before the item (e.g. `  - `) by spaces, so
    // that every line keeps its column.
    let pad: String = text[line_start..start]
        .chars()
        .map(|c| if c == '\t' { '\t' } else { ' ' })
        .collect();
    let snippet = format!("{pad}{}", &text[start..end]);
    serde_yaml::from_str::<T>(&snippet).map_err(|e| {
        // serde_yaml reports 1-based line and column; the snippet keeps the file's columns
        // (the pad has as many characters as it replaces) and starts on the item's line.
        let first_line = text[..line_start].matches('\n').count();
        let position = e.location().map(|l| Position {
            line: first_line + l.line().saturating_sub(1),
            column: l.column().saturating_sub(1),
        });
        let (inner_path, message) = split_serde_message(&e.to_string());
        ItemError {
            position,
            inner_path,
            message: lower_first(&message),
        }
    })
}

/// Splits a `serde_yaml` message `path: message at line L column C` into its path and the
/// message without the position (the place is shown separately), backquotes turned to `"`.
fn split_serde_message(raw: &str) -> (Option<String>, String) {
    let without_position = match raw.rfind(" at line ") {
        Some(i) => &raw[..i],
        None => raw,
    };
    // serde_yaml prefixes the path inside the document when it is not the root.
    let (path, message) = match without_position.split_once(": ") {
        Some((p, m)) if !p.contains(' ') && !p.is_empty() && p != "." => (Some(p.to_owned()), m),
        _ => (None, without_position),
    };
    (path, message.replace('`', "\""))
}

/// Parses the key-path text `serde_yaml` reports (`bands[0].range`) into steps.
pub(crate) fn parse_path(text: &str) -> Vec<Step> {
    let mut steps = Vec::new();
    for part in text.split('.') {
        let (key, indices) = match part.find('[') {
            Some(i) => (&part[..i], &part[i..]),
            None => (part, ""),
        };
        if !key.is_empty() {
            steps.push(Step::Key(key.to_owned()));
        }
        for index in indices.split('[').filter(|s| !s.is_empty()) {
            if let Ok(i) = index.trim_end_matches(']').parse() {
                steps.push(Step::Index(i));
            }
        }
    }
    steps
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn item_errors_point_into_the_whole_file() {
        #[derive(serde::Deserialize, Debug)]
        #[serde(deny_unknown_fields)]
        #[allow(dead_code)]
        struct Item {
            id: String,
            n: u32,
        }
        let text = "items:\n  - id: a\n    n: 1\n  - id: b\n    nn: 2\n";
        let root = parse_tree(text).unwrap().unwrap();
        let items = root.get("items").unwrap().value.items();
        assert!(deserialize_item::<Item>(text, &items[0]).is_ok());
        let err = deserialize_item::<Item>(text, &items[1]).unwrap_err();
        let p = err.position.unwrap();
        assert_eq!(p, Position { line: 4, column: 4 }, "{err:?}");
        assert!(err.message.starts_with("unknown field \"nn\""), "{err:?}");
    }
}
