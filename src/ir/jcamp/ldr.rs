//! Labelled data records and blocks: the first layer of the reader. Splits the text into
//! `##LABEL=value` records with their continuation lines, strips `$$` comments, normalises
//! labels, and groups records into blocks (`##TITLE=` … `##END=`, nested for LINK files).

use super::error::{JcampError, JcampErrorKind};

/// One labelled data record: `##LABEL= value` and the lines that continue it.
#[derive(Clone, Debug, PartialEq)]
pub struct Ldr {
    /// Normalised label: upper case, with spaces, dashes, slashes and underscores removed
    /// (`##Data Type=` and `##DATATYPE=` are the same record). Keeps a leading `$` or `.`.
    pub label: String,
    /// The label as written, trimmed.
    pub raw_label: String,
    /// 0-based line of the `##`.
    pub line: usize,
    /// The text after `=` on the first line, comment stripped and trimmed.
    pub value: String,
    /// The following lines up to the next `##`, each with its 0-based line number,
    /// comment stripped and trimmed; blank lines are dropped.
    pub continuation: Vec<(usize, String)>,
}

impl Ldr {
    /// The whole value: the first-line value and the continuation lines joined by spaces.
    pub fn full_value(&self) -> String {
        let mut out = self.value.clone();
        for (_, line) in &self.continuation {
            if !out.is_empty() {
                out.push(' ');
            }
            out.push_str(line);
        }
        out
    }
}

/// A block: the records from `##TITLE=` to its `##END=`, without nested blocks.
#[derive(Clone, Debug, PartialEq)]
pub struct Block {
    /// The title (value of `##TITLE=`).
    pub title: String,
    /// 0-based line of `##TITLE=`.
    pub title_line: usize,
    /// 0-based line of `##END=`.
    pub end_line: usize,
    /// Nesting depth: 0 for a top-level block, 1 inside a LINK block.
    pub depth: usize,
    /// The records of this block in file order (TITLE first, END excluded).
    pub records: Vec<Ldr>,
}

impl Block {
    /// The first record with normalised label `label`.
    pub fn get(&self, label: &str) -> Option<&Ldr> {
        self.records.iter().find(|r| r.label == label)
    }

    /// The trimmed value of `label`, if present and not empty.
    pub fn value(&self, label: &str) -> Option<&str> {
        self.get(label)
            .map(|r| r.value.as_str())
            .filter(|v| !v.is_empty())
    }

    /// The DATA TYPE, upper case, if given.
    pub fn data_type(&self) -> Option<String> {
        self.value("DATATYPE").map(str::to_uppercase)
    }

    /// True when the block carries spectral data.
    pub fn has_data(&self) -> bool {
        self.records
            .iter()
            .any(|r| matches!(r.label.as_str(), "XYDATA" | "XYPOINTS" | "PEAKTABLE"))
    }
}

/// Normalises a label: upper case; spaces, tabs, dashes, slashes and underscores removed.
///
/// Grammar: `label = 1*( letter | digit | " " | "-" | "/" | "_" | "$" | "." )`
pub fn normalise_label(raw: &str) -> String {
    raw.chars()
        .filter(|c| !matches!(c, ' ' | '\t' | '-' | '/' | '_'))
        .flat_map(char::to_uppercase)
        .collect()
}

/// Strips a `$$` comment from one line.
pub fn strip_comment(line: &str) -> &str {
    match line.find("$$") {
        Some(i) => &line[..i],
        None => line,
    }
}

/// Splits `src` into records.
///
/// Grammar:
/// ```text
/// file        = *( comment-line | blank-line ) 1*ldr
/// ldr         = "##" label "=" value-text eol *continuation
/// continuation= line not starting with "##" (after leading blanks)
/// comment     = "$$" text (to the end of the line, anywhere)
/// ```
/// Text before the first `##` that is not blank or a comment is an error.
pub fn split_records(src: &str) -> Result<Vec<Ldr>, JcampError> {
    split_records_from(src, 0)
}

