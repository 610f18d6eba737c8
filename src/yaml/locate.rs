//! A locator that finds the line and column of a key path in YAML text, so that checks
//! made after deserialising a case can still point at the input.
//!
//! The locator understands what case files use: block mappings, block sequences (`- `),
//! and one-line flow mappings and sequences (`{ at: 1686, strength: strong }`,
//! `[[105, 100], [77, 62]]`). When it cannot follow a path to the end it returns the
//! deepest place it reached, so a diagnostic always lands near its cause.

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
/// was found.
pub fn locate(src: &str, path: &KeyPath) -> Option<usize> {
    let lines = line_table(src);
    let mut scope = Scope::Block {
        first_line: 0,
        end_line: lines.len(),
        parent_indent: None,
        first_col: None,
    };
    let mut best = None;
    for step in &path.0 {
        match find_step(src, &lines, &scope, step) {
            Some((offset, next)) => {
                best = Some(offset);
                scope = next;
            }
            None => break,
        }
    }
    best
}

/// Like [`locate`], but for a path ending in a key with an inline value, the offset of
/// the value itself (where a bad word or number sits) rather than of its key.
pub fn locate_value(src: &str, path: &KeyPath) -> Option<usize> {
    let lines = line_table(src);
    let mut scope = Scope::Block {
        first_line: 0,
        end_line: lines.len(),
        parent_indent: None,
        first_col: None,
    };
    let mut best = None;
    for (i, step) in path.0.iter().enumerate() {
        match find_step(src, &lines, &scope, step) {
            Some((offset, next)) => {
                best = Some(offset);
                if i + 1 == path.0.len() {
                    if let (Step::Key(_), Scope::Inline { start, .. }) = (step, &next) {
                        best = Some(*start);
                    }
                }
                scope = next;
            }
            None => break,
        }
    }
    best
}

/// `(start_offset, text_without_newline)` per line.
fn line_table(src: &str) -> Vec<(usize, &str)> {
    let mut out = Vec::new();
    let mut start = 0;
    for line in src.split_inclusive('\n') {
        out.push((start, line.trim_end_matches(['\n', '\r'])));
        start += line.len();
    }
    out
}

/// Where the value of the step found so far lives.
#[derive(Clone, Debug)]
enum Scope {
    /// Lines `first_line..end_line` more indented than `parent_indent`; when
    /// `first_col` is set, the first line's content starts at that column (the line of a
    /// `- key: value` sequence item).
    Block {
        first_line: usize,
        end_line: usize,
        parent_indent: Option<usize>,
        first_col: Option<usize>,
    },
    /// A flow collection or an inline value: byte range `start..end` of `src`.
    Inline { start: usize, end: usize },
}

fn indent_of(text: &str) -> usize {
    text.len() - text.trim_start_matches(' ').len()
}

fn is_blank(text: &str) -> bool {
    let t = text.trim();
    t.is_empty() || t.starts_with('#')
}

fn find_step(
    src: &str,
    lines: &[(usize, &str)],
    scope: &Scope,
    step: &Step,
) -> Option<(usize, Scope)> {
    let (first_line, end_line, parent_indent, first_col) = match scope {
        Scope::Inline { start, end } => return find_inline(src, *start, *end, step),
        Scope::Block {
            first_line,
            end_line,
            parent_indent,
            first_col,
        } => (*first_line, *end_line, *parent_indent, *first_col),
    };
    // The child indent is that of the first meaningful line of the scope.
    let mut child_indent = None;
    let mut index_seen = 0usize;
    for li in first_line..end_line {
        let (offset, text) = lines[li];
        if is_blank(text) {
            continue;
        }
        let indent = match first_col {
            Some(col) if li == first_line => col.min(text.len()),
            _ => indent_of(text),
        };
        if let Some(p) = parent_indent {
            // A block sequence may sit at its key's own indent (`bands:` then `- ...`).
            let dash_at_parent = indent == p && text[indent..].starts_with('-');
            if indent < p || (indent == p && !dash_at_parent) {
                break;
            }
        }
        let ci = *child_indent.get_or_insert(indent);
        if indent < ci {
            break;
        }
        if indent != ci {
            continue;
        }
        let body = &text[indent..];
        match step {
            Step::Key(k) => {
                if let Some(after) = body.strip_prefix(k.as_str()) {
                    if after.trim_start().starts_with(':') {
                        let colon = offset + indent + k.len() + after.find(':')?;
                        let value_scope = value_scope(src, lines, li, colon + 1, indent);
                        return Some((offset + indent, value_scope));
                    }
                }
            }
            Step::Index(n) => {
                if body.starts_with("- ") || body == "-" {
                    if index_seen == *n {
                        let item_col = indent + 2;
                        let item_offset = offset + item_col.min(text.len());
                        let rest = text.get(item_col..).unwrap_or("").trim_end();
                        let scope = if rest.starts_with('{') || rest.starts_with('[') {
                            Scope::Inline {
                                start: item_offset,
                                end: offset + text.len(),
                            }
                        } else if rest.is_empty() {
                            Scope::Block {
                                first_line: li + 1,
                                end_line: lines.len(),
                                parent_indent: Some(indent),
                                first_col: None,
                            }
                        } else {
                            Scope::Block {
                                first_line: li,
                                end_line: lines.len(),
                                parent_indent: Some(indent),
                                first_col: Some(item_col),
                            }
                        };
                        return Some((item_offset, scope));
                    }
                    index_seen += 1;
                }
            }
        }
    }
    None
}

