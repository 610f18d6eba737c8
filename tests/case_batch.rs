//! `quiddity batch`: many cases in parallel, one report per case and format, a summary row
//! per case; a broken case is isolated; existing reports are kept unless forced.

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

#[path = "support/generate.rs"]
mod generate;

use quiddity::cli::batch::{process, render_summary, BatchOptions, CaseSummary};
use quiddity::cli::casefile::LoadOptions;
use quiddity::engine::SolveOptions;
use quiddity::report::Format;
use quiddity::rules::embedded_catalogue;
use std::path::Path;

fn options(dir: &Path, out: &Path, force: bool, threads: usize) -> BatchOptions {
    BatchOptions {
        dir: dir.to_path_buf(),
        out: out.to_path_buf(),
        force,
        threads,
        formats: vec![Format::Json],
        load: LoadOptions::default(),
        progress: false,
        budget: quiddity::budget::Budget::default(),
    }
}

/// Runs a batch of `n` generated cases plus one broken case and checks every row.
fn batch_with_a_broken_case(n: usize, threads: usize) {
    let input = tempfile::tempdir().unwrap();
    let out = tempfile::tempdir().unwrap();
    let ids = generate::write_cases(Path::new("cases"), input.path(), n);
    // Broken: an unknown key, which must be reported with its place.
    std::fs::write(
        input.path().join("gen-broken.yaml"),
        "formula: C3H6O\nir:\n  bandz: []\n",
    )
    .unwrap();
    let catalogue = embedded_catalogue().unwrap();
    let rows = process(
        &options(input.path(), out.path(), false, threads),
        &catalogue,
        &SolveOptions::default(),
    )
    .unwrap();
    assert_eq!(rows.len(), n + 1);
    let broken: Vec<&CaseSummary> = rows.iter().filter(|r| r.error.is_some()).collect();
    assert_eq!(broken.len(), 1, "only the broken case fails");
    assert_eq!(broken[0].file, "gen-broken.yaml");
    let error = broken[0].error.as_deref().unwrap();
    assert!(error.contains("gen-broken.yaml:3:3"), "{error}");
    assert!(error.contains("unknown field \"bandz\""), "{error}");
    for (row, id) in rows.iter().filter(|r| r.error.is_none()).zip(&ids) {
        assert_eq!(row.case.as_deref(), Some(id.as_str()), "rows in file order");
        assert_eq!(row.reports.len(), 1);
        // The summary agrees with the report written for the case.
        let report: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(&row.reports[0]).unwrap()).unwrap();
        assert_eq!(report["case"], id.as_str());
        assert_eq!(report["n_consistent"], row.n_candidates);
        assert_eq!(
            report["conflicts"].as_array().unwrap().len(),
            row.n_conflicts
        );
        let top = report["candidates"][0]["groups_text"]
            .as_str()
            .map(str::to_owned);
        assert_eq!(top, row.top);
    }
    let n_reports = std::fs::read_dir(out.path()).unwrap().count();
    assert_eq!(n_reports, n, "one report per good case, no temp files left");
    let summary = render_summary(&rows);
    assert!(summary.ends_with(&format!(
        "{} case(s): {n} reported, 1 failed; every result is a screening lead, not an identification\n",
        n + 1
    )));
}

#[test]
fn fifty_cases_and_a_broken_one() {
    batch_with_a_broken_case(50, 2);
}

#[test]
#[ignore = "slow in debug builds: cargo test --release --test case_batch -- --ignored"]
fn a_thousand_cases_and_a_broken_one() {
    batch_with_a_broken_case(1000, 2);
}

#[test]
fn existing_reports_are_kept_unless_forced() {
    let input = tempfile::tempdir().unwrap();
    let out = tempfile::tempdir().unwrap();
    generate::write_cases(Path::new("cases"), input.path(), 3);
    let catalogue = embedded_catalogue().unwrap();
    let first = out.path().join("gen-00000.json");
    std::fs::write(&first, "kept").unwrap();
    let rows = process(
        &options(input.path(), out.path(), false, 1),
        &catalogue,
        &SolveOptions::default(),
    )
    .unwrap();
    assert!(rows[0]
        .error
        .as_deref()
        .unwrap()
        .contains("exists; not overwritten (use --force)"));
    assert!(rows[1].error.is_none() && rows[2].error.is_none());
    assert_eq!(std::fs::read_to_string(&first).unwrap(), "kept");
    let rows = process(
        &options(input.path(), out.path(), true, 1),
        &catalogue,
        &SolveOptions::default(),
    )
    .unwrap();
    assert!(rows.iter().all(|r| r.error.is_none()));
    assert_ne!(std::fs::read_to_string(&first).unwrap(), "kept");
}

#[test]
fn the_demo_directory_batches_without_errors() {
    let out = tempfile::tempdir().unwrap();
    let mut o = options(Path::new("cases"), out.path(), false, 2);
    o.formats = vec![Format::Text, Format::Html];
    let rows = process(&o, &embedded_catalogue().unwrap(), &SolveOptions::default()).unwrap();
    assert!(rows.len() >= 8);
    assert!(rows.iter().all(|r| r.error.is_none()), "{rows:?}");
    assert_eq!(
        std::fs::read_dir(out.path()).unwrap().count(),
        rows.len() * 2
    );
    // The conflict demo is a result (no candidate, one conflict), not an error.
    let conflict = rows
        .iter()
        .find(|r| r.file == "lab-0104-conflict.yaml")
        .unwrap();
    assert_eq!((conflict.n_candidates, conflict.n_conflicts), (0, 1));
}

#[test]
fn an_empty_directory_is_bad_input() {
    let input = tempfile::tempdir().unwrap();
    let out = tempfile::tempdir().unwrap();
    let f = process(
        &options(input.path(), out.path(), false, 1),
        &embedded_catalogue().unwrap(),
        &SolveOptions::default(),
    )
    .unwrap_err();
    assert!(f.diagnostics[0].message.starts_with("no case files"));
}
