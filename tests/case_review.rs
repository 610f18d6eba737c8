//! `solve --record` then `review`: agreement on untouched inputs, and each kind of drift
//! caught and named — spectrum file changed, case file changed, rules changed, conclusion
//! changed, analyst's accepted candidate inconsistent. Also path safety of named files.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

use quiddity::cli::casefile::{load_case, record_path, LoadOptions};
use quiddity::cli::review::review_case;
use quiddity::engine::{solve, SolveOptions};
use quiddity::report::record::{Difference, Record};
use quiddity::report::view::InputRole;
use quiddity::rules::embedded_catalogue;
use std::path::{Path, PathBuf};

/// A temp dir holding the spectrum demo case and its spectrum, recorded.
fn recorded_copy() -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir_all(dir.path().join("spectra")).unwrap();
    std::fs::copy(
        "cases/spectra/aromatic-ketone-like.jdx",
        dir.path().join("spectra/aromatic-ketone-like.jdx"),
    )
    .unwrap();
    let case = dir.path().join("case.yaml");
    std::fs::copy("cases/lab-0111-spectrum-ketone.yaml", &case).unwrap();
    write_record(&case);
    (dir, case)
}

fn write_record(case: &Path) {
    let loaded = load_case(case, &LoadOptions::default()).unwrap();
    let outcome = solve(
        &loaded.case,
        &embedded_catalogue().unwrap(),
        &SolveOptions::default(),
    );
    let record = Record::new(&outcome, loaded.inputs.clone(), &SolveOptions::default());
    std::fs::write(record_path(case), record.to_json()).unwrap();
}

fn review(case: &Path, rules: Option<&Path>) -> Vec<Difference> {
    review_case(case, None, rules, &LoadOptions::default())
        .unwrap_or_else(|f| panic!("{:?}", f.diagnostics))
        .findings
        .differences
}

#[test]
fn a_fresh_record_agrees() {
    let (_dir, case) = recorded_copy();
    assert_eq!(review(&case, None), vec![]);
    assert!(record_path(&case).ends_with("case.record.json"));
}

#[test]
fn a_tampered_spectrum_is_named() {
    let (dir, case) = recorded_copy();
    let spectrum = dir.path().join("spectra/aromatic-ketone-like.jdx");
    let mut text = std::fs::read_to_string(&spectrum).unwrap();
    text = text.replacen("##OWNER=public domain", "##OWNER=someone else", 1);
    std::fs::write(&spectrum, text).unwrap();
    let diffs = review(&case, None);
    assert!(
        matches!(diffs.as_slice(), [Difference::InputChanged { role, path, .. }] if *role == InputRole::Spectrum && path == "spectra/aromatic-ketone-like.jdx"),
        "{diffs:?}"
    );
    assert!(diffs[0]
        .to_string()
        .starts_with("spectrum file spectra/aromatic-ketone-like.jdx changed since recording"));
}

#[test]
fn a_changed_case_file_and_the_conclusion_it_moves_are_both_reported() {
    let (_dir, case) = recorded_copy();
    // Swap the formula for an isomer that cannot hold an aromatic ring plus a carbonyl.
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(&case, text.replace("formula: C8H8O", "formula: C8H10O")).unwrap();
    let diffs = review(&case, None);
    assert!(
        diffs.iter().any(
            |d| matches!(d, Difference::InputChanged { role, .. } if *role == InputRole::Case)
        ),
        "{diffs:?}"
    );
    assert!(
        diffs
            .iter()
            .any(|d| matches!(d, Difference::ConclusionChanged { .. })),
        "{diffs:?}"
    );
}

#[test]
fn a_changed_rules_catalogue_is_reported() {
    let (dir, case) = recorded_copy();
    let rules = dir.path().join("rules");
    std::fs::create_dir_all(&rules).unwrap();
    for entry in std::fs::read_dir("rules").unwrap().flatten() {
        let name = entry.file_name();
        if name.to_string_lossy().ends_with(".yaml") {
            let mut text = std::fs::read_to_string(entry.path()).unwrap();
            text.push_str("\n# local edit\n");
            std::fs::write(rules.join(name), text).unwrap();
        }
    }
    let diffs = review(&case, Some(&rules));
    assert!(
        diffs
            .iter()
            .any(|d| matches!(d, Difference::RulesChanged { .. })),
        "{diffs:?}"
    );
}

