//! Every schema error of a document, not only the first that `serde_yaml` stops at.
//!
//! `serde_yaml` gives up at the first problem. To find the others, the document is read
//! again with parts of it blanked out (overwritten with spaces, line breaks kept, so that
//! every byte keeps its offset and every line and column stays where it was): each entry
//! of a block mapping and each item of a block sequence is tried alone, and a part that
//! fails alone is searched the same way, down to the smallest part that still fails.
//! What is left of a part once its failing children are blanked is tried too (a missing
//! field of its own). Flow collections (`{ … }`, `[ … ]`) are not split: `serde_yaml`
//! already names the place inside them.
//!
//! Blanking can cause errors of its own, which are not reported: a required field blanked
//! away is "missing" only because of the blanking, and an item tried alone stands first in
//! its sequence (its index in the key path is put back).

use super::tree::{parse_tree, Node, NodeKind};
use super::{parse_path, split_serde_message, translate_error, Step};
use crate::diag::Diagnostic;
use serde::de::DeserializeOwned;
use std::marker::PhantomData;
use std::ops::Range;

/// Deserialises `src` into `T`; on failure, every schema error found (at least the one
/// [`super::from_str`] reports), each with its place, key path and "did you mean" hint, in
/// file order.
pub fn from_str_every_error<T: DeserializeOwned>(
    src: &str,
    origin: &str,
) -> Result<T, Vec<Diagnostic>> {
    let first = match serde_yaml::from_str::<T>(src) {
        Ok(value) => return Ok(value),
        Err(e) => e,
    };
    // A document that is not even YAML cannot be split into parts.
    let Ok(Some(root)) = parse_tree(src) else {
        return Err(vec![translate_error(&first, src, origin)]);
    };
    let mut search = Search::<T> {
        src,
        origin,
        found: Vec::new(),
        target: PhantomData,
    };
    search.node(&root, src.as_bytes(), &mut Vec::new());
    let mut found = search.found;
    // Never lose the error the one-error reader reports.
    let first = translate_error(&first, src, origin);
    if !found
        .iter()
        .any(|d| d.position == first.position && d.message == first.message)
    {
        found.push(first);
    }
    found.sort_by_key(|d| d.position.map(|p| (p.line, p.column)));
    found.dedup();
    Err(found)
}

/// One part of a node that can be tried alone.
struct Child<'n> {
    /// Its step from the node (a key, or an index).
    step: Step,
    /// The bytes that hold it (a mapping entry from its key, a sequence item from its
    /// dash).
    range: Range<usize>,
    /// The part itself.
    node: &'n Node,
}

/// The search for every error of one document.
struct Search<'s, T> {
    /// The document as written.
    src: &'s str,
    /// Its name in diagnostics.
    origin: &'s str,
    /// The errors found so far.
    found: Vec<Diagnostic>,
    /// The type the document is read into.
    target: PhantomData<T>,
}