/// Splits `src` into records as [`split_records`] does, starting at the 0-based line
/// `first_line` (the lines before it are not looked at; line numbers stay those of `src`).
pub fn split_records_from(src: &str, first_line: usize) -> Result<Vec<Ldr>, JcampError> {
    let mut records: Vec<Ldr> = Vec::new();
    for (line_idx, raw_line) in src.split('\n').enumerate().skip(first_line) {
        let line = raw_line.strip_suffix('\r').unwrap_or(raw_line);
        let trimmed_start = line.trim_start();
        if let Some(rest) = trimmed_start.strip_prefix("##") {
            let indent = line.len() - trimmed_start.len();
            let Some(eq) = rest.find('=') else {
                let column = line[..indent].chars().count();
                return Err(JcampError::at(
                    line_idx,
                    column,
                    JcampErrorKind::MissingEquals,
                ));
            };
            let raw_label = rest[..eq].trim();
            let value = strip_comment(&rest[eq + 1..]).trim();
            records.push(Ldr {
                label: normalise_label(raw_label),
                raw_label: raw_label.to_owned(),
                line: line_idx,
                value: value.to_owned(),
                continuation: Vec::new(),
            });
        } else {
            let content = strip_comment(line).trim();
            if content.is_empty() {
                continue;
            }
            match records.last_mut() {
                Some(record) => record.continuation.push((line_idx, content.to_owned())),
                None => {
                    let found: String = content.chars().take(40).collect();
                    return Err(JcampError::on_line(
                        line_idx,
                        JcampErrorKind::NotJcamp { found },
                    ));
                }
            }
        }
    }
    if records.is_empty() {
        return Err(JcampError::on_line(first_line, JcampErrorKind::EmptyFile));
    }
    Ok(records)
}

/// Where the first block starts and what comes before it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Preamble {
    /// 0-based line of the first `##TITLE=`.
    pub title_line: usize,
    /// 0-based lines before it that hold more than blanks and `$$` comments (records
    /// such as an audit trail, or free text), in order.
    pub skipped_lines: Vec<usize>,
    /// The start of the first skipped line (up to 40 characters).
    pub first_skipped: Option<String>,
}

/// True when `line` is a `##TITLE=` record (label compared as labels are).
fn is_title_record(line: &str) -> bool {
    line.trim_start()
        .strip_prefix("##")
        .and_then(|rest| rest.find('=').map(|eq| normalise_label(rest[..eq].trim())))
        .is_some_and(|label| label == "TITLE")
}

/// Finds the first `##TITLE=` and the meaningful lines before it.
///
/// Grammar: `file = preamble 1*block` with `preamble = *line` — any lines before the first
/// `##TITLE=` (an audit trail, other `##` records, free text). A file with no `##TITLE=`
/// is an error naming its first meaningful line (or an empty file).
pub fn find_preamble(src: &str) -> Result<Preamble, JcampError> {
    let mut skipped_lines = Vec::new();
    let mut first_skipped = None;
    for (line_idx, raw_line) in src.split('\n').enumerate() {
        let line = raw_line.strip_suffix('\r').unwrap_or(raw_line);
        if is_title_record(line) {
            return Ok(Preamble {
                title_line: line_idx,
                skipped_lines,
                first_skipped,
            });
        }
        let content = strip_comment(line).trim();
        if !content.is_empty() {
            if first_skipped.is_none() {
                first_skipped = Some(content.chars().take(40).collect());
            }
            skipped_lines.push(line_idx);
        }
    }
    match (skipped_lines.first(), first_skipped) {
        (Some(&line), Some(found)) => {
            Err(JcampError::on_line(line, JcampErrorKind::NoTitle { found }))
        }
        _ => Err(JcampError::on_line(0, JcampErrorKind::EmptyFile)),
    }
}

