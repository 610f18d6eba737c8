//! Whole cases from invented spectra: for each of the eleven compounds of
//! tests/support/phase_compounds.rs (handbook positions from memory, sourced there), a case
//! with the molecular formula (common practice) and the spectrum file — once as a liquid
//! film, once as a vapour (`technique: gas`, 4 and 8 cm⁻¹ resolution) — is loaded as the
//! `solve` command loads it and solved with the shipped catalogue. The true group set
//! (counted on the required ids, subtypes rolled up through `subtype_of`) must be among
//! the candidates: a wrongly excluded truth is the worst failure. The rank of the truth is
//! printed as a table (`cargo test --test ir_phase_cases -- --nocapture`).

#[path = "support/phase_compounds.rs"]
mod compounds;

use compounds::{Compound, COMPOUNDS};
use quiddity::cli::casefile::{load_case, solve, LoadOptions};
use quiddity::engine::{Outcome, SolveOptions};
use quiddity::rules::embedded_catalogue;

/// The group ids every catalogue must hold (the design notes' contract), plus `ring`.
const REQUIRED: &[&str] = &[
    "alkene",
    "alkyne_terminal",
    "alkyne_internal",
    "aromatic_ring",
    "alcohol",
    "phenol",
    "ether",
    "aldehyde",
    "ketone",
    "carboxylic_acid",
    "ester",
    "anhydride",
    "acyl_halide",
    "amine_primary",
    "amine_secondary",
    "amine_tertiary",
    "amide_primary",
    "amide_secondary",
    "amide_tertiary",
    "nitrile",
    "nitro",
    "imine",
    "isocyanate",
    "thiol",
    "sulfide",
    "sulfoxide",
    "sulfone",
    "sulfonamide",
    "fluoro",
    "chloro",
    "bromo",
    "iodo",
    "pyridine_ring",
    "carbamate",
    "urea",
    "nitrate_ester",
    "phosphate_ester",
    "ring",
];

/// Rank of the first candidate whose counts on the required ids equal the truth.
fn rank_of_truth(c: &Compound, outcome: &Outcome) -> Option<usize> {
    outcome
        .candidates
        .iter()
        .find(|cand| {
            REQUIRED.iter().all(|id| {
                let want = c
                    .groups
                    .iter()
                    .find(|(g, _)| g == id)
                    .map_or(0, |(_, n)| *n);
                cand.families.get(*id).copied().unwrap_or(0) == want
            })
        })
        .map(|cand| cand.rank)
}

struct Row {
    name: &'static str,
    phase: String,
    rank: Option<usize>,
    n: usize,
    ruled_out: String,
}

fn solve_one(c: &Compound, technique: &str, spectrum: &str, label: &str) -> Row {
    let dir = tempfile::tempdir().expect("temporary directory");
    std::fs::write(dir.path().join("spectrum.csv"), spectrum).expect("write spectrum");
    let case = format!(
        "case: INV-{}\ntitle: invented {} spectrum of {} (test)\nformula: {}\nir:\n  spectrum: spectrum.csv\n  technique: {technique}\n",
        label.replace(' ', "-"),
        label,
        c.name,
        c.formula
    );
    let path = dir.path().join("case.yaml");
    std::fs::write(&path, case).expect("write case");
    let loaded = load_case(&path, &LoadOptions::default())
        .unwrap_or_else(|f| panic!("{} {label}: {:?}", c.name, f.diagnostics));
    let catalogue = embedded_catalogue().expect("shipped catalogue");
    let options = SolveOptions {
        max_candidates: 100_000,
        ..SolveOptions::default()
    };
    let outcome = solve(&loaded, &catalogue, &options);
    let ruled_out = outcome
        .ruled_out
        .iter()
        .filter(|r| c.groups.iter().any(|(g, _)| *g == r.group))
        .map(|r| format!("{}: {}", r.group, r.reason))
        .collect::<Vec<_>>()
        .join("; ");
    Row {
        name: c.name,
        phase: label.to_owned(),
        rank: rank_of_truth(c, &outcome),
        n: outcome.n_consistent,
        ruled_out,
    }
}

#[test]
fn the_truth_survives_every_invented_spectrum_in_both_phases() {
    let mut rows = Vec::new();
    for (i, c) in COMPOUNDS.iter().enumerate() {
        rows.push(solve_one(
            c,
            "film",
            &compounds::condensed_text(c, 11 + i as u64),
            "condensed",
        ));
        for resolution in [4.0, 8.0] {
            rows.push(solve_one(
                c,
                "gas",
                &compounds::vapour_text(c, resolution, 101 + i as u64),
                &format!("vapour {resolution}"),
            ));
        }
    }
    println!("| compound | phase | rank of truth | candidates |");
    println!("|---|---|---|---|");
    for r in &rows {
        println!(
            "| {} | {} | {} | {} |",
            r.name,
            r.phase,
            r.rank.map_or("EXCLUDED".to_owned(), |k| k.to_string()),
            r.n
        );
    }
    let lost: Vec<String> = rows
        .iter()
        .filter(|r| r.rank.is_none())
        .map(|r| format!("{} ({}): {}", r.name, r.phase, r.ruled_out))
        .collect();
    assert!(lost.is_empty(), "truth excluded: {lost:#?}");
}
