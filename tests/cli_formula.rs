//! Black-box tests of `quiddity formula`: the built binary is run and its stdout, stderr
//! and exit status are compared in full (see `tests/support/cli.rs`) for good and bad
//! input; the values that matter are also checked one by one against published figures.

#[path = "support/cli.rs"]
mod cli;
use cli::quiddity;

/// Runs a JSON command that must succeed with nothing on stderr; compares the whole run
/// with `tests/expect/formula/NAME.txt` and returns the document.
fn json(args: &[&str], name: &str) -> serde_json::Value {
    let ran = quiddity(args).run();
    ran.status_is(0).expect_file(&format!("formula/{name}"));
    assert_eq!(ran.stderr, "", "{}", ran.command);
    ran.json()
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
    let v = json(&["formula", "C8H10N4O2", "--json"], "caffeine-json");
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
    let v = json(&["formula", "C2H3Cl", "--json"], "vinyl-chloride-json");
    let m2 = isotopes(&v)
        .into_iter()
        .find(|(mz, _)| mz.round() == 64.0)
        .expect("M+2 peak");
    assert!((m2.1 - 32.0).abs() < 1.0, "{}", m2.1);
}

#[test]
fn free_order_input_is_reported_in_hill_order() {
    let v = json(
        &["formula", "CH3(CH2)4OH", "--json"],
        "pentanol-free-order-json",
    );
    assert_eq!(v["formula"], "C5H12O");
    assert_eq!(number(&v, "dbe"), 0.0);
}

#[test]
fn charge_option_gives_the_ion_mz() {
    // [M+H]+ of caffeine: 194.080376 + 1.007276 (proton mass, common practice) = 195.087652.
    let v = json(
        &["formula", "C8H11N4O2", "--charge", "1", "--json"],
        "caffeine-cation-json",
    );
    assert_eq!(v["charge"], 1);
    assert!((number(&v, "mz") - 195.087_652).abs() < 1e-5);
    assert_eq!(number(&v, "dbe"), 5.5);
    assert_eq!(v["nitrogen_rule"]["holds"], false);
    let negative = json(
        &["formula", "C8H9N4O2", "--charge", "-1", "--json"],
        "caffeine-anion-json",
    );
    assert!((number(&negative, "mz") - (194.080_376 - 1.007_276)).abs() < 1e-5);
}

#[test]
fn resolution_option_gives_fine_structure() {
    // At R = 100 000 the M+1 of caffeine splits into its 13C and 15N isotopologues
    // (Δm ≈ 6.3 mDa at m/z 195, width 2 mDa).
    let v = json(
        &["formula", "C8H10N4O2", "--resolution", "100000", "--json"],
        "caffeine-fine-json",
    );
    assert_eq!(v["pattern"], "fine");
    let near_195 = isotopes(&v)
        .into_iter()
        .filter(|(mz, _)| mz.round() == 195.0)
        .count();
    assert!(near_195 >= 2, "{near_195}");
    let aggregated = json(&["formula", "C8H10N4O2", "--json"], "caffeine-json");
    assert_eq!(aggregated["pattern"], "aggregated");
}

#[test]
fn human_output_is_an_aligned_table() {
    let ran = quiddity(["formula", "C8H10N4O2"]).run();
    ran.expect_file("formula/caffeine-text");
    let text = ran.stdout.clone();
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
/// (`<formula>:1:COL`) and the problem, and a caret line; the whole run is compared with
/// `tests/expect/formula/bad-NAME.txt`.
fn assert_bad(input: &str, column: usize, problem: &str, name: &str) {
    let ran = quiddity(["formula", input, "--json"]).run();
    ran.expect_file(&format!("formula/bad-{name}"));
    ran.status_is(2);
    assert_eq!(ran.stdout, "", "{input}");
    let first = ran.stderr.lines().next().unwrap_or("");
    assert_eq!(
        first,
        format!("error: <formula>:1:{column}: {problem}"),
        "{input}\n{}",
        ran.stderr
    );
    assert!(ran.stderr.contains('^'), "{}", ran.stderr);
}

#[test]
fn bad_formulas_are_refused_with_place_and_problem() {
    assert_bad(
        "C6H1x",
        5,
        "element symbols start with a capital letter, found 'x'",
        "lower-case-symbol",
    );
    assert_bad("C6H(12", 4, "unclosed '('", "unclosed-paren");
    assert_bad(
        "C-2",
        3,
        "unexpected count after the charge sign",
        "count-after-charge",
    );
    assert_bad(
        "C1000000000000",
        2,
        "count exceeds the limit of 1000000",
        "huge-count",
    );
    assert_bad(
        "CH3Xq",
        4,
        "unknown element symbol \"Xq\"",
        "unknown-element",
    );
}

#[test]
fn did_you_mean_hints_reach_stderr() {
    quiddity(["formula", "CH3Cx"]).run().expect(
        2,
        "",
        "error: <formula>:1:4: unknown element symbol \"Cx\"\n  |\n1 | CH3Cx\n  |    ^\n  = help: did you mean \"C\"?\n",
    );
}

#[test]
fn bad_options_exit_2() {
    for (args, name) in [
        (
            &["formula", "CH4", "--resolution", "0"][..],
            "resolution-zero",
        ),
        (
            &["formula", "CH4", "--resolution", "-3"][..],
            "resolution-negative",
        ),
        (&["formula", "CH4", "--charge", "1000"][..], "charge-huge"),
        (
            &["formula", "CH4", "--charge", "x"][..],
            "charge-not-a-number",
        ),
        (&["formula"][..], "no-formula"),
    ] {
        let ran = quiddity(args).run();
        ran.expect_file(&format!("formula/bad-option-{name}"));
        ran.status_is(2);
        assert_eq!(ran.stdout, "", "{args:?}");
        assert!(!ran.stderr.is_empty(), "{args:?}");
    }
}
