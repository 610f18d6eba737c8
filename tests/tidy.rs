//! Tidy checks that keep the codebase and its documentation honest (run with the other
//! tests; each fails when it finds nothing to check):
//!
//! - every `src/**/*.rs` starts with a `//!` doc block;
//! - no tracked file names a repository file that does not exist (paths below the
//!   top-level folders, and every `NAME.md`);
//! - the README's exit-status table says what `quiddity --help` and
//!   `quiddity solve --help` say;
//! - no function in `src/` is longer than [`MAX_FUNCTION_LINES`] lines (split a long one
//!   into named stages).

#![allow(clippy::expect_used, clippy::unwrap_used)] // a test panics on purpose

#[path = "support/cli.rs"]
mod cli;

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

/// The longest a function in `src/` may be, counted from its `fn` line to its closing
/// brace, both included.
const MAX_FUNCTION_LINES: usize = 120;

fn root() -> PathBuf {
    cli::root()
}

/// Every file git tracks, plus untracked ones not ignored (so a new file is checked
/// before it is committed), relative to the root.
fn repository_files() -> Vec<String> {
    let out = std::process::Command::new("git")
        .args(["ls-files", "--cached", "--others", "--exclude-standard"])
        .current_dir(root())
        .output()
        .expect("git runs");
    assert!(out.status.success(), "git ls-files failed");
    let files: Vec<String> = String::from_utf8(out.stdout)
        .expect("UTF-8 file names")
        .lines()
        .filter(|f| root().join(f).is_file())
        .map(str::to_owned)
        .collect();
    assert!(files.len() > 50, "only {} files found", files.len());
    files
}

fn rust_sources() -> Vec<String> {
    let files: Vec<String> = repository_files()
        .into_iter()
        .filter(|f| f.starts_with("src/") && f.ends_with(".rs"))
        .collect();
    assert!(files.len() > 20, "only {} source files found", files.len());
    files
}

#[test]
fn every_source_file_starts_with_a_module_doc_block() {
    let missing: Vec<String> = rust_sources()
        .into_iter()
        .filter(|f| {
            let text = std::fs::read_to_string(root().join(f)).expect("read");
            !text.trim_start().starts_with("//!")
        })
        .collect();
    assert!(
        missing.is_empty(),
        "these files do not start with a `//!` block: {missing:#?}"
    );
}

/// Top-level folders whose paths are checked when a file names them.
const CHECKED_FOLDERS: [&str; 7] = [
    "src/", "tests/", "rules/", "cases/", "benches/", "docs/", ".ci/",
];

/// A candidate path: runs of path characters.
fn path_like_tokens(text: &str) -> Vec<&str> {
    text.split(|c: char| !(c.is_ascii_alphanumeric() || "_-./".contains(c)))
        .map(|t| t.trim_end_matches(['.', '-']))
        .filter(|t| !t.is_empty())
        .collect()
}

/// Whether `token`, named in `file`, names a repository file or folder that is missing.
/// Patterns and placeholders (`*`, `NAME`, trailing `/`) are not paths.
fn names_a_missing_file(token: &str, file: &str, files: &BTreeSet<String>) -> bool {
    let exists = |p: &str| {
        let p = p.trim_end_matches('/');
        files.contains(p) || files.iter().any(|f| f.starts_with(&format!("{p}/")))
    };
    // Placeholders, a bare extension, and files the tests name on purpose although they
    // are missing (`does-not-exist`, `no-such-…`) or write at run time (`.record.json`).
    let on_purpose = ["NAME", "does-not-exist", "no-such", ".record.json"];
    if token.starts_with('.') || on_purpose.iter().any(|p| token.contains(p)) {
        return false;
    }
    let is_markdown_name = token.ends_with(".md") && !token.contains('/');
    if is_markdown_name {
        let dir = Path::new(file)
            .parent()
            .map(|d| d.to_string_lossy().into_owned());
        let beside = match dir.as_deref() {
            Some(d) if !d.is_empty() => format!("{d}/{token}"),
            _ => token.to_owned(),
        };
        return !(exists(token) || exists(&beside) || exists(&format!("docs/{token}")));
    }
    let in_checked_folder = CHECKED_FOLDERS.iter().any(|f| token.starts_with(f));
    let has_extension = Path::new(token).extension().is_some_and(|e| {
        e.len() <= 5 && e.to_string_lossy().chars().all(|c| c.is_ascii_lowercase())
    });
    if !in_checked_folder || !has_extension {
        return false;
    }
    // A file that names itself (a `tests/…` path written as `src/…` in a doc) is not
    // special; a path under a checked folder must exist as written.
    !exists(token)
}

