//! The reference library through the commands and the case loader: an index written once
//! and reused, rebuilt for a changed file; bad library files named and the rest used; an
//! empty library and a path that leaves the case's tree refused; `review` noticing a
//! changed library; the demo case's combined verdict.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

use quiddity::cli::casefile::{load_case, record_path, LoadOptions};
use quiddity::cli::library::{load_library, IndexState};
use quiddity::cli::review::review_case;
use quiddity::engine::{solve, SolveOptions};
use quiddity::report::record::{Difference, Record};
use quiddity::report::view::InputRole;
use quiddity::rules::embedded_catalogue;
use std::path::{Path, PathBuf};
use std::process::Command;

fn quiddity(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_quiddity"))
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap().flatten() {
        let name = e.file_name();
        if name.to_string_lossy().ends_with(".idx") {
            continue;
        }
        std::fs::copy(e.path(), to.join(name)).unwrap();
    }
}

/// A temp dir holding the library demo case, its spectrum and its library.
fn demo_copy() -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir_all(dir.path().join("spectra")).unwrap();
    std::fs::copy(
        "cases/spectra/lab-0114-unknown.jdx",
        dir.path().join("spectra/lab-0114-unknown.jdx"),
    )
    .unwrap();
    copy_dir(
        Path::new("cases/reference-library"),
        &dir.path().join("reference-library"),
    );
    let case = dir.path().join("case.yaml");
    std::fs::copy("cases/lab-0114-library.yaml", &case).unwrap();
    (dir, case)
}

#[test]
fn the_index_is_written_once_reused_and_rebuilt_for_a_changed_file() {
    let (dir, _) = demo_copy();
    let lib = dir.path().join("reference-library");
    let lib_s = lib.display().to_string();
    assert_eq!(
        load_library(&lib, false).unwrap().state,
        IndexState::Missing
    );
    let (code, out, err) = quiddity(&["library", "index", &lib_s]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("6 reference(s)"), "{out}");
    assert!(out.contains("bytes a reference"), "{out}");
    let loaded = load_library(&lib, false).unwrap();
    assert_eq!(loaded.state, IndexState::Current);
    assert_eq!(loaded.stats.n_unchanged, 6);
    // Change one side file: that reference alone is read again.
    let side = lib.join("ketone-k4.yaml");
    let text = std::fs::read_to_string(&side).unwrap();
    std::fs::write(
        &side,
        text.replace("notes: invented", "notes: invented, re-run"),
    )
    .unwrap();
    let loaded = load_library(&lib, false).unwrap();
    assert_eq!(loaded.state, IndexState::Stale);
    assert_eq!((loaded.stats.n_indexed, loaded.stats.n_unchanged), (1, 5));
    // A damaged index file is said so and rebuilt.
    std::fs::write(lib.join("quiddity-library.idx"), b"QDYLIBX\nxx").unwrap();
    assert!(matches!(
        load_library(&lib, false).unwrap().state,
        IndexState::Unusable { .. }
    ));
}

#[test]
fn bad_library_files_are_named_and_the_rest_are_used() {
    let (dir, _) = demo_copy();
    let lib = dir.path().join("reference-library");
    std::fs::write(
        lib.join("broken.jdx"),
        "##TITLE=broken\n##XYDATA=(X++(Y..Y))\n1 2 x\n",
    )
    .unwrap();
    std::fs::copy(lib.join("ester-e4.jdx"), lib.join("ester-copy.jdx")).unwrap();
    std::fs::write(lib.join("ketone-k3.yaml"), "nmae: typo\n").unwrap();
    std::fs::write(lib.join("orphan.yaml"), "name: nothing\n").unwrap();
    let (code, out, err) = quiddity(&["library", "index", &lib.display().to_string()]);
    assert_eq!(code, 2, "{out}{err}");
    assert!(err.contains("broken.jdx"), "{err}");
    assert!(
        err.contains("ester-e4.jdx: left out (duplicate file)")
            || err.contains("a byte-for-byte copy of ester-copy.jdx"),
        "{err}"
    );
    assert!(err.contains("ketone-k3.yaml:1:1"), "{err}");
    assert!(
        err.contains("orphan.yaml: a side file with no spectrum"),
        "{err}"
    );
    // Eight spectrum files: the broken one, the duplicate and the one with a bad side file
    // are left out, the other five are used.
    assert!(out.contains("5 reference(s); 8 file(s) listed"), "{out}");
}

