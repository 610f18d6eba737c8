//! The engine judged on real measurements, end to end: every line of
//! `tests/corpus/expected.tsv` names a measured spectrum (a JCAMP-DX file, read by the
//! tool's own reader and picker as a vapour) or a case file with a band list taken from a
//! published table, the compound's molecular formula, its true functional groups worked
//! out from its structure (common practice), and the worst rank the truth may take.
//!
//! The truth must never be ruled out, and must rank no lower than its line allows; a
//! candidate that stands for several splits of the same unsaturation (see
//! `engine::collapse`) holds the truth when one of its alternatives is the true set. The
//! test prints, by phase: kept, ranked first, and the median number of candidates where
//! the formula alone does not settle the answer.

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
    worst_rank: usize,
}

fn tests_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests")
}

fn read_expected() -> Vec<Expected> {
    let path = tests_dir().join("corpus/expected.tsv");
    let text = std::fs::read_to_string(&path).expect("tests/corpus/expected.tsv");
    let mut out = Vec::new();
    for (n, line) in text.lines().enumerate() {
        if line.trim().is_empty() || line.starts_with('#') {
            continue;
        }
        let line = line.split(" #").next().unwrap_or(line);
        let cols: Vec<&str> = line.split('\t').collect();
        assert_eq!(cols.len(), 5, "expected.tsv line {}: five columns", n + 1);
        let groups = if cols[3] == "-" {
            BTreeMap::new()
        } else {
            cols[3]
                .split(',')
                .map(|g| {
                    let (id, count) = g
                        .split_once(':')
                        .unwrap_or_else(|| panic!("expected.tsv line {}: {g}", n + 1));
                    (id.to_owned(), count.parse().expect("group count"))
                })
                .collect()
        };
        out.push(Expected {
            path: cols[0].to_owned(),
            compound: cols[1].to_owned(),
            formula: cols[2].to_owned(),
            groups,
            worst_rank: cols[4].trim().parse().expect("worst rank"),
        });
    }
    out
}

/// The case to solve: a case file as it is, or a vapour-phase case around a spectrum.
fn case_path(e: &Expected, scratch: &Path) -> (PathBuf, &'static str) {
    let source = tests_dir().join(&e.path);
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

fn rank_of_truth(truth: &BTreeMap<String, u32>, outcome: &Outcome) -> Option<usize> {
    outcome
        .candidates
        .iter()
        .find(|c| c.groups == *truth || c.alternatives.contains(truth))
        .map(|c| c.rank)
}

struct Row {
    compound: String,
    phase: &'static str,
    rank: Option<usize>,
    worst: usize,
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
    let expected = read_expected();
    assert!(
        expected.len() >= 50,
        "the corpus must hold real measurements ({} lines)",
        expected.len()
    );
    let catalogue = embedded_catalogue().expect("shipped catalogue");
    let options = SolveOptions {
        max_candidates: 10_000,
        ..SolveOptions::default()
    };
    let scratch = tempfile::tempdir().expect("scratch directory");
    let mut rows = Vec::new();
    for e in &expected {
        let (path, phase) = case_path(e, scratch.path());
        let loaded = load_case(
            &path,
            &LoadOptions {
                allow_outside: false,
            },
        )
        .unwrap_or_else(|f| panic!("{}: {:?}", e.path, f.diagnostics));
        assert_eq!(
            loaded
                .case
                .formula
                .as_ref()
                .map(|f| f.composition.to_string()),
            Some(
                quiddity::chem::Formula::parse(&e.formula)
                    .expect("formula")
                    .to_string()
            ),
            "{}: the case's formula differs from expected.tsv",
            e.path
        );
        let outcome = solve(&loaded, &catalogue, &options);
        // What the formula alone allows: the same case without its IR evidence.
        let mut formula_only = loaded.case.clone();
        formula_only.ir = None;
        let by_formula = quiddity::engine::solve(&formula_only, &catalogue, &options);
        let rank = rank_of_truth(&e.groups, &outcome);
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
            r.rank.map_or("RULED OUT".to_owned(), |k| k.to_string()),
            r.worst,
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
        .filter(|r| r.rank.is_none_or(|k| k > r.worst))
        .map(|r| {
            format!(
                "{} ({}): rank {:?}, allowed {}; {}",
                r.compound, r.phase, r.rank, r.worst, r.why
            )
        })
        .collect();
    assert!(lost.is_empty(), "truth lost or ranked too low: {lost:#?}");
}
