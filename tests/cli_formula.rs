//! Black-box tests of `quiddity formula`: the built binary is run and its stdout, stderr
//! and exit status are checked for good and bad input.

use std::process::{Command, Output};

fn quiddity(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_quiddity"))
        .args(args)
        .output()
        .expect("the quiddity binary runs")
}

fn json(args: &[&str]) -> serde_json::Value {
    let out = quiddity(args);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        out.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("stdout is one JSON document")
}

fn number(v: &serde_json::Value, key: &str) -> f64 {
    v[key]
        .as_f64()
        .unwrap_or_else(|| panic!("{key} missing or not a number in {v}"))
}

/// (m/z, relative) of the isotope list.
fn isotopes(v: &serde_json::Value) -> Vec<(f64, f64)> {
    v["isotopes"]
        .as_array()
        .expect("isotopes array")
        .iter()
        .map(|p| (number(p, "mz"), number(p, "relative")))
        .collect()
}

#[test]
fn caffeine_json_has_the_contract_fields_and_values() {
    // Caffeine C8H10N4O2: monoisotopic 194.0804, nominal 194, DBE 6 (common practice);
    // M+1 ≈ 10.3 % (≈ 1.1 % per C plus N contributions, common practice).
    let v = json(&["formula", "C8H10N4O2", "--json"]);
    assert_eq!(v["formula"], "C8H10N4O2");
    assert!((number(&v, "monoisotopic_mass") - 194.0804).abs() < 1e-4);
    assert!((number(&v, "average_mass") - 194.19).abs() < 0.01);
    assert_eq!(v["nominal_mass"], 194);
    assert_eq!(number(&v, "dbe"), 6.0);
    let peaks = isotopes(&v);
    assert_eq!(peaks[0].0.round(), 194.0);
    assert_eq!(peaks[0].1, 100.0);
    assert_eq!(peaks[1].0.round(), 195.0);
    assert!((peaks[1].1 - 10.3).abs() < 0.1);
    assert_eq!(v["nitrogen_rule"]["holds"], true);
    assert_eq!(v["senior"]["passes"], true);
    assert_eq!(v["lewis"]["passes"], true);
}

#[test]
fn vinyl_chloride_shows_m_plus_2_near_32() {
    // common practice: one Cl gives M+2 ≈ 32 % of M.
    let v = json(&["formula", "C2H3Cl", "--json"]);
    let m2 = isotopes(&v)
        .into_iter()
        .find(|(mz, _)| mz.round() == 64.0)
        .expect("M+2 peak");
    assert!((m2.1 - 32.0).abs() < 1.0, "{}", m2.1);
}

#[test]
fn free_order_input_is_reported_in_hill_order() {
    let v = json(&["formula", "CH3(CH2)4OH", "--json"]);
    assert_eq!(v["formula"], "C5H12O");
    assert_eq!(number(&v, "dbe"), 0.0);
}

#[test]
fn charge_option_gives_the_ion_mz() {
    // [M+H]+ of caffeine: 194.080376 + 1.007276 (proton mass, common practice) = 195.087652.
    let v = json(&["formula", "C8H11N4O2", "--charge", "1", "--json"]);
    assert_eq!(v["charge"], 1);
    assert!((number(&v, "mz") - 195.087_652).abs() < 1e-5);
    assert_eq!(number(&v, "dbe"), 5.5);
    assert_eq!(v["nitrogen_rule"]["holds"], false);
    let negative = json(&["formula", "C8H9N4O2", "--charge", "-1", "--json"]);
    assert!((number(&negative, "mz") - (194.080_376 - 1.007_276)).abs() < 1e-5);
}

#[test]
fn resolution_option_gives_fine_structure() {
    // At R = 100 000 the M+1 of caffeine splits into its 13C and 15N isotopologues
    // (Δm ≈ 6.3 mDa at m/z 195, width 2 mDa).
    let v = json(&["formula", "C8H10N4O2", "--resolution", "100000", "--json"]);
    assert_eq!(v["pattern"], "fine");
    let near_195 = isotopes(&v)
        .into_iter()
        .filter(|(mz, _)| mz.round() == 195.0)
        .count();
    assert!(near_195 >= 2, "{near_195}");
    let aggregated = json(&["formula", "C8H10N4O2", "--json"]);
    assert_eq!(aggregated["pattern"], "aggregated");
}

#[test]
fn human_output_is_an_aligned_table() {
    let out = quiddity(&["formula", "C8H10N4O2"]);
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8(out.stdout).expect("utf-8");
    assert!(text.contains("monoisotopic mass"), "{text}");
    assert!(text.contains("194.080376"), "{text}");
    // Values in the key/value block start in one column.
    let columns: Vec<usize> = text
        .lines()
        .take_while(|l| !l.is_empty())
        .map(|l| {
            let key_end = l.find("  ").expect("two spaces after the key");
            key_end + l[key_end..].len() - l[key_end..].trim_start().len()
        })
        .collect();
    assert!(columns.len() >= 5);
    assert!(
        columns.iter().all(|c| *c == columns[0]),
        "{columns:?}\n{text}"
    );
}

/// Bad input: exit status 2, nothing on stdout, a first stderr line naming the place
/// (`<formula>:1:COL`) and the problem, and a caret line.
fn assert_bad(input: &str, column: usize, problem: &str) {
    let out = quiddity(&["formula", input, "--json"]);
    assert_eq!(out.status.code(), Some(2), "{input}");
    assert!(out.stdout.is_empty(), "{input}");
    let stderr = String::from_utf8(out.stderr).expect("utf-8");
    let first = stderr.lines().next().unwrap_or("");
    assert_eq!(
        first,
        format!("error: <formula>:1:{column}: {problem}"),
        "{input}\n{stderr}"
    );
    assert!(stderr.contains('^'), "{stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
}

#[test]
fn bad_formulas_are_refused_with_place_and_problem() {
    assert_bad(
        "C6H1x",
        5,
        "element symbols start with a capital letter, found 'x'",
    );
    assert_bad("C6H(12", 4, "unclosed '('");
    assert_bad("C-2", 3, "unexpected count after the charge sign");
    assert_bad("C1000000000000", 2, "count exceeds the limit of 1000000");
    assert_bad("CH3Xq", 4, "unknown element symbol \"Xq\"");
}

#[test]
fn did_you_mean_hints_reach_stderr() {
    let out = quiddity(&["formula", "CH3Cx"]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8(out.stderr).expect("utf-8");
    assert!(stderr.contains("help: did you mean"), "{stderr}");
}

#[test]
fn bad_options_exit_2() {
    for args in [
        &["formula", "CH4", "--resolution", "0"][..],
        &["formula", "CH4", "--resolution", "-3"][..],
        &["formula", "CH4", "--charge", "1000"][..],
        &["formula", "CH4", "--charge", "x"][..],
        &["formula"][..],
    ] {
        let out = quiddity(args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        assert!(out.stdout.is_empty(), "{args:?}");
        assert!(!out.stderr.is_empty(), "{args:?}");
    }
}
