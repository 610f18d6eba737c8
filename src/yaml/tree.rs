//! A *marked tree* built from `yaml_rust2`'s event parser: it knows the byte offset of
//! every key and value, so that semantic problems (an inverted range, an unknown id) can be
//! reported at `file:line:column`.

use super::{lower_first, Step};
use yaml_rust2::parser::{Event, MarkedEventReceiver, Parser};
use yaml_rust2::scanner::Marker;

/// A YAML node with the byte offset where it starts.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Node {
    /// Byte offset of the node's first character in the text.
    pub offset: usize,
    /// Byte offset just past the node (start of whatever follows it).
    pub end: usize,
    /// What the node is.
    pub kind: NodeKind,
}

/// The shape of a node.
#[derive(Clone, Debug, PartialEq)]
pub(crate) enum NodeKind {
    /// A scalar, as written (quotes removed).
    Scalar(String),
    /// A sequence.
    Seq(Vec<Node>),
    /// A mapping, entries in file order.
    Map(Vec<Entry>),
    /// An alias (`*name`); the catalogue does not use anchors, so aliases are kept opaque.
    Alias,
}

/// One key of a mapping with its value.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Entry {
    /// The key as text (non-scalar keys become `<complex key>`).
    pub key: String,
    /// Byte offset of the key.
    pub key_offset: usize,
    /// The value.
    pub value: Node,
}

impl Node {
    /// The entries of a mapping (empty for anything else).
    pub fn entries(&self) -> &[Entry] {
        match &self.kind {
            NodeKind::Map(entries) => entries,
            _ => &[],
        }
    }

    /// The items of a sequence (empty for anything else).
    pub fn items(&self) -> &[Node] {
        match &self.kind {
            NodeKind::Seq(items) => items,
            _ => &[],
        }
    }

    /// The entry for `key`, if this is a mapping holding it.
    pub fn get(&self, key: &str) -> Option<&Entry> {
        self.entries().iter().find(|e| e.key == key)
    }

    /// True for a plain empty scalar (YAML null written as nothing, `~` or `null`).
    pub fn is_null(&self) -> bool {
        matches!(&self.kind, NodeKind::Scalar(s) if s.is_empty() || s == "~" || s == "null")
    }
}

/// The byte offset best describing `path` under `root`: the key of the last mapping step
/// found, or the item of the last index step found (the deepest point that exists).
pub(crate) fn offset_of(root: &Node, path: &[Step]) -> usize {
    let mut node = root;
    let mut offset = root.offset;
    for step in path {
        match step {
            Step::Key(k) => match node.get(k) {
                Some(entry) => {
                    offset = entry.key_offset;
                    node = &entry.value;
                }
                None => break,
            },
            Step::Index(i) => match node.items().get(*i) {
                Some(item) => {
                    offset = item.offset;
                    node = item;
                }
                None => break,
            },
        }
    }
    offset
}

/// A YAML syntax error with its byte offset.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct YamlError {
    /// Byte offset of the problem, when the library says.
    pub offset: Option<usize>,
    /// Lower-case message without position.
    pub message: String,
}

/// Collects the parser's events with their markers.
struct Recorder {
    events: Vec<(Event, Marker)>,
}

impl MarkedEventReceiver for Recorder {
    fn on_event(&mut self, event: Event, mark: Marker) {
        self.events.push((event, mark));
    }
}

/// Parses `text` into a marked tree. An empty document yields `None`.
pub(crate) fn parse_tree(text: &str) -> Result<Option<Node>, YamlError> {
    let mut recorder = Recorder { events: Vec::new() };
    let mut parser = Parser::new_from_str(text);
    // Markers count characters; diagnostics want byte offsets.
    let char_starts: Vec<usize> = text.char_indices().map(|(b, _)| b).collect();
    let to_byte = |char_index: usize| char_starts.get(char_index).copied().unwrap_or(text.len());
    parser.load(&mut recorder, true).map_err(|e| YamlError {
        offset: Some(to_byte(e.marker().index())),
        message: lower_first(e.info()),
    })?;
    let events: Vec<(Event, usize)> = recorder
        .events
        .into_iter()
        .map(|(e, m)| (e, to_byte(m.index())))
        .collect();
    let documents = events
        .iter()
        .filter(|(e, _)| *e == Event::DocumentStart)
        .count();
    if documents > 1 {
        let second = events
            .iter()
            .filter(|(e, _)| *e == Event::DocumentStart)
            .nth(1)
            .map(|(_, o)| *o);
        return Err(YamlError {
            offset: second,
            message: "a rules file holds one YAML document".to_owned(),
        });
    }
    let mut cursor = events
        .iter()
        .position(|(e, _)| *e == Event::DocumentStart)
        .map_or(events.len(), |i| i + 1);
    if cursor >= events.len() || events[cursor].0 == Event::DocumentEnd {
        return Ok(None);
    }
    let mut node = build(&events, &mut cursor, text.len());
    fix_ends(text, &mut node);
    Ok(Some(node))
}

