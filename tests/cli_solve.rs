//! Black-box tests of `quiddity solve`: the JSON contract's shape on every demo case,
//! and stdout, stderr and exit status compared in full (see `tests/support/cli.rs`): the
//! human output of every demo case against `tests/expect/solve/`, bad input inline.
//! Whether the answers are right is `tests/corpus_measured.rs`'s job (the demo cases'
//! designed truths are in `tests/corpus/demo.tsv`); these files pin the layout.

#[path = "support/cli.rs"]
mod cli;
use cli::quiddity;
use std::path::Path;

/// A scratch directory holding one case file `name` with `text`.
fn temp_case(name: &str, text: &str) -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    std::fs::write(dir.path().join(name), text).unwrap_or_else(|e| panic!("{e}"));
    dir
}

#[test]
fn every_demo_case_solves_with_the_json_contract() {
    let mut n = 0;
    for entry in std::fs::read_dir(Path::new(env!("CARGO_MANIFEST_DIR")).join("cases"))
        .unwrap_or_else(|e| panic!("{e}"))
    {
        let path = entry.unwrap_or_else(|e| panic!("{e}")).path();
        if path.extension().is_none_or(|e| e != "yaml") {
            continue;
        }
        n += 1;
        let stem = path
            .file_stem()
            .unwrap_or_default()
            .to_string_lossy()
            .into_owned();
        let relative = format!("cases/{stem}.yaml");
        quiddity(["solve", relative.as_str()])
            .run()
            .expect_file(&format!("solve/{stem}"));
        let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{e}"));
        assert!(
            text.to_lowercase().contains("invented"),
            "{} must say it is invented",
            path.display()
        );
        let out = quiddity(["solve", relative.as_str(), "--json"]).run();
        // stderr carries notes only (a demo library without its index file is indexed in
        // memory, and says so); never an error.
        assert!(
            out.stderr.lines().all(|l| l.starts_with("note: ")),
            "{relative}: only notes on stderr, got {}",
            out.stderr
        );
        let v = out.json();
        let candidates = v["candidates"]
            .as_array()
            .unwrap_or_else(|| panic!("candidates array"));
        assert!(v["ruled_out"].is_array() && v["conflicts"].is_array());
        if candidates.is_empty() {
            out.status_is(1);
            assert!(!v["conflicts"].as_array().unwrap_or(&Vec::new()).is_empty());
        } else {
            out.status_is(0);
            assert!(v["conflicts"].as_array().is_some_and(|c| c.is_empty()));
            for (i, c) in candidates.iter().enumerate() {
                assert_eq!(c["rank"].as_u64(), Some(i as u64 + 1));
                assert!(
                    c["groups"].is_object() && c["score"].is_number() && c["families"].is_object()
                );
            }
            let scores: Vec<f64> = candidates
                .iter()
                .filter_map(|c| c["score"].as_f64())
                .collect();
            assert!(
                scores.windows(2).all(|w| w[0] >= w[1]),
                "best first: {scores:?}"
            );
        }
    }
    assert!(n >= 4, "expected the demo cases, found {n}");
}

#[test]
fn the_carbonyl_demo_ranks_an_aryl_ketone_first() {
    let out = quiddity(["solve", "cases/lab-0101-carbonyl.yaml", "--json"]).run();
    out.status_is(0);
    let v = out.json();
    let top = &v["candidates"][0];
    assert_eq!(top["families"]["ketone"].as_u64(), Some(1), "{top}");
    assert_eq!(top["families"]["aromatic_ring"].as_u64(), Some(1), "{top}");
}

#[test]
fn the_conflict_demo_exits_1_and_names_its_evidence() {
    // The whole run is compared with tests/expect/solve/lab-0104-conflict.txt by the
    // walk above; these are the words the conflict must hold whatever the layout.
    let out = quiddity(["solve", "cases/lab-0104-conflict.yaml"]).run();
    out.status_is(1);
    let text = &out.stdout;
    assert!(text.contains("conflict"), "{text}");
    assert!(text.contains("formula C6H14"), "{text}");
    assert!(text.contains("band at 1716"), "{text}");
    assert!(
        text.contains("a screening lead, not an identification"),
        "{text}"
    );
}

#[test]
fn bad_input_exits_2_with_the_place_on_stderr() {
    let dir = temp_case(
        "bad.yaml",
        "formula: C3H6O\nir:\n  bands:\n    - { at: 1715, strength: strnog }\n",
    );
    quiddity(["solve", "bad.yaml", "--json"])
        .cwd(dir.path())
        .run()
        .expect(
            2,
            "",
            concat!(
                "error: bad.yaml:4:29: ir.bands[0].strength: unknown strength \"strnog\"\n",
                "  |\n",
                "4 |     - { at: 1715, strength: strnog }\n",
                "  |                             ^\n",
                "  = help: did you mean \"strong\"?\n",
            ),
        );

    let dir = temp_case(
        "far.yaml",
        "formula: C3H6O\nir:\n  bands:\n    - { at: 4500, strength: strong }\n",
    );
    quiddity(["solve", "far.yaml"])
        .cwd(dir.path())
        .run()
        .expect_file("solve/bad-band-outside-window");

    quiddity(["solve", "cases/does-not-exist.yaml"])
        .run()
        .expect_file("solve/bad-missing-case");

    quiddity(["solve", "cases/lab-0101-carbonyl.yaml", "--tolerance", "-3"])
        .run()
        .expect_file("solve/bad-negative-tolerance");
    // The same value glued to its option reaches the tolerance check itself.
    quiddity(["solve", "cases/lab-0101-carbonyl.yaml", "--tolerance=-3"])
        .run()
        .expect(
            2,
            "",
            "error: --tolerance: tolerance -3 cm⁻¹ must be between 0 and 100\n",
        );
}

#[test]
fn max_limits_the_list_and_says_so() {
    let out = quiddity([
        "solve",
        "cases/lab-0101-carbonyl.yaml",
        "--json",
        "--max",
        "2",
    ])
    .run();
    out.status_is(0);
    let v = out.json();
    assert_eq!(v["candidates"].as_array().map(Vec::len), Some(2));
    assert_eq!(v["list_truncated"].as_bool(), Some(true));
    quiddity(["solve", "cases/lab-0101-carbonyl.yaml", "--max", "2"])
        .run()
        .expect_file("solve/lab-0101-carbonyl-max-2");
}
