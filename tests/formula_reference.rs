//! Whole-molecule checks against general-purpose libraries from PyPI: the table
//! `tests/reference/formula_table.tsv` was written by `tests/reference/make_formula_table.py`
//! with pyteomics, molmass and IsoSpecPy (versions in its first line). Each row is a real
//! compound; quiddity parses the `written` form (condensed structural notation where
//! usual) and must reproduce the libraries' numbers within the tolerances below.

use quiddity::chem::{aggregated_pattern, Formula};

const TABLE: &str = include_str!("reference/formula_table.tsv");

/// One row of the table, fields looked up by header name.
struct Row<'a> {
    fields: Vec<&'a str>,
    header: &'a [&'a str],
}

impl Row<'_> {
    fn text(&self, column: &str) -> &str {
        let i = self
            .header
            .iter()
            .position(|h| *h == column)
            .unwrap_or_else(|| panic!("column {column} missing from the reference table"));
        self.fields[i]
    }

    fn number(&self, column: &str) -> f64 {
        let text = self.text(column);
        text.parse()
            .unwrap_or_else(|e| panic!("{}: {column} = {text:?}: {e}", self.text("name")))
    }
}

fn rows() -> Vec<(Row<'static>, Formula)> {
    let mut lines = TABLE.lines().filter(|l| !l.starts_with('#'));
    let header: Vec<&'static str> = lines.next().expect("header line").split('\t').collect();
    let header: &'static [&'static str] = Box::leak(header.into_boxed_slice());
    let rows: Vec<(Row<'static>, Formula)> = lines
        .filter(|l| !l.trim().is_empty())
        .map(|line| {
            let row = Row {
                fields: line.split('\t').collect(),
                header,
            };
            assert_eq!(row.fields.len(), header.len(), "{line}");
            let formula = Formula::parse(row.text("written"))
                .unwrap_or_else(|e| panic!("{}: {e}", row.text("written")));
            (row, formula)
        })
        .collect();
    // A table that lost its rows must not pass quietly.
    assert!(rows.len() >= 30, "only {} reference compounds", rows.len());
    rows
}

#[test]
fn the_table_covers_the_required_elements() {
    let mut seen = std::collections::BTreeSet::new();
    for (_, formula) in rows() {
        for (atom, _) in formula.atoms() {
            seen.insert(atom.symbol());
        }
    }
    for s in ["C", "H", "N", "O", "S", "P", "F", "Cl", "Br", "I"] {
        assert!(seen.contains(s), "no reference compound holds {s}");
    }
}

#[test]
fn written_forms_print_as_the_hill_formula() {
    for (row, formula) in rows() {
        assert_eq!(
            formula.to_string(),
            row.text("hill"),
            "{}",
            row.text("name")
        );
    }
}

#[test]
fn monoisotopic_masses_match_molmass_to_a_micro_unit() {
    // molmass uses AME2020-era isotope masses like quiddity: agreement ≤ 1e-6 u.
    for (row, formula) in rows() {
        let expected = row.number("mono_molmass");
        let got = formula.monoisotopic_mass();
        assert!(
            (got - expected).abs() <= 1e-6,
            "{}: {got} vs molmass {expected}",
            row.text("name")
        );
    }
}

#[test]
fn monoisotopic_masses_match_pyteomics() {
    // pyteomics' NIST mass table is older (I 126.904473 against AME2020 126.9044719), so
    // the agreement is about 1e-6 u per atom of the heaviest elements.
    for (row, formula) in rows() {
        let expected = row.number("mono_pyteomics");
        let got = formula.monoisotopic_mass();
        assert!(
            (got - expected).abs() <= 5e-6,
            "{}: {got} vs pyteomics {expected}",
            row.text("name")
        );
    }
}

#[test]
fn average_masses_match_within_a_hundredth() {
    for (row, formula) in rows() {
        let got = formula.average_mass();
        for column in ["avg_pyteomics", "avg_molmass"] {
            let expected = row.number(column);
            assert!(
                (got - expected).abs() <= 0.01,
                "{}: {got} vs {column} {expected}",
                row.text("name")
            );
        }
    }
}

#[test]
fn dbe_matches_the_textbook_formula() {
    for (row, formula) in rows() {
        assert_eq!(formula.dbe(), row.number("dbe"), "{}", row.text("name"));
    }
}