#[test]
fn no_file_names_a_repository_file_that_does_not_exist() {
    let files = repository_files();
    let set: BTreeSet<String> = files.iter().cloned().collect();
    let mut problems = Vec::new();
    let mut n_checked = 0;
    for file in &files {
        if file.starts_with("tests/fixtures/") && !file.ends_with(".txt")
            || file.ends_with(".jdx")
            || file.ends_with(".lock")
        {
            continue;
        }
        let Ok(text) = std::fs::read_to_string(root().join(file)) else {
            continue;
        };
        for (n, line) in text.lines().enumerate() {
            for token in path_like_tokens(line) {
                if token.ends_with(".md") || CHECKED_FOLDERS.iter().any(|f| token.starts_with(f)) {
                    n_checked += 1;
                }
                if names_a_missing_file(token, file, &set) {
                    problems.push(format!("{file}:{}: {token}", n + 1));
                }
            }
        }
    }
    assert!(n_checked > 100, "only {n_checked} references checked");
    assert!(
        problems.is_empty(),
        "these files name repository files that do not exist: {problems:#?}"
    );
}

/// `(status, meaning)` rows of an "Exit status:" block of a help text.
fn help_exit_statuses(help: &str) -> Vec<(String, String)> {
    help.lines()
        .skip_while(|l| l.trim() != "Exit status:")
        .skip(1)
        .take_while(|l| !l.trim().is_empty())
        .map(|l| {
            let (status, meaning) = l.trim().split_once("  ").expect("`N  meaning`");
            (status.to_owned(), meaning.trim().to_owned())
        })
        .collect()
}

#[test]
fn the_readme_exit_status_table_says_what_the_help_says() {
    let readme = std::fs::read_to_string(root().join("README.md")).expect("README.md");
    let table: Vec<(String, String)> = readme
        .lines()
        .skip_while(|l| l.trim() != "## Exit status")
        .filter_map(|l| {
            let cells: Vec<&str> = l
                .trim()
                .strip_prefix('|')?
                .strip_suffix('|')?
                .split('|')
                .collect();
            let status = cells.first()?.trim();
            // Markdown code spans are layout, not words.
            let meaning = cells.get(1).unwrap_or(&"").trim().replace('`', "");
            status
                .parse::<u8>()
                .ok()
                .map(|_| (status.to_owned(), meaning))
        })
        .collect();
    assert_eq!(table.len(), 3, "the README's exit-status table: {table:?}");
    for args in [&["--help"][..], &["solve", "--help"][..]] {
        let ran = cli::quiddity(args.iter().copied()).run();
        ran.status_is(0);
        let help = help_exit_statuses(&ran.stdout);
        assert_eq!(help, table, "quiddity {args:?} against README.md");
    }
}

/// `(file, fn name, first line, length in lines)` of every function in `text`.
fn functions(file: &str, text: &str) -> Vec<(String, String, usize, usize)> {
    let code = strip_comments_and_literals(text);
    let lines: Vec<&str> = code.lines().collect();
    let mut out = Vec::new();
    for (i, line) in lines.iter().enumerate() {
        let Some(name) = fn_name(line) else { continue };
        // The body starts at the first `{` after the signature, unless a `;` comes first
        // (a declaration without a body).
        let mut depth = 0usize;
        let mut started = false;
        let mut end = None;
        'scan: for (j, l) in lines.iter().enumerate().skip(i) {
            let from = if j == i {
                line.find("fn ").unwrap_or(0)
            } else {
                0
            };
            for c in l[from..].chars() {
                match c {
                    ';' if !started => break 'scan,
                    '{' => {
                        depth += 1;
                        started = true;
                    }
                    '}' if started => {
                        depth -= 1;
                        if depth == 0 {
                            end = Some(j);
                            break 'scan;
                        }
                    }
                    _ => {}
                }
            }
        }
        if let Some(end) = end {
            out.push((file.to_owned(), name, i + 1, end - i + 1));
        }
    }
    out
}

/// The name of a function defined on `line` (`pub(crate) const fn name<…>(`), if any.
fn fn_name(line: &str) -> Option<String> {
    let words: Vec<&str> = line.split_whitespace().collect();
    let at = words.iter().position(|w| *w == "fn")?;
    let qualifiers = ["pub", "const", "async", "unsafe", "extern", "default"];
    let before_ok = words[..at]
        .iter()
        .all(|w| qualifiers.contains(w) || w.starts_with("pub(") || w.starts_with('"'));
    if !before_ok {
        return None;
    }
    let name: String = words
        .get(at + 1)?
        .chars()
        .take_while(|c| c.is_alphanumeric() || *c == '_')
        .collect();
    (!name.is_empty()).then_some(name)
}

