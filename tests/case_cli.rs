//! The case commands as a user runs them: `solve --report/--record`, `review`, `batch`,
//! `new-case`, comparing exit status and the words on stdout/stderr.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

use std::path::Path;
use std::process::{Command, Output};

fn quiddity(args: &[&str], cwd: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_quiddity"))
        .args(args)
        .current_dir(cwd)
        .output()
        .expect("the binary runs")
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// A temp copy of the demo directory.
fn demo_copy() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    let cases = dir.path().join("cases");
    std::fs::create_dir_all(cases.join("spectra")).unwrap();
    for entry in std::fs::read_dir("cases").unwrap().flatten() {
        if entry.path().extension().is_some_and(|e| e == "yaml") {
            std::fs::copy(entry.path(), cases.join(entry.file_name())).unwrap();
        }
    }
    for entry in std::fs::read_dir("cases/spectra").unwrap().flatten() {
        std::fs::copy(entry.path(), cases.join("spectra").join(entry.file_name())).unwrap();
    }
    // The reference library of the library demo case (its index file is not copied).
    std::fs::create_dir_all(cases.join("reference-library")).unwrap();
    for entry in std::fs::read_dir("cases/reference-library")
        .unwrap()
        .flatten()
    {
        if !entry.file_name().to_string_lossy().ends_with(".idx") {
            std::fs::copy(
                entry.path(),
                cases.join("reference-library").join(entry.file_name()),
            )
            .unwrap();
        }
    }
    dir
}

#[test]
fn solve_record_review_then_tamper() {
    let dir = demo_copy();
    let case = "cases/lab-0111-spectrum-ketone.yaml";
    let before = std::fs::read(dir.path().join(case)).unwrap();
    // out/ does not exist yet: the report writer makes it.
    let o = quiddity(
        &[
            "solve",
            case,
            "--report",
            "out/r.html",
            "--report",
            "out/r.json",
            "--record",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stderr(&o).contains("record written: cases/lab-0111-spectrum-ketone.record.json"));
    assert!(dir.path().join("out/r.html").exists() && dir.path().join("out/r.json").exists());
    assert_eq!(
        std::fs::read(dir.path().join(case)).unwrap(),
        before,
        "the case file is never modified"
    );

    let o = quiddity(&["review", case], dir.path());
    assert_eq!(o.status.code(), Some(0), "{}{}", stdout(&o), stderr(&o));
    assert!(stdout(&o).starts_with(&format!("review of {case}: agrees with the record")));

    let spectrum = dir.path().join("cases/spectra/aromatic-ketone-like.jdx");
    let text = std::fs::read_to_string(&spectrum).unwrap();
    std::fs::write(
        &spectrum,
        text.replacen("##RESOLUTION=4", "##RESOLUTION=2", 1),
    )
    .unwrap();
    let o = quiddity(&["review", case], dir.path());
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stdout(&o)
            .contains("  - spectrum file spectra/aromatic-ketone-like.jdx changed since recording"),
        "{}",
        stdout(&o)
    );
    let o = quiddity(&["review", case, "--json"], dir.path());
    let json: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(json["agrees"], false);
    assert_eq!(json["differences"][0]["kind"], "input_changed");
}

#[test]
fn an_unknown_report_extension_is_bad_usage() {
    let dir = demo_copy();
    let o = quiddity(
        &["solve", "cases/lab-0105-ester.yaml", "--report", "r.pdf"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("cannot tell the report format from the extension \"pdf\""));
}

#[test]
fn batch_writes_one_report_per_case_and_a_summary() {
    let dir = demo_copy();
    let o = quiddity(
        &["batch", "cases", "--out", "out/reports", "--threads", "2"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let n_cases = std::fs::read_dir(dir.path().join("cases"))
        .unwrap()
        .flatten()
        .filter(|e| e.path().extension().is_some_and(|x| x == "yaml"))
        .count();
    assert_eq!(
        std::fs::read_dir(dir.path().join("out/reports"))
            .unwrap()
            .count(),
        n_cases
    );
    let out = stdout(&o);
    assert!(out.starts_with("file"), "{out}");
    assert!(out.contains("lab-0104-conflict.yaml"));
    assert!(out.contains(&format!("{n_cases} case(s): {n_cases} reported, 0 failed")));
    // Again without --force: every report exists, nothing is overwritten, exit 2.
    let o = quiddity(&["batch", "cases", "--out", "out/reports"], dir.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(stdout(&o).contains("exists; not overwritten (use --force)"));
    let o = quiddity(
        &["batch", "cases", "--out", "out/reports", "--force"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn new_case_writes_a_template_that_solves_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    let o = quiddity(&["new-case", "c.yaml"], dir.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = quiddity(&["solve", "c.yaml"], dir.path());
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = quiddity(&["new-case", "c.yaml"], dir.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("the file exists; refusing to overwrite it"));
}

#[test]
fn a_report_into_a_folder_that_does_not_exist_yet_is_written() {
    let dir = demo_copy();
    let o = quiddity(
        &[
            "solve",
            "cases/lab-0111-spectrum-ketone.yaml",
            "--report",
            "out/r.html",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let page = std::fs::read_to_string(dir.path().join("out/r.html")).unwrap();
    assert!(page.contains("<svg"), "the page holds its plot");
}
