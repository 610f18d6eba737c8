//! The case commands as a user runs them: `solve --report/--record`, `review`, `batch`,
//! `new-case`, each run in a scratch copy of the demo folder and compared in full (stdout,
//! stderr, exit status; see `tests/support/cli.rs`, expectations in `tests/expect/case/`).
//! The files the commands write are checked beside.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

#[path = "support/cli.rs"]
mod cli;
use cli::Ran;
use std::path::Path;

fn quiddity(args: &[&str], cwd: &Path) -> Ran {
    cli::quiddity(args.iter().copied()).cwd(cwd).run()
}

fn stdout(o: &Ran) -> String {
    o.stdout.clone()
}

fn stderr(o: &Ran) -> String {
    o.stderr.clone()
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
    o.expect_file("case/solve-report-record");
    assert!(stderr(&o).contains("record written: cases/lab-0111-spectrum-ketone.record.json"));
    assert!(dir.path().join("out/r.html").exists() && dir.path().join("out/r.json").exists());
    assert_eq!(
        std::fs::read(dir.path().join(case)).unwrap(),
        before,
        "the case file is never modified"
    );

    quiddity(&["review", case], dir.path()).expect(
        0,
        &format!(
            "review of {case}: agrees with the record cases/lab-0111-spectrum-ketone.record.json\n"
        ),
        "",
    );

    let spectrum = dir.path().join("cases/spectra/aromatic-ketone-like.jdx");
    let text = std::fs::read_to_string(&spectrum).unwrap();
    std::fs::write(
        &spectrum,
        text.replacen("##RESOLUTION=4", "##RESOLUTION=2", 1),
    )
    .unwrap();
    let o = quiddity(&["review", case], dir.path());
    o.expect_file("case/review-after-tamper");
    assert!(
        stdout(&o)
            .contains("  - spectrum file spectra/aromatic-ketone-like.jdx changed since recording"),
        "{}",
        stdout(&o)
    );
    let o = quiddity(&["review", case, "--json"], dir.path());
    o.expect_file("case/review-after-tamper-json");
    let json = o.json();
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
    o.expect_file("case/solve-report-pdf");
    assert!(stderr(&o).contains("cannot tell the report format from the extension \"pdf\""));
}

#[test]
fn batch_writes_one_report_per_case_and_a_summary() {
    let dir = demo_copy();
    let o = quiddity(
        &["batch", "cases", "--out", "out/reports", "--threads", "2"],
        dir.path(),
    );
    o.expect_file("case/batch");
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
    o.expect_file("case/batch-again");
    assert!(stdout(&o).contains("exists; not overwritten (use --force)"));
    let o = quiddity(
        &["batch", "cases", "--out", "out/reports", "--force"],
        dir.path(),
    );
    o.expect_file("case/batch-force");
}

#[test]
fn new_case_writes_a_template_that_solves_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    quiddity(&["new-case", "c.yaml"], dir.path()).expect(0, "template written: c.yaml\n", "");
    quiddity(&["solve", "c.yaml"], dir.path()).expect_file("case/solve-new-template");
    quiddity(&["new-case", "c.yaml"], dir.path()).expect(
        2,
        "",
        "error: c.yaml: the file exists; refusing to overwrite it\n  = help: choose another path or move the file away\n",
    );
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
    o.status_is(0);
    assert_eq!(stderr(&o), "report written: out/r.html\n");
    let page = std::fs::read_to_string(dir.path().join("out/r.html")).unwrap();
    assert!(page.contains("<svg"), "the page holds its plot");
}

#[test]
fn a_case_file_with_several_schema_errors_reports_them_all_at_once() {
    // Three mistakes in one invented case: a misspelt key, a word where the molecular-ion
    // m/z should be, and a misspelt band field. Each is named with its line, column and key
    // path, in file order, and nothing is solved.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("three-mistakes.yaml"),
        "titl: invented three-mistake case\n\
         formula: C4H8O\n\
         ms:\n  molecular_ion: seventy-two\n\
         ir:\n  bands:\n    - { wavenumbr: 1715, strength: strong }\n",
    )
    .unwrap();
    quiddity(&["solve", "three-mistakes.yaml"], dir.path())
        .expect_file("case/solve-three-schema-errors");
}
