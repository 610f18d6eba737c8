//! The engine's answers judged against truths from outside the program, end to end. One
//! runner reads two files of the same format:
//!
//! - `tests/corpus/expected.tsv`: every line names a measured spectrum (a JCAMP-DX file,
//!   read by the tool's own reader and picker as a vapour) or a case file with a band list
//!   taken from a published table, the compound's molecular formula, its true functional
//!   groups worked out from its structure (common practice), and the worst rank the truth
//!   may take;
//! - `tests/corpus/demo.tsv`: the designed truth of every invented demo case in `cases/`
//!   (each case is written around one compound, named in the file; its groups are worked
//!   out from that structure, common practice); every demo case must have a line. A
//!   worst rank of `none` means the case is designed to conflict: no candidate may
//!   survive and a conflict must be shown.
//!
//! The truth must never be ruled out, and must rank no lower than its line allows; a
//! candidate that stands for several splits of the same unsaturation (see
//! `engine::collapse`) holds the truth when one of its alternatives is the true set. For a
//! case that states no formula (the formula comes from the molecular ion) the truth must
//! also sit under the expected formula. The test prints, by phase: kept, ranked first,
//! and the median number of candidates where the formula alone does not settle the answer.
//! (The golden reports in `cases/expected/` and the CLI expectations in `tests/expect/`
//! pin layout only; this file is where answers are checked.)

use quiddity::cli::casefile::{load_case, solve, LoadOptions};
use quiddity::engine::{Outcome, SolveOptions};
use quiddity::rules::embedded_catalogue;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// One line of the expected-answers file.
struct Expected {
    path: String,
    compound: String,
    formula: String,
    groups: BTreeMap<String, u32>,
    /// `None`: the case is designed to conflict (no candidate may survive).
    worst_rank: Option<usize>,
}

fn root_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn tests_dir() -> PathBuf {
    root_dir().join("tests")
}

/// Reads an expected-answers file (`name` below `tests/corpus/`).
fn read_expected(name: &str) -> Vec<Expected> {
    let path = tests_dir().join("corpus").join(name);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{name}: {e}"));
    let mut out = Vec::new();
    for (n, line) in text.lines().enumerate() {
        if line.trim().is_empty() || line.starts_with('#') {
            continue;
        }
        let line = line.split(" #").next().unwrap_or(line);
        let cols: Vec<&str> = line.split('\t').collect();
        assert_eq!(cols.len(), 5, "{name} line {}: five columns", n + 1);
        let groups = if cols[3] == "-" {
            BTreeMap::new()
        } else {
            cols[3]
                .split(',')
                .map(|g| {
                    let (id, count) = g
                        .split_once(':')
                        .unwrap_or_else(|| panic!("{name} line {}: {g}", n + 1));
                    (id.to_owned(), count.parse().expect("group count"))
                })
                .collect()
        };
        out.push(Expected {
            path: cols[0].to_owned(),
            compound: cols[1].to_owned(),
            formula: cols[2].to_owned(),
            groups,
            worst_rank: match cols[4].trim() {
                "none" => None,
                k => Some(k.parse().expect("worst rank")),
            },
        });
    }
    out
}

/// The case to solve: a case file as it is, or a vapour-phase case around a spectrum;
/// paths are below `base`.
fn case_path(e: &Expected, base: &Path, scratch: &Path) -> (PathBuf, &'static str) {
    let source = base.join(&e.path);
    if e.path.ends_with(".yaml") {
        let text = std::fs::read_to_string(&source).expect("case file");
        let phase = if text.contains("technique: gas") {
            "vapour"
        } else {
            "condensed"
        };
        return (source, phase);
    }
    let name = Path::new(&e.path)
        .file_name()
        .expect("file name")
        .to_string_lossy()
        .into_owned();
    std::fs::copy(&source, scratch.join(&name)).expect("copy spectrum");
    let case = format!(
        "case: CORPUS\ntitle: measured spectrum of {} (test corpus)\nformula: {}\nir:\n  spectrum: \"{}\"\n  technique: gas\n",
        e.compound, e.formula, name
    );
    let path = scratch.join(format!("{name}.yaml"));
    std::fs::write(&path, case).expect("write case");
    (path, "vapour")
}

/// The rank of the truth; `formula` is checked when the candidates carry their own
/// formula (a case that states none).
fn rank_of_truth(truth: &BTreeMap<String, u32>, formula: &str, outcome: &Outcome) -> Option<usize> {
    outcome
        .candidates
        .iter()
        .find(|c| {
            (c.groups == *truth || c.alternatives.contains(truth))
                && c.formula.as_ref().is_none_or(|f| same_formula(f, formula))
        })
        .map(|c| c.rank)
}

/// Two formulas with the same element counts (a dotted salt or hydrate formula is
/// compared as written).
fn same_formula(a: &str, b: &str) -> bool {
    a == b
        || match (
            quiddity::chem::Formula::parse(a),
            quiddity::chem::Formula::parse(b),
        ) {
            (Ok(x), Ok(y)) => x.to_string() == y.to_string(),
            _ => false,
        }
}

struct Row {
    compound: String,
    phase: &'static str,
    rank: Option<usize>,
    worst: Option<usize>,
    /// For a case designed to conflict: no candidate survived and a conflict was shown.
    conflicted: bool,
    candidates: usize,
    settled_by_formula: bool,
    why: String,
}