/// Groups records into blocks, in the order their `##END=` closes them (inner blocks of a
/// LINK file before the LINK block itself), then sorts them by their title line so that
/// "first" means first in the file.
///
/// Grammar:
/// ```text
/// block      = "##TITLE=" text *ldr *block "##END="
/// ```
/// A record before the first `##TITLE=` is an error; so is a file that ends inside a block.
pub fn split_blocks(records: Vec<Ldr>) -> Result<Vec<Block>, JcampError> {
    let mut open: Vec<Block> = Vec::new();
    let mut done: Vec<Block> = Vec::new();
    for record in records {
        if record.label == "TITLE" {
            open.push(Block {
                title: record.value.clone(),
                title_line: record.line,
                end_line: record.line,
                depth: open.len(),
                records: vec![record],
            });
            continue;
        }
        if record.label == "END" {
            let Some(mut block) = open.pop() else {
                return Err(JcampError::on_line(
                    record.line,
                    JcampErrorKind::UnmatchedEnd,
                ));
            };
            block.end_line = record.line;
            done.push(block);
            continue;
        }
        match open.last_mut() {
            Some(block) => block.records.push(record),
            None => {
                let found = format!("##{}={}", record.raw_label, record.value);
                return Err(JcampError::on_line(
                    record.line,
                    JcampErrorKind::NotJcamp {
                        found: found.chars().take(40).collect(),
                    },
                ));
            }
        }
    }
    if let Some(block) = open.pop() {
        let last_line = block
            .records
            .last()
            .map(|r| r.continuation.last().map_or(r.line, |(l, _)| *l))
            .unwrap_or(block.title_line);
        return Err(JcampError::on_line(
            last_line,
            JcampErrorKind::Truncated {
                title: block.title,
                opened_line: block.title_line + 1,
            },
        ));
    }
    done.sort_by_key(|b| b.title_line);
    Ok(done)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_ignore_case_spaces_dashes_slashes_and_underscores() {
        // JCAMP-DX 4.24, section on labels (McDonald & Wilks 1988): from memory.
        assert_eq!(normalise_label("Data Type"), "DATATYPE");
        assert_eq!(
            normalise_label("SPECTROMETER/DATA SYSTEM"),
            "SPECTROMETERDATASYSTEM"
        );
        assert_eq!(normalise_label("peak-table"), "PEAKTABLE");
        assert_eq!(normalise_label("JCAMP_DX"), "JCAMPDX");
        assert_eq!(normalise_label("$Invented Field"), "$INVENTEDFIELD");
    }

    #[test]
    fn comments_are_stripped_and_continuations_kept_with_their_lines() {
        let src = "$$ leading comment\n##TITLE= t $$ note\n##XYDATA=(X++(Y..Y))\n1 2 3 $$ c\n\n4 5\n##END=\n";
        let records = split_records(src).unwrap();
        assert_eq!(records[0].value, "t");
        assert_eq!(records[1].label, "XYDATA");
        assert_eq!(
            records[1].continuation,
            vec![(3, "1 2 3".to_owned()), (5, "4 5".to_owned())]
        );
    }

    #[test]
    fn a_file_ending_inside_a_block_is_truncated_at_its_last_line() {
        let src = "##TITLE=a\n##XYDATA=(X++(Y..Y))\n1 2 3\n";
        let err = split_blocks(split_records(src).unwrap()).unwrap_err();
        assert_eq!(err.line, 2);
        assert!(matches!(err.kind, JcampErrorKind::Truncated { .. }));
    }

    #[test]
    fn link_blocks_give_their_children_in_file_order() {
        let src = "##TITLE=link\n##DATA TYPE=LINK\n##BLOCKS=2\n##TITLE=one\n##END=\n##TITLE=two\n##END=\n##END=\n";
        let blocks = split_blocks(split_records(src).unwrap()).unwrap();
        let titles: Vec<_> = blocks.iter().map(|b| (b.title.as_str(), b.depth)).collect();
        assert_eq!(titles, vec![("link", 0), ("one", 1), ("two", 1)]);
    }
}
