//! Black-box tests of `quiddity from-mass`: stdout, stderr and exit status compared in
//! full (see `tests/support/cli.rs`); the formulas that matter are also checked against
//! published masses.

#[path = "support/cli.rs"]
mod cli;
use cli::Ran;

/// Runs `quiddity from-mass ARGS` without an expectation file (for runs whose output is
/// checked against another run rather than pinned).
fn run_free(args: &[&str]) -> Ran {
    cli::quiddity(std::iter::once("from-mass").chain(args.iter().copied())).run()
}

/// Runs `quiddity from-mass ARGS` and compares the whole run with
/// `tests/expect/from-mass/NAME.txt`.
fn run(args: &[&str], name: &str) -> Ran {
    let ran = cli::quiddity(std::iter::once("from-mass").chain(args.iter().copied())).run();
    ran.expect_file(&format!("from-mass/{name}"));
    ran
}

#[test]
fn protonated_caffeine_json_lists_caffeine() {
    // Done-when of the issue: caffeine's formula C8H10N4O2 (published monoisotopic mass
    // 194.0804; common practice) among the candidates for [M+H]+ 195.0877 at 5 ppm.
    let out = run(
        &["195.0877", "--ion", "[M+H]+", "--ppm", "5", "--json"],
        "caffeine-cation-json",
    );
    out.status_is(0);
    let doc = out.json();
    let candidates = doc["candidates"].as_array().expect("candidates");
    let caffeine = candidates
        .iter()
        .find(|c| c["formula"] == "C8H10N4O2")
        .expect("caffeine listed");
    assert!(caffeine["error_ppm"].as_f64().unwrap().abs() < 1.0);
    assert_eq!(caffeine["dbe"].as_f64(), Some(6.0));
    assert_eq!(doc["query"]["ion"], "[M+H]+");
    assert!(doc["caution"]
        .as_str()
        .unwrap()
        .contains("not an identification"));
    // Best first.
    let totals: Vec<f64> = candidates
        .iter()
        .map(|c| c["score"]["total"].as_f64().unwrap())
        .collect();
    assert!(totals.windows(2).all(|w| w[0] >= w[1]));
}

#[test]
fn human_output_is_a_table_with_the_caution() {
    let out = run(
        &["195.0877", "--ion", "[M+H]+", "--m1", "10.3", "--m2", "0.9"],
        "caffeine-cation-text",
    );
    out.status_is(0);
    let text = out.stdout;
    let first_row = text
        .lines()
        .find(|l| l.trim_start().starts_with("1 "))
        .expect("rank 1 row");
    assert!(first_row.contains("C8H10N4O2"), "{text}");
    assert!(text.contains("screening lead, not an identification"));
    assert!(text.contains("M+2 alone allows Cl 0"), "{text}");
}

#[test]
fn bad_input_exits_2_with_the_place() {
    let cases: &[(&[&str], &str, &str)] = &[
        (
            &["-5"],
            "error: <m/z>:1:1: m/z must be positive",
            "negative",
        ),
        (
            &["195.08x7"],
            "error: <m/z>:1:7: m/z must be a number",
            "not-a-number",
        ),
        (
            &["99999.1"],
            "error: <m/z>:1:1: m/z must be positive and at most 5000",
            "too-large",
        ),
        (
            &["195.0877", "--elements", "C0-30Xx0-4"],
            "error: --elements:1:6: unknown element \"Xx\"",
            "unknown-element",
        ),
        (
            &["195.0877", "--ion", "[M+Hh]+"],
            "error: --ion:1:1: unknown ion type \"[M+Hh]+\"",
            "unknown-ion",
        ),
        (
            &["195.0877", "--ppm", "-3"],
            "error: --ppm: tolerance must be positive",
            "ppm-negative",
        ),
    ];
    for (args, expected, name) in cases {
        let out = run(args, &format!("bad-{name}"));
        let stderr = &out.stderr;
        assert_eq!(out.status, Some(2), "{args:?}: {stderr}");
        assert!(
            stderr.lines().next().unwrap_or("").starts_with(expected),
            "{args:?}: {stderr}"
        );
        assert!(out.stdout.is_empty(), "{args:?}");
    }
    let out = run(&["195.0877", "--ion", "[M+Hh]+"], "bad-ion-text");
    assert!(out.stderr.contains("did you mean \"[M+H]+\""));
}

#[test]
fn no_formula_exits_1() {
    // Only carbon allowed: nothing lies at m/z 195.0877 within 1 ppm.
    let out = run(
        &["195.0877", "--elements", "C0-20", "--ppm", "1"],
        "carbon-only-none",
    );
    out.status_is(1);
    assert!(out.stdout.contains("0 candidate formula(s)"));
}

#[test]
fn nominal_mz_uses_the_radical_cation() {
    let out = run(
        &["120", "--elements", "C0-10H0-20O0-2", "--json"],
        "nominal-120-json",
    );
    out.status_is(0);
    let doc = out.json();
    assert_eq!(doc["query"]["mode"], "nominal");
    assert_eq!(doc["query"]["ion"], "M+.");
    // Acetophenone C8H8O (nominal mass 120; common practice) is among them.
    let listed = doc["candidates"]
        .as_array()
        .unwrap()
        .iter()
        .any(|c| c["formula"] == "C8H8O");
    assert!(listed);
}

#[test]
fn the_best_first_list_equals_the_head_of_the_full_list() {
    // An invented accurate m/z; the best 5 found best first must be the first 5 of the
    // list that scores every formula (--max 0), and the count says whether it is complete.
    let doc = |max: &str| -> serde_json::Value {
        let out = run_free(&["300.1234", "--ppm", "5", "--max", max, "--json"]);
        out.status_is(0);
        out.json()
    };
    let best = doc("5");
    let all = doc("0");
    let names = |d: &serde_json::Value| -> Vec<String> {
        d["candidates"]
            .as_array()
            .expect("candidates")
            .iter()
            .map(|c| c["formula"].as_str().unwrap_or_default().to_owned())
            .collect()
    };
    assert_eq!(names(&best), names(&all)[..5].to_vec());
    assert_eq!(all["n_candidates_complete"], true);
    let n_all = all["n_candidates"].as_u64().expect("count");
    let n_best = best["n_candidates"].as_u64().expect("count");
    assert!(n_best <= n_all);
    if best["n_candidates_complete"] == true {
        assert_eq!(n_best, n_all);
    }
    let text = run_free(&["300.1234", "--max", "5"]).stdout;
    if best["n_candidates_complete"] == false {
        assert!(text.contains("at least"), "{text}");
    }
}

#[test]
fn a_memory_limit_stops_an_exhaustive_listing_with_exit_2() {
    let out = run(
        &["700", "--max", "0", "--memory-limit", "1"],
        "memory-limit",
    );
    out.status_is(2);
    assert!(
        out.stderr.contains("memory limit of 1 MB"),
        "{}",
        out.stderr
    );
    assert!(out.stdout.is_empty());
}
