//! Black-box tests of `quiddity rules`: stdout, stderr and exit status of the real binary,
//! compared in full (see `tests/support/cli.rs`; expectations in `tests/expect/rules/`).
//! The catalogue digest is redacted in `check` runs: it changes with every catalogue
//! edit, and its equality between the built-in and the shipped directory is checked
//! on its own.

#[path = "support/cli.rs"]
mod cli;
use cli::Ran;
use std::path::Path;

/// Runs `quiddity ARGS` in the crate root.
fn quiddity(args: &[&str]) -> Ran {
    cli::quiddity(args.iter().copied()).run()
}

fn stdout(o: &Ran) -> String {
    o.stdout.clone()
}

fn stderr(o: &Ran) -> String {
    o.stderr.clone()
}

fn json(o: &Ran) -> serde_json::Value {
    o.json()
}

/// The run with the catalogue digest replaced by `<digest>`.
fn without_digest(o: Ran) -> Ran {
    let digest = o
        .stdout
        .split("sha256:")
        .nth(1)
        .or_else(|| o.stdout.split("\"digest\": \"").nth(1))
        .map(|rest| rest.chars().take(64).collect::<String>());
    match digest {
        Some(d) if d.len() == 64 => o.redact(&d, "<digest>"),
        _ => o,
    }
}

#[test]
fn check_passes_on_the_built_in_catalogue() {
    let o = quiddity(&["rules", "check"]);
    o.status_is(0);
    assert!(
        stdout(&o).starts_with("catalogue ok: 10 files, "),
        "{}",
        stdout(&o)
    );
    assert!(stdout(&o).contains("digest sha256:"));
    assert_eq!(stderr(&o), "");
    without_digest(o).expect_file("rules/check-built-in");
}

#[test]
fn check_passes_on_the_shipped_directory_with_the_same_digest() {
    let built_in = json(&quiddity(&["rules", "check", "--json"]));
    let o = quiddity(&["rules", "check", "rules", "--json"]);
    o.status_is(0);
    let dir = json(&o);
    assert_eq!(dir["ok"], true);
    assert_eq!(dir["digest"], built_in["digest"]);
    assert!(dir["groups"].as_u64().unwrap_or(0) >= 45);
    without_digest(o).expect_file("rules/check-directory-json");
}

#[test]
fn check_reports_every_broken_fixture_with_file_line_and_column() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/rules-broken");
    let mut checked = 0;
    for entry in std::fs::read_dir(&root).expect("fixtures exist") {
        let dir = entry.expect("entry").path();
        let name = dir
            .file_name()
            .expect("name")
            .to_string_lossy()
            .into_owned();
        if name.starts_with('_') || !dir.is_dir() {
            continue;
        }
        let rel = format!("tests/fixtures/rules-broken/{name}");
        let o = quiddity(&["rules", "check", &rel]);
        o.expect_file(&format!("rules/broken-{name}"));
        o.status_is(2);
        assert_eq!(
            stdout(&o),
            "",
            "{name}: nothing on stdout when the check fails"
        );
        let expected = std::fs::read_to_string(dir.join("expected.txt")).expect("expected.txt");
        for line in expected.lines().filter(|l| l.starts_with("error: ")) {
            // The CLI names the real path: `error: DIR/FILE:L:C: ...`.
            let with_dir = if line.starts_with("error: <") {
                line.to_owned()
            } else {
                line.replacen("error: ", &format!("error: {rel}/"), 1)
            };
            assert!(
                stderr(&o).contains(&with_dir),
                "{name}: missing\n{with_dir}\nin\n{}",
                stderr(&o)
            );
        }
        checked += 1;
    }
    assert!(checked >= 10, "only {checked} fixtures checked");
}

#[test]
fn check_shows_the_source_line_and_a_caret() {
    // The whole run is compared with tests/expect/rules/broken-unknown-key.txt above.
    let o = quiddity(&["rules", "check", "tests/fixtures/rules-broken/unknown-key"]);
    o.status_is(2);
    let err = stderr(&o);
    assert!(err.contains("11 |         rnage: [1000, 1100]"), "{err}");
    assert!(err.contains("   |         ^"), "{err}");
    assert!(err.contains("= help: did you mean \"range\"?"), "{err}");
}

#[test]
fn a_missing_directory_is_a_usage_error() {
    quiddity(&["rules", "check", "tests/fixtures/no-such-dir"])
        .expect_file("rules/check-missing-directory");
}

#[test]
fn every_command_refuses_a_broken_rules_directory() {
    for args in [
        vec![
            "rules",
            "list",
            "--rules",
            "tests/fixtures/rules-broken/inverted-range",
        ],
        vec![
            "rules",
            "show",
            "ketone",
            "--rules",
            "tests/fixtures/rules-broken/inverted-range",
        ],
        vec![
            "rules",
            "at",
            "1715",
            "--rules",
            "tests/fixtures/rules-broken/inverted-range",
        ],
    ] {
        let o = quiddity(&args);
        o.expect_file(&format!("rules/broken-directory-{}", args[1]));
        o.status_is(2);
        assert!(
            stderr(&o).contains("broken.yaml:10:31"),
            "{args:?}: {}",
            stderr(&o)
        );
        assert_eq!(stdout(&o), "");
    }
}