impl<T: DeserializeOwned> Search<'_, T> {
    /// Searches `node` (at key path `path`) in `text`, the document with everything
    /// outside the path to `node` blanked; `node` fails in it.
    fn node(&mut self, node: &Node, text: &[u8], path: &mut Vec<Step>) {
        let children = children(self.src, node);
        let mut failing: Vec<usize> = Vec::new();
        for (i, child) in children.iter().enumerate() {
            let others = children
                .iter()
                .enumerate()
                .filter(|(j, _)| *j != i)
                .map(|(_, c)| c.range.clone());
            let alone = blank(text, others);
            path.push(child.step.clone());
            if let Err(e) = read::<T>(&alone) {
                // A field missing above the child is one of its blanked siblings.
                if missing_field(&e).is_none_or(|(depth, _)| depth >= path.len()) {
                    failing.push(i);
                    self.node(child.node, &alone, path);
                }
            }
            path.pop();
        }
        // Items of a sequence fail only on their own; a mapping may also miss a field,
        // unless every entry failed (then nothing of it is left to try).
        let is_seq = matches!(node.kind, NodeKind::Seq(_));
        if !failing.is_empty() && (is_seq || failing.len() == children.len()) {
            return;
        }
        let blanked_keys: Vec<&str> = failing
            .iter()
            .filter_map(|&i| match &children[i].step {
                Step::Key(k) => Some(k.as_str()),
                Step::Index(_) => None,
            })
            .collect();
        let rest = blank(text, failing.iter().map(|&i| children[i].range.clone()));
        if let Err(e) = read::<T>(&rest) {
            // Missing above this part: a blanked sibling of an ancestor; missing here: a
            // failing entry blanked just now.
            let caused_by_blanking = missing_field(&e).is_some_and(|(depth, field)| {
                depth < path.len()
                    || (depth == path.len() && blanked_keys.contains(&field.as_str()))
            });
            if !caused_by_blanking {
                let d = self.diagnostic(&e, path);
                self.found.push(d);
            }
        }
    }

    /// The diagnostic for error `e` met at `path`: as [`translate_error`] makes it, with
    /// the sequence indices of `path` put back into the key path.
    fn diagnostic(&self, e: &serde_yaml::Error, path: &[Step]) -> Diagnostic {
        let mut d = translate_error(e, self.src, self.origin);
        if let Some(written) = &d.key_path {
            let mut steps = parse_path(written);
            let mut changed = false;
            for (step, mine) in steps.iter_mut().zip(path) {
                if let (Step::Index(theirs), Step::Index(ours)) = (&*step, mine) {
                    if theirs != ours {
                        *step = Step::Index(*ours);
                        changed = true;
                    }
                }
            }
            if changed {
                d.key_path = Some(render_path(&steps));
            }
        }
        d
    }
}

/// For a "missing field" error: the depth of the mapping that misses it (the steps of its
/// key path) and the field's name.
fn missing_field(e: &serde_yaml::Error) -> Option<(usize, String)> {
    let (error_path, message) = split_serde_message(&e.to_string());
    let field = message
        .strip_prefix("missing field \"")?
        .split('"')
        .next()?
        .to_owned();
    let depth = error_path.as_deref().map_or(0, |p| parse_path(p).len());
    Some((depth, field))
}

/// Reads `text` (a blanked copy of the document) into `T`.
fn read<T: DeserializeOwned>(text: &[u8]) -> Result<T, serde_yaml::Error> {
    serde_yaml::from_str::<T>(&String::from_utf8_lossy(text))
}

/// The parts of a block mapping or block sequence that can be tried alone; none for a
/// scalar or a flow collection.
fn children<'n>(src: &str, node: &'n Node) -> Vec<Child<'n>> {
    let bytes = src.as_bytes();
    let is_flow = matches!(bytes.get(node.offset), Some(b'{' | b'['));
    if is_flow {
        return Vec::new();
    }
    match &node.kind {
        NodeKind::Map(entries) => entries
            .iter()
            .map(|e| Child {
                step: Step::Key(e.key.clone()),
                range: e.key_offset..e.value.end.max(e.key_offset),
                node: &e.value,
            })
            .collect(),
        NodeKind::Seq(items) => {
            let mut out = Vec::new();
            for (i, item) in items.iter().enumerate() {
                // The item's dash: the first non-blank byte before it on its line.
                let before = &bytes[..item.offset.min(bytes.len())];
                let dash = before
                    .iter()
                    .rposition(|b| !matches!(b, b' ' | b'\t'))
                    .filter(|&p| bytes[p] == b'-');
                let Some(dash) = dash else {
                    return Vec::new();
                };
                out.push(Child {
                    step: Step::Index(i),
                    range: dash..item.end.max(item.offset),
                    node: item,
                });
            }
            out
        }
        NodeKind::Scalar(_) | NodeKind::Alias => Vec::new(),
    }
}

/// `text` with the bytes of `ranges` overwritten by spaces (line breaks kept).
fn blank(text: &[u8], ranges: impl Iterator<Item = Range<usize>>) -> Vec<u8> {
    let mut out = text.to_vec();
    for r in ranges {
        let end = r.end.min(out.len());
        for b in &mut out[r.start.min(end)..end] {
            if *b != b'\n' && *b != b'\r' {
                *b = b' ';
            }
        }
    }
    out
}