/// The scope of the value that starts after the colon at byte `after_colon` on line `li`.
fn value_scope(
    src: &str,
    lines: &[(usize, &str)],
    li: usize,
    after_colon: usize,
    key_indent: usize,
) -> Scope {
    let (offset, text) = lines[li];
    let line_end = offset + text.len();
    let rest = src[after_colon..line_end].trim();
    if rest.is_empty() || rest.starts_with('#') {
        Scope::Block {
            first_line: li + 1,
            end_line: lines.len(),
            parent_indent: Some(key_indent),
            first_col: None,
        }
    } else {
        let lead = src[after_colon..line_end].len() - src[after_colon..line_end].trim_start().len();
        Scope::Inline {
            start: after_colon + lead,
            end: line_end,
        }
    }
}

/// Finds a key or an index inside a one-line flow collection.
fn find_inline(src: &str, start: usize, end: usize, step: &Step) -> Option<(usize, Scope)> {
    let text = &src[start..end];
    let bytes = text.as_bytes();
    if bytes.first().is_none_or(|b| *b != b'{' && *b != b'[') {
        return None;
    }
    // Split the top level of the collection into items (byte ranges relative to text).
    let mut items = Vec::new();
    let mut depth = 0i32;
    let mut item_start = 1;
    let mut in_quote: Option<u8> = None;
    for (i, &b) in bytes.iter().enumerate() {
        if let Some(q) = in_quote {
            if b == q {
                in_quote = None;
            }
            continue;
        }
        match b {
            b'"' | b'\'' => in_quote = Some(b),
            b'{' | b'[' => depth += 1,
            b'}' | b']' => {
                depth -= 1;
                if depth == 0 {
                    items.push((item_start, i));
                    break;
                }
            }
            b',' if depth == 1 => {
                items.push((item_start, i));
                item_start = i + 1;
            }
            _ => {}
        }
    }
    let trimmed = |(s, e): (usize, usize)| {
        let piece = &text[s..e];
        let lead = piece.len() - piece.trim_start().len();
        (s + lead, s + lead + piece.trim().len())
    };
    match step {
        Step::Index(n) => {
            let (s, e) = trimmed(*items.get(*n)?);
            Some((
                start + s,
                Scope::Inline {
                    start: start + s,
                    end: start + e,
                },
            ))
        }
        Step::Key(k) => {
            for item in items {
                let (s, e) = trimmed(item);
                let piece = &text[s..e];
                if let Some(after) = piece.strip_prefix(k.as_str()) {
                    if let Some(colon) = after.find(':') {
                        if after[..colon].trim().is_empty() {
                            let value_start = s + k.len() + colon + 1;
                            let lead = text[value_start..e].len()
                                - text[value_start..e].trim_start().len();
                            return Some((
                                start + s,
                                Scope::Inline {
                                    start: start + value_start + lead,
                                    end: start + e,
                                },
                            ));
                        }
                    }
                }
            }
            None
        }
    }
}
