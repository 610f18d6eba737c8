//! Black-box tests of `quiddity isomers`: stdout, stderr and exit status compared in full
//! every time (see `tests/support/cli.rs`); structure counts and lists are also checked
//! against published values.

#[path = "support/cli.rs"]
mod cli;

/// Runs `quiddity isomers ARGS`, compares the whole run with
/// `tests/expect/isomers/NAME.txt` and returns (status, stdout, stderr).
fn run(args: &[&str], name: &str) -> (i32, String, String) {
    let ran = cli::quiddity(std::iter::once("isomers").chain(args.iter().copied())).run();
    ran.expect_file(&format!("isomers/{name}"));
    (ran.status.unwrap_or(-1), ran.stdout, ran.stderr)
}

#[test]
fn counting_prints_the_bare_number() {
    // common practice: hexane has 5 constitutional isomers.
    assert_eq!(
        run(&["C6H14", "--count"], "hexane-count"),
        (0, "5\n".to_owned(), String::new())
    );
}

#[test]
fn json_lists_every_structure_once() {
    let (code, stdout, stderr) = run(&["C4H10O", "--json"], "butanol-ethers-json");
    assert_eq!((code, stderr.as_str()), (0, ""));
    let v: serde_json::Value = serde_json::from_str(&stdout).expect("one JSON document");
    assert_eq!(v["formula"], "C4H10O");
    assert_eq!(v["count"], 7);
    assert_eq!(v["truncated"], false);
    let smiles: Vec<&str> = v["structures"]
        .as_array()
        .expect("structures")
        .iter()
        .map(|s| s["smiles"].as_str().expect("smiles"))
        .collect();
    // common practice: the four butanols and three ethers of C4H10O.
    assert_eq!(
        smiles,
        [
            "CC(C)(C)O",
            "CC(C)CO",
            "CCC(C)O",
            "CCCCO",
            "CCOCC",
            "COC(C)C",
            "COCCC"
        ]
    );
    assert_eq!(v["structures"][0]["features"]["alcohols"][0], "tertiary");
}

#[test]
fn groups_restrict_and_features_are_shown() {
    let (code, stdout, _) = run(
        &["C8H8O", "--groups", "ketone:1,aromatic_ring:1"],
        "aryl-ketone-text",
    );
    assert_eq!(code, 0);
    assert!(stdout.starts_with("C8H8O with groups aromatic_ring:1,ketone:1: 1 structure(s)\n"));
    assert!(stdout.contains("CC(=O)c1ccccc1"));
    assert!(stdout.contains("ring mono; C=O ketone conj. aromatic_ring"));
    assert!(stdout.contains("not an identification"));
}

#[test]
fn the_cap_is_reported_honestly() {
    let (code, stdout, stderr) = run(&["C8H18", "--max", "3", "--json"], "octane-capped-json");
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&stdout).expect("JSON");
    assert_eq!(v["count"], 3);
    assert_eq!(v["truncated"], true);
    assert_eq!(
        stderr,
        "note: truncated at 3 structures; raise --max to see more\n"
    );
}

#[test]
fn no_structure_is_a_scientific_no_with_its_reason() {
    let (code, stdout, _) = run(&["C4H10O", "--groups", "ketone:1"], "no-structure");
    assert_eq!(code, 1);
    assert!(stdout.contains("0 structure(s)"));
    assert!(stdout.contains(
        "no structure: the groups account for 1 rings plus π bonds (DBE), the formula for 0"
    ));
}

#[test]
fn bad_input_names_its_place_and_exits_2() {
    let (code, stdout, stderr) = run(&["C4H10O", "--groups", "ketone:1,ketome:1"], "bad-group-id");
    assert_eq!((code, stdout.as_str()), (2, ""));
    assert!(
        stderr.starts_with("error: --groups:1:10: unknown group id \"ketome\""),
        "{stderr}"
    );
    assert!(stderr.contains("did you mean \"ketone\"?"));
    let (code, _, stderr) = run(&["C6X"], "bad-element");
    assert_eq!(code, 2);
    assert!(
        stderr.starts_with("error: <formula>:1:3: unknown element symbol \"X\""),
        "{stderr}"
    );
    let (code, _, stderr) = run(&["SiH4"], "unsupported-element");
    assert_eq!(code, 2);
    assert!(
        stderr.contains("element Si is not supported by the structure generator"),
        "{stderr}"
    );
    let (code, _, stderr) = run(&["C6H6+"], "charged");
    assert_eq!(code, 2);
    assert!(
        stderr.contains("neutral closed-shell molecules only"),
        "{stderr}"
    );
    let (code, _, stderr) = run(&["C6H14", "--max", "0"], "max-zero");
    assert_eq!(code, 2);
    assert!(
        stderr.contains("error: --max: the cap must be at least 1"),
        "{stderr}"
    );
}

#[test]
fn a_search_past_its_memory_budget_stops_with_a_message_not_an_abort() {
    // Docosane has hundreds of thousands of isomers (see the published alkane counts);
    // under a 1 MB budget the search stops early and says which limit and what to do.
    let (code, stdout, stderr) = run(
        &["C22H46", "--count", "--memory-limit", "1"],
        "docosane-memory-limit",
    );
    assert_eq!((code, stdout.as_str()), (2, ""));
    assert!(stderr.contains("memory limit of 1 MB"), "{stderr}");
}

#[test]
fn a_search_past_its_time_budget_stops_with_a_message() {
    let (code, _, stderr) = run(
        &["C24H50", "--count", "--time-limit", "0.05"],
        "tetracosane-time-limit",
    );
    assert_eq!(code, 2);
    assert!(stderr.contains("time limit of 0.05 s"), "{stderr}");
}
