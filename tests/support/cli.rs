//! The one harness for black-box tests of the `quiddity` binary.
//!
//! A test builds a run ([`quiddity`], then [`Cli::cwd`] / [`Cli::stdin`]), runs it
//! ([`Cli::run`]) and compares **stdout, stderr and exit status in full**:
//!
//! - [`Ran::expect`] against inline text (short outputs: an error line, a bare number);
//! - [`Ran::expect_file`] against a file below `tests/expect/` that holds the command,
//!   the status and both streams (longer outputs: tables, JSON documents).
//!
//! A mismatch fails with a line diff of the whole run (status, stdout, stderr), so the
//! first differing line is easy to find. `UPDATE_EXPECT=1 cargo test` rewrites the
//! expectation files on purpose (review the diff before committing); inline
//! expectations are never rewritten: the failure prints the actual text to paste.
//!
//! Runs default to the crate root as working directory, so paths in the output are the
//! short relative ones a user would type. Text that legitimately varies from run to run
//! (a temporary directory, a timing) is replaced with [`Ran::redact`] before comparing;
//! each such call says why in its test.
//!
//! Included by each test file with `#[path = "support/cli.rs"] mod cli;`; not every
//! test file uses every helper, hence the `dead_code` allowance.

#![allow(dead_code)]
#![allow(clippy::expect_used, clippy::unwrap_used)] // a harness panics on purpose

use std::ffi::OsString;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

/// The crate root (`CARGO_MANIFEST_DIR`).
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// A run of the binary being built.
#[must_use]
pub struct Cli {
    args: Vec<OsString>,
    stdin: Option<Vec<u8>>,
    cwd: PathBuf,
}

/// Starts a run of `quiddity ARGS…` in the crate root.
pub fn quiddity<I, S>(args: I) -> Cli
where
    I: IntoIterator<Item = S>,
    S: Into<OsString>,
{
    Cli {
        args: args.into_iter().map(Into::into).collect(),
        stdin: None,
        cwd: root(),
    }
}

impl Cli {
    /// Runs in `dir` instead of the crate root.
    pub fn cwd(mut self, dir: &Path) -> Self {
        dir.clone_into(&mut self.cwd);
        self
    }

    /// Feeds `text` on standard input (otherwise stdin is empty).
    pub fn stdin(mut self, text: &str) -> Self {
        self.stdin = Some(text.as_bytes().to_vec());
        self
    }

    /// Runs the binary to completion.
    pub fn run(&self) -> Ran {
        let mut child = Command::new(env!("CARGO_BIN_EXE_quiddity"))
            .args(&self.args)
            .current_dir(&self.cwd)
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .expect("the quiddity binary runs");
        let input = self.stdin.clone().unwrap_or_default();
        let mut pipe = child.stdin.take().expect("stdin pipe");
        let writer = std::thread::spawn(move || {
            // A command that never reads stdin may close it early; that is fine.
            let _ = pipe.write_all(&input);
        });
        let out = child.wait_with_output().expect("the run finishes");
        writer.join().expect("stdin writer");
        Ran {
            command: std::iter::once("quiddity".to_owned())
                .chain(self.args.iter().map(|a| a.to_string_lossy().into_owned()))
                .collect::<Vec<_>>()
                .join(" "),
            status: out.status.code(),
            stdout: String::from_utf8(out.stdout).expect("stdout is UTF-8"),
            stderr: String::from_utf8(out.stderr).expect("stderr is UTF-8"),
        }
    }
}

/// What one run printed and how it ended.
pub struct Ran {
    /// The command line as typed (for messages and expectation files).
    pub command: String,
    /// The exit status (`None` when killed by a signal).
    pub status: Option<i32>,
    /// Everything on stdout.
    pub stdout: String,
    /// Everything on stderr.
    pub stderr: String,
}

impl Ran {
    /// Replaces every `from` in both streams (and the command) with `to`, for text that
    /// varies between runs; the caller says why.
    pub fn redact(mut self, from: &str, to: &str) -> Self {
        self.command = self.command.replace(from, to);
        self.stdout = self.stdout.replace(from, to);
        self.stderr = self.stderr.replace(from, to);
        self
    }

    /// Stdout parsed as one JSON document (the run must have printed exactly one).
    pub fn json(&self) -> serde_json::Value {
        serde_json::from_str(&self.stdout).unwrap_or_else(|e| {
            panic!(
                "{}: stdout is not one JSON document ({e}):\n{}",
                self.command, self.stdout
            )
        })
    }

    /// Asserts the exit status alone (for runs whose streams another check compares).
    pub fn status_is(&self, status: i32) -> &Self {
        assert_eq!(
            self.status,
            Some(status),
            "{}: exit status\nstdout:\n{}\nstderr:\n{}",
            self.command,
            self.stdout,
            self.stderr
        );
        self
    }