/// quiddity's aggregated peak at nominal mass M+k: (relative %, mass), 0 when absent.
fn peak_at(formula: &Formula, k: u64) -> (f64, f64) {
    aggregated_pattern(formula)
        .relative(0.0)
        .iter()
        .find(|p| (p.mz - formula.monoisotopic_mass()).round() as u64 == k)
        .map_or((0.0, 0.0), |p| (p.relative, p.mz))
}

#[test]
fn aggregated_patterns_match_molmass() {
    // Same isotope data (IUPAC 2013 representative compositions): this checks the
    // convolution and pruning; agreement to 1e-5 percentage points and 1e-6 u.
    for (row, formula) in rows() {
        for k in 0..5u64 {
            let (relative, mass) = peak_at(&formula, k);
            let expected = row.number(&format!("m{k}"));
            assert!(
                (relative - expected).abs() <= 1e-5,
                "{} M+{k}: {relative} vs molmass {expected}",
                row.text("name")
            );
            if k < 3 && expected > 0.0 {
                let expected_mass = row.number(&format!("mz{k}"));
                assert!(
                    (mass - expected_mass).abs() <= 1e-6,
                    "{} M+{k} mass: {mass} vs molmass {expected_mass}",
                    row.text("name")
                );
            }
        }
    }
}

#[test]
fn aggregated_patterns_match_isospecpy_within_its_abundance_differences() {
    // IsoSpecPy ships slightly different abundances (13C 0.010788 against 0.0107), which
    // moves M+1 of a C20 compound by about 0.7 % of its value: tolerance 2 % + 0.01.
    for (row, formula) in rows() {
        for k in 0..5u64 {
            let (relative, _) = peak_at(&formula, k);
            let expected = row.number(&format!("iso{k}"));
            assert!(
                (relative - expected).abs() <= 0.02 * expected + 0.01,
                "{} M+{k}: {relative} vs IsoSpecPy {expected}",
                row.text("name")
            );
        }
    }
}

/// `tests/reference/fine_table.tsv` (IsoSpecPy, see `make_fine_table.py`): every
/// isotopologue down to 1e-4 of the most probable, unmerged.
const FINE_TABLE: &str = include_str!("reference/fine_table.tsv");

#[test]
fn fine_structure_isotopologues_match_isospecpy() {
    use quiddity::chem::isotopes::fine_structure_pattern;
    let mut rows: Vec<(&str, f64, f64)> = Vec::new(); // formula, mass, relative
    for line in FINE_TABLE.lines().filter(|l| !l.starts_with('#')).skip(1) {
        let fields: Vec<&str> = line.split('\t').collect();
        assert_eq!(fields.len(), 4, "{line}");
        let number = |s: &str| s.parse::<f64>().unwrap_or_else(|e| panic!("{line}: {e}"));
        rows.push((fields[1], number(fields[2]), number(fields[3])));
    }
    let formulas: std::collections::BTreeSet<&str> = rows.iter().map(|r| r.0).collect();
    assert!(
        formulas.len() >= 5 && rows.len() >= 50,
        "reference table too small"
    );
    for text in formulas {
        let formula = Formula::parse(text).expect("valid formula");
        // R = 1e12: no two distinct isotopologues merge (closest pairs are ~0.1 mDa).
        let ours = fine_structure_pattern(&formula, 1e12)
            .expect("valid R")
            .relative(0.0);
        let reference: Vec<(f64, f64)> = rows
            .iter()
            .filter(|r| r.0 == text)
            .map(|r| (r.1, r.2))
            .collect();
        // Every reference isotopologue is found at the same exact mass (IsoSpecPy's own
        // mass table differs from AME2020 by up to 5e-7 u per Br: 2e-6 u); intensities
        // differ by its own abundances (≈ 0.8 % per 13C): 4 % + 0.003.
        for (mass, relative) in &reference {
            let found = ours
                .iter()
                .min_by(|a, b| (a.mz - mass).abs().total_cmp(&(b.mz - mass).abs()))
                .expect("peaks");
            assert!(
                (found.mz - mass).abs() < 2e-6,
                "{text}: {mass} vs {}",
                found.mz
            );
            assert!(
                (found.relative - relative).abs() < 0.04 * relative + 0.003,
                "{text} at {mass}: {} vs IsoSpecPy {relative}",
                found.relative
            );
        }
        // And quiddity lists nothing above the reference's threshold that it lacks.
        for peak in ours.iter().filter(|p| p.relative >= 0.011) {
            assert!(
                reference.iter().any(|(m, _)| (m - peak.mz).abs() < 2e-6),
                "{text}: {} ({}) missing from IsoSpecPy",
                peak.mz,
                peak.relative
            );
        }
    }
}