/// A key path as `serde_yaml` writes it: `ir.bands[2].strength`.
fn render_path(steps: &[Step]) -> String {
    let mut out = String::new();
    for step in steps {
        match step {
            Step::Key(k) => {
                if !out.is_empty() {
                    out.push('.');
                }
                out.push_str(k);
            }
            Step::Index(i) => out.push_str(&format!("[{i}]")),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(serde::Deserialize, Debug)]
    #[serde(deny_unknown_fields)]
    #[allow(dead_code)]
    struct Doc {
        title: Option<String>,
        items: Option<Vec<Item>>,
    }

    #[derive(serde::Deserialize, Debug)]
    #[serde(deny_unknown_fields)]
    #[allow(dead_code)]
    struct Item {
        id: String,
        n: Option<u32>,
    }

    fn errors(text: &str) -> Vec<(usize, usize, Option<String>, String)> {
        from_str_every_error::<Doc>(text, "t.yaml")
            .unwrap_err()
            .into_iter()
            .map(|d| {
                let p = d.position.expect("every error has a place");
                (p.line, p.column, d.key_path, d.message)
            })
            .collect()
    }

    #[test]
    fn a_good_document_reads_as_before() {
        let doc = from_str_every_error::<Doc>("title: t\nitems:\n  - id: a\n", "t.yaml");
        assert!(doc.is_ok());
    }

    #[test]
    fn errors_in_two_items_and_at_the_top_are_all_reported_in_file_order() {
        let text = "titel: x\nitems:\n  - id: a\n    n: many\n  - id: b\n  - id: c\n    nn: 2\n";
        let found = errors(text);
        assert_eq!(found.len(), 3, "{found:#?}");
        assert_eq!((found[0].0, found[0].1), (0, 0));
        assert!(
            found[0].3.starts_with("unknown field \"titel\""),
            "{found:#?}"
        );
        assert_eq!((found[1].0, found[1].2.as_deref()), (3, Some("items[0].n")));
        assert_eq!((found[2].0, found[2].1), (6, 4));
        assert_eq!(found[2].2.as_deref(), Some("items[2]"), "{found:#?}");
        assert!(found[2].3.starts_with("unknown field \"nn\""), "{found:#?}");
    }

    #[test]
    fn a_required_field_missing_is_reported_once_and_blanking_invents_none() {
        // Item 1 lacks `id`; item 0's bad `n` must not make `id` look missing there.
        let text = "items:\n  - id: a\n    n: x\n  - n: 3\n";
        let found = errors(text);
        assert_eq!(found.len(), 2, "{found:#?}");
        assert_eq!(found[0].2.as_deref(), Some("items[0].n"), "{found:#?}");
        assert_eq!(found[1].2.as_deref(), Some("items[1]"), "{found:#?}");
        assert!(found[1].3.starts_with("missing field \"id\""), "{found:#?}");
    }

    #[test]
    fn a_bad_required_value_is_not_also_reported_missing() {
        // `id` is required: blanking its bad value to look further must not add "missing
        // field id"; an item whose only key is misspelt is not also "not an item".
        let text = "items:\n  - id: [1]\n    n: 2\n  - idd: b\n";
        let found = errors(text);
        assert_eq!(found.len(), 2, "{found:#?}");
        assert_eq!(found[0].2.as_deref(), Some("items[0].id"), "{found:#?}");
        assert!(found[0].3.starts_with("invalid type"), "{found:#?}");
        assert_eq!(found[1].2.as_deref(), Some("items[1]"), "{found:#?}");
        assert!(
            found[1].3.starts_with("unknown field \"idd\""),
            "{found:#?}"
        );
    }

    #[test]
    fn a_single_error_is_the_one_serde_yaml_reports() {
        let text = "items:\n  - { id: a, n: -1 }\n";
        let one = errors(text);
        let serde = super::super::from_str::<Doc>(text, "t.yaml").unwrap_err();
        assert_eq!(one.len(), 1, "{one:#?}");
        assert_eq!(one[0].3, serde.message);
        assert_eq!(one[0].2, serde.key_path);
    }

    #[test]
    fn text_that_is_not_yaml_gives_its_one_syntax_error() {
        let found = errors("items: [unclosed\n");
        assert_eq!(found.len(), 1, "{found:#?}");
    }
}