    /// Compares status, stdout and stderr in full with inline text.
    #[track_caller]
    pub fn expect(&self, status: i32, stdout: &str, stderr: &str) -> &Self {
        let expected = render(&self.command, Some(status), stdout, stderr);
        let actual = self.rendered();
        if expected != actual {
            panic!(
                "{}: the run differs from the inline expectation (- expected, + actual):\n{}\n\
                 (inline expectations are not rewritten by UPDATE_EXPECT; the actual run was:)\n{actual}",
                self.command,
                diff(&expected, &actual)
            );
        }
        self
    }

    /// Compares status, stdout and stderr in full with `tests/expect/NAME.txt`;
    /// `UPDATE_EXPECT=1` writes the file instead.
    #[track_caller]
    pub fn expect_file(&self, name: &str) -> &Self {
        let path = root().join("tests/expect").join(format!("{name}.txt"));
        let actual = self.rendered();
        if std::env::var_os("UPDATE_EXPECT").is_some() {
            std::fs::create_dir_all(path.parent().expect("parent")).expect("expect folder");
            std::fs::write(&path, &actual).expect("write expectation");
            return self;
        }
        let expected = std::fs::read_to_string(&path).unwrap_or_else(|e| {
            panic!(
                "{}: cannot read {} ({e}); run with UPDATE_EXPECT=1 to create it",
                self.command,
                path.display()
            )
        });
        if expected != actual {
            panic!(
                "{}: the run differs from tests/expect/{name}.txt (- expected, + actual; \
                 UPDATE_EXPECT=1 rewrites it on purpose):\n{}",
                self.command,
                diff(&expected, &actual)
            );
        }
        self
    }

    fn rendered(&self) -> String {
        render(&self.command, self.status, &self.stdout, &self.stderr)
    }
}

/// One run as text: the command, the status, then each stream after a marker line.
/// A stream that does not end in a newline is followed by `@@ no newline at end`.
fn render(command: &str, status: Option<i32>, stdout: &str, stderr: &str) -> String {
    let mut out = format!("@@ {command}\n");
    match status {
        Some(s) => out.push_str(&format!("@@ status {s}\n")),
        None => out.push_str("@@ status killed by a signal\n"),
    }
    for (name, text) in [("stdout", stdout), ("stderr", stderr)] {
        out.push_str(&format!("@@ {name}\n"));
        assert!(
            !text.lines().any(|l| l.starts_with("@@ ")),
            "{command}: {name} holds a line starting with the harness marker \"@@ \""
        );
        out.push_str(text);
        if !text.is_empty() && !text.ends_with('\n') {
            out.push_str("\n@@ no newline at end\n");
        }
    }
    out
}

/// A line diff of `expected` against `actual` (longest common subsequence), showing
/// changed lines with three lines of context.
pub fn diff(expected: &str, actual: &str) -> String {
    let a: Vec<&str> = expected.lines().collect();
    let b: Vec<&str> = actual.lines().collect();
    // lcs[i][j]: length of the longest common subsequence of a[i..] and b[j..].
    let mut lcs = vec![vec![0usize; b.len() + 1]; a.len() + 1];
    for i in (0..a.len()).rev() {
        for j in (0..b.len()).rev() {
            lcs[i][j] = if a[i] == b[j] {
                lcs[i + 1][j + 1] + 1
            } else {
                lcs[i + 1][j].max(lcs[i][j + 1])
            };
        }
    }
    let mut ops: Vec<(char, &str)> = Vec::new();
    let (mut i, mut j) = (0, 0);
    while i < a.len() || j < b.len() {
        if i < a.len() && j < b.len() && a[i] == b[j] {
            ops.push((' ', a[i]));
            i += 1;
            j += 1;
        } else if i < a.len() && (j == b.len() || lcs[i + 1][j] >= lcs[i][j + 1]) {
            ops.push(('-', a[i]));
            i += 1;
        } else {
            ops.push(('+', b[j]));
            j += 1;
        }
    }
    let near_change = |k: usize| {
        let lo = k.saturating_sub(3);
        let hi = (k + 3).min(ops.len() - 1);
        ops[lo..=hi].iter().any(|(c, _)| *c != ' ')
    };
    let mut out = String::new();
    let mut skipped = false;
    for (k, (c, line)) in ops.iter().enumerate() {
        if near_change(k) {
            if skipped {
                out.push_str("   …\n");
                skipped = false;
            }
            out.push_str(&format!("{c}  {line}\n"));
        } else {
            skipped = true;
        }
    }
    if expected.lines().count() == actual.lines().count() && out.is_empty() {
        out.push_str("(the texts differ only in their final newline)\n");
    }
    out
}