/// `text` with comments, string and character literals blanked out (line breaks kept),
/// so that braces inside them do not count.
fn strip_comments_and_literals(text: &str) -> String {
    let chars: Vec<char> = text.chars().collect();
    let mut out = String::with_capacity(text.len());
    let mut i = 0;
    let blank = |c: char| if c == '\n' { '\n' } else { ' ' };
    while i < chars.len() {
        let c = chars[i];
        let next = chars.get(i + 1).copied();
        if c == '/' && next == Some('/') {
            while i < chars.len() && chars[i] != '\n' {
                out.push(' ');
                i += 1;
            }
        } else if c == '/' && next == Some('*') {
            let mut depth = 0;
            while i < chars.len() {
                if chars[i] == '/' && chars.get(i + 1) == Some(&'*') {
                    depth += 1;
                    out.push_str("  ");
                    i += 2;
                } else if chars[i] == '*' && chars.get(i + 1) == Some(&'/') {
                    depth -= 1;
                    out.push_str("  ");
                    i += 2;
                    if depth == 0 {
                        break;
                    }
                } else {
                    out.push(blank(chars[i]));
                    i += 1;
                }
            }
        } else if c == 'r'
            && (next == Some('#') || next == Some('"'))
            && !is_ident(chars.get(i.wrapping_sub(1)))
        {
            // A raw string r#"…"#: ends at a quote followed by as many hashes.
            let mut j = i + 1;
            let mut hashes = 0;
            while chars.get(j) == Some(&'#') {
                hashes += 1;
                j += 1;
            }
            if chars.get(j) != Some(&'"') {
                out.push(c);
                i += 1;
                continue;
            }
            j += 1;
            while j < chars.len() {
                if chars[j] == '"' && (0..hashes).all(|k| chars.get(j + 1 + k) == Some(&'#')) {
                    j += 1 + hashes;
                    break;
                }
                j += 1;
            }
            for &ch in &chars[i..j.min(chars.len())] {
                out.push(blank(ch));
            }
            i = j;
        } else if c == '"' {
            out.push(' ');
            i += 1;
            while i < chars.len() && chars[i] != '"' {
                if chars[i] == '\\' {
                    out.push(' ');
                    i += 1;
                }
                if i < chars.len() {
                    out.push(blank(chars[i]));
                    i += 1;
                }
            }
            out.push(' ');
            i += 1;
        } else if c == '\'' {
            // A character literal ('x', '\n', '\u{…}'), or else a lifetime.
            let end = if next == Some('\\') {
                (i + 2..chars.len()).find(|&k| chars[k] == '\'')
            } else if chars.get(i + 2) == Some(&'\'') {
                Some(i + 2)
            } else {
                None
            };
            match end {
                Some(e) => {
                    for _ in i..=e {
                        out.push(' ');
                    }
                    i = e + 1;
                }
                None => {
                    out.push(c);
                    i += 1;
                }
            }
        } else {
            out.push(c);
            i += 1;
        }
    }
    out
}

fn is_ident(c: Option<&char>) -> bool {
    c.is_some_and(|c| c.is_alphanumeric() || *c == '_')
}

#[test]
fn the_function_length_counter_counts_what_it_should() {
    let text = "//! doc\nfn short() {\n    let s = \"}\";\n    let c = '}';\n}\n\
                pub(crate) fn longer<'a>(x: &'a str) -> &'a str {\n    // }\n    /* { */\n    x\n}\n\
                fn declared();\n";
    let found = functions("x.rs", text);
    let summary: Vec<(String, usize, usize)> = found
        .into_iter()
        .map(|(_, n, at, len)| (n, at, len))
        .collect();
    assert_eq!(
        summary,
        [("short".to_owned(), 2, 4), ("longer".to_owned(), 6, 5)]
    );
}

#[test]
fn no_function_in_src_is_longer_than_the_limit() {
    let mut all = Vec::new();
    for file in rust_sources() {
        let text = std::fs::read_to_string(root().join(&file)).expect("read");
        all.extend(functions(&file, &text));
    }
    assert!(all.len() > 200, "only {} functions found", all.len());
    let long: Vec<String> = all
        .iter()
        .filter(|(_, _, _, len)| *len > MAX_FUNCTION_LINES)
        .map(|(file, name, at, len)| format!("{file}:{at} {name} ({len} lines)"))
        .collect();
    assert!(
        long.is_empty(),
        "functions longer than {MAX_FUNCTION_LINES} lines (split them into named stages):\n{}",
        long.join("\n")
    );
}
