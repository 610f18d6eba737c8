//! Black-box tests of `quiddity rules`: stdout, stderr and exit status of the real binary.

use std::path::Path;
use std::process::{Command, Output};

fn quiddity(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_quiddity"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .expect("the binary runs")
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn json(o: &Output) -> serde_json::Value {
    serde_json::from_slice(&o.stdout)
        .unwrap_or_else(|e| panic!("stdout is not JSON ({e}): {}", stdout(o)))
}

#[test]
fn check_passes_on_the_built_in_catalogue() {
    let o = quiddity(&["rules", "check"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(
        stdout(&o).starts_with("catalogue ok: 10 files, "),
        "{}",
        stdout(&o)
    );
    assert!(stdout(&o).contains("digest sha256:"));
    assert_eq!(stderr(&o), "");
}

#[test]
fn check_passes_on_the_shipped_directory_with_the_same_digest() {
    let built_in = json(&quiddity(&["rules", "check", "--json"]));
    let o = quiddity(&["rules", "check", "rules", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let dir = json(&o);
    assert_eq!(dir["ok"], true);
    assert_eq!(dir["digest"], built_in["digest"]);
    assert!(dir["groups"].as_u64().unwrap_or(0) >= 45);
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
        assert_eq!(o.status.code(), Some(2), "{name}: {}", stderr(&o));
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
    let o = quiddity(&["rules", "check", "tests/fixtures/rules-broken/unknown-key"]);
    assert_eq!(o.status.code(), Some(2));
    let err = stderr(&o);
    assert!(err.contains("11 |         rnage: [1000, 1100]"), "{err}");
    assert!(err.contains("   |         ^"), "{err}");
    assert!(err.contains("= help: did you mean \"range\"?"), "{err}");
}

#[test]
fn a_missing_directory_is_a_usage_error() {
    let o = quiddity(&["rules", "check", "tests/fixtures/no-such-dir"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("tests/fixtures/no-such-dir: cannot read rules directory"),
        "{}",
        stderr(&o)
    );
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
        assert_eq!(o.status.code(), Some(2), "{args:?}");
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
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
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
    assert_eq!(o.status.code(), Some(0));
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
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(
        out.starts_with("carboxylic_acid — carboxylic acid\n"),
        "{out}"
    );
    assert!(out.contains("2500–3300 cm⁻¹  O-H stretch"), "{out}");
    assert!(out.contains("gas: 3530–3600 cm⁻¹"), "{out}");
    assert!(out.contains("source: Silverstein"), "{out}");
    assert!(out.contains("MS clues (soft evidence):"), "{out}");
}

#[test]
fn show_json_of_a_family_lists_its_subtypes() {
    let o = quiddity(&["rules", "show", "ketone", "--json"]);
    assert_eq!(o.status.code(), Some(0));
    let v = json(&o);
    assert_eq!(v["id"], "ketone");
    assert_eq!(v["concrete"], false);
    let subtypes = v["subtypes"].as_array().expect("subtypes");
    assert!(subtypes.iter().any(|s| s == "ketone_saturated"));
}

#[test]
fn show_accepts_rule_ids_too() {
    let o = quiddity(&["rules", "show", "atmospheric_co2"]);
    assert_eq!(o.status.code(), Some(0));
    assert!(stdout(&o).contains("artefact"));
}

#[test]
fn show_suggests_the_closest_id_for_a_typo() {
    let o = quiddity(&["rules", "show", "ketnoe"]);
    assert_eq!(o.status.code(), Some(2));
    assert_eq!(stdout(&o), "");
    assert_eq!(
        stderr(&o),
        "error: <argument>: unknown group or rule id \"ketnoe\"\n  = help: did you mean \"ketone\"?\n"
    );
}

#[test]
fn at_1715_lists_a_ketone_among_the_first_matches() {
    let o = quiddity(&["rules", "at", "1715", "--json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
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
    assert_eq!(o.status.code(), Some(0));
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
    assert_eq!(o.status.code(), Some(0));
    let out = stdout(&o);
    assert!(out.contains("atmospheric_co2"), "{out}");
    assert!(out.contains("screening lead only"), "{out}");
}

#[test]
fn at_outside_the_window_is_bad_input() {
    let o = quiddity(&["rules", "at", "5000"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("outside the 400–4000 cm⁻¹ window"),
        "{}",
        stderr(&o)
    );
    let o = quiddity(&["rules", "at", "ketone"]);
    assert_eq!(o.status.code(), Some(2));
}
