//! Every demo case under `cases/` against its golden reports in `cases/expected/`, in all
//! four formats. `UPDATE_EXPECT=1 cargo test --test case_reports` rewrites the golden files
//! on purpose (review the diff before committing it). The walk fails when it finds no case.
//!
//! The golden files pin **layout only** (sections, wording, order, escaping): they record
//! the program's own earlier output, so they cannot tell a right answer from a wrong one.
//! Whether each demo case gives its designed answer is checked against
//! `tests/corpus/demo.tsv` by `tests/corpus_measured.rs`.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

use quiddity::cli::casefile::{load_case, report_text, solve as casefile_solve, LoadOptions};
use quiddity::engine::SolveOptions;
use quiddity::engine::CAUTIONS;
use quiddity::report::Format;
use quiddity::rules::embedded_catalogue;
use std::path::{Path, PathBuf};

fn demo_cases() -> Vec<PathBuf> {
    let mut cases: Vec<PathBuf> = std::fs::read_dir("cases")
        .expect("cases/ exists")
        .flatten()
        .map(|e| Path::new("cases").join(e.file_name()))
        .filter(|p| p.extension().is_some_and(|e| e == "yaml"))
        .collect();
    cases.sort();
    cases
}

#[test]
fn every_demo_case_matches_its_golden_reports_in_every_format() {
    let update = std::env::var_os("UPDATE_EXPECT").is_some();
    let cases = demo_cases();
    assert!(
        cases.len() >= 8,
        "expected at least 8 demo cases, found {}",
        cases.len()
    );
    let catalogue = embedded_catalogue().expect("catalogue");
    let mut mismatches = Vec::new();
    let mut compared = 0;
    for path in &cases {
        let loaded = load_case(path, &LoadOptions::default())
            .unwrap_or_else(|f| panic!("{}: {:?}", path.display(), f.diagnostics));
        let outcome = casefile_solve(&loaded, &catalogue, &SolveOptions::default());
        let stem = path.file_stem().unwrap().to_string_lossy().into_owned();
        for (format, ext) in Format::ALL {
            let text = report_text(&loaded, &outcome, format, None);
            // Reproducible: the same inputs give the same bytes.
            assert_eq!(text, report_text(&loaded, &outcome, format, None));
            let expected_path = Path::new("cases/expected").join(format!("{stem}.{ext}"));
            if update {
                std::fs::create_dir_all("cases/expected").unwrap();
                std::fs::write(&expected_path, &text).unwrap();
                continue;
            }
            let expected = std::fs::read_to_string(&expected_path).unwrap_or_else(|e| {
                panic!(
                    "{}: {e} (run UPDATE_EXPECT=1 cargo test --test case_reports)",
                    expected_path.display()
                )
            });
            compared += 1;
            if expected != text {
                mismatches.push(expected_path.display().to_string());
            }
        }
    }
    assert!(update || compared > 0, "nothing was compared");
    assert!(
        mismatches.is_empty(),
        "reports differ from the golden files (UPDATE_EXPECT=1 rewrites them after review): {mismatches:?}"
    );
}

#[test]
fn every_report_format_carries_the_cautions_and_the_input_digests() {
    let catalogue = embedded_catalogue().expect("catalogue");
    let path = Path::new("cases/lab-0111-spectrum-ketone.yaml");
    let loaded = load_case(path, &LoadOptions::default()).expect("demo case loads");
    let outcome = casefile_solve(&loaded, &catalogue, &SolveOptions::default());
    assert_eq!(loaded.inputs.len(), 2, "case file and spectrum file");
    for (format, _) in Format::ALL {
        let text = report_text(&loaded, &outcome, format, None);
        for caution in CAUTIONS {
            let caution = if format == Format::Html {
                quiddity::report::html::escape(caution)
            } else {
                caution.to_owned()
            };
            assert!(text.contains(&caution), "{format:?} lacks \"{caution}\"");
        }
        for input in &loaded.inputs {
            assert!(
                text.contains(&input.sha256),
                "{format:?} lacks the digest of {}",
                input.path
            );
        }
        assert!(
            text.contains(&catalogue.digest),
            "{format:?} lacks the rules digest"
        );
    }
}

#[test]
fn a_timestamp_appears_only_when_asked_for() {
    let catalogue = embedded_catalogue().expect("catalogue");
    let loaded = load_case(
        Path::new("cases/lab-0105-ester.yaml"),
        &LoadOptions::default(),
    )
    .unwrap();
    let outcome = casefile_solve(&loaded, &catalogue, &SolveOptions::default());
    let plain = report_text(&loaded, &outcome, Format::Text, None);
    assert!(!plain.contains("generated"));
    let stamped = report_text(
        &loaded,
        &outcome,
        Format::Text,
        Some("2026-01-01T00:00:00Z".into()),
    );
    assert!(stamped.contains("generated      2026-01-01T00:00:00Z"));
}

#[test]
fn the_json_report_parses_and_names_the_contract_fields() {
    let catalogue = embedded_catalogue().expect("catalogue");
    let loaded = load_case(
        Path::new("cases/lab-0104-conflict.yaml"),
        &LoadOptions::default(),
    )
    .unwrap();
    let outcome = casefile_solve(&loaded, &catalogue, &SolveOptions::default());
    let json: serde_json::Value =
        serde_json::from_str(&report_text(&loaded, &outcome, Format::Json, None)).unwrap();
    assert_eq!(json["schema"], quiddity::report::json_view::SCHEMA);
    assert_eq!(
        json["schema_version"].as_u64(),
        Some(u64::from(quiddity::report::json_view::SCHEMA_VERSION))
    );
    assert_eq!(json["candidates"].as_array().map(Vec::len), Some(0));
    assert!(!json["conflicts"].as_array().unwrap().is_empty());
    assert_eq!(json["formula_facts"]["nominal_mass"], 86);
    // Hexane C6H14 monoisotopic mass 86.10955 u (PubChem compound record for hexane,
    // "Monoisotopic Mass 86.109550402 Da"; from memory).
    let mono = json["formula_facts"]["monoisotopic_mass"].as_f64().unwrap();
    assert!((mono - 86.109_550).abs() < 2e-6, "{mono}");
    // C6H14: DBE = 6 - 14/2 + 1 = 0 (common practice: DBE = C - H/2 + N/2 + 1).
    assert_eq!(json["formula_facts"]["dbe"], 0.0);
}