#[test]
fn an_empty_library_and_a_library_outside_the_case_tree_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let empty = dir.path().join("empty");
    std::fs::create_dir_all(&empty).unwrap();
    let (code, _, err) = quiddity(&["library", "index", &empty.display().to_string()]);
    assert_eq!(code, 2);
    assert!(
        err.contains("empty library: no reference spectrum"),
        "{err}"
    );
    let (_d, case) = demo_copy();
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(
        &case,
        text.replace("library: reference-library", "library: ../elsewhere"),
    )
    .unwrap();
    let e = load_case(&case, &LoadOptions::default()).unwrap_err();
    let first = e.diagnostics[0].to_string();
    assert!(
        first.contains("case.yaml:") && first.contains("leaves the case file's directory tree"),
        "{first}"
    );
}

#[test]
fn a_library_of_the_other_phase_is_not_compared_silently() {
    let (_dir, case) = demo_copy();
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(&case, text.replace("technique: ATR", "technique: gas")).unwrap();
    let loaded = load_case(&case, &LoadOptions::default()).unwrap();
    let outcome = solve(
        &loaded.case,
        &embedded_catalogue().unwrap(),
        &SolveOptions::default(),
    );
    let (verdict, _) = quiddity::cli::casefile::library_verdict(&loaded, &outcome, false).unwrap();
    assert_eq!(verdict.n_compared, 1, "only the vapour reference");
    assert!(
        verdict
            .notes
            .iter()
            .any(|n| n.contains("5 condensed-phase reference(s) not compared")),
        "{:?}",
        verdict.notes
    );
}

#[test]
fn the_demo_verdict_refuses_the_best_match_and_names_the_consistent_one() {
    let loaded = load_case(
        Path::new("cases/lab-0114-library.yaml"),
        &LoadOptions::default(),
    )
    .unwrap();
    let outcome = solve(
        &loaded.case,
        &embedded_catalogue().unwrap(),
        &SolveOptions::default(),
    );
    let (v, _) = quiddity::cli::casefile::library_verdict(&loaded, &outcome, false).unwrap();
    let best = &v.hits[0];
    assert!(best.contradicts, "{best:?}");
    assert!(best
        .checks
        .iter()
        .any(|c| c.item == "formula" && c.detail.contains("C3H6O")));
    let consistent = v
        .hits
        .iter()
        .find(|h| Some(h.rank) == v.best_consistent)
        .unwrap();
    assert_eq!(consistent.formula.as_deref(), Some("C4H8O"));
    assert!(!consistent.contradicts);
    // The alcohol standard holds a group the deduction ruled out by the absent O–H band.
    let alcohol = v.hits.iter().find(|h| h.file == "alcohol-b4.jdx").unwrap();
    assert!(alcohol
        .checks
        .iter()
        .any(|c| c.item == "groups" && c.detail.contains("ruled out alcohol_secondary")));
    assert!(v.summary.contains("not an answer"), "{}", v.summary);
}

#[test]
fn review_notices_a_changed_library() {
    let (dir, case) = demo_copy();
    let loaded = load_case(&case, &LoadOptions::default()).unwrap();
    let outcome = solve(
        &loaded.case,
        &embedded_catalogue().unwrap(),
        &SolveOptions::default(),
    );
    let record = Record::new(&outcome, loaded.inputs.clone(), &SolveOptions::default());
    std::fs::write(record_path(&case), record.to_json()).unwrap();
    let review = |case: &Path| {
        review_case(case, None, None, &LoadOptions::default())
            .unwrap()
            .findings
            .differences
    };
    assert_eq!(review(&case), vec![]);
    std::fs::remove_file(dir.path().join("reference-library/ester-e4.jdx")).unwrap();
    let diffs = review(&case);
    assert!(
        matches!(&diffs[..], [Difference::InputChanged { role, path, .. }] if *role == InputRole::Library && path == "reference-library"),
        "{diffs:?}"
    );
    assert!(diffs[0]
        .to_string()
        .starts_with("library reference-library changed since recording"));
}

#[test]
fn library_search_prints_hits_and_the_caution() {
    let (code, out, err) = quiddity(&[
        "library",
        "search",
        "cases/reference-library",
        "cases/spectra/lab-0114-unknown.jdx",
        "--phase",
        "ATR",
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(
        out.contains("ketone-k3.jdx") && out.contains("ketone-k4.jdx"),
        "{out}"
    );
    assert!(
        out.contains("1 vapour-phase reference(s) not compared"),
        "{out}"
    );
    assert!(out.contains("caution: a library match is a lead"), "{out}");
    let (code, _, err) = quiddity(&[
        "library",
        "search",
        "cases/reference-library",
        "cases/spectra/lab-0114-unknown.jdx",
        "--phase",
        "plasma",
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("unknown phase \"plasma\""), "{err}");
}