fn median(mut v: Vec<usize>) -> f64 {
    if v.is_empty() {
        return 0.0;
    }
    v.sort_unstable();
    let n = v.len();
    if n % 2 == 1 {
        v[n / 2] as f64
    } else {
        (v[n / 2 - 1] + v[n / 2]) as f64 / 2.0
    }
}

#[test]
fn the_truth_survives_every_measured_spectrum_and_ranks_as_expected() {
    let expected = read_expected("expected.tsv");
    assert!(
        expected.len() >= 50,
        "the corpus must hold real measurements ({} lines)",
        expected.len()
    );
    judge(&expected, &tests_dir());
}

#[test]
fn every_demo_case_gives_its_designed_answer() {
    let expected = read_expected("demo.tsv");
    let mut cases: Vec<String> = std::fs::read_dir(root_dir().join("cases"))
        .expect("cases/")
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".yaml"))
        .map(|n| format!("cases/{n}"))
        .collect();
    cases.sort();
    let mut listed: Vec<String> = expected.iter().map(|e| e.path.clone()).collect();
    listed.sort();
    assert!(!cases.is_empty(), "no demo case found in cases/");
    assert_eq!(
        listed, cases,
        "tests/corpus/demo.tsv must hold exactly one line per demo case"
    );
    judge(&expected, &root_dir());
}

/// Solves every line's case (paths below `base`) and fails when a truth is lost, ranks
/// too low, or a case designed to conflict has a candidate.
fn judge(expected: &[Expected], base: &Path) {
    let catalogue = embedded_catalogue().expect("shipped catalogue");
    let options = SolveOptions {
        max_candidates: 10_000,
        ..SolveOptions::default()
    };
    let scratch = tempfile::tempdir().expect("scratch directory");
    let mut rows = Vec::new();
    for e in expected {
        let (path, phase) = case_path(e, base, scratch.path());
        let loaded = load_case(
            &path,
            &LoadOptions {
                allow_outside: false,
            },
        )
        .unwrap_or_else(|f| panic!("{}: {:?}", e.path, f.diagnostics));
        if let Some(stated) = &loaded.case.formula {
            assert!(
                stated.text == e.formula
                    || same_formula(&stated.composition.to_string(), &e.formula),
                "{}: the case's formula {} differs from the expected {}",
                e.path,
                stated.text,
                e.formula
            );
        }
        let outcome = solve(&loaded, &catalogue, &options);
        // What the formula alone allows: the same case without its IR evidence.
        let mut formula_only = loaded.case.clone();
        formula_only.ir = None;
        let by_formula = quiddity::engine::solve(&formula_only, &catalogue, &options);
        let rank = rank_of_truth(&e.groups, &e.formula, &outcome);
        let why = outcome
            .ruled_out
            .iter()
            .filter(|r| e.groups.contains_key(&r.group))
            .map(|r| format!("{}: {}", r.group, r.reason))
            .collect::<Vec<_>>()
            .join("; ");
        rows.push(Row {
            compound: e.compound.clone(),
            phase,
            rank,
            worst: e.worst_rank,
            conflicted: outcome.candidates.is_empty() && !outcome.conflicts.is_empty(),
            candidates: outcome.n_consistent,
            settled_by_formula: by_formula.n_consistent <= 1,
            why,
        });
    }
    println!("| compound | phase | rank of truth | worst allowed | candidates |");
    println!("|---|---|---|---|---|");
    for r in &rows {
        println!(
            "| {} | {} | {} | {} | {} |",
            r.compound,
            r.phase,
            match (r.rank, r.worst, r.conflicted) {
                (_, None, true) => "no candidate, a conflict".to_owned(),
                (None, _, _) => "RULED OUT".to_owned(),
                (Some(k), _, _) => k.to_string(),
            },
            r.worst.map_or("none".to_owned(), |k| k.to_string()),
            r.candidates
        );
    }
    for phase in ["vapour", "condensed"] {
        let of_phase: Vec<&Row> = rows.iter().filter(|r| r.phase == phase).collect();
        if of_phase.is_empty() {
            continue;
        }
        let kept = of_phase.iter().filter(|r| r.rank.is_some()).count();
        let first = of_phase.iter().filter(|r| r.rank == Some(1)).count();
        let open: Vec<usize> = of_phase
            .iter()
            .filter(|r| !r.settled_by_formula)
            .map(|r| r.candidates)
            .collect();
        println!(
            "{phase}: {} spectra, truth kept {kept}, ranked first {first} ({:.0} %), median candidates where the formula does not settle it {} (of {})",
            of_phase.len(),
            100.0 * first as f64 / of_phase.len() as f64,
            median(open.clone()),
            open.len()
        );
    }
    let lost: Vec<String> = rows
        .iter()
        .filter(|r| match r.worst {
            Some(worst) => r.rank.is_none_or(|k| k > worst),
            None => !r.conflicted,
        })
        .map(|r| {
            format!(
                "{} ({}): rank {:?}, allowed {:?} (None: no candidate, a conflict); {}",
                r.compound, r.phase, r.rank, r.worst, r.why
            )
        })
        .collect();
    assert!(lost.is_empty(), "truth lost or ranked too low: {lost:#?}");
}