/// Builds the node starting at `events[*cursor]`, leaving the cursor after it.
fn build(events: &[(Event, usize)], cursor: &mut usize, text_len: usize) -> Node {
    let (event, offset) = &events[*cursor];
    let offset = *offset;
    *cursor += 1;
    let kind = match event {
        Event::Scalar(value, ..) => NodeKind::Scalar(value.clone()),
        Event::SequenceStart(..) => {
            let mut items = Vec::new();
            while *cursor < events.len() && events[*cursor].0 != Event::SequenceEnd {
                items.push(build(events, cursor, text_len));
            }
            *cursor += 1;
            NodeKind::Seq(items)
        }
        Event::MappingStart(..) => {
            let mut entries = Vec::new();
            while *cursor < events.len() && events[*cursor].0 != Event::MappingEnd {
                let key_node = build(events, cursor, text_len);
                let key = match &key_node.kind {
                    NodeKind::Scalar(s) => s.clone(),
                    _ => "<complex key>".to_owned(),
                };
                if *cursor >= events.len() || events[*cursor].0 == Event::MappingEnd {
                    break;
                }
                let value = build(events, cursor, text_len);
                entries.push(Entry {
                    key,
                    key_offset: key_node.offset,
                    value,
                });
            }
            *cursor += 1;
            NodeKind::Map(entries)
        }
        _ => NodeKind::Alias,
    };
    // A block mapping's start marker can sit after its first key; the key is the start.
    let offset = match &kind {
        NodeKind::Map(entries) => entries.first().map_or(offset, |e| e.key_offset.min(offset)),
        _ => offset,
    };
    // A node ends where the next event starts (its end marker for collections).
    let end = events
        .get(*cursor)
        .map_or(text_len, |(_, o)| *o)
        .max(offset);
    Node { offset, end, kind }
}

/// Applies [`trim_item_ends`] to every sequence of the tree.
fn fix_ends(text: &str, node: &mut Node) {
    match &mut node.kind {
        NodeKind::Seq(items) => {
            trim_item_ends(text, items);
            for item in items.iter_mut() {
                fix_ends(text, item);
            }
        }
        NodeKind::Map(entries) => {
            for entry in entries.iter_mut() {
                fix_ends(text, &mut entry.value);
            }
        }
        _ => {}
    }
}

/// Cuts each block-sequence item at the start of the line of the next item, so that an
/// item's text never holds the next item's `- ` indicator.
fn trim_item_ends(text: &str, items: &mut [Node]) {
    for i in 1..items.len() {
        let next = items[i].offset;
        let prev = &mut items[i - 1];
        let next_line_start = text[..next].rfind('\n').map_or(0, |p| p + 1);
        if next_line_start > prev.offset {
            prev.end = prev.end.min(next_line_start);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tree_knows_where_keys_and_items_start() {
        let text = "groups:\n  - id: ketone\n    bands:\n      - range: [1700, 1725]\n";
        let root = parse_tree(text).unwrap().unwrap();
        let path = [
            Step::Key("groups".into()),
            Step::Index(0),
            Step::Key("bands".into()),
            Step::Index(0),
            Step::Key("range".into()),
        ];
        let offset = offset_of(&root, &path);
        assert_eq!(&text[offset..offset + 5], "range");
        let item = &root.get("groups").unwrap().value.items()[0];
        assert_eq!(&text[item.offset..item.offset + 2], "id");
    }

    #[test]
    fn offsets_are_bytes_even_after_non_ascii_text() {
        let text = "a: \"cm⁻¹ and µ\"\nb: 1\n";
        let root = parse_tree(text).unwrap().unwrap();
        let b = root.get("b").unwrap();
        assert_eq!(&text[b.key_offset..b.key_offset + 1], "b");
    }

    #[test]
    fn syntax_errors_carry_a_position() {
        let text = "a: [1, 2\nb: 3\n";
        let err = parse_tree(text).unwrap_err();
        assert!(err.offset.is_some());
        assert!(!err.message.is_empty());
    }
}
