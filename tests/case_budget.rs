//! Budgets: a case that would need more time or memory than allowed stops with a clear
//! error (which limit, where, what to add to the case) and exit status 2 — never an
//! abort, never a partial answer passed off as complete; `batch` reports it in the
//! case's row and goes on with the other cases.
//!
//! The cases are invented for these tests (a contract laboratory's unknowns).

use quiddity::budget::{Budget, Limit, LimitReached, Metered, Stage};
use quiddity::case::{parse, Case};
use quiddity::engine::{solve, solve_within, SolveOptions};
use quiddity::rules::embedded_catalogue;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::time::Duration;

/// A 25-heavy-atom, 8-heteroatom formula with a deliberately loose band list: hundreds of
/// thousands of group combinations are consistent, so an enumeration without the default
/// limit on them holds megabytes.
const LOOSE: &str = "\
case: INV-BUDGET-1
title: invented loose case (many consistent combinations)
formula: C17H17ClN2O4S
ir:
  technique: KBr
  bands:
    - { at: 3280, strength: medium }
    - { at: 2960, strength: medium }
    - { at: 1735, strength: strong }
    - { at: 1670, strength: strong }
    - { at: 1595, strength: medium }
    - { at: 1340, strength: strong }
    - { at: 1160, strength: strong }
    - { at: 830, strength: strong }
";

/// Acetophenone, C8H8O (common practice), conjugated C=O near 1686 cm-1 and a
/// monosubstituted ring (Silverstein, Webster & Kiemle, from memory): a small case.
const SMALL: &str = "\
case: INV-BUDGET-2
title: invented aryl ketone case
formula: C8H8O
ir:
  technique: film
  bands:
    - { at: 3062, strength: weak }
    - { at: 1686, strength: strong }
    - { at: 1598, strength: medium }
    - { at: 760, strength: strong }
    - { at: 690, strength: strong }
";

/// A nominal molecular ion and one strong carbonyl band, nothing else (the commonest
/// GC-MS unknown).
const MASS_ONLY: &str = "\
case: INV-BUDGET-3
title: invented mass-only case
ms: { molecular_ion: 600, ion: \"M+.\" }
ir:
  technique: ATR
  bands:
    - { at: 1715, strength: strong }
";

fn case(text: &str) -> Case {
    let (case, d) = parse(text, "budget.yaml");
    case.unwrap_or_else(|| panic!("{d:?}"))
}

fn metered(case: &Case, budget: Budget) -> Result<quiddity::engine::Outcome, LimitReached> {
    metered_with(case, budget, &SolveOptions::default())
}

fn metered_with(
    case: &Case,
    budget: Budget,
    options: &SolveOptions,
) -> Result<quiddity::engine::Outcome, LimitReached> {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    solve_within(case, &catalogue, options, &mut Metered::new(budget))
}

/// Every consistent combination collected (no limit on their number).
fn every_combination() -> SolveOptions {
    SolveOptions {
        enumeration_limit: usize::MAX,
        ..SolveOptions::default()
    }
}

#[test]
fn a_tiny_memory_budget_stops_the_enumeration_with_its_limit_named() {
    let stop = metered_with(
        &case(LOOSE),
        Budget {
            time: None,
            memory_bytes: Some(1_000_000),
        },
        &every_combination(),
    )
    .expect_err("1 MB cannot hold hundreds of thousands of combinations");
    assert_eq!(stop.limit, Limit::Memory { bytes: 1_000_000 });
    assert_eq!(stop.stage, Stage::Enumeration);
    assert!(
        stop.message().contains("memory limit of 1 MB"),
        "{}",
        stop.message()
    );
    assert!(
        stop.advice().contains("--memory-limit"),
        "{}",
        stop.advice()
    );
}

#[test]
fn a_tiny_time_budget_stops_a_mass_only_case_and_asks_for_a_formula() {
    let stop = metered(
        &case(MASS_ONLY),
        Budget {
            time: Some(Duration::from_nanos(1)),
            memory_bytes: None,
        },
    )
    .expect_err("a nanosecond is not enough");
    assert!(matches!(stop.limit, Limit::Time { .. }), "{stop:?}");
    // What to add to the case: a formula, an accurate mass, isotope ratios.
    let advice = stop.advice();
    for word in ["formula:", "accurate", "isotopes"] {
        assert!(advice.contains(word), "{advice}");
    }
}

#[test]
fn within_the_default_budget_the_metered_answer_is_the_unmetered_one() {
    let catalogue = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    for text in [LOOSE, SMALL] {
        let k = case(text);
        let free = solve(&k, &catalogue, &SolveOptions::default());
        let bounded = metered(&k, Budget::default()).expect("default budget suffices");
        let as_json = |o: &quiddity::engine::Outcome| {
            serde_json::to_string(o).unwrap_or_else(|e| panic!("{e}"))
        };
        assert_eq!(as_json(&free), as_json(&bounded));
    }
}

fn quiddity(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_quiddity"))
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("cannot run quiddity: {e}"))
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap_or_else(|e| panic!("{e}"));
    path
}