#[test]
fn a_changed_conclusion_is_reported_rank_by_rank() {
    let (_dir, case) = recorded_copy();
    let path = record_path(&case);
    let text = std::fs::read_to_string(&path).unwrap();
    // As if the record had been made when another combination led.
    let mut record = Record::from_json(&text, "r").unwrap();
    record.conclusion.top.swap(0, 1);
    std::fs::write(&path, record.to_json()).unwrap();
    let diffs = review(&case, None);
    assert!(
        diffs
            .iter()
            .any(|d| d.to_string().starts_with("conclusion changed: rank 1 was ")),
        "{diffs:?}"
    );
}

#[test]
fn an_accepted_candidate_that_is_not_consistent_is_a_difference() {
    let (_dir, case) = recorded_copy();
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(
        &case,
        text.replace(
            "accepted: { aromatic_ring: 1, ketone_conjugated: 1 }",
            "accepted: { aldehyde_saturated: 1 }",
        ),
    )
    .unwrap();
    std::fs::remove_file(record_path(&case)).unwrap();
    let diffs = review(&case, None);
    assert!(
        matches!(
            diffs.as_slice(),
            [Difference::AnalystConclusionDiffers { .. }]
        ),
        "{diffs:?}"
    );
}

#[test]
fn nothing_to_review_against_is_bad_input() {
    let dir = tempfile::tempdir().unwrap();
    let case = dir.path().join("c.yaml");
    std::fs::copy("cases/lab-0105-ester.yaml", &case).unwrap();
    let text = std::fs::read_to_string(&case).unwrap();
    let cut = text.find("conclusion:").unwrap();
    std::fs::write(&case, &text[..cut]).unwrap();
    let failure = review_case(&case, None, None, &LoadOptions::default()).unwrap_err();
    assert!(failure.diagnostics[0]
        .message
        .starts_with("nothing to review against"));
}

#[test]
fn named_files_must_stay_inside_the_case_tree() {
    let dir = tempfile::tempdir().unwrap();
    let inner = dir.path().join("cases");
    std::fs::create_dir_all(&inner).unwrap();
    std::fs::copy(
        "cases/spectra/alcohol-like.jdx",
        dir.path().join("outside.jdx"),
    )
    .unwrap();
    let case = inner.join("c.yaml");
    let write = |spectrum: &str| {
        std::fs::write(
            &case,
            format!("formula: C4H10O\nir:\n  spectrum: {spectrum}\n"),
        )
        .unwrap();
    };
    write("../outside.jdx");
    let f = load_case(&case, &LoadOptions::default()).unwrap_err();
    assert!(f.diagnostics[0].to_string().ends_with(
        "c.yaml:3:13: ir.spectrum: \"../outside.jdx\": the path leaves the case file's directory tree"
    ), "{}", f.diagnostics[0]);
    assert!(load_case(
        &case,
        &LoadOptions {
            allow_outside: true
        }
    )
    .is_ok());

    write(&dir.path().join("outside.jdx").display().to_string());
    let f = load_case(&case, &LoadOptions::default()).unwrap_err();
    assert!(f.diagnostics[0]
        .message
        .contains("absolute paths are refused"));

    #[cfg(unix)]
    {
        std::os::unix::fs::symlink(dir.path().join("outside.jdx"), inner.join("link.jdx")).unwrap();
        write("link.jdx");
        let f = load_case(&case, &LoadOptions::default()).unwrap_err();
        assert!(
            f.diagnostics[0].message.contains("through a symbolic link"),
            "{}",
            f.diagnostics[0]
        );
    }
}

#[test]
fn a_misspelt_accepted_group_is_bad_input_with_a_hint() {
    let (_dir, case) = recorded_copy();
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(
        &case,
        text.replace("ketone_conjugated: 1 }", "ketone_conjugatd: 1 }"),
    )
    .unwrap();
    let failure = review_case(&case, None, None, &LoadOptions::default()).unwrap_err();
    let d = &failure.diagnostics[0];
    assert!(
        d.to_string().contains(
            "conclusion.accepted.ketone_conjugatd: unknown group id \"ketone_conjugatd\""
        ),
        "{d}"
    );
    assert_eq!(
        d.help.as_deref(),
        Some("did you mean \"ketone_conjugated\"?")
    );
}
