//! A locator that finds the line and column of a key path in YAML text, so that checks
//! made after deserialising a case can still point at the input.
//!
//! It walks the marked tree of [`super::tree`], which knows every key's and item's byte
//! offset. When it cannot follow a path to the end it returns the deepest place it
//! reached, so a diagnostic always lands near its cause.

use super::tree::{parse_tree, Node};
use super::Step;

/// A key path such as `ir.bands[2].at`, kept as steps and printable.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct KeyPath(pub Vec<Step>);

impl KeyPath {
    /// The path of a top-level key.
    pub fn key(name: &str) -> KeyPath {
        KeyPath(vec![Step::Key(name.to_owned())])
    }

    /// This path extended by a key.
    pub fn with_key(&self, name: &str) -> KeyPath {
        let mut steps = self.0.clone();
        steps.push(Step::Key(name.to_owned()));
        KeyPath(steps)
    }

    /// This path extended by an index.
    pub fn with_index(&self, index: usize) -> KeyPath {
        let mut steps = self.0.clone();
        steps.push(Step::Index(index));
        KeyPath(steps)
    }
}

impl std::fmt::Display for KeyPath {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        for (i, step) in self.0.iter().enumerate() {
            match step {
                Step::Key(k) if i == 0 => write!(f, "{k}")?,
                Step::Key(k) => write!(f, ".{k}")?,
                Step::Index(n) => write!(f, "[{n}]")?,
            }
        }
        Ok(())
    }
}

/// Byte offset of the place `path` names in `src` (the key, or the start of the item),
/// or of the deepest ancestor that could be found; `None` when not even the first step
/// was found (or the text is not YAML).
pub fn locate(src: &str, path: &KeyPath) -> Option<usize> {
    walk(src, path, false)
}

/// Like [`locate`], but for a path ending in a key whose value sits on the key's own line,
/// the offset of the value itself (where a bad word or number sits) rather than of its key.
pub fn locate_value(src: &str, path: &KeyPath) -> Option<usize> {
    walk(src, path, true)
}

/// Follows `path` through the marked tree of `src` as far as it exists.
fn walk(src: &str, path: &KeyPath, want_value: bool) -> Option<usize> {
    let root = parse_tree(src).ok()??;
    let mut node: &Node = &root;
    let mut best = None;
    for (i, step) in path.0.iter().enumerate() {
        match step {
            Step::Key(k) => {
                let Some(entry) = node.get(k) else { break };
                best = Some(entry.key_offset);
                let last = i + 1 == path.0.len();
                let same_line =
                    !src[entry.key_offset..entry.value.offset.min(src.len())].contains('\n');
                if last && want_value && same_line {
                    best = Some(entry.value.offset);
                }
                node = &entry.value;
            }
            Step::Index(n) => match node.items().get(*n) {
                Some(item) => {
                    best = Some(item.offset);
                    node = item;
                }
                None => break,
            },
        }
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_path_lands_on_its_key_its_value_or_its_deepest_ancestor() {
        let src = "ir:\n  bands:\n    - { at: 1715, strength: strong }\nms:\n  ion: M+.\n";
        let at = |o: Option<usize>| o.map(|o| &src[o..o + 3]);
        let ion = KeyPath::key("ms").with_key("ion");
        assert_eq!(at(locate(src, &ion)), Some("ion"));
        assert_eq!(at(locate_value(src, &ion)), Some("M+."));
        let band = KeyPath::key("ir").with_key("bands").with_index(0);
        assert_eq!(at(locate_value(src, &band.with_key("at"))), Some("171"));
        // A block value is pointed at by its key; a missing step by the deepest ancestor.
        assert_eq!(at(locate_value(src, &KeyPath::key("ir"))), Some("ir:"));
        assert_eq!(at(locate(src, &band.with_key("shape"))), Some("{ a"));
        assert_eq!(locate(src, &KeyPath::key("sample")), None);
    }
}