#[test]
fn solve_over_its_memory_budget_exits_2_and_says_what_to_add() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let path = write(dir.path(), "loose.yaml", LOOSE);
    let before = std::fs::read(&path).unwrap_or_else(|e| panic!("{e}"));
    let out = quiddity(&[
        "solve",
        path.to_str().unwrap_or_default(),
        "--json",
        "--limit",
        "1000000",
        "--memory-limit",
        "1",
    ]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(out.stdout.is_empty(), "nothing on stdout after a stop");
    assert!(stderr.contains("loose.yaml"), "{stderr}");
    assert!(stderr.contains("memory limit of 1 MB"), "{stderr}");
    assert!(stderr.contains("--memory-limit"), "{stderr}");
    assert_eq!(
        std::fs::read(&path).unwrap_or_default(),
        before,
        "input untouched"
    );
    // The same case within the default budget solves.
    let ok = quiddity(&["solve", path.to_str().unwrap_or_default(), "--json"]);
    assert_eq!(
        ok.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&ok.stderr)
    );
}

#[test]
fn solve_over_its_time_budget_exits_2_naming_the_time_limit() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let path = write(dir.path(), "mass-only.yaml", MASS_ONLY);
    let out = quiddity(&[
        "solve",
        path.to_str().unwrap_or_default(),
        "--time-limit",
        "0.000001",
    ]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(stderr.contains("time limit of 0.000001 s"), "{stderr}");
    assert!(stderr.contains("formula:"), "{stderr}");
}

#[test]
fn bad_limits_are_usage_errors() {
    for (option, value) in [
        ("--time-limit", "0"),
        ("--time-limit", "nan"),
        ("--memory-limit", "0"),
    ] {
        let out = quiddity(&["solve", "no-such-case.yaml", option, value]);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{option} {value}: {stderr}");
        assert!(stderr.contains(option), "{stderr}");
    }
}

#[test]
fn batch_reports_the_case_over_budget_and_goes_on() {
    let input = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let out_dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    // Batch keeps the default limit on combinations; the mass-only case's formula
    // leads and their pooled candidates are what outgrow 1 MB.
    write(input.path(), "a-mass-only.yaml", MASS_ONLY);
    write(input.path(), "b-small.yaml", SMALL);
    let out = quiddity(&[
        "batch",
        input.path().to_str().unwrap_or_default(),
        "--out",
        out_dir.path().to_str().unwrap_or_default(),
        "--format",
        "json",
        "--json",
        "--memory-limit",
        "1",
    ]);
    assert_eq!(out.status.code(), Some(2), "one case failed");
    let rows: serde_json::Value =
        serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("{e}"));
    let rows = rows.as_array().cloned().unwrap_or_default();
    assert_eq!(rows.len(), 2);
    let heavy = &rows[0];
    assert_eq!(heavy["file"], "a-mass-only.yaml");
    let error = heavy["error"].as_str().unwrap_or_default();
    assert!(error.contains("memory limit of 1 MB"), "{error}");
    assert!(error.contains("--memory-limit"), "{error}");
    let small = &rows[1];
    assert_eq!(small["file"], "b-small.yaml");
    assert!(small["error"].is_null(), "{small}");
    assert!(small["n_candidates"].as_u64().unwrap_or(0) > 0, "{small}");
    assert!(out_dir.path().join("b-small.json").exists());
    assert!(!out_dir.path().join("a-loose.json").exists());
}
