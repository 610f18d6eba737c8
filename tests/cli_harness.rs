//! The CLI harness itself (`tests/support/cli.rs`) must be able to fail: a run that
//! differs from its expectation in any stream or in its status panics, and the diff
//! names the differing lines.

#[path = "support/cli.rs"]
mod cli;
use cli::{diff, quiddity};

#[test]
fn a_full_match_passes() {
    quiddity(["isomers", "C6H14", "--count"])
        .run()
        .expect(0, "5\n", "");
}

#[test]
#[should_panic(expected = "differs from the inline expectation")]
fn a_different_stdout_fails() {
    quiddity(["isomers", "C6H14", "--count"])
        .run()
        .expect(0, "6\n", "");
}

#[test]
#[should_panic(expected = "differs from the inline expectation")]
fn a_different_status_fails() {
    quiddity(["isomers", "C6H14", "--count"])
        .run()
        .expect(1, "5\n", "");
}

#[test]
#[should_panic(expected = "differs from the inline expectation")]
fn unexpected_stderr_fails() {
    quiddity(["isomers", "C8H18", "--max", "3", "--count"])
        .run()
        .expect(0, "3\n", "");
}

#[test]
fn stdin_reaches_the_binary_and_a_missing_newline_is_shown() {
    let ran = quiddity(["isomers", "C6H14", "--count"])
        .stdin("ignored\n")
        .run();
    ran.expect(0, "5\n", "");
    assert!(diff("a\nb", "a\nb\n").contains("final newline"));
}

#[test]
fn the_diff_marks_removed_and_added_lines_with_context() {
    let d = diff("one\ntwo\nthree\n", "one\n2\nthree\n");
    assert_eq!(d, "   one\n-  two\n+  2\n   three\n");
}