#[test]
fn list_json_names_every_group_with_its_parents() {
    let o = quiddity(&["rules", "list", "--json"]);
    o.status_is(0);
    let v = json(&o);
    let groups = v.as_array().expect("an array");
    assert!(groups.len() >= 45);
    for g in groups {
        assert!(
            g["id"].is_string() && g["name"].is_string() && g["subtype_of"].is_array(),
            "{g}"
        );
    }
    let find = |id: &str| {
        groups
            .iter()
            .find(|g| g["id"] == id)
            .unwrap_or_else(|| panic!("{id}"))
    };
    for id in quiddity::rules::REQUIRED_GROUP_IDS {
        find(id);
    }
    assert_eq!(
        find("ketone_saturated")["subtype_of"],
        serde_json::json!(["ketone"])
    );
    assert_eq!(find("ketone")["concrete"], false);
    assert_eq!(
        find("alcohol_primary")["subtype_of"],
        serde_json::json!(["alcohol"])
    );
}

#[test]
fn list_text_marks_families() {
    let o = quiddity(&["rules", "list"]);
    o.expect_file("rules/list-text");
    let out = stdout(&o);
    assert!(
        out.lines()
            .any(|l| l.starts_with("ketone ") && l.contains("[family]")),
        "{out}"
    );
    assert!(out
        .lines()
        .any(|l| l.starts_with("ketone_saturated") && l.contains("(subtype of ketone)")));
}

#[test]
fn show_prints_bands_overrides_and_sources() {
    let o = quiddity(&["rules", "show", "carboxylic_acid"]);
    o.expect_file("rules/show-carboxylic-acid");
    let out = stdout(&o);
    assert!(
        out.starts_with("carboxylic_acid — carboxylic acid\n"),
        "{out}"
    );
    assert!(out.contains("2500–3300 cm⁻¹  O-H stretch"), "{out}");
    assert!(out.contains("gas: 3530–3600 cm⁻¹"), "{out}");
    assert!(out.contains("source: "), "{out}");
    assert!(out.contains("MS clues (soft evidence):"), "{out}");
}

#[test]
fn show_json_of_a_family_lists_its_subtypes() {
    let o = quiddity(&["rules", "show", "ketone", "--json"]);
    o.expect_file("rules/show-ketone-json");
    let v = json(&o);
    assert_eq!(v["id"], "ketone");
    assert_eq!(v["concrete"], false);
    let subtypes = v["subtypes"].as_array().expect("subtypes");
    assert!(subtypes.iter().any(|s| s == "ketone_saturated"));
}

#[test]
fn show_accepts_rule_ids_too() {
    let o = quiddity(&["rules", "show", "atmospheric_co2"]);
    o.expect_file("rules/show-atmospheric-co2");
    assert!(stdout(&o).contains("artefact"));
}

#[test]
fn show_suggests_the_closest_id_for_a_typo() {
    quiddity(&["rules", "show", "ketnoe"]).expect(
        2,
        "",
        "error: <argument>: unknown group or rule id \"ketnoe\"\n  = help: did you mean \"ketone\"?\n",
    );
}

#[test]
fn at_1715_lists_a_ketone_among_the_first_matches() {
    let o = quiddity(&["rules", "at", "1715", "--json"]);
    o.expect_file("rules/at-1715-json");
    let v = json(&o);
    assert_eq!(v["at"], 1715.0);
    let matches = v["matches"].as_array().expect("matches");
    let first: Vec<&serde_json::Value> = matches.iter().take(3).collect();
    assert!(
        first.iter().any(|m| m["lineage"]
            .as_array()
            .is_some_and(|l| l.iter().any(|x| x == "ketone"))),
        "{first:?}"
    );
    // Best first: distances never decrease.
    let d: Vec<f64> = matches
        .iter()
        .map(|m| m["distance"].as_f64().expect("distance"))
        .collect();
    assert!(d.windows(2).all(|w| w[0] <= w[1]));
}

#[test]
fn at_with_gas_uses_vapour_phase_ranges() {
    // Nyquist, vol. 1 (from memory): free alcohol O-H near 3650 in the vapour.
    let o = quiddity(&["rules", "at", "3650", "--technique", "gas", "--json"]);
    o.expect_file("rules/at-3650-gas-json");
    let v = json(&o);
    let ids: Vec<&str> = v["matches"]
        .as_array()
        .expect("matches")
        .iter()
        .filter_map(|m| m["id"].as_str())
        .collect();
    assert!(ids.contains(&"alcohol_primary"), "{ids:?}");
    assert_eq!(v["technique"], "gas");
    // In the condensed phase 3650 is above the hydrogen-bonded alcohol band.
    let o = quiddity(&["rules", "at", "3650", "--json"]);
    o.expect_file("rules/at-3650-json");
    let v = json(&o);
    let ids: Vec<&str> = v["matches"]
        .as_array()
        .expect("matches")
        .iter()
        .filter_map(|m| m["id"].as_str())
        .collect();
    assert!(!ids.contains(&"alcohol_primary"), "{ids:?}");
}

#[test]
fn at_text_names_artefacts_and_the_caution() {
    let o = quiddity(&["rules", "at", "2350"]);
    o.expect_file("rules/at-2350-text");
    let out = stdout(&o);
    assert!(out.contains("atmospheric_co2"), "{out}");
    assert!(out.contains("screening lead only"), "{out}");
}

#[test]
fn at_outside_the_window_is_bad_input() {
    let o = quiddity(&["rules", "at", "5000"]);
    o.expect_file("rules/at-outside-window");
    o.status_is(2);
    assert!(
        stderr(&o).contains("outside the 400–4000 cm⁻¹ window"),
        "{}",
        stderr(&o)
    );
    quiddity(&["rules", "at", "ketone"]).expect_file("rules/at-not-a-number");
}
